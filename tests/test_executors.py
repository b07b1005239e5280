"""Executors: plan order kept, a dying worker retried once, a twice-failing job named.

Also the Dask path (optional extra): a local cluster on 127.0.0.1 and a scheduler and a
worker started as separate processes give results identical to the local process pool.

Sources of expected values: closed form for the toy jobs (x·x, x + 1) and the process
ids reported by the operating system (os.getpid); results of the Dask path are
compared with the local process pool.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import time
from pathlib import Path

import numpy as np
import pytest

from sdofreport.engine import run_project
from sdofreport.errors import BuildError
from sdofreport.engine.executors import execute
from sdofreport.project import load_project


def _square(x):
    return x * x


def _die_once(marker: str, x):
    """Kill the worker process the first time it runs (a worker dying mid-run)."""
    if not os.path.exists(marker):
        Path(marker).write_text("died")
        os._exit(1)
    return x + 1


def _always_die(x):
    os._exit(1)


def _collect(jobs, **options):
    out = {}
    execute(jobs, lambda i, v: out.__setitem__(i, v), **options)
    return [out[i] for i in range(len(jobs))]


def test_process_pool_keeps_plan_order():
    jobs = [(f"job {i}", _square, (i,)) for i in range(20)]
    assert _collect(jobs, workers=2) == [i * i for i in range(20)]


def _pid(_):
    return os.getpid()


def test_short_work_stays_in_this_process_long_work_goes_to_the_pool():
    jobs = [(f"job {i}", _pid, (i,)) for i in range(8)]
    # A job takes microseconds: the workers would save far less than 60 s, so no pool.
    assert set(_collect(jobs, workers=2, min_pool_seconds=60.0)) == {os.getpid()}
    # With a threshold of 1e-12 s and free transfers any saving exceeds the cost: the
    # first two jobs (warm-up, then timed) run here, the rest go to workers.
    pids = _collect(jobs, workers=2, min_pool_seconds=1e-12, transfer_seconds_per_byte=0.0)
    assert pids[:2] == [os.getpid()] * 2 and os.getpid() not in pids[2:]


def _history(n):
    return os.getpid(), np.zeros(n)


def test_long_outputs_of_short_jobs_stay_in_this_process():
    jobs = [(f"job {i}", _history, (200_000,)) for i in range(8)]
    # 1.6 MB per output at the reference transfer cost outweighs what two workers save
    # on a job of microseconds.
    outputs = _collect(jobs, workers=2, min_pool_seconds=1e-12)
    assert {pid for pid, _ in outputs} == {os.getpid()}
    # Free transfers: the same jobs go to workers.
    outputs = _collect(jobs, workers=2, min_pool_seconds=1e-12, transfer_seconds_per_byte=0)
    assert os.getpid() not in {pid for pid, _ in outputs[2:]}


def test_dying_worker_is_retried(tmp_path):
    marker = str(tmp_path / "marker")
    jobs = [("a", _square, (3,)), ("record r × system s", _die_once, (marker, 1))]
    assert _collect(jobs, workers=2) == [9, 2]


def test_job_failing_twice_is_named():
    jobs = [("a", _square, (3,)), ("system pier × record hcs07", _always_die, (1,))]
    with pytest.raises(BuildError, match=r"job 'system pier × record hcs07' failed twice"):
        _collect(jobs, workers=2)


distributed = pytest.importorskip("distributed")


def test_dask_local_cluster_matches_process_pool(project_factory, valid_project_text):
    project = load_project(project_factory(valid_project_text))
    local = run_project(project, jobs=2, use_cache=False)
    dask = run_project(project, use_cache=False, dask_local=2)
    for key, response in local.responses.items():
        assert dask.responses[key].peak_displacement_m == response.peak_displacement_m
    for a, b in zip(local.records, dask.records):
        assert (a.spectrum.sd_m == b.spectrum.sd_m).all()


def test_dask_dying_worker_is_retried(tmp_path):
    marker = str(tmp_path / "marker")
    jobs = [("a", _square, (4,)), ("b", _die_once, (marker, 5))]
    assert _collect(jobs, dask_local=2) == [16, 6]


def test_separate_scheduler_and_worker_processes(project_factory, valid_project_text,
                                                 tmp_path):
    if shutil.which("dask") is None:
        pytest.skip("the 'dask' command is not on PATH")
    scheduler_file = tmp_path / "scheduler.json"
    env = {**os.environ, "DASK_DISTRIBUTED__WORKER__DAEMON": "False"}
    scheduler = subprocess.Popen(
        ["dask", "scheduler", "--host", "127.0.0.1", "--port", "0", "--no-dashboard",
         "--scheduler-file", str(scheduler_file)],
        stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=env)
    worker = None
    try:
        # The scheduler writes its file in place, so it may exist before it is complete.
        deadline, address = time.time() + 60, None
        while address is None and time.time() < deadline:
            try:
                address = json.loads(scheduler_file.read_text())["address"]
            except (OSError, ValueError, KeyError):
                time.sleep(0.2)
        assert address is not None, "scheduler did not start"
        assert address.startswith("tcp://127.0.0.1:")
        worker = subprocess.Popen(
            ["dask", "worker", address, "--nthreads", "1", "--nworkers", "1",
             "--host", "127.0.0.1", "--no-dashboard"],
            stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=env)
        project = load_project(project_factory(valid_project_text))
        remote = run_project(project, use_cache=False, scheduler=address)
        local = run_project(project, jobs=1, use_cache=False)
        for key, response in local.responses.items():
            assert remote.responses[key].peak_displacement_m == \
                response.peak_displacement_m
    finally:
        for process in (worker, scheduler):
            if process is not None:
                process.terminate()
                try:
                    process.wait(timeout=20)
                except subprocess.TimeoutExpired:
                    process.kill()


def test_unreachable_scheduler_is_a_user_error(monkeypatch):
    monkeypatch.setattr("sdofreport.engine.executors.SCHEDULER_TIMEOUT", "2s")
    jobs = [("a", _square, (2,))]
    with pytest.raises(BuildError, match="cannot reach a Dask scheduler"):
        _collect(jobs, scheduler="tcp://127.0.0.1:9")
