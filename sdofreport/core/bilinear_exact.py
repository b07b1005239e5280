"""
Peak displacement of a bilinear SDOF system, integrated exactly between yield events.

A unit-mass system with initial stiffness ``k = ω²``, viscous damping ``c = 2ζω`` on the
initial stiffness and bilinear kinematic hardening (yield displacement ``u_y``, post-yield
ratio α) is linear on each branch of its force–displacement law: written as a linear
spring ``αk`` in parallel with an elastic–perfectly-plastic element (stiffness
``(1−α)k``, yield force ``(1−α)k u_y``, committed plastic displacement ``u_p``),

* elastic branch:   ``ü + c u̇ + k u  = −üg(t) + (1−α) k u_p``
* yielding branch:  ``ü + c u̇ + αk u = −üg(t) − s (1−α) k u_y``, s = ±1 the direction.

With the ground acceleration linear between samples, each branch is a linear oscillator
under a linear load, which the first-order-hold (triangle-hold) discretisation of the
state equation solves exactly [1]_, [2]_:

    x(τ) = e^{Xτ} x(0) + τ (φ1 − φ2) B p(0) + τ φ2 B p(τ),   X = A τ,

the same recurrence as :mod:`sdofreport.core.exact` (Nigam and Jennings [1]_), here with
the state matrix of the branch (stiffness ``k`` or ``αk``) and written in the scaled
state ``[u, u̇/ω]`` and scaled time ``ωτ`` so that one power series serves every branch,
including ``α = 0`` (no stiffness) and heavily damped yielding branches (``ζ/√α > 1``).
The series is summed to round-off; the step is kept at most ``T/4`` so
``‖X‖ ≤ (1 + 2ζ) π/2``.

Events are located on the exact solution, not on a step grid [3]_:

* yield: on the elastic branch ``|u − u_p|`` reaches ``u_y``; the crossing time in the
  step (or before an interior extremum of u, where ``u̇ = 0``) is found by Newton's
  method kept inside its bracket (derivative ``u̇``), then integration goes on from that
  instant on the yielding branch;
* unloading: on a yielding branch the velocity changes sign; the instant ``u̇ = 0`` is
  found the same way (derivative ``ü``), ``u_p`` is committed there and integration goes
  on elastically.

Peaks: ``max|u|`` over the step ends, the events, and the interior extrema ``u̇ = 0`` of
the elastic branch, each found on the exact solution. An interior extremum is looked for
only when the cubic Hermite bound ``max|u_end| + (τ/4) max|u̇_end|`` of the step [4]_
(with a 5 % margin, our choice) could beat the running peak or reach the yield limit.
Each step is assumed to hold at most one velocity reversal, which the step limit
``T/4`` and the default ``T/8`` (``h ≤ T/steps_per_period``) make a safe assumption for
a system's own motion; a second reversal within one step would be a wiggle of size of
order ``üg h²``, far below a peak of interest.

Without yielding (``u_y = inf``) the kernel is the exact linear recurrence with exact
peaks, so the elastic force ``Fe = k·SD`` of the inelastic spectra equals the exact
elastic spectrum to round-off and the sub-step count (``steps_per_period``) does not
change the result beyond the assumption above.

References
----------
.. [1] N. C. Nigam and P. C. Jennings, "Calculation of response spectra from
   strong-motion earthquake records," Bull. Seismol. Soc. Am., vol. 59, no. 2,
   pp. 909-922, 1969.
.. [2] G. F. Franklin, J. D. Powell and M. L. Workman, *Digital Control of Dynamic
   Systems*, 3rd ed. Addison-Wesley, 1998, sec. 6.3 (triangle-hold equivalent).
.. [3] A. K. Chopra, *Dynamics of Structures*, 5th ed. Hoboken, NJ, USA: Pearson, 2017,
   sec. 5.7 and 7.1 (bilinear systems; the branch transitions).
.. [4] F. N. Fritsch and R. E. Carlson, "Monotone piecewise cubic interpolation," SIAM
   J. Numer. Anal., vol. 17, no. 2, pp. 238-246, 1980, doi: 10.1137/0717021.
"""

from __future__ import annotations

import math

import numpy as np

