"""Worker processes started by spawn (the default start method on macOS and Windows)
give the same site, byte for byte, as forked ones (sdofreport.engine.executors.start_method).

Sources of expected values: the same project built by the same code with forked workers
(the Linux default, the path the other tests check against closed forms and scipy);
Python's documented start methods (``multiprocessing.get_all_start_methods``).
"""

from __future__ import annotations

import logging
import multiprocessing
import re

import pytest

from sdofreport.engine import executors
from sdofreport.build import build_site
from sdofreport.errors import BuildError
from tests.conftest import ONE_SYSTEM, PROJECT_HEAD, synthetic_acceleration

needs_fork = pytest.mark.skipif("fork" not in multiprocessing.get_all_start_methods(),
                                reason="compares with forked workers")

# Two horizontal pairs driving a linear system, a yielding one and a two-direction one:
# every kind of pool of a build (reading, jobs, figures) and the later kernels' warm-up.
_PROJECT = PROJECT_HEAD + """
[[records]]
id = "a1"
file = "records/a1.csv"
pair = "A"
component = "H1"

[[records]]
id = "a2"
file = "records/a2.csv"
pair = "A"
component = "H2"

[[records]]
id = "b1"
file = "records/b1.csv"
pair = "B"
component = "H1"

[[records]]
id = "b2"
file = "records/b2.csv"
pair = "B"
component = "H2"

""" + ONE_SYSTEM + """
[[systems]]
id = "pier"
name = "Yielding pier"
mass = "60 t"
period = "1.2 s"
height = "6 m"
damping = 0.05
yield_strength = "150 kN"
post_yield_ratio = 0.05
[systems.limits]
displacement = "200 mm"

[[systems]]
id = "tank"
name = "Two-direction tank"
damping = 0.02
mass = "50 t"
stiffness = "5 MN/m"
height = "10 m"
directions = 2
[systems.limits]
drift_ratio = 0.01
"""


def _files(site) -> dict[str, bytes]:
    return {p.relative_to(site).as_posix(): p.read_bytes() for p in site.rglob("*")
            if p.is_file()}


def _build(tmp_path, method: str, caplog) -> tuple[dict[str, bytes], set[str]]:
    """The project built with two workers started by ``method``, every job computed
    (fresh caches) and sent to the workers however short; the site's files and the
    purposes of the pools started."""
    from sdofreport.core.units import G
    from sdofreport.records.writers import write_two_column

    folder = tmp_path / method
    (folder / "records").mkdir(parents=True)
    for seed, name in enumerate(("a1", "a2", "b1", "b2"), start=21):
        write_two_column(folder / "records" / f"{name}.csv", 0.01,
                         synthetic_acceleration(seed, duration_s=6.0) / G, units="g")
    (folder / "sdofreport.toml").write_text(_PROJECT, encoding="utf-8")
    caplog.clear()
    with pytest.MonkeyPatch.context() as patch:
        patch.setenv(executors.START_METHOD_VARIABLE, method)
        # Workers for every phase, however short (the real threshold would keep this
        # small project's jobs in the build process under spawn).
        patch.setitem(executors.POOL_START_SECONDS, method, 1e-12)
        with caplog.at_level(logging.DEBUG, logger="sdofreport.engine.executors"):
            build_site(folder / "sdofreport.toml", folder / "site", jobs=2,
                       cache_dir=folder / "cache")
    started = {m.group(2) for m in (re.match(r"starting \d+ (\w+) worker\(s\) for (.+)",
                                             r.getMessage()) for r in caplog.records)
               if m and m.group(1) == method}
    return _files(folder / "site"), started


@needs_fork
def test_spawned_workers_build_the_same_site_as_forked_ones(tmp_path, caplog):
    forked, fork_pools = _build(tmp_path, "fork", caplog)
    spawned, spawn_pools = _build(tmp_path, "spawn", caplog)
    every = {"reading records", "computing jobs", "drawing figures"}
    assert fork_pools == every and spawn_pools == every
    assert sorted(spawned) == sorted(forked)
    assert [path for path in forked if spawned[path] != forked[path]] == []


def test_start_method_is_fork_on_linux_unless_chosen(monkeypatch):
    monkeypatch.delenv(executors.START_METHOD_VARIABLE, raising=False)
    available = multiprocessing.get_all_start_methods()
    expected = "fork" if multiprocessing.sys.platform.startswith("linux") else available[0]
    assert executors.start_method() == expected
    monkeypatch.setenv(executors.START_METHOD_VARIABLE, "spawn")
    assert executors.start_method() == "spawn"
    assert executors.process_context().get_start_method() == "spawn"


def test_unknown_start_method_is_refused_by_name(monkeypatch):
    monkeypatch.setenv(executors.START_METHOD_VARIABLE, "threads")
    with pytest.raises(BuildError) as refused:
        executors.start_method()
    message = refused.value.message
    assert "SDOFREPORT_START_METHOD='threads'" in message and "spawn" in message


def _double_state(value: int) -> int:
    return 2 * executors.worker_state() + value


def test_spawned_workers_receive_the_pool_state(monkeypatch):
    monkeypatch.setenv(executors.START_METHOD_VARIABLE, "spawn")
    with executors.local_pool(2, state=20) as pool:
        assert list(pool.map(_double_state, [1, 2, 3])) == [41, 42, 43]
    with pytest.raises(RuntimeError):  # never set in the build process
        executors.worker_state()
