"""Planning a run: the records read (or made) and checked, the systems' models and the
jobs of each phase (responses, bound runs, two-direction runs, fragility stripes)."""

from __future__ import annotations

import dataclasses
import hashlib

import numpy as np

from sdofreport import __version__
from sdofreport.core.spectra import ResponseSpectrum
from sdofreport.core.units import G
from sdofreport.engine.amplitude import header_unit_problem
from sdofreport.engine.cache import ResultCache, array_digest, cache_key
from sdofreport.engine.isolation_bounds import BOUND_RUNS, bound_model
from sdofreport.errors import RecordError
from sdofreport.project.model import Project, RecordSpec, SystemSpec, natural_key
from sdofreport.records import Record, process_record, read_record


def _with_acceleration(record: Record, acceleration: np.ndarray, note: str) -> Record:
    acceleration = np.array(acceleration, dtype=float)
    acceleration.flags.writeable = False
    return dataclasses.replace(record, acceleration_m_s2=acceleration,
                               history=record.history + (note,))


def synthetic_record(project: Project, index: int, cache: ResultCache | None = None) -> Record:
    """
    The ``index``-th spectrum-compatible record of ``[synthetic_records]``: random-phase
    sinusoids with iterated amplitudes matched to the design spectrum (Gasparini &
    Vanmarcke 1976), seeded, so the same project always gives the same record.
    """
    from sdofreport.core.compatible import spectrum_compatible_record
    from sdofreport.records import record_from_array

    spec = project.synthetic
    seed = spec.seed + index
    periods = np.geomspace(0.02, 10.0, 200)
    target = project.design_spectrum.spectrum().sa_g(periods)
    key = cache_key({"version": __version__, "job": "synthetic", "seed": seed,
                        "spec": dataclasses.asdict(spec),
                        "design": project.design_spectrum.parameters,
                        "kind": project.design_spectrum.kind})
    made = cache.get(key) if cache is not None else None
    if made is None:
        made = spectrum_compatible_record(periods, target, spec.duration_s, spec.dt_s,
                                          seed=seed, envelope=spec.envelope,
                                          period_range_s=spec.period_range_s)
        if cache is not None:
            cache.put(key, made)
    record = record_from_array(made.acceleration_m_s2, made.dt_s, units="m/s2",
                               record_id=f"syn{index + 1:02d}")
    low, high = spec.period_range_s
    note = (f"synthetic spectrum-compatible record (Gasparini & Vanmarcke 1976), seed "
            f"{seed}, {spec.envelope} envelope; 5 % spectrum within "
            f"{100 * made.max_deviation:.1f} % of the design spectrum over {low:g} to "
            f"{high:g} s (mean deviation {100 * made.mean_deviation:+.1f} %)")
    return dataclasses.replace(record, units="g", file_format="synthetic",
                               history=(note,))


def _file_digest(spec: RecordSpec) -> str | None:
    """SHA-256 of a record file's bytes; None when it cannot be read (the reader then
    reports it with its own message)."""
    try:
        return hashlib.sha256(spec.path.read_bytes()).hexdigest()
    except OSError:
        return None


def _read_key(spec: RecordSpec, digest: str | None) -> str:
    """Cache key of a record file as parsed with its reading settings."""
    return cache_key({"version": __version__, "job": "read", "sha": digest,
                         "name": spec.path.name, "format": spec.file_format,
                         "units": spec.units, "dt": spec.dt_s, "id": spec.id,
                         "reader": "stated-units"})


def _read_cached(spec: RecordSpec, cache: ResultCache | None, pending: list) -> Record:
    """Read a record file, or take the parsed record from the cache when its bytes and
    the reading settings are unchanged (parsing text is the slow part of a warm build)."""
    if cache is None or cache.folder is None:
        return read_record(spec.path, file_format=spec.file_format, units=spec.units,
                           dt_s=spec.dt_s, record_id=spec.id)
    digest = _file_digest(spec)
    key = _read_key(spec, digest)
    cached = cache.get(key) if digest else None
    if isinstance(cached, Record) and cached.sha256 == digest:
        return dataclasses.replace(cached, source_path=str(spec.path))
    record = read_record(spec.path, file_format=spec.file_format, units=spec.units,
                         dt_s=spec.dt_s, record_id=spec.id)
    if digest == record.sha256:
        pending.append((key, record))  # stored only once every record has been read
    return record


