"""
Peak responses, response histories and response spectra of linear SDOF oscillators.

Every method (:data:`SPECTRUM_METHODS`) is written as the two-term recurrence of
:mod:`sdofreport.core.exact` — exact for piecewise-linear excitation [1]_, or Newmark's
step [2]_ recast in the same form — and run by one compiled kernel that keeps time in the
outer loop and oscillators in the inner loop, so the inner loop is a straight run of
multiply-adds over contiguous arrays that the compiler vectorises.

Between-sample peaks
--------------------
Peaks fall between samples. Two measures keep them:

1. *Sub-steps.* The excitation is linearly interpolated and each oscillator is integrated
   with ``h = dt / n`` where ``n`` is the smallest power of two giving at least
   ``steps_per_period`` steps per natural period. Oscillators sharing ``n`` are run as one
   group sharing one time loop.
2. *Cubic Hermite refinement.* In each step the cubic through the end values and end
   slopes of ``u`` (slopes ``u'``), of ``u'`` (slopes ``ü``) and of ``ü_t`` (slopes
   ``−(2ζω ü + ω² u')``) can exceed its end values by at most ``(4/27) h (|y0'| + |y1'|)``
   (the largest value of the Hermite basis functions ``s(1−s)²`` and ``s²(1−s)``). The
   vectorised loop only counts steps where that bound could beat a running peak; only for
   those (rare once the strong motion has passed) a second, scalar pass finds the cubic's
   interior extremum.

Defaults (:data:`DEFAULT_STEPS_PER_PERIOD`) were chosen by measurement, not from a
published source. On seeded synthetic records (band-passed noise with an envelope,
dt = 0.005, 0.01 and 0.02 s, 121 periods from 0.01 to 10 s including 0.03 s) the largest
error against the exact method run with 512 steps per period was, for SD / SV / SA:

* exact, 8 steps per period, refined: 0.09 / 0.12 / 0.10 % (ζ = 0, 0.02, 0.05); at
  4 steps 1.4 %, at 16 steps 0.01 %. Without refinement a sampled sinusoid at n steps per
  period may lose up to 1 − cos(π/n), 7.6 % for n = 8.
* Newmark average acceleration, 128 steps per period: 0.32 / 0.31 / 0.32 % (ζ = 0.02,
  0.05); 1.3 % at 64 steps, 0.08 % at 256 (second order, from the period elongation
  ``(ωh)²/12``).
* Newmark linear acceleration, 96 steps per period: 0.30 / 0.34 / 0.30 % (ζ = 0.02,
  0.05); 0.60 % at 64 and 0.15 % at 128 steps.

Undamped or very lightly damped oscillators are the exception for Newmark: the period
error then accumulates over every cycle of the record (up to 14 % at ζ = 0 and 64 steps),
so for ζ below about 2 % use ``"exact"`` or raise ``steps_per_period``. Sub-step counts
are powers of two, so the actual steps per period lie between the setting and twice it.

``benchmarks/spectrum_kernel.py`` and ``tests/core/test_spectra.py`` re-measure this.

References
----------
.. [1] N. C. Nigam and P. C. Jennings, "Calculation of response spectra from
   strong-motion earthquake records," Bull. Seismol. Soc. Am., vol. 59, no. 2,
   pp. 909-922, 1969.
.. [2] N. M. Newmark, "A method of computation for structural dynamics,"
   J. Eng. Mech. Div. ASCE, vol. 85, no. EM3, pp. 67-94, 1959.
.. [3] A. K. Chopra, *Dynamics of Structures*, 4th ed. Upper Saddle River, NJ, USA:
   Prentice Hall, 2012, ch. 6 (response spectrum definitions).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from sdofreport.core._jit import JIT_OPTIONS, njit
from sdofreport.core.exact import (
    _check_ground_acceleration,
    _check_oscillators,
    _check_time_step,
    exact_coefficients,
)
from sdofreport.core.newmark import (
    METHODS as NEWMARK_METHODS,
    check_newmark_step,
    newmark_coefficients,
    newmark_parameters,
)

__all__ = [
    "SPECTRUM_METHODS",
    "DEFAULT_PERIOD_COUNT",
    "DEFAULT_PERIOD_MIN_S",
    "DEFAULT_PERIOD_MAX_S",
    "DEFAULT_STEPS_PER_PERIOD",
    "default_periods",
    "substep_counts",
    "OscillatorPeaks",
    "OscillatorHistories",
    "ResponseSpectrum",
    "oscillator_peaks",
    "oscillator_histories",
    "response_spectrum",
]

#: Every method name accepted by the spectrum functions (CLI and validator read this).
SPECTRUM_METHODS = ("exact", "newmark-average", "newmark-linear")

DEFAULT_PERIOD_COUNT = 200
DEFAULT_PERIOD_MIN_S = 0.01
DEFAULT_PERIOD_MAX_S = 10.0

#: Minimum integration steps per natural period used when ``steps_per_period`` is None.
#: Chosen by measurement (module docstring); no published source gives these numbers.
DEFAULT_STEPS_PER_PERIOD = {"exact": 8.0, "newmark-average": 128.0, "newmark-linear": 96.0}

# Largest sub-step count per record step (a guard against near-zero periods).
_MAX_SUBSTEPS = 1 << 16

# max over s in [0, 1] of s(1-s)^2 and of s^2(1-s): the cubic Hermite slope basis.
_HERMITE_SLOPE_BOUND = 4.0 / 27.0


def default_periods(count=DEFAULT_PERIOD_COUNT, min_period_s=DEFAULT_PERIOD_MIN_S,
                    max_period_s=DEFAULT_PERIOD_MAX_S) -> np.ndarray:
    """
    Log-spaced natural periods for a response spectrum.

    Parameters
    ----------
    count : int
        Number of periods, >= 2. [-]
    min_period_s : float
        Shortest period, > 0. [s]
    max_period_s : float
        Longest period, > ``min_period_s``. [s]

    Returns
    -------
    numpy.ndarray
        ``count`` periods from ``min_period_s`` to ``max_period_s``, equally spaced in
        logarithm. [s]
    """
    if int(count) != count or count < 2:
        raise ValueError(f"count must be an integer >= 2 [-]; got {count!r}")
    if not (math.isfinite(min_period_s) and min_period_s > 0.0):
        raise ValueError(f"min_period_s must be finite and > 0 [s]; got {min_period_s!r}")
    if not (math.isfinite(max_period_s) and max_period_s > min_period_s):
        raise ValueError(
            f"max_period_s must be finite and > min_period_s = {min_period_s!r} [s]; "
            f"got {max_period_s!r}"
        )
    return np.geomspace(min_period_s, max_period_s, int(count))


# ------------------------------------------------------------------ result classes
@dataclass(frozen=True)
class OscillatorPeaks:
    """Largest absolute responses, one value per oscillator."""

    #: max |u|, relative displacement [m]
    displacement_m: np.ndarray
    #: max |u'|, relative velocity [m/s]
    velocity_m_s: np.ndarray
    #: max |ü + üg|, total acceleration [m/s²]
    total_acceleration_m_s2: np.ndarray


@dataclass(frozen=True)
class OscillatorHistories:
    """Response histories at the record's own samples, plus refined peaks."""

    #: sample times [s], shape (npts,)
    time_s: np.ndarray
    #: relative displacement [m], shape (n_osc, npts)
    displacement_m: np.ndarray
    #: relative velocity [m/s], shape (n_osc, npts)
    velocity_m_s: np.ndarray
    #: total acceleration [m/s²], shape (n_osc, npts)
    total_acceleration_m_s2: np.ndarray
    #: peaks including those between samples
    peaks: OscillatorPeaks


