"""Stochastic synthetic accelerograms: envelopes and Kanai–Tajimi filtered white noise.

Used to make demonstration records for invented scenarios. Everything here is numpy in,
numpy out, SI units: time in [s], frequency in [Hz], acceleration in [m/s²].

The Kanai–Tajimi spectral density is one-sided in cyclic frequency throughout this
module: ``G(f)`` for ``f >= 0`` with variance ``∫_0^∞ G(f) df``.
"""

from __future__ import annotations

import numpy as np

from sdofreport.core import _checks
from sdofreport.core._checks import nonnegative as _check_nonnegative
from sdofreport.core._checks import positive as _check_positive

#: Envelope shapes accepted by :func:`kanai_tajimi_accelerogram` (``None`` also means
#: stationary: no envelope).
ENVELOPES: tuple[str, ...] = ("saragoni-hart", "trapezoidal", "none")

#: Envelopes a spectrum-compatible record may use (a record needs a start and an end).
COMPATIBLE_ENVELOPES: tuple[str, ...] = ("saragoni-hart", "trapezoidal")

#: Fractions of the duration used for the trapezoidal envelope in
#: :func:`kanai_tajimi_accelerogram`: rise, strong phase, decay.
#: Common practice (no source): a short build-up and a long decay.
TRAPEZOID_FRACTIONS: tuple[float, float, float] = (0.1, 0.4, 0.5)


def _as_time_array(time_s, name: str = "time_s") -> np.ndarray:
    t = np.asarray(time_s, dtype=float)
    if t.size and not np.all(np.isfinite(t)):
        raise ValueError(f"{name} must hold finite times [s]; got a non-finite value")
    return t


def saragoni_hart_envelope(time_s, duration_s, *, eps=0.2, eta=0.05) -> np.ndarray:
    """
    Saragoni–Hart amplitude envelope, peak normalised to 1.

    ``w(t) = a (t/T_w)^b exp(-c t/T_w)`` for ``t >= 0`` and 0 for ``t < 0``, with
    ``b = -eps ln(eta) / (1 + eps (ln(eps) - 1))``, ``c = b / eps`` and
    ``a = (e / eps)^b`` as parameterised in [2]_ (Eqs. for the window function). The peak
    ``w = 1`` falls at ``t = eps T_w`` and ``w(T_w) = eta``; beyond ``T_w`` the
    formula keeps decaying.

    Parameters
    ----------
    time_s : array-like
        Times at which to evaluate the envelope. [s]
    duration_s : float
        Window duration ``T_w``, where the envelope has fallen to ``eta``. [s]
    eps : float, optional
        Time of the peak as a fraction of ``duration_s``; 0 < eps < 1. [-]
    eta : float, optional
        Envelope value at ``t = duration_s``; 0 < eta < 1. [-]

    Returns
    -------
    numpy.ndarray
        Envelope values, same shape as ``time_s``. [-]

    References
    ----------
    .. [1] G. R. Saragoni and G. C. Hart, "Simulation of artificial earthquakes,"
       Earthquake Eng. Struct. Dyn., vol. 2, no. 3, pp. 249-267, 1974,
       doi: 10.1002/eqe.4290020305.
    .. [2] D. M. Boore, "Simulation of ground motion using the stochastic method,"
       Pure Appl. Geophys., vol. 160, no. 3-4, pp. 635-676, 2003,
       doi: 10.1007/PL00012553.
    """
    tw = _check_positive(duration_s, "duration_s", "s")
    eps = _checks.in_range(eps, "eps", "-", 0.0, 1.0, low_open=True)
    eta = _checks.in_range(eta, "eta", "-", 0.0, 1.0, low_open=True)
    t = _as_time_array(time_s)
    # Window-function parameters, Boore (2003) [2].
    b = -eps * np.log(eta) / (1.0 + eps * (np.log(eps) - 1.0))
    c = b / eps
    x = np.clip(t, 0.0, None) / tw
    # Evaluate in logarithms: a x^b exp(-c x) = exp(b (1 - ln eps + ln x) - c x).
    with np.errstate(divide="ignore"):
        log_w = b * (1.0 - np.log(eps) + np.log(x)) - c * x
    w = np.exp(log_w)
    return np.where(t > 0.0, w, 0.0)


