"""
Figures for the review site, returned as deterministic SVG text.

Every public ``*_figure`` function takes already-converted numbers plus the axis labels to show
(for example ``"Displacement [mm]"``), draws on a fresh :class:`matplotlib.figure.Figure`
attached to matplotlib's SVG canvas (no pyplot, no global figure registry, so figures can be
drawn in parallel processes) and returns the SVG as ``str``. Figures use fixed margins rather
than a layout engine, which would redraw each figure several times.

Determinism: all drawing happens inside ``matplotlib.rc_context(FIGURE_RC)``; ``svg.hashsalt`` is
fixed so element ids do not depend on random numbers, ``svg.fonttype = "none"`` keeps text as
searchable ``<text>`` elements, and the SVG metadata carries no date. Identical inputs therefore
give identical bytes across runs and processes on the same installation (fonts and matplotlib
version being equal). ``rc_context`` swaps process-wide rcParams, so render in parallel
*processes*, not threads.

The exceptions are :func:`histories_figure`, :func:`spectra_figure`,
:func:`fourier_figure` and :func:`fragility_figure`: a study draws one history per record
and system, often thousands, and spectra for every record, so these are written directly
as SVG by :mod:`sdofreport.site.svg_panels` in the same style (about 5-10 ms instead of
0.1-0.3 s each); :func:`checks_bar_figure` and :func:`hysteresis_figure` still go through
matplotlib as described above. matplotlib is imported only when one of those two is
drawn (the import costs a process about a second); the direct figures measure label
widths from the committed table :mod:`sdofreport.site.font_metrics`.

Long histories are thinned by :func:`decimate_minmax`, which keeps every bucket's first, last,
minimum and maximum sample, so peaks survive exactly.

Module boundary: this module is the one public entry point for figures. It decides what
a figure shows (data, labels, layout, :data:`FIGURE_RC` style) and which back-end draws
it: matplotlib here, or the direct-SVG back-end :mod:`sdofreport.site.svg_panels`, which
only this module imports. Where and when figures are drawn (cache, worker processes,
the staged tree) is :mod:`sdofreport.site.drawing`'s business, which never draws itself.
"""

from __future__ import annotations

import functools
import io
import math
import re

import numpy as np
from cycler import cycler  # a matplotlib dependency, light to import

from sdofreport.site.symbols import plain_symbols, wrap_label
from sdofreport.site.svg_panels import (
    AxesSpec,
    Band,
    Curve,
    LegendEntry,
    PanelLayout,
    PanelStyle,
    Span,
    axes_svg,
    data_limits,
    history_panels_svg,
)

__all__ = [
    "FIGURE_RC",
    "PALETTE",
    "checks_bar_figure",
    "decimate_minmax",
    "fourier_figure",
    "fragility_figure",
    "histories_figure",
    "hysteresis_figure",
    "spectra_figure",
]

# Okabe & Ito colour-universal-design palette (colour-blind safe), in a fixed order.
# Source: M. Okabe and K. Ito, "Color Universal Design (CUD): How to make figures and
# presentations that are friendly to colorblind people," 2008, https://jfly.uni-koeln.de/color/
PALETTE = {
    "black": "#000000",
    "orange": "#E69F00",
    "sky_blue": "#56B4E9",
    "bluish_green": "#009E73",
    "yellow": "#F0E442",
    "blue": "#0072B2",
    "vermillion": "#D55E00",
    "reddish_purple": "#CC79A7",
}
_LINE_COLOURS = [PALETTE[k] for k in ("blue", "vermillion", "bluish_green", "reddish_purple",
                                      "orange", "sky_blue")]
_RECORD_COLOURS = [PALETTE[k] for k in ("sky_blue", "orange", "bluish_green", "reddish_purple",
                                        "blue", "vermillion")]
_EMPHASIS_COLOURS = [PALETTE[k] for k in ("blue", "bluish_green", "reddish_purple", "orange")]
_DESIGN_COLOUR = PALETTE["vermillion"]
_PASS_COLOUR = PALETTE["blue"]
_FAIL_COLOUR = PALETTE["vermillion"]
_GREY_RECORD = "#8c8c8c"
#: Dash of a spectrum beyond its record's usable period [pt] (design spectrum: 9.6,4.8).
_BEYOND_DASH = "2.4,2.4"
_BAND_GREY = "#d0d0d0"
_SHADE_GREY = "#f4efdb"  # very light warm tint: distinct from the grey ±1σ band

#: Width of every figure [in]. SVG writes 72 pt per inch, i.e. 648 pt ≈ 864 CSS px,
#: which fits a ~900 px page column; the SVG scales if the page is narrower.
FIGURE_WIDTH_IN = 9.0

