"""Tests for sdofreport.core.design_spectra: standards' formulas evaluated by hand here."""

from __future__ import annotations

import math

import numpy as np
import pytest

from sdofreport.core.design_spectra import (
    DESIGN_SPECTRUM_KINDS,
    DESIGN_SPECTRUM_PARAMETERS,
    asce7_16_spectrum,
    design_spectrum,
    en1998_1_parameters,
    en1998_1_spectrum,
    table_spectrum,
)

SDS, SD1, TL = 1.0, 0.6, 8.0  # invented site; T0 = 0.12 s, TS = 0.6 s


@pytest.mark.parametrize("period, expected", [
    # Published formula: ASCE/SEI 7-16 Eq. 11.4-5 at T = 0: 0.4 SDS.
    (0.0, 0.4),
    # Published formula: Eq. 11.4-5, SDS (0.4 + 0.6 T/T0) = 0.4 + 0.6 * 0.06/0.12 = 0.7.
    (0.06, 0.7),
    # Published formula: §11.4.6 plateau SDS between T0 = 0.12 and TS = 0.6.
    (0.12, 1.0),
    (0.6, 1.0),
    # Published formula: Eq. 11.4-6, SD1/T = 0.6/1.5 = 0.4.
    (1.5, 0.4),
    # Published formula: Eq. 11.4-6 at T = TL: 0.6/8 = 0.075.
    (8.0, 0.075),
    # Published formula: Eq. 11.4-7, SD1 TL / T² = 0.6 * 8 / 100 = 0.048.
    (10.0, 0.048),
])
def test_asce7_16_hand_values(period, expected):
    # Tolerance: round-off only.
    assert asce7_16_spectrum(period, SDS, SD1, TL) == pytest.approx(expected, rel=1e-12)


def test_asce7_16_mce_is_1_5_design_and_shapes():
    t = np.array([[0.0, 0.3], [2.0, 12.0]])
    design = asce7_16_spectrum(t, SDS, SD1, TL)
    assert design.shape == (2, 2)
    # Published formula: ASCE/SEI 7-16 §11.4.7, MCE_R = 1.5 x design spectrum.
    np.testing.assert_allclose(asce7_16_spectrum(t, SDS, SD1, TL, level="mce"), 1.5 * design,
                               rtol=1e-14)
    assert asce7_16_spectrum([], SDS, SD1, TL).shape == (0,)


def test_asce7_16_continuous_at_corners():
    ts = SD1 / SDS
    for corner in (0.2 * ts, ts, TL):
        below, above = asce7_16_spectrum([corner * (1 - 1e-12), corner * (1 + 1e-12)],
                                         SDS, SD1, TL)
        # Closed form: the branches of §11.4.6 meet at T0, TS and TL.
        assert below == pytest.approx(above, rel=1e-9)


@pytest.mark.parametrize("kwargs, match", [
    ({"sds_g": -1.0}, r"sds_g must be a finite number > 0 \[g\]; got -1.0"),
    ({"sd1_g": "x"}, r"sd1_g must be a number > 0 \[g\]; got 'x'"),
    ({"tl_s": 0.3}, r"tl_s must be >= T_S = sd1_g / sds_g = 0.6 \[s\]; got 0.3"),
    ({"level": "MCE"}, r"level must be one of mce_r, design, mce \[-\]; got 'MCE'"),
])
def test_asce7_16_bad_arguments(kwargs, match):
    args = {"sds_g": SDS, "sd1_g": SD1, "tl_s": TL} | kwargs
    with pytest.raises(ValueError, match=match):
        asce7_16_spectrum(1.0, **args)


def test_negative_and_nan_periods_refused():
    with pytest.raises(ValueError, match=r"periods_s must be finite and >= 0 \[s\]; got -1.0"):
        asce7_16_spectrum([0.5, -1.0], SDS, SD1, TL)
    with pytest.raises(ValueError, match=r"periods_s must be finite and >= 0 \[s\]; got nan"):
        en1998_1_spectrum([np.nan], 0.2, 1.0, "B", 1)


