"""Tests for sdofreport.core.stochastic against published formulas evaluated here."""

from __future__ import annotations

import math

import numpy as np
import pytest

from sdofreport.core.stochastic import (
    ENVELOPES,
    kanai_tajimi_accelerogram,
    kanai_tajimi_psd,
    saragoni_hart_envelope,
    trapezoidal_envelope,
)


def _boore_window(t, tw, eps, eta):
    """Boore (2003), doi:10.1007/PL00012553, window function, written out independently."""
    b = -eps * math.log(eta) / (1.0 + eps * (math.log(eps) - 1.0))
    c = b / eps
    a = (math.e / eps) ** b
    return a * (t / tw) ** b * np.exp(-c * t / tw)


def _kt_gain(f, fg, zeta):
    """Kanai (1957) / Tajimi (1960): |H|² = (1+4ζ²r²)/((1-r²)²+4ζ²r²), r = f/f_g."""
    r = f / fg
    return (1 + 4 * zeta**2 * r**2) / ((1 - r**2) ** 2 + 4 * zeta**2 * r**2)


def _cp_gain(f, fp, zeta):
    """Clough & Penzien (1975) high-pass factor: r⁴/((1-r²)²+4ζ²r²), r = f/f_p."""
    r = f / fp
    return r**4 / ((1 - r**2) ** 2 + 4 * zeta**2 * r**2)


# --------------------------------------------------------------------------- envelopes


@pytest.mark.parametrize("eps, eta", [(0.2, 0.05), (0.3, 0.1), (0.1, 0.02)])
def test_saragoni_hart_peak_is_one_at_eps_times_duration(eps, eta):
    tw = 25.0
    # Closed form: dw/dt = 0 at t = (b/c) T_w = eps T_w, where w = a eps^b e^-b = 1.
    expected_peak_time_s = eps * tw
    value = saragoni_hart_envelope(np.array([expected_peak_time_s]), tw, eps=eps, eta=eta)
    # Closed form: peak value 1 (see above); round-off only.
    assert value[0] == pytest.approx(1.0, rel=1e-12)

    t = np.linspace(0.0, 2.0 * tw, 200_001)
    w = saragoni_hart_envelope(t, tw, eps=eps, eta=eta)
    # Tolerance: one grid spacing of the sampled time axis.
    assert t[np.argmax(w)] == pytest.approx(expected_peak_time_s, abs=t[1] - t[0])
    assert w.max() <= 1.0 + 1e-12


def test_saragoni_hart_matches_boore_parameterisation():
    tw, eps, eta = 18.0, 0.2, 0.05
    t = np.array([0.5, 2.0, 3.6, 7.0, 12.0, 18.0, 30.0])
    # Published formula: Boore (2003) window w = a (t/Tw)^b exp(-c t/Tw), evaluated above.
    expected = _boore_window(t, tw, eps, eta)
    np.testing.assert_allclose(saragoni_hart_envelope(t, tw, eps=eps, eta=eta), expected,
                               rtol=1e-12)
    # Published formula: w(T_w) = eta by construction of b in Boore (2003).
    assert saragoni_hart_envelope(np.array([tw]), tw, eps=eps, eta=eta)[0] == pytest.approx(
        eta, rel=1e-12
    )


def test_saragoni_hart_is_zero_before_start():
    # Closed form: the envelope is defined as zero for t <= 0.
    np.testing.assert_array_equal(saragoni_hart_envelope([-1.0, 0.0], 10.0), [0.0, 0.0])


@pytest.mark.parametrize(
    "kwargs, match",
    [
        ({"eps": 0.0}, r"eps must be in \(0, 1\) \[-\]; got 0.0"),
        ({"eta": 1.5}, r"eta must be in \(0, 1\) \[-\]; got 1.5"),
    ],
)
def test_saragoni_hart_rejects_bad_shape(kwargs, match):
    with pytest.raises(ValueError, match=match):
        saragoni_hart_envelope([1.0], 10.0, **kwargs)


def test_saragoni_hart_rejects_bad_duration():
    with pytest.raises(ValueError, match=r"duration_s must be a finite number > 0 \[s\]; got -3"):
        saragoni_hart_envelope([1.0], -3)


