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
* Bouc–Wen: the biaxial model of Park, Wen & Ang [5]_, ``F = a k u + (1−a) F_y z`` with
  coupled hysteretic components z = (z_x, z_y),
  ``u_y ż = A u̇ − |z|^(n−2) z [β(|u̇_x z_x| + |u̇_y z_y|) + γ u̇·z]``, A = 1 and
  γ = 1 − β as in one direction. n = 2 is the published law; for other n the factor
  |z|^(n−2) is our extension, chosen so that motion along an axis gives Wen's
  one-direction law exactly. On |z| = 1, ``d|z|²/dt = 2β[z·u̇ − Σ|u̇_i z_i|]/u_y <= 0``,
  so |z| <= 1. Backward Euler over displacement sub-increments of at most u_y/20, as
  the one-direction model, with the consistent tangent.
* Clough, takeda, flag-shaped: no single standard coupled rule exists; one independent
  one-direction spring of :mod:`sdofreport.core.hysteresis` per direction (common
  practice for uncoupled orthogonal frames, no source). Exactly the one-direction model
  along an axis; not isotropic (a diagonal motion yields at √2 F_y of resultant force).
* Nonlinear damper: the vector form ``F_d = C |u̇|^(α−1) u̇`` (along the velocity,
  magnitude C|u̇|^α), linear below the small velocity v_r of the one-direction damper.
* Hanging items: a compound pendulum hung from one point, small angles, the same
  inertia in every vertical plane: the directions are uncoupled, each the
  one-direction model ``ü + 2ζωu̇ + ω²u = −Γ üg`` (:func:`biaxial_elastic` with
  ``participation``).

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
.. [5] Y. J. Park, Y. K. Wen and A. H.-S. Ang, "Random vibration of hysteretic systems
   under bi-directional ground motions," Earthquake Eng. Struct. Dyn., vol. 14, no. 4,
   pp. 543-557, 1986, doi: 10.1002/eqe.4290140404.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from sdofreport.core._jit import JIT_OPTIONS, njit
from sdofreport.core.hysteresis import _flag_shaped, _initial_state, _peak_oriented

