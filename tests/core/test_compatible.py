"""Tests for sdofreport.core.compatible against design spectra evaluated in the test."""

from __future__ import annotations

import os

import numpy as np
import pytest
from scipy import signal

from sdofreport.core.compatible import (
    COMPATIBLE_ENVELOPES,
    _Matcher,
    spectrum_compatible_record,
)
from sdofreport.core.processing import baseline_correction
from sdofreport.core.spectra import response_spectrum
from sdofreport.core.units import G

SDS, SD1, TL = 1.0, 0.6, 8.0
# EN 1998-1 Type 1, ground type C: S = 1.15, T_B = 0.2, T_C = 0.6, T_D = 2.0 (Table 3.2,
# memory), a_g = 0.3 g, 5 % damping (eta = 1).
AG, S, TB, TC, TD = 0.3, 1.15, 0.2, 0.6, 2.0


def _asce(t):
    """ASCE/SEI 7-16 §11.4.6 written out independently of design_spectra."""
    t = np.asarray(t, float)
    t0, ts = 0.2 * SD1 / SDS, SD1 / SDS
    return np.where(t < t0, SDS * (0.4 + 0.6 * t / t0),
                    np.where(t <= ts, SDS, np.where(t <= TL, SD1 / np.maximum(t, 1e-9),
                                                    SD1 * TL / np.maximum(t, 1e-9) ** 2)))


def _en1998(t):
    """EN 1998-1:2004 Eqs. (3.2)-(3.5), eta = 1, written out independently."""
    t = np.asarray(t, float)
    top = AG * S * 2.5
    return np.where(t <= TB, AG * S * (1 + t / TB * 1.5),
                    np.where(t <= TC, top, np.where(t <= TD, top * TC / np.maximum(t, 1e-9),
                                                    top * TC * TD / np.maximum(t, 1e-9) ** 2)))


TARGET_T = np.concatenate([[0.0], np.geomspace(0.005, 10.0, 1500)])
TARGETS = {"asce7-16": _asce, "en1998-1": _en1998}
RANGE = (0.05, 4.0)
# Seeds 0..N-1, no hand-picking. The full set of the issue (10 seeds x 2 envelopes x
# 2 targets, ~1 min on 2 cores) runs with SDOFREPORT_SLOW_TESTS=1; by default the first 2.
SEEDS = range(10 if os.environ.get("SDOFREPORT_SLOW_TESTS") else 2)


def _lsim_psa_g(acc, dt, periods, zeta=0.05, refine=8):
    """PSA [g] by scipy.signal.lsim on an 8x finer grid (input linear between samples)."""
    t = np.arange(acc.size) * dt
    fine = np.linspace(0.0, t[-1], (acc.size - 1) * refine + 1)
    ag = np.interp(fine, t, acc)
    out = []
    for period in periods:
        wn = 2 * np.pi / period
        system = signal.lti([-1.0], [1.0, 2 * zeta * wn, wn * wn])  # u'' + 2ζωu' + ω²u = -ag
        _, u, _ = signal.lsim(system, ag, fine)
        out.append(wn * wn * np.max(np.abs(u)) / G)
    return np.array(out)


@pytest.mark.parametrize("envelope", COMPATIBLE_ENVELOPES)
@pytest.mark.parametrize("name", sorted(TARGETS))
@pytest.mark.parametrize("seed", SEEDS)
def test_every_seed_within_10_percent(name, envelope, seed):
    formula = TARGETS[name]
    r = spectrum_compatible_record(TARGET_T, formula(TARGET_T), 25.0, 0.01, seed=seed,
                                   envelope=envelope, period_range_s=RANGE)
    periods = np.geomspace(*RANGE, 211)  # different from the 300 grid periods
    psa_g = response_spectrum(r.acceleration_m_s2, 0.01, periods, 0.05).psa_m_s2[0] / G
    # Published formula: ASCE/SEI 7-16 Eqs. (11.4-5)-(11.4-7) or EN 1998-1 Eqs.
    # (3.2)-(3.5), evaluated above. Common practice (no source): ±10 % over the range.
    np.testing.assert_array_less(np.abs(psa_g / formula(periods) - 1.0), 0.10)
    assert r.max_deviation < 0.10


def test_independent_spectrum_by_lsim():
    r = spectrum_compatible_record(TARGET_T, _asce(TARGET_T), 25.0, 0.01, seed=5,
                                   period_range_s=RANGE)
    periods = np.array([0.05, 0.3, 1.1, 4.0])
    psa_g = _lsim_psa_g(r.acceleration_m_s2, 0.01, periods)
    # Independent: scipy.signal.lsim (exact for linearly interpolated input) sampled 8x
    # finer; formula ASCE/SEI 7-16 §11.4.6. Common practice (no source): ±10 %.
    np.testing.assert_array_less(np.abs(psa_g / _asce(periods) - 1.0), 0.10)


@pytest.fixture(scope="module")
def record():
    return spectrum_compatible_record(TARGET_T, _asce(TARGET_T), 20.0, 0.01, seed=2,
                                      period_range_s=(0.05, 2.0))