def test_trapezoidal_envelope_piecewise_values():
    t = np.array([-1.0, 0.0, 1.0, 2.0, 5.0, 7.0, 8.0, 9.5, 11.0, 12.0])
    # Closed form: rise 0->1 over 0-2 s, 1 over 2-7 s, 1->0 over 7-11 s, 0 outside.
    expected = np.array([0.0, 0.0, 0.5, 1.0, 1.0, 1.0, 0.75, 0.375, 0.0, 0.0])
    np.testing.assert_allclose(trapezoidal_envelope(t, 2.0, 5.0, 4.0), expected, atol=1e-15)


def test_trapezoidal_envelope_rejects_negative_rise():
    with pytest.raises(ValueError, match=r"rise_s must be a finite number >= 0 \[s\]; got -1"):
        trapezoidal_envelope([0.0], -1, 2, 3)


# --------------------------------------------------------------------------- PSD


def test_kanai_tajimi_psd_formula():
    f = np.array([0.0, 0.7, 2.5, 4.0, 20.0])
    fg, zeta, s0 = 2.5, 0.6, 0.03
    # Published formula: Kanai (1957) / Tajimi (1960), evaluated in _kt_gain.
    expected = s0 * _kt_gain(f, fg, zeta)
    np.testing.assert_allclose(kanai_tajimi_psd(f, fg, zeta, s0), expected, rtol=1e-13)
    # Closed form: G(0) = s0 and G(f_g) = s0 (1 + 4ζ²)/(4ζ²).
    assert kanai_tajimi_psd(0.0, fg, zeta, s0) == pytest.approx(s0, rel=1e-15)
    assert kanai_tajimi_psd(fg, fg, zeta, s0) == pytest.approx(
        s0 * (1 + 4 * zeta**2) / (4 * zeta**2), rel=1e-13
    )


def test_kanai_tajimi_psd_rejects_negative_frequency():
    with pytest.raises(ValueError, match=r"frequency_hz must hold finite frequencies >= 0 "
                                         r"\[Hz\]; got -1.0"):
        kanai_tajimi_psd([1.0, -1.0], 2.5, 0.6, 1.0)


def test_kanai_tajimi_psd_rejects_bad_damping():
    with pytest.raises(ValueError, match=r"ground_damping must be a finite ratio > 0 \[-\]; "
                                         r"got -0.1"):
        kanai_tajimi_psd([1.0], 2.5, -0.1, 1.0)


# --------------------------------------------------------------------------- records


def _averaged_periodogram(realisations, dt, bins_per_band):
    """One-sided periodogram (2 dt/N |X|²) averaged over realisations and adjacent bins."""
    n = realisations.shape[1]
    spectra = 2.0 * dt / n * np.abs(np.fft.rfft(realisations, axis=1)) ** 2
    freq = np.fft.rfftfreq(n, d=dt)
    # Drop the DC and Nyquist bins (different one-sided factors), then group bins.
    spectra, freq = spectra[:, 1:-1], freq[1:-1]
    bands = spectra.shape[1] // bins_per_band
    keep = bands * bins_per_band
    mean = spectra[:, :keep].mean(axis=0).reshape(bands, bins_per_band)
    return freq[:keep].reshape(bands, bins_per_band), mean


@pytest.mark.parametrize("high_pass_hz", [None, 0.4])
def test_stationary_periodogram_follows_kanai_tajimi(high_pass_hz):
    dt, n, count, band = 0.01, 1024, 200, 8
    fg, zeta, s0 = 3.0, 0.5, 0.05
    runs = np.array([
        kanai_tajimi_accelerogram(n * dt, dt, seed=1000 + k, ground_frequency_hz=fg,
                                  ground_damping=zeta, envelope="none",
                                  high_pass_hz=high_pass_hz, s0=s0)
        for k in range(count)
    ])
    # The baseline step subtracts a constant, which only touches the DC bin (dropped).
    freq, mean = _averaged_periodogram(runs, dt, band)
    # Published formula: Kanai–Tajimi |H|² (and Clough–Penzien r⁴/(...) when filtered),
    # times the bedrock density s0, evaluated at every bin then averaged like the data.
    expected = s0 * _kt_gain(freq, fg, zeta)
    if high_pass_hz is not None:
        expected = expected * _cp_gain(freq, high_pass_hz, zeta)
    expected = expected.mean(axis=1)
    observed = mean.mean(axis=1)
    # Tolerance: each periodogram bin is expected × χ²₂/2 (relative s.d. 1), so an average
    # over 200 × 8 = 1600 bins has relative s.d. 1/40 = 0.025; 0.15 is 6 s.d. Only bands
    # up to 15 Hz, where the density is not vanishingly small, are compared.
    sel = freq.mean(axis=1) < 15.0
    np.testing.assert_allclose(observed[sel], expected[sel], rtol=0.15)
    # The shape matters, not just the level: the peak band sits near f_g.
    # Closed form: |H|² of Kanai–Tajimi peaks slightly below r = 1 for ζ = 0.5.
    assert abs(freq.mean(axis=1)[np.argmax(observed)] - fg) < 0.6