def trapezoidal_envelope(time_s, rise_s, strong_s, decay_s) -> np.ndarray:
    """
    Trapezoidal amplitude envelope: linear rise, constant strong phase, linear decay.

    ``w = t/t_r`` for ``0 <= t < t_r``; 1 up to ``t_r + t_s``; then falls linearly to 0
    at ``t_r + t_s + t_d``; 0 before ``t = 0`` and after the decay. A simplified form of
    the piecewise envelopes of [1]_ (which use a quadratic rise and an exponential
    decay).

    Parameters
    ----------
    time_s : array-like
        Times at which to evaluate the envelope. [s]
    rise_s : float
        Duration of the linear build-up, >= 0 (0 starts at full amplitude). [s]
    strong_s : float
        Duration of the constant strong phase, >= 0. [s]
    decay_s : float
        Duration of the linear decay, >= 0 (0 ends abruptly). [s]

    Returns
    -------
    numpy.ndarray
        Envelope values between 0 and 1, same shape as ``time_s``. [-]

    References
    ----------
    .. [1] M. Amin and A. H.-S. Ang, "Nonstationary stochastic model of earthquake
       motions," J. Eng. Mech. Div. ASCE, vol. 94, no. EM2, pp. 559-583, 1968.
    """
    tr = _check_nonnegative(rise_s, "rise_s", "s")
    ts = _check_nonnegative(strong_s, "strong_s", "s")
    td = _check_nonnegative(decay_s, "decay_s", "s")
    if tr + ts + td <= 0.0:
        raise ValueError(
            f"rise_s + strong_s + decay_s must be > 0 [s]; got {tr!r} + {ts!r} + {td!r}"
        )
    t = _as_time_array(time_s)
    t1 = tr
    t2 = tr + ts
    t3 = tr + ts + td
    w = np.zeros_like(t)
    rising = (t >= 0.0) & (t < t1)
    w[rising] = t[rising] / tr
    w[(t >= t1) & (t <= t2)] = 1.0
    decaying = (t > t2) & (t < t3)
    w[decaying] = (t3 - t[decaying]) / td
    return w


def _kanai_tajimi_transfer(frequency_hz, ground_frequency_hz, ground_damping) -> np.ndarray:
    """Complex Kanai–Tajimi filter ``(1 + 2iζr) / (1 - r² + 2iζr)``, ``r = f / f_g``."""
    r = np.asarray(frequency_hz, dtype=float) / ground_frequency_hz
    num = 1.0 + 2j * ground_damping * r
    den = 1.0 - r * r + 2j * ground_damping * r
    return num / den


def _high_pass_transfer(frequency_hz, corner_hz, damping) -> np.ndarray:
    """Complex second-order high-pass ``-r² / (1 - r² + 2iζr)``, ``r = f / f_p``."""
    r = np.asarray(frequency_hz, dtype=float) / corner_hz
    return -(r * r) / (1.0 - r * r + 2j * damping * r)


def _check_ground(ground_frequency_hz, ground_damping) -> tuple[float, float]:
    fg = _check_positive(ground_frequency_hz, "ground_frequency_hz", "Hz")
    try:
        zg = float(ground_damping)
    except (TypeError, ValueError):
        zg = float("nan")
    if not np.isfinite(zg) or zg <= 0.0:
        raise ValueError(
            f"ground_damping must be a finite ratio > 0 [-]; got {ground_damping!r}"
        )
    return fg, zg


def kanai_tajimi_psd(frequency_hz, ground_frequency_hz, ground_damping, s0) -> np.ndarray:
    """
    One-sided Kanai–Tajimi power spectral density of ground acceleration.

    ``G(f) = s0 (1 + 4ζ²r²) / ((1 - r²)² + 4ζ²r²)``, ``r = f / f_g`` [1]_, [2]_: white
    bedrock noise of one-sided density ``s0`` filtered by a soil layer idealised as a
    linear oscillator of frequency ``f_g`` and damping ``ζ``. One-sided in cyclic
    frequency: the variance is ``∫_0^∞ G(f) df`` (double a two-sided density to
    compare).

    Parameters
    ----------
    frequency_hz : array-like
        Frequencies, >= 0. [Hz]
    ground_frequency_hz : float
        Predominant ground frequency ``f_g``, > 0. [Hz]
    ground_damping : float
        Ground damping ratio ``ζ``, > 0. [-]
    s0 : float
        One-sided density of the bedrock white noise, >= 0. [m²/s³]

    Returns
    -------
    numpy.ndarray
        ``G(f)``, same shape as ``frequency_hz``. [m²/s³]

    References
    ----------
    .. [1] K. Kanai, "Semi-empirical formula for the seismic characteristics of the
       ground," Bull. Earthq. Res. Inst. Univ. Tokyo, vol. 35, pp. 309-325, 1957.
    .. [2] H. Tajimi, "A statistical method of determining the maximum response of a
       building structure during an earthquake," in Proc. 2nd World Conf. Earthq. Eng.,
       Tokyo, 1960, vol. 2, pp. 781-797.
    """
    fg, zg = _check_ground(ground_frequency_hz, ground_damping)
    s0 = _check_nonnegative(s0, "s0", "m²/s³")
    f = np.asarray(frequency_hz, dtype=float)
    bad = ~np.isfinite(f) | (f < 0.0)
    if np.any(bad):
        first = float(f[bad].flat[0])
        raise ValueError(
            f"frequency_hz must hold finite frequencies >= 0 [Hz]; got {first!r}"
        )
    r2 = (f / fg) ** 2
    four_z2_r2 = 4.0 * zg * zg * r2
    # Eq. of [1], [2] as |H(f)|² times the bedrock density.
    return s0 * (1.0 + four_z2_r2) / ((1.0 - r2) ** 2 + four_z2_r2)


