"""Batch engine: plan every job of a project, run them, cache them, assemble the results.

Phases (each a batch of independent jobs, see :mod:`sdofreport.jobs`):

1. per record: intensity measures, ground velocity and displacement, Fourier amplitude,
   response spectra; per horizontal pair: RotD spectra (Boore 2010);
2. suite scaling against the design spectrum (:mod:`sdofreport.suite`; fast, in this
   process) — the records are then scaled, their spectra multiplied by the factor
   (exact: a linear oscillator's response is proportional to its excitation);
3. per system × record: the response history of the system to the scaled record.

Each job's result is cached under a content hash of its inputs, its settings, the
package version and a fingerprint of its sources (:func:`sdofreport.cache.cache_key`),
so a rebuild with nothing changed recomputes nothing. Outputs are
assembled in plan order, never completion order, so the same inputs give the same results.
"""

from __future__ import annotations

import dataclasses
import hashlib
import logging
import math
import os
import time
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Callable

import numpy as np

from sdofreport import __version__
from sdofreport.amplitude import check_results, header_unit_problem
from sdofreport.cache import ResultCache, array_digest, cache_key, default_cache_dir
from sdofreport.core.fragility import (
    FITTED,
    Fragility,
    exceedance_probability,
    fit_fragility,
)
from sdofreport.core.intensity import IntensityMeasures
from sdofreport.core.rotd import RotDSpectrum
from sdofreport.core.spectra import ResponseSpectrum
from sdofreport.core.units import G
from sdofreport.errors import RecordError
from sdofreport.executors import execute, local_pool, pool_start_seconds
from sdofreport.isolation_bounds import BOUND_RUNS, bound_model, effective_at
from sdofreport.jobs import record_products, run_job
from sdofreport.project.check_quantities import CHECK_QUANTITIES
from sdofreport.project.model import Project, RecordSpec, SystemSpec, natural_key
from sdofreport.records import Record, process_record, read_record
from sdofreport.results_types import (
    BoundRuns,
    Convergence,
    DemandStatistics,
    EnergyBalance,
    InelasticSpectra,
    SuiteStatistics,
)
from sdofreport.suite import SCALING_DAMPING, SuiteScaling, compute_scaling, \
    scaling_damping
from sdofreport.suite_statistics import suite_statistics
from sdofreport.vertical_suite import attach_vertical

if TYPE_CHECKING:
    from sdofreport.core.isolation import EffectiveProperties

log = logging.getLogger("sdofreport.engine")

Progress = Callable[[int, int, str], None]

VERDICT_WITHIN = "within limit"
VERDICT_EXCEEDS = "exceeds limit"
#: Verdict of a check when the system ran away in at least one record (dynamic
#: instability: the displacement passed the stated bound; see ResponseResult.unstable).
VERDICT_UNSTABLE = "unstable"


@dataclass(frozen=True)
class RecordResult:
    """Everything computed for one record, as used (processed and scaled)."""

    spec: RecordSpec
    record: Record
    intensity: IntensityMeasures
    spectrum: ResponseSpectrum
    velocity_m_s: np.ndarray
    displacement_m: np.ndarray
    fourier_frequency_hz: np.ndarray
    fourier_amplitude_m_s: np.ndarray
    scale_factor: float = 1.0  # the suite-scaling factor applied on top of spec.scale


@dataclass(frozen=True)
class PairResult:
    """RotD spectra of a horizontal pair (scaled records), 5 % damping."""

    name: str
    h1: str
    h2: str
    rotd: RotDSpectrum  # scaled


@dataclass(frozen=True)
class ResponseResult:
    """Response of one system to one record: peaks [SI] and histories for plotting."""

    system_id: str
    record_id: str
    peak_displacement_m: float
    peak_velocity_m_s: float
    peak_total_accel_m_s2: float
    peak_drift_ratio: float | None
    peak_base_shear_n: float | None
    time_s: np.ndarray
    displacement_m: np.ndarray
    total_accel_m_s2: np.ndarray
    model: str = "linear"
    force_n: np.ndarray | None = None  # restoring force history (nonlinear)
    ductility: float | None = None
    residual_displacement_m: float | None = None
    peak_force_n: float | None = None
    energy: EnergyBalance | None = None  # nonlinear runs
    #: nonlinear one-direction runs: term ("input", "kinetic", ...) -> history [J]
    energy_histories_j: dict[str, np.ndarray] | None = None
    convergence: Convergence | None = None
    #: True when the displacement ran past ``instability_limit_m`` (histories end there)
    unstable: bool = False
    #: bound of the instability test [m]; None when the system has none
    instability_limit_m: float | None = None
    #: peak damper force [N]; None without a damper
    peak_damper_force_n: float | None = None
    #: 2 when the system moved in both horizontal directions under the record's pair;
    #: the peaks are then of the resultant and the histories along this record
    directions: int = 1
    #: two-direction runs: peak |u| along H1 and along H2 [m]
    peak_displacement_per_direction_m: tuple[float, float] | None = None


