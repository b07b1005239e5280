"""Batch engine: plan every job of a project, run them in a process pool, cache results.

Jobs are (1) per record: processing, intensity measures, Fourier amplitude and response
spectra; (2) per record × system: the response history and its peaks. Each job's result
is cached under a content hash of its inputs, its settings and the package version, so a
rebuild with nothing changed recomputes nothing. Results are assembled in plan order,
never completion order, so the same inputs always give the same outputs.
"""

from __future__ import annotations

import dataclasses
import hashlib
import json
import logging
import os
import pickle
import tempfile
import time
from dataclasses import dataclass, field
from pathlib import Path
from typing import Callable

import numpy as np

from sdofreport import __version__
from sdofreport._cachedir import user_cache_dir
from sdofreport.core.intensity import (
    IntensityMeasures,
    fourier_amplitude,
    ground_displacement,
    ground_velocity,
    intensity_measures,
)
from sdofreport.core.spectra import ResponseSpectrum, oscillator_histories, response_spectrum
from sdofreport.core.units import G
from sdofreport.errors import RecordError
from sdofreport.executors import execute
from sdofreport.project.model import Project, RecordSpec, SystemSpec
from sdofreport.records import Record, process_record, read_record

log = logging.getLogger("sdofreport.engine")

Progress = Callable[[int, int, str], None]


@dataclass(frozen=True)
class RecordResult:
    """Everything computed for one record (after processing and scaling)."""

    spec: RecordSpec
    record: Record
    intensity: IntensityMeasures
    spectrum: ResponseSpectrum
    velocity_m_s: np.ndarray
    displacement_m: np.ndarray
    fourier_frequency_hz: np.ndarray
    fourier_amplitude_m_s: np.ndarray


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


@dataclass(frozen=True)
class Check:
    """One limit check of one system over the suite."""

    system_id: str
    quantity: str  # displacement | drift_ratio | base_shear | total_accel
    limit: float  # SI (m, -, N, m/s²)
    demand: float  # SI, the suite statistic of the per-record peaks
    statistic: str  # mean | max
    ratio: float
    verdict: str  # "within limit" | "exceeds limit"


VERDICT_WITHIN = "within limit"
VERDICT_EXCEEDS = "exceeds limit"


@dataclass
class Results:
    project: Project
    records: list[RecordResult]
    responses: dict[tuple[str, str], ResponseResult]  # (system id, record id)
    checks: list[Check]
    statistic: str
    timings_s: dict[str, float] = field(default_factory=dict)
    cache_hits: int = 0
    cache_misses: int = 0

    def response(self, system_id: str, record_id: str) -> ResponseResult:
        return self.responses[(system_id, record_id)]

    @property
    def exceeds(self) -> bool:
        return any(check.verdict == VERDICT_EXCEEDS for check in self.checks)


# ---------------------------------------------------------------------------------------
# Jobs (top-level functions so the process pool can pickle them)


def _record_job(record: Record, periods_s, damping, method) -> dict:
    acc, dt = record.acceleration_m_s2, record.dt_s
    spectrum = response_spectrum(acc, dt, np.asarray(periods_s), np.asarray(damping),
                                 method=method)
    freq, amp = fourier_amplitude(acc, dt)
    return {
        "intensity": intensity_measures(acc, dt),
        "spectrum": spectrum,
        "velocity_m_s": ground_velocity(acc, dt),
        "displacement_m": ground_displacement(acc, dt),
        "fourier_frequency_hz": freq,
        "fourier_amplitude_m_s": amp,
    }


def _response_job(acceleration, dt_s, period_s, damping, method) -> dict:
    hist = oscillator_histories(acceleration, dt_s, np.array([period_s]),
                                np.array([damping]), method=method)
    return {
        "time_s": hist.time_s,
        "displacement_m": hist.displacement_m[0],
        "total_accel_m_s2": hist.total_acceleration_m_s2[0],
        "peak_displacement_m": float(hist.peaks.displacement_m[0]),
        "peak_velocity_m_s": float(hist.peaks.velocity_m_s[0]),
        "peak_total_accel_m_s2": float(hist.peaks.total_acceleration_m_s2[0]),
    }


