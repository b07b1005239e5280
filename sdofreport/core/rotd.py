"""
Orientation-independent spectra of two horizontal components: RotD50 and RotD100.

For a pair of orthogonal horizontal accelerations ``a1(t)``, ``a2(t)`` and a direction
θ, the rotated component is ``a1 cos θ + a2 sin θ``. A linear oscillator's response to
it is the same combination of its responses to ``a1`` and ``a2``:
``u(θ, t) = u1(t) cos θ + u2(t) sin θ``. Each period therefore needs two integrations,
whatever the number of angles. RotDnn is the nn-th percentile over θ in [0°, 180°) of
``max_t |u(θ, t)|`` [1]_: RotD50 the median, RotD100 the maximum.

Peaks over time are taken at samples. So that they do not miss the peaks between the
record's samples, the record is resampled (linearly, which the integrators assume
anyway, so the response is unchanged at the original samples) to at least
``samples_per_period`` samples per natural period. A sampled sinusoid at n samples per
period can lose up to ``1 − cos(π/n)`` of its peak (0.48 % at n = 32); this bounds the
error of every value in :class:`RotDSpectrum` (closed form, no source needed).

Exact pruning: for each oscillator the samples of largest radius ``r = √(u1² + u2²)``
are projected first; ``L = min_θ`` of those peaks is a lower bound of every angle's
peak, and since ``|u(θ, t)| <= r(t)``, samples with ``r <= L`` cannot change any peak
and are skipped. Nearly polarised motion (L small) falls back to all samples.

References
----------
.. [1] D. M. Boore, "Orientation-independent, nongeometric-mean measures of seismic
   intensity from two horizontal components of motion," Bull. Seismol. Soc. Am.,
   vol. 100, no. 4, pp. 1830-1835, 2010, doi:10.1785/0120090400.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from sdofreport.core import _checks
from sdofreport.core.spectra import SPECTRUM_METHODS, oscillator_histories
from sdofreport.core.units import G

__all__ = [
    "DEFAULT_ANGLES_DEG",
    "DEFAULT_SAMPLES_PER_PERIOD",
    "RotDSpectrum",
    "rotated_peaks",
    "rotd_spectrum",
]

#: Rotation angles of Boore (2010): 0°, 1°, ..., 179°.
DEFAULT_ANGLES_DEG = np.arange(0.0, 180.0, 1.0)

#: Minimum samples per natural period for peaks over time (see module docstring);
#: chosen for a 0.5 % bound on the sampling loss, not from a published source.
DEFAULT_SAMPLES_PER_PERIOD = 32.0

# Upper bound of (oscillators × resampled points) integrated at once; bounds memory to
# about 6 arrays × 8 bytes × this = 48 MB.
_CHUNK_VALUES = 1_000_000
# Samples of largest radius projected first in the pruning step.
_PRUNE_FIRST = 256
# Time samples per block when projecting all samples (bounds a (n_angles, block) array).
_BLOCK = 4096
# Largest resampling factor per record step (guards near-zero periods).
_MAX_UPSAMPLE = 1 << 10


@dataclass(frozen=True)
class RotDSpectrum:
    """RotD50/RotD100 and component spectra of a two-component record, one damping."""

    #: natural periods [s], shape (nT,)
    periods_s: np.ndarray
    #: damping ratio [-]
    damping: float
    #: rotation angles [deg], shape (nA,)
    angles_deg: np.ndarray
    #: RotD50 spectral displacement (median over angles of max|u(θ)|) [m], shape (nT,)
    rotd50_m: np.ndarray
    #: RotD100 spectral displacement (maximum over angles) [m]
    rotd100_m: np.ndarray
    #: RotD50 pseudo-spectral acceleration ω² RotD50 (RotD50 of PGA at T = 0) [g]
    rotd50_psa_g: np.ndarray
    #: RotD100 pseudo-spectral acceleration [g]
    rotd100_psa_g: np.ndarray
    #: angle of the RotD100 peak (first if several) [deg]
    rotd100_angle_deg: np.ndarray
    #: pseudo-spectral acceleration per angle [g], shape (nT, nA)
    psa_by_angle_g: np.ndarray
    #: component 1 (θ = 0) spectral displacement [m]
    sd_h1_m: np.ndarray
    #: component 2 (θ = 90°) spectral displacement [m]
    sd_h2_m: np.ndarray
    #: component 1 pseudo-spectral acceleration [g]
    psa_h1_g: np.ndarray
    #: component 2 pseudo-spectral acceleration [g]
    psa_h2_g: np.ndarray
    #: geometric mean √(PSA1 PSA2) of the two components [g]
    geomean_psa_g: np.ndarray
    #: square root of the sum of squares √(PSA1² + PSA2²) [g]
    srss_psa_g: np.ndarray
    #: integration method, one of SPECTRUM_METHODS
    method: str


def _check_angles(angles_deg) -> np.ndarray:
    try:
        ang = np.atleast_1d(np.asarray(angles_deg, dtype=np.float64))
    except (TypeError, ValueError):
        raise ValueError(f"angles_deg must be numbers in [0, 180) [deg]; got {angles_deg!r}") \
            from None
    if ang.ndim != 1 or ang.size == 0:
        raise ValueError(f"angles_deg must be a non-empty 1-D list [deg]; got shape {ang.shape}")
    if not (np.all(np.isfinite(ang)) and np.all((ang >= 0.0) & (ang < 180.0))):
        raise ValueError(f"angles_deg must lie in [0, 180) [deg]; got {angles_deg!r}")
    return ang


def _direction_matrix(angles_deg: np.ndarray) -> np.ndarray:
    """(nA, 2) rows (cos θ, sin θ); exact at multiples of 90° so θ = 0, 90° are pure."""
    rad = np.deg2rad(angles_deg)
    c = np.cos(rad)
    s = np.sin(rad)
    c[angles_deg == 90.0] = 0.0
    s[angles_deg == 0.0] = 0.0
    return np.column_stack([c, s])


def _project_max(directions: np.ndarray, x1: np.ndarray, x2: np.ndarray) -> np.ndarray:
    """max over samples of |x1 cos θ + x2 sin θ| for every row, in blocks."""
    peaks = np.zeros(directions.shape[0])
    for start in range(0, x1.size, _BLOCK):
        block = np.vstack([x1[start:start + _BLOCK], x2[start:start + _BLOCK]])
        np.maximum(peaks, np.abs(directions @ block).max(axis=1), out=peaks)
    return peaks


def rotated_peaks(history_1, history_2, angles_deg=DEFAULT_ANGLES_DEG) -> np.ndarray:
    """
    Peak over time of the rotated combination of two orthogonal histories.

    ``max_t |x1(t) cos θ + x2(t) sin θ|`` for every θ, taken at the given samples, with
    the exact pruning described in the module docstring.

    Parameters
    ----------
    history_1 : array-like
        History along direction θ = 0, shape (npts,); any unit. [unit]
    history_2 : array-like
        History along θ = 90°, same shape and unit. [unit]
    angles_deg : array-like, optional
        Rotation angles in [0, 180). [deg]

    Returns
    -------
    numpy.ndarray
        Peak for each angle, shape (nA,). [unit]

    References
    ----------
    .. [1] D. M. Boore, Bull. Seismol. Soc. Am., vol. 100, no. 4, pp. 1830-1835, 2010,
       doi:10.1785/0120090400.
    """
    x1 = np.asarray(history_1, dtype=np.float64)
    x2 = np.asarray(history_2, dtype=np.float64)
    if x1.ndim != 1 or x1.shape != x2.shape or x1.size == 0:
        raise ValueError(
            f"history_1 and history_2 must be non-empty 1-D arrays of the same length; "
            f"got shapes {x1.shape} and {x2.shape}"
        )
    if not (np.all(np.isfinite(x1)) and np.all(np.isfinite(x2))):
        raise ValueError("history_1 and history_2 must be finite")
    directions = _direction_matrix(_check_angles(angles_deg))
    return _rotated_peaks(directions, x1, x2)


def _rotated_peaks(directions, x1, x2) -> np.ndarray:
    r2 = x1 * x1 + x2 * x2
    if x1.size <= _PRUNE_FIRST:
        return _project_max(directions, x1, x2)
    first = np.argpartition(r2, -_PRUNE_FIRST)[-_PRUNE_FIRST:]
    peaks = _project_max(directions, x1[first], x2[first])
    floor = peaks.min()
    # |u(θ, t)| <= r(t): samples with r <= floor cannot raise any angle's peak.
    rest = r2 > floor * floor
    rest[first] = False
    if np.any(rest):
        np.maximum(peaks, _project_max(directions, x1[rest], x2[rest]), out=peaks)
    return peaks


def _check_pair(acceleration_1_m_s2, acceleration_2_m_s2) -> tuple[np.ndarray, np.ndarray]:
    names = ("acceleration_1_m_s2", "acceleration_2_m_s2")
    a1 = _checks.finite_array(acceleration_1_m_s2, names[0], "m/s²", min_size=2)
    a2 = _checks.finite_array(acceleration_2_m_s2, names[1], "m/s²", min_size=2)
    _checks.same_length(a1, a2, names, "m/s²")
    return a1, a2


def _upsample(acc: np.ndarray, factor: int) -> np.ndarray:
    """Linear interpolation to ``factor`` sub-intervals per step (exact at old samples)."""
    if factor == 1:
        return acc
    frac = np.arange(factor) / factor
    inner = acc[:-1, None] * (1.0 - frac) + acc[1:, None] * frac
    return np.append(inner.ravel(), acc[-1])


def rotd_spectrum(acceleration_1_m_s2, acceleration_2_m_s2, time_step_s, periods_s,
                  damping_ratio=0.05, *,
                  angles_deg=DEFAULT_ANGLES_DEG, method="exact",
                  samples_per_period=DEFAULT_SAMPLES_PER_PERIOD) -> RotDSpectrum:
    """
    RotD50, RotD100, geometric-mean and SRSS spectra of two horizontal components.

    Per period, both components are integrated once with
    :func:`sdofreport.core.spectra.oscillator_histories`; all angles then come from one
    matrix product ``[cos θ, sin θ] @ [u1; u2]`` [1]_. PSA = ω² SD; at ``T = 0`` the
    values are those of the rotated ground acceleration (RotD50/RotD100 of PGA).

    Parameters
    ----------
    acceleration_1_m_s2 : array-like
        Ground acceleration along the first horizontal axis (θ = 0). [m/s²]
    acceleration_2_m_s2 : array-like
        Ground acceleration along the orthogonal axis (θ = 90°), same length. [m/s²]
    time_step_s : float
        Sampling interval of both records, > 0. [s]
    periods_s : float or array-like
        Natural periods, >= 0, as a 1-D list. [s]
    damping_ratio : float, optional
        Damping ratio in [0, 1). [-]
    angles_deg : array-like, optional
        Rotation angles in [0, 180); default 0, 1, ..., 179. [deg]
    method : {"exact", "newmark-average", "newmark-linear"}
        Integration method of :func:`oscillator_histories`. [-]
    samples_per_period : float, optional
        Minimum samples per natural period for the peaks over time, >= 1; the record is
        resampled by a power of two to reach it. [-]

    Returns
    -------
    RotDSpectrum

    References
    ----------
    .. [1] D. M. Boore, "Orientation-independent, nongeometric-mean measures of seismic
       intensity from two horizontal components of motion," Bull. Seismol. Soc. Am.,
       vol. 100, no. 4, pp. 1830-1835, 2010, doi:10.1785/0120090400.
    """
    a1, a2 = _check_pair(acceleration_1_m_s2, acceleration_2_m_s2)
    step = _checks.time_step(time_step_s)
    try:
        t_list = np.atleast_1d(np.asarray(periods_s, dtype=np.float64))
    except (TypeError, ValueError):
        t_list = None
    if t_list is None or t_list.ndim != 1 or t_list.size == 0:
        raise ValueError(
            f"periods_s must be a number or a 1-D list of numbers [s]; got {periods_s!r}"
        )
    if not (np.all(np.isfinite(t_list)) and np.all(t_list >= 0.0)):
        raise ValueError(f"periods_s must be finite and >= 0 [s]; got {periods_s!r}")
    zeta = _checks.damping_ratio(damping_ratio)
    _checks.one_of(method, "method", SPECTRUM_METHODS)
    try:
        spp = float(samples_per_period)
    except (TypeError, ValueError):
        spp = math.nan
    if not (math.isfinite(spp) and spp >= 1.0):
        raise ValueError(f"samples_per_period must be a number >= 1 [-]; got {samples_per_period!r}")
    angles = _check_angles(angles_deg)
    directions = _direction_matrix(angles)

    n_t = t_list.size
    peak_by_angle = np.zeros((n_t, angles.size))  # displacement, or acceleration at T = 0
    comp = np.zeros((n_t, 2))
    # Resampling factor per period: smallest power of two giving spp samples per period.
    factors = np.ones(n_t, dtype=np.int64)
    positive = t_list > 0.0
    need = np.ceil(spp * step / np.where(positive, t_list, 1.0))
    factors[positive] = np.minimum(
        2 ** np.ceil(np.log2(np.maximum(need[positive], 1.0))).astype(np.int64), _MAX_UPSAMPLE)

    rigid = np.flatnonzero(~positive)
    if rigid.size:
        acc_peaks = _rotated_peaks(directions, a1, a2)
        peak_by_angle[rigid] = acc_peaks
        comp[rigid] = [np.max(np.abs(a1)), np.max(np.abs(a2))]
    for factor in np.unique(factors[positive]):
        idx = np.flatnonzero(positive & (factors == factor))
        u1 = _upsample(a1, int(factor))
        u2 = _upsample(a2, int(factor))
        sub_dt = step / int(factor)
        per_chunk = max(1, _CHUNK_VALUES // u1.size)
        for start in range(0, idx.size, per_chunk):
            chunk = idx[start:start + per_chunk]
            h1 = oscillator_histories(u1, sub_dt, t_list[chunk], zeta, method).displacement_m
            h2 = oscillator_histories(u2, sub_dt, t_list[chunk], zeta, method).displacement_m
            for row, j in enumerate(chunk):
                peak_by_angle[j] = _rotated_peaks(directions, h1[row], h2[row])
                comp[j] = [np.max(np.abs(h1[row])), np.max(np.abs(h2[row]))]

    # PSA = ω² SD for T > 0 (in g); the rigid rows already hold accelerations.
    w2_g = np.where(positive, (2.0 * np.pi / np.where(positive, t_list, 1.0)) ** 2, 1.0) / G
    to_sd = np.where(positive, 1.0, 0.0)  # SD = 0 at T = 0
    rotd50 = np.median(peak_by_angle, axis=1)
    rotd100 = peak_by_angle.max(axis=1)
    psa1 = comp[:, 0] * w2_g
    psa2 = comp[:, 1] * w2_g
    return RotDSpectrum(
        periods_s=t_list.copy(),
        damping=zeta,
        angles_deg=angles.copy(),
        rotd50_m=rotd50 * to_sd,
        rotd100_m=rotd100 * to_sd,
        rotd50_psa_g=rotd50 * w2_g,
        rotd100_psa_g=rotd100 * w2_g,
        rotd100_angle_deg=angles[np.argmax(peak_by_angle, axis=1)],
        psa_by_angle_g=peak_by_angle * w2_g[:, None],
        sd_h1_m=comp[:, 0] * to_sd,
        sd_h2_m=comp[:, 1] * to_sd,
        psa_h1_g=psa1,
        psa_h2_g=psa2,
        geomean_psa_g=np.sqrt(psa1 * psa2),
        srss_psa_g=np.hypot(psa1, psa2),
        method=method,
    )
