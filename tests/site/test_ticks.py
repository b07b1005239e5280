"""Tick positions of the direct-SVG figures (sdofreport.site.ticks).

Source of expected values: matplotlib's ``MaxNLocator(nbins, steps).tick_values`` (the
reference implementation the module restates), compared bit for bit on seeded random,
tiny, huge, offset, reversed, degenerate and non-finite ranges.
"""

from __future__ import annotations

import numpy as np
import pytest
from matplotlib.ticker import MaxNLocator

from sdofreport.site.ticks import nice_ticks

STEPS = [1, 2, 2.5, 5, 10]


def _ranges():
    rng = np.random.default_rng(20261202)
    ranges = [(0.0, 1.0), (-1.0, 1.0), (0.0, 0.0), (5.0, 5.0), (-3e-9, 7e-9), (1e12, 1e12 + 3),
              (1000.0, 1000.001), (-2.5, -2.5 + 1e-15), (3.0, 1.0), (0.0, 1e-310),
              (-np.inf, 1.0), (0.0, np.nan), (-0.5, 40.0), (99.9, 100.1), (1e-300, 2e-300)]
    for _ in range(400):
        centre = rng.choice([0.0, 1.0, -1.0]) * 10 ** rng.uniform(-6, 8)
        span = 10 ** rng.uniform(-9, 9)
        lo = centre + rng.uniform(-1, 0) * span
        ranges.append((lo, lo + span * rng.uniform(0, 1)))
    return ranges


@pytest.mark.parametrize("nbins", [3, 5, 9])
def test_same_ticks_as_matplotlib(nbins):
    for lo, hi in _ranges():
        expected = MaxNLocator(nbins=nbins, steps=STEPS).tick_values(lo, hi)
        got = nice_ticks(lo, hi, nbins, STEPS)
        assert got.tobytes() == np.asarray(expected, dtype=float).tobytes(), (lo, hi, nbins)


def test_default_steps_and_other_staircases():
    for steps in ([1, 2, 5, 10], [2, 4, 5], [1, 1.5, 2, 2.5, 3, 4, 5, 6, 8, 10]):
        for lo, hi in _ranges()[:120]:
            expected = MaxNLocator(nbins=6, steps=steps).tick_values(lo, hi)
            assert nice_ticks(lo, hi, 6, steps).tobytes() == \
                np.asarray(expected, dtype=float).tobytes(), (lo, hi, steps)