@dataclass(frozen=True)
class Check:
    """One limit check of one system over the suite."""

    system_id: str
    quantity: str
    limit: float  # SI
    demand: float  # SI, the suite statistic of the per-record peaks
    statistic: str  # mean | max
    ratio: float
    verdict: str  # VERDICT_WITHIN | VERDICT_EXCEEDS | VERDICT_UNSTABLE
    #: True when the statistic is of absolute values (|residual displacement|, ...)
    absolute: bool = False
    #: mean, median, p84, beta, min, max of the per-record peaks (SI; beta [-]), see
    #: sdofreport.core.fragility.demand_statistics; ``statistic`` names the governing one
    statistics: DemandStatistics | None = None
    #: with property_factors: the run whose demand governs (nominal, lower or upper)
    governing_run: str | None = None


@dataclass(frozen=True)
class FragilityResult:
    """Multiple-stripe fragility of one limit of one system (Baker 2015)."""

    system_id: str
    quantity: str
    measure: str  # "sa" (at the system's period and damping) or "pga"
    fit: Fragility  # levels and median in g
    design_level_g: float | None = None
    design_probability: float | None = None  # P(exceed | design level) [-]


@dataclass
class Results:
    project: Project
    records: list[RecordResult]
    responses: dict[tuple[str, str], ResponseResult]  # (system id, record id)
    checks: list[Check]
    statistic: str
    scaling: SuiteScaling | None = None
    pairs: list[PairResult] = field(default_factory=list)
    inelastic: dict[str, InelasticSpectra] = field(default_factory=dict)  # by record id
    timings_s: dict[str, float] = field(default_factory=dict)
    cache_hits: int = 0
    cache_misses: int = 0
    fragility: list[FragilityResult] = field(default_factory=list)
    #: (system id, record id) -> the lower- and upper-bound runs, for systems with
    #: property_factors (the nominal run is in ``responses``)
    bounds: dict[tuple[str, str], BoundRuns] = field(default_factory=dict)
    #: sliding pendulums: system id -> {run: EffectiveProperties} at the suite statistic
    #: of the run's peak displacements (sdofreport.core.isolation)
    effective: dict[str, dict[str, EffectiveProperties]] = field(default_factory=dict)
    #: what the pages summarise over the suite (sdofreport.suite_statistics); None only
    #: for the partial results the early record figures are drawn from
    statistics: SuiteStatistics | None = None

    def response(self, system_id: str, record_id: str) -> ResponseResult:
        return self.responses[(system_id, record_id)]

    @property
    def not_within(self) -> list[Check]:
        """Checks whose verdict is not "within limit": exceeding, or unstable."""
        return [check for check in self.checks
                if check.verdict in (VERDICT_EXCEEDS, VERDICT_UNSTABLE)]

    @property
    def exceeds(self) -> bool:
        return bool(self.not_within)


# ---------------------------------------------------------------------------------------
# Records


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


def _array_hash(acceleration: np.ndarray) -> str:
    return array_digest(acceleration)


# ---------------------------------------------------------------------------------------
# Systems


def system_model(system: SystemSpec) -> dict:
    """The response job's description of a system (plain data, part of the cache key)."""
    return {"model": "linear", "period_s": system.period_s, "damping": system.damping,
            **(system.model or {})}


def _response_result(system: SystemSpec, record_id: str, raw: dict) -> ResponseResult:
    if raw["model"] == "linear":
        u_peak = raw["peak_displacement_m"]
        drift = u_peak / system.height_m if system.height_m else None
        shear = system.stiffness_n_m * u_peak if system.stiffness_n_m is not None else None
        return ResponseResult(system.id, record_id, u_peak, raw["peak_velocity_m_s"],
                              raw["peak_total_accel_m_s2"], drift, shear, raw["time_s"],
                              raw["displacement_m"], raw["total_accel_m_s2"])
    r = raw["response"]
    u_peak = float(r.peak_displacement_m)
    drift = u_peak / system.height_m if system.height_m else None
    model = system.model or {}
    energy = EnergyBalance(
        r.input_j, r.kinetic_j, r.damping_j, r.strain_j, r.hysteretic_j, r.imbalance,
        damper_j=r.damper_j if model.get("damper") is not None else None,
        gravity_j=r.gravity_j if model.get("gravity_stiffness_n_m") else None)
    return ResponseResult(
        system.id, record_id, u_peak, float(np.max(np.abs(r.velocity_m_s))),
        float(np.max(np.abs(r.total_accel_m_s2))), drift, float(r.peak_force_n),
        r.time_s, r.displacement_m, r.total_accel_m_s2, model=raw["model"],
        force_n=r.force_n, ductility=r.ductility,
        residual_displacement_m=float(r.residual_displacement_m),
        peak_force_n=float(r.peak_force_n), energy=energy,
        energy_histories_j=r.energy_histories_j,
        convergence=Convergence(bool(r.converged), int(r.max_iterations_used),
                                int(r.subdivided_steps)),
        unstable=bool(r.unstable),
        instability_limit_m=None if math.isinf(r.instability_limit_m)
        else float(r.instability_limit_m),
        peak_damper_force_n=float(r.peak_damper_force_n)
        if model.get("damper") is not None else None)


