"""
Nonlinear SDOF response: bilinear hysteresis and the sliding (friction) pendulum.

Equation of motion (relative displacement u, base acceleration üg):

    m ü + c u̇ + F(u) = −m üg(t).

Both restoring-force models are one parallel pair: a linear spring ``k_lin`` and an
elastic–perfectly-plastic element (stiffness ``k_p``, yield force ``f_p``) with a
committed plastic displacement ``u_p``:

* bilinear with kinematic hardening (initial stiffness k, yield strength Fy, ratio α):
  ``k_lin = αk``, ``k_p = (1−α)k``, ``f_p = (1−α)Fy``; yield at ``u_y = Fy/k``, post-yield
  stiffness ``αk``, and the yield surface translates with the spring (kinematic);
* sliding pendulum [3]_: ``F = (W/R) u + μW z`` with the friction sign z regularised as an
  elastic–perfectly-plastic element of yield force ``μW`` and initial stiffness
  ``μW/u_y``: ``k_lin = W/R``, ``k_p = μW/u_y``, ``f_p = μW``. The default
  ``u_y = 0.25 mm`` (:data:`DEFAULT_FRICTION_YIELD_DISPLACEMENT_M`) is common practice
  (no source): small against the slips of interest, large enough that the stick-phase
  period ``2π √(u_y/(μ g))`` is not far below the usual record steps. The price: the
  friction force takes about ``√(2 u_y / a)`` to build up under a base acceleration a, so
  sliding starts slightly early (about 2 % extra slip for a 0.5 g, 0.5 s pulse with
  μ = 0.2); pass a smaller ``yield_displacement_m`` and a finer step where that matters.

Integration: Newmark average acceleration (γ = ½, β = ¼) [1]_ with Newton–Raphson
iteration on the equilibrium at the end of each step, solving for the displacement
increment as in the algorithm of [2]_ §5.7 (Table 5.7.1). The residual
``p₁ − m ü₁ − c u̇₁ − F(u₁)`` is driven below ``tolerance × force scale``. When a step
does not converge within ``max_iterations``, the whole record step is redone with 2, 4,
... equal sub-steps (up to ``max_halvings`` halvings) under linearly interpolated ground
acceleration; if even the finest split fails, the last iterate is accepted and
``converged`` is False. The compiled loop is
:func:`sdofreport.core.hysteresis.integrate_model`, shared by every hysteresis model.

Energy (relative formulation, Uang and Bertero [4]_): input ``−∫ m üg du``, damping
``∫ c u̇ du``, restoring work ``∫ F du``, all by the trapezoidal rule over each step, and
kinetic ``½ m u̇²``. For Newmark average acceleration ``Δu = h (u̇₀ + u̇₁)/2``, so the
trapezoidal sums balance to the equilibrium residual: a large imbalance flags a bug or an
unconverged step, and a fine step makes the sums close to the true integrals.

References
----------
.. [1] N. M. Newmark, "A method of computation for structural dynamics," J. Eng. Mech.
   Div. ASCE, vol. 85, no. EM3, pp. 67-94, 1959.
.. [2] A. K. Chopra, *Dynamics of Structures*, 5th ed. Hoboken, NJ, USA: Pearson, 2017.
.. [3] V. A. Zayas, S. S. Low and S. A. Mahin, "A simple pendulum technique for achieving
   seismic isolation," Earthquake Spectra, vol. 6, no. 2, pp. 317-333, 1990,
   doi: 10.1193/1.1585564.
.. [4] C.-M. Uang and V. V. Bertero, "Evaluation of seismic energy in structures,"
   Earthquake Eng. Struct. Dyn., vol. 19, no. 1, pp. 77-90, 1990,
   doi: 10.1002/eqe.4290190108.
"""

from __future__ import annotations

import math
import os
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass

import numpy as np

from sdofreport.core import _checks
from sdofreport.core.units import G

__all__ = [
    "DEFAULT_FRICTION_YIELD_DISPLACEMENT_M",
    "DEFAULT_MAX_HALVINGS",
    "DEFAULT_MAX_ITERATIONS",
    "DEFAULT_TOLERANCE",
    "Bilinear",
    "NonlinearResponse",
    "SlidingPendulum",
    "bilinear",
    "nonlinear_response",
    "sliding_pendulum_model",
]

