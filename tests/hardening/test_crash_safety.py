"""A build killed at any moment leaves the previous site intact and the cache usable.

A warm "zygote" process imports sdofreport once; each build is a fork of it running
``sdofreport.cli.main(["build", ...])`` that the test kills with SIGKILL after a random
delay (seeded ``random.Random``) drawn over the measured length of a build. Forking
keeps the twenty imports (5-10 s each on a loaded 2-core machine) out of the run time;
the build itself runs exactly as from the console, in its own process. The zygote does
not reap a build until the test has sent its signal, so the signalled pid can never
belong to another process.

Sources of expected values: byte snapshots of the previous site and SHA-256 digests
recomputed with an independent reference library (hashlib).
"""

from __future__ import annotations

import hashlib
import json
import os
import random
import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from tests.conftest import process_alive
from tests.hardening.conftest import snapshot, staging_leftovers

ZYGOTE = r"""
import json, os, sys, time
from sdofreport.cli import main
import sdofreport.build, sdofreport.site.tree as tree, sdofreport.site.context
import matplotlib
from sdofreport.project.quantities import parse_quantity
parse_quantity("1 m", "length")          # load pint's registry once, before forking
print("ready", flush=True)
for line in sys.stdin:
    message = json.loads(line)
    started = time.perf_counter()
    pid = os.fork()
    if pid == 0:
        null = os.open(os.devnull, os.O_WRONLY)
        os.dup2(null, 1); os.dup2(null, 2)
        mode = message["mode"]
        if mode in ("no-exchange", "kill-between-renames"):
            tree._exchange = lambda a, b: False    # the fallback used without renameat2
        if mode == "kill-between-renames":
            real_replace = os.replace
            def replace(src, dst):
                real_replace(src, dst)
                if ".previous-" in str(dst):        # the old site has just been moved aside
                    os.kill(os.getpid(), 9)
            os.replace = replace
        try:
            main(message["argv"])
            code = 0
        except SystemExit as exc:
            code = exc.code if isinstance(exc.code, int) else 1
        except BaseException:
            code = 70
        os._exit(code)
    print(f"pid {pid}", flush=True)
    sys.stdin.readline()                       # "reap": the test has sent its signal
    _, status = os.waitpid(pid, 0)
    print(f"exit {status} {time.perf_counter() - started:.4f}", flush=True)
"""


class Zygote:
    """The warm parent process; ``start`` forks a build, ``finish`` reaps it."""

    def __init__(self, cwd: Path) -> None:
        self.process = subprocess.Popen([sys.executable, "-c", ZYGOTE], cwd=cwd,
                                        stdin=subprocess.PIPE, stdout=subprocess.PIPE,
                                        text=True, bufsize=1)
        assert self.process.stdout.readline().strip() == "ready"

    def start(self, argv: list, mode: str = "normal") -> int:
        message = {"argv": [str(a) for a in argv], "mode": mode}
        self.process.stdin.write(json.dumps(message) + "\n")
        self.process.stdin.flush()
        word, pid = self.process.stdout.readline().split()
        assert word == "pid"
        return int(pid)

    def finish(self) -> tuple[int, float]:
        """Reap the build: (wait status, seconds from fork to exit)."""
        self.process.stdin.write("reap\n")
        self.process.stdin.flush()
        word, status, seconds = self.process.stdout.readline().split()
        assert word == "exit"
        return int(status), float(seconds)

    def close(self) -> None:
        self.process.stdin.close()
        self.process.wait(timeout=60)


@pytest.fixture(scope="module")
def zygote(tmp_path_factory):
    process = Zygote(tmp_path_factory.mktemp("zygote"))
    yield process
    process.close()


def manifest_valid(site: Path) -> bool:
    """A complete site: the manifest lists exactly the other files, every hash matches."""
    try:
        manifest = json.loads((site / "manifest.json").read_text("utf-8"))
    except (OSError, ValueError):
        return False
    files = snapshot(site)
    listed = manifest.get("files", {})
    return set(files) - {"manifest.json"} == set(listed) and all(
        hashlib.sha256(files[path]).hexdigest() == digest for path, digest in listed.items())