def load_records(project: Project, cache: ResultCache | None = None) -> list[Record]:
    """Read, process and scale every record; every unreadable record is reported at once."""
    records, problems, pending = [], [], []
    longest = max(project.systems, key=lambda system: system.period_s, default=None)
    for index, spec in enumerate(project.records):
        where = f"records[{spec.id}]"
        try:
            if spec.path is None:
                records.append(synthetic_record(project, index, cache))
                continue
            record = _read_cached(spec, cache, pending)
            settings = spec.processing
            if settings.baseline_order is not None or settings.bandpass_hz or \
                    settings.taper_s:
                record = process_record(record, baseline_order=settings.baseline_order,
                                        bandpass_hz=settings.bandpass_hz,
                                        filter_order=settings.filter_order,
                                        taper_s=settings.taper_s)
            if spec.scale != 1.0:
                with np.errstate(over="ignore"):  # an absurd result is refused below
                    scaled = record.acceleration_m_s2 * spec.scale
                record = _with_acceleration(record, scaled,
                                            f"scaled by {spec.scale:g} (as given)")
        except RecordError as exc:
            problems.append(f"{where}: {exc.message}")
            continue
        unit_problem = header_unit_problem(spec, record)
        if unit_problem:
            problems.append(unit_problem)
        if (absurd := _absurd_after_scaling(spec, record, where)) is not None:
            problems.append(absurd)
            continue
        if longest is not None and record.duration_s < longest.period_s:
            # A record shorter than the system's period cannot bring out its response:
            # the peak would depend on where the record stops (common practice, no source).
            problems.append(f"{where}: record '{spec.file}' lasts {record.duration_s:.3g} s, "
                            f"shorter than the longest system period {longest.period_s:.3g}"
                            f" s (system '{longest.id}'); use a longer record or pad it "
                            f"with zeros")
        records.append(record)
    _check_pair_steps(project, records, problems)
    _check_periods(project, records, problems)
    if problems:
        count = len(problems)
        raise RecordError(f"{project.path.name} has {count} record problem"
                          f"{'s' if count > 1 else ''}:\n  " + "\n  ".join(problems))
    for key, record in pending:
        cache.put(key, record)
    return records


def _absurd_after_scaling(spec: RecordSpec, record: Record, where: str) -> str | None:
    """A problem when the record as used (after ``scale``) peaks beyond any ground motion."""
    from sdofreport.records.readers import ABSURD_PEAK_G

    with np.errstate(all="ignore"):
        peak_g = float(np.max(np.abs(record.acceleration_m_s2))) / G
    if np.isfinite(peak_g) and peak_g <= ABSURD_PEAK_G:
        return None
    cause = (f"scale = {spec.scale:g} makes its peak {peak_g:.3g} g" if spec.scale != 1.0
             else f"its peak is {peak_g:.3g} g")
    return (f"{where}: {cause}, beyond any ground motion (at most {ABSURD_PEAK_G:g} g is "
            f"accepted); check the scale factor, the values and the units")


def _too_short(period_s: float, dt_s: float, spp: float) -> bool:
    """True when ``period_s`` needs more sub-steps per sample than the kernels allow
    (``dt · spp / T`` sub-steps, as :func:`sdofreport.core.spectra.substep_counts`)."""
    from sdofreport.core.spectra import _MAX_SUBSTEPS

    return not dt_s * spp / period_s <= _MAX_SUBSTEPS


def _check_periods(project: Project, records: list[Record], problems: list[str]) -> None:
    """Periods too short for the coarsest record step, named by system and key."""
    from sdofreport.core.spectra import _MAX_SUBSTEPS, DEFAULT_STEPS_PER_PERIOD

    if not records:
        return
    coarse = max(records, key=lambda record: record.dt_s)
    method = project.analysis.method
    # Yielding systems take ceil(dt / (T/100)) sub-steps (jobs._nonlinear_response): 100
    # steps per period; linear ones the method's default steps per period.
    tail = (f"too short for the time step {coarse.dt_s:g} s of record '{coarse.id}': it "
            f"would need more than {_MAX_SUBSTEPS} integration sub-steps per sample; check "
            f"the value and its unit, or use a record with a finer time step")
    for index, system in enumerate(project.systems, start=1):
        linear = (system.model or {}).get("model", "linear") == "linear"
        spp = DEFAULT_STEPS_PER_PERIOD.get(method, 8.0) if linear else 100.0
        if _too_short(system.period_s, coarse.dt_s, spp):
            problems.append(f"systems[{index}] (id '{system.id}') period: "
                            f"{system.period_s:.3g} s is {tail}")
    shortest = min(project.analysis.periods_s)
    if _too_short(shortest, coarse.dt_s, DEFAULT_STEPS_PER_PERIOD.get(method, 8.0)):
        problems.append(f"analysis.periods: the shortest spectrum period {shortest:.3g} s "
                        f"is {tail}")


