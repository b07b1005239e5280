"""The engine's jobs: pure functions of numpy data, run in workers and cached.

* :func:`record_job` — intensity measures, ground velocity and displacement, Fourier
  amplitude and response spectra of one record;
* :func:`pair_job` — RotD50/RotD100, geometric-mean and SRSS spectra of a horizontal pair
  (Boore 2010);
* :func:`responses_job` — the response histories of every system to one record;
* :func:`stripe_job` — one stripe of a multiple-stripe fragility analysis (peaks only);
* :func:`biaxial_job`, :func:`pair_stripe_job` — the same for systems driven by both
  components of each pair at once (``directions = 2``).

They are top-level functions so a process pool or a Dask cluster can pickle them.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from sdofreport.core.intensity import (
    fourier_amplitude,
    ground_displacement,
    ground_velocity,
    intensity_measures,
)
from sdofreport.core.rotd import rotd_spectrum
from sdofreport.core.spectra import oscillator_histories, response_spectrum
from sdofreport.core.units import G
from sdofreport.runtime import configure


def record_products(acceleration, dt_s) -> dict:
    """Everything about a ground motion except its response spectra (cheap)."""
    freq, amp = fourier_amplitude(acceleration, dt_s)
    return {
        "intensity": intensity_measures(acceleration, dt_s),
        "velocity_m_s": ground_velocity(acceleration, dt_s),
        "displacement_m": ground_displacement(acceleration, dt_s),
        "fourier_frequency_hz": freq,
        "fourier_amplitude_m_s": amp,
    }


def record_job(acceleration, dt_s, periods_s, damping, method) -> dict:
    """Record products plus response spectra at every (damping, period)."""
    spectrum = response_spectrum(acceleration, dt_s, np.asarray(periods_s),
                                 np.asarray(damping), method=method)
    return {"spectrum": spectrum, **record_products(acceleration, dt_s)}


def _equal_length(acc_h1, acc_h2) -> tuple[np.ndarray, np.ndarray]:
    """Two components, the shorter padded with zeros to equal length."""
    n = max(acc_h1.size, acc_h2.size)
    a1 = np.zeros(n)
    a2 = np.zeros(n)
    a1[:acc_h1.size] = acc_h1
    a2[:acc_h2.size] = acc_h2
    return a1, a2


def pair_job(acc_h1, acc_h2, dt_s, periods_s, damping, method) -> dict:
    """RotD spectra of two components, the shorter padded with zeros to equal length."""
    a1, a2 = _equal_length(acc_h1, acc_h2)
    return {"rotd": rotd_spectrum(a1, a2, dt_s, np.asarray(periods_s), damping,
                                  method=method)}


def _linear_response(acceleration, dt_s, model: dict, method: str) -> dict:
    """Linear oscillator; ``participation`` Γ (default 1) scales the base excitation, as
    for a compound pendulum whose centre of mass obeys ü + 2ζωu̇ + ω²u = −Γ üg."""
    gamma = float(model.get("participation", 1.0))
    drive = np.asarray(acceleration) * gamma if gamma != 1.0 else acceleration
    hist = oscillator_histories(drive, dt_s, np.array([model["period_s"]]),
                                np.array([model["damping"]]), method=method)
    total = hist.total_acceleration_m_s2[0]
    peak_total = float(hist.peaks.total_acceleration_m_s2[0])
    if gamma != 1.0:  # the kernel's total is ü + Γüg; the physical one is ü + üg
        total = total + (1.0 - gamma) * np.asarray(acceleration)
        peak_total = float(np.max(np.abs(total)))
    return {
        "model": "linear",
        "displacement_m": hist.displacement_m[0],
        "total_accel_m_s2": total,
        "peak_displacement_m": float(hist.peaks.displacement_m[0]),
        "peak_velocity_m_s": float(hist.peaks.velocity_m_s[0]),
        "peak_total_accel_m_s2": peak_total,
    }


def _nonlinear_response(acceleration, dt_s, model: dict) -> dict:
    from sdofreport.core import hysteresis, nonlinear

    name = model["model"]
    mass = model.get("mass_kg")
    if name == "sliding-pendulum":
        system = nonlinear.sliding_pendulum_model(
            model["weight_n"], model["radius_m"], model["friction"],
            yield_displacement_m=model["slip_displacement_m"])
        mass = None
    elif name == "elastic":  # a linear spring with a supplemental damper
        system = nonlinear.bilinear(model["stiffness_n_m"], yield_strength_n=np.inf)
    else:
        system = hysteresis.hysteresis(name, model["stiffness_n_m"],
                                       model["yield_strength_n"],
                                       model["post_yield_ratio"],
                                       **model.get("parameters", {}))
    spec = model.get("damper")
    damper = None if spec is None else hysteresis.damper(spec["coefficient"],
                                                          spec["exponent"])
    substeps = max(1, int(np.ceil(dt_s / (model["period_s"] / 100.0))))
    result = nonlinear.nonlinear_response(
        acceleration, dt_s, system, model["damping"], mass_kg=mass, substeps=substeps,
        gravity_stiffness_n_m=model.get("gravity_stiffness_n_m", 0.0), damper=damper,
        instability_limit_m=model.get("instability_limit_m"))
    return {"model": name, "response": result}


def response_job(acceleration, dt_s, model: dict, method: str) -> dict:
    """Response of one system (``model`` dict, see the engine) to one record."""
    if model["model"] == "linear":
        return _linear_response(acceleration, dt_s, model, method)
    if "friction_slow" in model:  # velocity-dependent friction: the biaxial kernel
        return {"model": model["model"], "one_direction": True, "biaxial":
                _biaxial_response(acceleration, np.zeros_like(acceleration), dt_s, model,
                                  method)}
    return _nonlinear_response(acceleration, dt_s, model)


def inelastic_job(acceleration, dt_s, periods_s, damping, ductility, reduction,
                  alpha, steps_per_period) -> dict:
    """Constant-ductility and constant-strength spectra of one record (bilinear SDOF)."""
    from sdofreport.core.inelastic_spectra import (
        constant_ductility_spectrum,
        constant_strength_spectrum,
    )

    periods = np.asarray(periods_s)
    return {
        "ductility": constant_ductility_spectrum(acceleration, dt_s, periods, damping,
                                                 np.asarray(ductility), alpha,
                                                 steps_per_period=steps_per_period),
        "strength": constant_strength_spectrum(acceleration, dt_s, periods, damping,
                                               np.asarray(reduction), alpha,
                                               steps_per_period=steps_per_period),
    }


def responses_job(acceleration, dt_s, models: list, method: str) -> list:
    """
    Responses of several systems to one record, in the order of ``models``.

    Plain linear systems share one vectorised integration (their oscillators run side by
    side in the kernel); the record is sent to a worker once for all of them. A failing
    system is named in the error.
    """
    outputs: list = [None] * len(models)
    plain = [i for i, m in enumerate(models) if m["model"] == "linear" and
             float(m.get("participation", 1.0)) == 1.0]
    if plain:
        hist = oscillator_histories(acceleration, dt_s,
                                    np.array([models[i]["period_s"] for i in plain]),
                                    np.array([models[i]["damping"] for i in plain]),
                                    method=method)
        for row, i in enumerate(plain):
            outputs[i] = {
                "model": "linear",
                "displacement_m": hist.displacement_m[row],
                "total_accel_m_s2": hist.total_acceleration_m_s2[row],
                "peak_displacement_m": float(hist.peaks.displacement_m[row]),
                "peak_velocity_m_s": float(hist.peaks.velocity_m_s[row]),
                "peak_total_accel_m_s2": float(hist.peaks.total_acceleration_m_s2[row]),
            }
    for i, model in enumerate(models):
        if outputs[i] is None:
            try:
                outputs[i] = response_job(acceleration, dt_s, model, method)
            except ValueError as exc:
                raise ValueError(f"system {model.get('system_id', i)}: {exc}") from None
    return outputs


def _biaxial_response(acc_h1, acc_h2, dt_s, model: dict, method: str):
    """Two-direction response of one system (``directions = 2``) to a pair."""
    from sdofreport.core import biaxial, hysteresis

    name = model["model"]
    if name == "linear":
        return biaxial.biaxial_elastic(acc_h1, acc_h2, dt_s, model["period_s"],
                                       model["damping"],
                                       stiffness_n_m=model.get("stiffness_n_m"),
                                       participation=float(model.get("participation", 1.0)),
                                       method=method)
    substeps = max(1, int(np.ceil(dt_s / (model["period_s"] / 100.0))))
    spec = model.get("damper")
    damper = None if spec is None else hysteresis.damper(spec["coefficient"],
                                                          spec["exponent"])
    if name == "sliding-pendulum":
        w = model["weight_n"]
        m = w / G
        mu = model["friction"]
        k_p = mu * w / model["slip_displacement_m"] if mu > 0 else 0.0
        k_lin = w / model["radius_m"]
        slow = model.get("friction_slow")
        return biaxial.biaxial_plastic(
            acc_h1, acc_h2, dt_s, mass_kg=m,
            damping_coefficient=2.0 * model["damping"] * np.sqrt(m * k_lin),
            linear_stiffness_n_m=k_lin, element_stiffness_n_m=k_p, yield_force_n=mu * w,
            stick_damping=2.0 * hysteresis.STICK_DAMPING_RATIO * np.sqrt(m * k_p),
            friction=None if slow is None else (mu, slow, model["friction_rate_s_m"]),
            weight_n=w, substeps=substeps, damper=biaxial.damper_parameters(
                damper, model["slip_displacement_m"], np.sqrt(k_lin / m)))
    m, k_geo = model["mass_kg"], model.get("gravity_stiffness_n_m", 0.0)
    limit = model.get("instability_limit_m")
    limit = np.inf if limit is None else limit
    if name == "elastic":  # a linear spring with a supplemental damper
        k = model["stiffness_n_m"]
        omega = np.sqrt((k - k_geo) / m)
        return biaxial.biaxial_plastic(
            acc_h1, acc_h2, dt_s, mass_kg=m,
            damping_coefficient=2.0 * model["damping"] * m * omega,
            linear_stiffness_n_m=k, element_stiffness_n_m=0.0, yield_force_n=0.0,
            gravity_stiffness_n_m=k_geo, substeps=substeps, instability_limit_m=limit,
            damper=biaxial.damper_parameters(damper, np.inf, omega, (acc_h1, acc_h2)))
    system = hysteresis.hysteresis(name, model["stiffness_n_m"], model["yield_strength_n"],
                                   model["post_yield_ratio"], **model.get("parameters", {}))
    return biaxial.biaxial_hysteresis(
        acc_h1, acc_h2, dt_s, system, mass_kg=m, damping_ratio=model["damping"],
        damper=damper, gravity_stiffness_n_m=k_geo, substeps=substeps,
        instability_limit_m=limit)


def biaxial_job(acc_h1, acc_h2, dt_s, models: list, method: str) -> list:
    """Two-direction responses of several systems to one horizontal pair."""
    outputs = []
    for i, model in enumerate(models):
        try:
            outputs.append({"model": model["model"], "biaxial": _biaxial_response(
                acc_h1, acc_h2, dt_s, model, method)})
        except ValueError as exc:
            raise ValueError(f"system {model.get('system_id', i)}: {exc}") from None
    return outputs



def stripe_intensity(acceleration, dt_s, model: dict, measure: str, method: str) -> float:
    """A record's intensity measure for the fragility stripes [m/s²]: ``sa``, the
    pseudo-spectral acceleration ω²·SD at the system's period and damping, or ``pga``."""
    if measure == "pga":
        return float(np.max(np.abs(acceleration)))
    spectrum = response_spectrum(acceleration, dt_s, np.array([model["period_s"]]),
                                 np.array([model["damping"]]), method=method)
    return float(spectrum.psa_m_s2[0, 0])


