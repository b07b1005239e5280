"""Batch engine: peaks against an independent exact computation, caching, parallelism."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import signal

from sdofreport.engine import run_project
from sdofreport.project import load_project


def lsim_peak_displacement(acc, dt, period, zeta, refine=32):
    """Independent reference: scipy.signal.lsim of m ü + c u̇ + k u = −m üg (per unit mass),
    the input linearly interpolated onto ``refine`` sub-steps per record step (lsim is
    exact for linearly interpolated input), peak of |u| over the fine grid."""
    wn = 2 * math.pi / period
    system = signal.lti([[0, 1], [-wn ** 2, -2 * zeta * wn]], [[0], [-1]], [[1, 0]], [[0]])
    t = np.arange(acc.size) * dt
    fine = np.linspace(0, t[-1], (acc.size - 1) * refine + 1)
    _, u, _ = signal.lsim(system, np.interp(fine, t, acc), fine)
    return float(np.max(np.abs(u)))


def test_peaks_agree_with_lsim(project_factory, valid_project_text, tmp_path):
    project = load_project(project_factory(valid_project_text))
    results = run_project(project, jobs=1, cache_dir=tmp_path / "cache")
    system = project.systems[0]
    # The system has a height and carries its weight, so P-Δ is on by default: closed
    # form (Chopra 2017 §7.11) k_eff = k − W/h, T_Δ = T/√(1−θ) with θ = m g/(k h),
    # g = 9.80665 m/s² (ISO 80000-3); the damping ratio applies at T_Δ.
    theta = system.mass_kg * 9.80665 / (system.stiffness_n_m * system.height_m)
    period = system.period_s / math.sqrt(1.0 - theta)
    for spec in project.records:
        record = next(r.record for r in results.records if r.record.id == spec.id)
        expected = lsim_peak_displacement(np.asarray(record.acceleration_m_s2), record.dt_s,
                                          period, system.damping)
        got = results.response(system.id, spec.id).peak_displacement_m
        # Independent reference: scipy.signal.lsim on a 32x finer grid; 0.5 % is the
        # accuracy target for between-sample peaks.
        assert got == pytest.approx(expected, rel=5e-3)
        response = results.response(system.id, spec.id)
        # Closed form: V = k·u for a linear system; drift = u / h.
        assert response.peak_base_shear_n == pytest.approx(system.stiffness_n_m * got)
        assert response.peak_drift_ratio == pytest.approx(got / system.height_m)


def test_statistic_and_verdicts(project_factory, valid_project_text, tmp_path):
    project = load_project(project_factory(valid_project_text))
    results = run_project(project, jobs=1, cache_dir=tmp_path / "cache")
    peaks = [results.response("s1", r.id).peak_displacement_m for r in project.records]
    (check,) = results.checks
    # From memory: EN 1998-1:2004 §4.3.3.4.3(3), the rule used when no scaling rule
    # names a standard: fewer than 7 motions -> maximum response.
    assert check.statistic == "max"
    assert check.demand == max(peaks)
    assert check.ratio == pytest.approx(max(peaks) / 0.050)
    assert check.verdict == ("within limit" if check.ratio <= 1 else "exceeds limit")


def test_cache_recomputes_nothing_and_parallel_matches(project_factory, valid_project_text,
                                                       tmp_path):
    project = load_project(project_factory(valid_project_text))
    cache = tmp_path / "cache"
    first = run_project(project, jobs=2, cache_dir=cache)
    assert first.cache_hits == 0 and first.cache_misses == 4
    second = run_project(project, jobs=1, cache_dir=cache)
    assert second.cache_misses == 0 and second.cache_hits == 4
    serial = run_project(project, jobs=1, use_cache=False)
    for key, response in serial.responses.items():
        assert first.responses[key].peak_displacement_m == response.peak_displacement_m
    for a, b in zip(first.records, serial.records):
        np.testing.assert_array_equal(a.spectrum.psa_m_s2, b.spectrum.psa_m_s2)


def test_damaged_cache_entry_is_recomputed(project_factory, valid_project_text, tmp_path):
    project = load_project(project_factory(valid_project_text))
    cache = tmp_path / "cache"
    run_project(project, jobs=1, cache_dir=cache)
    entries = list(cache.rglob("*.entry"))
    assert len(entries) >= 4
    for entry in entries:
        entry.write_bytes(b"garbage")
    again = run_project(project, jobs=1, cache_dir=cache)
    assert again.cache_misses == 4


def test_record_scale_scales_linear_peaks(project_factory, valid_project_text, tmp_path):
    base = load_project(project_factory(valid_project_text))
    scaled_text = valid_project_text.replace('file = "records/r1.csv"',
                                             'file = "records/r1.csv"\nscale = 2.5')
    scaled = load_project(project_factory(scaled_text, "scaled.toml"))
    a = run_project(base, jobs=1, use_cache=False).response("s1", "r1")
    b = run_project(scaled, jobs=1, use_cache=False).response("s1", "r1")
    # Closed form: a linear system's response is proportional to its excitation.
    assert b.peak_displacement_m == pytest.approx(2.5 * a.peak_displacement_m, rel=1e-9)