__all__ = ["BiaxialResponse", "biaxial_elastic", "biaxial_hysteresis", "biaxial_plastic",
           "damper_parameters", "friction_at"]


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
    #: max_t |F_d(t)| of the vector damper [N]; None without a damper
    peak_damper_force_n: float | None = None


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
                    damping_ratio, *, stiffness_n_m=None, participation=1.0,
                    method="exact") -> BiaxialResponse:
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
    participation : float, optional
        Γ of a hanging item (compound pendulum, small angles, the same in every vertical
        plane through the pivot): its centre of mass obeys
        ``ü + 2ζωu̇ + ω²u = −Γ üg`` in each direction (module docstring). [-]
    method : str
        Integration method of :func:`sdofreport.core.spectra.oscillator_histories`.

    Returns
    -------
    BiaxialResponse
        Peak resultant displacement = RotD100 spectral displacement [1]_ (Γ = 1).
    """
    from sdofreport.core.spectra import oscillator_histories

    ag = _pair_array(acceleration_1_m_s2, acceleration_2_m_s2)
    n = ag.shape[1]
    u, v, at = np.empty((2, n)), np.empty((2, n)), np.empty((2, n))
    refined = []
    for i in range(2):
        drive = ag[i] * participation if participation != 1.0 else ag[i]
        h = oscillator_histories(drive, time_step_s, np.array([natural_period_s]),
                                 np.array([damping_ratio]), method=method)
        u[i], v[i], at[i] = (h.displacement_m[0], h.velocity_m_s[0],
                             h.total_acceleration_m_s2[0])
        if participation != 1.0:  # the kernel's total is ü + Γüg; the physical ü + üg
            at[i] += (1.0 - participation) * ag[i]
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


#: Length of each direction's element state (the one-direction models' state vector).
_ROW = 16


@njit(**JIT_OPTIONS)
def _element(p, esc, es, u0, u1, v0, v1, dvdu, out):
    """Circular-surface element at trial (u0, u1), velocity (v0, v1), committed plastic
    displacement ``esc[0], esc[1]``, yield force ``p[2]``; writes fx, fy, k11, k12,
    k21, k22 (tangent dF/du), the unloading stiffness per direction to ``out`` and the
    trial plastic displacement to ``es``."""
    k_lin = p[0]
    k_p = p[1]
    f_p = p[2]
    c_s = p[3]
    ex = k_p * (u0 - esc[0]) + c_s * v0
    ey = k_p * (u1 - esc[1]) + c_s * v1
    mag = math.sqrt(ex * ex + ey * ey)
    ke = k_p + c_s * dvdu
    out[6] = k_lin + k_p
    out[7] = k_lin + k_p
    if mag > f_p:
        nx = ex / mag
        ny = ey / mag
        s = f_p / mag * ke
        out[0] = k_lin * u0 + f_p * nx
        out[1] = k_lin * u1 + f_p * ny
        es[0] = u0 - f_p * nx / k_p
        es[1] = u1 - f_p * ny / k_p
        out[2] = k_lin + s * (1.0 - nx * nx)
        out[3] = -s * nx * ny
        out[4] = out[3]
        out[5] = k_lin + s * (1.0 - ny * ny)
    else:
        es[0] = esc[0]
        es[1] = esc[1]
        out[0] = k_lin * u0 + ex
        out[1] = k_lin * u1 + ey
        out[2] = k_lin + ke
        out[3] = 0.0
        out[4] = 0.0
        out[5] = k_lin + ke


@njit(**JIT_OPTIONS)
def _pwa_rate(zx, zy, dx, dy, n, beta, gamma):
    """Φ(z, d) of the Park–Wen–Ang evolution law (A = 1), ``dz = Φ(z, du) / u_y``:
    ``Φ = d − |z|^(n−2) z [β(|d_x z_x| + |d_y z_y|) + γ d·z]``, with ∂Φ/∂z (jxx, jxy,
    jyx, jyy) and ∂Φ/∂d (bxx, bxy, byx, byy)."""
    r2 = zx * zx + zy * zy
    if r2 > 0.0:
        w = r2 ** (0.5 * n - 1.0)  # |z|^(n−2)
        dw = (n - 2.0) * w / r2  # (∂w/∂z_j) / z_j
    else:  # w only ever multiplies z or terms that vanish with it
        w = 0.0
        dw = 0.0
    sx = 1.0 if zx > 0.0 else (-1.0 if zx < 0.0 else 0.0)
    sy = 1.0 if zy > 0.0 else (-1.0 if zy < 0.0 else 0.0)
    tx = 1.0 if dx > 0.0 else (-1.0 if dx < 0.0 else 0.0)
    ty = 1.0 if dy > 0.0 else (-1.0 if dy < 0.0 else 0.0)
    s = beta * (abs(dx * zx) + abs(dy * zy)) + gamma * (dx * zx + dy * zy)
    phx = dx - w * s * zx
    phy = dy - w * s * zy
    gsx = beta * abs(dx) * sx + gamma * dx  # ∂S/∂z_x
    gsy = beta * abs(dy) * sy + gamma * dy
    jxx = -dw * zx * s * zx - w * gsx * zx - w * s
    jxy = -dw * zy * s * zx - w * gsy * zx
    jyx = -dw * zx * s * zy - w * gsx * zy
    jyy = -dw * zy * s * zy - w * gsy * zy - w * s
    hx = beta * abs(zx) * tx + gamma * zx  # ∂S/∂d_x
    hy = beta * abs(zy) * ty + gamma * zy
    return (phx, phy, jxx, jxy, jyx, jyy, 1.0 - w * zx * hx, -w * zx * hy,
            -w * zy * hx, 1.0 - w * zy * hy)


@njit(**JIT_OPTIONS)
def _pwa_increment(zx0, zy0, dx, dy, inv_uy, n, beta, gamma):
    """One backward-Euler increment ``z1 = z0 + Φ(z1, d)/u_y`` by Newton's method with a
    halving line search; z1 and the 2×2 inverse Jacobian (i11, i12, i21, i22) with
    ∂Φ/∂d at z1 (bxx, bxy, byx, byy)."""
    r = _pwa_rate(zx0, zy0, dx, dy, n, beta, gamma)
    zx = zx0 + inv_uy * r[0]  # explicit Euler predictor
    zy = zy0 + inv_uy * r[1]
    r = _pwa_rate(zx, zy, dx, dy, n, beta, gamma)
    gx = zx - zx0 - inv_uy * r[0]
    gy = zy - zy0 - inv_uy * r[1]
    for _it in range(60):
        a11 = 1.0 - inv_uy * r[2]
        a12 = -inv_uy * r[3]
        a21 = -inv_uy * r[4]
        a22 = 1.0 - inv_uy * r[5]
        det = a11 * a22 - a12 * a21
        if math.sqrt(gx * gx + gy * gy) <= 1e-13 or det == 0.0:
            break
        sx = (a22 * gx - a12 * gy) / det
        sy = (a11 * gy - a21 * gx) / det
        norm = math.sqrt(gx * gx + gy * gy)
        step = 1.0
        nx, ny, rn, hx, hy = zx, zy, r, gx, gy
        for _half in range(30):
            nx = zx - step * sx
            ny = zy - step * sy
            rn = _pwa_rate(nx, ny, dx, dy, n, beta, gamma)
            hx = nx - zx0 - inv_uy * rn[0]
            hy = ny - zy0 - inv_uy * rn[1]
            if math.sqrt(hx * hx + hy * hy) < norm:
                break
            step *= 0.5
        moved = step * math.sqrt(sx * sx + sy * sy)
        zx, zy, r, gx, gy = nx, ny, rn, hx, hy
        if moved <= 1e-12:
            break
    a11 = 1.0 - inv_uy * r[2]
    a12 = -inv_uy * r[3]
    a21 = -inv_uy * r[4]
    a22 = 1.0 - inv_uy * r[5]
    det = a11 * a22 - a12 * a21
    return (zx, zy, a22 / det, -a12 / det, -a21 / det, a11 / det, r[6], r[7], r[8],
            r[9])


@njit(**JIT_OPTIONS)
def _bouc_wen_2d(q, esc, es, ucx, ucy, u0, u1, out):
    """Biaxial Bouc–Wen of Park, Wen & Ang [5]_ from the committed state (u_c, z in
    ``esc[0], esc[1]``) to the trial (u0, u1), z written to ``es``:
    ``F = a k u + (1−a) F_y z``; backward Euler over sub-increments of at most u_y/20
    (as the one-direction model in :mod:`sdofreport.core.hysteresis`) with its
    consistent tangent. ``q`` = [k, F_y, a, n, β, γ]."""
    k = q[0]
    fy = q[1]
    a = q[2]
    n = q[3]
    beta = q[4]
    gamma = q[5]
    inv_uy = k / fy
    zx = esc[0]
    zy = esc[1]
    dux = u0 - ucx
    duy = u1 - ucy
    mag = math.sqrt(dux * dux + duy * duy)
    if mag == 0.0:  # tangent of further loading (every sign(d_i z_i) = +1)
        r2 = zx * zx + zy * zy
        w = (beta + gamma) * (r2 ** (0.5 * n - 1.0) if r2 > 0.0 else 0.0)
        t11 = (1.0 - w * zx * zx) * inv_uy
        t12 = -w * zx * zy * inv_uy
        t21 = t12
        t22 = (1.0 - w * zy * zy) * inv_uy
    else:
        pieces = 1 + int(mag * (20.0 * inv_uy))
        if pieces > 10000:
            pieces = 10000
        dx = dux / pieces
        dy = duy / pieces
        t11 = 0.0
        t12 = 0.0
        t21 = 0.0
        t22 = 0.0
        c = inv_uy / pieces
        for _ in range(pieces):
            zx, zy, i11, i12, i21, i22, b11, b12, b21, b22 = _pwa_increment(
                zx, zy, dx, dy, inv_uy, n, beta, gamma)
            # dz₁/dΔu = J⁻¹ (dz₀/dΔu + ∂Φ/∂d / (u_y · pieces))
            m11 = t11 + c * b11
            m12 = t12 + c * b12
            m21 = t21 + c * b21
            m22 = t22 + c * b22
            t11 = i11 * m11 + i12 * m21
            t12 = i11 * m12 + i12 * m22
            t21 = i21 * m11 + i22 * m21
            t22 = i21 * m12 + i22 * m22
    es[0] = zx
    es[1] = zy
    h = (1.0 - a) * fy
    out[0] = a * k * u0 + h * zx
    out[1] = a * k * u1 + h * zy
    out[2] = a * k + h * t11
    out[3] = h * t12
    out[4] = h * t21
    out[5] = a * k + h * t22
    out[6] = k
    out[7] = k


@njit(**JIT_OPTIONS)
def _springs(peak, flag, esc, es, u0, u1, out):
    """Two independent one-direction springs of :mod:`sdofreport.core.hysteresis`, one
    per direction: clough or takeda with parameters ``peak``, else flag-shaped with
    ``flag`` (the other None, so only one model is compiled); state rows ``esc``
    (committed) and ``es`` (trial) in that module's layout."""
    for d in range(2):
        x = u0 if d == 0 else u1
        sc = esc[d * _ROW:(d + 1) * _ROW]
        st = es[d * _ROW:(d + 1) * _ROW]
        for i in range(sc.size):
            st[i] = sc[i]
        f = kt = ku = 0.0
        # separate tests on None, so that the compiler drops the model not given
        if peak is not None:
            f, kt, ku = _peak_oriented(peak, sc, x, st)
        if flag is not None:
            f, kt, ku = _flag_shaped(flag, sc, x, st)
        st[0] = x
        st[1] = f
        out[d] = f
        out[6 + d] = ku
        if d == 0:
            out[2] = kt
        else:
            out[5] = kt
    out[3] = 0.0
    out[4] = 0.0