#: rc settings applied (via ``matplotlib.rc_context``) around every figure's drawing and saving.
FIGURE_RC = {
    # Deterministic, text-preserving SVG.
    "svg.hashsalt": "sdofreport",
    "svg.fonttype": "none",
    "svg.image_inline": True,
    "savefig.format": "svg",
    "savefig.bbox": None,
    "savefig.transparent": False,
    "savefig.facecolor": "white",
    "savefig.edgecolor": "white",
    # Text.
    "font.family": "sans-serif",
    "font.sans-serif": ["DejaVu Sans", "Arial", "Helvetica", "Liberation Sans"],
    "font.size": 9.0,
    "axes.titlesize": 9.5,
    "axes.labelsize": 9.0,
    "xtick.labelsize": 8.0,
    "ytick.labelsize": 8.0,
    "legend.fontsize": 8.0,
    "figure.titlesize": 10.5,
    "axes.formatter.use_mathtext": False,
    "axes.unicode_minus": True,
    # Plain look: thin lines, light grey grid, no chart junk.
    "axes.prop_cycle": cycler(color=_LINE_COLOURS),
    "axes.linewidth": 0.6,
    "axes.edgecolor": "#444444",
    "axes.grid": True,
    "axes.grid.which": "major",
    "axes.axisbelow": True,
    "grid.color": "#dddddd",
    "grid.linewidth": 0.5,
    "grid.linestyle": "-",
    "lines.linewidth": 0.9,
    "lines.markersize": 4.0,
    "xtick.major.width": 0.6,
    "ytick.major.width": 0.6,
    "xtick.minor.width": 0.4,
    "ytick.minor.width": 0.4,
    "xtick.direction": "out",
    "ytick.direction": "out",
    "legend.frameon": True,
    "legend.framealpha": 0.85,
    "legend.edgecolor": "#bbbbbb",
    "legend.fancybox": False,
    "hatch.color": "#222222",
    "hatch.linewidth": 0.6,
    "path.simplify": True,
    "path.simplify_threshold": 1.0 / 9.0,
    "figure.dpi": 100.0,
    "figure.facecolor": "white",
    "figure.constrained_layout.use": False,
}

# Fixed SVG metadata: no creation date; a fixed creator (no matplotlib version string),
# so identical inputs give identical bytes.
_SVG_METADATA = {"Date": None, "Creator": "sdofreport"}

# Default number of plotted points per curve after decimation. 2,000 points over ~600 pt of
# axis width is more than 3 points per pt; more cannot be seen, only stored.
_MAX_POINTS = 2000
_FOURIER_MAX_POINTS = 1200
# A loop is a 2-D path: its corners need not be extremes of either signal, so it gets more.
_LOOP_MAX_POINTS = 4000
_MAX_LABEL_CHARS = 40

# Fixed margins [in]: room for tick labels plus axis label on the left, tick labels plus
# axis label at the bottom, a title line on top.
_LEFT_IN = 0.85
_BOTTOM_IN = 0.5
_TITLE_IN = 0.3

_UNIT_RE = re.compile(r"\[([^\[\]]*)\]\s*$")


# ---------------------------------------------------------------------------------------------
# Decimation
# ---------------------------------------------------------------------------------------------
def _bucket_extreme_indices(y, starts):
    """
    Indices of the first, last, minimum and maximum sample of every bucket, sorted.

    Parameters
    ----------
    y : numpy.ndarray
        Values, 1-D. [any]
    starts : numpy.ndarray
        Strictly increasing start index of each bucket, ``starts[0] == 0``; the last bucket
        ends at ``len(y)``. [-]

    Notes
    -----
    ``numpy.lexsort`` is stable, so among equal values the earliest index is kept (the same
    tie rule as ``numpy.argmax``); NaN sorts last and is therefore never taken as an extreme
    unless a whole bucket is NaN.
    """
    n = y.size
    sizes = np.diff(np.append(starts, n))
    bucket = np.repeat(np.arange(starts.size), sizes)
    ends = starts + sizes - 1
    # First index of each bucket in the (bucket, value) order is the bucket's argmin;
    # in the (bucket, -value) order it is the argmax.
    arg_min = np.lexsort((y, bucket))[starts]
    arg_max = np.lexsort((-y, bucket))[starts]
    return np.unique(np.concatenate((starts, ends, arg_min, arg_max)))


def _as_1d_pair(x, y, x_name="x", y_name="y"):
    x = np.asarray(x, dtype=float).reshape(-1) if np.ndim(x) <= 1 else None
    y = np.asarray(y, dtype=float).reshape(-1) if np.ndim(y) <= 1 else None
    if x is None:
        raise ValueError(f"{x_name} must be 1-D")
    if y is None:
        raise ValueError(f"{y_name} must be 1-D")
    if x.size != y.size:
        raise ValueError(
            f"{x_name} and {y_name} must have the same length; got {x.size} and {y.size}"
        )
    return x, y


