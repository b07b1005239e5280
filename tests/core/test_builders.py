"""System builders: hand calculations written out beside each expected value."""

from __future__ import annotations

import math

import pytest

from sdofreport.core.builders import (
    END_CONDITIONS,
    Derived,
    columns,
    hanging,
    lumped,
    sliding_pendulum,
    spring_network,
    springs,
    static_deflection,
)

g = 9.80665  # standard gravity, ISO 80000-3 (typed here, not imported from our code)


# ------------------------------------------------------------------------ lumped
def test_lumped_mass_and_stiffness():
    d = lumped(mass_kg=1000.0, stiffness_n_m=4.0e5)
    # Hand calculation: T = 2π √(1000 / 4e5) = 2π × 0.05 = 0.314159 s.
    assert d.period_s == pytest.approx(0.3141593, rel=1e-6)
    assert (d.mass_kg, d.stiffness_n_m) == (1000.0, 4.0e5)
    assert "T = 2π √(m/k)" in d.derivation[0] and "0.3142 s" in d.derivation[0]


def test_lumped_mass_and_period():
    d = lumped(mass_kg=2000.0, natural_period_s=0.5)
    # Hand calculation: k = 4π² × 2000 / 0.25 = 315 827.3 N/m.
    assert d.stiffness_n_m == pytest.approx(315827.34, rel=1e-7)
    assert d.period_s == 0.5


def test_lumped_stiffness_and_period():
    d = lumped(stiffness_n_m=315827.34, natural_period_s=0.5)
    # Hand calculation: m = k T² / 4π² = 315 827.34 × 0.25 / 39.4784 = 2000.0 kg.
    assert d.mass_kg == pytest.approx(2000.0, rel=1e-7)


def test_lumped_period_alone():
    d = lumped(natural_period_s=1.2)
    # Hand calculation: nothing to derive; mass and stiffness unknown.
    assert d == Derived(mass_kg=None, stiffness_n_m=None, period_s=1.2,
                        derivation=d.derivation)
    assert "given" in d.derivation[0]


@pytest.mark.parametrize("kwargs, got", [
    ({}, "got nothing"),
    ({"mass_kg": 1.0}, "got mass_kg$"),
    ({"stiffness_n_m": 1.0}, "got stiffness_n_m$"),
    ({"mass_kg": 1.0, "stiffness_n_m": 1.0, "natural_period_s": 1.0},
     "got mass_kg and stiffness_n_m and natural_period_s"),
])
def test_lumped_refuses_other_combinations(kwargs, got):
    with pytest.raises(ValueError, match=got):
        lumped(**kwargs)


@pytest.mark.parametrize("value", [0.0, -1.0, math.nan, math.inf, "heavy", True])
def test_lumped_refuses_bad_mass(value):
    with pytest.raises(ValueError, match=r"mass_kg must be .*> 0 \[kg\]; got"):
        lumped(mass_kg=value, natural_period_s=1.0)


# ------------------------------------------------------------------------ columns
def test_columns_fixed_fixed():
    d = columns(4, 2.1e11, 8.36e-5, 6.0, "fixed-fixed", 20000.0)
    # Hand calculation: k = 4 × 12 × 2.1e11 × 8.36e-5 / 6³ = 8.42688e8 / 216
    #                     = 3 901 333 N/m;  T = 2π √(20000 / 3 901 333) = 0.44987 s.
    assert d.stiffness_n_m == pytest.approx(3901333.3, rel=1e-7)
    assert d.period_s == pytest.approx(0.449868, rel=1e-5)
    assert d.derivation[0] == (
        "k = n · 12EI/h³ (fixed-fixed) = 4 × 12 × 2.1 × 10¹¹ Pa × 8.36 × 10⁻⁵ m⁴ / (6 m)³ "
        "= 3.901 × 10⁶ N/m"
    )