@njit(**JIT_OPTIONS)
def _damper_2d(vx, vy, dmp, fd):
    """Vector damper ``F_d = C |v|^(α−1) v`` (along the velocity, magnitude C|v|^α), linear
    below ``v_r`` as the one-direction damper of :mod:`sdofreport.core.hysteresis`;
    ``dmp`` = [C, α, v_r]; writes fx, fy and dF/dv (d11, d12, d22) to ``fd``."""
    c_d = dmp[0]
    a_d = dmp[1]
    v_r = dmp[2]
    sp = math.sqrt(vx * vx + vy * vy)
    if sp <= v_r:
        slope = c_d * v_r ** (a_d - 1.0)
        fd[0] = slope * vx
        fd[1] = slope * vy
        fd[2] = slope
        fd[3] = 0.0
        fd[4] = slope
        return
    slope = c_d * sp ** (a_d - 1.0) if a_d != 1.0 else c_d
    fd[0] = slope * vx
    fd[1] = slope * vy
    e = (a_d - 1.0) * slope / (sp * sp)
    fd[2] = slope + e * vx * vx
    fd[3] = e * vx * vy
    fd[4] = slope + e * vy * vy


@njit(**JIT_OPTIONS)
def integrate_biaxial(ag, dt, n_sub, m, c, p, k_geo, w_fric, tol_force, max_iter,
                      max_halvings, u_stop, hist, stats, bouc=None, peak=None, flag=None,
                      damper=None):
    """
    Newmark average acceleration + Newton–Raphson through a pair.

    ``ag`` (2, npts). The restoring element is exactly one of: the circular surface
    ``p`` = [k_lin, k_p, f_p, c_s, μ_fast, μ_slow, a]; ``bouc`` (Park–Wen–Ang, [k, F_y,
    a, n, β, γ]); ``peak`` (independent clough/takeda springs) or ``flag`` (independent
    flag-shaped springs; both the parameter vector of
    :meth:`sdofreport.core.hysteresis.Hysteresis.kernel_parameters`); the others are
    None, so the compiler drops them (numba prunes branches on None arguments).
    ``damper`` = [C, α, v_r] adds the vector damper. When ``w_fric`` > 0 the yield force
    is ``w_fric · μ(|v|)`` at the start of each sub-step and k_p keeps ``p[1]``. ``hist`` (11, npts): u1, u2, v1, v2, at1, at2, F1, F2,
    E_input, E_viscous, ∫F·du. ``stats`` (12,): max iterations, subdivided steps, all
    converged, stopped, samples stored, final |f_element|, element state x and y (plastic
    displacement or z), peak |F_d|, E_damper, final unloading stiffness x and y.
    Short names (DEVELOPERS.md, names of inputs): ``ag`` acceleration_1/2_m_s2 [m/s²],
    ``dt`` time_step_s [s], ``n_sub`` sub-steps per sample, ``m`` mass_kg [kg].
    """
    npts = ag.shape[1]
    q = np.zeros(7)
    if p is not None:
        q = p.copy()
    out = np.zeros(8)
    fd = np.zeros(5)
    # committed state and the state of the attempt: pairs u, v, ü, F, F_d (x, y); flat
    # arrays copied by loops: a 2-D slice assignment costs seconds of compile time
    state = np.zeros(10)
    trial = np.zeros(10)
    u, v, a, f = state[0:2], state[2:4], state[4:6], state[6:8]
    tu, tv, ta, tf, tfd = trial[0:2], trial[2:4], trial[4:6], trial[6:8], trial[8:10]
    # element state per direction: committed, of the attempt, of the iterate
    # (the circle and Bouc–Wen keep x, y in entries 0, 1; the springs one row each)
    width = 2
    if peak is not None:
        width = 2 * _ROW
    if flag is not None:
        width = 2 * _ROW
    esc = np.zeros(2 * _ROW)
    etr = np.zeros(2 * _ROW)
    est = np.zeros(2 * _ROW)
    if peak is not None:
        _initial_state(1, peak, esc[:_ROW])
        _initial_state(1, peak, esc[_ROW:])
    a[0] = -ag[0, 0]
    a[1] = -ag[1, 0]
    e_in = 0.0
    e_d = 0.0
    e_f = 0.0
    e_x = 0.0
    peak_fd = 0.0
    iters_max = 0
    n_split = 0
    all_ok = 1
    stopped = 0
    for j in range(11):
        hist[j, 0] = 0.0
    stored = 1
    for i in range(npts - 1):
        n_try = n_sub
        for attempt in range(max_halvings + 1):
            last = attempt == max_halvings
            for j in range(10):
                trial[j] = state[j]
            for j in range(width):
                etr[j] = esc[j]
            t_in = e_in
            t_d = e_d
            t_f = e_f
            t_x = e_x
            t_pd = peak_fd
            t_it = iters_max
            ok = True
            h = dt / n_try
            kdyn = 4.0 * m / (h * h) + 2.0 * c / h
            for s in range(n_try):
                if p is not None:
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
                    # one element is given, the others are None and not compiled
                    if p is not None:
                        _element(q, etr, est, ux, uy, vx, vy, 2.0 / h, out)
                    if bouc is not None:
                        _bouc_wen_2d(bouc, etr, est, tu[0], tu[1], ux, uy, out)
                    if peak is not None:
                        _springs(peak, None, etr, est, ux, uy, out)
                    if flag is not None:
                        _springs(None, flag, etr, est, ux, uy, out)
                    rx = -m * g01 - m * ax - c * vx - out[0] + k_geo * ux
                    ry = -m * g11 - m * ay - c * vy - out[1] + k_geo * uy
                    k11 = kdyn + out[2] - k_geo
                    k12 = out[3]
                    k21 = out[4]
                    k22 = kdyn + out[5] - k_geo
                    if damper is not None:
                        _damper_2d(vx, vy, damper, fd)
                        rx -= fd[0]
                        ry -= fd[1]
                        k11 += 2.0 / h * fd[2]
                        k12 += 2.0 / h * fd[3]
                        k21 += 2.0 / h * fd[3]
                        k22 += 2.0 / h * fd[4]
                    if math.sqrt(rx * rx + ry * ry) <= tol_force:
                        conv = True
                        break
                    if it == max_iter:
                        break
                    det = k11 * k22 - k12 * k21
                    if k11 <= 0.0 or det <= 0.0:  # unusable tangent: the mass term only
                        k11 = 4.0 * m / (h * h)
                        k22 = k11
                        k12 = 0.0
                        k21 = 0.0
                        det = k11 * k22
                    dx = dx + (k22 * rx - k12 * ry) / det
                    dy = dy + (k11 * ry - k21 * rx) / det
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
                if damper is not None:
                    t_x += 0.5 * (tfd[0] + fd[0]) * dx + 0.5 * (tfd[1] + fd[1]) * dy
                    tfd[0] = fd[0]
                    tfd[1] = fd[1]
                    mag_d = math.sqrt(fd[0] * fd[0] + fd[1] * fd[1])
                    if mag_d > t_pd:
                        t_pd = mag_d
                tu[0] = ux
                tu[1] = uy
                tv[0] = vx
                tv[1] = vy
                ta[0] = ax
                ta[1] = ay
                tf[0] = out[0]
                tf[1] = out[1]
                for j in range(width):
                    etr[j] = est[j]
            if ok or last:
                if attempt > 0:
                    n_split += 1
                if not ok:
                    all_ok = 0
                for j in range(10):
                    state[j] = trial[j]
                for j in range(width):
                    esc[j] = etr[j]
                e_in = t_in
                e_d = t_d
                e_f = t_f
                e_x = t_x
                peak_fd = t_pd
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
        # Ibarra, Medina & Krawinkler (2005): no strength left in a direction
        if peak is not None and (esc[13] <= 0.0 or esc[_ROW + 13] <= 0.0):
            stopped = 1
            break
    stats[0] = iters_max
    stats[1] = n_split
    stats[2] = all_ok
    stats[3] = stopped
    stats[4] = stored
    stats[5] = q[2]
    stats[6] = esc[0]
    stats[7] = esc[1]
    stats[8] = peak_fd
    stats[9] = e_x
    stats[10] = out[6]
    stats[11] = out[7]


