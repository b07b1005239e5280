"""Linear-axis tick positions for the direct-SVG figures, without importing matplotlib.

The same positions as matplotlib's ``MaxNLocator(nbins, steps).tick_values(lo, hi)`` in
its default 'data' autolimit mode (algorithm of matplotlib 3.8 to 3.11:
``ticker.MaxNLocator._raw_ticks``, ``ticker.scale_range``, ``ticker._Edge_integer`` and
``transforms._nonsingular``), restated here because importing matplotlib costs a worker
process ~0.4 s before it can draw anything. ``tests/site/test_ticks.py`` compares both
on many ranges.
"""

from __future__ import annotations

import math

import numpy as np


def _nonsingular(vmin: float, vmax: float, expander: float = 1e-13,
                 tiny: float = 1e-14) -> tuple[float, float]:
    """Ordered endpoints, widened when the range is empty or at rounding level."""
    if not (np.isfinite(vmin) and np.isfinite(vmax)):
        return -expander, expander
    if vmax < vmin:
        vmin, vmax = vmax, vmin
    vmin, vmax = float(vmin), float(vmax)
    largest = max(abs(vmin), abs(vmax))
    if largest < (1e6 / tiny) * np.finfo(float).tiny:
        return -expander, expander
    if vmax - vmin <= largest * tiny:
        if vmax == 0 and vmin == 0:
            return -expander, expander
        vmin -= expander * abs(vmin)
        vmax += expander * abs(vmax)
    return vmin, vmax


def _scale_range(vmin: float, vmax: float, n: int, threshold: float = 100.0):
    """(power of ten near the step, offset subtracted when the range is far from 0)."""
    span = abs(vmax - vmin)
    middle = (vmax + vmin) / 2
    offset = 0 if abs(middle) / span < threshold else \
        math.copysign(10 ** (math.log10(abs(middle)) // 1), middle)
    return 10 ** (math.log10(span / n) // 1), offset


def _close(fraction: float, edge: float, step: float, offset: float) -> bool:
    """Whether a remainder ``fraction`` of a step is ``edge`` up to rounding."""
    if offset > 0:
        tolerance = min(0.4999, max(1e-10, 10 ** (np.log10(offset / step) - 12)))
    else:
        tolerance = 1e-10
    return abs(fraction - edge) < tolerance


def _at_most(x: float, step: float, offset: float) -> float:
    """Largest n with n·step <= x (up to rounding)."""
    d, m = divmod(x, step)
    return d + 1 if _close(m / step, 1, step, offset) else d


def _at_least(x: float, step: float, offset: float) -> float:
    """Smallest n with n·step >= x (up to rounding)."""
    d, m = divmod(x, step)
    return d if _close(m / step, 0, step, offset) else d + 1


def nice_ticks(lo: float, hi: float, nbins: int, steps=(1, 2, 2.5, 5, 10),
               min_ticks: int = 2) -> np.ndarray:
    """
    At most ``nbins + 1`` evenly spaced ticks at multiples of ``steps`` × 10^k covering
    ``[lo, hi]`` (the outermost may lie just outside it).

    Parameters
    ----------
    lo, hi : float
        Axis limits, in data units.
    nbins : int
        Most intervals between ticks.
    steps : sequence of float
        Allowed step mantissas, increasing, from 1 to 10.
    min_ticks : int
        Fewest ticks inside the limits.
    """
    steps = np.asarray(steps, dtype=float)
    if steps[0] != 1:
        steps = np.concatenate([[1.0], steps])
    if steps[-1] != 10:
        steps = np.concatenate([steps, [10.0]])
    staircase = np.concatenate([0.1 * steps[:-1], steps, [10 * steps[1]]])
    vmin, vmax = _nonsingular(lo, hi)
    scale, offset = _scale_range(vmin, vmax, nbins)
    low_edge, high_edge = vmin - offset, vmax - offset
    candidates = staircase * scale
    large = candidates >= (high_edge - low_edge) / nbins
    first = int(np.nonzero(large)[0][0]) if large.any() else len(candidates) - 1
    offset_size = abs(offset)
    ticks = np.array([])
    for step in candidates[:first + 1][::-1]:
        best = (low_edge // step) * step
        low = _at_most(low_edge - best, step, offset_size)
        high = _at_least(high_edge - best, step, offset_size)
        ticks = np.arange(low, high + 1) * step + best
        if ((ticks <= high_edge) & (ticks >= low_edge)).sum() >= min_ticks:
            break
    return ticks + offset
