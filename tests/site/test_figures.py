"""Tests for sdofreport.site.figures: SVG validity, determinism, size and peak-keeping decimation.

Expected values here come from inputs constructed in the test (a spike we placed, a ratio we
chose) or from the requirement the figure module was written to (SVG text, byte-identical
output); none is a transcription of our own output.
"""

from __future__ import annotations

import hashlib
import json
import os
import pathlib
import re
import subprocess
import sys
import warnings
import xml.etree.ElementTree as ET

import numpy as np
import pytest

import sdofreport
from sdofreport.site import figures
from sdofreport.site.figures import (
    FIGURE_RC,
    checks_bar_figure,
    decimate_minmax,
    fourier_figure,
    histories_figure,
    hysteresis_figure,
    spectra_figure,
)

SVG_NS = "{http://www.w3.org/2000/svg}"


# ---------------------------------------------------------------------------------------------
# Inputs
# ---------------------------------------------------------------------------------------------
def _history(n=4000, dt=0.01, seed=1):
    rng = np.random.default_rng(seed)
    t = np.arange(n) * dt
    envelope = np.exp(-(((t - 0.3 * t[-1]) / (0.15 * t[-1])) ** 2))
    return t, 0.1 * rng.standard_normal(n) * envelope


def _periods():
    # T = 0 first, as a spectrum table often starts with the PGA row.
    return np.concatenate(([0.0], np.geomspace(0.02, 5.0, 199)))


def _spectrum_curves(n_records=12, labelled=True):
    periods = _periods()
    rng = np.random.default_rng(7)
    shape = 1.0 / (1.0 + (np.maximum(periods, 0.02) / 0.6) ** 1.5)
    records = [shape * rng.lognormal(0.0, 0.3, periods.size) for _ in range(n_records)]
    mean = np.mean(records, axis=0)
    sigma = np.std(records, axis=0)
    curves = [
        {"label": f"rec{i:02d}" if labelled else "", "values": r, "style": "record"}
        for i, r in enumerate(records)
    ]
    curves.append({"label": "", "values": mean, "style": "band",
                   "lower": mean - sigma, "upper": mean + sigma})
    curves.append({"label": "mean", "values": mean, "style": "mean"})
    curves.append({"label": "rec03 (scaled)", "values": records[-1], "style": "emphasis"})
    return periods, curves, mean


def _all_figures():
    """One call per public figure function, with typical inputs; name -> zero-arg callable."""
    t, a = _history()
    periods, curves, mean = _spectrum_curves()
    f = np.linspace(0.0, 50.0, 8193)
    fas = np.abs(np.sin(f)) + 0.01
    d = 30.0 * np.sin(t)
    return {
        "histories": lambda: histories_figure(
            t, [("ground", a, "Acceleration [g]"), ("relative", 2 * a, "Displacement [mm]"),
                ("velocity", 3 * a, "Velocity [m/s]")], title="rec01"),
        "spectra": lambda: spectra_figure(
            periods, curves, ylabel="PSA [g]", highlight_periods=[0.5, 1.2],
            shaded_range=(0.2, 1.5), design=(periods, 1.1 * mean, "design spectrum"),
            title="Spectra, 5 % damping"),
        "fourier": lambda: fourier_figure(f, fas, ylabel="Fourier amplitude [m/s]"),
        "checks": lambda: checks_bar_figure(["drift", "ductility", "base shear"],
                                            [0.8, 1.3, 0.95], title="Checks"),
        "hysteresis": lambda: hysteresis_figure(d, np.clip(d, -20, 20),
                                                xlabel="Displacement [mm]",
                                                ylabel="Force [kN]"),
    }


@pytest.fixture(scope="module")
def rendered():
    return {name: make() for name, make in _all_figures().items()}


def _texts(svg):
    """All strings drawn as SVG <text> (fonttype "none" keeps text as text)."""
    root = ET.fromstring(svg)
    return ["".join(el.itertext()) for el in root.iter(f"{SVG_NS}text")]


def _xtick_labels(svg):
    """Tick label strings of the x axes, from matplotlib's ``xtick_<n>`` groups."""
    root = ET.fromstring(svg)
    return ["".join(t.itertext()).strip() for g in root.iter(f"{SVG_NS}g")
            if g.get("id", "").startswith("xtick_") for t in g.iter(f"{SVG_NS}text")]