def decimate_minmax(x, y, max_points=2000):
    """
    Thin a sampled curve for plotting while keeping every bucket's extremes.

    The samples are split into ``max_points // 4`` buckets of (nearly) equal count; from each
    bucket the first, last, minimum and maximum sample are kept, in their original order. The
    global maximum and minimum of ``y`` (earliest occurrence if tied) and their ``x`` therefore
    survive exactly, and so does every local extreme that is the extreme of its bucket.

    Parameters
    ----------
    x : array-like
        Abscissa, e.g. time; any order is kept as given. [any]
    y : array-like
        Ordinate, same length as ``x``. [any]
    max_points : int, optional
        Upper bound on the number of points returned; at least 8. [-]

    Returns
    -------
    x_out, y_out : numpy.ndarray
        Float copies of the kept samples; unchanged (copied) when ``len(x) <= max_points``.
    """
    x, y = _as_1d_pair(x, y)
    if int(max_points) != max_points or max_points < 8:
        raise ValueError(f"max_points must be an integer >= 8; got {max_points!r}")
    n = y.size
    if n <= max_points:
        return x.copy(), y.copy()
    n_buckets = int(max_points) // 4
    starts = np.unique(np.linspace(0, n, n_buckets + 1)[:-1].astype(np.intp))
    keep = _bucket_extreme_indices(y, starts)
    return x[keep], y[keep]


def _decimate_log_minmax(x, y, max_points):
    """Like :func:`decimate_minmax` but with buckets equally spaced in log10(x); x > 0, sorted."""
    n = y.size
    if n <= max_points:
        return x, y
    n_buckets = int(max_points) // 4
    edges = np.geomspace(x[0], x[-1], n_buckets + 1)[:-1]
    # searchsorted(x, x[0]) is 0, so the first bucket starts at 0; empty buckets collapse.
    starts = np.unique(np.searchsorted(x, edges, side="left"))
    keep = _bucket_extreme_indices(y, starts)
    return x[keep], y[keep]


# ---------------------------------------------------------------------------------------------
# Small helpers
# ---------------------------------------------------------------------------------------------
def _unit_of(label):
    """
    Unit text inside the trailing brackets of an axis label.

    ``"Acceleration [g]"`` → ``"g"``; ``"Ratio [-]"`` and labels without brackets → ``""``.
    """
    match = _UNIT_RE.search(label or "")
    if not match:
        return ""
    unit = match.group(1).strip()
    return "" if unit in ("-", "") else unit


def _format_value(value):
    """
    Format a number with three significant figures, without exponent for 1e-4 <= |v| < 1e6.

    Negative numbers use the typographic minus sign (U+2212), as the axis tick labels do.
    """
    v = float(value)
    if not math.isfinite(v):
        return "n/a"
    if v == 0.0:
        return "0"
    magnitude = abs(v)
    if 1e-4 <= magnitude < 1e6:
        decimals = max(0, 2 - math.floor(math.log10(magnitude)))
        text = f"{v:.{decimals}f}"
    else:
        text = f"{v:.3g}"
    return text.replace("-", "\u2212")


def _with_unit(value, unit):
    text = _format_value(value)
    return f"{text} {unit}" if unit else text


def _matplotlib():
    """matplotlib with its non-interactive back-end, imported on first use."""
    import matplotlib

    matplotlib.use("Agg")  # explicit, although no pyplot is imported
    return matplotlib


@functools.lru_cache(maxsize=1)
def matplotlib_version() -> str:
    """Installed matplotlib version, from its package metadata (without importing it)."""
    from importlib.metadata import version

    return version("matplotlib")


def _text_width_pt(text, size):
    """Width of one line of ``text`` at font ``size`` in the current rc font. [pt]"""
    _matplotlib()
    from matplotlib.font_manager import FontProperties
    from matplotlib.textpath import text_to_path

    return text_to_path.get_text_width_height_descent(
        text, FontProperties(size=size), ismath=False)[0]


_ADVANCE: dict[str, float] = {}


def _figure_text_width_pt(text, size):
    """
    Width of ``text`` at ``size`` in the figure font (FIGURE_RC), from per-character
    advances: no kerning, so within a few per cent of the typeset width, which is all the
    white boxes and the legend behind the direct-SVG figures need. The advances come
    from :mod:`sdofreport.site.font_metrics` when it was made with the installed
    matplotlib, else (and for characters it lacks) are measured and cached. [pt]
    """
    if not _ADVANCE:
        from sdofreport.site import font_metrics

        if font_metrics.MATPLOTLIB_VERSION == matplotlib_version():
            _ADVANCE.update(font_metrics.ADVANCES)
    missing = [ch for ch in set(text) if ch not in _ADVANCE]
    if missing:
        with _matplotlib().rc_context(FIGURE_RC):
            for ch in sorted(missing):
                _ADVANCE[ch] = _text_width_pt(ch, 100.0) / 100.0
    return size * sum(_ADVANCE[ch] for ch in text)


def _shorten(text, limit=_MAX_LABEL_CHARS):
    """Cut labels that would not fit a fixed margin; the full text belongs in the page."""
    text = str(text)
    return text if len(text) <= limit else text[: limit - 1].rstrip() + "\u2026"


