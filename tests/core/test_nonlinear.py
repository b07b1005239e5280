"""Nonlinear SDOF response: closed forms, scipy references and energy bookkeeping."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import simpson, solve_ivp

from sdofreport.core.nonlinear import (
    DEFAULT_FRICTION_YIELD_DISPLACEMENT_M,
    bilinear,
    nonlinear_response,
    sliding_pendulum_model,
)
from sdofreport.core.spectra import oscillator_histories

from .conftest import enveloped_noise

g = 9.80665  # standard gravity, ISO 80000-3 (typed here, not imported from our code)


def _k(period):
    return (2.0 * math.pi / period) ** 2  # per unit mass, ω²


# --------------------------------------------------------------- linear limit
@pytest.fixture(scope="module")
def short_record():
    return enveloped_noise(0.01, duration=8.0, seed=5), 0.01


@pytest.mark.parametrize("strength", [math.inf, 1.0e12])
def test_huge_strength_equals_linear(short_record, strength):
    ag, dt = short_record
    period, zeta = 0.5, 0.05
    r = nonlinear_response(ag, dt, bilinear(_k(period), yield_strength_n=strength), zeta,
                           substeps=10)
    # Independent reference: exact piecewise-linear recurrence (Nigam & Jennings 1969),
    # itself checked against scipy.signal.lsim in test_spectra.py.
    ref = oscillator_histories(ag, dt, period, zeta, method="exact")
    # Tolerance 2e-3 of the peak: Newmark average acceleration at h = dt/10 has period
    # error x²/3 with x = πh/T = 0.0063 (1.3e-5 per cycle), i.e. a phase drift of
    # 16 cycles × 2π × 1.3e-5 ≈ 1.3e-3 rad over the 8 s record.
    peak = np.max(np.abs(ref.displacement_m[0]))
    assert np.max(np.abs(r.displacement_m - ref.displacement_m[0])) < 2e-3 * peak
    assert np.max(np.abs(r.total_accel_m_s2 - ref.total_acceleration_m_s2[0])) < 2e-3 * np.max(
        np.abs(ref.total_acceleration_m_s2[0]))
    # Closed form: a linear system never yields, so u/u_y stays below 1 and F = k u.
    np.testing.assert_allclose(r.force_n, _k(period) * r.displacement_m, rtol=1e-12, atol=0)
    assert r.hysteretic_j == pytest.approx(0.0, abs=1e-9 * r.input_j)


def _smooth_ground(time):
    """A smooth invented base acceleration [m/s²]: three sines under (t/1 s)² e^(2 − t/1 s)."""
    env = time ** 2 * np.exp(2.0 - time)
    return env * (1.5 * np.sin(2 * np.pi * 1.3 * time) + 1.0 * np.sin(2 * np.pi * 3.1 * time + 1.0)
                  + 0.5 * np.sin(2 * np.pi * 4.7 * time + 2.0))


def test_huge_strength_matches_solve_ivp():
    dt, period, zeta = 0.002, 0.3, 0.02
    t = np.arange(3001) * dt
    w = 2.0 * math.pi / period
    r = nonlinear_response(_smooth_ground(t), dt, bilinear(w * w, yield_strength_n=math.inf),
                           zeta, substeps=4)

    def rhs(time, y):
        return [y[1], -_smooth_ground(time) - 2.0 * zeta * w * y[1] - w * w * y[0]]

    sol = solve_ivp(rhs, (0.0, t[-1]), [0.0, 0.0], t_eval=t, method="DOP853",
                    rtol=1e-10, atol=1e-13)
    # Independent reference: scipy.integrate.solve_ivp (DOP853, rtol 1e-10) on the smooth
    # input itself. Tolerance 3e-3 of the peak: our solver sees the samples joined by
    # straight lines (error ≤ (2π × 4.7 Hz × dt)²/8 = 4e-4 of the input) and Newmark's
    # phase drift at h = 0.5 ms, x = πh/T = 0.0052: 20 cycles × 2π × x²/3 ≈ 1.2e-3 rad.
    peak = np.max(np.abs(sol.y[0]))
    assert np.max(np.abs(r.displacement_m - sol.y[0])) < 3e-3 * peak
    assert np.max(np.abs(r.velocity_m_s - sol.y[1])) < 3e-3 * np.max(np.abs(sol.y[1]))


# ---------------------------------------------------------- bilinear closed form
def test_step_load_ductility_closed_form():
    # Undamped EPP system at rest under a suddenly applied constant force p0 = −m üg,
    # with p0 = 0.75 Fy (so the elastic peak 2p0/k would exceed u_y).
    # Hand calculation (work–energy, as in Chopra §7.x for a step force): at the peak
    # velocity is zero, so p0 u_m = ½ k u_y² + Fy (u_m − u_y)
    #   ⇒ u_m = Fy u_y / (2 (Fy − p0)) ⇒ μ = 1 / (2 (1 − p0/Fy)) = 1/(2 × 0.25) = 2.
    period = 0.5
    fy = 1.0  # per unit mass [m/s²]
    ag = np.full(2001, -0.75 * fy)  # constant from t = 0: a true step, no ramp
    dt = period / 2000.0
    r = nonlinear_response(ag, dt, bilinear(_k(period), yield_strength_n=fy), 0.0)
    # Tolerance 1e-3: Newmark average acceleration at h = T/2000 (error O((ωh)²) ~ 1e-5)
    # plus sampling of the peak between steps.
    assert r.ductility == pytest.approx(2.0, rel=1e-3)
    assert r.converged


# --------------------------------------------------------------- energy balance
def test_epp_energy_balance_fine_step():
    ag = enveloped_noise(0.002, duration=10.0, seed=3)
    dt = 0.002
    period, zeta, fy = 0.6, 0.05, 0.8
    k = _k(period)
    r = nonlinear_response(ag, dt, bilinear(k, yield_strength_n=fy), zeta)
    assert r.ductility > 2.0  # the system yields well into the plastic range
    # Uang & Bertero (1990): E_I = E_K + E_D + E_S + E_H; common practice (no source) that a
    # fine step closes it within 1 %.
    assert r.imbalance < 0.01
    # Independent pieces computed here from the histories, not from the solver's sums:
    # damping ∫ c u̇² dt by Simpson's rule; hysteretic energy of an EPP element =
    # Fy × total plastic travel Σ|Δu_p|, u_p = u − F/k (hand calculation of the
    # rectangle areas under the plastic plateaus); strain F²/(2k); kinetic ½ u̇².
    c = 2.0 * zeta * math.sqrt(k)
    e_damp = c * simpson(r.velocity_m_s ** 2, dx=dt)
    e_hyst = fy * np.sum(np.abs(np.diff(r.displacement_m - r.force_n / k)))
    e_strain = r.force_n[-1] ** 2 / (2.0 * k)
    e_kin = 0.5 * r.velocity_m_s[-1] ** 2
    assert r.hysteretic_j == pytest.approx(e_hyst, rel=0.01)
    assert r.damping_j == pytest.approx(e_damp, rel=0.01)
    assert r.input_j == pytest.approx(e_kin + e_damp + e_strain + e_hyst, rel=0.01)
    hist = r.energy_histories_j
    assert set(hist) == {"input", "kinetic", "damping", "strain", "hysteretic"}
    assert all(v.shape == ag.shape for v in hist.values())


def test_mass_scaling():
    ag, dt = enveloped_noise(0.01, seed=4), 0.01
    k, fy, m = _k(0.4), 1.5, 2500.0
    per_kg = nonlinear_response(ag, dt, bilinear(k, yield_strength_n=fy), 0.05)
    whole = nonlinear_response(ag, dt, bilinear(m * k, yield_strength_n=m * fy), 0.05,
                               mass_kg=m)
    # Closed form: dividing m ü + c u̇ + F = −m üg by m gives the per-unit-mass system, so
    # displacements match and forces and energies scale by m (exact up to round-off).
    np.testing.assert_allclose(whole.displacement_m, per_kg.displacement_m, rtol=1e-9,
                               atol=1e-12)
    assert whole.peak_force_n == pytest.approx(m * per_kg.peak_force_n, rel=1e-9)
    assert whole.input_j == pytest.approx(m * per_kg.input_j, rel=1e-9)


# ------------------------------------------------------------------ friction block
def test_rigid_plastic_block_newmark_1965():
    mu, amp, t0 = 0.2, 0.5 * g, 0.5
    dt = 5.0e-5
    n = int(round(2.0 / dt)) + 1
    t = np.arange(n) * dt
    ag = np.where(t <= t0 + 1e-12, amp, 0.0)
    # A rigid-plastic block: regularising yield displacement 1 µm (not the 0.25 mm
    # default, whose force build-up over √(2u_y/A) ≈ 10 ms lets the block gain about
    # μg × 7 ms ≈ 0.014 m/s of extra slip velocity, 1 % of (A − μg) t0).
    uy = 1.0e-6
    block = sliding_pendulum_model(None, math.inf, mu, yield_displacement_m=uy)
    r = nonlinear_response(ag, dt, block, 0.0)
    # Closed form, Newmark (1965) sliding block: during the pulse the base accelerates at
    # A and friction drives the block at most μg, so the slip velocity grows at (A − μg):
    # v(t0) = (A − μg) t0, slip d1 = (A − μg) t0²/2. After the pulse friction decelerates
    # the slip at μg: it stops after t_s = v(t0)/(μg) having slid d2 = v(t0)²/(2μg).
    # Total d = (A − μg) t0²/2 · (1 + (A − μg)/(μg)) = (A − μg) t0²/2 · A/(μg)
    #         = (0.3 g)(0.25)/2 × 2.5 = 0.09375 × 9.80665 = 0.919373 m.
    expected = (amp - mu * g) * t0 ** 2 / 2.0 * amp / (mu * g)
    assert expected == pytest.approx(0.919373, rel=1e-6)
    # Tolerance 0.5 %: force build-up of the regularised element (√(2u_y/A) = 0.64 ms,
    # about 2 μg × 0.64 ms / ((A − μg) t0) ≈ 0.2 % of d), the one-sample ramp at the end
    # of the pulse (t0 effectively + dt/2: 1e-4 of d) and O(dt) at the stick–slip
    # transitions. The block slides backwards relative to the base.
    assert -r.residual_displacement_m == pytest.approx(expected, rel=5e-3)
    # Closed form: the slip stops at t0 + t_s = 0.5 + 0.75 = 1.25 s, then stays put; the
    # regularised element, released at its yield force with no damping, then swings
    # elastically between ±u_y (range 2u_y; 1 % allowance for Newmark round-off).
    after = r.displacement_m[t >= 1.3]
    assert np.ptp(after) < 2.02 * uy
    before = r.displacement_m[t <= 1.2]
    assert np.abs(before[-1] - r.residual_displacement_m) > 1e-3
    assert r.converged and r.ductility is None


def test_pendulum_free_oscillation_period():
    radius = 2.0
    dt = 1.0e-3
    ag = np.zeros(10001)
    r = nonlinear_response(ag, dt, sliding_pendulum_model(None, radius, 0.0), 0.0,
                           initial_displacement_m=0.0, initial_velocity_m_s=0.1)
    u = r.displacement_m
    up = np.flatnonzero((u[:-1] < 0.0) & (u[1:] >= 0.0))
    crossings = r.time_s[up] - u[up] * dt / (u[up + 1] - u[up])
    measured = np.mean(np.diff(crossings))
    # Closed form: T = 2π √(R/g) = 2π √(2/9.80665) = 2.83749 s (Zayas, Low & Mahin 1990).
    # Tolerance 1e-4: Newmark elongation x/arctan x − 1 ≈ x²/3 = 4e-6 with x = πdt/T,
    # plus linear interpolation of the zero crossings.
    assert measured == pytest.approx(2 * math.pi * math.sqrt(radius / g), rel=1e-4)
    assert measured == pytest.approx(2.83749, rel=1e-5)


def test_pendulum_force_is_linear_plus_friction():
    ag, dt = enveloped_noise(0.005, seed=6, peak=4.0), 0.005
    w, radius, mu = 1.0e5, 1.5, 0.06
    r = nonlinear_response(ag, dt, sliding_pendulum_model(w, radius, mu), 0.0)
    friction = r.force_n - w / radius * r.displacement_m
    # Closed form (Zayas, Low & Mahin 1990): F = (W/R) u + μW z with |z| <= 1, so the
    # friction part never exceeds μW (round-off allowance 1e-9).
    assert np.max(np.abs(friction)) <= mu * w * (1 + 1e-9)
    # Closed form: the friction element's elastic range is 2u_y wide, so after the bearing
    # has moved one way by more than 2u_y over a step (velocity of one sign at both ends)
    # the friction force is saturated at ±μW in that direction.
    step = np.diff(r.displacement_m)
    v = r.velocity_m_s
    sliding = ((np.abs(step) > 2.0 * DEFAULT_FRICTION_YIELD_DISPLACEMENT_M)
               & (np.sign(v[:-1]) == np.sign(step)) & (np.sign(v[1:]) == np.sign(step)))
    assert sliding.sum() > 50
    np.testing.assert_allclose(friction[1:][sliding], mu * w * np.sign(step[sliding]),
                               rtol=1e-9)
    assert r.imbalance < 0.01


# ------------------------------------------------------------------ convergence
def test_convergence_report_default():
    ag, dt = enveloped_noise(0.01, seed=1), 0.01
    r = nonlinear_response(ag, dt, bilinear(_k(0.5), yield_strength_n=0.5), 0.05)
    # Hand calculation: a step that crosses into yield needs a second Newton update
    # (the first uses the elastic tangent), so at least 2; the default allows 10.
    assert r.ductility > 1.0
    assert 2 <= r.max_iterations_used <= 10
    assert r.subdivided_steps == 0 and r.converged


def test_step_subdivision_path():
    # A coarse step (dt/T = 0.4) and a tiny yield displacement make Newton–Raphson on the
    # bilinear branches cycle in some steps; halving the step resolves it.
    ag, dt = enveloped_noise(0.02, seed=2), 0.02
    system = bilinear(_k(0.05), yield_displacement_m=1e-5)
    r = nonlinear_response(ag, dt, system, 0.05)
    assert r.subdivided_steps > 0
    assert r.converged
    # Hand calculation: an unconverged step would leave a residual force in the balance.
    assert r.imbalance < 1e-6
    no_split = nonlinear_response(ag, dt, system, 0.05, max_halvings=0)
    assert no_split.subdivided_steps == 0 and not no_split.converged
    one_update = nonlinear_response(ag, dt, system, 0.05, max_iterations=1, max_halvings=3)
    # Hand calculation: with one update per step a yield crossing never meets the
    # tolerance, however fine the split, so this is reported as unconverged.
    assert one_update.subdivided_steps > 0 and not one_update.converged


# ------------------------------------------------------------------ bad input
@pytest.mark.parametrize("kwargs, match", [
    ({"stiffness_n_m": 1.0}, r"give exactly one of yield_strength_n \[N\] and "
                             r"yield_displacement_m \[m\]"),
    ({"stiffness_n_m": 1.0, "yield_strength_n": 1.0, "yield_displacement_m": 1.0},
     r"give exactly one of"),
    ({"stiffness_n_m": -1.0, "yield_strength_n": 1.0},
     r"stiffness_n_m must be finite and > 0 \[N/m\]; got -1.0"),
    ({"stiffness_n_m": 1.0, "yield_strength_n": 0.0},
     r"yield_strength_n must be > 0 \(inf allowed\) \[N\]; got 0.0"),
    ({"stiffness_n_m": 1.0, "yield_strength_n": 1.0, "hardening_ratio": 1.0},
     r"hardening_ratio must be in \[0, 1\) \[-\]; got 1.0"),
])
def test_bilinear_refuses(kwargs, match):
    with pytest.raises(ValueError, match=match):
        bilinear(**kwargs)


def test_pendulum_refuses():
    with pytest.raises(ValueError, match=r"^friction must be in \[0, 1\) \[-\]; got 1.2$"):
        sliding_pendulum_model(1.0, 1.0, 1.2)
    with pytest.raises(ValueError, match=r"^mass_kg must be None for a sliding pendulum"):
        nonlinear_response(np.zeros(4), 0.01, sliding_pendulum_model(1.0, 1.0, 0.1), 0.0,
                           mass_kg=3.0)


def test_response_refuses():
    system = bilinear(100.0, yield_strength_n=1.0)
    with pytest.raises(ValueError, match=r"damping_ratio must be in \[0, 1\) \[-\]; got 5 "
                                         r"\(a percentage\? use 0\.05 for 5 %\)"):
        nonlinear_response(np.zeros(4), 0.01, system, 5)
    with pytest.raises(ValueError, match=r"initial_displacement_m must lie on the elastic "
                                         r"branch, \|u0\| <= u_y = 0.01 \[m\]; got 0.5"):
        nonlinear_response(np.zeros(4), 0.01, system, 0.0, initial_displacement_m=0.5)
    with pytest.raises(ValueError, match=r"max_iterations must be an integer >= 1 \[-\]; "
                                         r"got 0"):
        nonlinear_response(np.zeros(4), 0.01, system, 0.0, max_iterations=0)
    with pytest.raises(ValueError, match=r"system must be a Bilinear, Hysteresis or SlidingPendulum"):
        nonlinear_response(np.zeros(4), 0.01, "elastic", 0.0)
