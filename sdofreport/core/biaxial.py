"""
Two-direction (biaxial) response of an isotropic SDOF system to a horizontal pair.

One mass moves in the horizontal plane, u = (u_x, u_y), driven by both components of a
pair at once (x along H1, y along H2):

    m ü + c u̇ + F(u) − k_g u = −m üg(t),     üg = (üg,1, üg,2).

* Elastic isotropic system: F = k u, so the two directions are uncoupled and each is the
  one-direction oscillator of its component. The peak of the resultant |u(t)| equals
  max over rotation angles θ of max_t |u_x cos θ + u_y sin θ|, the RotD100 spectral
  displacement of the pair at the system's period and damping (Boore 2010 [1]_): the
  maximum of a projection over all directions is the length of the vector.
* Yielding and sliding systems: a linear spring ``k_lin`` in parallel with an
  elastic–perfectly-plastic element of stiffness ``k_p`` whose force lies inside a
  circle of radius ``f_p`` (a coupled circular yield surface), integrated by the
  radial-return map of plasticity (Simo & Hughes [2]_ §2.3, the two-dimensional
  analogue of the one-direction element in :mod:`sdofreport.core.hysteresis`):
  trial force ``f* = k_p (u − u_p) + c_s u̇``; when ``|f*| > f_p`` the force is
  ``f_p f*/|f*|`` and the plastic displacement moves along ``f*``. The consistent
  tangent is ``(f_p/|f*|)(I − n nᵀ)`` times the element's stiffness.

  - bilinear with kinematic hardening: ``k_lin = αk``, ``k_p = (1−α)k``,
    ``f_p = (1−α)F_y`` (von Mises-type circular surface of a biaxial oscillator);
  - friction pendulum (Mokha, Constantinou & Reinhorn 1993 [3]_): ``k_lin = W/R``,
    ``f_p = μW``, ``k_p = μW/u_y`` with the regularising slip displacement u_y and the
    stick dashpot ``c_s`` of the one-direction model; while sliding the friction force
    is ``μW`` along the sliding velocity (the plastic flow), as in [3]_. Under motion
    in one direction the map is exactly the one-direction element, so the result
    reduces to :func:`sdofreport.core.nonlinear.nonlinear_response`.
  - velocity-dependent friction (Constantinou, Mokha & Reinhorn 1990 [4]_):
    ``μ(v) = μ_fast − (μ_fast − μ_slow) exp(−a |v|)`` with |v| the magnitude of the
    sliding velocity, evaluated at the start of each integration sub-step (an explicit
    lag of one sub-step, our choice; sub-steps are at most T/100).

Integration: Newmark average acceleration with Newton–Raphson on the two-component
residual, record steps split into 2, 4, ... sub-steps when a step does not converge
(as :func:`sdofreport.core.hysteresis.integrate_model`).

References
----------
.. [1] D. M. Boore, "Orientation-independent, nongeometric-mean measures of seismic
   intensity from two horizontal components of motion," Bull. Seismol. Soc. Am.,
   vol. 100, no. 4, pp. 1830-1835, 2010, doi: 10.1785/0120090400.
.. [2] J. C. Simo and T. J. R. Hughes, *Computational Inelasticity*. New York, NY, USA:
   Springer, 1998, doi: 10.1007/b98904.
.. [3] A. S. Mokha, M. C. Constantinou and A. M. Reinhorn, "Verification of friction
   model of Teflon bearings under triaxial load," J. Struct. Eng., vol. 119, no. 1,
   pp. 240-261, 1993, doi: 10.1061/(ASCE)0733-9445(1993)119:1(240).
.. [4] M. C. Constantinou, A. Mokha and A. Reinhorn, "Teflon bearings in base isolation.
   II: Modeling," J. Struct. Eng., vol. 116, no. 2, pp. 455-474, 1990,
   doi: 10.1061/(ASCE)0733-9445(1990)116:2(455).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from sdofreport.core._jit import JIT_OPTIONS, njit

__all__ = ["BiaxialResponse", "biaxial_elastic", "biaxial_plastic", "friction_at"]


@dataclass(frozen=True)
class BiaxialResponse:
    """Histories and peaks of a two-direction run (forces in [N] with a mass given,
    per unit mass [N/kg] otherwise); direction 1 is along H1, direction 2 along H2."""

    #: sample times [s]
    time_s: np.ndarray
    #: relative displacement, shape (2, npts) [m]
    displacement_m: np.ndarray
    #: relative velocity, shape (2, npts) [m/s]
    velocity_m_s: np.ndarray
    #: total acceleration ü + üg, shape (2, npts) [m/s²]
    total_accel_m_s2: np.ndarray
    #: restoring force, shape (2, npts) (elastic: k u; None per unit stiffness) [N]
    force_n: np.ndarray | None
    #: max_t |u(t)| of the resultant [m]
    peak_displacement_m: float
    #: max_t |u_i(t)| per direction [m]
    peak_displacement_per_direction_m: tuple
    #: max_t |ü_total(t)| of the resultant [m/s²]
    peak_total_accel_m_s2: float
    #: max_t |F(t)| of the resultant (None without a stiffness) [N]
    peak_force_n: float | None
    #: max_t |u̇(t)| of the resultant [m/s]
    peak_velocity_m_s: float
    #: displacement at the end of the record, per direction [m]
    residual_displacement_m: tuple
    #: True when every step met the tolerance (always True for elastic runs)
    converged: bool = True
    #: largest Newton–Raphson iteration count of an accepted step [-]
    max_iterations_used: int = 0
    #: record steps that had to be split [-]
    subdivided_steps: int = 0
    #: energies at the end (input, kinetic, damping, strain, hysteretic) [J]
    energy_j: dict | None = None
    #: True when |u| reached the instability bound (histories end there)
    unstable: bool = False


def _resultant(x: np.ndarray) -> np.ndarray:
    return np.hypot(x[0], x[1])


#: Points per step at which the resultant is interpolated between samples. Our choice:
#: the cubic Hermite error is O(h⁴), far below 0.01 % of the peak at 10 points.
HERMITE_POINTS = 10


def _hermite_peak(u: np.ndarray, v: np.ndarray, dt: float) -> float:
    """max |u(t)| of the resultant, u between samples by cubic Hermite interpolation of
    the displacement with its velocity (exact for a cubic) [m].

    Only steps that can hold a larger value are interpolated: on [0, 1] the Hermite
    weights satisfy h00 + h01 = 1 (both >= 0) and |h10|, |h11| <= 4/27, so inside a step
    |u| <= max(|u₀|, |u₁|) + (4/27)·dt·(|u̇₀| + |u̇₁|).
    """
    r = _resultant(u)
    best = float(np.max(r))
    speed = _resultant(v)
    bound = np.maximum(r[:-1], r[1:]) + 4.0 / 27.0 * dt * (speed[:-1] + speed[1:])
    steps = np.flatnonzero(bound > best)
    if steps.size == 0:
        return best
    s = (np.arange(1, HERMITE_POINTS) / HERMITE_POINTS)[:, None]
    h00 = 2 * s ** 3 - 3 * s ** 2 + 1
    h10 = s ** 3 - 2 * s ** 2 + s
    h01 = -2 * s ** 3 + 3 * s ** 2
    h11 = s ** 3 - s ** 2
    x = [h00 * c[steps] + h10 * dt * w[steps] + h01 * c[steps + 1]
         + h11 * dt * w[steps + 1] for c, w in zip(u, v)]
    return max(best, float(np.max(np.hypot(x[0], x[1]))))


def biaxial_elastic(acceleration_1_m_s2, acceleration_2_m_s2, time_step_s, natural_period_s,
                    damping_ratio, *, stiffness_n_m=None, method="exact"
                    ) -> BiaxialResponse:
    """
    Elastic isotropic oscillator driven by both components of a pair.

    Parameters
    ----------
    acceleration_1_m_s2, acceleration_2_m_s2 : array-like
        The pair's components, same step; the shorter is padded with zeros. [m/s²]
    time_step_s : float
        Sampling interval. [s]
    natural_period_s : float
        Period of the oscillator (the same in every direction). [s]
    damping_ratio : float
        Fraction of critical damping. [-]
    stiffness_n_m : float, optional
        Lateral stiffness k for the force k u (None: no force). [N/m]
    method : str
        Integration method of :func:`sdofreport.core.spectra.oscillator_histories`.

    Returns
    -------
    BiaxialResponse
        Peak resultant displacement = RotD100 spectral displacement [1]_.
    """
    from sdofreport.core.spectra import oscillator_histories

    a1 = np.asarray(acceleration_1_m_s2, dtype=float)
    a2 = np.asarray(acceleration_2_m_s2, dtype=float)
    n = max(a1.size, a2.size)
    ag = np.zeros((2, n))
    ag[0, :a1.size] = a1
    ag[1, :a2.size] = a2
    u, v, at = np.empty((2, n)), np.empty((2, n)), np.empty((2, n))
    refined = []
    for i in range(2):
        h = oscillator_histories(ag[i], time_step_s, np.array([natural_period_s]),
                                 np.array([damping_ratio]), method=method)
        u[i], v[i], at[i] = (h.displacement_m[0], h.velocity_m_s[0],
                             h.total_acceleration_m_s2[0])
        refined.append(float(h.peaks.displacement_m[0]))
    force = None if stiffness_n_m is None else stiffness_n_m * u
    # The resultant between samples too (cubic Hermite interpolation of u with u̇ in each
    # step), and never below a direction's own refined peak.
    peak_u = max(_hermite_peak(u, v, time_step_s), *refined)
    return BiaxialResponse(
        time_s=np.arange(n) * time_step_s, displacement_m=u, velocity_m_s=v,
        total_accel_m_s2=at, force_n=force, peak_displacement_m=peak_u,
        peak_displacement_per_direction_m=tuple(refined),
        peak_total_accel_m_s2=float(np.max(_resultant(at))),
        peak_force_n=None if stiffness_n_m is None else stiffness_n_m * peak_u,
        peak_velocity_m_s=float(np.max(_resultant(v))),
        residual_displacement_m=(float(u[0, -1]), float(u[1, -1])))


def friction_at(speed_m_s, friction_fast, friction_slow, rate_s_m):
    """
    Velocity-dependent friction coefficient of Constantinou, Mokha & Reinhorn [4]_.

    ``μ = μ_fast − (μ_fast − μ_slow) exp(−a |v|)``.

    Parameters
    ----------
    speed_m_s : float or array-like
        Sliding speed |v|. [m/s]
    friction_fast, friction_slow : float
        Coefficients at large and at zero speed. [-]
    rate_s_m : float
        Rate parameter a. [s/m]
    """
    return friction_fast - (friction_fast - friction_slow) * np.exp(
        -rate_s_m * np.abs(speed_m_s))


@njit(**JIT_OPTIONS)
def _element(p, up0, up1, u0, u1, v0, v1, dvdu, out):
    """Circular-surface element at trial (u0, u1), velocity (v0, v1), committed plastic
    displacement (up0, up1), yield force ``p[2]``; writes fx, fy, upx, upy, k11, k12,
    k22 (tangent dF/du) to ``out``."""
    k_lin = p[0]
    k_p = p[1]
    f_p = p[2]
    c_s = p[3]
    ex = k_p * (u0 - up0) + c_s * v0
    ey = k_p * (u1 - up1) + c_s * v1
    mag = math.sqrt(ex * ex + ey * ey)
    ke = k_p + c_s * dvdu
    if mag > f_p:
        nx = ex / mag
        ny = ey / mag
        s = f_p / mag * ke
        out[0] = k_lin * u0 + f_p * nx
        out[1] = k_lin * u1 + f_p * ny
        out[2] = u0 - f_p * nx / k_p
        out[3] = u1 - f_p * ny / k_p
        out[4] = k_lin + s * (1.0 - nx * nx)
        out[5] = -s * nx * ny
        out[6] = k_lin + s * (1.0 - ny * ny)
    else:
        out[0] = k_lin * u0 + ex
        out[1] = k_lin * u1 + ey
        out[2] = up0
        out[3] = up1
        out[4] = k_lin + ke
        out[5] = 0.0
        out[6] = k_lin + ke


@njit(**JIT_OPTIONS)
def integrate_biaxial(ag, dt, n_sub, m, c, p, k_geo, w_fric, tol_force, max_iter,
                      max_halvings, u_stop, hist, stats):
    """
    Newmark average acceleration + Newton–Raphson through a pair, circular surface.

    ``ag`` (2, npts). ``p`` = [k_lin, k_p, f_p, c_s, μ_fast, μ_slow, a]; when
    ``w_fric`` > 0 the yield force is ``w_fric · μ(|v|)`` at the start of each sub-step
    and k_p keeps ``p[1]``. ``hist`` (11, npts): u1, u2, v1, v2, at1, at2, F1, F2,
    E_input, E_viscous, ∫F·du. ``stats`` (8,): max iterations, subdivided steps, all
    converged, stopped, samples stored, final |f_element|, final up1, final up2.
    Short names (DEVELOPERS.md, names of inputs): ``ag`` acceleration_1/2_m_s2 [m/s²],
    ``dt`` time_step_s [s], ``n_sub`` sub-steps per sample, ``m`` mass_kg [kg].
    """
    npts = ag.shape[1]
    q = p.copy()
    out = np.zeros(7)
    # committed state and the state of the attempt: rows u, v, ü, F, u_p; columns 1, 2
    state = np.zeros((5, 2))
    trial = np.zeros((5, 2))
    u, v, a, f, up = state[0], state[1], state[2], state[3], state[4]
    tu, tv, ta, tf, tup = trial[0], trial[1], trial[2], trial[3], trial[4]
    a[0] = -ag[0, 0]
    a[1] = -ag[1, 0]
    e_in = 0.0
    e_d = 0.0
    e_f = 0.0
    iters_max = 0
    n_split = 0
    all_ok = 1
    stopped = 0
    for j in range(11):
        hist[j, 0] = 0.0
    hist[4, 0] = 0.0
    hist[5, 0] = 0.0
    stored = 1
    for i in range(npts - 1):
        n_try = n_sub
        for attempt in range(max_halvings + 1):
            last = attempt == max_halvings
            trial[:, :] = state
            t_in = e_in
            t_d = e_d
            t_f = e_f
            t_it = iters_max
            ok = True
            h = dt / n_try
            kdyn = 4.0 * m / (h * h) + 2.0 * c / h
            for s in range(n_try):
                if w_fric > 0.0:
                    speed = math.sqrt(tv[0] * tv[0] + tv[1] * tv[1])
                    q[2] = w_fric * (p[4] - (p[4] - p[5]) * math.exp(-p[6] * speed))
                g00 = ag[0, i] + (ag[0, i + 1] - ag[0, i]) * s / n_try
                g01 = ag[0, i] + (ag[0, i + 1] - ag[0, i]) * (s + 1) / n_try
                g10 = ag[1, i] + (ag[1, i + 1] - ag[1, i]) * s / n_try
                g11 = ag[1, i] + (ag[1, i + 1] - ag[1, i]) * (s + 1) / n_try
                dx = 0.0
                dy = 0.0
                it = 0
                conv = False
                while True:
                    ux = tu[0] + dx
                    uy = tu[1] + dy
                    ax = 4.0 * dx / (h * h) - 4.0 * tv[0] / h - ta[0]
                    ay = 4.0 * dy / (h * h) - 4.0 * tv[1] / h - ta[1]
                    vx = 2.0 * dx / h - tv[0]
                    vy = 2.0 * dy / h - tv[1]
                    _element(q, tup[0], tup[1], ux, uy, vx, vy, 2.0 / h, out)
                    rx = -m * g01 - m * ax - c * vx - out[0] + k_geo * ux
                    ry = -m * g11 - m * ay - c * vy - out[1] + k_geo * uy
                    if math.sqrt(rx * rx + ry * ry) <= tol_force:
                        conv = True
                        break
                    if it == max_iter:
                        break
                    k11 = kdyn + out[4] - k_geo
                    k12 = out[5]
                    k22 = kdyn + out[6] - k_geo
                    det = k11 * k22 - k12 * k12
                    if k11 <= 0.0 or det <= 0.0:  # unusable tangent: the mass term only
                        k11 = 4.0 * m / (h * h)
                        k22 = k11
                        k12 = 0.0
                        det = k11 * k22
                    dx = dx + (k22 * rx - k12 * ry) / det
                    dy = dy + (k11 * ry - k12 * rx) / det
                    it += 1
                if it > t_it:
                    t_it = it
                if not conv:
                    ok = False
                    if not last:
                        break
                t_in += -m * (0.5 * (g00 + g01) * dx + 0.5 * (g10 + g11) * dy)
                t_d += c * (0.5 * (tv[0] + vx) * dx + 0.5 * (tv[1] + vy) * dy)
                t_f += 0.5 * (tf[0] + out[0]) * dx + 0.5 * (tf[1] + out[1]) * dy
                tu[0] = ux
                tu[1] = uy
                tv[0] = vx
                tv[1] = vy
                ta[0] = ax
                ta[1] = ay
                tf[0] = out[0]
                tf[1] = out[1]
                tup[0] = out[2]
                tup[1] = out[3]
            if ok or last:
                if attempt > 0:
                    n_split += 1
                if not ok:
                    all_ok = 0
                state[:, :] = trial
                e_in = t_in
                e_d = t_d
                e_f = t_f
                iters_max = t_it
                break
            n_try *= 2
        hist[0, i + 1] = u[0]
        hist[1, i + 1] = u[1]
        hist[2, i + 1] = v[0]
        hist[3, i + 1] = v[1]
        hist[4, i + 1] = a[0] + ag[0, i + 1]
        hist[5, i + 1] = a[1] + ag[1, i + 1]
        hist[6, i + 1] = f[0]
        hist[7, i + 1] = f[1]
        hist[8, i + 1] = e_in
        hist[9, i + 1] = e_d
        hist[10, i + 1] = e_f
        stored = i + 2
        mag = math.sqrt(u[0] * u[0] + u[1] * u[1])
        if not mag < u_stop:
            stopped = 1
            break
    stats[0] = iters_max
    stats[1] = n_split
    stats[2] = all_ok
    stats[3] = stopped
    stats[4] = stored
    stats[5] = q[2]
    stats[6] = up[0]
    stats[7] = up[1]


def biaxial_plastic(acceleration_1_m_s2, acceleration_2_m_s2, time_step_s, *, mass_kg,
                    damping_coefficient,
                    linear_stiffness_n_m, element_stiffness_n_m, yield_force_n,
                    stick_damping=0.0, gravity_stiffness_n_m=0.0, friction=None,
                    weight_n=0.0, substeps=1, tolerance=1e-8, max_iterations=10,
                    max_halvings=8, instability_limit_m=math.inf) -> BiaxialResponse:
    """
    Two-direction run of a spring plus a circular-surface element (module docstring).

    Parameters
    ----------
    acceleration_1_m_s2, acceleration_2_m_s2 : array-like
        The pair's components (same step); the shorter is padded with zeros. [m/s²]
    time_step_s : float
        Sampling interval. [s]
    mass_kg : float
        Mass m. [kg]
    damping_coefficient : float
        Viscous damping c. [N·s/m]
    linear_stiffness_n_m : float
        Linear spring k_lin (αk, or W/R). [N/m]
    element_stiffness_n_m : float
        Elastic stiffness k_p of the element. [N/m]
    yield_force_n : float
        Radius f_p of the circular surface (constant friction: μW). [N]
    stick_damping : float, optional
        Dashpot c_s beside the element's spring (sliding pendulum). [N·s/m]
    gravity_stiffness_n_m : float, optional
        P-Δ stiffness W/h subtracted in every direction. [N/m]
    friction : tuple (μ_fast, μ_slow, a), optional
        Velocity-dependent friction [4]_ with ``weight_n``; a in [s/m]. [-]
    weight_n : float, optional
        Weight W that the friction coefficient multiplies. [N]
    substeps : int
        Sub-steps per record step. [-]
    tolerance : float
        Residual tolerance relative to the ground inertia force. [-]
    max_iterations, max_halvings : int
        Newton–Raphson iterations per step and step halvings. [-]
    instability_limit_m : float
        The run stops once |u| reaches it. [m]

    Returns
    -------
    BiaxialResponse
    """
    a1 = np.asarray(acceleration_1_m_s2, dtype=float)
    a2 = np.asarray(acceleration_2_m_s2, dtype=float)
    n = max(a1.size, a2.size)
    ag = np.zeros((2, n))
    ag[0, :a1.size] = a1
    ag[1, :a2.size] = a2
    w_fric = 0.0
    mu = (0.0, 0.0, 0.0)
    if friction is not None:
        w_fric = float(weight_n)
        mu = tuple(float(x) for x in friction)
    p = np.array([linear_stiffness_n_m, element_stiffness_n_m, yield_force_n,
                  stick_damping, *mu])
    scale = mass_kg * float(np.max(_resultant(ag))) or 1.0
    hist = np.zeros((11, n))
    stats = np.zeros(8)
    integrate_biaxial(ag, float(time_step_s), int(substeps), float(mass_kg),
                      float(damping_coefficient), p, float(gravity_stiffness_n_m), w_fric,
                      tolerance * scale, int(max_iterations), int(max_halvings),
                      float(instability_limit_m), hist, stats)
    stored = int(stats[4])
    hist = hist[:, :stored]
    u, v, at, f = hist[0:2], hist[2:4], hist[4:6], hist[6:8]
    fe = f - linear_stiffness_n_m * u
    strain = 0.5 * linear_stiffness_n_m * float(u[0, -1] ** 2 + u[1, -1] ** 2) \
        - 0.5 * gravity_stiffness_n_m * float(u[0, -1] ** 2 + u[1, -1] ** 2)
    if element_stiffness_n_m > 0.0:
        strain += float(fe[0, -1] ** 2 + fe[1, -1] ** 2) / (2.0 * element_stiffness_n_m)
    e_f = float(hist[10, -1]) - 0.5 * gravity_stiffness_n_m * float(
        u[0, -1] ** 2 + u[1, -1] ** 2)
    energy = {"input_j": float(hist[8, -1]),
              "kinetic_j": 0.5 * mass_kg * float(v[0, -1] ** 2 + v[1, -1] ** 2),
              "damping_j": float(hist[9, -1]), "strain_j": strain,
              "hysteretic_j": e_f - strain}
    res = _resultant(u)
    return BiaxialResponse(
        time_s=np.arange(stored) * time_step_s, displacement_m=u.copy(),
        velocity_m_s=v.copy(), total_accel_m_s2=at.copy(), force_n=f.copy(),
        peak_displacement_m=float(np.max(res)),
        peak_displacement_per_direction_m=tuple(float(x) for x in np.max(np.abs(u), 1)),
        peak_total_accel_m_s2=float(np.max(_resultant(at))),
        peak_force_n=float(np.max(_resultant(f))),
        peak_velocity_m_s=float(np.max(_resultant(v))),
        residual_displacement_m=(float(u[0, -1]), float(u[1, -1])),
        converged=bool(stats[2]), max_iterations_used=int(stats[0]),
        subdivided_steps=int(stats[1]), energy_j=energy, unstable=bool(stats[3]))
