"""Where the engine's jobs run: in this process, a local process pool, or a Dask cluster.

Every executor returns outputs in plan order, whatever order jobs finish in, so results
are identical on every path. A job whose worker dies is retried once; a job that fails
twice is reported by its label (record and system).

Every local pool of the package (the engine's jobs, the record reader that runs while
the kernels load, the figure workers) is made by :func:`local_pool`, which starts its
workers by :func:`start_method` (``fork`` on Linux, the platform's default elsewhere,
or :data:`START_METHOD_VARIABLE`) and hands them their work explicitly: task arguments,
or a ``state`` given to each worker once at its start (:func:`worker_state`). Nothing a
worker needs comes from a module variable of the build process, so the files a build
writes are the same whichever way its workers start.
"""

from __future__ import annotations

import logging
import os
import signal
import sys
import threading
import time
from concurrent.futures import ProcessPoolExecutor, as_completed
from concurrent.futures.process import BrokenProcessPool
from typing import Any, Callable

from sdofreport.errors import BuildError

log = logging.getLogger("sdofreport.engine.executors")

#: How long to wait for a Dask scheduler to answer before giving up.
SCHEDULER_TIMEOUT = "20s"

#: Attempts per job before it is reported as failed (the first run plus one retry).
ATTEMPTS = 2

Job = tuple[str, Callable[..., Any], tuple]  # (label, function, arguments)
Done = Callable[[int, Any], None]  # called with (job index, output) as each job ends


def _failure(label: str, exc: BaseException) -> BuildError:
    return BuildError(f"job '{label}' failed twice and was given up: "
                      f"{type(exc).__name__}: {exc}")


#: Seconds between a worker's checks that the process that started it is still alive.
PARENT_CHECK_SECONDS = 0.5


def _watch_parent(parent_pid: int) -> None:
    """Exit this process (a pool worker) as soon as its parent ``parent_pid`` is gone."""
    while os.getppid() == parent_pid:
        time.sleep(PARENT_CHECK_SECONDS)
    os._exit(1)


def exit_with_parent(parent_pid: int) -> None:
    """
    Pool initializer: make this worker exit when the process that started it dies,
    even by SIGKILL (which it cannot catch, so it cannot stop its workers itself).

    On Linux the kernel sends the worker SIGKILL when its parent ends
    (``prctl(PR_SET_PDEATHSIG)``, see prctl(2)); everywhere, a daemon thread also
    checks the parent's process id every :data:`PARENT_CHECK_SECONDS` and exits when the
    worker has been handed to another parent. Without this a worker blocked on its task
    queue would wait forever, holding its memory.
    """
    if sys.platform.startswith("linux"):
        try:
            import ctypes

            pr_set_pdeathsig = 1  # linux/prctl.h
            libc = ctypes.CDLL(None, use_errno=True)
            libc.prctl(pr_set_pdeathsig, signal.SIGKILL, 0, 0, 0)
        except (OSError, AttributeError):  # the thread below still works
            pass
    if os.getppid() != parent_pid:  # the parent died before the line above ran
        os._exit(1)
    threading.Thread(target=_watch_parent, args=(parent_pid,), daemon=True,
                     name="sdofreport-parent-watch").start()


#: Environment variable that chooses how local worker processes start: ``fork``,
#: ``spawn`` or ``forkserver`` (multiprocessing's start methods). Unset: ``fork`` on Linux,
#: the platform's default elsewhere (``spawn`` on macOS and Windows).
START_METHOD_VARIABLE = "SDOFREPORT_START_METHOD"


def start_method() -> str:
    """
    How local worker processes start: the value of :data:`START_METHOD_VARIABLE` when
    set, else ``fork`` on Linux (a worker inherits the compiled kernels and modules this
    process has loaded, at no cost), else the platform's default.

    Every pool passes its work to the workers explicitly (task arguments, or the
    ``state`` of :func:`local_pool`), so the results and files are the same whichever
    method starts them. An unknown or unavailable method is a
    :class:`~sdofreport.errors.BuildError`.
    """
    import multiprocessing

    available = multiprocessing.get_all_start_methods()  # the platform's default first
    chosen = os.environ.get(START_METHOD_VARIABLE, "").strip()
    if chosen:
        if chosen not in available:
            raise BuildError(f"{START_METHOD_VARIABLE}={chosen!r}: expected one of "
                             f"{', '.join(available)} (how worker processes start on "
                             f"this system); unset it for the default")
        return chosen
    if sys.platform.startswith("linux") and "fork" in available:
        return "fork"
    return available[0]