def _biaxial_result(system: SystemSpec, record_id: str, direction: int,
                    raw: dict) -> ResponseResult:
    """The response of a ``directions = 2`` system to the pair of ``record_id``: peaks of
    the resultant, histories along the record's own direction (0: H1, 1: H2)."""
    r = raw["biaxial"]
    u_peak = float(r.peak_displacement_m)
    drift = u_peak / system.height_m if system.height_m else None
    common = dict(directions=2, peak_displacement_per_direction_m=tuple(
        r.peak_displacement_per_direction_m), unstable=bool(r.unstable))
    if raw.get("one_direction"):  # a one-direction run through the biaxial kernel
        common.update(directions=1, peak_displacement_per_direction_m=None)
    if raw["model"] == "linear":
        return ResponseResult(system.id, record_id, u_peak, r.peak_velocity_m_s,
                              r.peak_total_accel_m_s2, drift, r.peak_force_n, r.time_s,
                              r.displacement_m[direction], r.total_accel_m_s2[direction],
                              **common)
    terms = dict(r.energy_j)
    supplied = terms["input_j"]
    total = sum(terms.get(k, 0.0) for k in ("kinetic_j", "damping_j", "damper_j",
                                              "strain_j", "hysteretic_j"))
    energy = EnergyBalance(**terms, imbalance=abs(supplied - total) / max(abs(supplied),
                                                                           1e-300))
    model = system.model or {}
    yield_m = (model["yield_strength_n"] / model["stiffness_n_m"]
               if "yield_strength_n" in model else None)
    limit = model.get("instability_limit_m")
    if r.peak_damper_force_n is not None:
        common["peak_damper_force_n"] = r.peak_damper_force_n
    return ResponseResult(
        system.id, record_id, u_peak, r.peak_velocity_m_s, r.peak_total_accel_m_s2, drift,
        r.peak_force_n, r.time_s, r.displacement_m[direction],
        r.total_accel_m_s2[direction], model=raw["model"], force_n=r.force_n[direction],
        ductility=None if yield_m is None else u_peak / yield_m,
        residual_displacement_m=float(np.hypot(*r.residual_displacement_m)),
        peak_force_n=r.peak_force_n, energy=energy,
        convergence=Convergence(bool(r.converged), int(r.max_iterations_used),
                                int(r.subdivided_steps)),
        instability_limit_m=limit, **common)


#: Check quantity -> ResponseResult attribute read for its per-record peak (from the
#: one registry, sdofreport.project.check_quantities).
CHECK_ATTRIBUTES = {key: q.attribute for key, q in CHECK_QUANTITIES.items()}


#: Check quantities whose per-record value carries a sign: their statistic is of |value|.
SIGNED_QUANTITIES = tuple(key for key, q in CHECK_QUANTITIES.items() if q.signed)


def _statistic(values: list[float], statistic: str) -> float:
    return float(np.mean(values)) if statistic == "mean" else float(np.max(values))


def _checks(project: Project, responses: dict, statistic: str) -> list[Check]:
    checks = []
    for system in project.systems:
        records = project.records_for(system)
        for quantity, limit in system.limits.items():
            peaks = [getattr(responses[(system.id, r.id)], CHECK_ATTRIBUTES[quantity])
                     for r in records]
            peaks = [p for p in peaks if p is not None]
            if not peaks:
                continue
            absolute = quantity in SIGNED_QUANTITIES or any(p < 0 for p in peaks)
            demand = _statistic([abs(p) for p in peaks], statistic)
            ratio = demand / limit
            verdict = VERDICT_WITHIN if ratio <= 1.0 else VERDICT_EXCEEDS
            if any(responses[(system.id, r.id)].unstable for r in records):
                verdict = VERDICT_UNSTABLE  # the demand of a runaway record means nothing
            checks.append(Check(system.id, quantity, limit, demand, statistic, ratio,
                                verdict, absolute, DemandStatistics.of(np.abs(peaks))))
    return checks


# ---------------------------------------------------------------------------------------
# Running


