"""Ground-motion intensity measures of one acceleration time history (SI in, SI out).

Every function takes an equally spaced ground acceleration [m/s²] and, where time matters,
its time step [s]. Integrals use the trapezoid rule (exact for the linearly interpolated
record), except :func:`cav`, which integrates the absolute value of the linearly
interpolated record exactly (so zero crossings inside a step are handled).

References
----------
.. [1] A. Arias, "A measure of earthquake intensity," in *Seismic Design for Nuclear
   Power Plants*, R. J. Hansen, Ed. Cambridge, MA, USA: MIT Press, 1970, pp. 438-483.
.. [2] M. D. Trifunac and A. G. Brady, "A study on the duration of strong earthquake
   ground motion," Bull. Seismol. Soc. Am., vol. 65, no. 3, pp. 581-626, 1975.
.. [3] EPRI, "A criterion for determining exceedance of the operating basis earthquake,"
   Electric Power Research Institute, Palo Alto, CA, USA, Rep. NP-5930, 1988.
.. [4] E. M. Rathje, N. A. Abrahamson, and J. D. Bray, "Simplified frequency content
   estimates of earthquake ground motions," J. Geotech. Geoenviron. Eng., vol. 124,
   no. 2, pp. 150-159, 1998, doi:10.1061/(ASCE)1090-0241(1998)124:2(150).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from sdofreport.core import _checks
from sdofreport.core._numeric import cumulative_trapezoid, trapezoid

from sdofreport.core.units import G

#: Frequency band of the mean period [Hz], Rathje et al. (1998) [4].
MEAN_PERIOD_BAND_HZ = (0.25, 20.0)


def _as_acceleration(acceleration_m_s2, name: str = "acceleration_m_s2") -> np.ndarray:
    """Validated 1-D float64 copy of an acceleration series (at least 2 finite samples)."""
    return np.array(_checks.finite_array(acceleration_m_s2, name, "m/s²", min_size=2))


def pga(acceleration_m_s2) -> float:
    """
    Peak ground acceleration, the largest absolute sample.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Ground acceleration. [m/s²]

    Returns
    -------
    float
        max |üg|. [m/s²]
    """
    return float(np.max(np.abs(_as_acceleration(acceleration_m_s2))))


def ground_velocity(acceleration_m_s2, time_step_s) -> np.ndarray:
    """
    Ground velocity by cumulative trapezoid integration, starting from rest.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced ground acceleration. [m/s²]
    time_step_s : float
        Sampling interval. [s]

    Returns
    -------
    numpy.ndarray
        Velocity at the same instants, first value 0. [m/s]
    """
    acc = _as_acceleration(acceleration_m_s2)
    dt = _checks.time_step(time_step_s)
    return cumulative_trapezoid(acc, dt)


def ground_displacement(acceleration_m_s2, time_step_s) -> np.ndarray:
    """
    Ground displacement by integrating :func:`ground_velocity` again (trapezoid, from rest).

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced ground acceleration. [m/s²]
    time_step_s : float
        Sampling interval. [s]

    Returns
    -------
    numpy.ndarray
        Displacement at the same instants, first value 0. [m]
    """
    velocity = ground_velocity(acceleration_m_s2, time_step_s)
    return cumulative_trapezoid(velocity, float(time_step_s))


def pgv(acceleration_m_s2, time_step_s) -> float:
    """Peak ground velocity max |v|, with v from :func:`ground_velocity`. [m/s]"""
    return float(np.max(np.abs(ground_velocity(acceleration_m_s2, time_step_s))))


def pgd(acceleration_m_s2, time_step_s) -> float:
    """Peak ground displacement max |d|, with d from :func:`ground_displacement`. [m]"""
    return float(np.max(np.abs(ground_displacement(acceleration_m_s2, time_step_s))))


def _cumulative_arias(acc: np.ndarray, dt: float) -> np.ndarray:
    # Ia(t) = pi / (2 g) * integral_0^t üg² dt, Arias (1970) [1].
    return np.pi / (2.0 * G) * cumulative_trapezoid(acc * acc, dt)


def arias_intensity(acceleration_m_s2, time_step_s) -> float:
    """
    Arias intensity Ia = π/(2g) ∫ üg² dt.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced ground acceleration. [m/s²]
    time_step_s : float
        Sampling interval. [s]

    Returns
    -------
    float
        Arias intensity. [m/s]

    References
    ----------
    .. [1] A. Arias, "A measure of earthquake intensity," in *Seismic Design for Nuclear
       Power Plants*, R. J. Hansen, Ed. Cambridge, MA, USA: MIT Press, 1970, pp. 438-483.
    """
    acc = _as_acceleration(acceleration_m_s2)
    dt = _checks.time_step(time_step_s)
    return float(np.pi / (2.0 * G) * trapezoid(acc * acc, dt))


def husid(acceleration_m_s2, time_step_s) -> np.ndarray:
    """
    Husid curve: cumulative Arias intensity normalised by its final value.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced ground acceleration. [m/s²]
    time_step_s : float
        Sampling interval. [s]

    Returns
    -------
    numpy.ndarray
        Non-decreasing fraction from 0 to 1 at the sample instants. [-]

    Raises
    ------
    ValueError
        If the record is all zeros (Arias intensity 0: the curve is undefined).
    """
    acc = _as_acceleration(acceleration_m_s2)
    dt = _checks.time_step(time_step_s)
    cumulative = _cumulative_arias(acc, dt)
    total = cumulative[-1]
    if total <= 0.0:
        raise ValueError(
            "acceleration_m_s2 is zero everywhere [m/s²]; the Husid curve needs a "
            "non-zero Arias intensity"
        )
    return cumulative / total


def _crossing_time(fraction: np.ndarray, level: float, dt: float) -> float:
    """First time the non-decreasing ``fraction`` reaches ``level``, linearly interpolated."""
    index = int(np.searchsorted(fraction, level, side="left"))
    if index == 0:
        return 0.0
    lower, upper = float(fraction[index - 1]), float(fraction[index])
    share = (level - lower) / (upper - lower) if upper > lower else 0.0
    return (index - 1 + share) * dt


def significant_duration(acceleration_m_s2, time_step_s, start=0.05, end=0.95) -> float:
    """
    Significant duration: time between two fractions of the Arias intensity.

    The crossing instants are interpolated linearly between samples of the Husid curve,
    so the result is not a multiple of the time step.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced ground acceleration. [m/s²]
    time_step_s : float
        Sampling interval. [s]
    start : float, optional
        Fraction of Arias intensity that opens the interval (0.05 for D5-95). [-]
    end : float, optional
        Fraction that closes it (0.95 for D5-95, 0.75 for D5-75). [-]

    Returns
    -------
    float
        Duration between the two crossings. [s]

    References
    ----------
    .. [1] M. D. Trifunac and A. G. Brady, "A study on the duration of strong earthquake
       ground motion," Bull. Seismol. Soc. Am., vol. 65, no. 3, pp. 581-626, 1975.
    """
    if not (0.0 <= float(start) < float(end) <= 1.0):
        raise ValueError(
            f"start and end must satisfy 0 <= start < end <= 1 [-]; got start={start!r}, "
            f"end={end!r}"
        )
    dt = _checks.time_step(time_step_s)
    fraction = husid(acceleration_m_s2, dt)
    return _crossing_time(fraction, float(end), dt) - _crossing_time(fraction, float(start), dt)


def cav(acceleration_m_s2, time_step_s) -> float:
    """
    Cumulative absolute velocity CAV = ∫ |üg| dt.

    The integral is taken exactly for the linearly interpolated record: in a step where
    the sign changes, the two triangles either side of the zero crossing are summed,
    dt·(a0² + a1²) / (2(|a0| + |a1|)); elsewhere this equals the trapezoid rule.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced ground acceleration. [m/s²]
    time_step_s : float
        Sampling interval. [s]

    Returns
    -------
    float
        Cumulative absolute velocity (no amplitude threshold). [m/s]

    References
    ----------
    .. [1] EPRI, "A criterion for determining exceedance of the operating basis
       earthquake," Electric Power Research Institute, Palo Alto, CA, USA,
       Rep. NP-5930, 1988.
    """
    acc = _as_acceleration(acceleration_m_s2)
    dt = _checks.time_step(time_step_s)
    a0, a1 = np.abs(acc[:-1]), np.abs(acc[1:])
    same_sign = acc[:-1] * acc[1:] >= 0.0
    total_abs = a0 + a1
    with np.errstate(invalid="ignore", divide="ignore"):
        crossing = np.where(total_abs > 0.0, (a0 * a0 + a1 * a1) / total_abs, 0.0)
    areas = np.where(same_sign, total_abs, crossing) * (0.5 * dt)
    return float(np.sum(areas))


def fourier_amplitude(acceleration_m_s2, time_step_s) -> tuple[np.ndarray, np.ndarray]:
    """
    Fourier amplitude spectrum |FFT(üg)|·Δt at the one-sided DFT frequencies.

    No padding or windowing is applied: the transform has the record's own length, so
    the frequency spacing is 1/(N·Δt).

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced ground acceleration. [m/s²]
    time_step_s : float
        Sampling interval. [s]

    Returns
    -------
    frequency_hz : numpy.ndarray
        0 to the Nyquist frequency. [Hz]
    amplitude_m_s : numpy.ndarray
        Fourier amplitude, the discrete approximation of |∫ üg e^(−i2πft) dt|. [m/s]
    """
    acc = _as_acceleration(acceleration_m_s2)
    dt = _checks.time_step(time_step_s)
    frequency_hz = np.fft.rfftfreq(acc.size, d=dt)
    amplitude_m_s = np.abs(np.fft.rfft(acc)) * dt
    return frequency_hz, amplitude_m_s


def mean_period(acceleration_m_s2, time_step_s) -> float:
    """
    Mean period Tm = Σ(Cᵢ²/fᵢ) / ΣCᵢ² over 0.25 Hz ≤ fᵢ ≤ 20 Hz.

    Cᵢ are the Fourier amplitudes of :func:`fourier_amplitude` at the record's own DFT
    frequencies (no padding; Rathje et al. [1] ask for a spacing of at most 0.05 Hz,
    which a record of 20 s or more meets).

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced ground acceleration. [m/s²]
    time_step_s : float
        Sampling interval. [s]

    Returns
    -------
    float
        Mean period. [s]

    Raises
    ------
    ValueError
        If no DFT frequency falls in the band, or the record has no energy in it.

    References
    ----------
    .. [1] E. M. Rathje, N. A. Abrahamson, and J. D. Bray, "Simplified frequency content
       estimates of earthquake ground motions," J. Geotech. Geoenviron. Eng., vol. 124,
       no. 2, pp. 150-159, 1998, doi:10.1061/(ASCE)1090-0241(1998)124:2(150).
    """
    frequency_hz, amplitude = fourier_amplitude(acceleration_m_s2, time_step_s)
    low, high = MEAN_PERIOD_BAND_HZ
    # Small relative slack so a line that should sit exactly on a band edge is kept.
    in_band = (frequency_hz >= low * (1 - 1e-9)) & (frequency_hz <= high * (1 + 1e-9))
    if not np.any(in_band):
        raise ValueError(
            f"no Fourier frequency of the record lies in {low}-{high} Hz (spacing "
            f"{frequency_hz[1]:.4g} Hz, Nyquist {frequency_hz[-1]:.4g} Hz); the record "
            f"is too short or time_step_s={time_step_s!r} [s] too coarse for a mean period"
        )
    power = amplitude[in_band] ** 2
    total = float(np.sum(power))
    if total <= 0.0:
        raise ValueError(
            f"acceleration_m_s2 has no Fourier amplitude in {low}-{high} Hz [m/s]; the "
            "mean period is undefined"
        )
    # Eq. (1) in [1].
    return float(np.sum(power / frequency_hz[in_band]) / total)


@dataclass(frozen=True)
class IntensityMeasures:
    """The usual scalar intensity measures of one record, SI units throughout."""

    pga_m_s2: float
    pgv_m_s: float
    pgd_m: float
    arias_m_s: float
    d5_95_s: float
    d5_75_s: float
    cav_m_s: float
    mean_period_s: float


def intensity_measures(acceleration_m_s2, time_step_s) -> IntensityMeasures:
    """
    All scalar intensity measures of one record.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced ground acceleration. [m/s²]
    time_step_s : float
        Sampling interval. [s]

    Returns
    -------
    IntensityMeasures
        PGA, PGV, PGD, Arias intensity, D5-95, D5-75, CAV and mean period; a duration
        or mean period that is undefined (all-zero record, no frequency in band) is NaN.
    """
    acc = _as_acceleration(acceleration_m_s2)
    dt = _checks.time_step(time_step_s)
    if np.any(acc != 0.0):
        d5_95 = significant_duration(acc, dt, 0.05, 0.95)
        d5_75 = significant_duration(acc, dt, 0.05, 0.75)
    else:
        d5_95 = d5_75 = float("nan")
    try:
        tm = mean_period(acc, dt)
    except ValueError:
        tm = float("nan")
    return IntensityMeasures(
        pga_m_s2=pga(acc),
        pgv_m_s=pgv(acc, dt),
        pgd_m=pgd(acc, dt),
        arias_m_s=arias_intensity(acc, dt),
        d5_95_s=d5_95,
        d5_75_s=d5_75,
        cav_m_s=cav(acc, dt),
        mean_period_s=tm,
    )


__all__ = [
    "MEAN_PERIOD_BAND_HZ",
    "IntensityMeasures",
    "arias_intensity",
    "cav",
    "fourier_amplitude",
    "ground_displacement",
    "ground_velocity",
    "husid",
    "intensity_measures",
    "mean_period",
    "pga",
    "pgd",
    "pgv",
    "significant_duration",
]