from sdofreport.core import _checks
from sdofreport.core._jit import JIT_OPTIONS, njit
from sdofreport.core.exact import _phi_series

__all__ = ["MIN_STEPS_PER_PERIOD", "bilinear_peak_displacement"]

#: Fewest integration steps per initial period the kernel accepts (module docstring):
#: keeps the power series short and one velocity reversal per step. Our choice.
MIN_STEPS_PER_PERIOD = 4.0

# Series terms are added until a term is below this (relative to the O(1) entries).
_SERIES_EPS = 1e-18
_SERIES_MAX_TERMS = 60
# Newton iterations allowed to place one event; quadratic convergence needs about 4.
_ROOT_ITERATIONS = 60
# Margin on the Hermite screen for interior extrema (our choice, module docstring).
_SCREEN_MARGIN = 1.05
# Events allowed in one integration step before the rest of it is accepted as is.
_MAX_EVENTS_PER_STEP = 16


@njit(**JIT_OPTIONS)
def _coefficients(theta, r, zeta, w):
    """
    Exact step coefficients of ``ü + 2ζω u̇ + r ω² u = p(t)``, p linear, over ``θ/ω``.

    Returns ``(a11, a12, a21, a22, b1, b2, b3, b4)`` with
    ``u1 = a11 u0 + a12 v0 + b1 p0 + b2 p1`` and ``v1 = a21 u0 + a22 v0 + b3 p0 + b4 p1``
    (module docstring; scaled state ``[u, u̇/ω]``, ``X = θ [[0, 1], [−r, −2ζ]]``,
    φ0 = Σ X^k/k!, φ1 = Σ X^k/(k+1)!, φ2 = Σ X^k/(k+2)!).
    """
    a00, a01, a10, a11, b01, b11, c01, c11 = _phi_series(theta, r, zeta,
                                                         _SERIES_MAX_TERMS, _SERIES_EPS)
    w2 = w * w
    return (a00, a01 / w, a10 * w, a11, theta * (b01 - c01) / w2, theta * c01 / w2,
            theta * (b11 - c11) / w, theta * c11 / w)


@njit(**JIT_OPTIONS)
def _state_at(tau, span, u0, v0, ga, gb, q, r, zeta, w):
    """State (u, u̇, ü) at ``tau`` into a piece of length ``span`` on one branch."""
    g = ga + (gb - ga) * (tau / span)
    p0 = q - ga
    p1 = q - g
    a11, a12, a21, a22, b1, b2, b3, b4 = _coefficients(w * tau, r, zeta, w)
    u = a11 * u0 + a12 * v0 + b1 * p0 + b2 * p1
    v = a21 * u0 + a22 * v0 + b3 * p0 + b4 * p1
    acc = p1 - 2.0 * zeta * w * v - r * w * w * u
    return u, v, acc


@njit(**JIT_OPTIONS)
def _root(kind, level, lo, hi, f_lo, f_hi, span, u0, v0, ga, gb, q, r, zeta, w):
    """
    Time in [lo, hi] where ``kind`` 0.0: ``u − level`` or 1.0: ``u̇`` changes sign.

    Newton's method kept inside the bracket (bisection when a step leaves it); returns
    ``(tau, u, v, converged)``. ``kind`` is a float so that numba compiles one version:
    an integer constant at a call site is typed as a literal, one specialisation each.
    """
    tau = lo - f_lo * (hi - lo) / (f_hi - f_lo)  # a secant start
    if not (lo < tau < hi):
        tau = 0.5 * (lo + hi)
    u = u0
    v = v0
    tol = 1e-13 * span
    for _ in range(_ROOT_ITERATIONS):
        u, v, acc = _state_at(tau, span, u0, v0, ga, gb, q, r, zeta, w)
        if kind == 0.0:
            f = u - level
            df = v
        else:
            f = v
            df = acc
        if f == 0.0:
            return tau, u, v, True
        if (f < 0.0) == (f_lo < 0.0):
            lo = tau
            f_lo = f
        else:
            hi = tau
            f_hi = f
        step = f / df if df != 0.0 else 0.0
        nxt = tau - step
        if df == 0.0 or not (lo < nxt < hi):
            nxt = 0.5 * (lo + hi)
        if abs(nxt - tau) <= tol or hi - lo <= tol:
            u, v, acc = _state_at(nxt, span, u0, v0, ga, gb, q, r, zeta, w)
            return nxt, u, v, True
        tau = nxt
    return tau, u, v, False


