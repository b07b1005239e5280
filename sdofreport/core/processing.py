"""Ground-motion record processing: baseline correction, band-pass filtering, tapering.

All three are pure functions of an equally spaced acceleration [m/s²] and its time step
[s]; they return a new array of the same length and never change their input. Nothing
here runs unless the user asks for it (see :func:`sdofreport.records.process_record`,
which also fixes the order in which they are applied).

References
----------
.. [1] D. M. Boore and J. J. Bommer, "Processing of strong-motion accelerograms: needs,
   options and consequences," Soil Dyn. Earthq. Eng., vol. 25, no. 2, pp. 93-115, 2005,
   doi:10.1016/j.soildyn.2004.10.007.
.. [2] D. M. Boore, "On pads and filters: processing strong-motion data," Bull. Seismol.
   Soc. Am., vol. 95, no. 2, pp. 745-750, 2005, doi:10.1785/0120040160.
"""

from __future__ import annotations

import numpy as np

from sdofreport.core import _checks
from sdofreport.core._numeric import cumulative_trapezoid
from sdofreport.core.intensity import _as_acceleration

#: Polynomial orders accepted by :func:`baseline_correction`.
BASELINE_ORDERS = (0, 1, 2, 3)

#: Largest Butterworth order accepted by :func:`bandpass` (higher orders ring badly).
MAX_FILTER_ORDER = 8


def baseline_correction(acceleration_m_s2, time_step_s, order) -> np.ndarray:
    """
    Remove a least-squares polynomial baseline, fitted in velocity.

    A polynomial q(t) = Σ cₖ tᵏ, k = 0…``order``, is subtracted from the acceleration.
    Its coefficients are those that minimise the squared ground velocity of the
    corrected record, ∫ (v(t) − Q(t))² dt, where v is the velocity of the record and Q
    the velocity of q, both integrated from rest with the trapezoid rule (as in
    :func:`sdofreport.core.intensity.ground_velocity`). Fitting the velocity rather
    than the acceleration targets the long-period drift that baseline offsets cause,
    the approach reviewed in [1]_ (§4); a polynomial of degree ``order`` in the
    acceleration is removed either way. Because Q is integrated by the same rule as v,
    a record that is itself such a polynomial is removed to round-off.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced ground acceleration. [m/s²]
    time_step_s : float
        Sampling interval. [s]
    order : int
        Degree of the polynomial removed from the acceleration, 0 to 3. [-]

    Returns
    -------
    numpy.ndarray
        Corrected acceleration, same length. [m/s²]

    References
    ----------
    .. [1] D. M. Boore and J. J. Bommer, "Processing of strong-motion accelerograms:
       needs, options and consequences," Soil Dyn. Earthq. Eng., vol. 25, no. 2,
       pp. 93-115, 2005, doi:10.1016/j.soildyn.2004.10.007.
    """
    acc = _as_acceleration(acceleration_m_s2)
    dt = _checks.time_step(time_step_s)
    if isinstance(order, bool) or not isinstance(order, (int, np.integer)) or (
        order not in BASELINE_ORDERS
    ):
        raise ValueError(f"order must be one of {BASELINE_ORDERS} [-]; got {order!r}")
    n = acc.size
    # Normalised time s = t / T in [0, 1] keeps the least-squares system well conditioned;
    # the fitted polynomial is the same whatever the time scale.
    s = np.arange(n) / (n - 1)
    basis = np.vstack([s**k for k in range(order + 1)])  # q_k(t), shape (order+1, n)
    basis_velocity = cumulative_trapezoid(basis, dt, axis=1)
    velocity = cumulative_trapezoid(acc, dt)
    coefficients, *_ = np.linalg.lstsq(basis_velocity.T, velocity, rcond=None)
    return acc - coefficients @ basis


def pad_length_s(low_hz, filter_order) -> float:
    """
    Total zero-pad length for an acausal Butterworth low-cut, Tpad = 1.5·n / fc.

    Half of it goes before the record and half after. The rule and its split are those
    of [1]_ (after Converse and Brady, 1992), written down from memory; check against
    the paper where a copy is at hand.

    Parameters
    ----------
    low_hz : float
        Low-cut (high-pass) corner frequency fc. [Hz]
    filter_order : int
        Butterworth order n of the filter applied in each direction. [-]

    Returns
    -------
    float
        Total pad length. [s]

    References
    ----------
    .. [1] D. M. Boore, "On pads and filters: processing strong-motion data," Bull.
       Seismol. Soc. Am., vol. 95, no. 2, pp. 745-750, 2005, doi:10.1785/0120040160.
    """
    return 1.5 * float(filter_order) / float(low_hz)