def _pair_array(acceleration_1_m_s2, acceleration_2_m_s2) -> np.ndarray:
    """The two components as one (2, npts) array, the shorter padded with zeros."""
    a1 = np.asarray(acceleration_1_m_s2, dtype=float)
    a2 = np.asarray(acceleration_2_m_s2, dtype=float)
    ag = np.zeros((2, max(a1.size, a2.size)))
    ag[0, :a1.size] = a1
    ag[1, :a2.size] = a2
    return ag


def damper_parameters(damper, reference_displacement_m, omega_rad_s, ground=None):
    """
    The kernel's vector-damper parameters [C, α, v_r], or None without a damper.

    ``v_r = DAMPER_LINEAR_BELOW · u_ref · ω`` is the velocity below which the law is
    linear, the rule of the one-direction damper
    (:func:`sdofreport.core.nonlinear.nonlinear_response`); without a yield displacement
    (``reference_displacement_m`` not finite) u_ref is ``max|üg|/ω²`` of the resultant.

    Parameters
    ----------
    damper : sdofreport.core.hysteresis.Damper or None
        C [N·(s/m)^α] and α [-].
    reference_displacement_m : float
        The system's yield (or slip) displacement. [m]
    omega_rad_s : float
        Circular frequency ω of the system. [rad/s]
    ground : tuple of two array-like, optional
        The pair's components, for u_ref without a yield displacement. [m/s²]
    """
    from sdofreport.core.hysteresis import DAMPER_LINEAR_BELOW

    if damper is None:
        return None
    w = max(omega_rad_s, 1e-12)
    u_ref = reference_displacement_m
    if not math.isfinite(u_ref):
        u_ref = float(np.max(_resultant(_pair_array(*ground)))) / w ** 2 or 1.0
    return np.array([damper.coefficient, damper.exponent, DAMPER_LINEAR_BELOW * u_ref * w])