def _legend_width_in(labels, width=_text_width_pt):
    """Space a right-hand legend of ``labels`` needs, including handle and frame. [in]"""
    if not labels:
        return 0.0
    size = FIGURE_RC["legend.fontsize"]
    widest = max(width(plain_symbols(line), size) for label in labels
                 for line in str(label).split("\n"))
    # handle 2.0 em + handle pad 0.8 em + border pads 2 × 0.4 em + anchor gap, per the
    # matplotlib legend defaults; plus 16 pt for the frame and slack so nothing is cut.
    return (widest + size * (2.0 + 0.8 + 0.8) + 16.0) / 72.0


def _new_figure(height_in, *, left_in, right_in, bottom_in, top_in, hspace_in=0.0, n_rows=1):
    """
    Figure with fixed margins (no layout engine: a layout engine redraws the figure several
    times and costs more than the drawing itself).
    """
    _matplotlib()
    from matplotlib.backends.backend_svg import FigureCanvasSVG
    from matplotlib.figure import Figure

    fig = Figure(figsize=(FIGURE_WIDTH_IN, height_in))
    FigureCanvasSVG(fig)
    axes_height = (height_in - bottom_in - top_in - hspace_in * (n_rows - 1)) / n_rows
    fig.subplots_adjust(
        left=left_in / FIGURE_WIDTH_IN,
        right=1.0 - right_in / FIGURE_WIDTH_IN,
        bottom=bottom_in / height_in,
        top=1.0 - top_in / height_in,
        hspace=hspace_in / axes_height if n_rows > 1 else 0.0,
    )
    return fig


def _to_svg(fig):
    buffer = io.StringIO()
    fig.savefig(buffer, format="svg", metadata=_SVG_METADATA)
    return buffer.getvalue()


def _render(draw, **layout):
    """
    Draw one figure inside ``FIGURE_RC`` and return its SVG text.

    ``layout`` holds the keyword arguments of :func:`_new_figure` (size and margins);
    ``draw(fig)`` fills the figure and may widen margins for legends or long tick labels.
    """
    with _matplotlib().rc_context(FIGURE_RC):
        fig = _new_figure(**layout)
        draw(fig)
        return _to_svg(fig)


def _legend_outside(fig, ax, handles):
    """
    Legend to the right of the axes, outside the data; the right margin is widened to fit.
    Labels longer than ``_MAX_LABEL_CHARS`` wrap onto more lines.
    """
    if not handles:
        return None
    labels = [wrap_label(h.get_label(), _MAX_LABEL_CHARS) for h in handles]
    right_in = max(0.2, _legend_width_in(labels))
    fig.subplots_adjust(right=1.0 - right_in / FIGURE_WIDTH_IN)
    return ax.legend(handles, labels, loc="upper left", bbox_to_anchor=(1.0, 1.0),
                     borderaxespad=0.0, handlelength=2.0, handletextpad=0.8, borderpad=0.4)


# ---------------------------------------------------------------------------------------------
# Figures
# ---------------------------------------------------------------------------------------------
def histories_figure(time_s, panels, *, title=None):
    """
    Vertically stacked time histories sharing the time axis, with each panel's peak marked.

    Parameters
    ----------
    time_s : array-like
        Sample times. [s]
    panels : sequence of (str, array-like, str)
        ``(label, values, ylabel)`` per panel; ``values`` has the length of ``time_s`` and is
        already in the unit named in ``ylabel``'s trailing brackets, e.g. ``"Acceleration [g]"``.
    title : str, optional
        Figure title.

    Returns
    -------
    str
        SVG text. Each panel's peak absolute value is marked with a dot and annotated
        ``"peak <signed value> <unit>"``, e.g. ``"peak 0.312 g"`` or ``"peak −0.312 g"``.
    """
    time_s = np.asarray(time_s, dtype=float).reshape(-1)
    panels = list(panels)
    if not panels:
        raise ValueError("panels must contain at least one (label, values, ylabel) entry")
    prepared = []
    for i, panel in enumerate(panels):
        try:
            label, values, ylabel = panel
        except (TypeError, ValueError):
            raise ValueError(
                f"panels[{i}] must be a (label, values, ylabel) tuple; got {panel!r:.80}"
            ) from None
        t, v = _as_1d_pair(time_s, values, "time_s", f"panels[{i}] values")
        prepared.append((str(label), t, v, str(ylabel)))

    n = len(prepared)
    top_in = _TITLE_IN + (_TITLE_IN if title else 0.0)
    layout = PanelLayout(width_in=FIGURE_WIDTH_IN,
                         height_in=_BOTTOM_IN + top_in + n * 1.45 + (n - 1) * 0.32,
                         left_in=_LEFT_IN, right_in=0.2, bottom_in=_BOTTOM_IN, top_in=top_in,
                         hspace_in=0.32)
    drawn = [(_shorten(label, 90), t, v, *decimate_minmax(t, v, _MAX_POINTS), ylabel)
             for label, t, v, ylabel in prepared]
    return history_panels_svg(
        drawn, layout, _PANEL_STYLE, title=_shorten(title, 90) if title else None,
        peak_label=lambda value, ylabel: f"peak {_with_unit(value, _unit_of(ylabel))}",
        text_width=_figure_text_width_pt)