def _max_path_vertices(svg):
    """Largest number of vertices in any single <path> of the SVG."""
    root = ET.fromstring(svg)
    return max(len(re.findall(r"[ML]", el.get("d", ""))) for el in root.iter(f"{SVG_NS}path"))


# ---------------------------------------------------------------------------------------------
# decimate_minmax
# ---------------------------------------------------------------------------------------------
@pytest.mark.parametrize("n, max_points, seed", [(20_000, 2000, 0), (4001, 2000, 1),
                                                 (123_457, 500, 2), (2001, 8, 3)])
def test_decimate_keeps_global_extremes_and_their_times(n, max_points, seed):
    rng = np.random.default_rng(seed)
    t = np.arange(n) * 0.005
    y = np.cumsum(rng.standard_normal(n))
    td, yd = decimate_minmax(t, y, max_points)
    # Requirement: the global max and min of y and their times survive exactly.
    assert yd.max() == y.max() and td[np.argmax(yd)] == t[np.argmax(y)]
    assert yd.min() == y.min() and td[np.argmin(yd)] == t[np.argmin(y)]
    # Requirement: at most max_points points (4 per bucket, max_points // 4 buckets).
    assert yd.size <= max_points
    # Every output point is an input sample, in the original (time) order.
    idx = np.searchsorted(t, td)
    assert np.array_equal(t[idx], td) and np.array_equal(y[idx], yd)
    assert np.all(np.diff(td) > 0)
    # First and last samples are kept, so the plotted time span is unchanged.
    assert td[0] == t[0] and td[-1] == t[-1]


def test_decimate_keeps_an_isolated_spike():
    # Constructed: a single spike in a flat signal is the extreme of its bucket wherever it is.
    for position in (0, 1, 9_999, 12_345, 19_999):
        y = np.zeros(20_000)
        y[position] = -3.0
        td, yd = decimate_minmax(np.arange(y.size, dtype=float), y, 2000)
        assert yd.min() == -3.0 and td[np.argmin(yd)] == position


def test_decimate_ties_keep_the_earliest_occurrence():
    # Constructed: two equal maxima; like numpy.argmax, the first one's time must survive.
    y = np.zeros(10_000)
    y[[2_000, 7_000]] = 1.0
    td, yd = decimate_minmax(np.arange(y.size, dtype=float), y, 100)
    assert td[np.argmax(yd)] == 2_000.0


@pytest.mark.parametrize("n", [0, 1, 5, 2000])
def test_decimate_returns_short_input_unchanged(n):
    x = np.linspace(0.0, 1.0, n)
    y = np.sin(7 * x)
    xd, yd = decimate_minmax(x, y, max_points=2000)
    # Requirement: inputs no longer than max_points come back as they are.
    assert np.array_equal(xd, x) and np.array_equal(yd, y)
    # ... as copies, so the caller's arrays are never aliased.
    assert not np.shares_memory(xd, x)


def test_decimate_accepts_lists():
    xd, yd = decimate_minmax([0, 1, 2], [3, 1, 2])
    assert xd.dtype == float and yd.tolist() == [3.0, 1.0, 2.0]


def test_decimate_rejects_bad_input():
    with pytest.raises(ValueError, match=r"^x and y must have the same length; got 3 and 2$"):
        decimate_minmax([0, 1, 2], [0, 1])
    with pytest.raises(ValueError, match=r"^max_points must be an integer >= 8; got 4$"):
        decimate_minmax(np.arange(10), np.arange(10), max_points=4)


def test_log_decimation_keeps_the_spectral_peak():
    # Constructed: one resonance peak among many frequencies; buckets are log-spaced.
    f = np.linspace(0.01, 50.0, 40_000)
    a = 1.0 / np.sqrt((1 - (f / 2.7) ** 2) ** 2 + (0.1 * f / 2.7) ** 2)
    fd, ad = figures._decimate_log_minmax(f, a, 1200)
    assert ad.max() == a.max() and fd[np.argmax(ad)] == f[np.argmax(a)]
    assert ad.size <= 1200 and fd[0] == f[0] and fd[-1] == f[-1]