class _Phase:
    """Runs planned jobs through the cache and the executor; counts hits and misses."""

    def __init__(self, cache: ResultCache, progress: Progress | None, total: int,
                 executor: dict) -> None:
        self.cache, self.progress, self.total = cache, progress, total
        self.executor = executor
        self.done = self.hits = self.misses = 0
        self.seconds = 0.0

    def run(self, plan: list[tuple[str, str, tuple, str]]) -> list:
        """``plan`` rows are (label, job kind, arguments, cache key)."""
        outputs: list = [None] * len(plan)
        todo = []
        for index, (_, _, _, key) in enumerate(plan):
            cached = self.cache.get(key)
            if cached is not None:
                outputs[index] = cached
                self.hits += 1
                self.done += 1
            else:
                todo.append(index)
        if self.progress:
            self.progress(self.done, self.total, "cached")
        started = time.perf_counter()

        def finished(position: int, output) -> None:
            index = todo[position]
            outputs[index] = output
            self.cache.put(plan[index][3], output)
            self.done += 1
            self.misses += 1
            if self.progress:
                self.progress(self.done, self.total, plan[index][0])

        jobs = [(plan[i][0], run_job, (plan[i][1], plan[i][2])) for i in todo]
        execute(jobs, finished, **self.executor)
        self.seconds += time.perf_counter() - started
        return outputs


