"""Effective properties of a friction pendulum against their definitions."""

from __future__ import annotations

import math

import numpy as np
import pytest

from sdofreport.core.isolation import pendulum_effective_properties
from sdofreport.core.units import G


def test_effective_properties_by_hand():
    # Zayas, Low & Mahin (1990) with the ASCE/SEI 7-16 §17.8.5 definitions (from
    # memory): k_eff = W/R + μW/D, T_eff = 2π√(W/(g k_eff)), β_eff = (2/π) μ/(μ + D/R).
    w, r, mu, d = 1000e3, 2.5, 0.06, 0.2
    e = pendulum_effective_properties(w, r, mu, d)
    k = 1000e3 / 2.5 + 0.06 * 1000e3 / 0.2  # 400 kN/m + 300 kN/m = 700 kN/m
    assert e.stiffness_n_m == pytest.approx(700e3, rel=1e-12) == pytest.approx(k)
    assert e.period_s == pytest.approx(2 * math.pi * math.sqrt(1000e3 / (G * 700e3)))
    assert e.damping == pytest.approx(2 / math.pi * 0.06 / (0.06 + 0.08))


def test_effective_damping_matches_the_loop_area_definition():
    # β_eff = E_loop / (2π k_eff D²) (ASCE/SEI 7-16 §17.8.5.2, from memory, symmetric
    # loop) with E_loop = ∮F du integrated numerically over a rigid-plastic cycle
    # F = (W/R) u + μW sign(u̇), u = D sin ωt.
    w, r, mu, d = 500e3, 1.8, 0.08, 0.15
    t = np.linspace(0.0, 2 * math.pi, 400001)
    u = d * np.sin(t)
    f = w / r * u + mu * w * np.sign(np.cos(t))
    loop = abs(np.sum(0.5 * (f[1:] + f[:-1]) * np.diff(u)))
    k_eff = (f[np.argmax(u)] - f[np.argmin(u)]) / (2 * d)
    e = pendulum_effective_properties(w, r, mu, d)
    assert e.stiffness_n_m == pytest.approx(k_eff, rel=1e-6)
    assert e.damping == pytest.approx(loop / (2 * math.pi * k_eff * d * d), rel=1e-4)


@pytest.mark.parametrize("args", [(0, 2.0, 0.05, 0.1), (1e5, 2.0, -0.1, 0.1),
                                  (1e5, 2.0, 0.05, 0.0)])
def test_bad_inputs_raise(args):
    with pytest.raises(ValueError):
        pendulum_effective_properties(*args)


# ----------------------------------------------------------- bilinear isolators
from sdofreport.core.isolation import (  # noqa: E402
    bilinear_bound_properties,
    bilinear_effective_properties,
    isolated_period,
)


@pytest.mark.parametrize("alpha, lam", [(0.1, 0.8), (0.1, 1.3), (0.0, 1.5), (0.3, 0.6)])
def test_bound_properties_multiply_qd_and_kd(alpha, lam):
    # ASCE/SEI 7-16 §17.2.8.4 (from memory): the factor multiplies the characteristic
    # strength Q_d and the post-yield stiffness k_d. Closed form of the bilinear
    # backbone: on the post-yield branch F(u) = Q_d + k_d u, Q_d = (1 − α) F_y,
    # k_d = α k; the elastic stiffness k is kept (common practice, no source).
    k, fy = 20e6, 80e3
    fy2, alpha2 = bilinear_bound_properties(k, fy, alpha, lam)
    u = np.array([0.05, 0.2, 0.4])  # beyond both yield displacements
    assert u.min() > max(fy / k, fy2 / k)
    np.testing.assert_allclose((1 - alpha2) * fy2 + alpha2 * k * u,
                               lam * ((1 - alpha) * fy + alpha * k * u), rtol=1e-12)


