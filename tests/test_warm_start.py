"""Cold builds with local workers read the records in a worker process while the build
process loads the compiled kernels (sdofreport.engine.warmup._records_while_warming).

Sources of expected values: the records, errors and results of the same project read and
computed in one process (sdofreport.engine.load_records, run_project with jobs=1, the
path every other test checks against closed forms and scipy); numba's own record of the
machine-code specializations each kernel has loaded (``Dispatcher.signatures``).
"""

from __future__ import annotations

import json
import subprocess
import sys

import numpy as np
import pytest

from sdofreport import engine
from sdofreport.engine.cache import ResultCache
from sdofreport.errors import RecordError
from sdofreport.project import load_project
from tests.conftest import EXAMPLE

def test_records_read_while_warming_equal_records_read_here(project_factory,
                                                            valid_project_text, tmp_path):
    project = load_project(project_factory(valid_project_text))
    here = engine.load_records(project, ResultCache(None))
    forked = engine.warmup._records_while_warming(project, ResultCache(tmp_path / "cache"))
    assert [r.id for r in forked] == [r.id for r in here]
    for a, b in zip(forked, here):
        np.testing.assert_array_equal(a.acceleration_m_s2, b.acceleration_m_s2)
        assert (a.dt_s, a.sha256, a.units, a.history, a.warnings) == \
            (b.dt_s, b.sha256, b.units, b.history, b.warnings)
        assert not a.acceleration_m_s2.flags.writeable  # as Record makes them


def test_record_error_in_the_reader_is_reported_as_here(project_factory,
                                                        valid_project_text, tmp_path):
    path = project_factory(valid_project_text)
    (path.parent / "records" / "r1.csv").write_text("0.0, 0.1\n0.01, not-a-number\n")
    project = load_project(path)
    with pytest.raises(RecordError) as here:
        engine.load_records(project, ResultCache(None))
    with pytest.raises(RecordError) as forked:
        engine.warmup._records_while_warming(project, ResultCache(tmp_path / "cache"))
    assert forked.value.message == here.value.message


def test_only_a_build_that_computes_counts_as_cold(project_factory, valid_project_text,
                                                   tmp_path):
    project = load_project(project_factory(valid_project_text))
    cache = ResultCache(tmp_path / "cache")
    assert engine.warmup._probably_cold(project, cache)
    assert engine.warmup._probably_cold(project, ResultCache(None))
    engine.run_project(project, jobs=1, cache_dir=tmp_path / "cache")
    assert not engine.warmup._probably_cold(project, cache)


def test_cold_two_worker_build_matches_one_process(project_factory, valid_project_text,
                                                   tmp_path):
    project = load_project(project_factory(valid_project_text))
    two = engine.run_project(project, jobs=2, cache_dir=tmp_path / "cache")
    one = engine.run_project(project, jobs=1, use_cache=False)
    assert two.cache_misses == one.cache_misses
    for key, response in one.responses.items():
        np.testing.assert_array_equal(two.responses[key].displacement_m,
                                      response.displacement_m)
    for a, b in zip(two.records, one.records):
        np.testing.assert_array_equal(a.spectrum.psa_m_s2, b.spectrum.psa_m_s2)


_PROBE = """
import json, sys
from sdofreport.runtime import configure
configure()  # first, as the command line does: numba's cache at the per-user folder
import numba
from sdofreport.core._jit import _Kernel
from sdofreport import engine
from sdofreport.engine.cache import ResultCache
from sdofreport.engine.jobs import run_job
from sdofreport.project import load_project
import importlib, pkgutil
import sdofreport.core

# Every module of sdofreport.core, so kernels in modules added later are seen too.
MODULES = [importlib.import_module(f"sdofreport.core.{info.name}")
           for info in pkgutil.iter_modules(sdofreport.core.__path__)]

def loaded():
    return {f"{module.__name__}.{name}": sorted(map(str, value.signatures))
            for module in MODULES for name, value in vars(module).items()
            if isinstance(value, numba.core.registry.CPUDispatcher)
            or isinstance(value, _Kernel) and value.dispatcher is not None}

project = load_project(sys.argv[1])
engine.warm_kernels(project)
after_warm_up = loaded()
for record in engine.load_records(project, ResultCache(None)):
    run_job("record", engine.plan._record_args(record, project.analysis))
print(json.dumps({"warm": after_warm_up, "real": loaded()}))
"""


def test_warm_up_loads_the_kernels_the_record_jobs_use():
    result = subprocess.run([sys.executable, "-c", _PROBE,
                             str(EXAMPLE / "sdofreport.toml")],
                            capture_output=True, text=True, check=True)
    seen = json.loads(result.stdout.strip().splitlines()[-1])
    assert any(seen["warm"].values()), "the warm-up loaded no kernel"
    # The record jobs on real (read-only) records then need no specialization the
    # warm-up did not already load: the forked workers inherit them all.
    assert seen["real"] == seen["warm"]


_PROBE_LATER = _PROBE.split("project = load_project")[0] + """
project = load_project(sys.argv[1])
engine.warm_later_kernels(project)
later = loaded()
engine.warm_kernels(project)
both = loaded()
engine.run_project(project, jobs=1, use_cache=False)
print(json.dumps({"later": later, "both": both, "real": loaded()}))
"""


def test_the_two_warm_ups_load_every_kernel_the_build_uses_and_split_the_work():
    result = subprocess.run([sys.executable, "-c", _PROBE_LATER,
                             str(EXAMPLE / "sdofreport.toml")],
                            capture_output=True, text=True, check=True)
    seen = json.loads(result.stdout.strip().splitlines()[-1])
    # A whole build of the example (nonlinear systems, pairs, inelastic spectra) needs
    # no specialization beyond those the two warm-ups loaded (numba's own list).
    assert seen["real"] == seen["both"]
    # The later kernels' warm-up leaves the linear path alone, so no compilation is
    # done twice when the two warm-ups run side by side ...
    for kernel in ("spectra._recurrence_peaks", "spectra._recurrence_samples",
                   "exact._exact_coefficients_into"):
        assert seen["later"][f"sdofreport.core.{kernel}"] == [], kernel
    # ... and it loads the nonlinear kernels the example uses.
    for kernel in ("hysteresis.integrate_model", "inelastic_spectra._ductility_period"):
        assert seen["later"][f"sdofreport.core.{kernel}"], kernel


def test_later_warm_up_shares_cover_every_step_once_and_shorten_the_longer():
    """later_shares: every step in exactly one share, in order, and the longer of the
    two compile times is the shortest any split gives, never longer than with every step
    in the reader (our own scheduling rule; the costs are the measured constants in
    sdofreport.engine; the splits are enumerated here by itertools)."""
    from itertools import combinations

    from sdofreport.engine.warmup import _COMPILE_COST_S, later_shares

    def longer(reader, builder):
        return max(sum(_COMPILE_COST_S[n] for n in reader),
                   _COMPILE_COST_S["linear"] + sum(_COMPILE_COST_S[n] for n in builder))

    names = ["inelastic", "responses", "biaxial"]
    for size in range(len(names) + 1):
        for chosen in combinations(names, size):
            reader, builder = later_shares(list(chosen))
            assert sorted(reader + builder) == sorted(chosen)
            assert [n for n in chosen if n in reader] == reader
            assert [n for n in chosen if n in builder] == builder
            every = [longer([n for n in chosen if n not in moved], moved)
                     for k in range(len(chosen)) for moved in map(list,
                                                                 combinations(chosen, k))]
            assert longer(reader, builder) == min(every or [longer([], [])])
            assert longer(reader, builder) <= longer(list(chosen), [])