def test_columns_fixed_pinned_is_a_quarter():
    d = columns(2, 2.0e11, 1.0e-4, 4.0, "fixed-pinned", 5000.0)
    # Hand calculation: k = 2 × 3 × 2e11 × 1e-4 / 64 = 1.875e6 N/m.
    assert d.stiffness_n_m == pytest.approx(1.875e6, rel=1e-12)
    # Closed form: 3EI/h³ is a quarter of 12EI/h³ (standard sway stiffnesses).
    assert END_CONDITIONS["fixed-pinned"] / END_CONDITIONS["fixed-fixed"] == 0.25


@pytest.mark.parametrize("args, match", [
    ((0, 2e11, 1e-4, 4.0, "fixed-fixed", 1.0), r"count must be an integer >= 1 \[-\]; got 0"),
    ((2.5, 2e11, 1e-4, 4.0, "fixed-fixed", 1.0), r"count must be an integer >= 1 \[-\]; got 2.5"),
    ((1, -2e11, 1e-4, 4.0, "fixed-fixed", 1.0),
     r"elastic_modulus_pa must be a finite number > 0 \[Pa\]; got -2"),
    ((1, 2e11, 1e-4, 0.0, "fixed-fixed", 1.0), r"height_m must be a finite number > 0 \[m\]"),
    ((1, 2e11, 1e-4, 4.0, "pinned-pinned", 1.0),
     r"end_condition must be one of fixed-fixed, fixed-pinned; got 'pinned-pinned'"),
])
def test_columns_refuses_bad_input(args, match):
    with pytest.raises(ValueError, match=match):
        columns(*args)


# -------------------------------------------------------------------- spring networks
def test_spring_network_series_of_parallel():
    net = {"series": [{"k": 2.0e7}, {"parallel": [{"k": 1e6}, {"k": 2e6}]}]}
    # Hand calculation: parallel 1e6 + 2e6 = 3e6; series 1/(1/2e7 + 1/3e6)
    #                   = 1/(5e-8 + 3.3333e-7) = 2 608 695.65 N/m.
    assert spring_network(net) == pytest.approx(2608695.652, rel=1e-9)


def test_springs_shows_each_reduction():
    net = {"series": [{"k": 2.0e7}, {"parallel": [{"k": 1e6}, {"k": 2e6}]}]}
    d = springs(net, 1000.0)
    assert d.derivation[0] == (
        "network.series[1]: parallel k = Σkᵢ = 1 × 10⁶ + 2 × 10⁶ = 3 × 10⁶ N/m")
    assert d.derivation[1].startswith(
        "network: series 1/k = Σ1/kᵢ = 1/(2 × 10⁷) + 1/(3 × 10⁶) → k = ")
    # Hand calculation: T = 2π √(1000 / 2 608 695.65) = 2π √(3.83333e-4)
    #                   = 2π × 0.0195789 = 0.123018 s.
    assert d.period_s == pytest.approx(0.123018, rel=1e-5)


def test_single_spring_network():
    d = springs({"k": 4.0e5}, 1000.0)
    # Hand calculation: as test_lumped_mass_and_stiffness, T = 0.314159 s.
    assert d.period_s == pytest.approx(0.3141593, rel=1e-6)


@pytest.mark.parametrize("net, match", [
    ({"series": [{"k": 1.0}, {"parallel": [{"k": -3}]}]},
     r"^network\.series\[1\]\.parallel\[0\]\.k must be > 0 \[N/m\]; got -3$"),
    ({"parallel": [{"k": 0}]}, r"^network\.parallel\[0\]\.k must be > 0 \[N/m\]; got 0$"),
    ({"series": [{"k": math.inf}, {"k": 1.0}]},
     r"^network\.series\[0\]\.k must be finite \[N/m\]; got inf \(an infinitely stiff link"),
    ({"parallel": [{"k": math.inf}]}, r"^network\.parallel\[0\]\.k must be finite"),
    ({"series": []}, r"^network\.series must be a non-empty list of sub-networks; got \[\]"),
    ({"serie": [{"k": 1.0}]}, r"^network: unknown key 'serie' \(did you mean 'series'\?\)"),
    ({"k": 1.0, "series": [{"k": 1.0}]}, r"^network must have exactly one of the keys"),
    ({"parallel": [5.0]}, r"^network\.parallel\[0\] must be a table"),
    ({"k": "stiff"}, r"^network\.k must be a number > 0 \[N/m\]; got 'stiff'"),
    ({"k": math.nan}, r"^network\.k must be a number > 0 \[N/m\]; got nan"),
])
def test_spring_network_errors_name_the_path(net, match):
    with pytest.raises(ValueError, match=match):
        spring_network(net)


