"""
Newmark-beta integration of a linear SDOF oscillator under base acceleration.

Newmark's family [1]_ advances displacement ``u``, velocity ``v`` and acceleration ``a``
by (Eqs. (4) and (5) of [1]_, written for one step ``h``)

    u1 = u0 + h v0 + h² [(½ − β) a0 + β a1]
    v1 = v0 + h [(1 − γ) a0 + γ a1]

with equilibrium ``a = f − 2ζω v − ω² u`` at both ends and ``f = −üg``. For a linear
oscillator the step is a linear map of ``(u0, v0, f0, f1)``, so it can be written in the
same two-term recurrence form as the exact method (see :mod:`sdofreport.core.exact`) and
run by the same compiled kernel; :func:`newmark_coefficients` builds that form and
:func:`newmark_beta` keeps a literal, step-by-step implementation of the equations above.

Stability: with γ = ½ the method is unconditionally stable for β ≥ ¼; for β < ¼ the
undamped step is stable only for ``h/T ≤ 1 / (2π √(γ/2 − β))`` (√3/π ≈ 0.551 for linear
acceleration, β = ⅙), see [1]_ and [2]_ (Chopra, sec. 5.5). Average acceleration has
no amplitude decay and period elongation ``T̄/T = x / arctan(x)``, ``x = ωh/2``.

References
----------
.. [1] N. M. Newmark, "A method of computation for structural dynamics,"
   J. Eng. Mech. Div. ASCE, vol. 85, no. EM3, pp. 67-94, 1959.
.. [2] A. K. Chopra, *Dynamics of Structures*, 4th ed. Upper Saddle River, NJ, USA:
   Prentice Hall, 2012, ch. 5.
"""

from __future__ import annotations

import math

import numpy as np

from sdofreport.core import _checks
from sdofreport.core._jit import JIT_OPTIONS, njit

__all__ = [
    "METHODS",
    "newmark_beta",
    "newmark_coefficients",
    "newmark_parameters",
    "newmark_stability_limit",
    "check_newmark_step",
]

#: Named Newmark members: (gamma, beta) [-], Newmark (1959).
METHODS = {"newmark-average": (0.5, 0.25), "newmark-linear": (0.5, 1 / 6)}


def newmark_parameters(method="newmark-average", gamma=None, beta=None):
    """
    Resolve a method name and optional overrides to ``(gamma, beta)``.

    Parameters
    ----------
    method : {"newmark-average", "newmark-linear"}
        Named member of the family; see :data:`METHODS`. [-]
    gamma : float, optional
        Overrides the method's γ; must be >= 0.5 (smaller values grow spuriously). [-]
    beta : float, optional
        Overrides the method's β; must be >= 0. [-]

    Returns
    -------
    tuple of float
        ``(gamma, beta)``. [-]
    """
    _checks.one_of(method, "method", METHODS)
    g0, b0 = METHODS[method]
    g = g0 if gamma is None else gamma
    b = b0 if beta is None else beta
    try:
        g = float(g)
        b = float(b)
    except (TypeError, ValueError):
        raise ValueError(f"gamma and beta must be numbers [-]; got {gamma!r}, {beta!r}") from None
    if not math.isfinite(g) or g < 0.5:
        raise ValueError(
            f"gamma must be finite and >= 0.5 [-] (below 0.5 the method adds energy); got {g!r}"
        )
    if not math.isfinite(b) or b < 0.0:
        raise ValueError(f"beta must be finite and >= 0 [-]; got {b!r}")
    return g, b


def newmark_stability_limit(gamma, beta) -> float:
    """
    Largest stable ratio of step to natural period for an undamped oscillator.

    Parameters
    ----------
    gamma : float
        Newmark γ, >= 0.5. [-]
    beta : float
        Newmark β, >= 0. [-]

    Returns
    -------
    float
        ``1 / (2π √(γ/2 − β))`` for ``β < γ/2``, else ``inf`` (unconditionally stable). [-]

    References
    ----------
    .. [1] N. M. Newmark, "A method of computation for structural dynamics,"
       J. Eng. Mech. Div. ASCE, vol. 85, no. EM3, pp. 67-94, 1959.
    """
    if beta >= 0.5 * gamma:
        return math.inf
    return 1.0 / (2.0 * math.pi * math.sqrt(0.5 * gamma - beta))


def check_newmark_step(time_step_s, natural_periods_s, gamma, beta) -> None:
    """
    Refuse an integration step beyond the stability limit of (γ, β).

    Parameters
    ----------
    time_step_s : float
        Integration step actually used (after any sub-stepping). [s]
    natural_periods_s : array-like
        Periods > 0 integrated with that step. [s]
    gamma, beta : float
        Newmark parameters. [-]

    Raises
    ------
    ValueError
        Naming the step, the shortest period and the limit on ``time_step/natural_period``.
    """
    limit = newmark_stability_limit(gamma, beta)
    if math.isinf(limit):
        return
    periods = np.asarray(natural_periods_s, dtype=np.float64)
    periods = periods[periods > 0.0]
    if periods.size == 0:
        return
    shortest = float(periods.min())
    ratio = time_step_s / shortest
    if ratio > limit:
        raise ValueError(
            f"Newmark step unstable: time_step_s {time_step_s:.6g} [s] / natural_period "
            f"{shortest:.6g} [s] = {ratio:.4g} exceeds the stability limit {limit:.4g} "
            f"for gamma={gamma:.6g}, beta={beta:.6g}; use a smaller step (sub-steps) or an "
            f"unconditionally stable method (beta >= gamma/2)"
        )


