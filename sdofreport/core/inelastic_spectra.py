"""
Inelastic response spectra of bilinear SDOF systems: constant strength and constant ductility.

Every system is worked per unit mass with initial period T, damping ratio ζ on the
initial stiffness, and bilinear kinematic hardening (ratio α), integrated exactly between
yield events by :mod:`sdofreport.core.bilinear_exact` (Nigam–Jennings recurrence on each
linear branch, events and peaks placed on the exact solution).

Strength is normalised by the elastic force ``Fe = k · SD`` of the same system kept
linear (same kernel, which is then the exact linear recurrence with exact peaks):
``η = Fy/Fe`` (the normalised yield strength of [1]_ §7.5) and the strength reduction
factor ``R = Fe/Fy = 1/η``. Also given: ``Fy/m`` [m/s²] and ``Fy/(m·PGA)`` [-].

Integration steps: each record step is split into the smallest power of two of sub-steps
that gives ``h <= T / steps_per_period`` (ground acceleration linear in between), with
:data:`DEFAULT_STEPS_PER_PERIOD` = 8 (at least
:data:`~sdofreport.core.bilinear_exact.MIN_STEPS_PER_PERIOD` = 4) — our choice (no
source). As integration is exact between events, the setting only bounds the step in
which yield, unloading and peaks are looked for (one velocity reversal per step is
assumed); the elastic force equals the exact elastic spectrum to round-off (measured
3e-9 relative, ``benchmarks/inelastic_accuracy.py``).

Constant ductility: the ductility reached, ``μ(η)``, is not monotonic in η, so a target
can be met by several strengths (well known, e.g. [1]_ §7.5); the definition takes the
largest strength whose ductility equals the target. We scan η downward from 1 (where
μ = 1) by the factor :data:`SCAN_RATIO` until the largest target is reached. Each
target's first scan point reaching it closes the highest bracket ``[η_i, η_{i−1}]``
with ``μ(η_i) >= target > μ(η_{i−1})``, narrowed by bisection to ``strength_tolerance``
(relative) keeping that order; since μ(η) is continuous, every root below ``η_i`` is
smaller than one in the bracket. A window narrower than the scan step where μ exceeds the
target shows as a local maximum of the scanned μ close below the target: wherever one is
above :data:`WINDOW_FRACTION` of the next target, a golden-section search for the
largest μ between the scan points around it looks for a point reaching the target, and a
window found is bisected the same way. A window next to no such local maximum can still
be missed. Targets not reached down to ``η =`` :data:`SCAN_MIN_STRENGTH` give NaN.

References
----------
.. [1] A. K. Chopra, *Dynamics of Structures*, 5th ed. Hoboken, NJ, USA: Pearson, 2017.
.. [2] N. C. Nigam and P. C. Jennings, "Calculation of response spectra from
   strong-motion earthquake records," Bull. Seismol. Soc. Am., vol. 59, no. 2,
   pp. 909-922, 1969.
.. [3] A. S. Veletsos and N. M. Newmark, "Effect of inelastic behavior on the response of
   simple systems to earthquake motions," in Proc. 2nd World Conf. Earthq. Eng., Tokyo,
   1960, vol. 2, pp. 895-912.
.. [4] N. M. Newmark and W. J. Hall, *Earthquake Spectra and Design*. Oakland, CA, USA:
   Earthquake Engineering Research Institute, 1982.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from sdofreport.core import _checks
from sdofreport.core._jit import JIT_OPTIONS, njit
from sdofreport.core.bilinear_exact import (
    MIN_STEPS_PER_PERIOD,
    _bilinear_peak,
    _branch_coefficients,
)
from sdofreport.core.nonlinear import (
    _check_workers,
    _for_each_period,
    _number,
)
from sdofreport.core.spectra import substep_counts

__all__ = [
    "DEFAULT_STEPS_PER_PERIOD",
    "SCAN_MIN_STRENGTH",
    "SCAN_RATIO",
    "ConstantDuctilitySpectrum",
    "ConstantStrengthSpectrum",
    "constant_ductility_spectrum",
    "constant_strength_spectrum",
]

#: Minimum integration steps per initial period (module docstring). Our choice.
DEFAULT_STEPS_PER_PERIOD = 8.0
#: Factor between successive normalised strengths η in the downward scan. Our choice, by
#: measurement (``benchmarks/inelastic_accuracy.py``, docs/methods.md).
SCAN_RATIO = 0.95
#: A local maximum of the scanned ductility above this fraction of a target is searched
#: (golden section) for a narrow window reaching the target. Our choice, by measurement.
WINDOW_FRACTION = 0.9
#: Smallest normalised strength η = Fy/Fe scanned (R = 100). Our choice.
SCAN_MIN_STRENGTH = 0.01


# ------------------------------------------------------------------------ results
@dataclass(frozen=True)
class ConstantStrengthSpectrum:
    """Ductility demand of systems whose strength is the elastic force over R."""

    #: initial periods [s], shape (nT,)
    periods_s: np.ndarray
    #: damping ratio on the initial stiffness [-]
    damping: float
    #: post-yield stiffness ratio α [-]
    hardening_ratio: float
    #: strength reduction factors R = Fe/Fy [-], shape (nR,)
    strength_reduction_factors: np.ndarray
    #: ductility demand max|u|/u_y [-], shape (nR, nT); below 1 means it stayed elastic
    ductility: np.ndarray
    #: yield strength per unit mass Fy/m = Fe/(m R) [m/s²], shape (nR, nT)
    yield_strength_m_s2: np.ndarray
    #: elastic peak displacement SD [m], shape (nT,)
    elastic_displacement_m: np.ndarray
    #: elastic force per unit mass Fe/m = ω² SD [m/s²], shape (nT,)
    elastic_force_m_s2: np.ndarray
    #: peak ground acceleration [m/s²]
    pga_m_s2: float
    #: True where every yield and unloading event was placed to tolerance, (nR, nT)
    converged: np.ndarray


@dataclass(frozen=True)
class ConstantDuctilitySpectrum:
    """Strength needed to hold the ductility demand to each target."""

    #: initial periods [s], shape (nT,)
    periods_s: np.ndarray
    #: damping ratio on the initial stiffness [-]
    damping: float
    #: post-yield stiffness ratio α [-]
    hardening_ratio: float
    #: target ductilities μ, each >= 1 [-], shape (nμ,)
    target_ductilities: np.ndarray
    #: normalised yield strength η = Fy/Fe (elastic force of the same system) [-],
    #: shape (nμ, nT); NaN where the target was not reached down to SCAN_MIN_STRENGTH
    normalized_strength: np.ndarray
    #: strength reduction factor R = Fe/Fy = 1/η [-], shape (nμ, nT)
    strength_reduction_factor: np.ndarray
    #: yield strength per unit mass Fy/m [m/s²], shape (nμ, nT)
    yield_strength_m_s2: np.ndarray
    #: yield strength over the inertia force at the peak ground acceleration,
    #: Fy/(m·PGA) [-], shape (nμ, nT)
    strength_over_pga: np.ndarray
    #: ductility reached at the reported strength (>= target, within the tolerance) [-]
    achieved_ductility: np.ndarray
    #: elastic peak displacement SD [m], shape (nT,)
    elastic_displacement_m: np.ndarray
    #: elastic force per unit mass Fe/m = ω² SD [m/s²], shape (nT,)
    elastic_force_m_s2: np.ndarray
    #: peak ground acceleration [m/s²]
    pga_m_s2: float


# ------------------------------------------------------------------------ kernels
@njit(**JIT_OPTIONS)
def _strength_period(ag, dt, n_sub, w, zeta, alpha, r_factors, mu_out, ok_out):
    """Elastic SD [m] of one period, then the ductility for each R (fills the outputs)."""
    ce, cp = _branch_coefficients(dt / n_sub, w, zeta, alpha)
    sd, _ = _bilinear_peak(ag, dt, n_sub, w, zeta, alpha, np.inf, np.inf, ce, cp)
    for i in range(r_factors.size):
        uy = sd / r_factors[i]
        peak, ok = _bilinear_peak(ag, dt, n_sub, w, zeta, alpha, uy, np.inf, ce, cp)
        mu_out[i] = peak / uy
        ok_out[i] = ok
    return sd


@njit(**JIT_OPTIONS)
def _ductility_at(eta, stop, ag, dt, n_sub, w, zeta, alpha, sd, ce, cp):
    """Ductility at η = Fy/Fe; the run stops once it reaches ``stop`` (ductility)."""
    uy = eta * sd
    peak, _ = _bilinear_peak(ag, dt, n_sub, w, zeta, alpha, uy, stop * uy, ce, cp)
    return peak / uy


@njit(**JIT_OPTIONS)
def _bisect(target, lo, hi, rel_tol, ag, dt, n_sub, w, zeta, alpha, sd, ce, cp):
    """Narrow μ(lo) >= target > μ(hi) to ``rel_tol``; returns (lo, μ(lo))."""
    while hi - lo > rel_tol * lo:
        mid = 0.5 * (lo + hi)
        if _ductility_at(mid, target, ag, dt, n_sub, w, zeta, alpha, sd, ce, cp) >= target:
            lo = mid
        else:
            hi = mid
    return lo, _ductility_at(lo, np.inf, ag, dt, n_sub, w, zeta, alpha, sd, ce, cp)


@njit(**JIT_OPTIONS)
def _window_peak(lo, hi, target, stop, rel_tol, ag, dt, n_sub, w, zeta, alpha, sd, ce,
                 cp):
    """
    Golden-section search for the largest μ on (lo, hi), ending early at a point whose
    ductility reaches ``target``; returns (η, μ(η)) of the best point seen.
    Short names as in :func:`_ductility_period`.
    """
    g = 0.3819660112501051  # (3 − √5)/2
    x1 = lo + g * (hi - lo)
    x2 = hi - g * (hi - lo)
    f1 = _ductility_at(x1, stop, ag, dt, n_sub, w, zeta, alpha, sd, ce, cp)
    if f1 >= target:
        return x1, f1
    f2 = _ductility_at(x2, stop, ag, dt, n_sub, w, zeta, alpha, sd, ce, cp)
    while f2 < target and hi - lo > rel_tol * lo:
        if f1 > f2:
            hi = x2
            x2 = x1
            f2 = f1
            x1 = lo + g * (hi - lo)
            f1 = _ductility_at(x1, stop, ag, dt, n_sub, w, zeta, alpha, sd, ce, cp)
            if f1 >= target:
                return x1, f1
        else:
            lo = x1
            x1 = x2
            f1 = f2
            x2 = hi - g * (hi - lo)
            f2 = _ductility_at(x2, stop, ag, dt, n_sub, w, zeta, alpha, sd, ce, cp)
    if f1 > f2:
        return x1, f1
    return x2, f2


@njit(**JIT_OPTIONS)
def _ductility_period(ag, dt, n_sub, w, zeta, alpha, targets, ratio, eta_min, rel_tol,
                      near, eta_out, mu_out):
    """
    Elastic SD [m] of one period; fills ``eta_out`` (largest η = Fy/Fe whose ductility
    equals each target, ``targets`` sorted ascending) and ``mu_out`` (ductility there).
    The search is described in the module docstring.
    Short names (DEVELOPERS.md, names of inputs): ``ag`` acceleration_m_s2 [m/s²], ``dt``
    time_step_s [s], ``w`` 2π/natural_period_s [rad/s], ``zeta`` damping_ratio,
    ``alpha`` hardening_ratio.
    """
    ce, cp = _branch_coefficients(dt / n_sub, w, zeta, alpha)
    sd, _ = _bilinear_peak(ag, dt, n_sub, w, zeta, alpha, np.inf, np.inf, ce, cp)
    nt = targets.size
    t = 0
    # Fy = Fe keeps the system elastic: it just reaches yield, μ = 1.
    while t < nt and targets[t] <= 1.0:
        eta_out[t] = 1.0
        mu_out[t] = 1.0
        t += 1
    if not sd > 0.0:
        for j in range(t, nt):
            eta_out[j] = np.nan
            mu_out[j] = np.nan
        return sd
    mu_top = targets[nt - 1]
    # The last three scan points (η, μ), newest first; η = 1 gives μ = 1.
    eta_1 = 1.0
    mu_1 = 1.0
    eta_2 = 1.0
    mu_2 = 1.0
    i = 0
    while t < nt:
        i += 1
        eta = ratio ** i
        if eta < eta_min:
            for j in range(t, nt):
                eta_out[j] = np.nan
                mu_out[j] = np.nan
            break
        mu = _ductility_at(eta, mu_top, ag, dt, n_sub, w, zeta, alpha, sd, ce, cp)
        if mu < targets[t] and mu_1 >= near * targets[t] and mu_1 > mu_2 and mu_1 >= mu:
            # A local maximum of the scanned μ close below the target: a narrow window
            # where μ exceeds the target may lie between the scan points around it.
            e_w, m_w = _window_peak(eta, eta_2, targets[t], mu_top, rel_tol, ag, dt,
                                    n_sub, w, zeta, alpha, sd, ce, cp)
            while t < nt and m_w >= targets[t]:
                eta_out[t], mu_out[t] = _bisect(targets[t], e_w, eta_2, rel_tol, ag, dt,
                                                n_sub, w, zeta, alpha, sd, ce, cp)
                t += 1
        while t < nt and mu >= targets[t]:
            eta_out[t], mu_out[t] = _bisect(targets[t], eta, eta_1, rel_tol, ag, dt, n_sub,
                                            w, zeta, alpha, sd, ce, cp)
            t += 1
        eta_2 = eta_1
        mu_2 = mu_1
        eta_1 = eta
        mu_1 = mu
    return sd


# ---------------------------------------------------------------------- plumbing
def _check_common(acceleration_m_s2, time_step_s, periods_s, damping_ratio, hardening_ratio,
                  steps_per_period):
    ag = _checks.acceleration_history(acceleration_m_s2)
    dt = _checks.time_step(time_step_s)
    t = _checks.values_above(periods_s, "periods_s", "s", 0.0)
    zeta = _checks.damping_ratio(damping_ratio)
    a = _checks.ratio(hardening_ratio, "hardening_ratio")
    spp = _number(steps_per_period, "steps_per_period", "-")
    if not (math.isfinite(spp) and spp >= MIN_STEPS_PER_PERIOD):
        raise ValueError(
            f"steps_per_period must be finite and >= {MIN_STEPS_PER_PERIOD:g} [-]; "
            f"got {steps_per_period!r}"
        )
    n_sub = substep_counts(t, dt, spp)
    return ag, dt, t, zeta, a, n_sub, 2.0 * np.pi / t


def _check_factors(values, name: str, minimum: float, strict: bool) -> np.ndarray:
    return _checks.values_above(values, name, "-", minimum, strict=strict)


# ------------------------------------------------------------------------- public
def constant_strength_spectrum(acceleration_m_s2, time_step_s, periods_s, damping_ratio,
                               strength_reduction_factors, hardening_ratio=0.0, *,
                               steps_per_period=DEFAULT_STEPS_PER_PERIOD,
                               workers=1) -> ConstantStrengthSpectrum:
    """
    Ductility demand of bilinear systems with yield strength ``Fy = Fe / R``.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced base acceleration, linear between samples. [m/s²]
    time_step_s : float
        Sampling interval, > 0. [s]
    periods_s : array-like
        Initial (elastic) periods, each > 0. [s]
    damping_ratio : float
        Viscous damping ratio on the initial stiffness, in [0, 1). [-]
    strength_reduction_factors : array-like
        R = Fe/Fy, each > 0 (R <= 1 stays elastic). [-]
    hardening_ratio : float, optional
        Post-yield stiffness ratio, 0 <= α < 1. [-]
    steps_per_period : float, optional
        Fewest integration steps per initial period, >= 4 (module docstring). [-]
    workers : int or None, optional
        Threads running periods side by side (None: every available core). [-]

    Returns
    -------
    ConstantStrengthSpectrum

    References
    ----------
    .. [1] A. K. Chopra, *Dynamics of Structures*, 5th ed. Hoboken, NJ, USA: Pearson,
       2017, sec. 7.4.
    """
    ag, dt, t, zeta, a, n_sub, w = _check_common(acceleration_m_s2, time_step_s, periods_s,
                                                 damping_ratio, hardening_ratio, steps_per_period)
    r = _check_factors(strength_reduction_factors, "strength_reduction_factors", 0.0, True)
    n_workers = _check_workers(workers)
    mu = np.empty((t.size, r.size))
    ok = np.empty((t.size, r.size))
    sd = np.empty(t.size)

    def work(j):
        sd[j] = _strength_period(ag, dt, n_sub[j], w[j], zeta, a, r, mu[j], ok[j])

    _for_each_period(t.size, n_workers, work)
    fe = w * w * sd
    return ConstantStrengthSpectrum(
        periods_s=t, damping=zeta, hardening_ratio=a, strength_reduction_factors=r,
        ductility=mu.T.copy(), yield_strength_m_s2=fe[None, :] / r[:, None],
        elastic_displacement_m=sd, elastic_force_m_s2=fe, pga_m_s2=float(np.max(np.abs(ag))),
        converged=ok.T.astype(bool),
    )


def constant_ductility_spectrum(acceleration_m_s2, time_step_s, periods_s, damping_ratio,
                                target_ductilities, hardening_ratio=0.0, *,
                                steps_per_period=DEFAULT_STEPS_PER_PERIOD,
                                strength_tolerance=1e-3, scan_ratio=SCAN_RATIO,
                                workers=1) -> ConstantDuctilitySpectrum:
    """
    Largest yield strength that holds the ductility demand to each target.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced base acceleration, linear between samples. [m/s²]
    time_step_s : float
        Sampling interval, > 0. [s]
    periods_s : array-like
        Initial (elastic) periods, each > 0. [s]
    damping_ratio : float
        Viscous damping ratio on the initial stiffness, in [0, 1). [-]
    target_ductilities : array-like
        Ductility targets μ = max|u|/u_y, each >= 1. [-]
    hardening_ratio : float, optional
        Post-yield stiffness ratio, 0 <= α < 1. [-]
    steps_per_period : float, optional
        Fewest integration steps per initial period, >= 4 (module docstring). [-]
    strength_tolerance : float, optional
        Relative width at which the bisection on η stops, in (0, 0.1]. [-]
    workers : int or None, optional
        Threads running periods side by side (None: every available core). [-]

    Returns
    -------
    ConstantDuctilitySpectrum
        η = Fy/Fe (normalised by the elastic force of the same system), R = Fe/Fy,
        Fy/m and Fy/(m·PGA), in the order of ``target_ductilities``.

    References
    ----------
    .. [1] A. K. Chopra, *Dynamics of Structures*, 5th ed. Hoboken, NJ, USA: Pearson,
       2017, sec. 7.5.
    .. [2] A. S. Veletsos and N. M. Newmark, "Effect of inelastic behavior on the
       response of simple systems to earthquake motions," in Proc. 2nd World Conf.
       Earthq. Eng., Tokyo, 1960, vol. 2, pp. 895-912.
    """
    ag, dt, t, zeta, a, n_sub, w = _check_common(acceleration_m_s2, time_step_s, periods_s,
                                                 damping_ratio, hardening_ratio, steps_per_period)
    mu_t = _check_factors(target_ductilities, "target_ductilities", 1.0, False)
    st = _number(strength_tolerance, "strength_tolerance", "-")
    if not (0.0 < st <= 0.1):
        raise ValueError(f"strength_tolerance must be in (0, 0.1] [-]; got {strength_tolerance!r}")
    ratio = _number(scan_ratio, "scan_ratio", "-")
    if not (0.5 <= ratio < 1.0):
        raise ValueError(f"scan_ratio must be in [0.5, 1) [-]; got {scan_ratio!r}")
    n_workers = _check_workers(workers)
    order = np.argsort(mu_t, kind="stable")
    sorted_targets = np.ascontiguousarray(mu_t[order])
    eta = np.empty((t.size, mu_t.size))
    got = np.empty((t.size, mu_t.size))
    sd = np.empty(t.size)

    def work(j):
        sd[j] = _ductility_period(ag, dt, n_sub[j], w[j], zeta, a, sorted_targets,
                                  ratio, SCAN_MIN_STRENGTH, st, WINDOW_FRACTION, eta[j],
                                  got[j])

    _for_each_period(t.size, n_workers, work)
    back = np.empty_like(order)
    back[order] = np.arange(order.size)
    eta = eta[:, back].T.copy()
    got = got[:, back].T.copy()
    fe = w * w * sd
    pga = float(np.max(np.abs(ag)))
    fy = eta * fe[None, :]
    with np.errstate(divide="ignore", invalid="ignore"):
        over_pga = fy / pga if pga > 0.0 else np.full_like(fy, np.nan)
    return ConstantDuctilitySpectrum(
        periods_s=t, damping=zeta, hardening_ratio=a, target_ductilities=mu_t,
        normalized_strength=eta, strength_reduction_factor=1.0 / eta,
        yield_strength_m_s2=fy, strength_over_pga=over_pga, achieved_ductility=got,
        elastic_displacement_m=sd, elastic_force_m_s2=fe, pga_m_s2=pga,
    )