@dataclass(frozen=True)
class ResponseSpectrum:
    """Response spectra on a grid of damping ratios × periods."""

    #: natural periods [s], shape (nT,)
    periods_s: np.ndarray
    #: damping ratios [-], shape (nZ,)
    damping: np.ndarray
    #: spectral displacement max|u| [m], shape (nZ, nT)
    sd_m: np.ndarray
    #: spectral (relative) velocity max|u'| [m/s]
    sv_m_s: np.ndarray
    #: pseudo-spectral velocity ω·SD [m/s]
    psv_m_s: np.ndarray
    #: pseudo-spectral acceleration ω²·SD [m/s²]
    psa_m_s2: np.ndarray
    #: spectral (total) acceleration max|ü_t| [m/s²]
    sa_m_s2: np.ndarray
    #: integration method, one of SPECTRUM_METHODS
    method: str
    #: peak ground acceleration max|üg| [m/s²]
    pga_m_s2: float


# ------------------------------------------------------------------------ kernels
@njit(**JIT_OPTIONS)
def _hermite_abs_max(y0, d0, y1, d1, h):
    """Largest |p(s)| at interior critical points of the cubic Hermite p on [0, 1]."""
    m0 = h * d0
    m1 = h * d1
    c2 = 3.0 * (y1 - y0) - 2.0 * m0 - m1
    c3 = 2.0 * (y0 - y1) + m0 + m1
    # p(s) = y0 + m0 s + c2 s² + c3 s³;  p'(s) = m0 + 2 c2 s + 3 c3 s²
    best = 0.0
    r1 = -1.0
    r2 = -1.0
    if c3 == 0.0:
        if c2 != 0.0:
            r1 = -m0 / (2.0 * c2)
    else:
        disc = c2 * c2 - 3.0 * c3 * m0
        if disc >= 0.0:
            sq = math.sqrt(disc)
            q = -(c2 + sq) if c2 >= 0.0 else -(c2 - sq)
            if q != 0.0:
                r1 = q / (3.0 * c3)
                r2 = m0 / q
    if 0.0 < r1 < 1.0:
        p = y0 + r1 * (m0 + r1 * (c2 + r1 * c3))
        best = max(best, abs(p))
    if 0.0 < r2 < 1.0:
        p = y0 + r2 * (m0 + r2 * (c2 + r2 * c3))
        best = max(best, abs(p))
    return best