def _check_pair_steps(project: Project, records: list[Record], problems: list[str]) -> None:
    by_id = {r.id: r for r in records}
    pairs: dict[str, list[Record]] = {}
    for spec in project.records:
        if spec.pair and spec.id in by_id:
            pairs.setdefault(spec.pair, []).append(by_id[spec.id])
    for name, members in pairs.items():
        if len(members) == 2 and abs(members[0].dt_s - members[1].dt_s) > \
                1e-6 * members[0].dt_s:
            problems.append(f"pair {name!r}: the components have different time steps "
                            f"({members[0].id}: {members[0].dt_s:g} s, {members[1].id}: "
                            f"{members[1].dt_s:g} s); resample one so both match")


def system_model(system: SystemSpec) -> dict:
    """The response job's description of a system (plain data, part of the cache key)."""
    return {"model": "linear", "period_s": system.period_s, "damping": system.damping,
            **(system.model or {})}


def _bound_systems(project: Project) -> list[SystemSpec]:
    """The lower- and upper-bound variants (ids ``<id>@lower``, ``<id>@upper``; ``@`` is
    not allowed in ids) of systems with ``property_factors``: the friction, or a bilinear
    isolator's Q_d and k_d, multiplied by the factor (ASCE/SEI 7-16 §17.2.8.4, from
    memory; :func:`sdofreport.engine.isolation_bounds.bound_model`)."""
    out = []
    for system in project.systems:
        factors = (system.model or {}).get("property_factors")
        for name, factor in zip(BOUND_RUNS, factors or ()):
            out.append(dataclasses.replace(system, id=f"{system.id}@{name}",
                                           model=bound_model(system.model, factor)))
    return out


def _biaxial_plan(project: Project, systems: list, scaled: dict, base: dict) -> list:
    """One job per horizontal pair for the systems with ``directions = 2`` (scaled
    records; the loader has checked that every record belongs to a pair)."""
    models = [{**system_model(system), "system_id": system.id,
               "stiffness_n_m": system.stiffness_n_m} for system in systems]
    if not models:
        return []
    plan = []
    for name, (h1, h2) in _pairs(project).items():
        a1, a2 = scaled[h1].acceleration_m_s2, scaled[h2].acceleration_m_s2
        args = (a1, a2, scaled[h1].dt_s, models, project.analysis.method)
        key = cache_key({**base, "job": "biaxial", "sha1": array_digest(a1),
                         "sha2": array_digest(a2), "dt": scaled[h1].dt_s, "models": models})
        plan.append((f"pair {name} (two-direction responses of {len(models)} systems)",
                     "biaxial", args, key))
    return plan


def _fragility_systems(project: Project) -> list[SystemSpec]:
    spec = project.fragility
    return [] if spec is None else [s for s in project.systems if s.id in spec.systems]


def _stripe_plan(project: Project, scaled: dict[str, Record], base: dict) -> list:
    """One ``stripe`` job per fragility system and level: the scaled suite, each record
    scaled again so its measure equals the level (sdofreport.engine.jobs.stripe_job)."""
    spec = project.fragility
    plan = []
    for system in _fragility_systems(project):
        if system.directions == 2:
            plan += _pair_stripes(project, system, scaled, base)
            continue
        # each system's own records (vertical or horizontal), one direction at a time
        records = [scaled[r.id] for r in project.records_for(system)]
        accelerations = tuple(r.acceleration_m_s2 for r in records)
        dts = tuple(r.dt_s for r in records)
        shas = [array_digest(a) for a in accelerations]
        model = {**system_model(system), "system_id": system.id}
        for level in spec.levels_g:
            args = (accelerations, dts, model, project.analysis.method, spec.measure,
                    level * G)
            key = cache_key({**base, "job": "stripe", "shas": shas, "dts": list(dts),
                             "model": model, "measure": spec.measure, "level_g": level})
            plan.append((f"system {system.id} at {spec.measure} = {level:g} g (stripe)",
                         "stripe", args, key))
    return plan