def _peaks_only(raw: dict) -> dict:
    """A response job's output with its histories reduced to what the peaks need (the
    stripes keep hundreds of runs: only their peaks are cached)."""
    empty = np.zeros(0)
    if "biaxial" in raw:  # two-direction runs and velocity-dependent friction:
        flat = np.zeros((2, 0))  # keep the (2, 0) shapes
        return {**raw, "biaxial": dataclasses.replace(
            raw["biaxial"], time_s=empty, displacement_m=flat, velocity_m_s=flat,
            total_accel_m_s2=flat, force_n=flat)}
    if raw["model"] == "linear":
        return {**raw, "displacement_m": empty, "total_accel_m_s2": empty}
    r = raw["response"]
    return {**raw, "response": dataclasses.replace(
        r, time_s=empty, displacement_m=empty, force_n=empty, energy_histories_j={},
        velocity_m_s=np.array([np.max(np.abs(r.velocity_m_s), initial=0.0)]),
        total_accel_m_s2=np.array([np.max(np.abs(r.total_accel_m_s2), initial=0.0)]))}


def _stripe(motions, dts, model: dict, measure: str, level_m_s2: float, what: str,
            intensity, respond) -> dict:
    """Scale each motion so that ``intensity(motion, dt)`` equals ``level_m_s2`` and run
    ``respond(motion, factor, dt)`` on it (peaks only), in order."""
    intensities, factors, runs = [], [], []
    for motion, dt_s in zip(motions, dts):
        im = intensity(motion, dt_s)
        if not im > 0:
            raise ValueError(f"system {model.get('system_id')}: {what} has no "
                             f"{measure} ({im!r} m/s²) and cannot be scaled to a level")
        factor = level_m_s2 / im
        try:
            raw = respond(motion, factor, dt_s)
        except ValueError as exc:
            raise ValueError(f"system {model.get('system_id')}: {exc}") from None
        intensities.append(im)
        factors.append(factor)
        runs.append(_peaks_only(raw))
    return {"intensity_m_s2": np.array(intensities), "factors": np.array(factors),
            "runs": runs}


