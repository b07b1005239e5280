"""Record processing against closed forms: polynomial baselines, Butterworth gains, Hann ramps."""

import math

import numpy as np
import pytest
from scipy.integrate import cumulative_trapezoid

from sdofreport.core import processing as pr


# ------------------------------------------------------------------------ baseline


@pytest.mark.parametrize("order", [0, 1, 2, 3])
def test_baseline_removes_polynomial_of_its_order(order):
    dt, n = 0.01, 1201
    t = np.arange(n) * dt
    coefficients = [0.3, -0.05, 0.004, -0.0002][: order + 1]
    polynomial = sum(c * t**k for k, c in enumerate(coefficients))
    # Closed form: a polynomial of degree <= order lies in the space removed, so nothing
    # is left but round-off.
    corrected = pr.baseline_correction(polynomial, dt, order)
    assert np.max(np.abs(corrected)) < 1e-9 * np.max(np.abs(polynomial))


def test_baseline_order0_is_least_squares_line_through_origin_in_velocity():
    dt, n = 0.02, 500
    rng = np.random.default_rng(7)
    acc = rng.normal(0.0, 1.0, n) + 0.2
    t = np.arange(n) * dt
    velocity = np.concatenate([[0.0], np.cumsum(0.5 * (acc[1:] + acc[:-1]) * dt)])
    # Closed form: minimising Σ(v − c t)² gives c = Σ t v / Σ t²; a constant c removed
    # from the acceleration removes c t from the trapezoid velocity.
    slope = np.sum(t * velocity) / np.sum(t * t)
    np.testing.assert_allclose(pr.baseline_correction(acc, dt, 0), acc - slope, atol=1e-12)


def test_baseline_order2_leaves_velocity_orthogonal_to_removed_terms():
    dt, n = 0.01, 800
    t = np.arange(n) * dt
    acc = np.sin(2 * np.pi * 1.3 * t) + 0.05 + 0.01 * t
    corrected = pr.baseline_correction(acc, dt, 2)
    residual_velocity = cumulative_trapezoid(corrected, dx=dt, initial=0.0)
    # Closed form: least-squares normal equations — the residual is orthogonal to the
    # velocity of each removed term 1, t, t² (integrated by the same rule).
    for k in range(3):
        basis_velocity = cumulative_trapezoid(t**k, dx=dt, initial=0.0)
        cosine = residual_velocity @ basis_velocity / (
            np.linalg.norm(residual_velocity) * np.linalg.norm(basis_velocity))
        assert abs(cosine) < 1e-9


@pytest.mark.parametrize("order", [-1, 4, 1.0, True, None])
def test_baseline_refuses_orders_outside_0_to_3(order):
    with pytest.raises(ValueError, match=r"order must be one of \(0, 1, 2, 3\) \[-\]"):
        pr.baseline_correction(np.ones(20), 0.01, order)


# ------------------------------------------------------------------------ band-pass


def _amplitude_and_phase(signal, t, frequency_hz):
    """Amplitude and phase of the sin/cos projection over whole cycles of ``t``."""
    s, c = np.sin(2 * np.pi * frequency_hz * t), np.cos(2 * np.pi * frequency_hz * t)
    a = 2 * np.mean(signal * s)
    b = 2 * np.mean(signal * c)
    return math.hypot(a, b), math.atan2(b, a)


def _steady_gain(low_hz, high_hz, frequency_hz, order=4, dt=0.01, duration_s=120.0):
    t = np.arange(int(round(duration_s / dt)) + 1) * dt
    acc = np.sin(2 * np.pi * frequency_hz * t)
    out = pr.bandpass(acc, dt, low_hz, high_hz, order=order)
    # Middle 40 s (a whole number of cycles for the frequencies used) away from transients.
    middle = (t >= 40.0) & (t < 80.0)
    return _amplitude_and_phase(out[middle], t[middle], frequency_hz)


def _lowpass_power(frequency_hz, corner_hz, order, dt):
    # Closed form: digital Butterworth by the bilinear transform with pre-warped corner,
    # |H|² = 1 / (1 + (tan(πf dt) / tan(πfc dt))^(2n)) (Oppenheim & Schafer,
    # Discrete-Time Signal Processing, §7.1); forward-backward filtering applies |H|².
    ratio = math.tan(math.pi * frequency_hz * dt) / math.tan(math.pi * corner_hz * dt)
    return 1.0 / (1.0 + ratio ** (2 * order))