def run_project(project: Project, *, jobs: int | None = None,
                cache_dir: str | os.PathLike | None = None, use_cache: bool = True,
                progress: Progress | None = None, scheduler: str | None = None,
                dask_local: int | None = None,
                records_ready: Callable[[list[RecordResult]], None] | None = None) \
        -> Results:
    """
    Compute every result of a project.

    Parameters
    ----------
    project : Project
        A validated project (:func:`sdofreport.project.load_project`).
    jobs : int, optional
        Worker processes; default the number of cores. 1 runs in this process.
    cache_dir : path, optional
        Result cache folder; default :func:`sdofreport.cache.default_cache_dir`.
    use_cache : bool
        False computes everything afresh and stores nothing.
    progress : callable(done, total, label), optional
        Called after each job.
    scheduler : str, optional
        Address of a running Dask scheduler (``tcp://host:port``) to send the jobs to.
    dask_local : int, optional
        Start a local Dask cluster of this many worker processes instead.
    records_ready : callable(list of RecordResult), optional
        Called with the records' results (scaled) as soon as they exist, before the
        responses are computed (the site starts drawing the record figures then).

    Returns
    -------
    Results
    """
    started = time.perf_counter()
    cache = ResultCache((cache_dir or default_cache_dir()) if use_cache else None)
    workers = jobs or os.cpu_count() or 1
    local = not (scheduler or dask_local)
    if workers > 1 and local and _probably_cold(project, cache):
        records = _records_while_warming(project, cache)
    else:
        records = load_records(project, cache)
    read_time = time.perf_counter() - started
    analysis = project.analysis
    base = {"version": __version__, "method": analysis.method}
    pairs = _pairs(project)
    total = len(records) + len(pairs) + len(records)
    if any(system.directions == 2 for system in project.systems):
        total += len(pairs)
    if project.inelastic is not None:
        total += len(records)
    phase = _Phase(cache, progress, total, {"workers": workers,
                                            "scheduler": scheduler,
                                            "dask_local": dask_local,
                                            "min_pool_seconds": pool_start_seconds()})
    by_id = {r.id: r for r in records}
    # Scaling reads spectra at the target's own damping, listed in [analysis] damping
    # or not; the records' results keep only the listed ratios.
    target_damping = scaling_damping(project)
    damping = tuple(sorted(set(analysis.damping) | ({target_damping} if target_damping
                                                    is not None else set())))
    pair_damping = target_damping if target_damping is not None else SCALING_DAMPING

    # Phase 1: spectra of every record (as given) and RotD spectra of every pair.
    plan = []
    for record in records:
        args = _record_args(record, analysis, damping)
        key = cache_key({**base, "job": "record", "sha": _array_hash(args[0]),
                            "dt": record.dt_s, "periods": list(analysis.periods_s),
                            "damping": list(damping)})
        plan.append((f"record {record.id} (spectra)", "record", args, key))
    for name, (h1, h2) in pairs.items():
        a1, a2 = by_id[h1].acceleration_m_s2, by_id[h2].acceleration_m_s2
        args = (a1, a2, by_id[h1].dt_s, analysis.periods_s, pair_damping, analysis.method)
        key = cache_key({**base, "job": "pair", "sha1": _array_hash(a1),
                            "sha2": _array_hash(a2), "dt": by_id[h1].dt_s,
                            "periods": list(analysis.periods_s), "damping": pair_damping})
        plan.append((f"pair {name} (RotD)", "pair", args, key))
    first = phase.run(plan)
    record_outputs = first[:len(records)]
    pair_outputs = dict(zip(pairs, first[len(records):]))

    # Phase 2: suite scaling; scale records and (linearly) their spectra.
    scaling = compute_scaling(project, {r.id: o["spectrum"] for r, o in
                                        zip(records, record_outputs)},
                              {name: o["rotd"] for name, o in pair_outputs.items()})
    attach_vertical(scaling, project, {r.id: o["spectrum"] for r, o in
                                       zip(records, record_outputs)})
    record_results, scaled = [], {}
    for record, spec, output in zip(records, project.records, record_outputs):
        if damping != tuple(analysis.damping):
            output = {**output, "spectrum": _spectrum_at(output["spectrum"],
                                                         analysis.damping)}
        factor = scaling.factors.get(record.id, 1.0)
        if factor != 1.0:
            record = _with_acceleration(record, np.asarray(record.acceleration_m_s2) * factor,
                                        scaling.history_note(record.id, factor))
            output = {**output, **record_products(record.acceleration_m_s2, record.dt_s),
                      "spectrum": _scaled_spectrum(output["spectrum"], factor)}
        scaled[record.id] = record
        record_results.append(RecordResult(spec, record, scale_factor=factor, **output))
    pair_results = [PairResult(name, h1, h2, _scaled_rotd(pair_outputs[name]["rotd"],
                                                          scaling.factors.get(h1, 1.0)))
                    for name, (h1, h2) in pairs.items()]
    check_results(project.path.name, record_results, pairs=pair_results)  # PGA, finite
    if records_ready is not None:
        records_ready(record_results)

    # Phase 3: every system's response to every (scaled) record, one job per record.
    plan = []
    runs = list(project.systems) + _bound_systems(project)
    one_d = [s for s in runs if s.directions == 1]
    driven = {spec.id: [s for s in one_d if (s.direction == "vertical") ==
                        (spec.component == "V")] for spec in project.records}
    for record in (scaled[r.id] for r in project.records):
        models = [{**system_model(system), "system_id": system.id}
                  for system in driven[record.id]]
        args = (record.acceleration_m_s2, record.dt_s, models, analysis.method)
        key = cache_key({**base, "job": "responses", "sha": _array_hash(args[0]),
                            "dt": record.dt_s, "models": models})
        plan.append((f"record {record.id} (responses of {len(models)} systems)",
                     "responses", args, key))
    inelastic_spec = project.inelastic
    if inelastic_spec is not None:
        for record in (scaled[r.id] for r in project.records):
            args = _inelastic_args(record, inelastic_spec)
            key = cache_key({**base, "job": "inelastic", "sha": _array_hash(args[0]),
                                "dt": record.dt_s, "spec": dataclasses.asdict(
                                    inelastic_spec)})
            plan.append((f"record {record.id} (inelastic spectra)", "inelastic", args,
                         key))
    two_d = [s for s in runs if s.directions == 2]
    biaxial_plan = _biaxial_plan(project, two_d, scaled, base)
    stripes = _stripe_plan(project, scaled, base)
    phase.total += len(stripes)
    plan += stripes + biaxial_plan
    outputs = phase.run(plan)
    biaxial_outputs = outputs[len(plan) - len(biaxial_plan):]
    stripe_outputs = outputs[len(plan) - len(biaxial_plan) - len(stripes):
                             len(plan) - len(biaxial_plan)]
    outputs = outputs[:len(plan) - len(biaxial_plan) - len(stripes)]
    inelastic = {}
    if inelastic_spec is not None:
        tail = outputs[len(project.records):]
        inelastic = {spec.id: InelasticSpectra(**out)
                     for spec, out in zip(project.records, tail)}
    responses = {}
    for spec, group in zip(project.records, outputs[:len(project.records)]):
        record = scaled[spec.id]
        time_s = np.arange(record.npts) * record.dt_s
        for system, raw in zip(driven[spec.id], group):
            if raw["model"] == "linear":  # linear jobs send no time axis: it is n · dt
                raw = {**raw, "time_s": time_s}
            responses[(system.id, spec.id)] = _biaxial_result(system, spec.id, 0, raw) \
                if "biaxial" in raw else _response_result(system, spec.id, raw)
    for (h1, h2), group in zip(_pairs(project).values() if two_d else (), biaxial_outputs):
        for system, raw in zip(two_d, group):
            for direction, rid in enumerate((h1, h2)):
                responses[(system.id, rid)] = _biaxial_result(system, rid, direction, raw)
    check_results(project.path.name, (), responses.values())
    statistic = project.statistic_used
    bounds = _split_bounds(responses)
    checks = _governing_checks(project, _checks(project, responses, statistic), responses,
                               bounds, statistic)
    return Results(project, record_results, responses, checks, statistic, scaling,
                   pair_results, inelastic,
                   {"read_s": read_time, "compute_s": phase.seconds,
                    "total_s": time.perf_counter() - started}, phase.hits, phase.misses,
                   _fragility_results(project, stripe_outputs),
                   bounds={key: BoundRuns(**runs) for key, runs in bounds.items()},
                   effective=_effective_properties(project, responses, bounds, statistic),
                   statistics=suite_statistics(project, record_results, responses, bounds,
                                               scaling, inelastic, statistic))