def newmark_coefficients(natural_periods_s, damping_ratios, time_step_s, gamma=0.5,
                         beta=0.25) -> np.ndarray:
    """
    Newmark-beta step written as a two-term recurrence (same layout as the exact method).

    Parameters
    ----------
    natural_periods_s : float or array-like
        Undamped natural periods, each > 0. [s]
    damping_ratios : float or array-like
        Fractions of critical damping in [0, 1); broadcast with the periods. [-]
    time_step_s : float
        Integration step ``h``. [s]
    gamma, beta : float
        Newmark parameters (γ >= 0.5, β >= 0). [-]

    Returns
    -------
    numpy.ndarray
        Shape ``(8, n)``: rows ``a11 a12 a21 a22 b1 b2 b3 b4`` of
        ``u1 = a11 u0 + a12 v0 + b1 üg0 + b2 üg1`` and
        ``v1 = a21 u0 + a22 v0 + b3 üg0 + b4 üg1``. [mixed]

    Raises
    ------
    ValueError
        For invalid inputs or a step beyond the stability limit.

    References
    ----------
    .. [1] N. M. Newmark, "A method of computation for structural dynamics,"
       J. Eng. Mech. Div. ASCE, vol. 85, no. EM3, pp. 67-94, 1959.
    """
    h = _checks.time_step(time_step_s)
    periods, zeta = _checks.oscillators(natural_periods_s, damping_ratios, allow_zero_period=False)
    gamma, beta = newmark_parameters("newmark-average", gamma, beta)
    check_newmark_step(h, periods, gamma, beta)
    wn = 2.0 * np.pi / periods
    c = 2.0 * zeta * wn
    k = wn * wn
    # The step is linear in (u0, v0, f0, f1): apply it to the four unit vectors.
    coef = np.empty((8, periods.size))
    unit = np.eye(4)
    for col in range(4):
        u0, v0, f0, f1 = unit[col]
        a0 = f0 - c * v0 - k * u0
        # Equilibrium at the end of the step, solved for a1 (Newmark's predictor form).
        u_pred = u0 + h * v0 + h * h * (0.5 - beta) * a0
        v_pred = v0 + h * (1.0 - gamma) * a0
        a1 = (f1 - c * v_pred - k * u_pred) / (1.0 + gamma * h * c + beta * h * h * k)
        u1 = u_pred + beta * h * h * a1
        v1 = v_pred + gamma * h * a1
        # Columns 2 and 3 are per unit load f = −üg: flip the sign for üg.
        sign = 1.0 if col < 2 else -1.0
        coef[(0, 1, 4, 5)[col]] = sign * u1
        coef[(2, 3, 6, 7)[col]] = sign * v1
    return coef


@njit(**JIT_OPTIONS)
def _newmark_literal(ag, h, wn, zeta, gamma, beta, u0, v0, u, v, at):
    c = 2.0 * zeta * wn
    k = wn * wn
    u[0] = u0
    v[0] = v0
    a = -ag[0] - c * v0 - k * u0
    at[0] = a + ag[0]
    denom = 1.0 + gamma * h * c + beta * h * h * k
    for i in range(ag.size - 1):
        up = u[i] + h * v[i] + h * h * (0.5 - beta) * a
        vp = v[i] + h * (1.0 - gamma) * a
        a1 = (-ag[i + 1] - c * vp - k * up) / denom
        u[i + 1] = up + beta * h * h * a1
        v[i + 1] = vp + gamma * h * a1
        at[i + 1] = a1 + ag[i + 1]
        a = a1


def newmark_beta(acceleration_m_s2, time_step_s, natural_period_s, damping_ratio,
                 method="newmark-average", *, gamma=None, beta=None,
                 initial_displacement_m=0.0, initial_velocity_m_s=0.0):
    """
    Relative response of one linear SDOF oscillator to base acceleration, step by step.

    This is the literal form of Newmark's equations at the record's own step (no
    sub-steps, no peak refinement); spectra use the recurrence form through
    :func:`sdofreport.core.spectra.response_spectrum`.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced base acceleration. [m/s²]
    time_step_s : float
        Sampling interval of ``acceleration_m_s2``, used as the integration step. [s]
    natural_period_s : float
        Undamped natural period, > 0. [s]
    damping_ratio : float
        Fraction of critical damping in [0, 1). [-]
    method : {"newmark-average", "newmark-linear"}
        Sets (gamma, beta) per [1]_; see :data:`METHODS`.
    gamma, beta : float, optional
        Override the method's parameters. [-]
    initial_displacement_m : float, optional
        Relative displacement at t = 0. [m]
    initial_velocity_m_s : float, optional
        Relative velocity at t = 0. [m/s]

    Returns
    -------
    tuple of numpy.ndarray
        Relative displacement [m], relative velocity [m/s], total acceleration [m/s²],
        each of shape ``(npts,)``.

    References
    ----------
    .. [1] N. M. Newmark, "A method of computation for structural dynamics,"
       J. Eng. Mech. Div. ASCE, vol. 85, no. EM3, pp. 67-94, 1959.
    """
    ag = _checks.acceleration_history(acceleration_m_s2)
    h = _checks.time_step(time_step_s)
    periods, zeta = _checks.oscillators(natural_period_s, damping_ratio, allow_zero_period=False,
                                       periods_name="natural_period_s",
                                       ratios_name="damping_ratio")
    if periods.size != 1:
        raise ValueError(
            f"newmark_beta integrates one oscillator; got {periods.size} (period, damping) pairs"
        )
    g, b = newmark_parameters(method, gamma, beta)
    check_newmark_step(h, periods, g, b)
    u = np.empty(ag.size)
    v = np.empty(ag.size)
    at = np.empty(ag.size)
    _newmark_literal(ag, h, 2.0 * np.pi / periods[0], zeta[0], g, b,
                     float(initial_displacement_m), float(initial_velocity_m_s), u, v, at)
    return u, v, at
