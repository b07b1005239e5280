"""
Exact recurrence for a linear SDOF oscillator under piecewise-linear base acceleration.

The oscillator obeys ``u'' + 2 ζ ω u' + ω² u = −üg(t)`` with ``üg`` linear between
equally spaced samples. Over one step ``h`` the state ``x = [u, u']`` then advances by the
two-term recurrence

    u[i+1] = a11 u[i] + a12 v[i] + b1 üg[i] + b2 üg[i+1]
    v[i+1] = a21 u[i] + a22 v[i] + b3 üg[i] + b4 üg[i+1]

whose coefficients are exact for a linearly varying load, as first given for response
spectra by Nigam and Jennings [1]_. We obtain them as the first-order-hold discretisation
of the state equation [2]_: with ``X = A h`` the state matrix times the step,

    Φ = e^X,   x[i+1] = Φ x[i] + h (φ1(X) − φ2(X)) B f[i] + h φ2(X) B f[i+1],

where ``φ1(X) = Σ X^k/(k+1)!`` and ``φ2(X) = Σ X^k/(k+2)!``. Each ``φ`` is summed as a
power series when ``ω h ≤ 1`` (where the closed form loses digits to cancellation) and
from the closed form ``φ_{j+1} = X⁻¹(φ_j − I/j!)`` otherwise, so the coefficients keep
full precision from very long periods to periods far shorter than the step.

The same coefficient layout (an ``(8, n)`` array, rows ``a11 a12 a21 a22 b1 b2 b3 b4``)
is produced by :func:`sdofreport.core.newmark.newmark_coefficients`, so one compiled
kernel serves every linear method.

References
----------
.. [1] N. C. Nigam and P. C. Jennings, "Calculation of response spectra from
   strong-motion earthquake records," Bull. Seismol. Soc. Am., vol. 59, no. 2,
   pp. 909-922, 1969.
.. [2] G. F. Franklin, J. D. Powell and M. L. Workman, *Digital Control of Dynamic
   Systems*, 3rd ed. Addison-Wesley, 1998, sec. 6.3 (triangle/first-order-hold
   equivalent).
"""

from __future__ import annotations

import math

import numpy as np

from sdofreport.core import _checks
from sdofreport.core._jit import JIT_OPTIONS, njit

__all__ = [
    "COEFFICIENT_ROWS",
    "exact_coefficients",
    "exact_response",
    "recurrence_response",
]

#: Row names of the ``(8, n)`` coefficient arrays shared by every linear method.
COEFFICIENT_ROWS = ("a11", "a12", "a21", "a22", "b1", "b2", "b3", "b4")

# Number of power-series terms for |ω h| ≤ 1. With ‖A h‖ ≤ 1 + 2ζ < 3 the remainder
# after 30 terms is below 3**30/30! ≈ 8e-19, under double-precision round-off.
_SERIES_TERMS = 30
# Switch between series and closed form (our choice; any value near 1 works).
_SERIES_LIMIT = 1.0


# --------------------------------------------------------------- coefficient algebra
@njit(inline="always", **JIT_OPTIONS)
def _phi_series(theta, r, zeta, terms, eps):
    """
    φ0 = Σ X^k/k! (all four entries) and the second columns of φ1 = Σ X^k/(k+1)! and
    φ2 = Σ X^k/(k+2)!, summed term by term, for ``X = θ [[0, 1], [−r, −2ζ]]`` (scaled
    state; ``r`` the stiffness over the one that sets θ, 1 for a plain oscillator).
    At most ``terms`` terms; stops early once the entries of a term X^k/k! sum below
    ``eps`` in size (0: never). Returns ``(φ0_00, φ0_01, φ0_10, φ0_11, φ1_01, φ1_11,
    φ2_01, φ2_11)``.
    """
    x01 = theta
    x10 = -r * theta
    x11 = -2.0 * zeta * theta
    t00, t01, t10, t11 = 1.0, 0.0, 0.0, 1.0  # X^k / k!
    a00, a01, a10, a11 = 1.0, 0.0, 0.0, 1.0
    b01, b11 = 0.0, 1.0
    c01, c11 = 0.0, 0.5
    for k in range(1, terms):
        # term @ X with X = [[0, x01], [x10, x11]], then / k
        n00 = (t01 * x10) / k
        n01 = (t00 * x01 + t01 * x11) / k
        n10 = (t11 * x10) / k
        n11 = (t10 * x01 + t11 * x11) / k
        t00, t01, t10, t11 = n00, n01, n10, n11
        a00 += t00
        a01 += t01
        a10 += t10
        a11 += t11
        f1 = 1.0 / (k + 1)
        b01 += t01 * f1
        b11 += t11 * f1
        f2 = 1.0 / ((k + 1) * (k + 2))
        c01 += t01 * f2
        c11 += t11 * f2
        if abs(t00) + abs(t01) + abs(t10) + abs(t11) < eps:
            break
    return a00, a01, a10, a11, b01, b11, c01, c11