@njit(**JIT_OPTIONS)
def _recurrence_peaks(ag, n_sub, h, coef, cdamp, kstiff, u_init, v_init, peaks, refine,
                      store, hist_u, hist_v, hist_a):
    """
    Advance n oscillators through the record with ``n_sub`` sub-steps per sample.

    ``peaks`` (3, n) receives max|u|, max|u'|, max|ü_t|. With ``store`` the states at the
    record's samples go to ``hist_*`` (n, npts). Returns the integration steps executed.
    """
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
    pu = peaks[0]
    pv = peaks[1]
    pa = peaks[2]
    u = u_init.copy()
    v = v_init.copy()
    un = np.empty(n)
    vn = np.empty(n)
    flag = np.zeros(n, dtype=np.int64)
    for j in range(n):
        pu[j] = abs(u[j])
        pv[j] = abs(v[j])
        pa[j] = abs(cdamp[j] * v[j] + kstiff[j] * u[j])
    if store:
        for j in range(n):
            hist_u[j, 0] = u[j]
            hist_v[j, 0] = v[j]
            hist_a[j, 0] = -(cdamp[j] * v[j] + kstiff[j] * u[j])
    bound = (4.0 / 27.0) * h
    inv = 1.0 / n_sub
    for i in range(npts - 1):
        g_lo = ag[i]
        g_hi = ag[i + 1]
        for s in range(n_sub):
            # Linear interpolation; exact at both record samples (n_sub is a power of 2).
            ga = ((n_sub - s) * g_lo + s * g_hi) * inv
            gb = ((n_sub - s - 1) * g_lo + (s + 1) * g_hi) * inv
            nflag = 0
            for j in range(n):
                u0 = u[j]
                v0 = v[j]
                u1 = a11[j] * u0 + a12[j] * v0 + b1[j] * ga + b2[j] * gb
                v1 = a21[j] * u0 + a22[j] * v0 + b3[j] * ga + b4[j] * gb
                un[j] = u1
                vn[j] = v1
                c = cdamp[j]
                k = kstiff[j]
                at1 = -(c * v1 + k * u1)
                au = abs(u1)
                av = abs(v1)
                aa = abs(at1)
                pu0 = pu[j]
                pv0 = pv[j]
                pa0 = pa[j]
                pu1 = au if au > pu0 else pu0
                pv1 = av if av > pv0 else pv0
                pa1 = aa if aa > pa0 else pa0
                pu[j] = pu1
                pv[j] = pv1
                pa[j] = pa1
                if refine:
                    at0 = -(c * v0 + k * u0)
                    r0 = at0 - ga  # relative acceleration ü at both ends
                    r1 = at1 - gb
                    j0 = -(c * r0 + k * v0)  # d(ü_t)/dt at both ends
                    j1 = -(c * r1 + k * v1)
                    # Bound on the cubic: max(|y0|, |y1|) + (4/27) h (|y0'| + |y1'|).
                    f = ((pu1 < bound * (abs(v0) + abs(v1)) + max(abs(u0), au))
                         | (pv1 < bound * (abs(r0) + abs(r1)) + max(abs(v0), av))
                         | (pa1 < bound * (abs(j0) + abs(j1)) + max(abs(at0), aa)))
                    flag[j] = f
                    nflag += f
            if nflag > 0:
                for j in range(n):
                    if flag[j] == 0:
                        continue
                    u0 = u[j]
                    v0 = v[j]
                    u1 = un[j]
                    v1 = vn[j]
                    c = cdamp[j]
                    k = kstiff[j]
                    at0 = -(c * v0 + k * u0)
                    at1 = -(c * v1 + k * u1)
                    r0 = at0 - ga
                    r1 = at1 - gb
                    if pu[j] < bound * (abs(v0) + abs(v1)) + max(abs(u0), abs(u1)):
                        pu[j] = max(pu[j], _hermite_abs_max(u0, v0, u1, v1, h))
                    if pv[j] < bound * (abs(r0) + abs(r1)) + max(abs(v0), abs(v1)):
                        pv[j] = max(pv[j], _hermite_abs_max(v0, r0, v1, r1, h))
                    j0 = -(c * r0 + k * v0)
                    j1 = -(c * r1 + k * v1)
                    if pa[j] < bound * (abs(j0) + abs(j1)) + max(abs(at0), abs(at1)):
                        pa[j] = max(pa[j], _hermite_abs_max(at0, j0, at1, j1, h))
            u, un = un, u
            v, vn = vn, v
        if store:
            for j in range(n):
                hist_u[j, i + 1] = u[j]
                hist_v[j, i + 1] = v[j]
                hist_a[j, i + 1] = -(cdamp[j] * v[j] + kstiff[j] * u[j])
    return (npts - 1) * n_sub * n


