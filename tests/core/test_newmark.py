"""Newmark-beta (Newmark 1959): period elongation, energy, stability, convergence."""

from __future__ import annotations

import math

import numpy as np
import pytest

from sdofreport.core.newmark import (
    METHODS,
    newmark_beta,
    newmark_coefficients,
    newmark_stability_limit,
)
from sdofreport.core.spectra import oscillator_histories, oscillator_peaks

from .conftest import enveloped_noise


def _zero_crossing_period(u, dt):
    """Mean period from linearly interpolated upward and downward zero crossings."""
    idx = np.flatnonzero(np.sign(u[:-1]) * np.sign(u[1:]) < 0)
    times = idx * dt + dt * u[idx] / (u[idx] - u[idx + 1])
    return 2.0 * (times[-1] - times[0]) / (times.size - 1)


@pytest.mark.parametrize("step_ratio", [0.05, 0.1, 0.2])
def test_average_acceleration_period_elongation(step_ratio):
    period = 1.0
    dt = step_ratio * period
    npts = int(300 * period / dt)
    u, v, _ = newmark_beta(np.zeros(npts), dt, period, 0.0, "newmark-average",
                           initial_displacement_m=0.01)
    measured = _zero_crossing_period(u, dt) / period
    x = math.pi * step_ratio  # x = ωΔt/2
    # Closed form: Newmark (1959) average acceleration, T̄/T = x / arctan(x), x = ωΔt/2
    # (≈ 1.031 at Δt/T = 0.1; Chopra, Dynamics of Structures, sec. 5.5). Tolerance 2e-5:
    # crossings are interpolated linearly, an error averaged over 300 cycles.
    assert measured == pytest.approx(x / math.atan(x), rel=2e-5)


def test_average_acceleration_no_amplitude_decay():
    period, dt = 0.5, 0.05
    wn = 2.0 * math.pi / period
    u, v, _ = newmark_beta(np.zeros(5000), dt, period, 0.0, "newmark-average",
                           initial_displacement_m=0.02, initial_velocity_m_s=0.3)
    energy = (wn * u) ** 2 + v**2
    # Closed form: the average-acceleration (trapezoidal) rule conserves ω²u² + u'² exactly
    # for an undamped linear oscillator (no amplitude decay, Newmark 1959); round-off only.
    np.testing.assert_allclose(energy, energy[0], rtol=1e-11)


def test_linear_acceleration_limit_value():
    # Closed form: Newmark (1959), γ = 1/2, β = 1/6 is stable for Δt/T <= √3/π ≈ 0.551.
    assert newmark_stability_limit(*METHODS["newmark-linear"]) == pytest.approx(
        math.sqrt(3.0) / math.pi, rel=1e-15)
    # Closed form: β >= γ/2 is unconditionally stable.
    assert math.isinf(newmark_stability_limit(*METHODS["newmark-average"]))


@pytest.mark.parametrize("runner", ["newmark_beta", "peaks", "coefficients"])
def test_linear_acceleration_step_refused_above_limit(runner):
    limit = math.sqrt(3.0) / math.pi  # Closed form: Newmark (1959), √3/π
    period = 0.1
    dt = 1.001 * limit * period
    ag = np.zeros(50)
    ag[1] = 1.0
    message = (r"time_step_s 0\.0551\d* \[s\] / natural_period 0\.1 \[s\] .* "
               r"stability limit 0\.5513")
    with pytest.raises(ValueError, match=message):
        if runner == "newmark_beta":
            newmark_beta(ag, dt, period, 0.05, "newmark-linear")
        elif runner == "peaks":
            oscillator_peaks(ag, dt, period, 0.05, "newmark-linear", steps_per_period=0)
        else:
            newmark_coefficients(period, 0.05, dt, *METHODS["newmark-linear"])


def test_linear_acceleration_step_accepted_below_limit():
    limit = math.sqrt(3.0) / math.pi  # Closed form: Newmark (1959), √3/π
    period = 0.1
    dt = 0.999 * limit * period
    u, v, _ = newmark_beta(np.zeros(4000), dt, period, 0.0, "newmark-linear",
                           initial_displacement_m=0.01)
    # Closed form: within the limit the undamped response stays bounded (|eigenvalues| = 1).
    assert np.all(np.isfinite(u)) and np.max(np.abs(u)) < 0.1
    peaks = oscillator_peaks(np.r_[0.0, 1.0, np.zeros(100)], dt, period, 0.05,
                             "newmark-linear", steps_per_period=0)
    assert np.isfinite(peaks.displacement_m[0])


@pytest.mark.parametrize("method", list(METHODS))
def test_recurrence_form_matches_literal_steps(method):
    ag = enveloped_noise(0.01, duration=6.0, seed=3)
    u, v, at = newmark_beta(ag, 0.01, 0.25, 0.05, method)
    hist = oscillator_histories(ag, 0.01, 0.25, 0.05, method, steps_per_period=0)
    # Independent reference: Newmark's equations stepped literally (predictor, solve for
    # a1, corrector) against the same step written as a linear recurrence; round-off only.
    for got, want in [(hist.displacement_m[0], u), (hist.velocity_m_s[0], v),
                      (hist.total_acceleration_m_s2[0], at)]:
        np.testing.assert_allclose(got, want, rtol=0, atol=1e-12 * np.max(np.abs(want)))


def test_average_acceleration_second_order_convergence(record_002):
    ag, dt = record_002
    period, zeta = 0.4, 0.05
    exact = oscillator_histories(ag, dt, period, zeta, "exact").displacement_m[0]
    errors = []
    for n_sub in (2, 4, 8, 16):
        hist = oscillator_histories(ag, dt, period, zeta, "newmark-average",
                                    steps_per_period=n_sub * period / dt)
        errors.append(np.max(np.abs(hist.displacement_m[0] - exact)))
    ratios = np.array(errors[:-1]) / np.array(errors[1:])
    # Closed form: average acceleration is second-order accurate (Newmark 1959; Chopra
    # sec. 5.5), so halving the step divides the error by 4 (± 15 %: higher-order terms).
    np.testing.assert_allclose(ratios, 4.0, rtol=0.15)


def test_user_gamma_beta_and_validation():
    ag = enveloped_noise(0.01, duration=3.0, seed=4)
    avg = oscillator_peaks(ag, 0.01, 0.5, 0.05, "newmark-average", steps_per_period=64)
    same = oscillator_peaks(ag, 0.01, 0.5, 0.05, "newmark-linear", gamma=0.5, beta=0.25,
                            steps_per_period=64)
    # Closed form: (γ, β) = (1/2, 1/4) is average acceleration whatever the name.
    np.testing.assert_array_equal(same.displacement_m, avg.displacement_m)
    with pytest.raises(ValueError, match=r"gamma must be finite and >= 0.5 \[-\].*got 0.4"):
        oscillator_peaks(ag, 0.01, 0.5, 0.05, "newmark-average", gamma=0.4)
    with pytest.raises(ValueError, match=r"beta must be finite and >= 0 \[-\]; got -0.1"):
        oscillator_peaks(ag, 0.01, 0.5, 0.05, "newmark-average", beta=-0.1)
    with pytest.raises(ValueError, match=r"gamma and beta apply to Newmark methods only"):
        oscillator_peaks(ag, 0.01, 0.5, 0.05, "exact", beta=0.25)