@njit(**JIT_OPTIONS)
def _bilinear_peak(ag, dt, n_sub, w, zeta, alpha, uy, u_stop, ce, cp):
    """
    Peak |u| [m] of a unit-mass bilinear system at rest at t = 0, and a flag that every
    event was placed to tolerance. ``ce``/``cp``: full-step coefficients of the elastic
    and yielding branches (:func:`_coefficients`). Stops once the peak reaches ``u_stop``.
    Short names (DEVELOPERS.md, names of inputs): ``ag`` acceleration_m_s2 [m/s²], ``dt``
    time_step_s [s], ``w`` 2π/natural_period_s [rad/s], ``zeta`` damping_ratio,
    ``alpha`` hardening_ratio, ``uy`` yield_displacement_m [m].
    """
    k = w * w
    kp = (1.0 - alpha) * k
    h = dt / n_sub
    u = 0.0
    v = 0.0
    up = 0.0
    s = 0  # 0 elastic, +1 / -1 yielding in that direction
    peak = 0.0
    ok = True
    npts = ag.size
    for i in range(npts - 1):
        g_lo = ag[i]
        dg = ag[i + 1] - g_lo
        for j in range(n_sub):
            ga = g_lo + dg * (j / n_sub)
            gb = g_lo + dg * ((j + 1) / n_sub)
            span = h
            events = 0
            while True:
                full = span == h
                if s == 0:
                    q = kp * up
                    r = 1.0
                    co = ce
                else:
                    q = -s * kp * uy
                    r = alpha
                    co = cp
                if full:
                    a11, a12, a21, a22, b1, b2, b3, b4 = co[0], co[1], co[2], co[3], \
                        co[4], co[5], co[6], co[7]
                else:
                    a11, a12, a21, a22, b1, b2, b3, b4 = _coefficients(w * span, r, zeta, w)
                p0 = q - ga
                p1 = q - gb
                u1 = a11 * u + a12 * v + b1 * p0 + b2 * p1
                v1 = a21 * u + a22 * v + b3 * p0 + b4 * p1
                event = False
                tau = 0.0
                if events >= _MAX_EVENTS_PER_STEP:
                    ok = False
                    u = u1
                    v = v1
                    break
                if s == 0:
                    d0 = u - up
                    d1 = u1 - up
                    lo = 0.0
                    d_lo = d0
                    hi = span
                    d_hi = d1
                    if v * v1 < 0.0:
                        reach = 0.25 * span * max(abs(v), abs(v1)) * _SCREEN_MARGIN
                        if (max(abs(u), abs(u1)) + reach > peak
                                or max(abs(d0), abs(d1)) + reach > uy):
                            te, ue, ve, conv = _root(1.0, 0.0, 0.0, span, v, v1, span, u,
                                                     v, ga, gb, q, r, zeta, w)
                            ok = ok and conv
                            if abs(ue) > peak:
                                peak = abs(ue)
                            if abs(ue - up) > uy:
                                hi = te  # u is monotone on [0, te]
                                d_hi = ue - up
                            else:
                                lo = te  # and on [te, span]
                                d_lo = ue - up
                    if abs(d_hi) > uy:
                        # Yield: u − u_p reaches sign·u_y at tau in (lo, hi].
                        sign = 1.0 if d_hi > 0.0 else -1.0
                        level = up + sign * uy
                        tau, uu, vv, conv = _root(0.0, level, lo, hi, d_lo - sign * uy,
                                                  d_hi - sign * uy, span, u, v, ga, gb, q,
                                                  r, zeta, w)
                        ok = ok and conv
                        u = level
                        v = vv
                        s = 1 if sign > 0.0 else -1
                        event = True
                else:
                    if s * v1 < 0.0:
                        # Unloading: u̇ = 0 at tau; commit the plastic displacement there.
                        if s * v <= 0.0:  # entered grazing: unload at once
                            tau = 0.0
                            uu = u
                        else:
                            tau, uu, vv, conv = _root(1.0, 0.0, 0.0, span, v, v1, span, u,
                                                      v, ga, gb, q, r, zeta, w)
                            ok = ok and conv
                        u = uu
                        v = 0.0
                        up = u - s * uy
                        s = 0
                        event = True
                if event:  # go on from the event on the new branch
                    if abs(u) > peak:
                        peak = abs(u)
                    ga = ga + (gb - ga) * (tau / span)
                    span = span - tau
                    events += 1
                    if span <= 1e-14 * h:
                        break
                    continue
                u = u1
                v = v1
                break
            if abs(u) > peak:
                peak = abs(u)
            if peak >= u_stop:
                return peak, ok
    return peak, ok


