"""The one registry of check quantities (sdofreport.project.check_quantities).

Every layer that knows the check quantities must read them from the registry: these
tests compare each layer with it, and add a quantity in a fresh interpreter to show that
one entry is all a new quantity needs (the JSON Schema is compared with the registry in
tests/docs/test_schemas.py::test_schema_enums_follow_the_registries).

Sources of expected values: unit definitions (1 kN = 1000 N, SI brochure, BIPM 2019);
the demand of a check is the maximum of the per-record peaks when the statistic is
``max`` (closed form); the key suffixes are our own interface (results.schema.json).
"""

from __future__ import annotations

import dataclasses
import json
import subprocess
import sys
from pathlib import Path

import pytest

from sdofreport import engine
from sdofreport.errors import ProjectError
from sdofreport.project import load_project
from sdofreport.project.check_quantities import CHECK_QUANTITIES
from sdofreport.project.model import Limits
from sdofreport.project.quantities import DIMENSIONS
from sdofreport.project.schema import SECTIONS
from sdofreport.outputs.run_inputs import _si_name
from sdofreport.site.display import CHECK_LABELS, DISPLAY_UNITS, Display
from tests.conftest import ONE_SYSTEM, PROJECT_HEAD, TWO_RECORDS

ROOT = Path(__file__).resolve().parents[2]


def test_every_layer_lists_the_registry_quantities_in_its_order():
    keys = list(CHECK_QUANTITIES)
    # The key registry: one key per quantity, of the registry's type and dimension.
    section = SECTIONS["systems[].limits"]
    assert list(section) == keys
    for key, q in CHECK_QUANTITIES.items():
        assert (section[key].type, section[key].dimension) == (q.key_type, q.dimension)
        # A dimensional limit is a quantity with units; a dimensionless one is not.
        assert (q.key_type == "quantity") == (q.dimension is not None)
    # The model: one SI field per quantity (then the basis), named as results.json
    # writes the limit (the suffix follows the key's dimension).
    names = [f.name for f in dataclasses.fields(Limits)]
    assert names == [q.limit_name for q in CHECK_QUANTITIES.values()] + ["basis"]
    assert [_si_name("systems[].limits", key) for key in keys] == \
        [q.limit_name for q in CHECK_QUANTITIES.values()]
    # The engine reads each per-record peak from a field of ResponseResult.
    assert list(engine.CHECK_ATTRIBUTES) == keys
    fields = {f.name for f in dataclasses.fields(engine.ResponseResult)}
    assert {q.attribute for q in CHECK_QUANTITIES.values()} <= fields
    assert engine.SIGNED_QUANTITIES == ("residual_displacement",)
    # The pages: a label per quantity and a display unit for every dimension.
    assert list(CHECK_LABELS) == keys
    for q in CHECK_QUANTITIES.values():
        for system in DISPLAY_UNITS:
            assert q.dimension is None or q.dimension in DISPLAY_UNITS[system]


@pytest.mark.parametrize("key", list(CHECK_QUANTITIES))
def test_si_unit_is_the_dimensions_si_unit(key):
    q = CHECK_QUANTITIES[key]
    # results.json writes m/s² as "m/s2" (ASCII); a ratio's unit is "-".
    expected = "-" if q.dimension is None else DIMENSIONS[q.dimension][1].replace("²", "2")
    assert q.si_unit == expected


def test_limits_of_quantity_keys_and_in_registry_order():
    limits = Limits.of({"residual_displacement": 0.01, "displacement": 0.05})
    assert limits.displacement_m == 0.05 and limits.residual_displacement_m == 0.01
    assert limits.items() == [("displacement", 0.05), ("residual_displacement", 0.01)]
    assert Limits().items() == []


def test_each_quantity_is_shown_in_its_display_unit():
    shown = Display("SI")
    # Definitions: 1 m = 1000 mm, 1 kN = 1000 N; ratios are shown as numbers.
    assert shown.check_value("displacement", 0.0123) == "12.30 mm"
    assert shown.check_value("base_shear", 450e3) == "450.0 kN"
    assert shown.check_value("drift_ratio", 0.015) == "0.01500"