#: Yield displacement that regularises the friction sign [m]. Common practice (no source).
DEFAULT_FRICTION_YIELD_DISPLACEMENT_M = 0.25e-3
#: Newton–Raphson iterations allowed per step before the step is split. Our choice: a
#: bilinear step converges in 1 (elastic) to 3 (two branch changes) iterations.
DEFAULT_MAX_ITERATIONS = 10
#: Largest number of step halvings (2**8 = 256 sub-steps). Our choice; no source.
DEFAULT_MAX_HALVINGS = 8
#: Residual tolerance relative to the force scale (module docstring). Our choice: far
#: above round-off (~1e-12 of the scale for long periods and fine steps), far below
#: any engineering significance.
DEFAULT_TOLERANCE = 1e-8


# ------------------------------------------------------------------------ models
@dataclass(frozen=True)
class Bilinear:
    """Bilinear hysteresis with kinematic hardening.

    Per unit mass (``mass_kg=None`` in :func:`nonlinear_response`) the stiffness is in
    [N/(m·kg)] = [1/s²] (that is ω²) and the strength in [N/kg] = [m/s²].
    """

    #: initial (elastic) stiffness k [N/m]
    stiffness_n_m: float
    #: yield strength Fy [N]
    yield_strength_n: float
    #: post-yield stiffness ratio α, 0 <= α < 1 (0: elastic–perfectly-plastic) [-]
    hardening_ratio: float = 0.0

    @property
    def yield_displacement_m(self) -> float:
        """u_y = Fy / k [m]."""
        return self.yield_strength_n / self.stiffness_n_m


@dataclass(frozen=True)
class SlidingPendulum:
    """Friction pendulum bearing; ``weight_n=None`` means per unit mass (W/m = g)."""

    #: weight carried W [N], or None for per-unit-mass work
    weight_n: float | None
    #: radius of the sliding surface R [m]; inf for a flat slider (W/R = 0)
    radius_m: float
    #: friction coefficient μ, 0 <= μ < 1 [-]
    friction: float
    #: regularising yield displacement of the friction element [m]
    yield_displacement_m: float = DEFAULT_FRICTION_YIELD_DISPLACEMENT_M


_number = _checks.number


def _positive(value, name: str, unit: str, *, allow_inf=False) -> float:
    x = _number(value, name, unit)
    if math.isnan(x) or x <= 0.0 or (math.isinf(x) and not allow_inf):
        kind = "> 0 (inf allowed)" if allow_inf else "finite and > 0"
        raise ValueError(f"{name} must be {kind} [{unit}]; got {value!r}")
    return x


def bilinear(stiffness_n_m, *, yield_strength_n=None, yield_displacement_m=None,
             hardening_ratio=0.0) -> Bilinear:
    """
    A checked bilinear model from the strength Fy or the yield displacement u_y.

    Parameters
    ----------
    stiffness_n_m : float
        Initial stiffness k, > 0. [N/m]
    yield_strength_n : float, optional
        Yield strength Fy, > 0; inf gives a linear system. Give this or
        ``yield_displacement_m``. [N]
    yield_displacement_m : float, optional
        Yield displacement u_y = Fy/k, > 0. [m]
    hardening_ratio : float, optional
        Post-yield stiffness ratio α, 0 <= α < 1. [-]

    Returns
    -------
    Bilinear

    References
    ----------
    .. [1] A. K. Chopra, *Dynamics of Structures*, 5th ed. Hoboken, NJ, USA: Pearson,
       2017, sec. 7.1.
    """
    k = _positive(stiffness_n_m, "stiffness_n_m", "N/m")
    if (yield_strength_n is None) == (yield_displacement_m is None):
        raise ValueError(
            "bilinear: give exactly one of yield_strength_n [N] and yield_displacement_m "
            f"[m]; got yield_strength_n={yield_strength_n!r}, "
            f"yield_displacement_m={yield_displacement_m!r}"
        )
    if yield_strength_n is not None:
        fy = _positive(yield_strength_n, "yield_strength_n", "N", allow_inf=True)
    else:
        fy = k * _positive(yield_displacement_m, "yield_displacement_m", "m", allow_inf=True)
    a = _checks.ratio(hardening_ratio, "hardening_ratio")
    return Bilinear(stiffness_n_m=k, yield_strength_n=fy, hardening_ratio=a)