def biaxial_plastic(acceleration_1_m_s2, acceleration_2_m_s2, time_step_s, *, mass_kg,
                    damping_coefficient, linear_stiffness_n_m, element_stiffness_n_m, yield_force_n,
                    stick_damping=0.0, gravity_stiffness_n_m=0.0, friction=None,
                    weight_n=0.0, damper=None, substeps=1, tolerance=1e-8,
                    max_iterations=10, max_halvings=8,
                    instability_limit_m=math.inf) -> BiaxialResponse:
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
        Elastic stiffness k_p of the element (0 with ``yield_force_n`` 0: a linear
        spring only). [N/m]
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
    damper : array-like [C, α, v_r], optional
        Vector damper ``C |u̇|^α`` along the velocity (:func:`damper_parameters`).
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
    w_fric = 0.0
    mu = (0.0, 0.0, 0.0)
    if friction is not None:
        w_fric = float(weight_n)
        mu = tuple(float(x) for x in friction)
    p = np.array([linear_stiffness_n_m, element_stiffness_n_m, yield_force_n,
                  stick_damping, *mu])
    return _run(_pair_array(acceleration_1_m_s2, acceleration_2_m_s2), time_step_s, mass_kg,
                damping_coefficient, p, {}, w_fric, damper, gravity_stiffness_n_m,
                substeps, tolerance, max_iterations, max_halvings, instability_limit_m)


