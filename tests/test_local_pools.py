"""Local pool workers end with the process that started them (sdofreport.engine.executors).

Sources of expected values: process states reported by the operating system
(/proc/<pid>/stat, proc(5)); prctl(2) PR_SET_PDEATHSIG for the Linux mechanism.
"""

from __future__ import annotations

import multiprocessing
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from tests.conftest import process_alive

# A process that starts two pools the way the package makes every pool, leaves their
# workers idle (blocked on the task queue) or busy, prints their process ids and waits.
_ORPHANS = r"""
import sys, time
from sdofreport.engine.executors import local_pool
idle = local_pool(2)
list(idle.map(time.sleep, [0.01, 0.01]))        # both workers started, now waiting
busy = local_pool(1)
busy.submit(time.sleep, 600)
time.sleep(0.3)
print(" ".join(str(pid) for pool in (idle, busy) for pid in pool._processes), flush=True)
time.sleep(600)
"""


@pytest.mark.skipif(not os.path.isdir("/proc/self"), reason="needs /proc (Linux)")
@pytest.mark.parametrize("method", [m for m in ("fork", "spawn", "forkserver")
                                    if m in multiprocessing.get_all_start_methods()])
def test_workers_exit_when_the_build_process_is_killed_alone(tmp_path, method):
    # Reproduction: the build process killed alone (SIGKILL) left its pool workers
    # blocked forever, 100-140 MB each. Whatever starts the workers (a forkserver's
    # workers are the server's children, and the server ends with the build process).
    process = subprocess.Popen([sys.executable, "-c", _ORPHANS], stdout=subprocess.PIPE,
                               text=True, cwd=tmp_path,
                               env={**os.environ, "SDOFREPORT_START_METHOD": method})
    try:
        workers = [int(pid) for pid in process.stdout.readline().split()]
        assert len(workers) == 3 and all(process_alive(pid) for pid in workers)
    finally:
        os.kill(process.pid, signal.SIGKILL)  # the build process alone
        process.wait()
    deadline = time.monotonic() + 10.0
    while any(process_alive(pid) for pid in workers) and time.monotonic() < deadline:
        time.sleep(0.1)
    # Within seconds (the issue): each worker sees its parent gone (prctl(2)
    # PR_SET_PDEATHSIG on Linux, else the parent-id watch) and exits.
    assert [pid for pid in workers if process_alive(pid)] == []


def test_every_pool_of_the_package_is_made_by_local_pool():
    """A pool made elsewhere would not stop with the build process."""
    package = Path(__file__).resolve().parents[1] / "sdofreport"
    makers = sorted(str(path.relative_to(package)) for path in package.rglob("*.py")
                    if "ProcessPoolExecutor(" in path.read_text("utf-8"))
    assert makers == ["engine/executors.py"]
