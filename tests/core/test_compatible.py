"""Tests for sdofreport.core.compatible against an ASCE/SEI 7-16 target evaluated by hand."""

from __future__ import annotations

import numpy as np
import pytest

from sdofreport.core.compatible import COMPATIBLE_ENVELOPES, spectrum_compatible_record
from sdofreport.core.spectra import response_spectrum
from sdofreport.core.units import G

SDS, SD1, TL = 1.0, 0.6, 8.0


def _asce(t):
    """ASCE/SEI 7-16 §11.4.6 written out independently of design_spectra."""
    t = np.asarray(t, float)
    t0, ts = 0.2 * SD1 / SDS, SD1 / SDS
    return np.where(t < t0, SDS * (0.4 + 0.6 * t / t0),
                    np.where(t <= ts, SDS, np.where(t <= TL, SD1 / np.maximum(t, 1e-9),
                                                    SD1 * TL / np.maximum(t, 1e-9) ** 2)))


TARGET_T = np.geomspace(0.01, 10.0, 200)
TARGET_SA = _asce(TARGET_T)


@pytest.fixture(scope="module")
def record():
    # Seed 2 is one that converges to within 10 %; not every seed does (see the module
    # docstring of sdofreport.core.compatible).
    return spectrum_compatible_record(TARGET_T, TARGET_SA, 20.0, 0.01, seed=2,
                                      period_range_s=(0.05, 2.0))


def test_spectrum_within_10_percent_of_target(record):
    periods = np.geomspace(0.05, 2.0, 250)  # denser than, and different from, the controls
    psa_g = response_spectrum(record.acceleration_m_s2, 0.01, periods, 0.05).psa_m_s2[0] / G
    # Published formula: ASCE/SEI 7-16 Eqs. 11.4-5 to 11.4-7 (evaluated in _asce).
    # Common practice (no source): ±10 % of the target over the matched range.
    np.testing.assert_array_less(np.abs(psa_g / _asce(periods) - 1.0), 0.10)
    assert record.max_deviation <= 0.10
    assert record.period_range_s == (0.05, 2.0)


def test_reported_match_is_that_of_the_record(record):
    psa_g = response_spectrum(record.acceleration_m_s2, 0.01, record.control_periods_s,
                              0.05).psa_m_s2[0] / G
    # Closed form: max_deviation is max |PSA/target − 1| of the returned record.
    np.testing.assert_allclose(record.psa_g, psa_g, rtol=1e-12)
    assert record.max_deviation == pytest.approx(
        np.max(np.abs(psa_g / record.target_sa_g - 1.0)), rel=1e-12)
    # Published formula: ASCE/SEI 7-16 §11.4.6; the target at the control periods is the
    # 200-point table interpolated log-log, within 1 % of the formula (kinks at T0, TS).
    np.testing.assert_allclose(record.target_sa_g, _asce(record.control_periods_s), rtol=0.01)


def test_same_seed_same_bytes_and_ends_near_rest(record):
    again = spectrum_compatible_record(TARGET_T, TARGET_SA, 20.0, 0.01, seed=2,
                                       period_range_s=(0.05, 2.0))
    assert again.acceleration_m_s2.tobytes() == record.acceleration_m_s2.tobytes()
    other = spectrum_compatible_record(TARGET_T, TARGET_SA, 20.0, 0.01, seed=3,
                                       period_range_s=(0.05, 2.0), iterations=0)
    assert not np.array_equal(other.acceleration_m_s2[:2001], record.acceleration_m_s2)
    acc = record.acceleration_m_s2
    velocity = np.concatenate([[0.0], np.cumsum(0.5 * (acc[1:] + acc[:-1]) * 0.01)])
    # Common practice (no source): after baseline correction the final velocity is small
    # next to the peak velocity.
    assert abs(velocity[-1]) < 0.1 * np.max(np.abs(velocity))


def test_trapezoidal_envelope_runs():
    assert COMPATIBLE_ENVELOPES == ("saragoni-hart", "trapezoidal")
    r = spectrum_compatible_record(TARGET_T, TARGET_SA, 10.0, 0.01, seed=0,
                                   envelope="trapezoidal", iterations=2)
    assert r.acceleration_m_s2.shape == (1001,)
    assert 0 <= r.iterations_used <= 2


@pytest.mark.parametrize("kwargs, match", [
    ({"seed": -1}, r"seed must be an integer >= 0 \[-\]; got -1"),
    ({"envelope": "boxcar"}, r"envelope must be one of saragoni-hart, trapezoidal; got 'boxcar'"),
    ({"duration_s": 0.2}, r"duration_s / dt_s must give at least 64 samples"),
    ({"period_range_s": (0.01, 2.0)}, r"period_range_s \(0.01, 2.0\) \[s\] must lie within"),
    ({"damping": 0.0}, r"damping must be a finite number > 0 \[-\]; got 0.0"),
    ({"iterations": 1.5}, r"iterations must be an integer >= 0 \[-\]; got 1.5"),
])
def test_bad_arguments(kwargs, match):
    args = {"target_periods_s": TARGET_T, "target_sa_g": TARGET_SA, "duration_s": 10.0,
            "dt_s": 0.01, "seed": 0} | kwargs
    with pytest.raises(ValueError, match=match):
        spectrum_compatible_record(**args)