def sliding_pendulum_model(weight_n, radius_m, friction,
                           yield_displacement_m=DEFAULT_FRICTION_YIELD_DISPLACEMENT_M
                           ) -> SlidingPendulum:
    """
    A checked sliding-pendulum model.

    Parameters
    ----------
    weight_n : float or None
        Weight carried W, > 0; None for per-unit-mass work (W/m = g). [N]
    radius_m : float
        Radius of curvature R, > 0; ``inf`` for a flat slider (pure friction). [m]
    friction : float
        Friction coefficient μ, 0 <= μ < 1. [-]
    yield_displacement_m : float, optional
        Regularising yield displacement u_y of the friction element, > 0; default
        0.25 mm, common practice (no source). [m]

    Returns
    -------
    SlidingPendulum

    References
    ----------
    .. [1] V. A. Zayas, S. S. Low and S. A. Mahin, "A simple pendulum technique for
       achieving seismic isolation," Earthquake Spectra, vol. 6, no. 2, pp. 317-333,
       1990, doi: 10.1193/1.1585564.
    """
    w = None if weight_n is None else _positive(weight_n, "weight_n", "N")
    r = _positive(radius_m, "radius_m", "m", allow_inf=True)
    mu = _checks.ratio(friction, "friction")
    uy = _positive(yield_displacement_m, "yield_displacement_m", "m")
    return SlidingPendulum(weight_n=w, radius_m=r, friction=mu, yield_displacement_m=uy)


# ------------------------------------------------------------------------ results
@dataclass(frozen=True)
class NonlinearResponse:
    """Response histories, peaks, energies and convergence of one nonlinear run.

    Forces are in [N] and energies in [J] when a mass was given; per unit mass they are
    in [N/kg] = [m/s²] and [J/kg].
    """

    #: sample times [s]
    time_s: np.ndarray
    #: relative displacement u [m]
    displacement_m: np.ndarray
    #: relative velocity u̇ [m/s]
    velocity_m_s: np.ndarray
    #: total acceleration ü + üg [m/s²]
    total_accel_m_s2: np.ndarray
    #: restoring force F(u) [N]
    force_n: np.ndarray
    #: max |u| over every integration step [m]
    peak_displacement_m: float
    #: displacement at the end of the record (no free-vibration tail is added) [m]
    residual_displacement_m: float
    #: max|u| / u_y for bilinear systems; None for the sliding pendulum [-]
    ductility: float | None
    #: max |F| over every integration step [N]
    peak_force_n: float
    #: input energy −∫ m üg du at the end [J]
    input_j: float
    #: kinetic energy ½ m u̇² at the end [J]
    kinetic_j: float
    #: viscous damping energy ∫ c u̇ du [J]
    damping_j: float
    #: recoverable strain energy at the end [J] (bilinear: F²/(2k); pendulum:
    #: ½ (W/R) u² + F_f²/(2 k_f))
    strain_j: float
    #: hysteretic (or friction) energy ∫ F du − strain [J]
    hysteretic_j: float
    #: |input + E0 − (kinetic + damping + strain + hysteretic)| / max(|input + E0|, tiny),
    #: E0 the kinetic plus strain energy at t = 0 (zero from rest) [-]
    imbalance: float
    #: cumulative energy histories, keys input, kinetic, damping, strain, hysteretic [J]
    energy_histories_j: dict
    #: largest Newton–Raphson iteration count in any accepted step (attempts that were
    #: abandoned and split are counted in ``subdivided_steps`` instead) [-]
    max_iterations_used: int
    #: record steps that had to be split into sub-steps [-]
    subdivided_steps: int
    #: True when every step met the tolerance
    converged: bool
    #: energy dissipated by the supplemental damper ∫F_d du [J]
    damper_j: float = 0.0
    #: gravity (P-Δ) potential −½ (W/h) u² at the end [J]
    gravity_j: float = 0.0
    #: max |F_d| of the supplemental damper [N]
    peak_damper_force_n: float = 0.0
    #: True when |u| reached ``instability_limit_m`` (the histories end there)
    unstable: bool = False
    #: displacement bound of the instability test (inf: none) [m]
    instability_limit_m: float = math.inf