def test_same_seed_same_bytes_different_seed_differs():
    a = kanai_tajimi_accelerogram(10.0, 0.01, seed=7, high_pass_hz=0.2)
    b = kanai_tajimi_accelerogram(10.0, 0.01, seed=7, high_pass_hz=0.2)
    c = kanai_tajimi_accelerogram(10.0, 0.01, seed=8, high_pass_hz=0.2)
    # Common practice (no source): a seeded generator is reproducible byte for byte.
    assert a.tobytes() == b.tobytes()
    assert not np.array_equal(a, c)


@pytest.mark.parametrize("high_pass_hz", [None, 0.3])
@pytest.mark.parametrize("envelope", ENVELOPES + (None,))
def test_target_pga_met_and_record_ends_at_rest(envelope, high_pass_hz):
    dt, target = 0.005, 3.3
    acc = kanai_tajimi_accelerogram(12.0, dt, seed=3, target_pga_m_s2=target,
                                    envelope=envelope, ground_frequency_hz=4.0,
                                    high_pass_hz=high_pass_hz)
    # Closed form: n = duration / dt samples.
    assert acc.shape == (2400,)
    # Closed form: the record is scaled so max|a| equals the target; round-off only.
    assert np.max(np.abs(acc)) == pytest.approx(target, rel=1e-12)
    # Closed form: trapezoidal-rule velocity at the end is zero after the baseline step.
    v_end = dt * (acc.sum() - 0.5 * (acc[0] + acc[-1]))
    assert abs(v_end) < 1e-12 * target * 12.0


def test_envelope_shapes_the_record():
    dt = 0.01
    acc = kanai_tajimi_accelerogram(40.0, dt, seed=11, envelope="saragoni-hart")
    t = np.arange(acc.size) * dt
    # Published formula: the Saragoni–Hart envelope is 1 near 0.2 T_w = 8 s and
    # eta = 0.05 at T_w, so the strong part carries far more energy than the tail.
    strong = np.mean(acc[(t > 5.0) & (t < 11.0)] ** 2)
    tail = np.mean(acc[t > 34.0] ** 2)
    assert tail < 0.1 * strong


@pytest.mark.parametrize(
    "kwargs, match",
    [
        ({"seed": -1}, r"seed must be an integer >= 0 \[-\]; got -1"),
        ({"seed": 1.5}, r"seed must be an integer >= 0 \[-\]; got 1.5"),
        ({"seed": 1, "envelope": "boxcar"},
         r"envelope must be one of saragoni-hart, trapezoidal, none or None; got 'boxcar'"),
        ({"seed": 1, "ground_frequency_hz": 60.0},
         r"ground_frequency_hz must be below the Nyquist frequency 50.0 Hz \[Hz\]; got 60.0"),
        ({"seed": 1, "high_pass_hz": 3.0},
         r"high_pass_hz must be below ground_frequency_hz 2.5 Hz \[Hz\]; got 3.0"),
        ({"seed": 1, "target_pga_m_s2": 0.0},
         r"target_pga_m_s2 must be a finite number > 0 \[m/s²\]; got 0.0"),
    ],
)
def test_accelerogram_rejects_bad_arguments(kwargs, match):
    with pytest.raises(ValueError, match=match):
        kanai_tajimi_accelerogram(10.0, 0.01, **kwargs)


def test_accelerogram_rejects_too_few_samples():
    with pytest.raises(ValueError, match=r"at least 8 samples; got 0.05 s / 0.01 s = 5 samples"):
        kanai_tajimi_accelerogram(0.05, 0.01, seed=1)