# ---------------------------------------------------------------------------- EN 1998-1
def test_en1998_1_parameters_type1_b():
    p = en1998_1_parameters(0.25, 1.2, "b", 1, damping=0.05)
    # Published formula: EN 1998-1 §3.2.1(3), a_g = γ_I a_gR = 1.2 * 0.25.
    assert p.ag_g == pytest.approx(0.30, rel=1e-14)
    # From memory: EN 1998-1 Table 3.2, ground type B: S 1.2, TB 0.15, TC 0.5, TD 2.0.
    assert (p.soil_factor, p.tb_s, p.tc_s, p.td_s) == (1.2, 0.15, 0.5, 2.0)
    # Published formula: EN 1998-1 Eq. (3.6), η = √(10/(5+5)) = 1 at 5 %.
    assert p.eta == pytest.approx(1.0, rel=1e-14)
    assert p.ag_s_g == pytest.approx(0.36, rel=1e-14)


@pytest.mark.parametrize("damping, expected_eta", [
    # Published formula: EN 1998-1 Eq. (3.6), √(10/(5+2)).
    (0.02, math.sqrt(10 / 7)),
    # Published formula: Eq. (3.6), √(10/25) = 0.632 > 0.55.
    (0.20, math.sqrt(10 / 25)),
    # Published formula: Eq. (3.6) lower limit 0.55 (√(10/35) = 0.535 < 0.55).
    (0.30, 0.55),
])
def test_en1998_1_eta(damping, expected_eta):
    assert en1998_1_parameters(0.2, 1.0, "A", 2, damping).eta == pytest.approx(expected_eta,
                                                                               rel=1e-14)


def test_en1998_1_spectrum_hand_values_type2_d():
    # From memory: EN 1998-1 Table 3.3, ground type D: S 1.8, TB 0.10, TC 0.30, TD 1.2.
    ag, s, tb, tc, td = 0.1, 1.8, 0.10, 0.30, 1.2
    eta = math.sqrt(10 / (5 + 3))  # Eq. (3.6) at ξ = 3 %
    periods = [0.0, 0.05, 0.2, 0.6, 3.0]
    # Published formula: EN 1998-1 Eqs. (3.2)-(3.5) evaluated by hand.
    expected = [ag * s,
                ag * s * (1 + 0.05 / tb * (2.5 * eta - 1)),
                ag * s * 2.5 * eta,
                ag * s * 2.5 * eta * tc / 0.6,
                ag * s * 2.5 * eta * tc * td / 9.0]
    np.testing.assert_allclose(en1998_1_spectrum(periods, 0.1, 1.0, "D", 2, damping=0.03),
                               expected, rtol=1e-13)


@pytest.mark.parametrize("args, match", [
    ((0.2, 1.0, "S1", 1), r"ground_type must be one of A, B, C, D, E \(S1 and S2 need "
                          r"special studies\) \[-\]; got 'S1'"),
    ((0.2, 1.0, "A", 3), r"spectrum_type must be 1 or 2 \[-\]; got 3"),
    ((0.2, 0.0, "A", 1), r"importance_factor must be a finite number > 0 \[-\]; got 0.0"),
    ((0.2, 1.0, "A", 1, 5.0), r"damping must be a ratio in \[0, 1\) \(0.05 for 5 %\) "
                              r"\[-\]; got 5.0"),
])
def test_en1998_1_bad_arguments(args, match):
    with pytest.raises(ValueError, match=match):
        en1998_1_spectrum(1.0, *args)