@pytest.fixture
def setup(good_build, zygote, tmp_path):
    """A copy of the good site and of its warm cache, rebuilt once by a forked build;
    ``before`` is the byte snapshot of that site."""
    shutil.copytree(good_build["cache"], tmp_path / "cache")
    shutil.copytree(good_build["site"], tmp_path / "site")
    setup = {"project": good_build["project"], "cache": tmp_path / "cache",
             "site": tmp_path / "site"}
    code, seconds = _build(zygote, setup)
    assert code == 0 and manifest_valid(setup["site"])
    # Regression: same inputs, same bytes (DEVELOPERS.md), here across two processes.
    # (Fails spuriously if someone edits the package while the tests run.)
    assert snapshot(setup["site"]) == good_build["snapshot"]
    return {**setup, "before": snapshot(setup["site"]), "seconds": seconds}


def _argv(setup) -> list:
    return ["build", setup["project"], "-o", setup["site"], "--cache-dir", setup["cache"],
            "--jobs", "1", "-q"]


def _build(zygote: Zygote, setup, mode: str = "normal") -> tuple[int, float]:
    zygote.start(_argv(setup), mode)
    status, seconds = zygote.finish()
    return os.waitstatus_to_exitcode(status), seconds


def _random_kills(zygote, setup, runs: int, seed: int, mode: str) -> list[int]:
    """Kill ``runs`` builds at random moments; return the runs that left no site."""
    site, before = setup["site"], setup["before"]
    duration = setup["seconds"]                    # a warm build, like the killed ones
    rng = random.Random(seed)
    absent, finished_first = [], 0
    for run in range(runs):
        delay = rng.uniform(0.0, duration)
        pid = zygote.start(_argv(setup), mode)
        time.sleep(delay)
        os.kill(pid, signal.SIGKILL)               # not reaped yet: still our child
        status, _ = zygote.finish()
        finished_first += os.WIFEXITED(status)
        if not site.exists():
            # Only a kill between the fallback's two renames leaves no site, and then
            # the previous one is intact aside, for the next build to put back.
            aside = sorted(site.parent.glob(f".{site.name}.previous-*/site"))
            assert aside and snapshot(aside[0]) == before, \
                f"run {run}: no site and none aside after a kill at {delay:.3f} s"
            absent.append(run)
            continue
        # The previous site byte for byte, or a complete new one; never partial.
        assert snapshot(site) == before or manifest_valid(site), \
            f"run {run}: partial site after a kill at {delay:.3f} s"
        # Staging folders may remain beside it but are never the site itself.
        assert site.name not in staging_leftovers(site)
    # Not a behaviour check: the delays span a build, so most kills land inside one.
    assert finished_first < runs
    # A normal build with the same cache succeeds, tidies up and gives the same bytes.
    code, _ = _build(zygote, setup)
    assert code == 0
    assert snapshot(site) == before
    assert staging_leftovers(site) == []
    return absent


def test_killed_builds_leave_the_previous_site(zygote, setup):
    # Linux: StagedTree.commit swaps the folders with renameat2(RENAME_EXCHANGE), so no window.
    absent = _random_kills(zygote, setup, runs=20, seed=20261130, mode="normal")
    assert absent == [], f"site absent after kills {absent}"


def test_killed_builds_without_atomic_exchange(zygote, setup):
    """The same with the two-rename fallback that StagedTree.commit uses without renameat2."""
    absent = _random_kills(zygote, setup, runs=6, seed=20261201, mode="no-exchange")
    # Every run checked above left the previous site, a complete new one, or (absent)
    # the previous one aside; the build after the kills restored the same bytes.
    assert snapshot(setup["site"]) == setup["before"]
    if absent:
        pytest.xfail(f"site absent after kills {absent}: {WINDOW}")


#: Known window of the fallback (reported to the lead); xfail only when it shows.
WINDOW = ("sdofreport/site/tree.py StagedTree.commit, fallback without renameat2: the old "
          "site is renamed to .<name>.previous-*/site before the new one is renamed in; a "
          "build killed between the two leaves no site until the next build reaches "
          "prepare_output (recover_site)")


