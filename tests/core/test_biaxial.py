"""Two-direction responses (sdofreport.core.biaxial) against independent references."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import signal

from sdofreport.core import hysteresis, nonlinear
from sdofreport.core.biaxial import biaxial_elastic, biaxial_plastic, friction_at
from sdofreport.core.units import G
from sdofreport.engine.jobs import biaxial_job
from tests.core.conftest import enveloped_noise

DT = 0.01


def _pair():
    """Two different seeded noise records [m/s²]."""
    return enveloped_noise(DT, 15.0, seed=3), enveloped_noise(DT, 15.0, seed=4, peak=2.0)


@pytest.mark.parametrize("period", [0.3, 1.0, 2.5])
def test_resultant_peak_is_rotd100(period):
    a1, a2 = _pair()
    zeta = 0.05
    # Independent reference: each direction through scipy.signal.lsim (linear
    # interpolation of the input, as the exact recurrence assumes), then RotD100 as
    # defined by Boore (2010): the largest over angles at 1° steps of the peak |u| of
    # u1 cos θ + u2 sin θ.
    # scipy.signal.lsim on a grid 20 times finer, input linearly interpolated (the
    # forcing the exact recurrence assumes), so peaks between samples are seen.
    wn = 2 * math.pi / period
    system = signal.lti([-1.0], [1.0, 2 * zeta * wn, wn * wn])
    t = np.arange(a1.size) * DT
    fine = np.linspace(0.0, t[-1], 20 * (a1.size - 1) + 1)
    u1 = signal.lsim(system, np.interp(fine, t, a1), fine)[1]
    u2 = signal.lsim(system, np.interp(fine, t, a2), fine)[1]
    theta = np.radians(np.arange(0.0, 180.0, 1.0))[:, None]
    rotd100 = max(np.max(np.abs(u1[::2] * np.cos(th) + u2[::2] * np.sin(th)))
                  for th in theta)
    result = biaxial_elastic(a1, a2, DT, period, zeta)
    # The resultant peak is the maximum over every angle, so it is at least the 1°-grid
    # value and at most that value / cos(0.5°) (the nearest grid angle is within 0.5°);
    # 1e-4 allows for the interpolation between samples.
    assert rotd100 * (1 - 1e-4) <= result.peak_displacement_m
    assert result.peak_displacement_m <= rotd100 / math.cos(math.radians(0.5)) * (1 + 1e-4)
    # Per-direction peaks are the one-direction spectral displacements.
    np.testing.assert_allclose(result.peak_displacement_per_direction_m,
                               [np.max(np.abs(u1)), np.max(np.abs(u2))], rtol=1e-4)


def _pendulum_models(mu=0.06, radius=2.0, weight=1.0e6, **extra):
    return {"model": "sliding-pendulum", "weight_n": weight, "radius_m": radius,
            "friction": mu, "slip_displacement_m": 0.25e-3, "damping": 0.0,
            "period_s": 2 * math.pi * math.sqrt(radius / G), **extra}


@pytest.mark.parametrize("angle_deg", [0.0, 90.0, 35.0])
def test_two_direction_pendulum_under_one_direction_motion_is_the_1d_model(angle_deg):
    # Mokha, Constantinou & Reinhorn (1993): the bidirectional friction force acts along
    # the sliding velocity, so motion along one line gives the one-direction model
    # (sdofreport.core.nonlinear, Zayas et al. 1990), in any direction (isotropy).
    ag = _pair()[0]
    model = _pendulum_models()
    c, s = math.cos(math.radians(angle_deg)), math.sin(math.radians(angle_deg))
    two = biaxial_job(ag * c, ag * s, DT, [model], "exact")[0]["biaxial"]
    one = nonlinear.nonlinear_response(
        ag, DT, nonlinear.sliding_pendulum_model(1.0e6, 2.0, 0.06, 0.25e-3), 0.0,
        substeps=max(1, math.ceil(DT / (model["period_s"] / 100))))
    along = two.displacement_m[0] * c + two.displacement_m[1] * s
    scale = np.max(np.abs(one.displacement_m))
    np.testing.assert_allclose(along, one.displacement_m, rtol=0, atol=1e-9 * scale)
    across = -two.displacement_m[0] * s + two.displacement_m[1] * c
    assert np.max(np.abs(across)) <= 1e-9 * scale
    assert two.peak_displacement_m == pytest.approx(np.max(np.abs(one.displacement_m)),
                                                    rel=1e-9)


def test_two_direction_bilinear_under_one_direction_motion_is_the_1d_model():
    # A circular yield surface cut along one axis is the one-direction
    # elastic–perfectly-plastic element (Simo & Hughes 1998 §2.3 radial return).
    ag = _pair()[1] * 2.0
    k, fy, alpha, m = 4.0e6, 8.0e4, 0.05, 1.0e5
    model = {"model": "bilinear", "stiffness_n_m": k, "yield_strength_n": fy,
             "post_yield_ratio": alpha, "mass_kg": m, "damping": 0.05,
             "period_s": 2 * math.pi * math.sqrt(m / k)}
    two = biaxial_job(np.zeros_like(ag), ag, DT, [model], "exact")[0]["biaxial"]
    one = nonlinear.nonlinear_response(
        ag, DT, nonlinear.bilinear(k, yield_strength_n=fy, hardening_ratio=alpha), 0.05,
        mass_kg=m, substeps=max(1, math.ceil(DT / (model["period_s"] / 100))))
    assert one.ductility > 2  # the record yields the system
    np.testing.assert_allclose(two.displacement_m[1], one.displacement_m, rtol=0,
                               atol=1e-9 * one.peak_displacement_m)
    assert np.max(np.abs(two.displacement_m[0])) == 0.0


def test_circular_surface_caps_the_resultant_force():
    # Elastic–perfectly-plastic with a circular surface of radius F_y (α = 0): the
    # resultant force never exceeds F_y (the definition of the yield surface).
    a1, a2 = _pair()
    k, fy, m = 4.0e6, 5.0e4, 1.0e5
    r = biaxial_plastic(a1 * 2, a2 * 2, DT, mass_kg=m, damping_coefficient=0.0,
                        linear_stiffness_n_m=0.0, element_stiffness_n_m=k,
                        yield_force_n=fy, substeps=4)
    assert r.converged
    assert np.max(np.hypot(*r.force_n)) <= fy * (1 + 1e-12)
    assert r.peak_displacement_m > 3 * fy / k  # it did yield
    # Energy balance of the relative formulation (Uang & Bertero 1990).
    e = r.energy_j
    balance = e["kinetic_j"] + e["damping_j"] + e["strain_j"] + e["hysteretic_j"]
    assert balance == pytest.approx(e["input_j"], rel=1e-6)


def test_velocity_dependent_friction_formula_and_limits():
    # Constantinou, Mokha & Reinhorn (1990): μ = μ_fast − (μ_fast − μ_slow) exp(−a|v|),
    # evaluated here by hand.
    assert friction_at(0.0, 0.10, 0.05, 20.0) == pytest.approx(0.05)
    assert friction_at(0.1, 0.10, 0.05, 20.0) == pytest.approx(
        0.10 - 0.05 * math.exp(-2.0))
    assert friction_at(-0.1, 0.10, 0.05, 20.0) == friction_at(0.1, 0.10, 0.05, 20.0)
    # μ_slow = μ_fast is the constant-friction model.
    a1, a2 = _pair()
    constant = biaxial_job(a1, a2, DT, [_pendulum_models()], "exact")[0]["biaxial"]
    equal = biaxial_job(a1, a2, DT, [_pendulum_models(friction_slow=0.06,
                                                      friction_rate_s_m=30.0)],
                        "exact")[0]["biaxial"]
    np.testing.assert_allclose(equal.displacement_m, constant.displacement_m, rtol=0,
                               atol=1e-12)
    # A lower friction at low speed lets the bearing move more (monotone in μ_slow).
    slower = biaxial_job(a1, a2, DT, [_pendulum_models(friction_slow=0.02,
                                                       friction_rate_s_m=30.0)],
                         "exact")[0]["biaxial"]
    assert slower.peak_displacement_m > constant.peak_displacement_m


def test_stick_damping_matches_the_1d_constant():
    # The two-direction pendulum uses the stick dashpot of the one-direction model.
    assert hysteresis.STICK_DAMPING_RATIO == 0.5