def biaxial_hysteresis(acceleration_1_m_s2, acceleration_2_m_s2, time_step_s, model, *,
                       mass_kg, damping_ratio, damper=None, gravity_stiffness_n_m=0.0, substeps=1,
                       tolerance=1e-8, max_iterations=10, max_halvings=8,
                       instability_limit_m=math.inf) -> BiaxialResponse:
    """
    Two-direction run of a yielding system of :mod:`sdofreport.core.hysteresis`.

    ``bilinear``: the circular surface (module docstring); ``bouc-wen``: Park, Wen & Ang
    [5]_; ``clough``, ``takeda``, ``flag-shaped``: one independent spring per direction
    (module docstring). Viscous damping ``c = 2ζ √(m (k − W/h))``, as the one-direction
    model.

    Parameters
    ----------
    acceleration_1_m_s2, acceleration_2_m_s2 : array-like
        The pair's components (same step); the shorter is padded with zeros. [m/s²]
    time_step_s : float
        Sampling interval. [s]
    model : sdofreport.core.hysteresis.Hysteresis
        The model, the same in both directions.
    mass_kg : float
        Mass m. [kg]
    damping_ratio : float
        Fraction of critical damping at the initial stiffness. [-]
    damper : sdofreport.core.hysteresis.Damper, optional
        Vector damper ``C |u̇|^α`` along the velocity.
    gravity_stiffness_n_m : float, optional
        P-Δ stiffness W/h. [N/m]
    substeps, tolerance, max_iterations, max_halvings, instability_limit_m
        As :func:`biaxial_plastic`.

    Returns
    -------
    BiaxialResponse
    """
    ag = _pair_array(acceleration_1_m_s2, acceleration_2_m_s2)
    k, fy, alpha = model.stiffness_n_m, model.yield_strength_n, model.hardening_ratio
    k_geo = float(gravity_stiffness_n_m)
    omega = math.sqrt((k - k_geo) / mass_kg)
    dmp = damper_parameters(damper, fy / k, omega)
    code, params = model.kernel_parameters()
    p = None
    if code == 0:  # bilinear: the circular surface
        p = np.array([alpha * k, (1.0 - alpha) * k, (1.0 - alpha) * fy, 0.0, 0.0, 0.0,
                      0.0])
    element = {0: {}, 1: {"peak": params}, 2: {"bouc": params}, 3: {"flag": params}}[code]
    return _run(ag, time_step_s, mass_kg, 2.0 * damping_ratio * mass_kg * omega, p,
                element, 0.0, dmp, k_geo, substeps, tolerance, max_iterations,
                max_halvings, instability_limit_m)


