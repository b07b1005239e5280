"""Vertical design spectra against the standards' formulas and tables, by hand."""

from __future__ import annotations

import math

import numpy as np
import pytest

from sdofreport.core.vertical_spectra import (
    asce7_16_vertical_coefficient,
    asce7_16_vertical_spectrum,
    en1998_1_vertical_spectrum,
)


def test_en1998_vertical_type_1_by_hand():
    # EN 1998-1:2004 §3.2.2.3 Eqs. (3.8)-(3.11), Table 3.4 type 1 (from memory):
    # a_vg = 0.90 a_g, T_B 0.05, T_C 0.15, T_D 1.0; ξ = 5 % so η = 1.
    ag = 0.3
    avg = 0.27
    t = [0.0, 0.025, 0.05, 0.1, 0.15, 0.5, 1.0, 2.0, 4.0]
    expected = [avg, avg * (1 + 0.5 * 2.0), 3 * avg, 3 * avg, 3 * avg, 3 * avg * 0.15 / 0.5,
                3 * avg * 0.15, 3 * avg * 0.15 * 1.0 / 4.0, 3 * avg * 0.15 / 16.0]
    np.testing.assert_allclose(en1998_1_vertical_spectrum(t, ag, 1), expected, rtol=1e-12)


def test_en1998_vertical_type_2_and_damping():
    # Table 3.4 type 2: a_vg = 0.45 a_g (from memory); η = √(10/(5+ξ)) with ξ = 10 %
    # (Eq. 3.6) on the plateau.
    eta = math.sqrt(10 / 15)
    assert en1998_1_vertical_spectrum([0.1], 0.2, 2, damping=0.10)[0] == pytest.approx(
        0.45 * 0.2 * 3.0 * eta, rel=1e-12)
    # η is never below 0.55 (Eq. 3.6).
    assert en1998_1_vertical_spectrum([0.1], 0.2, 1, damping=0.5)[0] == pytest.approx(
        0.9 * 0.2 * 3.0 * 0.55, rel=1e-12)


@pytest.mark.parametrize("sms, site, cv", [
    # ASCE/SEI 7-16 Table 11.9-1 (from memory): rows S_MS ≥ 2.0, 1.0, 0.6, 0.3, ≤ 0.2.
    (2.5, "B", 0.9), (2.0, "C", 1.3), (2.0, "D", 1.5), (1.0, "C", 1.1), (1.0, "E", 1.3),
    (0.6, "A", 0.9), (0.6, "F", 1.1), (0.3, "D", 0.9), (0.1, "C", 0.7),
    (0.8, "D", (1.1 + 1.3) / 2),  # linear between the rows 0.6 and 1.0
])
def test_asce_vertical_coefficient_table(sms, site, cv):
    assert asce7_16_vertical_coefficient(sms, site) == pytest.approx(cv, rel=1e-12)


def test_asce_vertical_spectrum_by_hand():
    # ASCE/SEI 7-16 Eqs. 11.9-1 to 11.9-4 (from memory), S_MS = 1.5, site D:
    # C_v = 1.4 (between 1.3 at 1.0 and 1.5 at 2.0), so C_v S_MS = 2.1.
    a = 1.4 * 1.5
    t = [0.01, 0.04, 0.1, 0.15, 1.0, 2.0, 2.5]
    expected = [0.3 * a, 20 * a * 0.015 + 0.3 * a, 0.8 * a, 0.8 * a,
                0.8 * a * 0.15 ** 0.75, 0.8 * a * 0.075 ** 0.75, np.nan]
    np.testing.assert_allclose(asce7_16_vertical_spectrum(t, 1.5, "D"), expected,
                               rtol=1e-12)
    np.testing.assert_allclose(asce7_16_vertical_spectrum(t[:-1], 1.5, "D", "design"),
                               np.array(expected[:-1]) * 2 / 3, rtol=1e-12)


@pytest.mark.parametrize("call", [
    lambda: en1998_1_vertical_spectrum([0.1], 0.3, 3),
    lambda: en1998_1_vertical_spectrum([-0.1], 0.3, 1),
    lambda: asce7_16_vertical_coefficient(1.0, "G"),
    lambda: asce7_16_vertical_spectrum([0.1], 1.0, "D", "service"),
])
def test_bad_inputs_raise(call):
    with pytest.raises(ValueError):
        call()