# ---------------------------------------------------------------------- plumbing
def _check_method(method, gamma, beta):
    if method not in SPECTRUM_METHODS:
        allowed = ", ".join(SPECTRUM_METHODS)
        raise ValueError(f"method must be one of {allowed}; got {method!r}")
    if method == "exact":
        if gamma is not None or beta is not None:
            raise ValueError(
                f"gamma and beta apply to Newmark methods only; got gamma={gamma!r}, "
                f"beta={beta!r} with method 'exact'"
            )
        return None
    return newmark_parameters(method, gamma, beta)


def _check_steps_per_period(method, steps_per_period) -> float:
    if steps_per_period is None:
        return DEFAULT_STEPS_PER_PERIOD[method]
    try:
        spp = float(steps_per_period)
    except (TypeError, ValueError):
        raise ValueError(
            f"steps_per_period must be a number >= 0 [-]; got {steps_per_period!r}"
        ) from None
    if not math.isfinite(spp) or spp < 0.0:
        raise ValueError(
            f"steps_per_period must be finite and >= 0 [-] (0 turns sub-steps off); "
            f"got {steps_per_period!r}"
        )
    return spp


def substep_counts(natural_periods, time_step, steps_per_period) -> np.ndarray:
    """
    Sub-steps per record step: the smallest power of two with ``h <= T / steps_per_period``.

    Parameters
    ----------
    natural_periods : array-like
        Periods > 0. [s]
    time_step : float
        Record sampling interval. [s]
    steps_per_period : float
        Minimum integration steps per natural period; 0 gives one sub-step. [-]

    Returns
    -------
    numpy.ndarray
        Integer counts, each a power of two. [-]
    """
    periods = np.asarray(natural_periods, dtype=np.float64)
    if steps_per_period <= 0.0:
        return np.ones(periods.shape, dtype=np.int64)
    need = time_step * steps_per_period / periods
    exponent = np.ceil(np.log2(np.maximum(need, 1.0)) - 1e-12)
    counts = np.left_shift(1, exponent.astype(np.int64))
    # Guard the rounding of log2 at exact powers of two.
    counts = np.where(time_step / counts * steps_per_period > periods * (1 + 1e-12),
                      counts * 2, counts)
    if np.any(counts > _MAX_SUBSTEPS):
        shortest = float(periods.min())
        raise ValueError(
            f"natural_period {shortest!r} [s] is too short for time_step {time_step!r} [s] "
            f"with steps_per_period {steps_per_period!r}: it would need more than "
            f"{_MAX_SUBSTEPS} sub-steps per sample"
        )
    return counts