def _pair_stripes(project: Project, system: SystemSpec, scaled: dict[str, Record],
                  base: dict) -> list:
    """The ``pair-stripe`` jobs of a ``directions = 2`` system, one per level: each pair
    scaled by one factor to the level of its RotD50 measure and run in two directions
    (sdofreport.engine.jobs.pair_stripe_job)."""
    spec = project.fragility
    pairs = tuple((scaled[h1].acceleration_m_s2, scaled[h2].acceleration_m_s2)
                  for h1, h2 in _pairs(project).values())
    dts = tuple(scaled[h1].dt_s for h1, _ in _pairs(project).values())
    shas = [[array_digest(a1), array_digest(a2)] for a1, a2 in pairs]
    model = {**system_model(system), "system_id": system.id,
             "stiffness_n_m": system.stiffness_n_m}
    plan = []
    for level in spec.levels_g:
        args = (pairs, dts, model, project.analysis.method, spec.measure, level * G)
        key = cache_key({**base, "job": "pair-stripe", "shas": shas, "dts": list(dts),
                         "model": model, "measure": spec.measure, "level_g": level})
        plan.append((f"system {system.id} at {spec.measure} = {level:g} g (two-direction "
                     f"stripe)", "pair-stripe", args, key))
    return plan


def _record_args(record: Record, analysis, damping=None) -> tuple:
    """Arguments of a record job (see sdofreport.engine.jobs), for the plan and the warm-up."""
    return (record.acceleration_m_s2, record.dt_s, analysis.periods_s,
            analysis.damping if damping is None else damping, analysis.method)


def _spectrum_at(spectrum: ResponseSpectrum, damping) -> ResponseSpectrum:
    """The rows of ``spectrum`` at the listed damping ratios (each one is computed)."""
    rows = [int(np.flatnonzero(np.abs(np.asarray(spectrum.damping) - z) <= 1e-12)[0])
            for z in damping]
    names = ("sd_m", "sv_m_s", "psv_m_s", "psa_m_s2", "sa_m_s2")
    return dataclasses.replace(spectrum, damping=np.asarray(spectrum.damping)[rows],
                               **{n: np.asarray(getattr(spectrum, n))[rows] for n in names})


def _inelastic_args(record: Record, spec) -> tuple:
    """Arguments of an inelastic-spectra job, for the plan and the warm-up."""
    return (record.acceleration_m_s2, record.dt_s, spec.periods_s, spec.damping,
            spec.ductility, spec.strength_reduction, spec.post_yield_ratio,
            spec.steps_per_period)


def _pairs(project: Project) -> dict[str, tuple[str, str]]:
    """Pair name -> (H1 record id, H2 record id), in natural order of the names."""
    pairs: dict[str, dict[str, str]] = {}
    for spec in project.records:
        if spec.pair:
            pairs.setdefault(spec.pair, {})[spec.component] = spec.id
    return {name: (pairs[name]["H1"], pairs[name]["H2"])
            for name in sorted(pairs, key=natural_key)}


def _scaled_spectrum(spectrum: ResponseSpectrum, factor: float) -> ResponseSpectrum:
    """Spectra of the record multiplied by ``factor`` (linear oscillators: exact)."""
    return dataclasses.replace(
        spectrum, sd_m=spectrum.sd_m * factor, sv_m_s=spectrum.sv_m_s * factor,
        psv_m_s=spectrum.psv_m_s * factor, psa_m_s2=spectrum.psa_m_s2 * factor,
        sa_m_s2=spectrum.sa_m_s2 * factor, pga_m_s2=spectrum.pga_m_s2 * factor)


def _scaled_rotd(rotd, factor: float):
    if factor == 1.0:
        return rotd
    names = ("rotd50_m", "rotd100_m", "rotd50_psa_g", "rotd100_psa_g", "psa_by_angle_g",
             "sd_h1_m", "sd_h2_m", "psa_h1_g", "psa_h2_g", "geomean_psa_g", "srss_psa_g")
    return dataclasses.replace(rotd, **{n: np.asarray(getattr(rotd, n)) * factor
                                        for n in names})