def _run(ag, time_step_s, mass_kg, damping_coefficient, p, element: dict, w_fric, damper,
         gravity_stiffness_n_m, substeps, tolerance, max_iterations, max_halvings,
         instability_limit_m) -> BiaxialResponse:
    """Run :func:`integrate_biaxial` and gather the histories, peaks and energies."""
    n = ag.shape[1]
    scale = mass_kg * float(np.max(_resultant(ag))) or 1.0
    hist = np.zeros((11, n))
    stats = np.zeros(12)
    kwargs = dict(element)
    if damper is not None:
        kwargs["damper"] = np.asarray(damper, dtype=float)
    integrate_biaxial(ag, float(time_step_s), int(substeps), float(mass_kg),
                      float(damping_coefficient), p, float(gravity_stiffness_n_m), w_fric,
                      tolerance * scale, int(max_iterations), int(max_halvings),
                      float(instability_limit_m), hist, stats, **kwargs)
    stored = int(stats[4])
    hist = hist[:, :stored]
    u, v, at, f = hist[0:2], hist[2:4], hist[4:6], hist[6:8]
    u2_end = float(u[0, -1] ** 2 + u[1, -1] ** 2)
    k_geo = gravity_stiffness_n_m
    if element:  # f²/(2 k_u) per direction, k_u the unloading stiffness (as in 1-D)
        strain = sum(float(f[d, -1] ** 2) / (2.0 * stats[10 + d])
                     for d in range(2) if stats[10 + d] > 0.0) - 0.5 * k_geo * u2_end
    else:
        k_lin, k_p = p[0], p[1]
        fe = f - k_lin * u
        strain = 0.5 * k_lin * u2_end - 0.5 * k_geo * u2_end
        if k_p > 0.0:
            strain += float(fe[0, -1] ** 2 + fe[1, -1] ** 2) / (2.0 * k_p)
    e_f = float(hist[10, -1]) - 0.5 * k_geo * u2_end
    energy = {"input_j": float(hist[8, -1]),
              "kinetic_j": 0.5 * mass_kg * float(v[0, -1] ** 2 + v[1, -1] ** 2),
              "damping_j": float(hist[9, -1]), "strain_j": strain,
              "hysteretic_j": e_f - strain}
    if damper is not None:
        energy["damper_j"] = float(stats[9])
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
        subdivided_steps=int(stats[1]), energy_j=energy, unstable=bool(stats[3]),
        peak_damper_force_n=float(stats[8]) if damper is not None else None)