def _run(ag, dt, periods, zeta, method, gamma, beta, steps_per_period, store,
         u_init=None, v_init=None):
    """Integrate every oscillator; returns peaks (3, n), histories or None, steps done."""
    params = _check_method(method, gamma, beta)
    spp = _check_steps_per_period(method, steps_per_period)
    n = periods.size
    npts = ag.size
    peaks = np.zeros((3, n))
    hist = np.zeros((3, n, npts)) if store else None
    u_init = np.zeros(n) if u_init is None else u_init
    v_init = np.zeros(n) if v_init is None else v_init
    # Period zero: a rigid oscillator moves with the ground (u = u' = 0, ü_t = üg).
    rigid = periods == 0.0
    if np.any(rigid):
        peaks[2, rigid] = np.max(np.abs(ag))
        if store:
            hist[2, rigid] = ag
    live = np.flatnonzero(~rigid)
    counts = substep_counts(periods[live], dt, spp)
    if params is not None:
        gamma_, beta_ = params
        for n_sub in np.unique(counts):
            check_newmark_step(dt / n_sub, periods[live[counts == n_sub]], gamma_, beta_)
    steps = 0
    empty = np.zeros((0, 0))
    for n_sub in np.unique(counts):
        idx = live[counts == n_sub]
        h = dt / int(n_sub)
        if params is None:
            coef = exact_coefficients(periods[idx], zeta[idx], h)
        else:
            coef = newmark_coefficients(periods[idx], zeta[idx], h, *params)
        wn = 2.0 * np.pi / periods[idx]
        group_peaks = np.empty((3, idx.size))
        if store:
            hu = np.empty((idx.size, npts))
            hv = np.empty((idx.size, npts))
            ha = np.empty((idx.size, npts))
        else:
            hu = hv = ha = empty
        steps += _recurrence_peaks(
            ag, int(n_sub), h, coef, np.ascontiguousarray(2.0 * zeta[idx] * wn),
            np.ascontiguousarray(wn * wn), np.ascontiguousarray(u_init[idx]),
            np.ascontiguousarray(v_init[idx]), group_peaks, True, store, hu, hv, ha)
        peaks[:, idx] = group_peaks
        if store:
            hist[0, idx] = hu
            hist[1, idx] = hv
            hist[2, idx] = ha
    return peaks, hist, steps


def _peaks_from(raw) -> OscillatorPeaks:
    return OscillatorPeaks(
        displacement_m=raw[0].copy(),
        velocity_m_s=raw[1].copy(),
        total_acceleration_m_s2=raw[2].copy(),
    )


