"""``directions = 2`` through the project file, the engine, results.json and the page."""

from __future__ import annotations

import numpy as np
import pytest

from sdofreport.core.units import G
from sdofreport.engine import run_project
from sdofreport.errors import ProjectError
from sdofreport.project import load_project
from sdofreport.records.writers import write_two_column
from sdofreport.outputs.results_json import results_document
from tests.conftest import PROJECT_HEAD, synthetic_acceleration

PAIR = """\
[[records]]
id = "a1"
file = "records/r1.csv"
pair = "p"
component = "H1"

[[records]]
id = "a2"
file = "records/r3.csv"
pair = "p"
component = "H2"
"""

TWO_D = """\
[[systems]]
id = "tank"
name = "Round tank"
damping = 0.05
mass = "100 t"
period = "0.5 s"
directions = 2

[[systems]]
id = "flat"
name = "Same, one direction"
damping = 0.05
mass = "100 t"
period = "0.5 s"

[[systems]]
id = "fps"
name = "Isolated platform"
kind = "sliding-pendulum"
damping = 0.0
weight = "800 kN"
radius = "2.2 m"
friction = 0.05
directions = 2
"""


@pytest.fixture
def paired(project_factory, tmp_path):
    write_two_column(tmp_path / "records" / "r3.csv", 0.01,
                     synthetic_acceleration(13) / G, units="g")
    return project_factory


def test_two_direction_systems_through_the_engine(paired):
    from sdofreport.core.rotd import rotated_peaks

    project = load_project(paired(PROJECT_HEAD + PAIR + TWO_D))
    assert [s.directions for s in project.systems] == [2, 1, 2]
    results = run_project(project, jobs=1, use_cache=False)
    tank1, tank2 = results.response("tank", "a1"), results.response("tank", "a2")
    flat1, flat2 = results.response("flat", "a1"), results.response("flat", "a2")
    # Both records of the pair carry the same resultant peak; the per-direction peaks
    # are the one-direction runs' peaks (same oscillator, same records).
    assert tank1.peak_displacement_m == tank2.peak_displacement_m
    np.testing.assert_allclose(tank1.peak_displacement_per_direction_m,
                               [flat1.peak_displacement_m, flat2.peak_displacement_m],
                               rtol=1e-9)
    # Resultant = RotD100 at T (Boore 2010 definition, 1° angles, via rotated_peaks of
    # the one-direction histories).
    rot = rotated_peaks(flat1.displacement_m, flat2.displacement_m,
                        np.arange(0.0, 180.0, 1.0))
    # (0.5 %: ours includes the resultant between samples; the histories are sampled at
    # 0.01 s, common practice (no source) for the size of that difference at T = 0.5 s.)
    assert np.max(rot) <= tank1.peak_displacement_m <= np.max(rot) / np.cos(
        np.radians(0.5)) * (1 + 5e-3)
    doc = results_document(results)
    tank = next(s for s in doc["systems"] if s["id"] == "tank")
    assert tank["directions"] == 2
    assert tank["responses"][0]["directions"] == 2
    assert len(tank["responses"][0]["peak_displacement_per_direction_m"]) == 2
    fps = next(s for s in doc["systems"] if s["id"] == "fps")
    assert fps["responses"][0]["convergence"]["converged"]
    assert "directions" not in doc["systems"][1]["responses"][0]


def test_two_directions_need_pairs_exit_2(project_factory):
    from tests.conftest import TWO_RECORDS
    with pytest.raises(ProjectError) as info:
        load_project(project_factory(PROJECT_HEAD + TWO_RECORDS + TWO_D))
    text = str(info.value)
    assert "systems tank, fps" in text and "unpaired: r1, r2" in text
    assert info.value.exit_code == 2


def _refused(paired, body: str, *fragments: str) -> None:
    """Loading PROJECT_HEAD + body is refused (exit 2) with every fragment named."""
    with pytest.raises(ProjectError) as info:
        load_project(paired(PROJECT_HEAD + body))
    assert info.value.exit_code == 2
    assert all(fragment in str(info.value) for fragment in fragments), str(info.value)


@pytest.mark.parametrize("extra, fragment", [
    ('directions = 3', "expected 1 or 2, found 3"),
])
def test_bad_directions_name_the_key(paired, extra, fragment):
    body = TWO_D.split("[[systems]]\nid = \"flat\"")[0].replace(
        "directions = 2", extra if extra.startswith("directions") else
        "directions = 2\n" + extra, 1)
    _refused(paired, PAIR + body, "systems[tank].directions", fragment)