@njit(inline="always", **JIT_OPTIONS)
def _phi_one(theta, zeta, terms, series_limit):
    """
    φ0 = e^X (all four entries) and the second columns of φ1 and φ2, for one oscillator,
    with ``X = θ [[0, 1], [−1, −2ζ]]`` (scaled state). Returns the tuple
    ``(φ0_00, φ0_01, φ0_10, φ0_11, φ1_01, φ1_11, φ2_01, φ2_11)``.

    For θ <= ``series_limit``: φ0 = Σ X^k/k!, φ1 = Σ X^k/(k+1)!, φ2 = Σ X^k/(k+2)!
    summed term by term. Otherwise the closed form e^X = e^{−ζθ}[cos θd I +
    sin θd/θd (X + ζθ I)] (since (X + ζθI)² = −θd² I, θd = θ√(1−ζ²)) and
    φ_{j+1} = X⁻¹(φ_j − I/j!) with X⁻¹ = (1/θ)[[−2ζ, −1], [1, 0]]; only the second
    columns of φ1 and φ2 enter the recurrence.
    """
    if theta <= series_limit:
        return _phi_series(theta, 1.0, zeta, terms, 0.0)
    thd = theta * math.sqrt(1.0 - zeta * zeta)
    decay = math.exp(-zeta * theta)
    c = math.cos(thd)
    s_over = math.sin(thd) / thd
    zt = zeta * theta
    p00 = decay * (c + s_over * zt)
    p01 = decay * s_over * theta
    p10 = -decay * s_over * theta
    p11 = decay * (c - s_over * zt)
    # second column of φ1 = X⁻¹ (φ0 − I), then of φ2 = X⁻¹ (φ1 − I)
    q0 = p01
    q1 = p11 - 1.0
    b01 = (-2.0 * zeta * q0 - q1) / theta
    b11 = q0 / theta
    r0 = b01
    r1 = b11 - 1.0
    c01 = (-2.0 * zeta * r0 - r1) / theta
    c11 = r0 / theta
    return p00, p01, p10, p11, b01, b11, c01, c11


@njit(**JIT_OPTIONS)
def _exact_coefficients_into(wn, zeta, h, coef, terms, series_limit):
    """Fill ``coef`` (8, n) for circular frequencies ``wn`` [rad/s] and step ``h`` [s]."""
    for i in range(wn.size):
        w = wn[i]
        theta = w * h
        p00, p01, p10, p11, b01, b11, c01, c11 = _phi_one(theta, zeta[i], terms,
                                                          series_limit)
        # Scaled state y = [u, u'/ω], scaled time τ = ωt, scaled load g = f/ω² with
        # f = −üg: y[i+1] = φ0 y[i] + θ(φ1 − φ2) e2 g[i] + θ φ2 e2 g[i+1]   ([2])
        w2 = w * w
        coef[0, i] = p00
        coef[1, i] = p01 / w
        coef[2, i] = p10 * w
        coef[3, i] = p11
        coef[4, i] = -(theta * (b01 - c01)) / w2
        coef[5, i] = -(theta * c01) / w2
        coef[6, i] = -(theta * (b11 - c11)) / w
        coef[7, i] = -(theta * c11) / w


def exact_coefficients(natural_periods_s, damping_ratios, time_step_s) -> np.ndarray:
    """
    Exact recurrence coefficients for piecewise-linear base acceleration.

    Parameters
    ----------
    natural_periods_s : float or array-like
        Undamped natural periods, each > 0. [s]
    damping_ratios : float or array-like
        Fractions of critical damping in [0, 1); broadcast against the periods. [-]
    time_step_s : float
        Integration step ``h`` the coefficients advance by. [s]

    Returns
    -------
    numpy.ndarray
        Shape ``(8, n)``, rows ``a11 a12 a21 a22 b1 b2 b3 b4`` (see module docstring),
        in units [-], [s], [1/s], [-], [s²], [s²], [s], [s].

    Raises
    ------
    ValueError
        For a period <= 0, a damping ratio outside [0, 1) or a step <= 0.

    References
    ----------
    .. [1] N. C. Nigam and P. C. Jennings, "Calculation of response spectra from
       strong-motion earthquake records," Bull. Seismol. Soc. Am., vol. 59, no. 2,
       pp. 909-922, 1969.
    """
    h = _checks.time_step(time_step_s)
    periods, zeta = _checks.oscillators(natural_periods_s, damping_ratios, allow_zero_period=False)
    coef = np.empty((8, periods.size))
    _exact_coefficients_into(2.0 * np.pi / periods, zeta, h, coef, _SERIES_TERMS,
                             _SERIES_LIMIT)
    return coef