def _check_corner(value, name: str) -> float | None:
    if value is None:
        return None
    try:
        corner = float(value)
    except (TypeError, ValueError):
        raise ValueError(f"{name} must be a number > 0 [Hz] or None; got {value!r}") from None
    if not np.isfinite(corner) or corner <= 0.0:
        raise ValueError(f"{name} must be a finite number > 0 [Hz] or None; got {value!r}")
    return corner


def bandpass(acceleration_m_s2, time_step_s, low_hz, high_hz, order=4,
             keep_pads=False) -> np.ndarray:
    """
    Acausal (zero-phase) Butterworth band-pass with zero pads, per [1]_ and [2]_.

    A high-pass of corner ``low_hz`` and a low-pass of corner ``high_hz``, each a digital
    Butterworth filter of ``order`` (bilinear transform), are cascaded and run forward
    then backward over the zero-padded record, so the phase shift cancels and the
    amplitude response is the square of one pass. Either corner may be None, giving a
    high-pass or low-pass only. The pads total Tpad = 1.5·n/fc (:func:`pad_length_s`) for
    the low-cut; for a low-pass only the same rule is applied to the high corner (our
    choice: the sources address the low-cut). Half the pad goes at each end.

    With ``keep_pads=True`` (what :func:`sdofreport.records.process_record` uses) the
    filtered pads are kept, as [2]_ recommends: the result is longer than the input by
    :func:`pad_samples` samples at each end. With ``keep_pads=False`` **the pads are
    removed after filtering**: the result has the input's length and start time. [2]_ points out that the filtered pads carry part of the signal, and
    that displacements computed from the trimmed record can drift; a user who needs
    consistent displacements should keep pads, which this function does not do.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced ground acceleration. [m/s²]
    time_step_s : float
        Sampling interval. [s]
    low_hz : float or None
        Low-cut (high-pass) corner frequency; None for no low-cut. [Hz]
    high_hz : float or None
        High-cut (low-pass) corner frequency, below the Nyquist frequency; None for no
        high-cut. [Hz]
    order : int, optional
        Butterworth order of each pass, 1 to 8. [-]

    Returns
    -------
    numpy.ndarray
        Filtered acceleration, same length as the input. [m/s²]

    References
    ----------
    .. [1] D. M. Boore and J. J. Bommer, "Processing of strong-motion accelerograms:
       needs, options and consequences," Soil Dyn. Earthq. Eng., vol. 25, no. 2,
       pp. 93-115, 2005, doi:10.1016/j.soildyn.2004.10.007.
    .. [2] D. M. Boore, "On pads and filters: processing strong-motion data," Bull.
       Seismol. Soc. Am., vol. 95, no. 2, pp. 745-750, 2005, doi:10.1785/0120040160.
    """
    acc = _as_acceleration(acceleration_m_s2)
    dt = _checks.time_step(time_step_s)
    if isinstance(order, bool) or not isinstance(order, (int, np.integer)) or not (
        1 <= order <= MAX_FILTER_ORDER
    ):
        raise ValueError(
            f"order must be an integer from 1 to {MAX_FILTER_ORDER} [-]; got {order!r}"
        )
    low = _check_corner(low_hz, "low_hz")
    high = _check_corner(high_hz, "high_hz")
    if low is None and high is None:
        raise ValueError("low_hz and high_hz are both None [Hz]; give at least one corner")
    nyquist = 0.5 / dt
    for name, corner in (("low_hz", low), ("high_hz", high)):
        if corner is not None and corner >= nyquist:
            raise ValueError(
                f"{name} must be below the Nyquist frequency {nyquist:g} Hz "
                f"(time step {dt:g} s) [Hz]; got {corner:g}"
            )
    if low is not None and high is not None and low >= high:
        raise ValueError(
            f"low_hz must be below high_hz [Hz]; got low_hz={low:g}, high_hz={high:g}"
        )

    from scipy.signal import butter, sosfiltfilt  # imported here: slow to import

    fs = 1.0 / dt
    sections = []
    if low is not None:
        sections.append(butter(order, low, btype="highpass", output="sos", fs=fs))
    if high is not None:
        sections.append(butter(order, high, btype="lowpass", output="sos", fs=fs))
    sos = np.vstack(sections)

    half_pad = pad_samples(low if low is not None else high, order, dt)
    padded = np.concatenate([np.zeros(half_pad), acc, np.zeros(half_pad)])
    # padtype=None: the zero pads above replace scipy's own odd-extension padding.
    filtered = sosfiltfilt(sos, padded, padtype=None)
    if keep_pads:
        return filtered
    return filtered[half_pad : half_pad + acc.size]