def test_kill_between_the_two_renames(zygote, setup):
    site = setup["site"]
    zygote.start(_argv(setup), "kill-between-renames")
    status, _ = zygote.finish()
    assert os.WIFSIGNALED(status) and os.WTERMSIG(status) == signal.SIGKILL
    aside = sorted(site.parent.glob(f".{site.name}.previous-*/site"))
    assert aside and snapshot(aside[0]) == setup["before"]  # safe, but moved aside
    # What a reader of the site folder sees after the crash, before any new build; an
    # imperative xfail (like xfail(strict=False)) for this window only.
    if not site.is_dir():
        pytest.xfail(WINDOW)
    assert snapshot(site) == setup["before"]


def test_next_build_recovers_a_site_left_aside(zygote, setup):
    """After a kill between the renames, the next build puts a complete site back."""
    site = setup["site"]
    zygote.start(_argv(setup), "kill-between-renames")
    zygote.finish()
    code, _ = _build(zygote, setup)
    assert code == 0
    assert snapshot(site) == setup["before"] and staging_leftovers(site) == []


def _children(pid: int) -> set[int]:
    """Process ids whose parent is ``pid`` (the fourth field of /proc/<id>/stat, proc(5))."""
    found = set()
    for entry in os.listdir("/proc"):
        if entry.isdigit():
            try:
                with open(f"/proc/{entry}/stat", encoding="ascii") as handle:
                    fields = handle.read().rsplit(")", 1)[1].split()
            except OSError:
                continue
            if int(fields[1]) == pid and fields[0] != "Z":
                found.add(int(entry))
    return found


@pytest.mark.skipif(not os.path.isdir("/proc/self"), reason="needs /proc (Linux)")
def test_helpers_of_a_killed_build_exit(zygote, good_build, tmp_path):
    # Reproduction: the build process killed alone left 1-4 helper processes blocked
    # forever. A cold build with two jobs reads its records in a helper process while it
    # loads the kernels; the build is killed as soon as that helper exists.
    argv = ["build", good_build["project"], "-o", tmp_path / "site", "--cache-dir",
            tmp_path / "cache", "--jobs", "2", "-q"]
    pid = zygote.start(argv)
    helpers: set[int] = set()
    deadline = time.monotonic() + 60.0
    while not helpers and time.monotonic() < deadline:
        helpers = _children(pid)
        time.sleep(0.005)
    os.kill(pid, signal.SIGKILL)
    status, _ = zygote.finish()
    assert helpers, "the build started no helper process"
    if os.WIFEXITED(status):
        pytest.skip("the build finished before the kill")
    deadline = time.monotonic() + 10.0
    while any(process_alive(p) for p in helpers) and time.monotonic() < deadline:
        time.sleep(0.05)
    # Within seconds, as the issue asks (prctl(2) PR_SET_PDEATHSIG or the parent watch).
    assert [p for p in helpers if process_alive(p)] == []


def _holds_id(lock: Path) -> bool:
    try:
        return lock.stat().st_size > 0
    except FileNotFoundError:
        return False


def test_a_second_build_meanwhile_leaves_the_first_to_finish(zygote, setup):
    # Reproduction: a second build into the same folder deleted the first one's
    # staging folder, and the first failed.
    from tests.hardening.conftest import assert_user_error, invoke

    site = setup["site"]
    lock = site.parent / f".{site.name}.lock"
    pid = zygote.start(_argv(setup))
    deadline = time.monotonic() + 30.0
    # Until the first build holds the lock and has written its process id there (on a
    # busy machine the file can exist a moment before the id is in it).
    while not _holds_id(lock) and time.monotonic() < deadline:
        time.sleep(0.001)
    second = invoke(*_argv(setup))
    status, _ = zygote.finish()
    assert os.waitstatus_to_exitcode(status) == 0  # the first build finished
    if second.exit_code == 0:
        pytest.skip(f"build {pid} had finished before the second one started")
    assert_user_error(second, "another sdofreport run", f"process {pid}")
    assert snapshot(site) == setup["before"] and manifest_valid(site)
    assert staging_leftovers(site) == [] and not lock.exists()
