"""Multiple-stripe fragility in the engine: stripes, counts and the unstable rule.

Method: J. W. Baker (2015), Earthquake Spectra 31(1), doi:10.1193/021113EQS025M.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from sdofreport.core import fragility as fr
from sdofreport.core.units import G
from sdofreport.engine import ResponseResult, run_exceeds, run_project, system_model
from sdofreport.engine.jobs import stripe_job
from sdofreport.project import load_project
from tests.conftest import ONE_SYSTEM, PROJECT_HEAD, TWO_RECORDS

FRAGILITY = """
[fragility]
levels = [0.2, 0.4, 0.6, 1.0, 1.5]
systems = ["s1", "stiff"]

[[systems]]
id = "stiff"
name = "Never reaches its limit"
damping = 0.05
mass = "10 t"
period = "0.2 s"
[systems.limits]
displacement = "1 m"
"""


@pytest.fixture(scope="module")
def stripes(tmp_path_factory):
    from tests.conftest import write_test_records

    root = tmp_path_factory.mktemp("stripes")
    write_test_records(root)
    path = root / "sdofreport.toml"
    # P-Δ off: the closed forms below are those of the plain linear oscillator.
    linear = ONE_SYSTEM.replace('height = "4 m"\n', 'height = "4 m"\np_delta = false\n')
    path.write_text(PROJECT_HEAD + "\n" + TWO_RECORDS + "\n" + linear + FRAGILITY,
                    encoding="utf-8")
    project = load_project(path)
    return project, run_project(project, jobs=1, cache_dir=root / "cache")


def test_linear_runs_sit_at_level_over_omega_squared(stripes):
    project, results = stripes
    system = project.systems[0]
    records = [r.record for r in results.records]
    model = system_model(system)
    out = stripe_job(tuple(r.acceleration_m_s2 for r in records),
                     tuple(r.dt_s for r in records), model, "exact", "sa", 0.6 * G)
    omega = 2 * math.pi / system.period_s
    # Definition: PSA = ω²·SD, so a linear system run on a record scaled to PSA = x at
    # its own period and damping has peak displacement x / ω² (REFERENCES, spectra).
    for run in out["runs"]:
        assert run["peak_displacement_m"] == pytest.approx(0.6 * G / omega ** 2, rel=1e-9)
    assert np.all(out["factors"] * out["intensity_m_s2"] == pytest.approx(0.6 * G))


def test_linear_limit_is_a_step_and_unreached_limit_gives_no_number(stripes):
    project, results = stripes
    by_system = {f.system_id: f for f in results.fragility}
    system = project.systems[0]
    # Definition (above): every record exceeds 50 mm exactly when x > 0.05 ω² / g, here
    # 0.805 g: zero of two runs up to 0.6 g, both from 1.0 g on, nothing in between.
    threshold = 0.05 * (2 * math.pi / system.period_s) ** 2 / G
    s1 = by_system["s1"].fit
    assert s1.exceeding == tuple(2 * (x > threshold) for x in s1.levels)
    assert s1.status == fr.NO_SPREAD and s1.median == pytest.approx(math.sqrt(0.6 * 1.0))
    stiff = by_system["stiff"]
    # Definition: a 1 m limit at T = 0.2 s needs Sa > 1 m × ω²/g ≈ 100 g: never reached.
    assert stiff.fit.status == "not reached within the levels"
    assert stiff.fit.median is None and stiff.design_probability is None


def test_unstable_or_non_finite_runs_exceed_every_limit():
    def response(peak, **extra):
        empty = np.zeros(0)
        return ResponseResult("s", "r", peak, 0.0, 0.0, None, None, empty, empty, empty,
                              **extra)

    # Rule of the issue: a run that becomes unstable counts as exceeding every limit.
    assert run_exceeds(response(math.nan), "displacement", 1.0)
    assert run_exceeds(response(math.inf), "displacement", 1.0)
    assert run_exceeds(response(0.01, unstable=True), "displacement", 1.0)
    assert not run_exceeds(response(0.01), "displacement", 1.0)


RUNAWAY = PROJECT_HEAD + "\n" + TWO_RECORDS + """
[fragility]
levels = [0.05, 6.0]

[[systems]]
id = "lean"
name = "Yielding column with P-delta"
mass = "60 t"
period = "1.6 s"
height = "3 m"
damping = 0.05
yield_strength = "60 kN"
post_yield_ratio = 0.0
p_delta = true
gravity_load = "280 kN"
[systems.limits]
ductility = 1000.0
"""


def test_runs_that_become_unstable_count_as_exceeding(project_factory, tmp_path):
    project = load_project(project_factory(RUNAWAY))
    results = run_project(project, jobs=1, cache_dir=tmp_path / "cache")
    (fragility,) = results.fragility
    system = project.systems[0]
    records = [r.record for r in results.records]
    model = {**system_model(system), "system_id": system.id}
    flags = []
    for level in fragility.fit.levels:
        out = stripe_job(tuple(r.acceleration_m_s2 for r in records),
                         tuple(r.dt_s for r in records), model, "exact", "sa", level * G)
        flags.append(sum(bool(run["response"].unstable) for run in out["runs"]))
    # Closed form: at 0.05 g the elastic SD = 0.05 g / ω² ≈ 3 cm stays below the yield
    # displacement, so nothing can run away; at 6 g, with zero post-yield stiffness
    # less W/h (negative), both runs pass the 3 m bound. A ductility of 1000 (3 m is
    # about 40 yield displacements) is never reached by a stable run: each exceedance
    # counted is an unstable run (rule of issue 20).
    assert flags[0] == 0 and flags[-1] > 0
    assert list(fragility.fit.exceeding) == flags