#: Look of the direct-SVG history panels, from FIGURE_RC and the palette.
_PANEL_STYLE = PanelStyle(
    line=_LINE_COLOURS[0], peak=_LINE_COLOURS[1], frame=FIGURE_RC["axes.edgecolor"],
    frame_width=FIGURE_RC["axes.linewidth"], grid=FIGURE_RC["grid.color"],
    grid_width=FIGURE_RC["grid.linewidth"], tick_width=FIGURE_RC["xtick.major.width"],
    title_size=FIGURE_RC["axes.titlesize"], label_size=FIGURE_RC["axes.labelsize"],
    tick_size=FIGURE_RC["xtick.labelsize"], peak_size=8.0,
    figure_title_size=FIGURE_RC["figure.titlesize"])


_STYLES = ("record", "mean", "band", "emphasis")
_MAX_RECORD_LEGEND = 11  # "fewer than ~12" labelled records get their own legend entries


def spectra_figure(periods_s, curves, *, ylabel, xlabel="Period T [s]", logx=True, logy=False,
                   highlight_periods=(), shaded_range=None, design=None, title=None):
    """
    Response spectra of several records with mean, ±1σ band, design spectrum and markers.

    Parameters
    ----------
    periods_s : array-like
        Periods common to all curves. [s]
    curves : sequence of dict
        ``{"label": str, "values": array, "style": "record" | "mean" | "band" | "emphasis"}``,
        optionally ``"usable_max_s"``: a record or emphasis curve is dashed beyond it [s];
        style ``"band"`` also needs ``"lower"`` and ``"upper"`` arrays (filled between; legend
        ``label`` or ``"mean ± 1σ"`` when the label is empty). Values in the unit of ``ylabel``.
    ylabel : str
        Ordinate label with its unit, e.g. ``"Pseudo-acceleration PSA [g]"``.
    xlabel : str, optional
        Abscissa label with its unit. [s]
    logx, logy : bool, optional
        Logarithmic axes. Non-positive periods (logx) or values (logy) are left out.
    highlight_periods : sequence of float, optional
        Periods marked with dotted vertical lines labelled with their value, e.g. the system
        periods. [s]
    shaded_range : (float, float) or (float, float, str), optional
        Period range shaded as a light band, with an optional legend label. [s]
    design : (array-like, array-like, str), optional
        ``(periods, values, label)`` of a design spectrum, drawn dashed. [s], [unit of ylabel]
    title : str, optional
        Axes title.

    Returns
    -------
    str
        SVG text.
    """
    periods = np.asarray(periods_s, dtype=float).reshape(-1)
    x_unit = _unit_of(xlabel)
    keep_x = periods > 0 if logx else np.ones(periods.size, dtype=bool)

    def prepare_y(values, name):
        _, v = _as_1d_pair(periods, values, "periods_s", name)
        v = v[keep_x]
        if logy:
            v = np.where(v > 0, v, np.nan)
        return v

    x = periods[keep_x]
    prepared = []
    for i, curve in enumerate(curves):
        style = curve.get("style", "record")
        if style not in _STYLES:
            raise ValueError(f"curves[{i}] style must be one of {_STYLES}; got {style!r}")
        item = {"label": str(curve.get("label") or ""), "style": style,
                "usable_max_s": curve.get("usable_max_s")}
        if style == "band":
            if "lower" not in curve or "upper" not in curve:
                raise ValueError(f"curves[{i}] style 'band' needs 'lower' and 'upper' arrays")
            item["lower"] = prepare_y(curve["lower"], f"curves[{i}] lower")
            item["upper"] = prepare_y(curve["upper"], f"curves[{i}] upper")
        else:
            if curve.get("values") is None:
                raise ValueError(f"curves[{i}] style {style!r} needs a 'values' array")
            item["values"] = prepare_y(curve["values"], f"curves[{i}] values")
        prepared.append(item)

    design_xy = None
    if design is not None:
        d_periods, d_values, d_label = design
        dx, dy = _as_1d_pair(d_periods, d_values, "design periods", "design values")
        mask = (dx > 0) if logx else np.ones(dx.size, dtype=bool)
        if logy:
            mask &= dy > 0
        design_xy = (dx[mask], dy[mask], str(d_label))

    highlights = [float(p) for p in highlight_periods if not (logx and float(p) <= 0)]
    records = [c for c in prepared if c["style"] == "record"]
    records_in_legend = 0 < len(records) <= _MAX_RECORD_LEGEND and all(c["label"] for c in records)

    handles, spans, bands, lines = [], [], [], []
    if shaded_range is not None:
        low, high = float(shaded_range[0]), float(shaded_range[1])
        label = (shaded_range[2] if len(shaded_range) > 2 else
                 f"range {_with_unit(low, x_unit)} – {_with_unit(high, x_unit)}")
        spans.append(Span(low, high, _SHADE_GREY))
        handles.append(LegendEntry(label, _SHADE_GREY, patch=True))
    for c in (c for c in prepared if c["style"] == "band"):
        bands.append(Band(x, c["lower"], c["upper"], _BAND_GREY))
        handles.append(LegendEntry(c["label"] or "mean ± 1σ", _BAND_GREY, patch=True))
    dashed_beyond = []

    def add_curve(c, colour, width, opacity=1.0):
        """A curve, dashed beyond its usable period (``"usable_max_s"``) if it has one."""
        tmax = c.get("usable_max_s")
        if tmax is None or not np.any(x > tmax):
            lines.append(Curve(x, c["values"], colour, width, opacity))
            return
        inside = x <= tmax
        last = np.flatnonzero(inside)[-1] if inside.any() else 0
        beyond = np.arange(x.size) >= last
        lines.append(Curve(x, np.where(inside, c["values"], np.nan), colour, width,
                           opacity))
        lines.append(Curve(x, np.where(beyond, c["values"], np.nan), colour, width,
                           opacity, dash=_BEYOND_DASH))
        dashed_beyond.append(colour)

    for k, c in enumerate(records):
        if records_in_legend:
            colour = _RECORD_COLOURS[k % len(_RECORD_COLOURS)]
            add_curve(c, colour, 0.8, 0.75)
            handles.append(LegendEntry(c["label"], colour, 0.8, 0.75))
        else:
            add_curve(c, _GREY_RECORD, 0.6, 0.55)
    if records and not records_in_legend:
        handles.append(LegendEntry(f"records (n = {len(records)})", _GREY_RECORD, 0.6, 0.55))
    for c in (c for c in prepared if c["style"] == "mean"):
        lines.append(Curve(x, c["values"], "#000000", 2.0))
        handles.append(LegendEntry(c["label"] or "mean", "#000000", 2.0))
    emphasis = [c for c in prepared if c["style"] == "emphasis"]
    for k, c in enumerate(emphasis):
        add_curve(c, _EMPHASIS_COLOURS[k % 4], 1.8)
        if c["label"]:
            handles.append(LegendEntry(c["label"], _EMPHASIS_COLOURS[k % 4], 1.8))
    if dashed_beyond:
        handles.append(LegendEntry("beyond the usable period (dashed)", "#555555", 1.0,
                                   dash=_BEYOND_DASH))
    if design_xy is not None:
        lines.append(Curve(design_xy[0], design_xy[1], _DESIGN_COLOUR, 1.6, dash="9.6,4.8"))
        handles.append(LegendEntry(design_xy[2], _DESIGN_COLOUR, 1.6, dash="9.6,4.8"))
    handles = [LegendEntry(**{**entry.__dict__, "label": wrap_label(entry.label,
                                                                    _MAX_LABEL_CHARS)})
               for entry in handles]
    xlim = (float(np.nanmin(x)), float(np.nanmax(x))) if x.size else (
        (0.1, 10.0) if logx else (0.0, 1.0))
    if xlim[1] <= xlim[0]:
        xlim = (xlim[0] / 2.0, xlim[0] * 2.0) if logx else (xlim[0] - 0.5, xlim[0] + 0.5)
    in_view = (x >= xlim[0]) & (x <= xlim[1])
    arrays = [c[key][in_view] for c in prepared for key in ("values", "lower", "upper")
              if key in c]
    if design_xy is not None:
        inside = (design_xy[0] >= xlim[0]) & (design_xy[0] <= xlim[1])
        arrays.append(design_xy[1][inside])
    ylim = data_limits(arrays, log=logy,
                       bottom_zero=not logy and _all_non_negative(prepared, design_xy))
    markers = tuple((p, f" T = {_with_unit(p, x_unit or 's')}") for p in highlights)
    layout, legend_in = _layout_with_legend(title, handles, 4.2)
    spec = AxesSpec(xlim=xlim, ylim=ylim, xlog=logx, ylog=logy, spans=tuple(spans),
                    bands=tuple(bands), curves=tuple(lines), markers=markers,
                    legend=tuple(handles), xlabel=xlabel, ylabel=ylabel,
                    title=_shorten(title, 90) if title else None)
    return axes_svg(spec, layout, _PANEL_STYLE, text_width=_figure_text_width_pt,
                    legend_width_in=legend_in)