def kanai_tajimi_accelerogram(
    duration_s,
    time_step_s,
    *,
    seed,
    ground_frequency_hz=2.5,
    ground_damping=0.6,
    target_pga_m_s2=None,
    envelope="saragoni-hart",
    high_pass_hz=None,
    s0=0.1,
) -> np.ndarray:
    """
    Synthetic ground acceleration: Kanai–Tajimi filtered white noise times an envelope.

    Steps: (1) ``n = round(duration_s / time_step_s)`` samples of white Gaussian noise
    from ``numpy.random.default_rng(seed)``, scaled to the one-sided density ``s0``;
    (2) filtered in the frequency domain (real FFT, circular) by the Kanai–Tajimi
    transfer function ``(1 + 2iζr)/(1 - r² + 2iζr)`` [1]_, [2]_, and, when
    ``high_pass_hz`` is given, by the second-order high-pass factor
    ``-r_p²/(1 - r_p² + 2iζ_p r_p)`` of Clough and Penzien [3]_ with corner
    ``f_p = high_pass_hz`` and ``ζ_p = ground_damping`` (an assumption; [3] leaves the
    pair to the user) so the record has little long-period drift; (3) multiplied by the
    envelope: Saragoni–Hart [4]_ with ``T_w = duration_s`` and the default
    ``eps, eta`` of [5]_, trapezoidal with :data:`TRAPEZOID_FRACTIONS` of the duration,
    or none (stationary). With an envelope, the high-pass factor is applied after this
    step instead, to the zero-padded record (pads of ``3 / f_p`` per end, after [7]_),
    which keeps the displacement far smaller than filtering the stationary noise; without
    one it is applied with the Kanai–Tajimi filter, so the stationary density is
    exactly ``G(f) |H_p(f)|²``; (4) a linear baseline removed from the velocity, anchored at
    ``v(0) = 0`` so the trapezoidal-rule velocity ends exactly at rest (the simplest
    baseline of those discussed in [6]_); (5) scaled so ``max|a| = target_pga_m_s2``
    when given.

    The result depends only on the arguments: the same seed gives the same bytes.

    Parameters
    ----------
    duration_s : float
        Record length, > 0; at least 8 samples. [s]
    time_step_s : float
        Sampling interval, > 0. [s]
    seed : int
        Seed for ``numpy.random.default_rng``, >= 0. [-]
    ground_frequency_hz : float, optional
        Kanai–Tajimi ground frequency ``f_g``, > 0 and below the Nyquist frequency. [Hz]
    ground_damping : float, optional
        Kanai–Tajimi ground damping ratio ``ζ``, > 0. [-]
    target_pga_m_s2 : float or None, optional
        Peak absolute acceleration of the result, > 0; None keeps the level set by
        ``s0``. [m/s²]
    envelope : {"saragoni-hart", "trapezoidal", "none"} or None, optional
        Amplitude envelope; see :data:`ENVELOPES`. None means "none". [-]
    high_pass_hz : float or None, optional
        Corner of the Clough–Penzien high-pass factor, > 0 and below
        ``ground_frequency_hz``; None applies no high-pass factor. [Hz]
    s0 : float, optional
        One-sided density of the bedrock white noise, > 0; sets the level when
        ``target_pga_m_s2`` is None (stationary ``G(f)`` as in
        :func:`kanai_tajimi_psd`). [m²/s³]

    Returns
    -------
    numpy.ndarray
        Ground acceleration at ``t = 0, dt, ..., (n-1) dt``, shape ``(n,)``. [m/s²]

    References
    ----------
    .. [1] K. Kanai, "Semi-empirical formula for the seismic characteristics of the
       ground," Bull. Earthq. Res. Inst. Univ. Tokyo, vol. 35, pp. 309-325, 1957.
    .. [2] H. Tajimi, "A statistical method of determining the maximum response of a
       building structure during an earthquake," in Proc. 2nd World Conf. Earthq. Eng.,
       Tokyo, 1960, vol. 2, pp. 781-797.
    .. [3] R. W. Clough and J. Penzien, Dynamics of Structures. New York, NY, USA:
       McGraw-Hill, 1975.
    .. [4] G. R. Saragoni and G. C. Hart, "Simulation of artificial earthquakes,"
       Earthquake Eng. Struct. Dyn., vol. 2, no. 3, pp. 249-267, 1974,
       doi: 10.1002/eqe.4290020305.
    .. [5] D. M. Boore, "Simulation of ground motion using the stochastic method,"
       Pure Appl. Geophys., vol. 160, no. 3-4, pp. 635-676, 2003,
       doi: 10.1007/PL00012553.
    .. [6] D. M. Boore and J. J. Bommer, "Processing of strong-motion accelerograms:
       needs, options and consequences," Soil Dyn. Earthq. Eng., vol. 25, no. 2,
       pp. 93-115, 2005, doi: 10.1016/j.soildyn.2004.10.007.
    .. [7] D. M. Boore, "On pads and filters: Processing strong-motion data," Bull.
       Seismol. Soc. Am., vol. 95, no. 2, pp. 745-750, 2005, doi: 10.1785/0120040160.
    """
    duration = _check_positive(duration_s, "duration_s", "s")
    dt = _check_positive(time_step_s, "time_step_s", "s")
    n = int(round(duration / dt))
    if n < 8:
        raise ValueError(
            f"duration_s / time_step_s must give at least 8 samples; got "
            f"{duration!r} s / {dt!r} s = {n} samples"
        )
    _checks.integer(seed, "seed", 0)
    fg, zg = _check_ground(ground_frequency_hz, ground_damping)
    nyquist_hz = 0.5 / dt
    if fg >= nyquist_hz:
        raise ValueError(
            f"ground_frequency_hz must be below the Nyquist frequency {nyquist_hz!r} Hz "
            f"[Hz]; got {fg!r}"
        )
    if high_pass_hz is not None:
        fp = _check_positive(high_pass_hz, "high_pass_hz", "Hz")
        if fp >= fg:
            raise ValueError(
                f"high_pass_hz must be below ground_frequency_hz {fg!r} Hz [Hz]; "
                f"got {fp!r}"
            )
    if target_pga_m_s2 is not None:
        target = _check_positive(target_pga_m_s2, "target_pga_m_s2", "m/s²")
    density = _check_positive(s0, "s0", "m²/s³")
    shape = "none" if envelope is None else envelope
    if shape not in ENVELOPES:
        allowed = ", ".join(ENVELOPES)
        raise ValueError(f"envelope must be one of {allowed} or None; got {envelope!r}")

    # (1) White noise: unit-variance samples at step dt have one-sided density 2 dt,
    # so multiplying by sqrt(s0 / (2 dt)) gives density s0 (Parseval; no source needed).
    rng = np.random.default_rng(int(seed))
    noise = rng.standard_normal(n) * np.sqrt(density / (2.0 * dt))

    # (2) Frequency-domain filtering (circular: the stationary noise is periodic).
    freq = np.fft.rfftfreq(n, d=dt)
    transfer = _kanai_tajimi_transfer(freq, fg, zg)
    if high_pass_hz is not None and shape == "none":
        transfer = transfer * _high_pass_transfer(freq, fp, zg)
    acc = np.fft.irfft(np.fft.rfft(noise) * transfer, n=n)

    # (3) Envelope.
    time = np.arange(n) * dt
    if shape == "saragoni-hart":
        acc = acc * saragoni_hart_envelope(time, duration)
    elif shape == "trapezoidal":
        fr, fs, fd = TRAPEZOID_FRACTIONS
        acc = acc * trapezoidal_envelope(time, fr * duration, fs * duration, fd * duration)

    # (3b) With an envelope, the high-pass factor acts on the modulated record, padded
    # with zeros so the acausal filter does not wrap around [7]. Padding 3 / f_p at each
    # end (a generous reading of the rule of thumb in [7] for an order-2 filter). The
    # filtered displacement then returns to zero within the padded record; the tails
    # outside [0, duration] are dropped and step (4) removes what velocity they carried.
    if high_pass_hz is not None and shape != "none":
        pad = int(np.ceil(3.0 / (fp * dt)))
        padded = np.zeros(n + 2 * pad)
        padded[pad:pad + n] = acc
        freq_p = np.fft.rfftfreq(padded.size, d=dt)
        filtered = np.fft.irfft(
            np.fft.rfft(padded) * _high_pass_transfer(freq_p, fp, zg), n=padded.size
        )
        acc = filtered[pad:pad + n]

    # (4) Linear velocity baseline v_b(t) = v_end t / T, T = (n-1) dt, which is a
    # constant v_end / T subtracted from the acceleration (trapezoidal rule).
    span = (n - 1) * dt
    v_end = dt * (acc.sum() - 0.5 * (acc[0] + acc[-1]))
    acc = acc - v_end / span

    # (5) Scaling to the target peak.
    if target_pga_m_s2 is not None:
        peak = np.max(np.abs(acc))
        if peak > 0.0:
            acc = acc * (target / peak)
    return acc