BOUNDED = """\
[[systems]]
id = "fps"
name = "Isolated platform"
kind = "sliding-pendulum"
damping = 0.0
weight = "800 kN"
radius = "2.2 m"
friction = 0.08
friction_slow = 0.05
friction_rate = "25 s/m"
property_factors = [0.6, 1.5]
directions = 2
[systems.limits]
bearing_displacement = "400 mm"
"""


def test_bounds_order_govern_and_effective_properties(paired):
    from sdofreport.core.isolation import pendulum_effective_properties

    results = run_project(load_project(paired(PROJECT_HEAD + PAIR + BOUNDED)), jobs=1,
                          use_cache=False)
    ids = ("a1", "a2")

    def mean(run):
        return np.mean([results.response("fps", r).peak_displacement_m if run == "nominal"
                        else results.bounds[("fps", r)][run].peak_displacement_m
                        for r in ids])
    # Lower friction, larger displacement (ASCE/SEI 7-16 §17.2.8.4, from memory: the
    # lower bound governs the displacement, the upper bound the forces).
    assert mean("lower") > mean("nominal") > mean("upper")
    check = next(c for c in results.checks if c.system_id == "fps")
    assert check.governing_run == "lower"
    assert check.demand == pytest.approx(mean("lower"), rel=1e-12)
    # Effective properties at the run's mean displacement: the published formulas
    # (sdofreport.core.isolation, checked by hand in tests/core/test_isolation.py).
    effective = results.effective["fps"]
    expected = pendulum_effective_properties(800e3, 2.2, 0.08 * 1.5, mean("upper"))
    assert effective["upper"] == expected
    doc = results_document(results)
    fps = doc["systems"][0]
    assert fps["property_factors"] == [0.6, 1.5]
    assert set(fps["effective_properties"]) == {"nominal", "lower", "upper"}
    assert set(fps["responses"][0]["bounds"]) == {"lower", "upper"}
    assert fps["checks"][0]["governing_run"] == "lower"


@pytest.mark.parametrize("extra, fragment", [
    ("property_factors = [1.2, 1.5]", "0 < lower <= 1 <= upper"),
    ("friction_slow = 0.03", "needs both friction_slow and friction_rate"),
    ('friction_slow = 0.09\nfriction_rate = "20 s/m"', "expected at most friction"),
])
def test_bad_isolator_keys_name_the_key(paired, extra, fragment):
    body = BOUNDED.replace("friction_slow = 0.05\nfriction_rate = \"25 s/m\"\n"
                           "property_factors = [0.6, 1.5]\n", extra + "\n")
    _refused(paired, PAIR + body, "systems[fps]", fragment)


VERTICAL = """\
[[records]]
id = "v1"
file = "records/r3.csv"
component = "V"

[[systems]]
id = "chiller"
name = "Chiller on springs"
direction = "vertical"
damping = 0.03
mass = "4 t"
period = "0.2 s"
[systems.limits]
displacement = "10 mm"

[[systems]]
id = "flat"
name = "Horizontal system"
damping = 0.05
mass = "100 t"
period = "0.5 s"
[systems.limits]
displacement = "100 mm"
"""


def test_vertical_systems_see_vertical_records_only(paired):
    from sdofreport.core.spectra import response_spectrum

    project = load_project(paired(PROJECT_HEAD + PAIR + VERTICAL))
    chiller, flat = project.systems
    assert [r.id for r in project.records_for(chiller)] == ["v1"]
    assert [r.id for r in project.records_for(flat)] == ["a1", "a2"]
    assert project.motions_counted == 1  # the pair; a vertical record is no motion
    results = run_project(project, jobs=1, use_cache=False)
    check = next(c for c in results.checks if c.system_id == "chiller")
    # The vertical system's demand is its spectral displacement under v1 alone (linear
    # SDOF, the record's own spectrum).
    acc = synthetic_acceleration(13)
    sd = response_spectrum(acc, 0.01, np.array([0.2]), np.array([0.03])).sd_m[0, 0]
    assert check.demand == pytest.approx(sd, rel=1e-6)
    doc = results_document(results)
    chiller_doc = next(s for s in doc["systems"] if s["id"] == "chiller")
    assert [r["record"] for r in chiller_doc["responses"]] == ["v1"]