def _single_axes_margins(title):
    return {"left_in": _LEFT_IN, "right_in": 0.25, "bottom_in": _BOTTOM_IN,
            "top_in": _TITLE_IN if title else 0.15}


def _layout_with_legend(title, handles, height_in):
    """(PanelLayout, legend width [in]) of a single-axes figure with a legend of
    ``handles`` to the right (none when empty). [in]"""
    margins = _single_axes_margins(title)
    legend_in = (max(0.2, _legend_width_in([e.label for e in handles],
                                           width=_figure_text_width_pt))
                 if handles else 0.0)
    layout = PanelLayout(width_in=FIGURE_WIDTH_IN, height_in=height_in, hspace_in=0.0,
                         left_in=margins["left_in"],
                         right_in=margins["right_in"] if not handles else 0.0,
                         bottom_in=margins["bottom_in"], top_in=margins["top_in"])
    return layout, legend_in


def _all_non_negative(prepared, design_xy):
    arrays = [c.get("values", c.get("lower")) for c in prepared]
    if design_xy is not None:
        arrays.append(design_xy[1])
    return all(not np.any(np.asarray(a) < 0) for a in arrays if a is not None)


def fourier_figure(frequency_hz, amplitude, *, ylabel, title=None):
    """
    Fourier amplitude spectrum on log-log axes.

    Parameters
    ----------
    frequency_hz : array-like
        Frequencies; only values > 0 (with amplitude > 0) are drawn. [Hz]
    amplitude : array-like
        Fourier amplitudes in the unit named in ``ylabel``. [any]
    ylabel : str
        Ordinate label with unit, e.g. ``"Fourier amplitude [m/s]"``.
    title : str, optional
        Axes title.

    Returns
    -------
    str
        SVG text. The curve is thinned in buckets equally spaced in log frequency, keeping each
        bucket's first, last, minimum and maximum point, so spectral peaks survive.
    """
    f, a = _as_1d_pair(frequency_hz, amplitude, "frequency_hz", "amplitude")
    mask = (f > 0) & np.isfinite(f) & (a > 0) & np.isfinite(a)
    f, a = f[mask], a[mask]
    order = np.argsort(f, kind="stable")
    f, a = _decimate_log_minmax(f[order], a[order], _FOURIER_MAX_POINTS)

    xlim = (float(f[0]), float(f[-1])) if f.size else (0.1, 10.0)
    if xlim[1] <= xlim[0]:
        xlim = (xlim[0] / 2.0, xlim[0] * 2.0)
    margins = _single_axes_margins(title)
    layout = PanelLayout(width_in=FIGURE_WIDTH_IN, height_in=3.6, hspace_in=0.0, **margins)
    spec = AxesSpec(xlim=xlim, ylim=data_limits([a], log=True), xlog=True, ylog=True,
                    curves=(Curve(f, a, _LINE_COLOURS[0], 0.7),), xlabel="Frequency [Hz]",
                    ylabel=ylabel, title=_shorten(title, 90) if title else None,
                    log_subs_y=(1.0,))
    return axes_svg(spec, layout, _PANEL_STYLE, text_width=_figure_text_width_pt)


