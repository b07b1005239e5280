"""Two-direction Bouc–Wen, peak-oriented and flag-shaped systems, vector dampers and
hanging items (sdofreport.core.biaxial) against independent references."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from sdofreport.core import hysteresis, nonlinear
from sdofreport.core.rotd import rotated_peaks
from sdofreport.core.spectra import oscillator_histories
from sdofreport.core.units import G
from sdofreport.engine.jobs import biaxial_job, pair_stripe_job
from tests.core.conftest import enveloped_noise

DT = 0.01
K, FY, ALPHA, M = 4.0e6, 8.0e4, 0.05, 1.0e5


def _pair():
    """Two different seeded noise records [m/s²], strong enough to yield the system."""
    return (enveloped_noise(DT, 15.0, seed=3, peak=5.0),
            enveloped_noise(DT, 15.0, seed=4, peak=4.0))


def _model(name, damper=None, **parameters):
    return {"model": name, "stiffness_n_m": K, "yield_strength_n": FY,
            "post_yield_ratio": ALPHA, "mass_kg": M, "damping": 0.05,
            "period_s": 2 * math.pi * math.sqrt(M / K), "parameters": parameters,
            "damper": damper}


def _one_direction(name, ag, damper=None, **parameters):
    d = None if damper is None else hysteresis.damper(damper["coefficient"],
                                                       damper["exponent"])
    return nonlinear.nonlinear_response(
        ag, DT, hysteresis.hysteresis(name, K, FY, ALPHA, **parameters), 0.05, mass_kg=M,
        substeps=max(1, math.ceil(DT / (2 * math.pi * math.sqrt(M / K) / 100))), damper=d)


MODELS = [("bouc-wen", {}), ("bouc-wen", {"bouc_wen_exponent": 10.0, "bouc_wen_beta": 0.8}),
          ("clough", {}), ("takeda", {"deterioration_capacity": 50.0}),
          ("flag-shaped", {"dissipation_ratio": 0.5})]


@pytest.mark.parametrize("name, parameters", MODELS)
@pytest.mark.parametrize("axis", [0, 1])
def test_one_direction_motion_along_an_axis_is_the_1d_model(name, parameters, axis):
    # Bouc–Wen: the Park, Wen & Ang (1986) equations with u̇_y = z_y = 0 are Wen's (1976)
    # one-direction law, so z_y stays 0 and z_x follows it. Clough, takeda and
    # flag-shaped: one independent spring per direction (common practice (no source)
    # for uncoupled orthogonal frames), so the other spring never moves. Both runs
    # solve the same discrete equations: agreement to round-off (1e-10 of the peak).
    ag = _pair()[0]
    pair = [np.zeros_like(ag), np.zeros_like(ag)]
    pair[axis] = ag
    two = biaxial_job(*pair, DT, [_model(name, **parameters)], "exact")[0]["biaxial"]
    one = _one_direction(name, ag, **parameters)
    assert one.ductility > 2  # the record yields the system
    np.testing.assert_allclose(two.displacement_m[axis], one.displacement_m, rtol=0,
                               atol=1e-10 * one.peak_displacement_m)
    assert np.max(np.abs(two.displacement_m[1 - axis])) == 0.0
    assert two.converged


@pytest.mark.parametrize("name, parameters", MODELS)
def test_energy_balance_under_a_pair(name, parameters):
    # Uang & Bertero (1990): input = kinetic + damping + strain + hysteretic; the
    # trapezoidal sums of Newmark average acceleration balance to the residual
    # tolerance (1e-6 relative: tolerance 1e-8 of the ground force over the record).
    a1, a2 = _pair()
    r = biaxial_job(a1, a2, DT, [_model(name, **parameters)], "exact")[0]["biaxial"]
    e = r.energy_j
    total = e["kinetic_j"] + e["damping_j"] + e["strain_j"] + e["hysteretic_j"]
    assert total == pytest.approx(e["input_j"], rel=1e-6)
    assert e["hysteretic_j"] > 0.1 * e["input_j"]  # it did yield in both directions
    assert min(r.peak_displacement_per_direction_m) > FY / K


@pytest.mark.parametrize("n, beta", [(2.0, 0.5), (10.0, 0.8)])
def test_bouc_wen_hysteretic_force_stays_inside_its_circle(n, beta):
    # Park, Wen & Ang (1986) with A = 1, γ = 1 − β: on |z| = 1, d|z|²/dt =
    # 2β[z·u̇ − (|u̇_x z_x| + |u̇_y z_y|)]/u_y <= 0, so |z| <= 1 and the hysteretic part
    # of the force, F − a k u = (1 − a) F_y z, stays within (1 − a) F_y (derived from the
    # published equations; 1e-6 allows for the backward-Euler steps).
    a1, a2 = _pair()
    r = biaxial_job(a1, a2, DT, [_model("bouc-wen", bouc_wen_exponent=n,
                                        bouc_wen_beta=beta)], "exact")[0]["biaxial"]
    hysteretic = r.force_n - ALPHA * K * r.displacement_m
    assert np.max(np.hypot(*hysteretic)) <= (1 - ALPHA) * FY * (1 + 1e-6)
    assert np.max(np.hypot(*hysteretic)) > 0.9 * (1 - ALPHA) * FY


@pytest.mark.parametrize("name", ["elastic", "bilinear", "bouc-wen", "sliding-pendulum"])
def test_vector_damper_under_one_direction_motion_is_the_1d_damper(name):
    # F_d = C |v|^α v/|v| (force along the velocity, magnitude C|v|^α): along a line it
    # is the one-direction damper C|v|^α sign(v) (Constantinou & Symans 1992). The
    # elastic, circular and sliding systems are isotropic, so any direction of motion
    # gives the one-direction run (35° here); Bouc–Wen of Park, Wen & Ang only along an
    # axis (0° here).
    ag = _pair()[1]
    damper = {"coefficient": 3.0e5, "exponent": 0.4}
    angle = 0.0 if name == "bouc-wen" else math.radians(35.0)
    c, s = math.cos(angle), math.sin(angle)
    if name == "sliding-pendulum":
        model = {"model": name, "weight_n": 1.0e6, "radius_m": 2.0, "friction": 0.05,
                 "slip_displacement_m": 0.25e-3, "damping": 0.0,
                 "period_s": 2 * math.pi * math.sqrt(2.0 / G), "damper": damper}
        one = nonlinear.nonlinear_response(
            ag, DT, nonlinear.sliding_pendulum_model(1.0e6, 2.0, 0.05, 0.25e-3), 0.0,
            substeps=max(1, math.ceil(DT / (model["period_s"] / 100))),
            damper=hysteresis.damper(3.0e5, 0.4))
    elif name == "elastic":
        model = {"model": "elastic", "stiffness_n_m": K, "mass_kg": M, "damping": 0.05,
                 "period_s": 2 * math.pi * math.sqrt(M / K), "damper": damper}
        one = nonlinear.nonlinear_response(
            ag, DT, nonlinear.bilinear(K, yield_strength_n=np.inf), 0.05, mass_kg=M,
            substeps=max(1, math.ceil(DT / (model["period_s"] / 100))),
            damper=hysteresis.damper(3.0e5, 0.4))
    else:
        model = _model(name, damper)
        one = _one_direction(name, ag, damper)
    two = biaxial_job(ag * c, ag * s, DT, [model], "exact")[0]["biaxial"]
    scale = one.peak_displacement_m
    along = two.displacement_m[0] * c + two.displacement_m[1] * s
    np.testing.assert_allclose(along, one.displacement_m, rtol=0, atol=1e-9 * scale)
    across = -two.displacement_m[0] * s + two.displacement_m[1] * c
    assert np.max(np.abs(across)) <= 1e-9 * scale
    assert two.peak_damper_force_n == pytest.approx(one.peak_damper_force_n, rel=1e-8)
    assert two.energy_j["damper_j"] == pytest.approx(one.damper_j, rel=1e-8)


def test_vector_damper_energy_balance_under_a_pair():
    # Uang & Bertero (1990) with the damper's work ∫F_d·du as one more term.
    a1, a2 = _pair()
    r = biaxial_job(a1, a2, DT, [_model("bilinear", {"coefficient": 3.0e5,
                                                     "exponent": 0.4})],
                    "exact")[0]["biaxial"]
    e = r.energy_j
    total = (e["kinetic_j"] + e["damping_j"] + e["damper_j"] + e["strain_j"]
             + e["hysteretic_j"])
    assert total == pytest.approx(e["input_j"], rel=1e-6)
    assert e["damper_j"] > 0.05 * e["input_j"]


def test_hanging_item_in_two_directions_against_solve_ivp():
    # Compound pendulum hung from one point, small angles, the same inertia I about the
    # pivot in every vertical plane: each direction obeys
    # I θ̈ + c θ̇ + m g d θ = −m d üg (moments about the moving pivot), so the centre of
    # mass u = d θ follows ü + 2ζωu̇ + ω²u = −Γ üg with Γ = m d²/I. Reference:
    # scipy.integrate.solve_ivp on the four-state system (angles and rates), input
    # linearly interpolated, tight tolerances.
    m, d, inertia, zeta = 500.0, 1.2, 900.0, 0.02
    omega = math.sqrt(m * G * d / inertia)
    gamma = m * d * d / inertia
    a1, a2 = (x * 0.2 for x in _pair())
    t = np.arange(a1.size) * DT

    def rates(time, y):
        g = np.interp(time, t, a1), np.interp(time, t, a2)
        return [y[2], y[3],
                -2 * zeta * omega * y[2] - omega ** 2 * y[0] - m * d * g[0] / inertia,
                -2 * zeta * omega * y[3] - omega ** 2 * y[1] - m * d * g[1] / inertia]
    ref = solve_ivp(rates, (0.0, t[-1]), [0.0] * 4, t_eval=t, rtol=1e-10, atol=1e-13,
                    max_step=DT / 4)
    model = {"model": "linear", "period_s": 2 * math.pi / omega, "damping": zeta,
             "participation": gamma}
    r = biaxial_job(a1, a2, DT, [model], "exact")[0]["biaxial"]
    u_ref = ref.y[:2] * d
    scale = np.max(np.abs(u_ref))
    np.testing.assert_allclose(r.displacement_m, u_ref, rtol=0, atol=1e-6 * scale)
    # the total acceleration of the centre of mass is ü + üg (not ü + Γüg)
    accel = np.array([rates(x, y)[2:] for x, y in zip(t, ref.y.T)]).T * d
    np.testing.assert_allclose(r.total_accel_m_s2, accel + np.vstack([a1, a2]), rtol=0,
                               atol=1e-5 * np.max(np.abs(accel)))
    assert r.peak_displacement_m >= np.max(np.hypot(*u_ref)) * (1 - 1e-6)


def test_pair_stripe_demand_is_the_two_direction_run_at_that_scale():
    # A stripe of a two-direction system scales both components of a pair by one factor
    # so that the pair's RotD50 PSA at the system's period equals the level (Boore 2010:
    # the median over angles 0-179° of the peak rotated response, computed here from
    # oscillator histories and rotated_peaks), then takes the resultant peak of the
    # two-direction run as the demand.
    pairs = (_pair(), (enveloped_noise(DT, 15.0, seed=5), enveloped_noise(DT, 15.0, seed=6)))
    model = {**_model("bouc-wen"), "system_id": "s"}
    level = 0.8 * G
    out = pair_stripe_job(pairs, (DT, DT), model, "exact", "sa", level)
    for (a1, a2), factor, run in zip(pairs, out["factors"], out["runs"]):
        period = model["period_s"]
        fine = 16  # input interpolated to 16 samples per step, so peaks are not missed
        t = np.arange(a1.size) * DT
        tf = np.arange((a1.size - 1) * fine + 1) * DT / fine
        h = [oscillator_histories(np.interp(tf, t, a), DT / fine, np.array([period]),
                                  np.array([0.05])).displacement_m[0] for a in (a1, a2)]
        rotd50 = np.median(rotated_peaks(h[0], h[1])) * (2 * math.pi / period) ** 2
        # 0.5 %: the RotD values are taken at samples (module docstring of rotd).
        assert factor == pytest.approx(level / rotd50, rel=5e-3)
        direct = biaxial_job(a1 * factor, a2 * factor, DT, [model], "exact")[0]["biaxial"]
        assert run["biaxial"].peak_displacement_m == direct.peak_displacement_m