def test_bilinear_effective_properties_match_the_loop():
    # Loop of a symmetric cycle u = D sin ωt integrated numerically (trapezoid) through
    # a bilinear kinematic-hardening spring; k_eff = (F⁺ − F⁻)/(2D) and
    # β_eff = E_loop/(2π k_eff D²) (ASCE/SEI 7-16 §17.8.5, from memory); against
    # Naeim & Kelly (1999): E_loop = 4 Q_d (D − D_y), k_eff = Q_d/D + k_d.
    k, fy, alpha, d, w = 10e6, 60e3, 0.08, 0.25, 2000e3
    t = np.linspace(0.0, 2.5 * math.pi, 500001)  # a quarter to load, then a full cycle
    u = d * np.sin(t)
    f = np.empty_like(u)
    force = 0.0
    for i in range(u.size):  # return map of kinematic hardening (Chopra §5.7 form)
        du = u[i] - (u[i - 1] if i else 0.0)
        trial = force + k * du
        back = alpha * k * u[i]
        bound = (1 - alpha) * fy
        force = back + np.clip(trial - back, -bound, bound)
        f[i] = force
    cycle = t >= 0.5 * math.pi
    uc, fc = u[cycle], f[cycle]
    loop = abs(np.sum(0.5 * (fc[1:] + fc[:-1]) * np.diff(uc)))
    k_eff = (fc[np.argmax(uc)] - fc[np.argmin(uc)]) / (2 * d)
    e = bilinear_effective_properties(w, k, fy, alpha, d)
    assert e.stiffness_n_m == pytest.approx(k_eff, rel=1e-6)
    assert e.damping == pytest.approx(loop / (2 * math.pi * k_eff * d * d), rel=1e-4)
    assert e.period_s == pytest.approx(2 * math.pi * math.sqrt(w / (G * k_eff)), rel=1e-12)
    # Below the yield displacement: elastic, no loop.
    small = bilinear_effective_properties(w, k, fy, alpha, 0.5 * fy / k)
    assert (small.stiffness_n_m, small.damping) == (k, 0.0)


def test_isolated_period_is_the_fixed_point_of_eqs_17_5_1_and_2():
    # ASCE/SEI 7-16 Eq. 17.5-1 D_M = g S_M1 T_M/(4π² B_M) and Eq. 17.5-2
    # T_M = 2π √(W/(k_M g)) (from memory), B_M of Table 17.5-1 (from memory, linear
    # between 5 % → 1.0 and 10 % → 1.2, 10 % → 1.2 and 20 % → 1.5); root found
    # independently with scipy.optimize.brentq.
    from scipy.optimize import brentq

    w, r, mu, sm1 = 1000e3, 2.5, 0.06, 0.9

    def b_m(beta):
        return float(np.interp(beta, [0.02, 0.05, 0.10, 0.20, 0.30, 0.40, 0.50],
                               [0.8, 1.0, 1.2, 1.5, 1.7, 1.9, 2.0]))

    def period(d):
        return 2 * math.pi * math.sqrt(w / (G * (w / r + mu * w / d)))

    def beta(d):
        return 2 / math.pi * mu / (mu + d / r)

    root = brentq(lambda d: d - G * sm1 * period(d) / (4 * math.pi ** 2 * b_m(beta(d))),
                  0.05, 2.0, xtol=1e-14)
    found = isolated_period(lambda d: pendulum_effective_properties(w, r, mu, d),
                            lambda t: sm1 / t, b_m)
    assert found.effective.displacement_m == pytest.approx(root, rel=1e-9)
    assert found.effective.period_s == pytest.approx(period(root), rel=1e-9)
    assert found.damping_coefficient == pytest.approx(b_m(beta(root)), rel=1e-9)
    # Friction the spectrum cannot overcome: no displacement, so no T_M.
    assert isolated_period(lambda d: pendulum_effective_properties(w, r, 0.9, d),
                           lambda t: min(0.05, sm1 / t), b_m) is None


@pytest.mark.parametrize("args", [(20e6, 80e3, 0.5, 2.0), (20e6, -1.0, 0.1, 1.0),
                                  (20e6, 80e3, 0.1, 0.0)])
def test_bad_bound_inputs_raise(args):
    with pytest.raises(ValueError, match="λα < 1"):
        bilinear_bound_properties(*args)
