"""Tests for sdofreport.core.rotd: closed forms of rotated motion and scipy.signal.lsim."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import signal

from sdofreport.core.rotd import DEFAULT_ANGLES_DEG, rotated_peaks, rotd_spectrum
from sdofreport.core.spectra import response_spectrum
from sdofreport.core.units import G
from tests.core.conftest import enveloped_noise

DT = 0.02
PERIODS = np.array([0.05, 0.2, 0.5, 1.0, 3.0])
# Closed form: a sampled sinusoid at n samples per period loses at most 1 − cos(π/n) of
# its peak; rotd_spectrum samples at >= 32 per period by default.
SAMPLING_TOL = 1.0 - math.cos(math.pi / 32.0)


@pytest.fixture(scope="module")
def pair():
    return enveloped_noise(DT, seed=11, peak=3.0), enveloped_noise(DT, seed=12, peak=2.0)


@pytest.fixture(scope="module")
def reference_sd(pair):
    a1, a2 = pair
    sd1 = response_spectrum(a1, DT, PERIODS, 0.05).sd_m[0]
    sd2 = response_spectrum(a2, DT, PERIODS, 0.05).sd_m[0]
    return sd1, sd2


def test_identical_components(pair, reference_sd):
    a1, _ = pair
    sd = reference_sd[0]
    r = rotd_spectrum(a1, a1, DT, PERIODS, 0.05)
    # Closed form (Boore 2010 identity, REFERENCES.md): u(θ) = u (cos θ + sin θ), peak
    # √2 |sin(θ + 45°)| SD; maximum √2 SD. Tolerance: sampling loss bound above.
    np.testing.assert_allclose(r.rotd100_m, math.sqrt(2.0) * sd, rtol=SAMPLING_TOL)
    # Closed form: median over θ in [0°, 180°) of |sin(θ + 45°)| is sin 45° (P(|sin φ| <= x)
    # = 2 arcsin(x)/π = 1/2), so RotD50 = √2 sin 45° SD = SD exactly. On the 1° grid the
    # 90th and 91st sorted values are both |cos 0 + sin 0| = |cos 90° + sin 90°| = 1.
    np.testing.assert_allclose(r.rotd50_m, sd, rtol=SAMPLING_TOL)
    # Closed form: both identities hold at the same samples, so the ratio is √2 to round-off.
    np.testing.assert_allclose(r.rotd100_m / r.rotd50_m, math.sqrt(2.0), rtol=1e-12)
    # Closed form: the maximum direction is θ = 45°.
    np.testing.assert_array_equal(r.rotd100_angle_deg, 45.0)


def test_two_records_bounds_and_component_measures(pair, reference_sd):
    a1, a2 = pair
    r = rotd_spectrum(a1, a2, DT, PERIODS, 0.05)
    sd1, sd2 = reference_sd
    # Closed form: θ = 0 and 90° are among the angles, so RotD100 >= each component
    # (reference: response_spectrum's refined peaks, less the sampling loss bound).
    assert np.all(r.rotd100_m >= np.maximum(sd1, sd2) * (1.0 - SAMPLING_TOL))
    assert np.all(r.rotd50_m <= r.rotd100_m)
    np.testing.assert_allclose(r.sd_h1_m, sd1, rtol=SAMPLING_TOL)
    np.testing.assert_allclose(r.sd_h2_m, sd2, rtol=SAMPLING_TOL)
    w2_g = (2.0 * np.pi / PERIODS) ** 2 / G
    # Closed form: PSA = ω² SD (Chopra ch. 6), in g.
    np.testing.assert_allclose(r.rotd50_psa_g, r.rotd50_m * w2_g, rtol=1e-14)
    # Published definitions: geometric mean √(PSA1 PSA2); SRSS √(PSA1² + PSA2²).
    np.testing.assert_allclose(r.geomean_psa_g, np.sqrt(r.psa_h1_g * r.psa_h2_g), rtol=1e-14)
    np.testing.assert_allclose(r.srss_psa_g, np.hypot(r.psa_h1_g, r.psa_h2_g), rtol=1e-14)
    assert r.psa_by_angle_g.shape == (PERIODS.size, DEFAULT_ANGLES_DEG.size)


def test_rotated_peak_matches_lsim_on_rotated_record(pair):
    a1, a2 = pair
    period, zeta = 0.5, 0.05
    r = rotd_spectrum(a1, a2, DT, [period], zeta, angles_deg=[0.0, 30.0, 120.0])
    wn = 2.0 * np.pi / period
    system = signal.lti([-1.0], [1.0, 2.0 * zeta * wn, wn**2])
    t = np.arange(a1.size) * DT
    fine = np.linspace(0.0, t[-1], (a1.size - 1) * 16 + 1)  # 400 samples per period
    for j, theta in enumerate(np.deg2rad([0.0, 30.0, 120.0])):
        ag = a1 * math.cos(theta) + a2 * math.sin(theta)
        _, u, _ = signal.lsim(system, np.interp(fine, t, ag), fine)
        # Independent reference: scipy.signal.lsim on the rotated record (one integration
        # per angle), exact for linearly interpolated input; tolerance = sampling bound.
        expected_psa_g = np.max(np.abs(u)) * wn**2 / G
        assert r.psa_by_angle_g[0, j] == pytest.approx(expected_psa_g, rel=SAMPLING_TOL)


def test_zero_period_is_rotated_pga(pair):
    a1, _ = pair
    r = rotd_spectrum(a1, a1, DT, [0.0, 1.0], 0.05)
    pga_g = np.max(np.abs(a1)) / G
    # Closed form: identical components, peak of the rotated PGA √2 |sin(θ+45°)| PGA.
    assert r.rotd100_psa_g[0] == pytest.approx(math.sqrt(2.0) * pga_g, rel=1e-12)
    assert r.rotd50_psa_g[0] == pytest.approx(pga_g, rel=1e-12)
    assert r.rotd100_m[0] == 0.0


@pytest.mark.parametrize("a, b", [(1.0, 1.0), (2.0, 0.5), (0.3, 1.7)])
def test_elliptical_motion_closed_form(a, b):
    # u1 = a cos ωt, u2 = b sin ωt sampled every 0.25° of phase for 2 cycles, long enough
    # (> _PRUNE_FIRST samples) to exercise the pruning.
    phase = np.deg2rad(np.arange(0.0, 720.0, 0.25))
    peaks = rotated_peaks(a * np.cos(phase), b * np.sin(phase))
    theta = np.deg2rad(DEFAULT_ANGLES_DEG)
    # Closed form: a cosθ cos φ + b sinθ sin φ has amplitude √(a² cos²θ + b² sin²θ).
    # Tolerance: the phase grid meets each angle's peak to within 0.125°.
    expected = np.sqrt(a**2 * np.cos(theta) ** 2 + b**2 * np.sin(theta) ** 2)
    np.testing.assert_allclose(peaks, expected, rtol=1.0 - math.cos(np.deg2rad(0.125)))
    # Closed form: RotD100 = max(a, b); RotD50 = median of √(b² + (a² − b²) cos²θ), and
    # cos²θ has median 1/2 over [0°, 180°), so RotD50 = √((a² + b²)/2). Tolerance: round-off
    # for RotD100 (peak at phase 0° or 90°, on the grid); the phase grid for RotD50.
    assert peaks.max() == pytest.approx(max(a, b), rel=1e-12)
    assert np.median(peaks) == pytest.approx(math.sqrt((a * a + b * b) / 2.0),
                                             rel=1.0 - math.cos(np.deg2rad(0.125)))


def test_pruning_agrees_with_brute_force():
    rng = np.random.default_rng(5)
    x1 = np.cumsum(rng.standard_normal(5000))
    x2 = 0.2 * x1 + np.cumsum(rng.standard_normal(5000))
    theta = np.deg2rad(DEFAULT_ANGLES_DEG)
    # Closed form: the definition max_t |x1 cos θ + x2 sin θ| evaluated directly.
    brute = np.abs(np.cos(theta)[:, None] * x1 + np.sin(theta)[:, None] * x2).max(axis=1)
    np.testing.assert_allclose(rotated_peaks(x1, x2), brute, rtol=1e-13)


@pytest.mark.parametrize("kwargs, match", [
    ({"time_step_s": 0.0}, r"time_step_s must be a finite number > 0 \[s\]; got 0.0"),
    ({"damping_ratio": 5.0}, r"damping_ratio must be in \[0, 1\) \[-\]; got 5.0"),
    ({"angles_deg": [0.0, 180.0]}, r"angles_deg must lie in \[0, 180\) \[deg\]"),
    ({"method": "rk4"}, r"method must be one of exact, newmark-average, newmark-linear; "
                        r"got 'rk4'"),
    ({"periods_s": [-1.0]}, r"periods_s must be finite and >= 0 \[s\]; got \[-1.0\]"),
    ({"acceleration_2_m_s2": np.zeros(10)},
     r"acceleration_1_m_s2 and acceleration_2_m_s2 must have the same length"),
])
def test_bad_arguments(kwargs, match):
    args = {"acceleration_1_m_s2": np.zeros(20), "acceleration_2_m_s2": np.zeros(20),
            "time_step_s": 0.01, "periods_s": [1.0], "damping_ratio": 0.05} | kwargs
    with pytest.raises(ValueError, match=match):
        rotd_spectrum(**args)
