"""Running a project: the phases of jobs, in this process or in workers, and the
assembled :class:`~sdofreport.engine.results.Results`."""

from __future__ import annotations

import dataclasses
import os
import time
from typing import Callable

import numpy as np

from sdofreport import __version__
from sdofreport.engine.amplitude import check_results
from sdofreport.engine.cache import ResultCache, array_digest, cache_key, default_cache_dir
from sdofreport.engine.executors import execute, pool_start_seconds
from sdofreport.engine.jobs import record_products, run_job
from sdofreport.engine.plan import (
    _biaxial_plan,
    _bound_systems,
    _inelastic_args,
    _pairs,
    _record_args,
    _scaled_rotd,
    _scaled_spectrum,
    _spectrum_at,
    _stripe_plan,
    _with_acceleration,
    load_records,
    system_model,
)
from sdofreport.engine.results import (
    PairResult,
    RecordResult,
    Results,
    _biaxial_result,
    _checks,
    _effective_properties,
    _fragility_results,
    _governing_checks,
    _response_result,
    _split_bounds,
)
from sdofreport.engine.results_types import (
    BoundRuns,
    InelasticSpectra,
)
from sdofreport.engine.suite import SCALING_DAMPING, compute_scaling, scaling_damping
from sdofreport.engine.suite_statistics import suite_statistics
from sdofreport.engine.vertical_suite import attach_vertical
from sdofreport.engine.warmup import _probably_cold, _records_while_warming
from sdofreport.project.model import Project

Progress = Callable[[int, int, str], None]


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
        Result cache folder; default :func:`sdofreport.engine.cache.default_cache_dir`.
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
        key = cache_key({**base, "job": "record", "sha": array_digest(args[0]),
                            "dt": record.dt_s, "periods": list(analysis.periods_s),
                            "damping": list(damping)})
        plan.append((f"record {record.id} (spectra)", "record", args, key))
    for name, (h1, h2) in pairs.items():
        a1, a2 = by_id[h1].acceleration_m_s2, by_id[h2].acceleration_m_s2
        args = (a1, a2, by_id[h1].dt_s, analysis.periods_s, pair_damping, analysis.method)
        key = cache_key({**base, "job": "pair", "sha1": array_digest(a1),
                            "sha2": array_digest(a2), "dt": by_id[h1].dt_s,
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
        key = cache_key({**base, "job": "responses", "sha": array_digest(args[0]),
                            "dt": record.dt_s, "models": models})
        plan.append((f"record {record.id} (responses of {len(models)} systems)",
                     "responses", args, key))
    inelastic_spec = project.inelastic
    if inelastic_spec is not None:
        for record in (scaled[r.id] for r in project.records):
            args = _inelastic_args(record, inelastic_spec)
            key = cache_key({**base, "job": "inelastic", "sha": array_digest(args[0]),
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