def _bound_systems(project: Project) -> list[SystemSpec]:
    """The lower- and upper-bound variants (ids ``<id>@lower``, ``<id>@upper``; ``@`` is
    not allowed in ids) of systems with ``property_factors``: the friction, or a bilinear
    isolator's Q_d and k_d, multiplied by the factor (ASCE/SEI 7-16 §17.2.8.4, from
    memory; :func:`sdofreport.isolation_bounds.bound_model`)."""
    out = []
    for system in project.systems:
        factors = (system.model or {}).get("property_factors")
        for name, factor in zip(BOUND_RUNS, factors or ()):
            out.append(dataclasses.replace(system, id=f"{system.id}@{name}",
                                           model=bound_model(system.model, factor)))
    return out


def _split_bounds(responses: dict) -> dict:
    """Move the bound runs out of ``responses``: (system id, record id) -> {run: result}."""
    bounds: dict = {}
    for (sid, rid) in [key for key in responses if "@" in key[0]]:
        system_id, run = sid.split("@")
        bounds.setdefault((system_id, rid), {})[run] = dataclasses.replace(
            responses.pop((sid, rid)), system_id=system_id)
    return bounds


def _governing_checks(project: Project, checks: list[Check], responses: dict,
                      bounds: dict, statistic: str) -> list[Check]:
    """With bound runs: each check of such a system takes the run of the largest demand
    ratio (an unstable run governs), naming it in ``governing_run``."""
    if not bounds:
        return checks
    bounded = {sid for sid, _ in bounds}
    per_run = {run: _checks(project, {**responses, **{k: v[run] for k, v in
                                                      bounds.items()}}, statistic)
               for run in BOUND_RUNS}
    out = []
    for i, check in enumerate(checks):
        if check.system_id not in bounded:
            out.append(check)
            continue
        options = [("nominal", check)] + [(run, per_run[run][i]) for run in BOUND_RUNS]
        run, best = max(options, key=lambda o: (o[1].verdict == VERDICT_UNSTABLE,
                                                 o[1].ratio))
        out.append(dataclasses.replace(best, governing_run=run))
    return out


def _effective_properties(project: Project, responses: dict, bounds: dict,
                          statistic: str) -> dict:
    """Effective period and damping of each sliding pendulum and each bilinear isolator
    with property_factors, per run, at the suite statistic of that run's peak
    (resultant) displacements."""
    out = {}
    for system in project.systems:
        model = system.model or {}
        if not system.is_isolator or (system.model_name == "bilinear" and
                                       not model.get("property_factors")):
            continue
        factors = dict(zip(BOUND_RUNS, model.get("property_factors") or ()))
        runs = {}
        for run, factor in [("nominal", 1.0), *factors.items()]:
            peaks = [(responses[(system.id, r.id)] if run == "nominal" else
                      bounds[(system.id, r.id)][run]).peak_displacement_m
                     for r in project.records_for(system)]
            demand = _statistic(peaks, statistic)
            if demand > 0:
                runs[run] = effective_at(model, factor)(demand)
        out[system.id] = runs
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
        key = cache_key({**base, "job": "biaxial", "sha1": _array_hash(a1),
                         "sha2": _array_hash(a2), "dt": scaled[h1].dt_s, "models": models})
        plan.append((f"pair {name} (two-direction responses of {len(models)} systems)",
                     "biaxial", args, key))
    return plan


# ---------------------------------------------------------------------------------------
# Multiple-stripe fragility (optional [fragility] section)


def _fragility_systems(project: Project) -> list[SystemSpec]:
    spec = project.fragility
    return [] if spec is None else [s for s in project.systems if s.id in spec.systems]


def _stripe_plan(project: Project, scaled: dict[str, Record], base: dict) -> list:
    """One ``stripe`` job per fragility system and level: the scaled suite, each record
    scaled again so its measure equals the level (sdofreport.jobs.stripe_job)."""
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
        shas = [_array_hash(a) for a in accelerations]
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
    (sdofreport.jobs.pair_stripe_job)."""
    spec = project.fragility
    pairs = tuple((scaled[h1].acceleration_m_s2, scaled[h2].acceleration_m_s2)
                  for h1, h2 in _pairs(project).values())
    dts = tuple(scaled[h1].dt_s for h1, _ in _pairs(project).values())
    shas = [[_array_hash(a1), _array_hash(a2)] for a1, a2 in pairs]
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


def run_exceeds(response: ResponseResult, quantity: str, limit: float) -> bool:
    """Whether one run exceeds a limit. A run that became unstable (the ``unstable``
    verdict of the checks), or did not give a finite number, exceeds every limit."""
    value = getattr(response, CHECK_ATTRIBUTES[quantity])
    if response.unstable or value is None or not np.isfinite(value):
        return True
    return abs(value) > limit


def _design_level_g(project: Project, system: SystemSpec) -> float | None:
    """The level at which P(exceed) is stated: [fragility] design_level, else the target
    spectrum at the system's period (``sa``) or at T = 0 (``pga``), else None."""
    spec = project.fragility
    if spec.design_level_g is not None:
        return spec.design_level_g
    if project.design_spectrum is None:
        return None
    period = system.period_s if spec.measure == "sa" else 0.0
    value = float(np.asarray(project.design_spectrum.spectrum().sa_g(
        np.array([period]))).ravel()[0])
    return value if np.isfinite(value) and value > 0 else None