@pytest.mark.parametrize("frequency_hz", [1.0, 4.0, 5.0, 8.0])
def test_lowpass_gain_matches_butterworth_closed_form(frequency_hz):
    gain, phase = _steady_gain(None, 5.0, frequency_hz)
    # Closed form: see _lowpass_power; zero pads and trimming do not change the steady state.
    assert gain == pytest.approx(_lowpass_power(frequency_hz, 5.0, 4, 0.01), rel=1e-6, abs=1e-9)
    # Closed form: forward-backward filtering has zero phase.
    if gain > 1e-3:
        assert abs(phase) < 1e-6


@pytest.mark.parametrize("frequency_hz", [0.25, 0.5, 1.0, 3.0])
def test_highpass_gain_matches_butterworth_closed_form(frequency_hz):
    gain, phase = _steady_gain(0.5, None, frequency_hz)
    # Closed form: high-pass by the bilinear transform, |H|² = 1/(1 + (tan πfc dt /
    # tan πf dt)^(2n)), i.e. the low-pass formula with f and fc swapped.
    expected = _lowpass_power(0.5, frequency_hz, 4, 0.01)
    assert gain == pytest.approx(expected, rel=1e-5, abs=1e-9)
    assert abs(phase) < 1e-5


def test_bandpass_gain_is_product_of_highpass_and_lowpass():
    gain, _ = _steady_gain(0.5, 5.0, 1.0, order=2)
    # Closed form: the band-pass is a cascade, so |H|² multiply.
    expected = _lowpass_power(0.5, 1.0, 2, 0.01) * _lowpass_power(1.0, 5.0, 2, 0.01)
    assert gain == pytest.approx(expected, rel=1e-6)


def test_bandpass_keeps_length_and_leaves_input_alone():
    acc = np.random.default_rng(1).normal(size=777)
    before = acc.copy()
    out = pr.bandpass(acc, 0.01, 0.2, 20.0)
    # Closed form: pads are removed, so the output has the input's 777 samples.
    assert out.shape == (777,)
    np.testing.assert_array_equal(acc, before)


def test_pad_length_rule():
    # From memory: Boore (2005), BSSA 95(2), total pad Tpad = 1.5 n / fc
    # (n = 4, fc = 0.1 Hz gives 60 s).
    assert pr.pad_length_s(0.1, 4) == pytest.approx(60.0)


@pytest.mark.parametrize(
    ("low", "high", "order", "message"),
    [
        (None, 50.0, 4, r"high_hz must be below the Nyquist frequency 50 Hz .*got 50"),
        (60.0, None, 4, r"low_hz must be below the Nyquist frequency 50 Hz"),
        (5.0, 2.0, 4, r"low_hz must be below high_hz \[Hz\]; got low_hz=5, high_hz=2"),
        (None, None, 4, r"give at least one corner"),
        (-1.0, None, 4, r"low_hz must be a finite number > 0 \[Hz\] or None; got -1.0"),
        (0.1, None, 0, r"order must be an integer from 1 to 8 \[-\]; got 0"),
    ],
)
def test_bandpass_refuses_bad_corners(low, high, order, message):
    with pytest.raises(ValueError, match=message):
        pr.bandpass(np.ones(200), 0.01, low, high, order=order)


# ------------------------------------------------------------------------ taper


def test_cosine_taper_weights_are_hann_ramps():
    dt, n, ramp_s = 0.01, 1001, 1.5
    t = np.arange(n) * dt
    out = pr.cosine_taper(np.full(n, 2.0), dt, ramp_s)
    distance = np.minimum(t, t[-1] - t)
    # Closed form: Hann half-window w = sin²(π d / (2 T_taper)) within T_taper of an end,
    # 1 elsewhere.
    weight = np.where(distance < ramp_s, np.sin(np.pi * distance / (2 * ramp_s)) ** 2, 1.0)
    np.testing.assert_allclose(out, 2.0 * weight, atol=1e-12)
    # Closed form: both end samples are zero.
    assert out[0] == 0.0 and abs(out[-1]) < 1e-15


def test_cosine_taper_refuses_ramp_longer_than_half_record():
    with pytest.raises(ValueError, match=r"at most half the record duration \(0.5 s\) \[s\]"):
        pr.cosine_taper(np.ones(101), 0.01, 0.6)