def pad_samples(corner_hz, filter_order, time_step_s) -> int:
    """Zero samples put at each end by :func:`bandpass`: ceil(Tpad / (2 Δt)). [-]"""
    return int(np.ceil(0.5 * pad_length_s(corner_hz, filter_order) / float(time_step_s)))


#: Lowest usable frequency as a multiple of the high-pass (low-cut) corner: 1.25, the
#: rule of the NGA-West2 database (Ancheta et al. 2014, from memory). [-]
USABLE_FREQUENCY_FACTOR = 1.25


def usable_period_max_s(low_cut_hz) -> float:
    """
    Longest usable spectral period of a record high-passed at ``low_cut_hz``.

    ``T_max = 1 / (1.25 f_c)``: the lowest usable frequency is 1.25 times the high-pass
    corner, the rule applied to the NGA-West2 database [1]_ (written down from memory;
    common practice rather than a code requirement).

    Parameters
    ----------
    low_cut_hz : float
        High-pass (low-cut) corner frequency f_c, > 0. [Hz]

    Returns
    -------
    float
        Longest usable period. [s]

    References
    ----------
    .. [1] T. D. Ancheta et al., "NGA-West2 database," Earthquake Spectra, vol. 30,
       no. 3, pp. 989-1005, 2014, doi:10.1193/070913EQS197M.
    """
    corner = _check_corner(low_cut_hz, "low_cut_hz")
    if corner is None:
        raise ValueError("low_cut_hz must be a finite number > 0 [Hz]; got None")
    return 1.0 / (USABLE_FREQUENCY_FACTOR * corner)


def cosine_taper(acceleration_m_s2, time_step_s, taper_s) -> np.ndarray:
    """
    Half-cosine (Hann) ramps of length ``taper_s`` at both ends of the record.

    The weight is w = sin²(π t / (2 T_taper)) = ½(1 − cos(π t / T_taper)) for the
    first T_taper seconds (t from the first sample) and its mirror image over the last
    T_taper seconds; 1 in between. The first and last samples become 0.

    Parameters
    ----------
    acceleration_m_s2 : array-like
        Equally spaced ground acceleration. [m/s²]
    time_step_s : float
        Sampling interval. [s]
    taper_s : float
        Length of each ramp, at most half the record duration. [s]

    Returns
    -------
    numpy.ndarray
        Tapered acceleration, same length. [m/s²]

    References
    ----------
    .. [1] D. M. Boore and J. J. Bommer, "Processing of strong-motion accelerograms:
       needs, options and consequences," Soil Dyn. Earthq. Eng., vol. 25, no. 2,
       pp. 93-115, 2005, doi:10.1016/j.soildyn.2004.10.007.
    """
    acc = _as_acceleration(acceleration_m_s2)
    dt = _checks.time_step(time_step_s)
    try:
        ramp_s = float(taper_s)
    except (TypeError, ValueError):
        raise ValueError(f"taper_s must be a number > 0 [s]; got {taper_s!r}") from None
    duration = (acc.size - 1) * dt
    if not np.isfinite(ramp_s) or ramp_s <= 0.0 or ramp_s > 0.5 * duration * (1 + 1e-12):
        raise ValueError(
            f"taper_s must be > 0 and at most half the record duration "
            f"({0.5 * duration:g} s) [s]; got {taper_s!r}"
        )
    t = np.arange(acc.size) * dt
    from_start = t
    from_end = t[-1] - t
    weight = np.ones(acc.size)
    for distance in (from_start, from_end):
        ramp = distance < ramp_s
        weight[ramp] *= 0.5 * (1.0 - np.cos(np.pi * distance[ramp] / ramp_s))
    return acc * weight


__all__ = [
    "BASELINE_ORDERS",
    "MAX_FILTER_ORDER",
    "bandpass",
    "baseline_correction",
    "cosine_taper",
    "pad_length_s",
    "pad_samples",
    "usable_period_max_s",
]