def _run_job(job: tuple) -> dict:
    kind, args = job
    return _record_job(*args) if kind == "record" else _response_job(*args)


# ---------------------------------------------------------------------------------------
# Cache


class ResultCache:
    """Pickled job results in a folder, keyed by a content hash; writes are atomic."""

    def __init__(self, folder: str | os.PathLike | None) -> None:
        self.folder = Path(folder) if folder else None
        if self.folder is not None:
            self.folder.mkdir(parents=True, exist_ok=True)

    def _path(self, key: str) -> Path:
        return self.folder / key[:2] / f"{key}.pickle"

    def get(self, key: str):
        if self.folder is None:
            return None
        path = self._path(key)
        try:
            with open(path, "rb") as handle:
                return pickle.load(handle)
        except FileNotFoundError:
            return None
        except Exception:  # a damaged entry is a miss, never an error
            log.debug("cache entry %s unreadable; recomputing", path)
            return None

    def put(self, key: str, value) -> None:
        if self.folder is None:
            return
        path = self._path(key)
        path.parent.mkdir(parents=True, exist_ok=True)
        fd, tmp = tempfile.mkstemp(dir=path.parent, suffix=".tmp")
        try:
            with os.fdopen(fd, "wb") as handle:
                pickle.dump(value, handle, protocol=pickle.HIGHEST_PROTOCOL)
            os.replace(tmp, path)
        except BaseException:
            Path(tmp).unlink(missing_ok=True)
            raise


def default_cache_dir() -> str:
    """The default result cache folder (per user)."""
    return user_cache_dir("results")


def _hash(payload: dict) -> str:
    text = json.dumps(payload, sort_keys=True, separators=(",", ":"), default=str)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


# ---------------------------------------------------------------------------------------
# Planning and running


def load_records(project: Project) -> list[Record]:
    """Read, process and scale every record; every unreadable record is reported at once."""
    records, problems = [], []
    for spec in project.records:
        try:
            record = read_record(spec.path, file_format=spec.file_format, units=spec.units,
                                 dt_s=spec.dt_s, record_id=spec.id)
            settings = spec.processing
            if settings.baseline_order is not None or settings.bandpass_hz or \
                    settings.taper_s:
                record = process_record(record, baseline_order=settings.baseline_order,
                                        bandpass_hz=settings.bandpass_hz,
                                        filter_order=settings.filter_order,
                                        taper_s=settings.taper_s)
            if spec.scale != 1.0:
                scaled = np.array(record.acceleration_m_s2) * spec.scale
                scaled.flags.writeable = False
                record = dataclasses.replace(
                    record, acceleration_m_s2=scaled,
                    history=record.history + (f"scaled by {spec.scale:g}",))
            records.append(record)
        except RecordError as exc:
            problems.append(f"records id {spec.id!r}: {exc.message}")
    if problems:
        count = len(problems)
        raise RecordError(f"{count} record{'s' if count > 1 else ''} could not be used:\n  "
                          + "\n  ".join(problems))
    return records


def _statistic(values: list[float], statistic: str) -> float:
    return float(np.mean(values)) if statistic == "mean" else float(np.max(values))


def _checks(project: Project, responses: dict, statistic: str) -> list[Check]:
    attribute = {"displacement": "peak_displacement_m", "drift_ratio": "peak_drift_ratio",
                 "base_shear": "peak_base_shear_n", "total_accel": "peak_total_accel_m_s2"}
    checks = []
    for system in project.systems:
        for quantity, limit in system.limits.items():
            peaks = [getattr(responses[(system.id, r.id)], attribute[quantity])
                     for r in project.records]
            demand = _statistic(peaks, statistic)
            ratio = demand / limit
            checks.append(Check(system.id, quantity, limit, demand, statistic, ratio,
                                VERDICT_WITHIN if ratio <= 1.0 else VERDICT_EXCEEDS))
    return checks


def _response_result(system: SystemSpec, record_id: str, raw: dict) -> ResponseResult:
    u_peak = raw["peak_displacement_m"]
    drift = u_peak / system.height_m if system.height_m else None
    shear = system.stiffness_n_m * u_peak if system.stiffness_n_m is not None else None
    return ResponseResult(system.id, record_id, u_peak, raw["peak_velocity_m_s"],
                          raw["peak_total_accel_m_s2"], drift, shear, raw["time_s"],
                          raw["displacement_m"], raw["total_accel_m_s2"])