# ---------------------------------------------------------------------- public API
def oscillator_peaks(ground_acceleration, time_step, natural_periods, damping_ratios,
                     method="exact", *, gamma=None, beta=None,
                     steps_per_period=None) -> OscillatorPeaks:
    """
    Peak responses of linear SDOF oscillators starting at rest, including between samples.

    Parameters
    ----------
    ground_acceleration : array-like
        Equally spaced base acceleration, linear between samples, >= 2 finite values. [m/s²]
    time_step : float
        Sampling interval of ``ground_acceleration``, > 0. [s]
    natural_periods : float or array-like
        Undamped natural periods, >= 0 (0 means rigid). [s]
    damping_ratios : float or array-like
        Fractions of critical damping in [0, 1); broadcast with the periods to one flat
        list of oscillators. [-]
    method : {"exact", "newmark-average", "newmark-linear"}
        Integration method; see :data:`SPECTRUM_METHODS`. [-]
    gamma, beta : float, optional
        Override the Newmark parameters (Newmark methods only). [-]
    steps_per_period : float, optional
        Minimum integration steps per natural period; the record is sub-stepped by powers
        of two to reach it. None uses :data:`DEFAULT_STEPS_PER_PERIOD`; 0 turns sub-steps
        off. [-]

    Returns
    -------
    OscillatorPeaks
        One value per oscillator (memory does not grow with the record length).

    Raises
    ------
    ValueError
        For invalid inputs, or a Newmark step beyond its stability limit.

    References
    ----------
    .. [1] N. C. Nigam and P. C. Jennings, "Calculation of response spectra from
       strong-motion earthquake records," Bull. Seismol. Soc. Am., vol. 59, no. 2,
       pp. 909-922, 1969.
    .. [2] N. M. Newmark, "A method of computation for structural dynamics,"
       J. Eng. Mech. Div. ASCE, vol. 85, no. EM3, pp. 67-94, 1959.
    """
    ag = _check_ground_acceleration(ground_acceleration)
    dt = _check_time_step(time_step)
    periods, zeta = _check_oscillators(natural_periods, damping_ratios)
    raw, _, _ = _run(ag, dt, periods, zeta, method, gamma, beta, steps_per_period, False)
    return _peaks_from(raw)


def oscillator_histories(ground_acceleration, time_step, natural_periods, damping_ratios,
                         method="exact", *, gamma=None, beta=None, steps_per_period=None,
                         initial_displacement=0.0,
                         initial_velocity=0.0) -> OscillatorHistories:
    """
    Response histories of linear SDOF oscillators at the record's samples.

    Parameters
    ----------
    ground_acceleration : array-like
        Equally spaced base acceleration, linear between samples. [m/s²]
    time_step : float
        Sampling interval, > 0. [s]
    natural_periods : float or array-like
        Undamped natural periods, >= 0. [s]
    damping_ratios : float or array-like
        Fractions of critical damping in [0, 1); broadcast with the periods. [-]
    method : {"exact", "newmark-average", "newmark-linear"}
        Integration method. [-]
    gamma, beta : float, optional
        Override the Newmark parameters. [-]
    steps_per_period : float, optional
        As in :func:`oscillator_peaks`. [-]
    initial_displacement : float or array-like, optional
        Relative displacement at t = 0, broadcast to the oscillators (default at rest). [m]
    initial_velocity : float or array-like, optional
        Relative velocity at t = 0 (default at rest). [m/s]

    Returns
    -------
    OscillatorHistories
        Histories of shape ``(n_oscillators, npts)`` and refined peaks.

    References
    ----------
    .. [1] N. C. Nigam and P. C. Jennings, "Calculation of response spectra from
       strong-motion earthquake records," Bull. Seismol. Soc. Am., vol. 59, no. 2,
       pp. 909-922, 1969.
    """
    ag = _check_ground_acceleration(ground_acceleration)
    dt = _check_time_step(time_step)
    periods, zeta = _check_oscillators(natural_periods, damping_ratios)
    n = periods.size
    try:
        u0 = np.array(np.broadcast_to(np.asarray(initial_displacement, float), (n,)))
        v0 = np.array(np.broadcast_to(np.asarray(initial_velocity, float), (n,)))
    except ValueError:
        raise ValueError(
            f"initial_displacement [m] and initial_velocity [m/s] must broadcast to "
            f"{n} oscillators"
        ) from None
    if not (np.all(np.isfinite(u0)) and np.all(np.isfinite(v0))):
        raise ValueError("initial_displacement [m] and initial_velocity [m/s] must be finite")
    if np.any((periods == 0.0) & ((u0 != 0.0) | (v0 != 0.0))):
        raise ValueError("a rigid oscillator (natural_period 0 [s]) must start at rest")
    raw, hist, _ = _run(ag, dt, periods, zeta, method, gamma, beta, steps_per_period, True,
                        u0, v0)
    return OscillatorHistories(
        time_s=np.arange(ag.size) * dt,
        displacement_m=hist[0],
        velocity_m_s=hist[1],
        total_acceleration_m_s2=hist[2],
        peaks=_peaks_from(raw),
    )