def process_context():
    """The multiprocessing context of :func:`start_method` (for the pools and for
    anything shared with their workers, such as a ``Value``)."""
    import multiprocessing

    return multiprocessing.get_context(start_method())


#: Seconds it costs to start a local pool of two workers, give each its first job and
#: stop it, beyond the jobs themselves, by start method; measured with ``python
#: benchmarks/pool_start.py`` on the 2-core reference machine (2026-12): fork 0.08-0.10 s
#: of wall time (a forked worker inherits the loaded kernels); spawn 1.0 s of CPU time
#: per worker, the wall time on two idle cores (a new interpreter imports numpy, numba
#: and the package and loads the kernels from numba's cache; the wall time on the busy
#: shared machine was 7-8 s); forkserver taken as spawn (its workers import the same).
#: A phase goes to workers only when they would save more than this plus the time to
#: move the outputs back (:func:`execute`).
POOL_START_SECONDS = {"fork": 0.1, "forkserver": 1.0, "spawn": 1.0}


def pool_start_seconds() -> float:
    """:data:`POOL_START_SECONDS` of the :func:`start_method` in use [s]."""
    return POOL_START_SECONDS.get(start_method(), max(POOL_START_SECONDS.values()))


# The ``state`` a worker was started with (see local_pool): set in each worker by its
# initializer, from the initializer's arguments (inherited under fork, pickled under
# spawn); never set in the build process.
_STATE: list = []


def _exit_with_build_process() -> None:
    """
    Make this worker, started by ``forkserver``, exit when the build process dies. Such
    a worker is the fork server's child, and the server lives on while any worker does,
    so it watches the build process itself: the pipe end ``multiprocessing`` gives it
    (``parent_process().sentinel``), which reads as closed once the build process is
    gone.
    """
    import multiprocessing
    from multiprocessing.connection import wait

    parent = multiprocessing.parent_process()
    if parent is None or parent.sentinel is None:
        return

    def watch() -> None:
        wait([parent.sentinel])
        os._exit(1)

    threading.Thread(target=watch, daemon=True, name="sdofreport-parent-watch").start()


def _start_worker(parent_pid: int, method: str, state) -> None:
    """Pool initializer: exit with the build process (:func:`exit_with_parent`; under
    ``forkserver`` :func:`_exit_with_build_process`), then keep ``state`` for
    :func:`worker_state`."""
    if method == "forkserver":
        _exit_with_build_process()
    else:
        exit_with_parent(parent_pid)
    _STATE[:] = [state]


def worker_state():
    """In a worker of a pool made with a ``state`` (:func:`local_pool`), that state."""
    if not _STATE:
        raise RuntimeError("worker_state() outside a worker started with a state")
    return _STATE[0]


def local_pool(workers: int, *, state=None, purpose: str = "jobs") -> ProcessPoolExecutor:
    """
    A local process pool, started by :func:`start_method`, whose workers exit when this
    process dies (:func:`exit_with_parent`). Every pool of the package is made here.

    Parameters
    ----------
    workers : int
        Worker processes. [-]
    state : object, optional
        Handed to every worker once, at its start, and returned there by
        :func:`worker_state`: what all its tasks share (say, the figures to draw), so it
        does not travel with each task. Under ``fork`` it is inherited (not copied);
        otherwise it is pickled, so it must be picklable.
    purpose : str
        What the pool is for, in the debug log. [-]
    """
    import multiprocessing

    method = start_method()
    log.debug("starting %d %s worker(s) for %s", workers, method, purpose)
    return ProcessPoolExecutor(max_workers=workers,
                               mp_context=multiprocessing.get_context(method),
                               initializer=_start_worker,
                               initargs=(os.getpid(), method, state))


def run_inline(jobs: list[Job], done: Done) -> None:
    """Run every job in this process, in order."""
    for index, (label, function, args) in enumerate(jobs):
        try:
            output = function(*args)
        except ValueError as exc:
            raise BuildError(f"job '{label}': computation refused its input: {exc}") from None
        done(index, output)


def _run_batch(items: list[tuple[Callable[..., Any], tuple]]) -> list:
    """Run several small jobs in one worker call; a refused input stops the batch."""
    outputs = []
    for position, (function, args) in enumerate(items):
        try:
            outputs.append(function(*args))
        except ValueError as exc:
            return [("refused", position, str(exc))]
    return [("ok", outputs)]