@pytest.mark.parametrize("text, fragment", [
    (PAIR.replace('component = "H2"', 'component = "V"'), "a vertical record "),
    (PAIR + VERTICAL.split("[[systems]]")[0] + TWO_D.replace(
        'period = "0.5 s"\ndirections = 2', 'period = "0.5 s"\ndirections = 2\n'
        'direction = "vertical"', 1), "applies to horizontal systems"),
    (PAIR + "[[systems]]" + VERTICAL.split("[[systems]]")[1], "the suite has none"),
])
def test_bad_vertical_inputs_exit_2(paired, text, fragment):
    _refused(paired, text + ("" if "[[systems]]" in text else TWO_D), fragment)


def test_fragility_stripes_of_vertical_and_friction_systems(paired):
    # The stripes of a vertical system use the vertical records only, and a pendulum
    # with velocity-dependent friction runs through the biaxial kernel in one direction
    # (counts per level = the system's own records; Baker 2015 stripes).
    fps = BOUNDED.replace("directions = 2\n", "").replace(
        "property_factors = [0.6, 1.5]\n", "")
    text = (PROJECT_HEAD + '[fragility]\nlevels = [0.1, 2.0]\nsystems = ["chiller", '
            '"fps"]\n' + PAIR + VERTICAL + fps)
    results = run_project(load_project(paired(text)), jobs=1, use_cache=False)
    found = {f.system_id: f for f in results.fragility}
    assert list(found["chiller"].fit.motions) == [1, 1]
    assert list(found["fps"].fit.motions) == [2, 2]


EVERY_KIND = """\
[[systems]]
id = "frame"
name = "Takeda frame with a damper"
damping = 0.05
mass = "100 t"
period = "0.5 s"
yield_strength = "300 kN"
hysteresis = "takeda"
directions = 2
[systems.damper]
coefficient = "400 kN*(s/m)^0.5"
exponent = 0.5
[systems.limits]
displacement = "40 mm"

[[systems]]
id = "lamp"
name = "Hanging lamp"
kind = "hanging"
damping = 0.02
mass = "200 kg"
pivot_inertia = "300 kg*m^2"
pivot_to_centre = "1.1 m"
directions = 2
"""


def test_every_kind_runs_in_two_directions_and_its_stripes_use_pairs(paired):
    # Issue 18: bouc-wen, clough, takeda, flag-shaped, dampers and hanging items run in
    # two directions. The stripes of a two-direction system run each pair once (Baker
    # 2015 counts: one motion per pair) with the resultant as the demand: the counts
    # equal those of direct two-direction runs of the pair scaled by the stripe's factor.
    from sdofreport.engine.jobs import biaxial_job, pair_stripe_job

    text = (PROJECT_HEAD + '[fragility]\nlevels = [0.2, 3.0]\nsystems = ["frame"]\n' +
            PAIR + EVERY_KIND)
    project = load_project(paired(text))
    assert [s.directions for s in project.systems] == [2, 2]
    results = run_project(project, jobs=1, use_cache=False)
    frame = results.response("frame", "a1")
    assert frame.directions == 2 and frame.peak_damper_force_n > 0
    assert frame.energy.imbalance < 1e-6  # Uang & Bertero (1990) balance
    assert results.response("lamp", "a2").directions == 2
    fragility = next(f for f in results.fragility if f.system_id == "frame")
    assert list(fragility.fit.motions) == [1, 1]
    from sdofreport.engine import system_model
    model = {**system_model(project.systems[0]), "system_id": "frame",
             "stiffness_n_m": project.systems[0].stiffness_n_m}
    scaled = {r.spec.id: r.record.acceleration_m_s2 for r in results.records}
    for level, count in zip((0.2, 3.0), fragility.fit.exceeding):
        out = pair_stripe_job(((scaled["a1"], scaled["a2"]),), (0.01,), model,
                              project.analysis.method, "sa", level * G)
        factor = out["factors"][0]
        direct = biaxial_job(scaled["a1"] * factor, scaled["a2"] * factor, 0.01, [model],
                             project.analysis.method)[0]["biaxial"]
        assert count == int(direct.peak_displacement_m > 0.040)