# ----------------------------------------------------------------- gravity systems
def test_static_deflection():
    d = static_deflection(50000.0, 0.02)
    # Hand calculation: T = 2π √(0.02 / 9.80665) = 2π × 0.0451602 = 0.283751 s;
    #                   m = 50000 / 9.80665 = 5098.58 kg; k = 50000 / 0.02 = 2.5e6 N/m.
    assert d.period_s == pytest.approx(0.283751, rel=1e-5)
    assert d.mass_kg == pytest.approx(5098.58, rel=1e-6)
    assert d.stiffness_n_m == pytest.approx(2.5e6, rel=1e-12)
    # Closed form: the two routes to T agree, 2π √(m/k) = 2π √(δ/g).
    assert 2 * math.pi * math.sqrt(d.mass_kg / d.stiffness_n_m) == pytest.approx(d.period_s)


def test_sliding_pendulum():
    d = sliding_pendulum(1.0e6, 2.235, 0.05)
    # Hand calculation: T = 2π √(2.235 / 9.80665) = 2π × 0.477399 = 2.99958 s
    # (Zayas, Low & Mahin 1990); m = 1e6/g = 101 971.6 kg; k = W/R = 447 427.3 N/m.
    assert d.period_s == pytest.approx(2.99958, rel=1e-5)
    assert d.mass_kg == pytest.approx(101971.6, rel=1e-6)
    assert d.stiffness_n_m == pytest.approx(447427.3, rel=1e-6)
    assert d.derivation[-1] == "friction force μW = 0.05 × 1 × 10⁶ N = 50000 N"


@pytest.mark.parametrize("mu", [-0.01, 1.0, 1.5, math.nan])
def test_sliding_pendulum_refuses_friction(mu):
    with pytest.raises(ValueError, match=r"^friction must be in \[0, 1\) \[-\]; got"):
        sliding_pendulum(1.0e6, 2.0, mu)


def test_hanging_uniform_rod():
    # A uniform rod of length L = 2 m, mass 3 kg, pivoted at one end:
    # I = m L²/3 = 4 kg·m², d = L/2 = 1 m.
    d = hanging(3.0, 4.0, 1.0)
    # Hand calculation: T = 2π √(4 / (3 × 9.80665 × 1)) = 2π × 0.368729 = 2.31680 s,
    # the same as 2π √(2L/(3g)) for the rod (closed form).
    assert d.period_s == pytest.approx(2 * math.pi * math.sqrt(2 * 2.0 / (3 * g)), rel=1e-12)
    assert d.period_s == pytest.approx(2.31680, rel=1e-5)
    assert d.stiffness_n_m is None and d.mass_kg == 3.0


def test_hanging_point_mass_is_simple_pendulum():
    d = hanging(2.0, 2.0 * 1.5 ** 2, 1.5)
    # Closed form: I = m d² is a simple pendulum, T = 2π √(d/g) = 2.45738 s for d = 1.5 m.
    assert d.period_s == pytest.approx(2 * math.pi * math.sqrt(1.5 / g), rel=1e-12)


def test_hanging_refuses_inertia_below_parallel_axis_bound():
    # Hand calculation: m d² = 3 × 1² = 3 kg·m² > 2.9.
    with pytest.raises(ValueError, match=r"^pivot_inertia_kg_m2 must be >= m d² = 3 kg × "
                                         r"\(1 m\)² = 3 \[kg·m²\] \(parallel-axis theorem\); "
                                         r"got 2\.9$"):
        hanging(3.0, 2.9, 1.0)