# --------------------------------------------------------------------- time histories
@njit(**JIT_OPTIONS)
def _recurrence_histories(coef, cdamp, kstiff, ag, u_init, v_init, u_out, v_out, at_out):
    """Plain recurrence at the samples of ``ag``; fills [n, npts] history arrays."""
    n = coef.shape[1]
    npts = ag.size
    a11 = coef[0]
    a12 = coef[1]
    a21 = coef[2]
    a22 = coef[3]
    b1 = coef[4]
    b2 = coef[5]
    b3 = coef[6]
    b4 = coef[7]
    u = u_init.copy()
    v = v_init.copy()
    for j in range(n):
        u_out[j, 0] = u[j]
        v_out[j, 0] = v[j]
        at_out[j, 0] = -(cdamp[j] * v[j] + kstiff[j] * u[j])
    for i in range(npts - 1):
        g0 = ag[i]
        g1 = ag[i + 1]
        for j in range(n):
            u0 = u[j]
            v0 = v[j]
            u1 = a11[j] * u0 + a12[j] * v0 + b1[j] * g0 + b2[j] * g1
            v1 = a21[j] * u0 + a22[j] * v0 + b3[j] * g0 + b4[j] * g1
            u[j] = u1
            v[j] = v1
            u_out[j, i + 1] = u1
            v_out[j, i + 1] = v1
            at_out[j, i + 1] = -(cdamp[j] * v1 + kstiff[j] * u1)


def recurrence_response(coefficients, natural_periods_s, damping_ratios, acceleration_m_s2,
                        initial_displacement_m=0.0, initial_velocity_m_s=0.0):
    """
    Run a two-term recurrence (``(8, n)`` coefficients) at the record's own samples.

    Parameters
    ----------
    coefficients : numpy.ndarray
        Shape ``(8, n)`` from :func:`exact_coefficients` or
        :func:`sdofreport.core.newmark.newmark_coefficients`. [mixed, see rows]
    natural_periods_s : numpy.ndarray
        The n periods the coefficients were built for, each > 0. [s]
    damping_ratios : numpy.ndarray
        The n damping ratios the coefficients were built for. [-]
    acceleration_m_s2 : numpy.ndarray
        Base acceleration samples, spaced by the coefficients' step. [m/s²]
    initial_displacement_m : float or array-like
        Relative displacement at the first sample. [m]
    initial_velocity_m_s : float or array-like
        Relative velocity at the first sample. [m/s]

    Returns
    -------
    tuple of numpy.ndarray
        Relative displacement [m], relative velocity [m/s] and total acceleration [m/s²],
        each of shape ``(n, npts)``.
    """
    coef = np.ascontiguousarray(coefficients, dtype=np.float64)
    periods, zeta = _checks.oscillators(natural_periods_s, damping_ratios, allow_zero_period=False)
    ag = _checks.acceleration_history(acceleration_m_s2)
    n = coef.shape[1]
    if periods.size != n:
        raise ValueError(
            f"coefficients describe {n} oscillators but {periods.size} periods were given"
        )
    wn = 2.0 * np.pi / periods
    u0 = np.ascontiguousarray(np.broadcast_to(np.asarray(initial_displacement_m, float), (n,)))
    v0 = np.ascontiguousarray(np.broadcast_to(np.asarray(initial_velocity_m_s, float), (n,)))
    u_out = np.empty((n, ag.size))
    v_out = np.empty((n, ag.size))
    at_out = np.empty((n, ag.size))
    _recurrence_histories(coef, 2.0 * zeta * wn, wn * wn, ag, u0, v0, u_out, v_out, at_out)
    return u_out, v_out, at_out


def exact_response(acceleration_m_s2, time_step_s, natural_period_s, damping_ratio, *,
                   initial_displacement_m=0.0, initial_velocity_m_s=0.0):
    """
    Response histories of linear SDOF oscillators by the exact piecewise-linear recurrence.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced base acceleration, linear between samples. [m/s²]
    time_step_s : float
        Sampling interval of ``acceleration_m_s2``. [s]
    natural_period_s : float or array-like
        Undamped natural period(s), each > 0. [s]
    damping_ratio : float or array-like
        Fraction(s) of critical damping in [0, 1); broadcast with the periods. [-]
    initial_displacement_m : float or array-like, optional
        Relative displacement at t = 0 (default at rest). [m]
    initial_velocity_m_s : float or array-like, optional
        Relative velocity at t = 0 (default at rest). [m/s]

    Returns
    -------
    tuple of numpy.ndarray
        Relative displacement [m], relative velocity [m/s] and total acceleration
        ``ü + üg`` [m/s²] at the samples, each of shape ``(n_oscillators, npts)``.

    References
    ----------
    .. [1] N. C. Nigam and P. C. Jennings, "Calculation of response spectra from
       strong-motion earthquake records," Bull. Seismol. Soc. Am., vol. 59, no. 2,
       pp. 909-922, 1969.
    """
    dt = _checks.time_step(time_step_s)
    periods, zeta = _checks.oscillators(natural_period_s, damping_ratio, allow_zero_period=False,
                                       periods_name="natural_period_s",
                                       ratios_name="damping_ratio")
    coef = exact_coefficients(periods, zeta, dt)
    return recurrence_response(coef, periods, zeta, acceleration_m_s2,
                               initial_displacement_m, initial_velocity_m_s)