# ---------------------------------------------------------------------------------------------
# SVG output
# ---------------------------------------------------------------------------------------------
def test_every_figure_is_well_formed_svg_of_page_width(rendered):
    for name, svg in rendered.items():
        assert isinstance(svg, str), name
        root = ET.fromstring(svg)  # raises on malformed XML
        assert root.tag == f"{SVG_NS}svg", name
        # Requirement: fits a ~900 px page column; 900 CSS px = 675 pt.
        width_pt = float(root.get("width").removesuffix("pt"))
        assert 400 <= width_pt <= 675, name
        # Requirement: no creation date in the metadata (it would break byte equality).
        assert "<dc:date>" not in svg, name


def test_text_is_kept_as_text_not_glyph_paths(rendered):
    # svg.fonttype "none": labels are <text> elements; with glyph paths matplotlib would
    # instead define one path per glyph, with ids such as "DejaVuSans-30".
    assert FIGURE_RC["svg.fonttype"] == "none"
    for name, svg in rendered.items():
        assert "DejaVuSans-" not in svg, name
        assert _texts(svg), name


def test_axis_labels_are_the_ones_given(rendered):
    assert "Acceleration [g]" in _texts(rendered["histories"])
    assert "Time [s]" in _texts(rendered["histories"])
    assert {"Period T [s]", "PSA [g]"} <= set(_texts(rendered["spectra"]))
    assert {"Displacement [mm]", "Force [kN]"} <= set(_texts(rendered["hysteresis"]))
    assert "Fourier amplitude [m/s]" in _texts(rendered["fourier"])


def test_rendering_twice_in_process_gives_identical_bytes(rendered):
    for name, make in _all_figures().items():
        assert make() == rendered[name], name


def test_rendering_in_another_process_gives_identical_bytes(rendered):
    # A fresh interpreter with a different hash seed must produce the same bytes.
    script = (
        "import hashlib, json, sys\n"
        "sys.path.insert(0, sys.argv[1])\n"
        "from tests.site.test_figures import _all_figures\n"
        "print(json.dumps({k: hashlib.sha256(f().encode()).hexdigest()"
        " for k, f in _all_figures().items()}))\n"
    )
    root = str(pathlib.Path(sdofreport.__file__).resolve().parents[1])
    env = dict(os.environ, PYTHONHASHSEED="12345", MPLBACKEND="svg")
    out = subprocess.run([sys.executable, "-c", script, root], capture_output=True, text=True,
                         env=env, cwd=root, timeout=120, check=True)
    other = json.loads(out.stdout.strip().splitlines()[-1])
    here = {k: hashlib.sha256(v.encode()).hexdigest() for k, v in rendered.items()}
    assert other == here


def test_long_history_is_decimated_and_small():
    t, a = _history(n=20_000, dt=0.005, seed=3)
    svg = histories_figure(t, [("ground", a, "Acceleration [g]")])
    # Requirement: a 20,000-point history stays under ~200 kB.
    assert len(svg.encode()) < 200_000
    # The data path holds at most the decimation budget (2,000 points), not 20,000.
    assert _max_path_vertices(svg) <= 2000


# ---------------------------------------------------------------------------------------------
# Individual figures
# ---------------------------------------------------------------------------------------------
def test_history_peak_is_annotated_with_value_and_unit():
    # Constructed: the largest |value| is the spike of -0.312 we placed; the other panel's
    # largest |value| is +12.5 (unit "mm" taken from the label's brackets).
    t = np.arange(4000) * 0.01
    a = 0.1 * np.sin(2 * np.pi * t)
    a[1234] = -0.312
    u = 5.0 * np.sin(t)
    u[3000] = 12.5
    texts = _texts(histories_figure(t, [("ground", a, "Acceleration [g]"),
                                        ("roof", u, "Displacement [mm]")]))
    assert "peak \u22120.312 g" in texts
    assert "peak 12.5 mm" in texts


def test_history_without_unit_brackets_shows_bare_value():
    t = np.arange(100) * 0.01
    v = np.zeros(100)
    v[10] = 2.0
    assert "peak 2.00" in _texts(histories_figure(t, [("x", v, "Ratio")]))