@njit(**JIT_OPTIONS)
def _branch_coefficients(h, w, zeta, alpha):
    """Full-step coefficients of the elastic and the yielding branch, each (8,)."""
    ce = np.empty(8)
    cp = np.empty(8)
    e = _coefficients(w * h, 1.0, zeta, w)
    p = _coefficients(w * h, alpha, zeta, w)
    for i in range(8):
        ce[i] = e[i]
        cp[i] = p[i]
    return ce, cp


@njit(**JIT_OPTIONS)
def _peak(ag, dt, n_sub, w, zeta, alpha, uy, u_stop):
    """:func:`_bilinear_peak` with its branch coefficients built here."""
    ce, cp = _branch_coefficients(dt / n_sub, w, zeta, alpha)
    return _bilinear_peak(ag, dt, n_sub, w, zeta, alpha, uy, u_stop, ce, cp)


def bilinear_peak_displacement(acceleration_m_s2, time_step_s, natural_period_s, damping_ratio,
                               yield_displacement_m, hardening_ratio=0.0, *, substeps=1):
    """
    Peak displacement of a bilinear system by exact integration between yield events.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced base acceleration, linear between samples. [m/s²]
    time_step_s : float
        Sampling interval, > 0. [s]
    natural_period_s : float
        Initial (elastic) period, > 0. [s]
    damping_ratio : float
        Viscous damping ratio on the initial stiffness, in [0, 1). [-]
    yield_displacement_m : float
        Yield displacement u_y = Fy/k, > 0; inf keeps the system linear. [m]
    hardening_ratio : float, optional
        Post-yield stiffness ratio α, 0 <= α < 1. [-]
    substeps : int, optional
        Equal integration steps per record step, >= 1, and enough that the step is at
        most T / :data:`MIN_STEPS_PER_PERIOD`. [-]

    Returns
    -------
    tuple
        Peak |u| [m] and True when every event was placed to tolerance.

    References
    ----------
    .. [1] N. C. Nigam and P. C. Jennings, "Calculation of response spectra from
       strong-motion earthquake records," Bull. Seismol. Soc. Am., vol. 59, no. 2,
       pp. 909-922, 1969.
    """
    ag = _checks.acceleration_history(acceleration_m_s2)
    dt = _checks.time_step(time_step_s)
    t = _checks.positive(natural_period_s, "natural_period_s", "s")
    zeta = _checks.damping_ratio(damping_ratio)
    uy = float(yield_displacement_m)
    if not uy > 0.0:  # inf allowed: an elastic system
        raise ValueError(f"yield_displacement_m must be > 0 [m]; got {yield_displacement_m!r}")
    alpha = _checks.ratio(hardening_ratio, "hardening_ratio")
    if isinstance(substeps, bool) or int(substeps) != substeps or substeps < 1:
        raise ValueError(f"substeps must be an integer >= 1 [-]; got {substeps!r}")
    n = int(substeps)
    if dt / n > t / MIN_STEPS_PER_PERIOD * (1 + 1e-12):
        raise ValueError(
            f"substeps must make the step at most T/{MIN_STEPS_PER_PERIOD:g} = "
            f"{t / MIN_STEPS_PER_PERIOD!r} [s]; got dt/substeps = {dt / n!r} [s]"
        )
    peak, ok = _peak(ag, dt, n, 2.0 * math.pi / t, zeta, alpha, uy, math.inf)
    return float(peak), bool(ok)
