"""Shared synthetic records for the core kernel tests (seeded, made in numpy/scipy)."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import signal


def enveloped_noise(dt, duration=12.0, seed=0, band=(0.2, 15.0), peak=3.0):
    """Band-passed Gaussian noise under a Saragoni-Hart-type envelope [m/s²].

    Common practice (no source) for a realistic test record: Butterworth band-pass of white
    noise, envelope (t/a)^2 exp(-t/b) after Saragoni & Hart (1974), scaled to ``peak``.
    """
    rng = np.random.default_rng(seed)
    npts = int(round(duration / dt)) + 1
    t = np.arange(npts) * dt
    high = min(band[1], 0.4 / dt)
    b, a = signal.butter(2, [band[0], high], "bandpass", fs=1.0 / dt)
    x = signal.lfilter(b, a, rng.standard_normal(npts))
    x *= (t / 3.0) ** 2 * np.exp(2.0 - t / 1.5)
    return peak * x / np.max(np.abs(x))


@pytest.fixture(scope="session")
def record_001():
    """12 s record at dt = 0.01 s."""
    return enveloped_noise(0.01, seed=1), 0.01


@pytest.fixture(scope="session")
def record_002():
    """12 s record at dt = 0.02 s."""
    return enveloped_noise(0.02, seed=2), 0.02