def test_reported_match_is_that_of_the_record(record):
    psa_g = response_spectrum(record.acceleration_m_s2, 0.01, record.control_periods_s,
                              0.05).psa_m_s2[0] / G
    # Closed form: max_deviation is max |PSA/target − 1| of the returned record.
    np.testing.assert_allclose(record.psa_g, psa_g, rtol=1e-12)
    assert record.max_deviation == pytest.approx(
        np.max(np.abs(psa_g / record.target_sa_g - 1.0)), rel=1e-12)
    assert record.mean_deviation == pytest.approx(
        np.mean(psa_g / record.target_sa_g - 1.0), rel=1e-12)
    # Published formula: ASCE/SEI 7-16 §11.4.6; the 1500-point table interpolated
    # log-log is within 0.5 % of the formula (kinks at T0, TS).
    np.testing.assert_allclose(record.target_sa_g, _asce(record.control_periods_s),
                               rtol=0.005)
    assert record.period_range_s == (0.05, 2.0)


def test_same_seed_same_bytes_and_ends_near_rest(record):
    again = spectrum_compatible_record(TARGET_T, _asce(TARGET_T), 20.0, 0.01, seed=2,
                                       period_range_s=(0.05, 2.0))
    assert again.acceleration_m_s2.tobytes() == record.acceleration_m_s2.tobytes()
    other = spectrum_compatible_record(TARGET_T, _asce(TARGET_T), 20.0, 0.01, seed=3,
                                       period_range_s=(0.05, 2.0), iterations=0,
                                       adjustments=0)
    assert not np.array_equal(other.acceleration_m_s2, record.acceleration_m_s2)
    acc = record.acceleration_m_s2
    # Closed form: a baseline-corrected record is unchanged by a second correction
    # (the correction is a least-squares projection), to round-off.
    np.testing.assert_allclose(baseline_correction(acc, 0.01, 2), acc,
                               atol=1e-9 * np.max(np.abs(acc)))
    velocity = np.concatenate([[0.0], np.cumsum(0.5 * (acc[1:] + acc[:-1]) * 0.01)])
    # Common practice (no source): the final velocity is small next to the peak velocity.
    assert abs(velocity[-1]) < 0.1 * np.max(np.abs(velocity))


def test_batch_baseline_equals_processing_baseline():
    rng = np.random.default_rng(0)
    rows = rng.normal(size=(3, 500))
    m = _Matcher(500, 0.01, np.geomspace(0.1, 1.0, 20), np.ones(20), 0.05, np.ones(500))
    # Closed form: the same projection as sdofreport.core.processing.baseline_correction.
    for got, row in zip(m.baseline(rows), rows):
        np.testing.assert_allclose(got, baseline_correction(row, 0.01, 2), atol=1e-10)


def test_impulse_response_reproduces_exact_response():
    from sdofreport.core.exact import exact_response

    acc = np.random.default_rng(1).normal(size=400)
    acc[0] = 0.0  # the first sample's half hat is the one case the convolution omits
    grid = np.geomspace(0.1, 1.0, 7)
    m = _Matcher(400, 0.01, grid, np.ones(7), 0.05, np.ones(400))
    expected = exact_response(acc, 0.01, grid, 0.05)[0]
    # Closed form: linearity and time invariance of the exact recurrence.
    np.testing.assert_allclose(m.displacement(acc, np.arange(7)), expected,
                               atol=1e-9 * np.max(np.abs(expected)))


def test_no_iterations_gives_a_record():
    r = spectrum_compatible_record(TARGET_T, _asce(TARGET_T), 10.0, 0.01, seed=0,
                                   envelope="trapezoidal", iterations=0, adjustments=0)
    assert r.acceleration_m_s2.shape == (1001,)
    assert (r.iterations_used, r.adjustments_used) == (0, 0)


@pytest.mark.parametrize("kwargs, match", [
    ({"seed": -1}, r"seed must be an integer >= 0 \[-\]; got -1"),
    ({"envelope": "boxcar"}, r"envelope must be one of saragoni-hart, trapezoidal; got 'boxcar'"),
    ({"duration_s": 0.2}, r"duration_s / time_step_s must give at least 64 samples"),
    ({"period_range_s": (0.01, 2.0)}, r"period_range_s \(0.01, 2.0\) \[s\] must lie within"),
    ({"damping_ratio": 0.0}, r"damping_ratio must be in \(0, 1\) \[-\]; got 0.0"),
    ({"iterations": 1.5}, r"iterations must be an integer >= 0 \[-\]; got 1.5"),
    ({"adjustments": -2}, r"adjustments must be an integer >= 0 \[-\]; got -2"),
])
def test_bad_arguments(kwargs, match):
    args = {"target_periods_s": TARGET_T, "target_sa_g": _asce(TARGET_T), "duration_s": 10.0,
            "time_step_s": 0.01, "seed": 0} | kwargs
    with pytest.raises(ValueError, match=match):
        spectrum_compatible_record(**args)