def _check_workers(workers) -> int:
    """Threads to use: None means every core the process may run on."""
    if workers is None:
        try:
            return max(1, len(os.sched_getaffinity(0)))
        except AttributeError:  # not on Linux
            return max(1, os.cpu_count() or 1)
    return _check_positive_int(workers, "workers", 1)


def _for_each_period(count: int, workers: int, work) -> None:
    """
    Call ``work(j)`` for j = 0 .. count−1, on ``workers`` threads.

    The compiled kernels release the GIL (``nogil``), so threads run them in parallel
    without copying the record to other processes. Periods are dealt out round-robin
    (short and long periods cost about the same once sub-steps are counted).
    """
    if workers <= 1 or count <= 1:
        for j in range(count):
            work(j)
        return
    n = min(workers, count)

    def chunk(first):
        for j in range(first, count, n):
            work(j)

    with ThreadPoolExecutor(max_workers=n) as pool:
        for future in [pool.submit(chunk, first) for first in range(n)]:
            future.result()


_check_positive_int = _checks.integer
_check_damping = _checks.damping_ratio


def _check_solver(tolerance, max_iterations, max_halvings):
    tol = _number(tolerance, "tolerance", "-")
    if not (math.isfinite(tol) and tol > 0.0):
        raise ValueError(f"tolerance must be finite and > 0 [-]; got {tolerance!r}")
    return (tol, _check_positive_int(max_iterations, "max_iterations", 1),
            _check_positive_int(max_halvings, "max_halvings", 0))


