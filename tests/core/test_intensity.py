"""Intensity measures against closed-form answers worked by hand."""

import math

import numpy as np
import pytest

from sdofreport.core import intensity as im

G = 9.80665  # standard gravity [m/s²], ISO 80000-3


def _sine(amplitude, frequency_hz, cycles, points_per_cycle, closed=True):
    """A·sin(2πft) over whole cycles; ``closed`` includes the final sample at t = T."""
    dt = 1.0 / (frequency_hz * points_per_cycle)
    n = cycles * points_per_cycle + (1 if closed else 0)
    t = np.arange(n) * dt
    return amplitude * np.sin(2 * np.pi * frequency_hz * t), dt


def test_pga_is_largest_absolute_value():
    acc = [0.1, -2.5, 2.4, 0.0]
    # Closed form: max |a| of the four values written above.
    assert im.pga(acc) == 2.5


def test_constant_acceleration_gives_linear_velocity_and_quadratic_displacement():
    a, dt, n = 0.7, 0.01, 501
    acc = np.full(n, a)
    t = np.arange(n) * dt
    # Closed form: v = a t, d = a t²/2 (trapezoid rule is exact for these polynomials).
    np.testing.assert_allclose(im.ground_velocity(acc, dt), a * t, rtol=1e-12, atol=1e-15)
    np.testing.assert_allclose(im.ground_displacement(acc, dt), a * t**2 / 2, rtol=1e-12,
                               atol=1e-15)
    # Closed form: PGV = a T, PGD = a T²/2 with T = 5 s.
    assert im.pgv(acc, dt) == pytest.approx(a * 5.0, rel=1e-12)
    assert im.pgd(acc, dt) == pytest.approx(a * 25.0 / 2, rel=1e-12)


def test_arias_intensity_of_whole_cycle_sine():
    amplitude, cycles = 2.0, 20
    acc, dt = _sine(amplitude, 1.0, cycles, 50)
    total_s = cycles * 1.0
    # Closed form: Ia = π/(2g)·A²·T/2 (mean of sin² over whole cycles is 1/2; the sampled
    # sum Σ sin²(2πk/M) over a cycle is exactly M/2 for M ≥ 3, so the rule is exact).
    expected = math.pi / (2 * G) * amplitude**2 * total_s / 2
    assert im.arias_intensity(acc, dt) == pytest.approx(expected, rel=1e-12)


def test_significant_durations_of_whole_cycle_sine():
    acc, dt = _sine(1.5, 1.0, 20, 50)
    # Closed form: Ia(t) ∝ t/2 − sin(4πft)/(8πf); at t = 1, 15 and 19 s the sine term is 0,
    # so the 5, 75 and 95 % crossings are at exactly 1, 15 and 19 s: D5-95 = 0.9·20 s.
    assert im.significant_duration(acc, dt) == pytest.approx(18.0, abs=1e-9)
    # Closed form: D5-75 = 15 − 1 s.
    assert im.significant_duration(acc, dt, 0.05, 0.75) == pytest.approx(14.0, abs=1e-9)


def test_significant_duration_is_interpolated_not_quantised():
    dt, n = 0.01, 334          # T = 3.33 s, so 0.05·T = 0.1665 s lies between samples
    acc = np.full(n, 3.0)
    total_s = (n - 1) * dt
    # Closed form: constant acceleration has a linear Husid curve, D5-95 = 0.9 T = 2.997 s
    # (not a multiple of the 0.01 s step).
    assert im.significant_duration(acc, dt) == pytest.approx(0.9 * total_s, rel=1e-12)
    # Closed form: the Husid curve of a constant is t / T.
    np.testing.assert_allclose(im.husid(acc, dt), np.arange(n) * dt / total_s, atol=1e-14)


def test_husid_of_zero_record_is_refused():
    with pytest.raises(ValueError, match="zero everywhere"):
        im.husid(np.zeros(32), 0.01)