def test_history_rejects_mismatched_lengths():
    with pytest.raises(ValueError, match=r"^time_s and panels\[1\] values must have the same "
                                         r"length; got 10 and 9$"):
        histories_figure(np.arange(10.0), [("a", np.zeros(10), "[g]"),
                                           ("b", np.zeros(9), "[g]")])


def test_spectra_log_axis_drops_zero_period_without_warnings():
    periods, curves, mean = _spectrum_curves()
    assert periods[0] == 0.0
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        svg = spectra_figure(periods, curves, ylabel="PSA [g]", design=(periods, mean, "d"),
                             highlight_periods=[0.0, 0.5])
        svg_logy = spectra_figure(periods, curves, ylabel="PSA [g]", logy=True)
    ET.fromstring(svg)
    ET.fromstring(svg_logy)
    # The highlight at T = 0 cannot be drawn on a log axis and is dropped; T = 0.5 is kept.
    texts = [s.strip() for s in _texts(svg)]
    assert "T = 0.500 s" in texts and "T = 0 s" not in texts
    # Constructed: after dropping T = 0 the shortest period is 0.02 s, where the axis starts.
    assert _xtick_labels(svg)[0] == "0.02"


def test_spectra_legend_entries(rendered):
    texts = _texts(rendered["spectra"])
    # Requirement: a band without its own label reads "mean ± 1σ".
    assert "mean ± 1σ" in texts
    # 12 records: one summary entry instead of twelve.
    assert "records (n = 12)" in texts and "rec00" not in texts
    assert {"mean", "rec03 (scaled)", "design spectrum"} <= set(texts)
    # Fewer than 12 labelled records: each gets its own entry.
    periods, curves, _ = _spectrum_curves(n_records=4)
    texts = _texts(spectra_figure(periods, curves, ylabel="PSA [g]"))
    assert {"rec00", "rec01", "rec02", "rec03"} <= set(texts)


def test_spectra_linear_axes_keep_zero_period():
    periods, curves, _ = _spectrum_curves(n_records=3)
    svg = spectra_figure(periods, curves, ylabel="PSA [g]", logx=False)
    # Constructed: on a linear axis T = 0 is kept, so the period axis starts with tick "0".
    assert _xtick_labels(svg)[0] == "0"


def test_spectra_rejects_bad_curves():
    periods = _periods()
    with pytest.raises(ValueError, match=r"^curves\[0\] style must be one of"):
        spectra_figure(periods, [{"label": "x", "values": periods, "style": "dots"}],
                       ylabel="PSA [g]")
    with pytest.raises(ValueError, match=r"^curves\[0\] style 'band' needs 'lower' and 'upper'"):
        spectra_figure(periods, [{"label": "x", "values": periods, "style": "band"}],
                       ylabel="PSA [g]")


def test_checks_bar_hatches_only_exceeding_bars():
    ok = checks_bar_figure(["a", "b"], [0.5, 0.99])
    bad = checks_bar_figure(["a", "b"], [0.5, 1.25])
    # Requirement: ratios above 1 are hatched (matplotlib writes hatches as SVG <pattern>s).
    assert "<pattern" not in ok and "<pattern" in bad
    # The ratio is printed at the bar end, and the legend names the exceedance.
    texts = _texts(bad)
    assert {"0.50", "1.25", "ratio > 1.0 (exceeds)"} <= set(texts)


def test_checks_bar_handles_nan_and_rejects_mismatch():
    assert "n/a" in _texts(checks_bar_figure(["a", "b"], [0.5, float("nan")]))
    with pytest.raises(ValueError, match=r"^labels and ratios must have the same length; "
                                         r"got 2 and 1$"):
        checks_bar_figure(["a", "b"], [0.5])


def test_fourier_drops_non_positive_frequencies_without_warnings(rendered):
    # The typical input starts at f = 0 Hz; any warning (log of 0) fails the test.
    f = np.linspace(0.0, 50.0, 8193)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        svg = fourier_figure(f, np.abs(np.cos(f)), ylabel="FAS [m/s]")
    assert _max_path_vertices(svg) <= 1200
    assert "Frequency [Hz]" in _texts(rendered["fourier"])