# ------------------------------------------------------------------------------ table
def test_table_log_log_interpolation_and_ends():
    tp = [0.1, 1.0, 4.0]
    sa = [0.5, 0.2, 0.05]
    # Closed form: log-log line through (0.1, 0.5) and (1.0, 0.2) at T = 0.316...:
    # ln Sa = ln 0.5 + (ln 0.2 − ln 0.5) * (ln T − ln 0.1) / (ln 1 − ln 0.1); midpoint in
    # log T gives √(0.5 * 0.2).
    t_mid = math.sqrt(0.1 * 1.0)
    assert table_spectrum(t_mid, tp, sa) == pytest.approx(math.sqrt(0.1), rel=1e-12)
    # Closed form: power law between 1 and 4 s, Sa = 0.2 (T/1)^(ln(0.25)/ln 4) = 0.2 / T.
    assert table_spectrum(2.0, tp, sa) == pytest.approx(0.1, rel=1e-12)
    # Common practice (no source): constant beyond the table, first value below it.
    np.testing.assert_allclose(table_spectrum([0.0, 0.05, 10.0], tp, sa), [0.5, 0.5, 0.05],
                               rtol=1e-14)


def test_table_with_zero_period_is_linear_below_first_positive_period():
    tp = [0.0, 0.2, 1.0]
    sa = [0.4, 1.0, 0.5]
    # Closed form: linear between (0, 0.4) and (0.2, 1.0): at 0.05 s, 0.4 + 0.6/4.
    np.testing.assert_allclose(table_spectrum([0.0, 0.05, 0.2], tp, sa), [0.4, 0.55, 1.0],
                               rtol=1e-14)


@pytest.mark.parametrize("tp, sa, match", [
    ([0.1, 0.1, 1.0], [1, 1, 1], r"table_periods_s must increase strictly \[s\]"),
    ([0.1, 1.0], [1.0, 0.0], r"table_sa_g must be finite and > 0 \[g\]; got 0.0"),
    ([0.1, 1.0], [1.0], r"must be 1-D lists of the same length; got shapes \(2,\) and \(1,\)"),
    ([0.5], [1.0], r"table_periods_s must hold at least 2 periods \[s\]; got 1"),
])
def test_table_bad_arguments(tp, sa, match):
    with pytest.raises(ValueError, match=match):
        table_spectrum(1.0, tp, sa)


# --------------------------------------------------------------------------- registry
def test_registry_matches_parameters_and_evaluates():
    assert set(DESIGN_SPECTRUM_KINDS) == set(DESIGN_SPECTRUM_PARAMETERS)
    spec = design_spectrum("asce7-16", sds_g=SDS, sd1_g=SD1, tl_s=TL, level="mce")
    # Published formula: ASCE/SEI 7-16 §11.4.6-7, 1.5 * SDS on the plateau.
    assert spec.sa_g(0.3) == pytest.approx(1.5, rel=1e-14)
    en = design_spectrum("en1998-1", agr_g=0.2, importance_factor=1.0, ground_type="A",
                         spectrum_type=1)
    # From memory: EN 1998-1 Table 3.2 type A, S = 1; plateau a_g S 2.5 η = 0.5.
    assert en.sa_g(0.3) == pytest.approx(0.5, rel=1e-14)
    tab = design_spectrum("table", table_periods_s=[0.1, 1.0], table_sa_g=[1.0, 0.1])
    # Closed form: Sa = 0.1 / T between the points (log-log line of slope -1).
    assert tab.sa_g(0.5) == pytest.approx(0.2, rel=1e-12)


@pytest.mark.parametrize("kind, params, match", [
    ("asce7-10", {}, r"kind must be one of asce7-16, asce7-22, en1998-1, en1998-1-1, table; got 'asce7-10'"),
    ("asce7-16", {"sds_g": 1.0, "sd1": 0.6, "tl_s": 8.0},
     r"unknown parameter 'sd1' for design spectrum 'asce7-16' \(did you mean 'sd1_g'\?\)"),
    ("asce7-16", {"sds_g": 1.0}, r"design spectrum 'asce7-16' is missing parameter\(s\) "
                                 r"sd1_g, tl_s"),
    ("en1998-1", {"agr_g": 0.2, "importance_factor": 1.0, "ground_type": "F",
                  "spectrum_type": 1}, r"ground_type must be one of A, B, C, D, E"),
])
def test_design_spectrum_validation(kind, params, match):
    with pytest.raises(ValueError, match=match):
        design_spectrum(kind, **params)
