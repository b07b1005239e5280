"""What it costs to start a local pool, by start method (not a test).

The engine sends a phase's jobs to worker processes only when they would save more
than it costs to start them (sdofreport.engine.executors.POOL_START_SECONDS, per start
method). This measures that cost as the build pays it: the build process has loaded the
compiled kernels (engine.warm_kernels), then a pool of two workers is started
(executors.local_pool), each worker is handed a record job on a short made-up record
and the pool is stopped; the time the jobs themselves take in this process is taken
off. The workers' CPU time is printed too: on a busy shared machine it varies far less
than the wall time, and on two idle cores the two workers start side by side, so each
one's CPU time is the wall time of starting them. A forked worker inherits the loaded kernels; a spawned (or forkserver) one starts a
new interpreter, imports numpy, numba and the package and loads the kernels from numba's
cache.

Prints, per start method, the median and the range over --repeats pools (this shared
2-core machine's speed varies between minutes), beside the constant in use. POSIX only
(``resource``).

Run: python benchmarks/pool_start.py [--repeats N]
"""

from __future__ import annotations

import argparse
import multiprocessing
import os
import resource
import statistics
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
EXAMPLE = ROOT / "site_examples" / "harbourview_cold_store" / "sdofreport.toml"


def _children_cpu() -> float:
    """CPU seconds of this process's reaped children so far."""
    usage = resource.getrusage(resource.RUSAGE_CHILDREN)
    return usage.ru_utime + usage.ru_stime


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=5, help="pools per start method")
    args = parser.parse_args()

    from sdofreport import engine
    from sdofreport.engine import executors
    from sdofreport.engine.jobs import run_job
    from sdofreport.project import load_project

    project = load_project(EXAMPLE)
    engine.warm_kernels(project)  # as the build process has before its first phase
    job = engine.plan._record_args(engine.warmup._made_up_record(), project.analysis)
    started = time.perf_counter()
    run_job("record", job)
    inline = time.perf_counter() - started
    print(f"cores: {os.cpu_count()}; one made-up record job here: {1000 * inline:.1f} ms")
    for method in multiprocessing.get_all_start_methods():
        os.environ[executors.START_METHOD_VARIABLE] = method
        samples, cpu = [], []
        for _ in range(max(1, args.repeats)):
            before = _children_cpu()
            started = time.perf_counter()
            with executors.local_pool(2, purpose="benchmark") as pool:
                list(pool.map(run_job, ["record", "record"], [job, job]))
            samples.append(time.perf_counter() - started - inline)
            cpu.append(_children_cpu() - before)  # the workers, once reaped
        # forkserver's workers are the server's children, not ours: not counted here.
        each = "n/a" if method == "forkserver" else f"{statistics.median(cpu) / 2:.2f} s"
        print(f"{method}: pool of 2 started, one job each, stopped: wall median "
              f"{statistics.median(samples):.2f} s (range {min(samples):.2f}-"
              f"{max(samples):.2f} s over {len(samples)}); CPU of each worker median "
              f"{each} (the wall time on two idle cores); "
              f"constant in use {executors.POOL_START_SECONDS.get(method)} s", flush=True)


if __name__ == "__main__":
    main()