def _fragility_results(project: Project, outputs: list) -> list[FragilityResult]:
    """Counts of exceeding runs per level and limit, and their lognormal fit."""
    spec = project.fragility
    results, position = [], 0
    for system in _fragility_systems(project):
        stripes = outputs[position:position + len(spec.levels_g)]
        position += len(spec.levels_g)
        # two directions: one run per pair, named by its H1 record
        ids = [h1 for h1, _ in _pairs(project).values()] if system.directions == 2 \
            else [r.id for r in project.records_for(system)]
        responses = [[_biaxial_result(system, rid, 0, raw) if "biaxial" in raw else
                      _response_result(system, rid, {**raw, "time_s": np.zeros(0)}
                                       if raw["model"] == "linear" else raw)
                      for rid, raw in zip(ids, stripe["runs"])]
                     for stripe in stripes]
        design = _design_level_g(project, system)
        for quantity, limit in system.limits.items():
            if getattr(responses[0][0], CHECK_ATTRIBUTES[quantity]) is None:
                continue
            exceeding = [sum(run_exceeds(r, quantity, limit) for r in runs)
                         for runs in responses]
            fit = fit_fragility(spec.levels_g, exceeding, [len(r) for r in responses])
            probability = None
            if fit.status == FITTED and design is not None:
                probability = exceedance_probability(design, fit.median, fit.beta)
            results.append(FragilityResult(system.id, quantity, spec.measure, fit, design,
                                           probability))
    return results


def _record_args(record: Record, analysis, damping=None) -> tuple:
    """Arguments of a record job (see sdofreport.jobs), for the plan and the warm-up."""
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


# ---------------------------------------------------------------------------------------
# Loading the compiled kernels while the records are read


def _made_up_record() -> Record:
    """A very short made-up record for the warm-ups: 32 steps of 0.01 s of a decaying
    5 Hz sine (the kernels' argument types, not the record, decide what is compiled)."""
    from sdofreport.records import record_from_array

    time_s = np.arange(32) * 0.01
    return record_from_array(0.5 * np.sin(10.0 * np.pi * time_s) * np.exp(-5.0 * time_s),
                             0.01, record_id="warm-up")


def warm_kernels(project: Project) -> None:
    """
    Load numba and the compiled kernels of the linear path of ``project`` — the record
    jobs' (response spectra: the peak kernel, the exact method's coefficients) and the
    response-history kernel (pairs and linear systems) — by running them on made-up
    input (:func:`_made_up_record`) and discarding the output. The first kernel call
    carries the one-off costs, about a second: importing numba, setting up its type
    registry, loading machine code from its cache (or, on a fresh machine, compiling
    it: several seconds). Afterwards the record jobs run at full speed here and in
    workers forked from here; the nonlinear kernels come from
    :func:`warm_later_kernels`, run meanwhile in another process, or are loaded when
    they first run.
    """
    from sdofreport.core.spectra import load_history_kernel, load_peak_kernel
    from sdofreport.runtime import configure

    configure()  # before numba loads: its cache folder (sdofreport.runtime)
    try:
        load_peak_kernel()
        run_job("record", _record_args(_made_up_record(), project.analysis))
        if _pairs(project) or any(system_model(system)["model"] == "linear"
                                  for system in project.systems):
            load_history_kernel()
    except Exception as exc:  # only a warm-up: the real jobs report any problem
        log.debug("warm-up stopped: %s", exc)


#: Rough CPU seconds numba takes to compile each warm-up step on a fresh machine
#: (measured on the 2-core development machine, 2026-12, for the bundled example): used
#: only to share the later kernels between the build process and the reader process.
_COMPILE_COST_S = {"linear": 3.6, "inelastic": 2.6, "responses": 3.0, "biaxial": 1.6}


