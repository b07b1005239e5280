"""
Stacked time-history panels written directly as SVG text, without matplotlib.

A parametric study draws one history figure per record and system — thousands of them —
and matplotlib spends about 0.1-0.3 s on each (mostly creating and drawing tick
artists). These panels need only a frame, a grid, ticks, a polyline, a zero line and a
marked peak, so this module writes those elements itself: about a hundred times faster,
a quarter of the size, and byte-identical for identical inputs by construction (plain
string formatting with fixed precision, no ids drawn from counters or random numbers).
The look follows :data:`sdofreport.site.figures.FIGURE_RC` (fonts, sizes, colours, line
widths); tick positions are those of matplotlib's ``MaxNLocator``, restated in
:mod:`sdofreport.site.ticks` so that a worker drawing these figures never imports
matplotlib.

Lengths are in points (72 per inch), the unit of the SVG ``viewBox``; y grows downwards.

Module boundary (the direct-SVG figures): this module is the SVG back-end only. It turns
prepared numbers, a :class:`PanelLayout` and a :class:`PanelStyle` into SVG text and
knows nothing of projects, results, units or pages. It imports numpy,
:mod:`sdofreport.site.ticks` and :mod:`sdofreport.site.symbols`, never matplotlib; in
the package only :mod:`sdofreport.site.figures` imports it, and the site asks
:mod:`~sdofreport.site.figures` for every figure (:mod:`sdofreport.site.drawing` calls
its ``*_figure`` functions by name). Kept because it pays: about 4 ms a figure against
89 ms through matplotlib (measured for issue 16).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from xml.sax.saxutils import escape

import numpy as np

from sdofreport.site.symbols import split_symbols
from sdofreport.site.ticks import nice_ticks

__all__ = ["AxesSpec", "Band", "Curve", "LegendEntry", "PanelLayout", "PanelStyle", "Span",
           "axes_svg", "data_limits", "history_panels_svg"]

_FONT = "DejaVu Sans, Arial, Helvetica, Liberation Sans, sans-serif"
_TICK_PT = 3.5  # tick length (matplotlib's default major tick size) [pt]
_TICK_PAD_PT = 3.5  # gap between a tick and its label [pt]
_MINUS = "\u2212"


@dataclass(frozen=True)
class PanelLayout:
    """Figure size and margins [in], the same quantities the matplotlib figures use."""

    width_in: float
    height_in: float
    left_in: float
    right_in: float
    bottom_in: float
    top_in: float
    hspace_in: float


@dataclass(frozen=True)
class PanelStyle:
    """Colours [#rrggbb], line widths [pt] and font sizes [pt] taken from the rc settings."""

    line: str
    peak: str
    frame: str
    frame_width: float
    grid: str
    grid_width: float
    tick_width: float
    title_size: float
    label_size: float
    tick_size: float
    peak_size: float
    figure_title_size: float


def _num(value: float) -> str:
    """A coordinate with two decimals [pt]; '-0.00' is written '0.00'."""
    text = f"{value:.2f}"
    return "0.00" if text == "-0.00" else text


def _tick_text(value: float, step: float) -> str:
    """Tick label: as many decimals as the tick step needs, typographic minus."""
    if value == 0.0:
        return "0"
    if step < 1e-4 or abs(value) >= 1e6:
        text = f"{value:.3g}"
    else:
        decimals = 0
        while decimals < 8 and abs(round(step, decimals) - step) > 1e-9 * step:
            decimals += 1
        text = f"{value:.{decimals}f}"
    return text.replace("-", _MINUS)


def _limits(values: np.ndarray, margin: float) -> tuple[float, float]:
    """Data range including zero, widened by ``margin`` of its span on each side."""
    finite = values[np.isfinite(values)]
    lo = min(0.0, float(finite.min())) if finite.size else -1.0
    hi = max(0.0, float(finite.max())) if finite.size else 1.0
    if hi - lo <= 1e-300:
        return lo - 1.0, hi + 1.0
    span = hi - lo
    return lo - margin * span, hi + margin * span


def _ticks(lo: float, hi: float, nbins: int) -> tuple[np.ndarray, float]:
    ticks = nice_ticks(lo, hi, nbins, steps=(1, 2, 2.5, 5, 10))
    step = float(ticks[1] - ticks[0]) if ticks.size > 1 else 1.0
    inside = ticks[(ticks >= lo - 1e-9 * step) & (ticks <= hi + 1e-9 * step)]
    return inside, step


def _axis_ticks(lo: float, hi: float, nbins: int, *, log: bool = False,
                subs=()) -> tuple[np.ndarray, list[str]]:
    """Tick positions on one axis and their labels: ``s × 10^k`` for s in ``subs`` on a
    log axis, else round steps (at most ``nbins`` intervals)."""
    if log:
        ticks = _log_ticks(lo, hi, subs)
        return ticks, [_log_tick_text(v) for v in ticks]
    ticks, step = _ticks(lo, hi, nbins)
    return ticks, [_tick_text(float(v), step) for v in ticks]


def _text(x, y, text, size, *, anchor="start", baseline="auto", rotate=None,
          colour="#000000") -> str:
    transform = f' transform="rotate({rotate} {_num(x)} {_num(y)})"' if rotate else ""
    base = "" if baseline == "auto" else f' dominant-baseline="{baseline}"'
    return (f'<text x="{_num(x)}" y="{_num(y)}" font-size="{size:g}" '
            f'text-anchor="{anchor}"{base} fill="{colour}"{transform}>'
            f"{_with_subscripts(text, size)}</text>")


def _with_subscripts(text, size) -> str:
    """Escaped text; the subscripts of :data:`sdofreport.site.symbols.SYMBOLS` lowered
    and at 70 % size, as on the pages."""
    return "".join(
        f'<tspan baseline-shift="sub" font-size="{0.7 * size:g}">{escape(piece)}</tspan>'
        if sub else escape(piece) for piece, sub in split_symbols(str(text)))


def _svg_open(w: float, h: float, defs: str = "") -> list[str]:
    """XML declaration, <svg> element of ``w`` × ``h`` pt, optional defs, white page."""
    return [
        '<?xml version="1.0" encoding="utf-8" standalone="no"?>\n',
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{_num(w)}pt" height="{_num(h)}pt" '
        f'viewBox="0 0 {_num(w)} {_num(h)}" version="1.1" font-family="{_FONT}">\n',
        defs,
        f'<rect x="0" y="0" width="{_num(w)}" height="{_num(h)}" fill="#ffffff"/>\n',
    ]


def _grid(x_positions, y_positions, x0, x1, top, bottom, style) -> str:
    """Light grid lines at the given screen positions. [pt]"""
    grid = "".join(f"M{_num(x)} {_num(top)}V{_num(bottom)}" for x in x_positions)
    grid += "".join(f"M{_num(x0)} {_num(y)}H{_num(x1)}" for y in y_positions)
    return (f'<path d="{grid}" stroke="{style.grid}" stroke-width="{style.grid_width:g}" '
            f'fill="none"/>\n')


def _frame(x0, top, width, height, style) -> str:
    """The axes' frame. [pt]"""
    return (f'<rect x="{_num(x0)}" y="{_num(top)}" width="{_num(width)}" '
            f'height="{_num(height)}" stroke="{style.frame}" stroke-width='
            f'"{style.frame_width:g}" fill="none"/>\n')


def _tick_marks(marks: str, style) -> str:
    return (f'<path d="{marks}" stroke="{style.frame}" stroke-width='
            f'"{style.tick_width:g}" fill="none"/>\n')


def _ytick_label(x0, y, text, style) -> str:
    return _text(x0 - _TICK_PT - _TICK_PAD_PT, y, text, style.tick_size, anchor="end",
                 baseline="central") + "\n"


def _ylabel(centre_y, text, style) -> str:
    """
    Y label rotated a quarter turn counter-clockwise: the glyphs' tops face the edge and
    the descenders end 0.3 in from it, as in the matplotlib figures.
    """
    return _text(0.3 * 72.0 - 0.22 * style.label_size, centre_y, text, style.label_size,
                 anchor="middle", rotate=-90) + "\n"


def _xlabel(x0, x1, h, text, style) -> str:
    return _text((x0 + x1) / 2.0, h - 0.1 * 72.0, text, style.label_size,
                 anchor="middle") + "\n"


def _polyline(xs: np.ndarray, ys: np.ndarray) -> str:
    """
    Path data through the finite points in hundredths of a point (the path is drawn
    inside ``scale(0.01)``, so integers keep the text short and fast to write): each run
    of points is an absolute move then relative line steps; a gap at every non-finite
    value.
    """
    finite = np.isfinite(xs) & np.isfinite(ys)
    xi = np.rint(np.where(finite, xs, 0.0) * 100.0).astype(np.int64)
    yi = np.rint(np.where(finite, ys, 0.0) * 100.0).astype(np.int64)
    edges = np.flatnonzero(np.diff(np.concatenate(([0], finite.astype(np.int8), [0]))))
    parts = []
    for a, b in zip(edges[0::2].tolist(), edges[1::2].tolist()):
        parts.append(f"M{xi[a]} {yi[a]}")
        if b - a > 1:
            # Relative steps: integers add up exactly, and are about half as long.
            steps = np.column_stack((np.diff(xi[a:b]), np.diff(yi[a:b]))).ravel().tolist()
            parts.append("l" + " ".join(map(str, steps)))
    return "".join(parts)


def history_panels_svg(panels, layout: PanelLayout, style: PanelStyle, *, title=None,
                       xlabel="Time [s]", peak_label=None, text_width=None) -> str:
    """
    SVG text of vertically stacked panels sharing the time axis.

    Parameters
    ----------
    panels : sequence of (label, t, v, td, vd, ylabel)
        Per panel: its label, the full samples ``t`` [s] and ``v`` (for the peak and the
        axis range), the decimated samples ``td``, ``vd`` that are drawn, and the y-axis
        label.
    layout : PanelLayout
        Size and margins. [in]
    style : PanelStyle
        Colours, widths and font sizes.
    title : str, optional
        Figure title, centred on top.
    xlabel : str
        Label of the shared time axis.
    peak_label : callable
        ``peak_label(value, ylabel) -> str``, the text beside each panel's peak.
    text_width : callable
        ``text_width(text, size_pt) -> float``, the width of a text line [pt], used to
        size the white box behind each peak label.
    """
    w = layout.width_in * 72.0
    h = layout.height_in * 72.0
    n = len(panels)
    x0 = layout.left_in * 72.0
    x1 = w - layout.right_in * 72.0
    gap = layout.hspace_in * 72.0
    axes_h = (h - (layout.top_in + layout.bottom_in) * 72.0 - gap * (n - 1)) / n
    t_all = np.concatenate([p[1] for p in panels])
    t_fin = t_all[np.isfinite(t_all)]
    t_lo, t_hi = (float(t_fin.min()), float(t_fin.max())) if t_fin.size else (0.0, 1.0)
    if t_hi <= t_lo:
        t_lo, t_hi = t_lo - 0.5, t_hi + 0.5
    x_ticks, x_labels = _axis_ticks(t_lo, t_hi, 9)

    def sx(t):
        return x0 + (np.asarray(t, dtype=float) - t_lo) * ((x1 - x0) / (t_hi - t_lo))

    out = _svg_open(w, h)
    if title:
        out.append(_text(w / 2.0, 0.08 * 72.0, title, style.figure_title_size,
                         anchor="middle", baseline="hanging") + "\n")
    for i, (label, t, v, td, vd, ylabel) in enumerate(panels):
        top = layout.top_in * 72.0 + i * (axes_h + gap)
        bottom = top + axes_h
        v_lo, v_hi = _limits(v, 0.25)
        y_ticks, y_labels = _axis_ticks(v_lo, v_hi, 5)

        def sy(value, top=top, v_lo=v_lo, v_hi=v_hi):
            return top + (v_hi - np.asarray(value, dtype=float)) * (axes_h / (v_hi - v_lo))

        out.append(f'<g class="panel" id="panel_{i + 1}">\n')
        # Grid, below everything else.
        out.append(_grid(sx(x_ticks), sy(y_ticks), x0, x1, top, bottom, style))
        # Zero line, the history, the frame.
        out.append(f'<path d="M{_num(x0)} {_num(sy(0.0))}H{_num(x1)}" stroke="#999999" '
                   f'stroke-width="0.5" fill="none"/>\n')
        out.append(f'<path class="history" transform="scale(0.01)" d='
                   f'"{_polyline(sx(td), sy(vd))}" stroke="{style.line}" stroke-width="70" '
                   f'stroke-linejoin="round" fill="none"/>\n')
        out.append(_frame(x0, top, x1 - x0, axes_h, style))
        # Ticks and their labels: y on every panel, x on the last one only.
        marks = "".join(f"M{_num(x0)} {_num(sy(y_))}h{_num(-_TICK_PT)}" for y_ in y_ticks)
        if i == n - 1:
            marks += "".join(f"M{_num(sx(t_))} {_num(bottom)}v{_num(_TICK_PT)}"
                             for t_ in x_ticks)
        out.append(_tick_marks(marks, style))
        for y_, text in zip(y_ticks, y_labels):
            out.append(_ytick_label(x0, float(sy(y_)), text, style))
        if i == n - 1:
            for t_, text in zip(x_ticks, x_labels):
                out.append(_text(float(sx(t_)), bottom + _TICK_PT + _TICK_PAD_PT,
                                 text, style.tick_size,
                                 anchor="middle", baseline="hanging") + "\n")
        # Panel label above its top-left corner; y label at a fixed distance from the edge.
        out.append(_text(x0, top - 0.02 * axes_h, label, style.title_size) + "\n")
        out.append(_ylabel(top + axes_h / 2.0, ylabel, style))
        # The peak of |v|: a dot and its value in a white box.
        finite = np.isfinite(v) & np.isfinite(t)
        if finite.any():
            k = int(np.argmax(np.where(finite, np.abs(v), -np.inf)))
            px, py = float(sx(t[k])), float(sy(v[k]))
            out.append(f'<circle cx="{_num(px)}" cy="{_num(py)}" r="2.25" '
                       f'fill="{style.peak}"/>\n')
            text = peak_label(float(v[k]), ylabel)
            right_half = t.size > 1 and t[k] > 0.5 * (t_lo + t_hi)
            width = text_width(text, style.peak_size) + 2.4
            height = style.peak_size * 1.25
            bx = px - 6.0 - width if right_half else px + 6.0
            by = py - 5.0 - height if v[k] >= 0 else py + 5.0
            out.append(f'<rect x="{_num(bx)}" y="{_num(by)}" width="{_num(width)}" '
                       f'height="{_num(height)}" fill="#ffffff" fill-opacity="0.8"/>\n')
            out.append(_text(bx + 1.2, by + height / 2.0, text, style.peak_size,
                             baseline="central") + "\n")
        out.append("</g>\n")
    out.append(_xlabel(x0, x1, h, xlabel, style))
    out.append("</svg>\n")
    return "".join(out)


# ------------------------------------------------------------------ one axes, many curves
@dataclass(frozen=True)
class Curve:
    """A polyline in data units; ``dash`` is an SVG dash array [pt] or None."""

    x: np.ndarray
    y: np.ndarray
    colour: str
    width: float
    opacity: float = 1.0
    dash: str | None = None


@dataclass(frozen=True)
class Band:
    """The area between ``lower`` and ``upper`` over ``x``, filled."""

    x: np.ndarray
    lower: np.ndarray
    upper: np.ndarray
    colour: str


@dataclass(frozen=True)
class Span:
    """A shaded range of x over the whole height of the axes."""

    low: float
    high: float
    colour: str


@dataclass(frozen=True)
class LegendEntry:
    """One legend row: a line sample (``patch=False``) or a filled square."""

    label: str
    colour: str
    width: float = 1.0
    opacity: float = 1.0
    dash: str | None = None
    patch: bool = False


@dataclass(frozen=True)
class AxesSpec:
    """
    Everything one figure with a single axes shows. Limits are in data units; a log
    axis takes positive limits. ``markers`` are x positions drawn as dotted vertical
    lines with a rotated label each, ``(x, text)``.
    """

    xlim: tuple[float, float]
    ylim: tuple[float, float]
    xlog: bool = False
    ylog: bool = False
    spans: tuple = ()
    bands: tuple = ()
    curves: tuple = ()
    markers: tuple = ()
    legend: tuple = ()
    xlabel: str = ""
    ylabel: str = ""
    title: str | None = None
    log_subs_x: tuple = (1.0, 2.0, 5.0)
    log_subs_y: tuple = (1.0, 2.0, 5.0)


def _log_ticks(lo: float, hi: float, subs) -> np.ndarray:
    """Ticks ``s × 10^k`` for s in ``subs`` that lie in [lo, hi] (lo, hi > 0)."""
    first, last = math.floor(math.log10(lo)), math.ceil(math.log10(hi))
    values = [s * 10.0 ** k for k in range(first, last + 1) for s in subs]
    # Round away binary noise so that labels read 0.02, not 0.020000000000000004.
    values = [float(f"{v:.12g}") for v in values]
    return np.array([v for v in values if lo * (1 - 1e-9) <= v <= hi * (1 + 1e-9)])


def _log_tick_text(value: float) -> str:
    return f"{value:g}".replace("-", _MINUS)


def data_limits(arrays, *, log: bool, margin: float = 0.05,
                bottom_zero: bool = False) -> tuple[float, float]:
    """
    Autoscaled limits over the finite values of ``arrays`` (positive ones on a log
    axis), widened by ``margin`` of the span on each side (of the log span on a log
    axis); ``bottom_zero`` puts the lower limit at 0 (linear axes).
    """
    values = np.concatenate([np.asarray(a, dtype=float).ravel() for a in arrays]
                            or [np.zeros(0)])
    values = values[np.isfinite(values)]
    if log:
        values = values[values > 0]
        if not values.size:
            return 0.1, 10.0
        lo, hi = math.log10(values.min()), math.log10(values.max())
        if hi - lo < 1e-12:
            lo, hi = lo - 1.0, hi + 1.0
        span = hi - lo
        return 10.0 ** (lo - margin * span), 10.0 ** (hi + margin * span)
    if not values.size:
        return (0.0 if bottom_zero else -1.0), 1.0
    lo, hi = float(values.min()), float(values.max())
    if hi - lo <= 1e-300:
        lo, hi = lo - max(1.0, abs(lo)) * 0.5, hi + max(1.0, abs(hi)) * 0.5
    span = hi - lo
    lo, hi = lo - margin * span, hi + margin * span
    return (0.0 if bottom_zero else lo), hi


def axes_svg(spec: AxesSpec, layout: PanelLayout, style: PanelStyle, *, text_width,
             legend_width_in: float = 0.0) -> str:
    """
    SVG text of a figure with one axes: shaded spans, filled bands, curves, dotted
    markers, a legend to the right of the axes (``legend_width_in`` wide) and labels.
    Curves are clipped to the axes.
    """
    w = layout.width_in * 72.0
    h = layout.height_in * 72.0
    x0 = layout.left_in * 72.0
    x1 = w - (layout.right_in + legend_width_in) * 72.0
    top = layout.top_in * 72.0
    bottom = h - layout.bottom_in * 72.0
    (xa, xb), (ya, yb) = spec.xlim, spec.ylim
    fx = (lambda v: np.log10(v)) if spec.xlog else (lambda v: v)
    fy = (lambda v: np.log10(v)) if spec.ylog else (lambda v: v)
    xa_, xb_ = float(fx(xa)), float(fx(xb))
    ya_, yb_ = float(fy(ya)), float(fy(yb))

    def sx(v):
        with np.errstate(divide="ignore", invalid="ignore"):
            return x0 + (fx(np.asarray(v, dtype=float)) - xa_) * ((x1 - x0) / (xb_ - xa_))

    def sy(v):
        with np.errstate(divide="ignore", invalid="ignore"):
            return bottom - (fy(np.asarray(v, dtype=float)) - ya_) * ((bottom - top)
                                                                       / (yb_ - ya_))

    x_ticks, x_labels = _axis_ticks(xa, xb, 9, log=spec.xlog, subs=spec.log_subs_x)
    y_ticks, y_labels = _axis_ticks(ya, yb, 6, log=spec.ylog, subs=spec.log_subs_y)

    out = _svg_open(w, h, f'<defs><clipPath id="axes-area"><rect x="{_num(x0)}" '
                          f'y="{_num(top)}" width="{_num(x1 - x0)}" '
                          f'height="{_num(bottom - top)}"/></clipPath></defs>\n')
    out.append('<g clip-path="url(#axes-area)">\n')
    for span in spec.spans:
        a, b = float(sx(span.low)), float(sx(span.high))
        out.append(f'<rect x="{_num(a)}" y="{_num(top)}" width="{_num(b - a)}" '
                   f'height="{_num(bottom - top)}" fill="{span.colour}"/>\n')
    out.append(_grid(sx(x_ticks), sy(y_ticks), x0, x1, top, bottom, style))
    for band in spec.bands:
        xs, lo_, hi_ = sx(band.x), sy(band.lower), sy(band.upper)
        ok = np.isfinite(xs) & np.isfinite(lo_) & np.isfinite(hi_)
        edges = np.flatnonzero(np.diff(np.concatenate(([0], ok.astype(np.int8), [0]))))
        for a, b in zip(edges[0::2].tolist(), edges[1::2].tolist()):
            ring_x = np.concatenate((xs[a:b], xs[a:b][::-1]))
            ring_y = np.concatenate((hi_[a:b], lo_[a:b][::-1]))
            out.append(f'<path transform="scale(0.01)" d="{_polyline(ring_x, ring_y)}Z" '
                       f'fill="{band.colour}" stroke="none"/>\n')
    for curve in spec.curves:
        opacity = (f' stroke-opacity="{curve.opacity:g}"' if curve.opacity < 1.0 else "")
        # The path is drawn in hundredths of a point, and so is its dash pattern.
        dash = "" if not curve.dash else (
            ' stroke-dasharray="'
            + ",".join(f"{100 * float(d):g}" for d in curve.dash.split(",")) + '"')
        out.append(f'<path class="curve" transform="scale(0.01)" d='
                   f'"{_polyline(sx(curve.x), sy(curve.y))}" stroke="{curve.colour}" '
                   f'stroke-width="{100 * curve.width:g}"{opacity}{dash} '
                   f'stroke-linejoin="round" fill="none"/>\n')
    out.append("</g>\n")
    # Frame, ticks and tick labels (x tick labels grouped as xtick_1, xtick_2, ...).
    out.append(_frame(x0, top, x1 - x0, bottom - top, style))
    marks = "".join(f"M{_num(x0)} {_num(sy(v))}h{_num(-_TICK_PT)}" for v in y_ticks)
    marks += "".join(f"M{_num(sx(v))} {_num(bottom)}v{_num(_TICK_PT)}" for v in x_ticks)
    out.append(_tick_marks(marks, style))
    for k, (v, text) in enumerate(zip(x_ticks, x_labels), start=1):
        out.append(f'<g id="xtick_{k}">' + _text(float(sx(v)), bottom + _TICK_PT
                                                  + _TICK_PAD_PT, text, style.tick_size,
                                                  anchor="middle", baseline="hanging")
                   + "</g>\n")
    for v, text in zip(y_ticks, y_labels):
        out.append(_ytick_label(x0, float(sy(v)), text, style))
    # Dotted markers with their labels, inside the axes near the top.
    for x, text in spec.markers:
        px = float(sx(x))
        if not (x0 - 0.01 <= px <= x1 + 0.01):
            continue
        out.append(f'<path d="M{_num(px)} {_num(top)}V{_num(bottom)}" stroke="#333333" '
                   f'stroke-width="0.8" stroke-dasharray="0.8,1.32" fill="none"/>\n')
        size = 7.5
        length = text_width(text, size) + 2.0
        ty = top + 0.02 * (bottom - top)
        out.append(f'<rect x="{_num(px - size * 1.15)}" y="{_num(ty)}" '
                   f'width="{_num(size * 1.1)}" height="{_num(length)}" fill="#ffffff" '
                   f'fill-opacity="0.7"/>\n')
        out.append(_text(px - 0.22 * size - 1.0, ty + 1.0, text, size, anchor="end",
                         rotate=-90, colour="#333333") + "\n")
    # Labels and title.
    out.append(_xlabel(x0, x1, h, spec.xlabel, style))
    out.append(_ylabel((top + bottom) / 2.0, spec.ylabel, style))
    if spec.title:
        out.append(_text(x0, top - 5.0, spec.title, style.title_size) + "\n")
    if spec.legend:
        out.append(_legend(spec.legend, x1, top, legend_width_in * 72.0, style))
    out.append("</svg>\n")
    return "".join(out)


def _legend(entries, left: float, top: float, width: float, style: PanelStyle) -> str:
    """A framed legend whose top-left corner is at (left, top); a label may hold line
    breaks, and its later lines follow under the first at a tighter line spacing. [pt]"""
    size = style.tick_size  # legend.fontsize = tick label size in FIGURE_RC
    pad = 0.4 * size
    row = 1.5 * size
    line = 1.2 * size
    handle = 2.0 * size
    extra = sum(str(entry.label).count("\n") for entry in entries)
    height = 2 * pad + row * len(entries) + line * extra - 0.5 * size
    box_w = width - 0.2 * 72.0
    out = [f'<g class="legend"><rect x="{_num(left + 0.1 * 72.0)}" y="{_num(top)}" '
           f'width="{_num(box_w)}" height="{_num(height)}" fill="#ffffff" '
           f'fill-opacity="0.85" stroke="#bbbbbb" stroke-width="0.8"/>\n']
    x = left + 0.1 * 72.0 + pad
    cy = top + pad + 0.5 * size - row
    for entry in entries:
        lines = str(entry.label).split("\n")
        cy += row
        if entry.patch:
            out.append(f'<rect x="{_num(x)}" y="{_num(cy - 0.35 * size)}" '
                       f'width="{_num(handle)}" height="{_num(0.7 * size)}" '
                       f'fill="{entry.colour}"/>\n')
        else:
            dash = f' stroke-dasharray="{entry.dash}"' if entry.dash else ""
            opacity = (f' stroke-opacity="{entry.opacity:g}"' if entry.opacity < 1.0
                       else "")
            out.append(f'<path d="M{_num(x)} {_num(cy)}h{_num(handle)}" stroke='
                       f'"{entry.colour}" stroke-width="{entry.width:g}"{opacity}{dash} '
                       f'fill="none"/>\n')
        for number, text in enumerate(lines):
            out.append(_text(x + handle + 0.8 * size, cy + number * line, text, size,
                             baseline="central") + "\n")
        cy += line * (len(lines) - 1)
    out.append("</g>\n")
    return "".join(out)