def run_project(project: Project, *, jobs: int | None = None,
                cache_dir: str | os.PathLike | None = None, use_cache: bool = True,
                progress: Progress | None = None, scheduler: str | None = None,
                dask_local: int | None = None) -> Results:
    """
    Compute every result of a project.

    Parameters
    ----------
    project : Project
        A validated project (:func:`sdofreport.project.load_project`).
    jobs : int, optional
        Worker processes; default the number of cores. 1 runs in this process.
    cache_dir : path, optional
        Result cache folder; default :func:`default_cache_dir`.
    use_cache : bool
        False computes everything afresh and stores nothing.
    progress : callable(done, total, label), optional
        Called after each job.
    scheduler : str, optional
        Address of a running Dask scheduler (``tcp://host:port``) to send the jobs to.
    dask_local : int, optional
        Start a local Dask cluster of this many worker processes instead.

    Returns
    -------
    Results
    """
    started = time.perf_counter()
    records = load_records(project)
    read_time = time.perf_counter() - started
    analysis = project.analysis
    cache = ResultCache((cache_dir or default_cache_dir()) if use_cache else None)
    base = {"version": __version__, "method": analysis.method}

    plan: list[tuple[str, tuple, str]] = []  # (label, job, cache key)
    for record in records:
        key = _hash({**base, "job": "record", "sha": _array_hash(record),
                     "dt": record.dt_s, "periods": list(analysis.periods_s),
                     "damping": list(analysis.damping)})
        plan.append((f"record {record.id} (spectra)", ("record", (record, analysis.periods_s,
                                                          analysis.damping,
                                                          analysis.method)), key))
    for system in project.systems:
        for record in records:
            key = _hash({**base, "job": "response", "sha": _array_hash(record),
                         "dt": record.dt_s, "period": system.period_s,
                         "damping": system.damping})
            plan.append((f"system {system.id} × record {record.id}", (
                "response", (record.acceleration_m_s2, record.dt_s, system.period_s,
                             system.damping, analysis.method)), key))

    outputs: list = [None] * len(plan)
    todo = []
    for index, (_, job, key) in enumerate(plan):
        cached = cache.get(key)
        if cached is not None:
            outputs[index] = cached
        else:
            todo.append(index)
    hits = len(plan) - len(todo)
    done = hits
    if progress:
        progress(done, len(plan), "cached")
    compute_started = time.perf_counter()
    job_list = [(plan[i][0], _run_job, (plan[i][1],)) for i in todo]

    def finished(position: int, output) -> None:
        nonlocal done
        index = todo[position]
        outputs[index] = output
        cache.put(plan[index][2], output)
        done += 1
        if progress:
            progress(done, len(plan), plan[index][0])

    execute(job_list, finished, workers=jobs or os.cpu_count() or 1, scheduler=scheduler,
            dask_local=dask_local)
    compute_time = time.perf_counter() - compute_started

    record_results = []
    for record, spec, output in zip(records, project.records, outputs[:len(records)]):
        record_results.append(RecordResult(spec, record, **output))
    responses = {}
    index = len(records)
    for system in project.systems:
        for record in records:
            responses[(system.id, record.id)] = _response_result(system, record.id,
                                                                 outputs[index])
            index += 1
    statistic = project.statistic_used
    checks = _checks(project, responses, statistic)
    return Results(project, record_results, responses, checks, statistic,
                   {"read_s": read_time, "compute_s": compute_time,
                    "total_s": time.perf_counter() - started}, hits, len(todo))


def _array_hash(record: Record) -> str:
    data = np.ascontiguousarray(record.acceleration_m_s2, dtype=np.float64)
    return hashlib.sha256(data.tobytes()).hexdigest()


__all__ = ["Check", "RecordResult", "ResponseResult", "Results", "run_project",
           "load_records", "default_cache_dir", "VERDICT_WITHIN", "VERDICT_EXCEEDS", "G"]
