"""
Peak responses, response histories and response spectra of linear SDOF oscillators.

Every method (:data:`SPECTRUM_METHODS`) is written as the two-term recurrence of
:mod:`sdofreport.core.exact` — exact for piecewise-linear excitation [1]_, or Newmark's
step [2]_ recast in the same form — and run by one compiled kernel. Oscillators are taken
in blocks of 16 (a group's last block only its lanes rounded up to 8); each block runs
over the whole record in chunks of 8 steps, with the lanes as the vectorised loop and,
inside it, each lane's state, running maxima and coefficients held in local variables, so
the chunk runs in registers and the compiler turns the lane loop into FMA vector code
(load terms first, so each step adds only two dependent FMAs to the state's latency
chain). The sub-step forcing is interpolated once per group.

Between-sample peaks
--------------------
Peaks fall between samples. Two measures keep them:

1. *Sub-steps.* The excitation is linearly interpolated and each oscillator is integrated
   with ``h = dt / n`` where ``n`` is the smallest power of two giving at least
   ``steps_per_period`` steps per natural period. Oscillators sharing ``n`` are run as one
   group sharing one time loop.
2. *Cubic Hermite refinement.* In each step the cubic through the end values and end
   slopes of ``u`` (slopes ``u'``), of ``u'`` (slopes ``ü``) and of ``ü_t`` (slopes
   ``−(2ζω ü + ω² u')``) is refined to its interior extremum. Its size is bounded by
   ``max_k |y_k| + (h/4) max_k |y'_k|`` over its two ends (the Hermite value weights sum
   to one and the slope weights to at most 1/4 in size), so the kernel works in two
   passes per block: pass 1 (vectorised) runs the recurrence and keeps, per segment of
   64 steps, the state at the segment start and the largest |u|, |u'| and |ü| sampled in
   it (|ü_t| is not tracked: its cubic is bounded through those of u and u'); pass 2
   screens all lanes of a segment at once and re-runs, scalar and with refinement, only
   the segments whose bound exceeds the peak found so far (which starts at the largest
   sample of |u| and |u'|, and for |ü_t| at the largest checkpoint value; each lane's
   segment with the largest |u| is refined first). On the benchmark record about 1.5 %
   of steps are re-run (2-2.5 % without sub-steps).
   The peaks equal those of refining every step, to round-off.

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

Speed (``benchmarks/spectrum_kernel.py``: 11,000 steps at 0.005 s, 500 periods, one
core of a shared 2-core machine whose speed varies by up to ±40 % between runs): exact
method with defaults 940-1,250 M executed oscillator-steps/s wall clock (best of 15;
4 of 5 runs above 1,000 M on 2026-12-02),
1.41 executed per record step; pass 1 alone runs about 2,000 M steps/s and pass 2 (the
re-run segments, scalar) takes about a quarter of a kernel's time. Newmark methods about
750-950 M/s. Per step pass 1 does the two recurrence rows (8 FMA-class operations) and
three running maxima.

``benchmarks/spectrum_kernel.py`` re-measures the speed, ``tests/core/test_spectra.py``
the accuracy.

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

from sdofreport.core import _checks
from sdofreport.core._jit import JIT_OPTIONS, njit
from sdofreport.core.exact import exact_coefficients
from sdofreport.core.newmark import (
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


# Kernel options: ``contract`` lets LLVM fuse a*b + c into one FMA (changes results only
# at round-off), ``error_model="numpy"`` drops the division-by-zero checks.
_KERNEL_OPTIONS = {**JIT_OPTIONS, "fastmath": {"contract", "nnan", "ninf", "nsz"}, "error_model": "numpy",
                   "boundscheck": False}

# Oscillators per block: a multiple of the SIMD width (4 doubles with AVX2). Pass 1 takes
# a block through the record in chunks of _CHUNK steps: for each lane (the loop that is
# vectorised) it loads the state, running maxima and coefficients into local variables,
# runs the chunk with everything in registers and stores back once. A step-outer loop over
# a work array instead stores the state and the maxima every step, because the compiler
# cannot rule out that they overlap the ground motion. 16 lanes per block; the last block
# of a group runs only its lanes rounded up to 8 (one AVX-512 vector,
# two AVX2 vectors), to limit padding.
_BLOCK = 16
# Integration steps per checkpoint segment (measured: 64 about 5 % faster than 32, 15 %
# faster than 16, despite re-running more steps in pass 2).
_SEGMENT = 64
# Steps run with the state in registers (a divisor of _SEGMENT; the compiler unrolls it;
# 4 and 16 measured slower).
_CHUNK = 8
# Rows of a block's work array: recurrence coefficients, 2ζω, ω², state, segment maxima.
_A11, _A12, _A21, _A22, _B1, _B2, _B3, _B4, _CD, _KK, _U, _V, _MU, _MV, _MR = range(15)
_ROWS = 15
# Per segment a block records the state at its start and the maxima of |u| and |u'| over
# its samples: _SAVED rows of _BLOCK values.
_SAVED = 5


@njit(inline="always", **_KERNEL_OPTIONS)
def _forcing(ag, k, shift, mask, inv):
    """Base acceleration at sub-step ``k``: linear between samples, exact at samples."""
    i = k >> shift
    s = k & mask
    if s == 0:
        return ag[i]
    n_sub = mask + 1
    return ((n_sub - s) * ag[i] + s * ag[i + 1]) * inv


@njit(**_KERNEL_OPTIONS)
def _substep_forcing(ag, shift):
    """Base acceleration at every sub-step of ``h = dt / 2**shift``, shape (nsteps + 1,)."""
    mask = (1 << shift) - 1
    inv = 1.0 / (mask + 1)
    nsteps = (ag.size - 1) << shift
    g = np.empty(nsteps + 1)
    for k in range(nsteps + 1):
        g[k] = _forcing(ag, k, shift, mask, inv)
    return g


@njit(**_KERNEL_OPTIONS)
def _refine_segment(g, h, a, cdamp, kstiff, u, v, lo, hi, pu, pv, pa):
    """
    Re-run one oscillator over sub-steps ``lo``..``hi`` of the sub-step forcing ``g``
    from state (u, v); returns the peaks ``(pu, pv, pa)`` of |u|, |u'|, |ü_t| raised to
    the sampled |ü_t| and to the interior extrema of the cubic Hermite of u, u' and ü_t
    in each step whose bound could exceed them. Scalar; used only for flagged segments.
    """
    h3 = h / 3.0
    c = cdamp
    k = kstiff
    a11, a12, a21, a22, b1, b2, b3, b4 = a[0], a[1], a[2], a[3], a[4], a[5], a[6], a[7]
    gb = g[lo]
    at0 = -(c * v + k * u)
    r0 = at0 - gb  # relative acceleration ü
    j0 = -(c * r0 + k * v)  # d(ü_t)/dt
    pa = max(pa, abs(at0))
    for step in range(lo, hi):
        ga = gb
        gb = g[step + 1]
        u1 = (b1 * ga + b2 * gb) + a12 * v + a11 * u
        v1 = (b3 * ga + b4 * gb) + a21 * u + a22 * v
        at1 = -(c * v1 + k * u1)
        r1 = at1 - gb
        j1 = -(c * r1 + k * v1)
        # Pass 1 keeps no |ü_t| maxima: the samples enter here.
        pa = max(pa, abs(at1))
        # The end samples of u and u' are already in the peaks; the cubic can exceed
        # them only if |y0 + (h/3) y0'| or |y1 - (h/3) y1'| does (H00 >= 3 H10 and
        # H01 >= 3 |H11| on [0, 1]).
        if max(abs(u + h3 * v), abs(u1 - h3 * v1)) > pu:
            pu = max(pu, _hermite_abs_max(u, v, u1, v1, h))
        if max(abs(v + h3 * r0), abs(v1 - h3 * r1)) > pv:
            pv = max(pv, _hermite_abs_max(v, r0, v1, r1, h))
        if max(abs(at0 + h3 * j0), abs(at1 - h3 * j1)) > pa:
            pa = max(pa, _hermite_abs_max(at0, j0, at1, j1, h))
        u = u1
        v = v1
        at0 = at1
        r0 = r1
        j0 = j1
    return pu, pv, pa


@njit(inline="always", **_KERNEL_OPTIONS)
def _advance(w, g, step, count, width):
    """
    Run lanes ``0..width-1`` of a block over sub-steps ``step..step+count``, updating the
    state and the running segment maxima of |u| and |u'| in ``w``. Lanes are the outer
    (vectorised) loop and everything a lane needs is a local variable, so nothing is
    stored inside the step loop; with ``count = _CHUNK`` (a constant) the step loop is
    unrolled.
    """
    for j in range(width):
        a11 = w[_A11 * _BLOCK + j]
        a12 = w[_A12 * _BLOCK + j]
        a21 = w[_A21 * _BLOCK + j]
        a22 = w[_A22 * _BLOCK + j]
        b1 = w[_B1 * _BLOCK + j]
        b2 = w[_B2 * _BLOCK + j]
        b3 = w[_B3 * _BLOCK + j]
        b4 = w[_B4 * _BLOCK + j]
        c = w[_CD * _BLOCK + j]
        k = w[_KK * _BLOCK + j]
        u = w[_U * _BLOCK + j]
        v = w[_V * _BLOCK + j]
        mu = w[_MU * _BLOCK + j]
        mv = w[_MV * _BLOCK + j]
        mr = w[_MR * _BLOCK + j]
        for s in range(count):
            ga = g[step + s]
            gb = g[step + s + 1]
            # Load terms first, state last: two dependent FMAs per step.
            u1 = (b1 * ga + b2 * gb) + a12 * v + a11 * u
            v1 = (b3 * ga + b4 * gb) + a21 * u + a22 * v
            mu = max(mu, abs(u1))
            mv = max(mv, abs(v1))
            mr = max(mr, abs(c * v1 + (k * u1 + gb)))  # = |ü|
            u = u1
            v = v1
        w[_U * _BLOCK + j] = u
        w[_V * _BLOCK + j] = v
        w[_MU * _BLOCK + j] = mu
        w[_MV * _BLOCK + j] = mv
        w[_MR * _BLOCK + j] = mr


@njit(**_KERNEL_OPTIONS)
def _first_pass(w, g, saved, nsteps, width):
    """
    Pass 1 for one block of ``width`` lanes: the recurrence over the whole record, keeping
    per segment the state at its start and the maxima of |u| and |u'| (rows of ``saved``).

    A kernel of its own, called from one site with a run-time width, rather than inlined
    by numba into two call sites: numba then types and lowers it once, which cut the
    first compilation of :func:`_recurrence_peaks` from 4.6 s to 2.9 s of CPU time
    (measured on the reference machine, 2026-12-05), with bitwise the same peaks and the
    same speed (:func:`_advance` is still inlined into it, so the constant-length chunks
    are unrolled).
    """
    for sg in range(saved.shape[0]):
        lo = sg * _SEGMENT
        hi = min(lo + _SEGMENT, nsteps)
        for j in range(_BLOCK):
            u = w[_U * _BLOCK + j]
            v = w[_V * _BLOCK + j]
            saved[sg, j] = u
            saved[sg, _BLOCK + j] = v
            w[_MU * _BLOCK + j] = abs(u)
            w[_MV * _BLOCK + j] = abs(v)
            w[_MR * _BLOCK + j] = abs(w[_CD * _BLOCK + j] * v + (w[_KK * _BLOCK + j] * u + g[lo]))
        step = lo
        while step + _CHUNK <= hi:
            _advance(w, g, step, _CHUNK, width)
            step += _CHUNK
        if step < hi:
            _advance(w, g, step, hi - step, width)
        for j in range(_BLOCK):
            saved[sg, 2 * _BLOCK + j] = w[_MU * _BLOCK + j]
            saved[sg, 3 * _BLOCK + j] = w[_MV * _BLOCK + j]
            saved[sg, 4 * _BLOCK + j] = w[_MR * _BLOCK + j]


@njit(inline="always", **_KERNEL_OPTIONS)
def _segment_bounds(saved, sg, j, c, k, h4):
    """
    Bounds over segment ``sg`` of lane ``j`` on the Hermite cubics of u, u' and ü_t.

    A cubic Hermite on one step is p(s) = H00 y0 + H01 y1 + h (H10 y0' + H11 y1') with
    H00 + H01 = 1 (both >= 0 on [0, 1]) and |H10| + |H11| = s(1 − s) <= 1/4, so
    |p| <= max|y_k| + (h/4) max|y'_k|. Over a segment, with the sampled maxima M_u, M_v,
    M_ü: u is bounded by M_u + (h/4) M_v, u' by M_v + (h/4) M_ü, and ü_t = −(2ζω u' + ω² u)
    (whose cubic is the same combination of those two) by 2ζω·(bound of u') +
    ω²·(bound of u). ``h4`` is h/4 [s].
    """
    bu = saved[sg, 2 * _BLOCK + j] + h4 * saved[sg, 3 * _BLOCK + j]
    bv = saved[sg, 3 * _BLOCK + j] + h4 * saved[sg, 4 * _BLOCK + j]
    return bu, bv, c * bv + k * bu


@njit(**_KERNEL_OPTIONS)
def _recurrence_peaks(ag, shift, h, coef, cdamp, kstiff, u_init, v_init, peaks):
    """
    Peaks of n oscillators sharing the sub-step ``h = dt / 2**shift``.

    ``peaks`` (3, n) receives max|u|, max|u'|, max|ü_t| including between-sample extrema
    (cubic Hermite, module docstring). Returns the oscillator-steps re-run in pass 2.

    Per block of ``_BLOCK`` oscillators, pass 1 runs the recurrence over the record
    (vectorised) and keeps, for every segment of ``_SEGMENT`` steps, the state at its start
    and the maxima M of |u| and |u'| over its samples — the whole work of a step is the
    two recurrence rows and two running maxima. In each step the cubic of y (slopes y')
    is bounded by max |y_k| + (h/3)|y'_k| over its two ends (the Hermite weights satisfy
    s(1-s)² <= (1+2s)(1-s)²/3 and s²(1-s) <= s²(3-2s)/3); :func:`_segment_bounds` turns
    that into bounds per segment. Pass 2 re-runs, from its checkpoint and with
    refinement, only a segment whose bound exceeds the peak found so far. The peaks so
    far start at the largest sampled |u| and |u'| and, for |ü_t|, at the largest value
    at the checkpoints; each lane's segment with the largest |u| is refined first, which
    lifts the |ü_t| peak near its final value before the other segments are screened.
    Short names (DEVELOPERS.md, names of inputs): ``ag`` acceleration_m_s2 [m/s²], ``h``
    the sub-step time_step_s / 2**shift [s].
    """
    n = coef.shape[1]
    g = _substep_forcing(ag, shift)
    nsteps = g.size - 1
    nseg = (nsteps + _SEGMENT - 1) // _SEGMENT
    h4 = h / 4.0
    w = np.empty(_ROWS * _BLOCK)  # zeroed per block; np.empty: no np.zeros to compile
    a = np.empty(8)
    saved = np.empty((nseg, _SAVED * _BLOCK))
    pk = np.empty((3, _BLOCK))
    first = np.empty(_BLOCK, dtype=np.int64)  # zeroed per block
    rerun = 0
    for b0 in range(0, n, _BLOCK):
        m = min(_BLOCK, n - b0)
        w[:] = 0.0  # padded lanes stay at rest
        for j in range(m):
            for r in range(8):
                w[r * _BLOCK + j] = coef[r, b0 + j]
            w[_CD * _BLOCK + j] = cdamp[b0 + j]
            w[_KK * _BLOCK + j] = kstiff[b0 + j]
            w[_U * _BLOCK + j] = u_init[b0 + j]
            w[_V * _BLOCK + j] = v_init[b0 + j]
        # ---- pass 1: recurrence and segment maxima, vectorised across the block. A
        # partial block runs its lanes rounded up to 8, one 512-bit vector (a lane count
        # known only at run time, so the compiler vectorises rather than unrolls it).
        # One call site with a run-time width: numba compiles one specialisation (a
        # constant _BLOCK would be typed as a literal and compiled separately).
        _first_pass(w, g, saved, nsteps, _BLOCK if m == _BLOCK else (m + 7) & -8)
        # ---- pass 2: the peaks so far, then refinement of the segments whose bound
        # beats them. Screening runs across lanes; a segment any lane needs is then
        # checked lane by lane against the peak as it stands.
        pk[:] = 0.0
        first[:] = 0
        for sg in range(nseg):
            for j in range(_BLOCK):
                mu = saved[sg, 2 * _BLOCK + j]
                if mu > pk[0, j]:
                    pk[0, j] = mu
                    first[j] = sg
                pk[1, j] = max(pk[1, j], saved[sg, 3 * _BLOCK + j])
                pk[2, j] = max(pk[2, j], abs(w[_CD * _BLOCK + j] * saved[sg, _BLOCK + j]
                                             + w[_KK * _BLOCK + j] * saved[sg, j]))
        for j in range(m, _BLOCK):
            pk[:, j] = np.inf  # padded lanes (|ü| = |üg| there) never ask for refinement
        for j in range(m):
            for r in range(8):
                a[r] = w[r * _BLOCK + j]
            sg = first[j]
            lo = sg * _SEGMENT
            hi = min(lo + _SEGMENT, nsteps)
            pk[0, j], pk[1, j], pk[2, j] = _refine_segment(
                g, h, a, w[_CD * _BLOCK + j], w[_KK * _BLOCK + j], saved[sg, j],
                saved[sg, _BLOCK + j], lo, hi, pk[0, j], pk[1, j], pk[2, j])
            rerun += hi - lo
        for sg in range(nseg):
            hit = False
            for j in range(_BLOCK):
                bu, bv, ba = _segment_bounds(saved, sg, j, w[_CD * _BLOCK + j],
                                             w[_KK * _BLOCK + j], h4)
                hit |= (bu > pk[0, j]) | (bv > pk[1, j]) | (ba > pk[2, j])
            if not hit:
                continue
            lo = sg * _SEGMENT
            hi = min(lo + _SEGMENT, nsteps)
            for j in range(m):
                if sg == first[j]:
                    continue
                c = w[_CD * _BLOCK + j]
                k = w[_KK * _BLOCK + j]
                bu, bv, ba = _segment_bounds(saved, sg, j, c, k, h4)
                if bu > pk[0, j] or bv > pk[1, j] or ba > pk[2, j]:
                    for r in range(8):
                        a[r] = w[r * _BLOCK + j]
                    pk[0, j], pk[1, j], pk[2, j] = _refine_segment(
                        g, h, a, c, k, saved[sg, j], saved[sg, _BLOCK + j], lo, hi,
                        pk[0, j], pk[1, j], pk[2, j])
                    rerun += hi - lo
        for j in range(m):
            for r in range(3):
                peaks[r, b0 + j] = pk[r, j]
    return rerun


@njit(**_KERNEL_OPTIONS)
def _recurrence_samples(ag, shift, coef, cdamp, kstiff, u_init, v_init, hist_u, hist_v,
                        hist_a):
    """Plain recurrence with ``2**shift`` sub-steps; states at the record's samples."""
    n = coef.shape[1]
    npts = ag.size
    n_sub = 1 << shift
    inv = 1.0 / n_sub
    for j in range(n):
        a = coef[:, j]
        c = cdamp[j]
        k = kstiff[j]
        u = u_init[j]
        v = v_init[j]
        hist_u[j, 0] = u
        hist_v[j, 0] = v
        hist_a[j, 0] = -(c * v + k * u)
        for i in range(npts - 1):
            g_lo = ag[i]
            g_hi = ag[i + 1]
            gb = g_lo
            for s in range(n_sub):
                ga = gb
                gb = g_hi if s == n_sub - 1 else ((n_sub - s - 1) * g_lo + (s + 1) * g_hi) * inv
                u1 = (a[4] * ga + a[5] * gb) + a[1] * v + a[0] * u
                v = (a[6] * ga + a[7] * gb) + a[2] * u + a[3] * v
                u = u1
            hist_u[j, i + 1] = u
            hist_v[j, i + 1] = v
            hist_a[j, i + 1] = -(c * v + k * u)


# ---------------------------------------------------------------------- plumbing
def _check_method(method, gamma, beta):
    _checks.one_of(method, "method", SPECTRUM_METHODS)
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


def substep_counts(natural_periods_s, time_step_s, steps_per_period) -> np.ndarray:
    """
    Sub-steps per record step: the smallest power of two with ``h <= T / steps_per_period``.

    Parameters
    ----------
    natural_periods_s : array-like
        Periods > 0. [s]
    time_step_s : float
        Record sampling interval. [s]
    steps_per_period : float
        Minimum integration steps per natural period; 0 gives one sub-step. [-]

    Returns
    -------
    numpy.ndarray
        Integer counts, each a power of two. [-]
    """
    periods = np.asarray(natural_periods_s, dtype=np.float64)
    if steps_per_period <= 0.0:
        return np.ones(periods.shape, dtype=np.int64)
    need = time_step_s * steps_per_period / periods
    exponent = np.ceil(np.log2(np.maximum(need, 1.0)) - 1e-12)
    counts = np.left_shift(1, exponent.astype(np.int64))
    # Guard the rounding of log2 at exact powers of two.
    counts = np.where(time_step_s / counts * steps_per_period > periods * (1 + 1e-12),
                      counts * 2, counts)
    if np.any(counts > _MAX_SUBSTEPS):
        shortest = float(periods.min())
        raise ValueError(
            f"natural_period {shortest!r} [s] is too short for time_step_s {time_step_s!r} [s] "
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
    for n_sub in np.unique(counts):
        idx = live[counts == n_sub]
        shift = int(n_sub).bit_length() - 1  # n_sub is a power of two
        h = dt / int(n_sub)
        if params is None:
            coef = exact_coefficients(periods[idx], zeta[idx], h)
        else:
            coef = newmark_coefficients(periods[idx], zeta[idx], h, *params)
        wn = 2.0 * np.pi / periods[idx]
        cdamp = np.ascontiguousarray(2.0 * zeta[idx] * wn)
        kstiff = np.ascontiguousarray(wn * wn)
        u0 = np.ascontiguousarray(u_init[idx])
        v0 = np.ascontiguousarray(v_init[idx])
        group_peaks = np.empty((3, idx.size))
        _recurrence_peaks(ag, shift, h, coef, cdamp, kstiff, u0, v0, group_peaks)
        steps += (npts - 1) * int(n_sub) * idx.size
        if store:
            hu = np.empty((idx.size, npts))
            hv = np.empty((idx.size, npts))
            ha = np.empty((idx.size, npts))
            _recurrence_samples(ag, shift, coef, cdamp, kstiff, u0, v0, hu, hv, ha)
            hist[0, idx] = hu
            hist[1, idx] = hv
            hist[2, idx] = ha
            # The two kernels may round differently (FMA contraction); keep peaks >= samples.
            for row, values in enumerate((hu, hv, ha)):
                np.maximum(group_peaks[row], np.max(np.abs(values), axis=1),
                           out=group_peaks[row])
        peaks[:, idx] = group_peaks
    return peaks, hist, steps


def load_peak_kernel() -> None:
    """
    Compile, or load from the kernel cache, the kernel of :func:`oscillator_peaks` (and
    the kernels it calls) alone, on a made-up 2-sample input with the argument types
    :func:`_run` passes (see :func:`load_history_kernel`).
    """
    ag = _checks.acceleration_history([0.0, 0.0])
    one = np.zeros(1)
    _recurrence_peaks(ag, 0, 0.01, np.zeros((8, 1)), one, one, one, one, np.empty((3, 1)))


def load_history_kernel() -> None:
    """
    Compile, or load from the kernel cache, the kernel that :func:`oscillator_histories`
    adds to those of :func:`oscillator_peaks`, without compiling the peak kernel.

    It runs that kernel on a made-up 2-sample input with the argument types :func:`_run`
    passes (read-only ground motion, C-ordered work arrays, an integer shift): the types,
    not the values, decide what numba compiles, and compiled kernels land in the kernel
    cache, where later processes find them.
    """
    ag = _checks.acceleration_history([0.0, 0.0])
    one = np.zeros(1)
    hu, hv, ha = (np.empty((1, ag.size)) for _ in range(3))
    _recurrence_samples(ag, 0, np.zeros((8, 1)), one, one, one, one, hu, hv, ha)


def _peaks_from(raw) -> OscillatorPeaks:
    return OscillatorPeaks(
        displacement_m=raw[0].copy(),
        velocity_m_s=raw[1].copy(),
        total_acceleration_m_s2=raw[2].copy(),
    )


# ---------------------------------------------------------------------- public API
def oscillator_peaks(acceleration_m_s2, time_step_s, natural_periods_s, damping_ratios,
                     method="exact", *, gamma=None, beta=None,
                     steps_per_period=None) -> OscillatorPeaks:
    """
    Peak responses of linear SDOF oscillators starting at rest, including between samples.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced base acceleration, linear between samples, >= 2 finite values. [m/s²]
    time_step_s : float
        Sampling interval of ``acceleration_m_s2``, > 0. [s]
    natural_periods_s : float or array-like
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
    ag = _checks.acceleration_history(acceleration_m_s2)
    dt = _checks.time_step(time_step_s)
    periods, zeta = _checks.oscillators(natural_periods_s, damping_ratios)
    raw, _, _ = _run(ag, dt, periods, zeta, method, gamma, beta, steps_per_period, False)
    return _peaks_from(raw)


def oscillator_histories(acceleration_m_s2, time_step_s, natural_periods_s, damping_ratios,
                         method="exact", *, gamma=None, beta=None, steps_per_period=None,
                         initial_displacement_m=0.0,
                         initial_velocity_m_s=0.0) -> OscillatorHistories:
    """
    Response histories of linear SDOF oscillators at the record's samples.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced base acceleration, linear between samples. [m/s²]
    time_step_s : float
        Sampling interval, > 0. [s]
    natural_periods_s : float or array-like
        Undamped natural periods, >= 0. [s]
    damping_ratios : float or array-like
        Fractions of critical damping in [0, 1); broadcast with the periods. [-]
    method : {"exact", "newmark-average", "newmark-linear"}
        Integration method. [-]
    gamma, beta : float, optional
        Override the Newmark parameters. [-]
    steps_per_period : float, optional
        As in :func:`oscillator_peaks`. [-]
    initial_displacement_m : float or array-like, optional
        Relative displacement at t = 0, broadcast to the oscillators (default at rest). [m]
    initial_velocity_m_s : float or array-like, optional
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
    ag = _checks.acceleration_history(acceleration_m_s2)
    dt = _checks.time_step(time_step_s)
    periods, zeta = _checks.oscillators(natural_periods_s, damping_ratios)
    n = periods.size
    try:
        u0 = np.array(np.broadcast_to(np.asarray(initial_displacement_m, float), (n,)))
        v0 = np.array(np.broadcast_to(np.asarray(initial_velocity_m_s, float), (n,)))
    except ValueError:
        raise ValueError(
            f"initial_displacement_m [m] and initial_velocity_m_s [m/s] must broadcast to "
            f"{n} oscillators"
        ) from None
    if not (np.all(np.isfinite(u0)) and np.all(np.isfinite(v0))):
        raise ValueError(
            "initial_displacement_m [m] and initial_velocity_m_s [m/s] must be finite"
        )
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


def response_spectrum(acceleration_m_s2, time_step_s, periods_s, damping_ratios,
                      method="exact", *, gamma=None, beta=None,
                      steps_per_period=None) -> ResponseSpectrum:
    """
    Elastic response spectra SD, SV, PSV, PSA and SA of a base acceleration record.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced base acceleration, linear between samples. [m/s²]
    time_step_s : float
        Sampling interval, > 0. [s]
    periods_s : float or array-like
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
    ag = _checks.acceleration_history(acceleration_m_s2)
    dt = _checks.time_step(time_step_s)
    t_list = (np.atleast_1d(np.asarray(periods_s, dtype=np.float64))
              if _numeric(periods_s) else None)
    z_list = (np.atleast_1d(np.asarray(damping_ratios, dtype=np.float64))
              if _numeric(damping_ratios) else None)
    if t_list is None or t_list.ndim != 1:
        raise ValueError(
            f"periods_s must be a number or a 1-D list of numbers [s]; got {periods_s!r}"
        )
    if z_list is None or z_list.ndim != 1:
        raise ValueError(
            f"damping_ratios must be a number or a 1-D list of numbers [-]; got {damping_ratios!r}"
        )
    grid_t, grid_z = _checks.oscillators(t_list[None, :], z_list[:, None],
                                         periods_name="periods_s")
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