def fragility_figure(curves, *, xlabel, unit="g", design_level=None, title=None):
    """
    Fitted lognormal fragility curves over the observed fractions of exceeding runs.

    Parameters
    ----------
    curves : sequence of dict
        One per limit: ``label``, ``levels`` (increasing) and ``fractions`` (runs
        exceeding / runs) [-], and ``median`` and ``beta`` of the fitted curve (None when
        none was fitted: the fractions are drawn alone). [measure unit], [-]
    xlabel : str
        Abscissa label with the measure and its unit, e.g. ``"Sa(T₁) [g]"``.
    unit : str
        Unit of the levels, for the design-level marker.
    design_level : float, optional
        Level marked by a dotted line. [measure unit]
    title : str, optional
        Axes title.

    Returns
    -------
    str
        SVG text. Each observed fraction is a cross; the curve is Φ(ln(x/θ)/β) (Baker
        2015, Earthquake Spectra 31(1)) drawn on 200 points from 0 to 1.25 × the highest
        level or design level.
    """
    from scipy.special import ndtr

    top = max([max(c["levels"]) for c in curves] + [design_level or 0.0]) * 1.25
    x = np.linspace(top / 200.0, top, 200)
    lines, handles = [], []
    for k, c in enumerate(curves):
        colour = _EMPHASIS_COLOURS[k % len(_EMPHASIS_COLOURS)]
        dash = (None, "4,2", "1.5,1.5", "6,2,1.5,2")[k % 4]
        if c.get("median") and c.get("beta"):
            lines.append(Curve(x, ndtr(np.log(x / c["median"]) / c["beta"]), colour, 1.6,
                               dash=dash))
        for level, fraction in zip(c["levels"], c["fractions"]):
            arm = 0.012 * top
            lines.append(Curve(np.array([level - arm, level + arm]),
                               np.array([fraction, fraction]), colour, 1.2))
            lines.append(Curve(np.array([level, level]),
                               np.array([fraction - 0.025, fraction + 0.025]), colour, 1.2))
        handles.append(LegendEntry(wrap_label(c["label"], _MAX_LABEL_CHARS), colour, 1.6,
                                   dash=dash))
    markers = () if design_level is None else (
        (design_level, f" design level {_with_unit(design_level, unit)}"),)
    layout, legend_in = _layout_with_legend(title, handles, 3.8)
    spec = AxesSpec(xlim=(0.0, top), ylim=(-0.04, 1.06), curves=tuple(lines),
                    markers=markers, legend=tuple(handles), xlabel=xlabel,
                    ylabel="P(exceeding the limit) [-]",
                    title=_shorten(title, 90) if title else None)
    return axes_svg(spec, layout, _PANEL_STYLE, text_width=_figure_text_width_pt,
                    legend_width_in=legend_in)