def test_cav_of_rectified_sine():
    amplitude, cycles = 0.8, 10
    acc, dt = _sine(amplitude, 2.0, cycles, 400)
    total_s = cycles / 2.0
    # Closed form: ∫|A sin| over whole cycles = 2 A T / π. Tolerance: the trapezoid rule's
    # leading error for sin over a half cycle is h²/12 relative, h = 2π/M (M = 400 samples
    # per cycle; Euler-Maclaurin), plus 5 %.
    h = 2 * math.pi / 400
    expected = 2 * amplitude * total_s / math.pi
    assert im.cav(acc, dt) == pytest.approx(expected, rel=1.05 * h**2 / 12)
    # and the error is of that size, below the exact value (sin is concave there).
    assert im.cav(acc, dt) < expected


def test_cav_counts_triangles_at_zero_crossings():
    n, dt = 101, 0.02
    acc = np.where(np.arange(n) % 2 == 0, 1.0, -1.0)
    # Closed form: the linearly interpolated ±1 zig-zag crosses zero mid-step; each step
    # contributes two triangles of height 1 and base dt/2, i.e. dt/2 (trapezoid would give dt).
    assert im.cav(acc, dt) == pytest.approx((n - 1) * dt / 2, rel=1e-12)


def test_fourier_amplitude_of_sine_at_its_line():
    amplitude, frequency_hz, n, dt = 1.3, 2.0, 1000, 0.01   # 20 whole cycles in N·dt = 10 s
    t = np.arange(n) * dt
    frequency, fas = im.fourier_amplitude(amplitude * np.sin(2 * np.pi * frequency_hz * t), dt)
    line = int(np.argmin(np.abs(frequency - frequency_hz)))
    # Closed form: |DFT| of A sin at its own line is A N/2, so |FFT|·dt = A·T/2.
    assert fas[line] == pytest.approx(amplitude * n * dt / 2, rel=1e-12)
    # Closed form: frequencies k/(N dt), k = 0 … N/2.
    np.testing.assert_allclose(frequency, np.arange(n // 2 + 1) / (n * dt))
    others = np.delete(fas, line)
    # Closed form: whole cycles leak nothing into other lines (round-off only).
    assert np.max(others) < 1e-10


def test_mean_period_of_pure_sine():
    n, dt, frequency_hz = 2000, 0.01, 2.5   # 50 whole cycles
    t = np.arange(n) * dt
    acc = np.sin(2 * np.pi * frequency_hz * t)
    # Closed form: one spectral line, Tm = 1/f = 0.4 s.
    assert im.mean_period(acc, dt) == pytest.approx(1 / frequency_hz, rel=1e-9)


def test_mean_period_of_two_sines():
    n, dt = 2000, 0.01
    t = np.arange(n) * dt
    (a1, f1), (a2, f2) = (1.0, 1.0), (0.5, 5.0)
    acc = a1 * np.sin(2 * np.pi * f1 * t) + a2 * np.cos(2 * np.pi * f2 * t)
    # Closed form: Rathje et al. (1998) Eq. (1) with two lines, C ∝ A:
    # Tm = (A1²/f1 + A2²/f2) / (A1² + A2²).
    expected = (a1**2 / f1 + a2**2 / f2) / (a1**2 + a2**2)
    assert im.mean_period(acc, dt) == pytest.approx(expected, rel=1e-9)


def test_mean_period_ignores_lines_outside_band():
    n, dt = 2000, 0.01
    t = np.arange(n) * dt
    acc = np.sin(2 * np.pi * 2.0 * t) + 3.0 * np.sin(2 * np.pi * 30.0 * t)
    # Closed form: the 30 Hz line is above 20 Hz and excluded, leaving Tm = 1/2 s.
    assert im.mean_period(acc, dt) == pytest.approx(0.5, rel=1e-9)


def test_mean_period_refuses_record_with_no_line_in_band():
    # dt = 2.5 s puts the Nyquist frequency at 0.2 Hz, below the 0.25 Hz band edge.
    with pytest.raises(ValueError, match="no Fourier frequency"):
        im.mean_period(np.ones(8), 2.5)


def test_intensity_measures_of_sine():
    amplitude, n, dt, frequency_hz = 2.0, 2000, 0.01, 1.0   # 20 whole cycles, 20 s
    t = np.arange(n + 1) * dt
    acc = amplitude * np.sin(2 * np.pi * frequency_hz * t)
    measures = im.intensity_measures(acc, dt)
    # Closed form: PGA = A (sample at a crest, t = 0.25 s).
    assert measures.pga_m_s2 == pytest.approx(amplitude, rel=1e-12)
    # Closed form: v = A/(2πf)(1 − cos 2πft), PGV = A/(πf).
    assert measures.pgv_m_s == pytest.approx(amplitude / (math.pi * frequency_hz), rel=1e-3)
    # Closed form: Ia = π/(2g)·A²·T/2.
    assert measures.arias_m_s == pytest.approx(math.pi / (2 * G) * amplitude**2 * 10, rel=1e-12)
    # Closed form: D5-95 = 18 s, D5-75 = 14 s (see the sine test above).
    assert measures.d5_95_s == pytest.approx(18.0, abs=1e-9)
    assert measures.d5_75_s == pytest.approx(14.0, abs=1e-9)
    # Closed form: CAV = 2AT/π; trapezoid error h²/12 relative, h = 2π/100 (Euler-Maclaurin).
    h = 2 * math.pi / 100
    assert measures.cav_m_s == pytest.approx(2 * amplitude * 20 / math.pi, rel=1.05 * h**2 / 12)
    # Closed form: Tm = 1/f; 1e-3 because the closing sample breaks exact periodicity.
    assert measures.mean_period_s == pytest.approx(1.0, rel=1e-3)


def test_intensity_measures_of_zero_record_has_nan_durations():
    measures = im.intensity_measures(np.zeros(64), 0.01)
    # Closed form: every integral of zero is zero; durations are undefined.
    assert measures.pga_m_s2 == 0.0 and measures.arias_m_s == 0.0 and measures.cav_m_s == 0.0
    assert math.isnan(measures.d5_95_s) and math.isnan(measures.mean_period_s)


@pytest.mark.parametrize("acceleration", [[0.0, 1.0, -1.0], (0.0, 1.0, -1.0),
                                          np.array([0.0, 1.0, -1.0])])
def test_list_tuple_and_array_inputs_agree(acceleration):
    # Closed form: trapezoid of |a| = [0, 1, −1] at dt = 1 with crossings: 0.5 + 0.5.
    assert im.cav(acceleration, 1.0) == pytest.approx(1.0)


@pytest.mark.parametrize(
    ("acceleration", "time_step", "message"),
    [
        ([0.0, float("nan"), 1.0], 0.01,
         r"acceleration_m_s2 must be finite \[m/s²\]; got nan at sample 1"),
        ([], 0.01, r"at least 2 samples \[m/s²\]; got 0"),
        (1.0, 0.01, r"acceleration_m_s2 must be 1-D \[m/s²\]; got an array of shape \(\)"),
        ([[0.0, 1.0]], 0.01, r"must be 1-D \[m/s²\]; got an array of shape \(1, 2\)"),
        ([0.0, 1.0], 0.0, r"time_step_s must be a finite number > 0 \[s\]; got 0.0"),
        ([0.0, 1.0], -0.01, r"time_step_s must be a finite number > 0 \[s\]; got -0.01"),
        ([0.0, 1.0], "x", r"time_step_s must be a number > 0 \[s\]; got 'x'"),
    ],
)
def test_bad_arguments_name_parameter_value_and_unit(acceleration, time_step, message):
    with pytest.raises(ValueError, match=message):
        im.arias_intensity(acceleration, time_step)


def test_significant_duration_refuses_bad_fractions():
    with pytest.raises(ValueError, match="0 <= start < end <= 1"):
        im.significant_duration(np.ones(20), 0.01, 0.95, 0.05)