def nonlinear_response(acceleration_m_s2, time_step_s, system, damping_ratio, *,
                       mass_kg=None, initial_displacement_m=0.0, initial_velocity_m_s=0.0,
                       substeps=1, tolerance=DEFAULT_TOLERANCE,
                       max_iterations=DEFAULT_MAX_ITERATIONS,
                       max_halvings=DEFAULT_MAX_HALVINGS, gravity_stiffness_n_m=0.0,
                       damper=None, instability_limit_m=None) -> NonlinearResponse:
    """
    Response of a hysteretic or sliding-pendulum SDOF system to base acceleration.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced base acceleration, linear between samples. [m/s²]
    time_step_s : float
        Sampling interval, > 0. [s]
    system : Bilinear, Hysteresis or SlidingPendulum
        Restoring-force model (see :func:`bilinear`,
        :func:`sdofreport.core.hysteresis.hysteresis`, :func:`sliding_pendulum_model`). [-]
    damping_ratio : float
        Viscous damping ratio in [0, 1): ``c = 2 ζ √(m (k − W/h))`` with k the initial
        stiffness (hysteretic models) or the pendulum stiffness W/R (0 when flat). [-]
    mass_kg : float or None, optional
        Mass, > 0, for a hysteretic system; None works per unit mass (m = 1, forces in
        N/kg, energies in J/kg). A pendulum's mass is W/g: leave this None. [kg]
    initial_displacement_m : float, optional
        Relative displacement at t = 0 (start on the elastic branch). [m]
    initial_velocity_m_s : float, optional
        Relative velocity at t = 0. [m/s]
    substeps : int, optional
        Equal integration steps per record step (>= 1) before any halving. [-]
    tolerance : float, optional
        Residual-force tolerance relative to the force scale
        ``max(m·max|üg|, k₀|u₀|, √(k₀ m)|u̇₀|)``, k₀ the initial stiffness. [-]
    max_iterations : int, optional
        Newton–Raphson iterations per step before the step is split, >= 1. [-]
    max_halvings : int, optional
        Most times a record step may be halved, >= 0. [-]
    gravity_stiffness_n_m : float, optional
        P-Δ geometric stiffness W/h, >= 0 and below the initial stiffness; acts as
        ``−(W/h) u`` on every branch ([1]_ sec. 7.11). Hysteretic models only. [N/m]
    damper : Damper or None, optional
        Supplemental viscous damper ``C |u̇|^α sign(u̇)``. [-]
    instability_limit_m : float or None, optional
        Displacement beyond which the run stops and is reported unstable; the
        collapse displacement of the backbone under P-Δ
        (:func:`sdofreport.core.hysteresis.collapse_displacement`) applies too. [m]

    Returns
    -------
    NonlinearResponse
        Histories end at the step where the run stopped when it is unstable.

    References
    ----------
    .. [1] A. K. Chopra, *Dynamics of Structures*, 5th ed. Hoboken, NJ, USA: Pearson,
       2017, sec. 5.7, Table 5.7.1, and sec. 7.11.
    .. [2] N. M. Newmark, "A method of computation for structural dynamics," J. Eng.
       Mech. Div. ASCE, vol. 85, no. EM3, pp. 67-94, 1959.
    .. [3] C.-M. Uang and V. V. Bertero, "Evaluation of seismic energy in structures,"
       Earthquake Eng. Struct. Dyn., vol. 19, no. 1, pp. 77-90, 1990,
       doi: 10.1002/eqe.4290190108.
    .. [4] V. A. Zayas, S. S. Low and S. A. Mahin, "A simple pendulum technique for
       achieving seismic isolation," Earthquake Spectra, vol. 6, no. 2, pp. 317-333,
       1990, doi: 10.1193/1.1585564.
    """
    from sdofreport.core import hysteresis as hy

    ag = _checks.acceleration_history(acceleration_m_s2)
    dt = _checks.time_step(time_step_s)
    zeta = _check_damping(damping_ratio)
    u0 = _number(initial_displacement_m, "initial_displacement_m", "m")
    v0 = _number(initial_velocity_m_s, "initial_velocity_m_s", "m/s")
    if not (math.isfinite(u0) and math.isfinite(v0)):
        raise ValueError(
            f"initial_displacement_m [m] and initial_velocity_m_s [m/s] must be finite; "
            f"got {initial_displacement_m!r}, {initial_velocity_m_s!r}"
        )
    n_sub = _check_positive_int(substeps, "substeps", 1)
    tol, max_iter, max_halv = _check_solver(tolerance, max_iterations, max_halvings)
    k_geo = _checks.nonnegative(gravity_stiffness_n_m, "gravity_stiffness_n_m", "N/m")
    bound = math.inf
    if instability_limit_m is not None:
        bound = _positive(instability_limit_m, "instability_limit_m", "m", allow_inf=True)

    if isinstance(system, (Bilinear, hy.Hysteresis)):
        m = 1.0 if mass_kg is None else _positive(mass_kg, "mass_kg", "kg")
        k = system.stiffness_n_m
        alpha = system.hardening_ratio
        fy = system.yield_strength_n
        if isinstance(system, Bilinear):
            code = 0
            params = np.array([alpha * k, (1.0 - alpha) * k, (1.0 - alpha) * fy, 0.0, 0.0,
                               0.0])
        else:
            code, params = system.kernel_parameters()
        if k_geo >= k:
            raise ValueError(
                f"gravity_stiffness_n_m W/h = {k_geo!r} [N/m] must be below the initial "
                f"stiffness k = {k!r} [N/m]: the system cannot carry its gravity load"
            )
        k0 = k - k_geo
        omega = math.sqrt(k0 / m)
        bound = min(bound, hy.collapse_displacement(k, fy, alpha, k_geo))
        if abs(u0) > fy / k:
            raise ValueError(
                f"initial_displacement_m must lie on the elastic branch, |u0| <= u_y = "
                f"{fy / k!r} [m]; got {initial_displacement_m!r}"
            )
    elif isinstance(system, SlidingPendulum):
        if mass_kg is not None:
            raise ValueError(
                f"mass_kg must be None for a sliding pendulum (its mass is W/g) [kg]; "
                f"got {mass_kg!r}"
            )
        if k_geo != 0.0:
            raise ValueError("gravity_stiffness_n_m must be 0 for a sliding pendulum (its "
                             f"gravity restoring force is W/R) [N/m]; got {k_geo!r}")
        w = G if system.weight_n is None else system.weight_n
        m = w / G
        k_lin = w / system.radius_m
        f_p = system.friction * w
        k_p = f_p / system.yield_displacement_m
        code = 0
        # Pre-sliding dashpot: the stick branch critically damped (hysteresis module).
        c_stick = 2.0 * hy.STICK_DAMPING_RATIO * math.sqrt(m * k_p)
        params = np.array([k_lin, k_p, f_p, c_stick, 0.0, 0.0])
        k0 = k_lin + k_p
        omega = math.sqrt(k_lin / m)
        if abs(k_p * u0) > f_p:
            raise ValueError(
                f"initial_displacement_m must be within the friction element's elastic "
                f"range |u0| <= {system.yield_displacement_m!r} [m]; got "
                f"{initial_displacement_m!r}"
            )
    else:
        raise ValueError(
            f"system must be a Bilinear, Hysteresis or SlidingPendulum model; got "
            f"{type(system).__name__}"
        )
    c = 2.0 * zeta * m * omega
    c_d, a_d = 0.0, 1.0
    if damper is not None:
        if not isinstance(damper, hy.Damper):
            raise ValueError(f"damper must be a Damper or None; got {type(damper).__name__}")
        c_d, a_d = damper.coefficient, damper.exponent
    # Linear below a small velocity (module docstring of hysteresis): u_y ω, or the
    # record's velocity scale max|üg|/ω when there is no yield displacement.
    uy_ref = system.yield_displacement_m
    if not math.isfinite(uy_ref):
        uy_ref = float(np.max(np.abs(ag))) / max(omega, 1e-12) ** 2 or 1.0
    v_r = hy.DAMPER_LINEAR_BELOW * uy_ref * max(omega, 1e-12)
    # Force scale of the residual test: the largest of the ground inertia force and the
    # forces the initial conditions imply; 1 when nothing at all moves.
    scale = max(m * float(np.max(np.abs(ag))), k0 * abs(u0),
                math.sqrt(k0 * m) * abs(v0)) or 1.0

    hist = np.empty((10, ag.size))
    stats = np.empty(14)
    hy.integrate_model(ag, dt, n_sub, m, c, code, params, k_geo, c_d, a_d, v_r,
                       u0, v0, tol * scale, max_iter, max_halv, bound, hist, stats)
    stored = int(stats[13])
    hist = hist[:, :stored]
    u, v, at, f, e_in, e_d, e_f, e_x, f_d, k_un = hist

    kinetic = 0.5 * m * v * v
    if isinstance(system, SlidingPendulum):
        f_fric = f - k_lin * u
        strain = 0.5 * k_lin * u * u
        if k_p > 0.0:
            strain = strain + f_fric * f_fric / (2.0 * k_p)
        ductility = None
    else:
        # f²/(2 k_u); zero where deterioration has left no stiffness (and no force)
        strain = np.divide(f * f, 2.0 * k_un, out=np.zeros_like(f), where=k_un > 0.0)
        ductility = float(stats[0] / system.yield_displacement_m)
    gravity = -0.5 * k_geo * u * u
    # ∫F du = ΔE_strain + E_hysteretic; initial energy E0 enters the balance ([3]).
    hysteretic = e_f - (strain - strain[0])
    supplied = e_in[-1] + kinetic[0] + strain[0] + gravity[0]
    total = kinetic[-1] + e_d[-1] + e_x[-1] + strain[-1] + hysteretic[-1] + gravity[-1]
    imbalance = abs(supplied - total) / max(abs(supplied), 1e-300)
    unstable = bool(stats[12])
    return NonlinearResponse(
        time_s=np.arange(stored) * dt,
        displacement_m=u.copy(),
        velocity_m_s=v.copy(),
        total_accel_m_s2=at.copy(),
        force_n=f.copy(),
        peak_displacement_m=float(stats[0]),
        residual_displacement_m=float(stats[1]),
        ductility=ductility,
        peak_force_n=float(stats[4]),
        input_j=float(e_in[-1]),
        kinetic_j=float(kinetic[-1]),
        damping_j=float(e_d[-1]),
        strain_j=float(strain[-1]),
        hysteretic_j=float(hysteretic[-1]),
        imbalance=float(imbalance),
        energy_histories_j={"input": e_in.copy(), "kinetic": kinetic, "damping": e_d.copy(),
                            "strain": strain, "hysteretic": hysteretic,
                            **({"damper": e_x.copy()} if c_d > 0.0 else {}),
                            **({"gravity": gravity} if k_geo > 0.0 else {})},
        max_iterations_used=int(stats[5]),
        subdivided_steps=int(stats[6]),
        converged=bool(stats[7]),
        damper_j=float(e_x[-1]),
        gravity_j=float(gravity[-1]),
        peak_damper_force_n=float(np.max(np.abs(f_d))),
        unstable=unstable,
        instability_limit_m=float(bound),
    )