def checks_bar_figure(labels, ratios, *, title=None):
    """
    Horizontal bars of demand/capacity ratios with the limit 1.0 marked.

    Parameters
    ----------
    labels : sequence of str
        One label per check, drawn top to bottom in the given order.
    ratios : array-like
        Demand / capacity per check. [-]
    title : str, optional
        Axes title.

    Returns
    -------
    str
        SVG text. Bars with ratio > 1 are drawn in a second colour *and* hatched so they read in
        greyscale print; each bar's ratio is printed at its end (``"n/a"`` for NaN).
    """
    labels = [str(s) for s in labels]
    ratios = np.asarray(ratios, dtype=float).reshape(-1)
    if len(labels) != ratios.size:
        raise ValueError(
            f"labels and ratios must have the same length; got {len(labels)} and {ratios.size}"
        )
    finite = np.isfinite(ratios)
    exceeds = finite & (ratios > 1.0)
    widths = np.where(finite, ratios, 0.0)
    x_max = max(1.25, float(np.max(widths, initial=0.0)) * 1.18)

    def draw(fig):
        ax = fig.subplots()
        y = np.arange(len(labels))
        ok = ~exceeds
        bar_ok = ax.barh(y[ok], widths[ok], height=0.6, color=_PASS_COLOUR, edgecolor="#222222",
                         linewidth=0.5, label="ratio ≤ 1.0")
        bar_bad = ax.barh(y[exceeds], widths[exceeds], height=0.6, color=_FAIL_COLOUR,
                          edgecolor="#222222", linewidth=0.5, hatch="///",
                          label="ratio > 1.0 (exceeds)")
        ax.axvline(1.0, color="black", linewidth=1.0, zorder=3)
        for yi, r, w in zip(y, ratios, widths):
            ax.text(w + 0.01 * x_max, yi, f"{r:.2f}" if np.isfinite(r) else "n/a",
                    va="center", ha="left", fontsize=8.0)
        ax.set_yticks(y, tick_labels)
        ax.set_ylim(max(len(labels), 1) - 0.5, -0.5)  # first label on top
        ax.set_xlim(0.0, x_max)
        ax.grid(False, axis="y")
        ax.set_xlabel("Demand / limit [-]")
        if title:
            ax.set_title(_shorten(title, 90), loc="left")
        handles = [h for h, n in ((bar_ok, ok.sum()), (bar_bad, exceeds.sum())) if n]
        # Left margin: widest check label + tick pad, measured in the figure font.
        widest = max((_text_width_pt(s, FIGURE_RC["ytick.labelsize"]) for s in tick_labels),
                     default=0.0)
        fig.subplots_adjust(left=max(_LEFT_IN, widest / 72.0 + 0.2) / FIGURE_WIDTH_IN)
        _legend_outside(fig, ax, handles)

    tick_labels = [_shorten(s, 48) for s in labels]
    margins = _single_axes_margins(title)
    return _render(draw, height_in=margins["bottom_in"] + margins["top_in"]
                   + 0.3 * max(len(labels), 2) + 0.1, **margins)


def hysteresis_figure(displacement, force, *, xlabel, ylabel, title=None):
    """
    Force–displacement loop of a (possibly nonlinear) SDOF response.

    Parameters
    ----------
    displacement : array-like
        Displacement history in the unit named in ``xlabel``. [any]
    force : array-like
        Restoring force history, same length, in the unit named in ``ylabel``. [any]
    xlabel, ylabel : str
        Axis labels with units, e.g. ``"Displacement [mm]"``, ``"Force [kN]"``.
    title : str, optional
        Axes title.

    Returns
    -------
    str
        SVG text. The path is thinned by keeping the bucket extremes of *both* displacement
        and force (see :func:`decimate_minmax`), so the loop's corners and tips survive.
    """
    d, q = _as_1d_pair(displacement, force, "displacement", "force")
    if d.size > _LOOP_MAX_POINTS:
        n_buckets = _LOOP_MAX_POINTS // 8  # two signals share the point budget
        starts = np.unique(np.linspace(0, d.size, n_buckets + 1)[:-1].astype(np.intp))
        keep = np.union1d(_bucket_extreme_indices(d, starts), _bucket_extreme_indices(q, starts))
        d, q = d[keep], q[keep]

    def draw(fig):
        ax = fig.subplots()
        ax.axhline(0.0, color="#999999", linewidth=0.5, zorder=1)
        ax.axvline(0.0, color="#999999", linewidth=0.5, zorder=1)
        ax.plot(d, q, color=_LINE_COLOURS[0], linewidth=0.7, zorder=2)
        ax.set_xlabel(xlabel)
        ax.set_ylabel(ylabel)
        if title:
            ax.set_title(_shorten(title, 90), loc="left")

    return _render(draw, height_in=4.2, **_single_axes_margins(title))
