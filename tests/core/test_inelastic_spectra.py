"""Inelastic spectra: R–μ–T rules, elastic limits, the largest-strength choice, inputs."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from scipy import signal

from sdofreport.core.inelastic_spectra import (
    ConstantDuctilitySpectrum,
    constant_ductility_spectrum,
    constant_strength_spectrum,
)
from sdofreport.core.spectra import response_spectrum
from sdofreport.core.stochastic import kanai_tajimi_accelerogram
from sdofreport.records.readers import read_record

from .conftest import enveloped_noise

SHORT = np.array([0.1, 0.2, 0.3, 0.5])
LONG = np.array([1.0, 1.5, 2.0, 3.0])
TARGETS = np.array([2.0, 4.0, 6.0])


@pytest.fixture(scope="module")
def suite():
    """Five seeded Kanai–Tajimi records (f_g = 2.5 Hz, so a predominant period ~0.4 s)."""
    dt = 0.01
    records = [kanai_tajimi_accelerogram(20.0, dt, seed=seed, target_pga_m_s2=3.0,
                                         high_pass_hz=0.2) for seed in range(5)]
    periods = np.concatenate([SHORT, LONG])
    spectra = [constant_ductility_spectrum(ag, dt, periods, 0.05, TARGETS, workers=2)
               for ag in records]
    return records, dt, periods, spectra


def test_equal_displacement_at_long_periods(suite):
    _, _, periods, spectra = suite
    r = np.mean([s.strength_reduction_factor for s in spectra], axis=0)
    long = np.isin(periods, LONG)
    ratio = np.mean(r[:, long], axis=1) / TARGETS
    # Published rule: equal displacement, R ≈ μ for periods well beyond the predominant
    # period (Veletsos & Newmark 1960; Newmark & Hall 1982). Common practice (no source):
    # a suite mean within ±25 % for five records.
    np.testing.assert_allclose(ratio, 1.0, atol=0.25)


def test_equal_energy_at_short_periods(suite):
    _, _, periods, spectra = suite
    r = np.mean([s.strength_reduction_factor for s in spectra], axis=0)
    short = np.isin(periods, SHORT)
    ratio = np.mean(r[:, short], axis=1) / np.sqrt(2.0 * TARGETS - 1.0)
    # Published rule: equal energy, R ≈ √(2μ − 1) at short-to-moderate periods
    # (Veletsos & Newmark 1960; Newmark & Hall 1982). Common practice (no source): a suite
    # mean within ±35 % (the rule is a broad trend over 0.1-0.5 s).
    np.testing.assert_allclose(ratio, 1.0, atol=0.35)
    # Published trend (same sources): at short periods R falls clearly below μ for
    # the larger ductilities.
    assert np.all(np.mean(r[1:, short], axis=1) < 0.85 * TARGETS[1:])


def test_achieved_ductility_meets_target(suite):
    _, _, _, spectra = suite
    for s in spectra:
        assert isinstance(s, ConstantDuctilitySpectrum)
        # Hand calculation: the bisection keeps the side reaching the target (μ >= target);
        # with η resolved to 0.1 %, μ rises at most a few times that (common practice,
        # no source: allow 2 %).
        assert np.all(s.achieved_ductility >= TARGETS[:, None] * (1 - 1e-12))
        assert np.all(s.achieved_ductility <= TARGETS[:, None] * 1.02)
        # Closed form: R = 1/η and Fy/m = η Fe/m by definition.
        np.testing.assert_allclose(s.strength_reduction_factor * s.normalized_strength, 1.0)
        np.testing.assert_allclose(s.strength_over_pga * s.pga_m_s2, s.yield_strength_m_s2)


def test_reported_strength_is_the_largest(suite):
    records, dt, periods, spectra = suite
    ag, s = records[0], spectra[0]
    j = [0, 3, 5]
    for row, target in enumerate(TARGETS):
        # Every stronger system (R from 1 up to just below the reported R, 80 values)
        # stays below the target: common practice (no source) picks the largest strength
        # when several reach the target.
        r_found = s.strength_reduction_factor[row, j]
        factors = np.linspace(0.0, 1.0, 80)[:, None] * (r_found / 1.003 - 1.0) + 1.0
        for n, jj in enumerate(j):
            cs = constant_strength_spectrum(ag, dt, periods[jj:jj + 1], 0.05, factors[:, n])
            assert np.all(cs.ductility[:, 0] < target)


def test_strength_one_is_elastic():
    ag, dt = enveloped_noise(0.01, seed=12), 0.01
    periods = np.array([0.15, 0.8, 2.5])
    cs = constant_strength_spectrum(ag, dt, periods, 0.05, [1.0, 0.5, 3.0])
    # Closed form: with Fy = Fe (R = 1) the system reaches yield only at its elastic peak,
    # so μ = SD/u_y = 1; a stronger system (R < 1, u_y = SD/R) reaches μ = R (elastic).
    np.testing.assert_allclose(cs.ductility[0], 1.0, rtol=1e-9)
    np.testing.assert_allclose(cs.ductility[1], 0.5, rtol=1e-9)
    assert np.all(cs.ductility[2] > 1.0) and cs.converged.all()
    cd = constant_ductility_spectrum(ag, dt, periods, 0.05, [1.0])
    # Closed form: a ductility target of 1 is met by the elastic strength, R = 1.
    np.testing.assert_allclose(cd.strength_reduction_factor, 1.0)


ELASTIC_RECORDS = [(dt, kind, seed) for dt in (0.005, 0.01, 0.02) for kind, seed in
                   (("kanai-tajimi", 1), ("noise", 2))]


def _record(dt, kind, seed):
    if kind == "kanai-tajimi":
        return kanai_tajimi_accelerogram(10.0, dt, seed=seed, target_pga_m_s2=3.0,
                                          high_pass_hz=0.2, ground_frequency_hz=4.0)
    return enveloped_noise(dt, duration=10.0, seed=seed)


@pytest.mark.parametrize("dt, kind, seed", ELASTIC_RECORDS)
@pytest.mark.parametrize("zeta", [0.0, 0.02, 0.05])
def test_elastic_force_at_defaults_is_within_half_a_percent(dt, kind, seed, zeta):
    ag = _record(dt, kind, seed)
    periods = np.geomspace(0.03, 5.0, 24)
    ref = response_spectrum(ag, dt, periods, zeta, method="exact",
                            steps_per_period=256).psa_m_s2[0]
    # The defect (issue 14, part 6): the former integrator, Newmark average acceleration
    # at 20 steps per period, is up to several percent off the exact elastic spectrum on
    # these records (period elongation (πh/T)²/3 ≈ 0.8 % [Newmark 1959] accumulating
    # over the record, plus peaks sampled at the steps).
    old = response_spectrum(ag, dt, periods, zeta, method="newmark-average",
                            steps_per_period=20).psa_m_s2[0]
    assert np.max(np.abs(old / ref - 1.0)) > 5e-3
    cs = constant_strength_spectrum(ag, dt, periods, zeta, [2.0])
    # Independent reference: the exact piecewise-linear recurrence (Nigam & Jennings
    # 1969) with Hermite-refined peaks at 256 steps per period. Stated accuracy
    # (docs/methods.md): 0.5 %; the exact integration of the kernel in fact agrees to
    # about 1e-8.
    np.testing.assert_allclose(cs.elastic_force_m_s2, ref, rtol=5e-3)
    np.testing.assert_allclose(cs.elastic_force_m_s2, ref, rtol=1e-6)
    cd = constant_ductility_spectrum(ag, dt, periods[::6], zeta, [2.0])
    np.testing.assert_allclose(cd.elastic_force_m_s2, ref[::6], rtol=1e-6)


STORED_RECORDS = sorted((Path(__file__).resolve().parents[1] / "data" / "records").iterdir())


@pytest.mark.parametrize("path", STORED_RECORDS, ids=lambda p: p.name)
def test_elastic_force_on_every_stored_record(path):
    # tests/data/records (SOURCES.md): the stored record files, hand-made 20-sample
    # records; values_only.txt carries no time step, so 0.01 s is given.
    record = read_record(path, dt_s=0.01 if path.name == "values_only.txt" else None)
    ag, dt = record.acceleration_m_s2, record.dt_s
    periods = np.geomspace(0.05, 2.0, 8)
    ref = response_spectrum(ag, dt, periods, 0.05, method="exact",
                            steps_per_period=256).psa_m_s2[0]
    cs = constant_strength_spectrum(ag, dt, periods, 0.05, [2.0])
    # Independent reference: the exact recurrence (Nigam & Jennings 1969), refined
    # peaks; stated accuracy 0.5 % (docs/methods.md), met here to 1e-6.
    np.testing.assert_allclose(cs.elastic_force_m_s2, ref, rtol=1e-6)


def test_elastic_force_matches_lsim():
    ag, dt = _record(0.01, "noise", 3), 0.01
    periods = np.array([0.1, 0.4, 1.5])
    cd = constant_ductility_spectrum(ag, dt, periods, 0.05, [3.0])
    for period, fe in zip(periods, cd.elastic_force_m_s2):
        w = 2 * np.pi / period
        sys_ = signal.StateSpace([[0.0, 1.0], [-w * w, -0.1 * w]], [[0.0], [-1.0]],
                                 [[1.0, 0.0]], [[0.0]])
        t = np.arange(ag.size) * dt
        t_fine = np.linspace(0.0, t[-1], (ag.size - 1) * 32 + 1)
        _, u, _ = signal.lsim(sys_, np.interp(t_fine, t, ag), t_fine)
        # Independent reference: scipy.signal.lsim, exact for linearly interpolated
        # input, sampled at dt/32 (sampled peak low by at most 1 − cos(π dt/(32 T)),
        # 1.2e-4 at T = 0.1 s); stated accuracy 0.5 % (docs/methods.md).
        assert fe == pytest.approx(w * w * np.max(np.abs(u)), rel=2e-4)


def test_narrow_window_above_the_coarse_scan_is_found():
    # A Kanai–Tajimi record (Kanai 1957, Tajimi 1960; seed 5, f_g = 4 Hz) on which a
    # system of T ≈ 0.172 s exceeds μ = 2 only for η = Fy/Fe in about 0.439–0.457 and
    # again below 0.33: found by scanning such records for the defect of issue 14.
    ag, dt = kanai_tajimi_accelerogram(15.0, 0.01, seed=5, target_pga_m_s2=3.0,
                                       high_pass_hz=0.2, ground_frequency_hz=4.0), 0.01
    period = 0.1 * 20.0 ** (2.0 / 11.0)
    target = 2.0
    found = constant_ductility_spectrum(ag, dt, [period], 0.05, [target])
    eta = float(found.normalized_strength[0, 0])
    # The defect: the former search stepped η down by 0.9 from 1 and took the first point
    # reaching the target; on this record that point and the one before it (its bracket)
    # lie well below the true largest strength (Chopra, Dynamics of Structures, 5th ed.,
    # sec. 7.5: the largest strength whose ductility equals the target).
    grid = 0.9 ** np.arange(1, 30)
    mu_grid = constant_strength_spectrum(ag, dt, [period], 0.05, 1.0 / grid).ductility[:, 0]
    first = int(np.argmax(mu_grid >= target))
    assert grid[first - 1] < 0.8 * eta
    # The fix, checked against the definition on a dense grid (spacing 0.1 %): the
    # reported strength reaches the target, and every stronger system stays below it.
    assert found.achieved_ductility[0, 0] >= target
    stronger = np.geomspace(eta * 1.001, 1.0, 800)
    mu = constant_strength_spectrum(ag, dt, [period], 0.05, 1.0 / stronger).ductility[:, 0]
    assert np.all(mu < target)
    # Hand calculation from the dense grid: the window's upper edge is near 0.457.
    assert eta == pytest.approx(0.457, abs=2e-3)


def test_threads_do_not_change_results():
    ag, dt = enveloped_noise(0.01, seed=14), 0.01
    periods = np.array([0.1, 0.4, 1.0, 2.0, 3.0])
    one = constant_ductility_spectrum(ag, dt, periods, 0.05, [3.0, 2.0], 0.03, workers=1)
    two = constant_ductility_spectrum(ag, dt, periods, 0.05, [3.0, 2.0], 0.03, workers=2)
    # Common practice (no source): parallel runs must be bit-for-bit reproducible.
    np.testing.assert_array_equal(one.normalized_strength, two.normalized_strength)
    # Hand calculation: results come back in the order the targets were given, and a
    # larger ductility needs a smaller strength at each period here.
    assert np.all(one.normalized_strength[0] < one.normalized_strength[1])


@pytest.mark.parametrize("kwargs, match", [
    ({"target_ductilities": [0.5]},
     r"^target_ductilities must be finite and >= 1 \[-\]; got 0.5$"),
    ({"hardening_ratio": 1.0}, r"^hardening_ratio must be in \[0, 1\) \[-\]; got 1.0$"),
    ({"damping_ratio": 5.0}, r"damping_ratio must be in \[0, 1\) \[-\]; got 5.0 \(a percentage"),
    ({"periods_s": [0.5, -1.0]}, r"^periods_s must be finite and > 0 \[s\]; got -1.0$"),
    ({"strength_tolerance": 0.5}, r"^strength_tolerance must be in \(0, 0.1\] \[-\]; got 0.5$"),
    ({"workers": 0}, r"^workers must be an integer >= 1 \[-\]; got 0$"),
    ({"steps_per_period": 2}, r"^steps_per_period must be finite and >= 4 \[-\]; got 2$"),
    ({"scan_ratio": 0.99999999 + 1}, r"^scan_ratio must be in \[0.5, 1\) \[-\]; got 1.99"),
])
def test_constant_ductility_refuses(kwargs, match):
    args = {"acceleration_m_s2": np.ones(10), "time_step_s": 0.01, "periods_s": [0.5],
            "damping_ratio": 0.05, "target_ductilities": [2.0]}
    args.update(kwargs)
    with pytest.raises(ValueError, match=match):
        constant_ductility_spectrum(**args)


def test_constant_strength_refuses():
    with pytest.raises(ValueError, match=r"^strength_reduction_factors must be finite and "
                                         r"> 0 \[-\]; got 0.0$"):
        constant_strength_spectrum(np.ones(10), 0.01, [0.5], 0.05, [2.0, 0.0])
