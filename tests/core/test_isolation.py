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
