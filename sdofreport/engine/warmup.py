"""Loading or compiling the numba kernels a project needs before its jobs run, shared
between the build process and a worker that reads the records meanwhile."""

from __future__ import annotations

import logging

import numpy as np

from sdofreport.engine.cache import ResultCache
from sdofreport.engine.executors import local_pool
from sdofreport.engine.jobs import run_job
from sdofreport.engine.plan import (
    _file_digest,
    _inelastic_args,
    _pairs,
    _read_key,
    _record_args,
    load_records,
    system_model,
)
from sdofreport.project.model import Project
from sdofreport.records import Record

log = logging.getLogger("sdofreport.engine")


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
#: (measured on the 2-core development machine, 2026-12-05, for the bundled example,
#: median of 3, each step in the order and process the build runs it): used only to
#: share the later kernels between the build process and the reader process.
_COMPILE_COST_S = {"linear": 3.4, "inelastic": 2.8, "responses": 2.8, "biaxial": 1.6}


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
    (:func:`sdofreport.engine.executors.start_method`).
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