def run_process_pool(jobs: list[Job], done: Done, workers: int) -> None:
    """
    Run jobs in a local process pool, several small jobs per task to save round trips; a
    pool broken by a dying worker is rebuilt and the lost jobs run again one by one.
    """
    pending = list(range(len(jobs)))
    attempts = {index: 0 for index in pending}
    size = max(1, -(-len(pending) // (workers * 8)))  # about 8 tasks per worker
    while pending:
        retry = []
        batches = [pending[i:i + size] for i in range(0, len(pending), size)]
        with local_pool(workers, purpose="computing jobs") as pool:
            futures = {pool.submit(_run_batch, [(jobs[i][1], jobs[i][2]) for i in batch]):
                       batch for batch in batches}
            for future in as_completed(futures):
                batch = futures[future]
                try:
                    result = future.result()
                except (BrokenProcessPool, OSError, MemoryError) as exc:
                    for index in batch:
                        attempts[index] += 1
                        if attempts[index] >= ATTEMPTS and len(batch) == 1:
                            raise _failure(jobs[index][0], exc) from None
                    log.warning("%d job(s) lost their worker (%s); retrying", len(batch),
                                exc)
                    retry.extend(batch)
                    continue
                if result[0][0] == "refused":
                    _, position, message = result[0]
                    raise BuildError(f"job '{jobs[batch[position]][0]}': computation "
                                     f"refused its input: {message}")
                for index, output in zip(batch, result[0][1]):
                    done(index, output)
        pending = sorted(retry)
        size = 1  # after a lost worker, run one job per task to find the culprit


def run_dask(jobs: list[Job], done: Done, *, scheduler: str | None = None,
             local_workers: int | None = None) -> None:
    """
    Run jobs on a Dask distributed cluster: an existing scheduler (``tcp://host:port``)
    or a local cluster of ``local_workers`` single-threaded worker processes on 127.0.0.1.
    """
    try:
        from distributed import Client, LocalCluster, as_completed as dask_completed
    except ImportError:
        raise BuildError("the Dask path needs Dask's distributed scheduler, the optional "
                         "extra 'dask' of sdofreport: python -m pip install "
                         "'dask[distributed]>=2024.1'") from None
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


#: Seconds per pickled byte to move a job's output from a worker to this process (pickle,
#: pipe, unpickle), measured on the 2-core reference machine with 640 kB outputs.
TRANSFER_SECONDS_PER_BYTE = 5e-9


def execute(jobs: list[Job], done: Done, *, workers: int = 1, scheduler: str | None = None,
            dask_local: int | None = None, min_pool_seconds: float = 0.0,
            transfer_seconds_per_byte: float = TRANSFER_SECONDS_PER_BYTE) -> None:
    """
    Run ``jobs`` on the chosen executor, calling ``done(index, output)`` for each.

    With ``min_pool_seconds`` > 0 (the engine passes :func:`pool_start_seconds`) the
    first job runs here (it also pays one-off costs such as loading compiled kernels,
    which forked workers then inherit) and the second
    runs here too, timed (CPU time), with its output's pickled size measured. The rest go
    to worker processes only when the time the workers would save,
    ``rest × t × (1 − 1/workers)``,
    exceeds ``min_pool_seconds`` (starting them) plus the time to move their outputs
    back, ``rest × size × transfer_seconds_per_byte``: short jobs with long histories
    run faster here.
    """
    if not jobs:
        return
    if scheduler or dask_local:
        run_dask(jobs, done, scheduler=scheduler, local_workers=dask_local)
        return
    if workers <= 1 or len(jobs) <= 1:
        run_inline(jobs, done)
        return
    if min_pool_seconds > 0 and len(jobs) > 2:
        import pickle

        run_inline(jobs[:1], done)
        timed: list = []
        # CPU time, not wall time: other processes busy meanwhile (figure workers drawing
        # while responses are computed) must not make the job look longer than it is.
        started = time.process_time()
        run_inline(jobs[1:2], lambda index, output: timed.append(output))
        seconds = time.process_time() - started
        size = len(pickle.dumps(timed[0], protocol=pickle.HIGHEST_PROTOCOL))
        done(1, timed[0])
        rest = jobs[2:]
        saved = len(rest) * seconds * (1.0 - 1.0 / min(workers, len(rest)))
        cost = min_pool_seconds + len(rest) * size * transfer_seconds_per_byte

        def shifted(index: int, output) -> None:
            done(index + 2, output)

        if saved <= cost:
            run_inline(rest, shifted)
        else:
            run_process_pool(rest, shifted, min(workers, len(rest)))
        return
    run_process_pool(jobs, done, min(workers, len(jobs)))