def stripe_job(accelerations, dts, model: dict, method: str, measure: str,
               level_m_s2: float) -> dict:
    """
    One stripe of a multiple-stripe analysis: every record scaled so its intensity
    measure (:func:`stripe_intensity`) equals ``level_m_s2``, and the system's response
    to each (peaks only), in record order.
    """
    return _stripe(
        accelerations, dts, model, measure, level_m_s2, "a record",
        lambda a, dt_s: stripe_intensity(a, dt_s, model, measure, method),
        lambda a, factor, dt_s: response_job(np.asarray(a) * factor, dt_s, model, method))


def pair_intensity(acc_h1, acc_h2, dt_s, model: dict, measure: str, method: str) -> float:
    """A horizontal pair's intensity measure for the stripes of a two-direction system
    [m/s²]: RotD50 (Boore 2010) of the pseudo-spectral acceleration at the system's
    period and damping (``sa``) or of the ground acceleration (``pga``)."""
    period = model["period_s"] if measure == "sa" else 0.0
    rotd = rotd_spectrum(acc_h1, acc_h2, dt_s, np.array([period]), model["damping"],
                         method=method)
    return float(rotd.rotd50_psa_g[0]) * G


def pair_stripe_job(pairs, dts, model: dict, method: str, measure: str,
                    level_m_s2: float) -> dict:
    """
    One stripe of a two-direction system: both components of each pair scaled by one
    factor so that the pair's RotD50 measure (:func:`pair_intensity`) equals
    ``level_m_s2``, and the two-direction response to each pair (peaks only, the
    resultant as the demand), in pair order.
    """
    return _stripe(
        [_equal_length(*pair) for pair in pairs], dts, model, measure, level_m_s2,
        "a pair", lambda pair, dt_s: pair_intensity(*pair, dt_s, model, measure, method),
        lambda pair, factor, dt_s: {"model": model["model"], "biaxial": _biaxial_response(
            pair[0] * factor, pair[1] * factor, dt_s, model, method)})


JOBS = {"record": record_job, "pair": pair_job, "responses": responses_job,
        "inelastic": inelastic_job, "stripe": stripe_job, "biaxial": biaxial_job,
        "pair-stripe": pair_stripe_job}


def run_job(kind: str, args: tuple) -> dict:
    """Dispatch one planned job by kind, in a process set up for the kernels
    (:func:`sdofreport.runtime.configure`: a spawned or Dask worker has not been)."""
    configure()
    return JOBS[kind](*args)
