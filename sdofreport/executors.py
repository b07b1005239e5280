"""Where the engine's jobs run: in this process, a local process pool, or a Dask cluster.

Every executor returns outputs in plan order, whatever order jobs finish in, so results
are identical on every path. A job whose worker dies is retried once; a job that fails
twice is reported by its label (record and system).
"""

from __future__ import annotations

import logging
import os
from concurrent.futures import ProcessPoolExecutor, as_completed
from concurrent.futures.process import BrokenProcessPool
from typing import Any, Callable

from sdofreport.errors import BuildError

log = logging.getLogger("sdofreport.executors")

#: How long to wait for a Dask scheduler to answer before giving up.
SCHEDULER_TIMEOUT = "20s"

#: Attempts per job before it is reported as failed (the first run plus one retry).
ATTEMPTS = 2

Job = tuple[str, Callable[..., Any], tuple]  # (label, function, arguments)
Done = Callable[[int, Any], None]  # called with (job index, output) as each job ends


def _failure(label: str, exc: BaseException) -> BuildError:
    return BuildError(f"job '{label}' failed twice and was given up: "
                      f"{type(exc).__name__}: {exc}")


def run_inline(jobs: list[Job], done: Done) -> None:
    """Run every job in this process, in order."""
    for index, (label, function, args) in enumerate(jobs):
        try:
            output = function(*args)
        except ValueError as exc:
            raise BuildError(f"job '{label}': computation refused its input: {exc}") from None
        done(index, output)


def run_process_pool(jobs: list[Job], done: Done, workers: int) -> None:
    """Run jobs in a local process pool; a pool broken by a dying worker is rebuilt."""
    import multiprocessing

    context = multiprocessing.get_context("fork" if os.name == "posix" else None)
    pending = list(range(len(jobs)))
    attempts = {index: 0 for index in pending}
    while pending:
        retry = []
        with ProcessPoolExecutor(max_workers=workers, mp_context=context) as pool:
            futures = {pool.submit(jobs[i][1], *jobs[i][2]): i for i in pending}
            for future in as_completed(futures):
                index = futures[future]
                try:
                    output = future.result()
                except ValueError as exc:
                    raise BuildError(f"job '{jobs[index][0]}': computation refused its "
                                     f"input: {exc}") from None
                except (BrokenProcessPool, OSError, MemoryError) as exc:
                    attempts[index] += 1
                    if attempts[index] >= ATTEMPTS:
                        raise _failure(jobs[index][0], exc) from None
                    log.warning("job %s lost its worker (%s); retrying", jobs[index][0], exc)
                    retry.append(index)
                    continue
                done(index, output)
        pending = sorted(retry)


def run_dask(jobs: list[Job], done: Done, *, scheduler: str | None = None,
             local_workers: int | None = None) -> None:
    """
    Run jobs on a Dask distributed cluster: an existing scheduler (``tcp://host:port``)
    or a local cluster of ``local_workers`` single-threaded worker processes on 127.0.0.1.
    """
    try:
        from distributed import Client, LocalCluster, as_completed as dask_completed
    except ImportError:
        raise BuildError("the Dask path needs the optional extra: "
                         "pip install 'sdofreport[dask]'") from None
    if not log.isEnabledFor(logging.DEBUG):  # Dask's own chatter only with -v
        for name in ("distributed", "bokeh", "tornado"):
            logging.getLogger(name).setLevel(logging.WARNING)
    cluster = None
    try:
        if scheduler:
            try:
                client = Client(scheduler, timeout=SCHEDULER_TIMEOUT)
            except (OSError, TimeoutError) as exc:
                raise BuildError(f"--scheduler {scheduler}: cannot reach a Dask scheduler "
                                 f"there ({exc}); start one with 'dask scheduler' and "
                                 f"workers with 'dask worker {scheduler}'.") from None
        else:
            cluster = LocalCluster(n_workers=local_workers or 1, threads_per_worker=1,
                                   processes=True, host="127.0.0.1", dashboard_address=":0")
            client = Client(cluster)
        try:
            futures = {}
            for index, (label, function, args) in enumerate(jobs):
                future = client.submit(function, *args, pure=False, retries=ATTEMPTS - 1,
                                       key=f"sdofreport-{index:06d}")
                futures[future] = index
            for future in dask_completed(list(futures)):
                index = futures[future]
                try:
                    output = future.result()
                except ValueError as exc:
                    raise BuildError(f"job '{jobs[index][0]}': computation refused its "
                                     f"input: {exc}") from None
                except Exception as exc:  # KilledWorker and friends after the retry
                    raise _failure(jobs[index][0], exc) from None
                done(index, output)
        finally:
            client.close()
    finally:
        if cluster is not None:
            cluster.close()


def execute(jobs: list[Job], done: Done, *, workers: int = 1, scheduler: str | None = None,
            dask_local: int | None = None) -> None:
    """Run ``jobs`` on the chosen executor, calling ``done(index, output)`` for each."""
    if not jobs:
        return
    if scheduler or dask_local:
        run_dask(jobs, done, scheduler=scheduler, local_workers=dask_local)
    elif workers <= 1 or len(jobs) <= 1:
        run_inline(jobs, done)
    else:
        run_process_pool(jobs, done, min(workers, len(jobs)))