def test_hysteresis_long_loop_is_decimated():
    t = np.linspace(0.0, 100.0, 50_000)
    d = 30.0 * np.sin(t) * (1 + 0.01 * t)
    svg = hysteresis_figure(d, np.clip(d, -20, 20), xlabel="Displacement [mm]",
                            ylabel="Force [kN]")
    assert _max_path_vertices(svg) <= 4000
    assert len(svg.encode()) < 200_000


# ---------------------------------------------------------------------------------------------
# Direct-SVG history panels
# ---------------------------------------------------------------------------------------------
def _history_paths(svg):
    """Vertices [pt] of each panel's history path (drawn inside scale(0.01))."""
    root = ET.fromstring(svg)
    paths = []
    for el in root.iter(f"{SVG_NS}path"):
        if el.get("class") == "history":
            assert el.get("transform") == "scale(0.01)"
            # Each run: "M x y" then relative steps "l dx dy dx dy ..." (SVG path syntax).
            runs = [np.cumsum(np.array(run.replace("l", " ").split(), dtype=float)
                              .reshape(-1, 2), axis=0) / 100.0
                    for run in el.get("d").split("M")[1:]]
            paths.append(runs)
    return paths


def test_history_peak_dot_sits_on_the_drawn_extreme_and_gaps_stay_gaps():
    # Constructed: a sine with a spike of -0.9 we placed and a run of NaN samples.
    t = np.arange(3000) * 0.01
    a = 0.2 * np.sin(2 * np.pi * 0.5 * t)
    a[1700] = -0.9
    a[400:420] = np.nan
    svg = histories_figure(t, [("ground", a, "Acceleration [g]")])
    (runs,) = _history_paths(svg)
    # The NaN run splits the line into two pieces (nothing drawn across the gap).
    assert len(runs) == 2
    points = np.vstack(runs)
    root = ET.fromstring(svg)
    (dot,) = list(root.iter(f"{SVG_NS}circle"))
    cx, cy = float(dot.get("cx")), float(dot.get("cy"))
    # The dot is the lowest drawn vertex (largest y on screen), i.e. the spike we placed.
    lowest = points[np.argmax(points[:, 1])]
    assert (cx, cy) == pytest.approx(tuple(lowest), abs=0.011)
    assert "peak \u22120.900 g" in _texts(svg)
    # The line spans the whole time axis: first and last samples at the axes' edges.
    frame = [el for el in root.iter(f"{SVG_NS}rect") if el.get("fill") == "none"][0]
    left = float(frame.get("x"))
    right = left + float(frame.get("width"))
    assert points[0, 0] == pytest.approx(left, abs=0.011)
    assert points[-1, 0] == pytest.approx(right, abs=0.011)


def test_history_labels_are_escaped_and_ticks_are_round_numbers():
    t = np.arange(500) * 0.02
    v = 37.0 * np.sin(t)
    svg = histories_figure(t, [("<b>roof</b> & \"deck\"", v, "Displacement [mm]")],
                           title="rec <script>alert(1)</script>")
    ET.fromstring(svg)  # well-formed XML
    assert "<script>" not in svg and "<b>" not in svg
    texts = _texts(svg)
    assert "<b>roof</b> & \"deck\"" in texts  # shown as text, not markup
    # The y tick labels (right-aligned against the axis) are evenly spaced by a step of
    # 1, 2, 2.5 or 5 times a power of ten (the step set of matplotlib's MaxNLocator,
    # which places the ticks) and cover zero and most of the ±37 mm swing.
    root = ET.fromstring(svg)
    numbers = sorted(float("".join(el.itertext()).replace("\u2212", "-"))
                     for el in root.iter(f"{SVG_NS}text") if el.get("text-anchor") == "end")
    steps = np.diff(numbers)
    assert len(numbers) >= 4 and np.allclose(steps, steps[0])
    mantissa = steps[0] / 10.0 ** np.floor(np.log10(steps[0]))
    assert min(abs(mantissa - m) for m in (1.0, 2.0, 2.5, 5.0)) < 1e-9
    assert 0.0 in numbers and max(numbers) >= 0.5 * 37.0 and min(numbers) <= -0.5 * 37.0