_ADDED = '''
import json, sys
from types import SimpleNamespace

import numpy as np

import importlib.util

# The registry module run on its own and given one more entry, standing in for the
# edited file before any layer imports it (importing it through the package would load
# the project loader, and with it the schema, first).
name = "sdofreport.project.check_quantities"
spec = importlib.util.spec_from_file_location(name, sys.argv[3])
registry = sys.modules[name] = importlib.util.module_from_spec(spec)
spec.loader.exec_module(registry)
registry.CHECK_QUANTITIES = {**registry.CHECK_QUANTITIES,
    "restoring_force": registry.CheckQuantity(
        "restoring_force", "peak_force_n", "force", "N", "Peak restoring force", False,
        "quantity", "Peak restoring force limit.", '"300 kN"')}

from sdofreport import engine
from sdofreport.project import load_project
from sdofreport.outputs.results_json import checks_csv
from sdofreport.site.display import CHECK_LABELS, Display

sys.path.insert(0, sys.argv[2])
from gen_reference import render_reference

project = load_project(sys.argv[1])
system = project.systems[0]
records = project.records_for(system)
responses = {(system.id, r.id): engine.ResponseResult(
    system.id, r.id, 0.01, 0.1, 1.0, None, None, np.zeros(0), np.zeros(0), np.zeros(0),
    peak_force_n=force) for r, force in zip(records, (250e3, 350e3))}
checks = engine.results._checks(project, responses, "max")
print(json.dumps({
    "limits": system.limits.items(), "field": system.limits.restoring_force_n,
    "checks": [[c.quantity, c.demand, c.ratio, c.verdict] for c in checks],
    "csv": checks_csv(SimpleNamespace(checks=checks)).splitlines()[1].split(",")[:3],
    "label": CHECK_LABELS["restoring_force"],
    "shown": Display("SI").check_value("restoring_force", checks[0].demand),
    "documented": "| `restoring_force` |" in render_reference(),
}))
'''


def test_adding_a_quantity_needs_only_its_registry_entry(project_factory):
    text = PROJECT_HEAD + TWO_RECORDS + ONE_SYSTEM.replace(
        'displacement = "50 mm"', 'restoring_force = "400 kN"')
    path = project_factory(text)
    # Without the entry the key is unknown to the loader.
    with pytest.raises(ProjectError, match="restoring_force"):
        load_project(path)
    registry = ROOT / "sdofreport" / "project" / "check_quantities.py"
    run = subprocess.run([sys.executable, "-c", _ADDED, str(path), str(ROOT / "tools"),
                          str(registry)], capture_output=True, text=True, check=False)
    assert run.returncode == 0, run.stderr
    found = json.loads(run.stdout)
    # Definition: 1 kN = 1000 N.
    assert found["limits"] == [["restoring_force", 400e3]]
    assert found["field"] == 400e3
    # Closed form: the max of the per-record peaks 250 kN and 350 kN; 350/400 = 0.875.
    assert found["checks"] == [["restoring_force", 350e3, 0.875, engine.VERDICT_WITHIN]]
    assert found["csv"] == ["s1", "restoring_force", "N"]
    assert found["label"] == "Peak restoring force"
    assert found["shown"] == "350.0 kN"
    assert found["documented"] is True


@pytest.mark.parametrize("module, forbidden", [
    # results.json is written below the site: it reads the registry, not site.display.
    ("sdofreport.outputs.results_json", ("sdofreport.site", "sdofreport.archive")),
    # The core and the records (with the number rule) read nothing above them.
    ("sdofreport.core.builders", ("sdofreport.project", "sdofreport.site",
                                  "sdofreport.records")),
    ("sdofreport.records", ("sdofreport.project", "sdofreport.site")),
])
def test_lower_layers_import_nothing_above_them(module, forbidden):
    # Dependencies point one way (DEVELOPERS.md, "Layout"); checked in a fresh interpreter.
    code = (f"import sys, {module}; print('\\n'.join(m for m in sys.modules "
            f"if m.startswith({forbidden!r})))")
    run = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=False)
    assert run.returncode == 0, run.stderr
    assert run.stdout.split() == []
