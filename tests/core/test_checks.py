"""The shared argument checks of sdofreport.core._checks.

Source of the expected texts: STYLE.md §5 ("name the parameter, the value, the unit and
what is allowed", e.g. ``natural_period must be > 0 [s]; got -0.2``); each case pins
one message. The accepted values are plain arithmetic (no source needed).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from sdofreport.core import _checks


@pytest.mark.parametrize("value, match", [
    (0.0, r"^mass_kg must be a finite number > 0 \[kg\]; got 0.0$"),
    (-2, r"^mass_kg must be a finite number > 0 \[kg\]; got -2$"),
    (math.inf, r"^mass_kg must be a finite number > 0 \[kg\]; got inf$"),
    (math.nan, r"^mass_kg must be a finite number > 0 \[kg\]; got nan$"),
    ("heavy", r"^mass_kg must be a number > 0 \[kg\]; got 'heavy'$"),
    (True, r"^mass_kg must be a number > 0 \[kg\]; got True$"),
])
def test_positive_refuses(value, match):
    with pytest.raises(ValueError, match=match):
        _checks.positive(value, "mass_kg", "kg")


def test_positive_and_nonnegative_accept():
    assert _checks.positive("2.5", "mass_kg", "kg") == 2.5
    assert _checks.nonnegative(0, "gravity_stiffness_n_m", "N/m") == 0.0
    with pytest.raises(ValueError, match=r"^gravity_stiffness_n_m must be a finite number "
                                         r">= 0 \[N/m\]; got -1.0$"):
        _checks.nonnegative(-1.0, "gravity_stiffness_n_m", "N/m")


@pytest.mark.parametrize("value, match", [
    (1.0, r"^damping_ratio must be in \[0, 1\) \[-\]; got 1.0 \(a percentage"),
    (-0.01, r"^damping_ratio must be in \[0, 1\) \[-\]; got -0.01$"),
    (5, r"^damping_ratio must be in \[0, 1\) \[-\]; got 5 \(a percentage\? use 0.05 for 5 %\)$"),
    (math.nan, r"^damping_ratio must be in \[0, 1\) \[-\]; got nan$"),
    (math.inf, r"^damping_ratio must be in \[0, 1\) \[-\]; got inf$"),
    ("five", r"^damping_ratio must be a number in \[0, 1\) \[-\]; got 'five'$"),
])
def test_damping_ratio_refuses(value, match):
    with pytest.raises(ValueError, match=match):
        _checks.damping_ratio(value)


def test_ratios_accept_the_closed_end_only():
    assert _checks.damping_ratio(0.0) == 0.0
    assert _checks.ratio(0.99, "hardening_ratio") == 0.99
    with pytest.raises(ValueError, match=r"^hardening_ratio must be in \[0, 1\) \[-\]; got 1$"):
        _checks.ratio(1, "hardening_ratio")
    # Open at both ends: (0, 1).
    with pytest.raises(ValueError, match=r"^eps must be in \(0, 1\) \[-\]; got 0.0$"):
        _checks.in_range(0.0, "eps", "-", 0.0, 1.0, low_open=True)
    # Closed at the top: (0, 2].
    assert _checks.in_range(2.0, "exponent", "-", 0.0, 2.0, low_open=True,
                            high_open=False) == 2.0
    with pytest.raises(ValueError, match=r"^exponent must be in \(0, 2\] \[-\]; got 2.5$"):
        _checks.in_range(2.5, "exponent", "-", 0.0, 2.0, low_open=True, high_open=False)


@pytest.mark.parametrize("value", [0, 1.5, 4.0, True, "3", None])
def test_integer_refuses(value):
    with pytest.raises(ValueError,
                       match=rf"^substeps must be an integer >= 1 \[-\]; got {value!r}$"):
        _checks.integer(value, "substeps", 1)


def test_integer_accepts_numpy_integers():
    assert _checks.integer(np.int64(3), "substeps", 1) == 3


def test_one_of():
    assert _checks.one_of("exact", "method", ("exact", "newmark-average")) == "exact"
    with pytest.raises(ValueError,
                       match=r"^method must be one of exact, newmark-average; got 'rk4'$"):
        _checks.one_of("rk4", "method", ("exact", "newmark-average"))
    with pytest.raises(ValueError, match=r"^level must be one of design, mce_r \[-\]; got 3$"):
        _checks.one_of(3, "level", ("design", "mce_r"), unit="-")


@pytest.mark.parametrize("value, match", [
    ((1.0, 0.5), r"^period_range_s must satisfy 0 < lower < upper \[s\]; got \(1.0, 0.5\)$"),
    ((0.0, 1.0), r"^period_range_s must satisfy 0 < lower < upper \[s\]"),
    ((0.1,), r"^period_range_s must be a pair \(lower, upper\) \[s\]; got \(0.1,\)$"),
    ("ab", r"^period_range_s must be a pair \(lower, upper\) \[s\]; got 'ab'$"),
])
def test_period_pair_refuses(value, match):
    with pytest.raises(ValueError, match=match):
        _checks.period_pair(value, "period_range_s")


def test_time_step():
    assert _checks.time_step(0.01) == 0.01
    with pytest.raises(ValueError, match=r"^time_step_s must be a finite number > 0 \[s\]; "
                                         r"got -0.01$"):
        _checks.time_step(-0.01)
    with pytest.raises(ValueError, match=r"^dt_sub must be a finite number > 0 \[s\]"):
        _checks.time_step(0.0, "dt_sub")


@pytest.mark.parametrize("value, match", [
    ([0.0], r"^acceleration_m_s2 must have at least 2 samples \[m/s²\]; got 1$"),
    ([0.0, math.inf, 1.0], r"^acceleration_m_s2 must be finite \[m/s²\]; got inf at sample 1$"),
    (np.zeros((2, 3)),
     r"^acceleration_m_s2 must be 1-D \[m/s²\]; got an array of shape \(2, 3\)$"),
    ([0.0, "x"], r"^acceleration_m_s2 must be a 1-D array of numbers \[m/s²\]; got list$"),
])
def test_acceleration_history_refuses(value, match):
    with pytest.raises(ValueError, match=match):
        _checks.acceleration_history(value)


def test_acceleration_history_is_a_read_only_float_view():
    ag = _checks.acceleration_history([0, 1, 2])
    assert ag.dtype == np.float64 and not ag.flags.writeable
    np.testing.assert_array_equal(ag, [0.0, 1.0, 2.0])


def test_same_length():
    a = np.zeros(3)
    _checks.same_length(a, np.ones(3), ("acceleration_1_m_s2", "acceleration_2_m_s2"), "m/s²")
    with pytest.raises(ValueError, match=r"^acceleration_1_m_s2 and acceleration_2_m_s2 must "
                                         r"have the same length \[m/s²\]; got 3 and 4 samples$"):
        _checks.same_length(a, np.ones(4), ("acceleration_1_m_s2", "acceleration_2_m_s2"),
                            "m/s²")


@pytest.mark.parametrize("value, strict, match", [
    ([0.5, -1.0], True, r"^periods_s must be finite and > 0 \[s\]; got -1.0$"),
    ([0.0], True, r"^periods_s must be finite and > 0 \[s\]; got 0.0$"),
    ([np.nan], False, r"^periods_s must be finite and >= 0 \[s\]; got nan$"),
    ([], True, r"^periods_s must be a non-empty 1-D list \[s\]; got shape \(0,\)$"),
    ("x", True, r"^periods_s must be numbers \[s\]; got 'x'$"),
])
def test_values_above_refuses(value, strict, match):
    with pytest.raises(ValueError, match=match):
        _checks.values_above(value, "periods_s", "s", 0.0, strict=strict)


def test_values_above_accepts_a_scalar():
    np.testing.assert_array_equal(_checks.values_above(0.5, "periods_s", "s", 0.0), [0.5])


@pytest.mark.parametrize("periods, ratios, match", [
    ([], 0.05, r"^natural_periods_s must hold at least one period \[s\]; got none$"),
    ([-0.2], 0.05, r"^natural_periods_s must be finite and >= 0 \[s\]; got -0.2$"),
    ([0.5], 1.0, (r"^damping_ratios must be in \[0, 1\) \[-\] \(critical and over-damped "
                  r"systems are not supported\); got 1.0 \(a percentage\? use 0.05 for 5 %\)$")),
    ([0.5, 1.0], [0.02, 0.05, 0.1], (r"^natural_periods_s \(shape \(2,\)\) and damping_ratios "
                                     r"\(shape \(3,\)\) must broadcast")),
])
def test_oscillators_refuse(periods, ratios, match):
    with pytest.raises(ValueError, match=match):
        _checks.oscillators(periods, ratios)


def test_oscillators_broadcast_and_name_one_period():
    t, z = _checks.oscillators([0.2, 0.5], 0.05)
    # numpy broadcasting: the scalar ratio goes with every period.
    np.testing.assert_array_equal(t, [0.2, 0.5])
    np.testing.assert_array_equal(z, [0.05, 0.05])
    with pytest.raises(ValueError, match=r"^natural_period_s must be finite and > 0 \[s\]"):
        _checks.oscillators(0.0, 0.05, allow_zero_period=False,
                            periods_name="natural_period_s")