def response_spectrum(ground_acceleration, time_step, periods, damping_ratios,
                      method="exact", *, gamma=None, beta=None,
                      steps_per_period=None) -> ResponseSpectrum:
    """
    Elastic response spectra SD, SV, PSV, PSA and SA of a base acceleration record.

    Parameters
    ----------
    ground_acceleration : array-like
        Equally spaced base acceleration, linear between samples. [m/s²]
    time_step : float
        Sampling interval, > 0. [s]
    periods : float or array-like
        Natural periods, >= 0, as a 1-D list (0 gives the zero-period values). [s]
    damping_ratios : float or array-like
        Damping ratios in [0, 1), as a 1-D list. [-]
    method : {"exact", "newmark-average", "newmark-linear"}
        Integration method; see :data:`SPECTRUM_METHODS`. [-]
    gamma, beta : float, optional
        Override the Newmark parameters. [-]
    steps_per_period : float, optional
        As in :func:`oscillator_peaks`. [-]

    Returns
    -------
    ResponseSpectrum
        Arrays of shape ``(n_damping, n_periods)``: SD = max|u|, SV = max|u'|,
        PSV = ω SD, PSA = ω² SD, SA = max|ü_t|; at T = 0, SD = SV = PSV = 0 and
        PSA = SA = PGA.

    References
    ----------
    .. [1] A. K. Chopra, *Dynamics of Structures*, 4th ed. Upper Saddle River, NJ, USA:
       Prentice Hall, 2012, ch. 6.
    .. [2] N. C. Nigam and P. C. Jennings, "Calculation of response spectra from
       strong-motion earthquake records," Bull. Seismol. Soc. Am., vol. 59, no. 2,
       pp. 909-922, 1969.
    """
    ag = _check_ground_acceleration(ground_acceleration)
    dt = _check_time_step(time_step)
    t_list = np.atleast_1d(np.asarray(periods, dtype=np.float64)) if _numeric(periods) else None
    z_list = (np.atleast_1d(np.asarray(damping_ratios, dtype=np.float64))
              if _numeric(damping_ratios) else None)
    if t_list is None or t_list.ndim != 1:
        raise ValueError(f"periods must be a number or a 1-D list of numbers [s]; got {periods!r}")
    if z_list is None or z_list.ndim != 1:
        raise ValueError(
            f"damping_ratios must be a number or a 1-D list of numbers [-]; got {damping_ratios!r}"
        )
    grid_t, grid_z = _check_oscillators(t_list[None, :], z_list[:, None])
    raw, _, _ = _run(ag, dt, grid_t, grid_z, method, gamma, beta, steps_per_period, False)
    shape = (z_list.size, t_list.size)
    sd = raw[0].reshape(shape)
    with np.errstate(divide="ignore"):
        wn = np.where(t_list > 0.0, 2.0 * np.pi / np.where(t_list > 0.0, t_list, 1.0), 0.0)
    pga = float(np.max(np.abs(ag)))
    psa = sd * wn**2
    psa[:, t_list == 0.0] = pga
    return ResponseSpectrum(
        periods_s=t_list.copy(),
        damping=z_list.copy(),
        sd_m=sd,
        sv_m_s=raw[1].reshape(shape),
        psv_m_s=sd * wn,
        psa_m_s2=psa,
        sa_m_s2=raw[2].reshape(shape),
        method=method,
        pga_m_s2=pga,
    )


def _numeric(value) -> bool:
    try:
        np.asarray(value, dtype=np.float64)
    except (TypeError, ValueError):
        return False
    return True