def _later_steps(project: Project) -> list[tuple[str, object]]:
    """(name, call) of each nonlinear warm-up step ``project`` needs, in order."""
    record = _made_up_record()
    steps: list[tuple[str, object]] = []
    if project.inelastic is not None:
        steps.append(("inelastic", lambda: run_job("inelastic", _inelastic_args(
            record, project.inelastic))))
    one = [m for m, s in zip(map(system_model, project.systems), project.systems)
           if m["model"] != "linear" and s.directions == 1]
    two = [m for m, s in zip(map(system_model, project.systems), project.systems)
           if m["model"] != "linear" and s.directions == 2]
    if one:
        steps.append(("responses", lambda: run_job("responses", (
            record.acceleration_m_s2, record.dt_s, one, project.analysis.method))))
    if two:  # the two-direction kernel (sdofreport.core.biaxial)
        steps.append(("biaxial", lambda: run_job("biaxial", (
            record.acceleration_m_s2, record.acceleration_m_s2, record.dt_s, two,
            project.analysis.method))))
    return steps


def later_shares(names: list[str]) -> tuple[list[str], list[str]]:
    """
    Split the later warm-up steps ``names`` between the reader process (first) and the
    build process (second), which compiles the linear kernels before its share: of every
    split (each share in the order of ``names``), the one whose longer share compiles
    soonest, by :data:`_COMPILE_COST_S`; on a tie, the one that leaves the most to the
    reader.
    """
    def cost(steps) -> float:
        return sum(_COMPILE_COST_S.get(n, 1.0) for n in steps)

    best = None
    for mask in range(2 ** len(names)):
        builder = [n for i, n in enumerate(names) if mask >> i & 1]
        reader = [n for i, n in enumerate(names) if not mask >> i & 1]
        if names and not reader:
            continue  # the reader is there anyway, and idle otherwise
        key = (max(cost(reader), _COMPILE_COST_S["linear"] + cost(builder)), len(builder))
        if best is None or key < best[0]:
            best = (key, reader, builder)
    return best[1], best[2]


def warm_later_kernels(project: Project, part: str = "all") -> None:
    """
    Compile, or load, the nonlinear kernels ``project`` needs: the inelastic-spectrum
    kernels (an ``[inelastic_spectra]`` table; first, the costliest to compile) and the
    hysteresis kernels (nonlinear systems), by running those jobs on a made-up record
    while :func:`warm_kernels` compiles the linear path in another process; only what
    the project uses. Compiled kernels go to numba's cache on disk, where the build
    process and its workers load them in milliseconds. ``part`` is ``"all"``, or the
    ``"reader"`` or ``"builder"`` share of :func:`later_shares`.
    """
    steps = _later_steps(project)
    if part != "all":
        reader, builder = later_shares([name for name, _ in steps])
        wanted = set(reader if part == "reader" else builder)
        steps = [(name, call) for name, call in steps if name in wanted]
    for _, step in steps:
        try:
            step()
        except Exception as exc:  # only a warm-up: the real jobs report any problem
            log.debug("warm-up of later kernels stopped: %s", exc)


def _probably_cold(project: Project, cache: ResultCache) -> bool:
    """
    True when the build will compute: there is no cache, or the first record file has
    not been read into it before (a build with nothing changed finds it there and then
    needs no kernel at all).
    """
    if cache.folder is None:
        return True
    spec = next((spec for spec in project.records if spec.path is not None), None)
    if spec is None:
        return True
    digest = _file_digest(spec)
    return digest is not None and not cache.has(_read_key(spec, digest))


def _records_while_warming(project: Project, cache: ResultCache) -> list[Record]:
    """
    :func:`load_records` in a worker process while this one runs :func:`warm_kernels`:
    the two one-off costs of a build that computes overlap. The records (and any error
    about them) are the same as read here; if the reader dies, they are read here. The
    worker then runs its share of :func:`warm_later_kernels`, this one its own share
    after the linear kernels (:func:`later_shares`), and this one waits for the reader,
    so on a fresh machine the nonlinear kernels are compiled beside the linear ones
    rather than after them. The project and cache go to the worker as task arguments
    (a few kilobytes), so this works whichever way workers start
    (:func:`sdofreport.executors.start_method`).
    """
    from concurrent.futures.process import BrokenProcessPool

    with local_pool(1, purpose="reading records") as pool:
        future = pool.submit(load_records, project, cache)
        # After the reading, in that process:
        later = pool.submit(warm_later_kernels, project, "reader")
        warm_kernels(project)
        warm_later_kernels(project, "builder")  # this process's share, if any
        try:
            records = future.result()
        except (BrokenProcessPool, OSError) as exc:
            log.debug("record reader lost (%s); reading here", exc)
            records = None
        except BaseException:
            later.cancel()  # a bad record ends the build: no warm-up is needed
            raise
    if records is None:
        return load_records(project, cache)
    for record in records:  # as Record makes them: read-only (unpickling does not)
        record.acceleration_m_s2.flags.writeable = False
    return records


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


__all__ = ["Check", "FragilityResult", "PairResult", "RecordResult", "ResponseResult",
           "Results",
           "run_project", "load_records", "default_cache_dir", "ResultCache",
           "VERDICT_WITHIN", "VERDICT_EXCEEDS", "VERDICT_UNSTABLE", "CHECK_ATTRIBUTES",
           "G"]
