"""The shipped JSON Schemas: valid, in step with the registries, and matching every
results.json and manifest.json this module builds (example, starter, small project, and a
project with pairs, suite scaling, inelastic spectra and nonlinear systems).

Sources of expected values: JSON Schema draft 2020-12 validation by an independent
reference library (jsonschema); the schema tags are our own interface.
"""

from __future__ import annotations

import copy
import json
import textwrap

import jsonschema
import pytest

from sdofreport.core.design_spectra import DESIGN_SPECTRUM_KINDS
from sdofreport.core.spectra import SPECTRUM_METHODS
from sdofreport.project.check_quantities import results_schema_rules
from sdofreport.project.schema import SCALING_RULES, STATISTICS, SYSTEM_KINDS
from sdofreport.outputs.results_json import RESULTS_SCHEMA
from sdofreport.schemas import SCHEMA_NAMES, load_schema, schema_text
from sdofreport.site.render import MANIFEST_SCHEMA
from tests.conftest import ONE_SYSTEM, PROJECT_HEAD, write_test_records

from .conftest import invoke, read_site

RICH = PROJECT_HEAD + """
[design_spectrum]
kind = "asce7-16"
sds = 1.0
sd1 = 0.6
tl = "8 s"

[scaling]
rule = "asce7-16"
period = "0.5 s"

[fragility]
levels = [0.05, 0.5, 5.0]
systems = ["pier", "s1"]

[inelastic_spectra]
ductility = [2]
strength_reduction = [2]
periods = { min = 0.2, max = 1.0, count = 3 }

[[records]]
id = "r1"
file = "records/r1.csv"
pair = "p"
component = "H1"

[[records]]
id = "r1b"
file = "records/r1.csv"
pair = "p"
component = "H2"

[[records]]
id = "r2"
file = "records/r2.txt"

""" + ONE_SYSTEM + """
[[systems]]
id = "pier"
name = "Yielding pier"
mass = "60 t"
period = "0.8 s"
height = "6 m"
damping = 0.05
yield_strength = "150 kN"
post_yield_ratio = 0.03
[systems.limits]
ductility = 4.0
residual_displacement = "20 mm"

[[systems]]
id = "iso"
name = "Isolated platform"
kind = "sliding-pendulum"
weight = "500 kN"
radius = "2.0 m"
friction = 0.05
damping = 0.0
[systems.limits]
bearing_displacement = "300 mm"
total_accel = "0.4 g"
"""


def _validator(name: str) -> jsonschema.Draft202012Validator:
    return jsonschema.Draft202012Validator(load_schema(name))


def _errors(name: str, document: dict) -> list[str]:
    return [f"{'/'.join(map(str, e.absolute_path))}: {e.message}"
            for e in _validator(name).iter_errors(document)]


def _build(group, project, out):
    result = invoke(group, "build", project, "-o", out, "--quiet", "--cache-dir",
                    out.parent / "cache")
    assert result.exit_code == 0, result.output
    return read_site(out)


@pytest.fixture(scope="module")
def example_site(built_example):
    return read_site(built_example.site)


@pytest.fixture(scope="module")
def small_site(tmp_path_factory, command_group):
    root = tmp_path_factory.mktemp("small")
    write_test_records(root)
    (root / "sdofreport.toml").write_text(
        PROJECT_HEAD + "\n" + textwrap.dedent("""\
            [[records]]
            id = "r1"
            file = "records/r1.csv"

            [[records]]
            id = "r2"
            file = "records/r2.txt"
            """) + "\n" + ONE_SYSTEM, encoding="utf-8")
    return _build(command_group, root / "sdofreport.toml", root / "site")


@pytest.fixture(scope="module")
def rich_site(tmp_path_factory, command_group):
    root = tmp_path_factory.mktemp("rich")
    write_test_records(root)
    (root / "sdofreport.toml").write_text(RICH, encoding="utf-8")
    return _build(command_group, root / "sdofreport.toml", root / "site")


# ------------------------------------------------------------------ the schemas
@pytest.mark.parametrize("name", SCHEMA_NAMES)
def test_schema_is_valid_draft_2020_12(name):
    schema = load_schema(name)
    assert schema["$schema"] == "https://json-schema.org/draft/2020-12/schema"
    jsonschema.Draft202012Validator.check_schema(schema)


def test_schema_tags_match_the_writers():
    from sdofreport.archive.compare import COMPARISON_SCHEMA

    assert load_schema("results")["properties"]["schema"]["const"] == RESULTS_SCHEMA
    assert load_schema("manifest")["properties"]["schema"]["const"] == MANIFEST_SCHEMA
    assert load_schema("comparison")["properties"]["schema"]["const"] == COMPARISON_SCHEMA


def test_schema_command_without_a_name_lists_every_published_schema(command_group):
    result = invoke(command_group, "schema")
    assert result.exit_code == 0, result.output
    assert [line.split(":")[0] for line in result.output.splitlines()] == \
        ["results", "manifest", "comparison"]


def test_schema_enums_follow_the_registries():
    defs = load_schema("results")["$defs"]
    props = load_schema("results")["properties"]
    analysis = defs["settings"]["properties"]["analysis"]["properties"]
    assert analysis["method"]["enum"] == list(SPECTRUM_METHODS)
    assert analysis["statistic"]["enum"] == list(STATISTICS)
    assert defs["system"]["properties"]["kind"]["enum"] == list(SYSTEM_KINDS)
    assert props["scaling"]["properties"]["rule"]["enum"] == list(SCALING_RULES)
    assert props["design_spectrum"]["properties"]["kind"]["enum"] == list(
        DESIGN_SPECTRUM_KINDS)
    # The check quantities: the schema's enums and unit rules are the registry's
    # (sdofreport.project.check_quantities), so a quantity added there fails here until
    # results.schema.json describes it.
    check, rules = defs["check"], results_schema_rules()
    assert check["properties"]["quantity"]["enum"] == rules["quantity_enum"]
    assert check["properties"]["unit"]["enum"] == rules["unit_enum"]
    assert check["allOf"] == rules["allOf"]


def test_settings_definition_is_shared():
    # The same settings object is written into both documents (results_json.py and
    # render.py), so both schemas must describe it identically.
    assert load_schema("results")["$defs"]["settings"] == \
        load_schema("manifest")["$defs"]["settings"]


# ------------------------------------------------------- documents built here
def test_example_site_validates(example_site):
    results, manifest = example_site
    assert _errors("results", results) == []
    assert _errors("manifest", manifest) == []


def test_starter_site_validates(starter_site):
    _, site = starter_site
    results, manifest = read_site(site)
    assert _errors("results", results) == []
    assert _errors("manifest", manifest) == []


def test_small_project_validates(small_site):
    results, manifest = small_site
    assert _errors("results", results) == []
    assert _errors("manifest", manifest) == []


def test_rich_project_validates_and_covers_optional_blocks(rich_site):
    results, manifest = rich_site
    assert _errors("results", results) == []
    assert _errors("manifest", manifest) == []
    # The optional blocks really were present, so the schema was exercised on them.
    assert {"design_spectrum", "scaling", "pairs", "inelastic_spectra"} <= set(results)
    assert "fragility" in _system(results, "pier")["checks"][0]
    models = {s["id"]: s["model"] for s in results["systems"]}
    assert models == {"s1": "linear", "pier": "bilinear", "iso": "sliding-pendulum"}
    assert results["scaling"]["rule"] == "asce7-16" and results["scaling"]["criteria"]
    # Definition: docs/project-file.md gives 8 as the default steps_per_period.
    assert results["inelastic_spectra"]["steps_per_period"] == 8.0


# ------------------------------------------------- the schemas reject bad documents
def _system(doc, system_id):
    return next(s for s in doc["systems"] if s["id"] == system_id)


RESULTS_MUTATIONS = {
    "wrong tag": lambda d: d.update(schema="sdofreport/results@2"),
    "no systems": lambda d: d.pop("systems"),
    "nonlinear response without energy": lambda d: _system(d, "pier")["responses"][0]
    .pop("energy"),
    "base shear check in metres": lambda d: next(
        c for c in _system(d, "s1")["checks"]).update(quantity="base_shear", unit="m"),
    "verdict worded as approval": lambda d: _system(d, "s1")["checks"][0].update(
        verdict="approved"),
    "short record hash": lambda d: d["records"][0].update(sha256="abc123"),
    "unknown statistic": lambda d: d["settings"].update(statistic_used="median"),
    "text inside a spectrum": lambda d: d["spectra"]["r1"]["psa_g"][0].__setitem__(0, "x"),
    "negative time step": lambda d: d["records"][0].update(dt_s=-0.01),
    "pair without rotd100": lambda d: d["pairs"][0].pop("rotd100_psa_g"),
    "check without statistics": lambda d: _system(d, "s1")["checks"][0].pop("statistics"),
    "fragility count not whole": lambda d: _system(d, "pier")["checks"][0]["fragility"]
    ["exceeding"].__setitem__(0, 0.5),
    "fragility in other units": lambda d: _system(d, "pier")["checks"][0]["fragility"]
    .update(unit="m/s2"),
}


@pytest.mark.parametrize("mutation", RESULTS_MUTATIONS, ids=list(RESULTS_MUTATIONS))
def test_results_schema_rejects(rich_site, mutation):
    document = copy.deepcopy(rich_site[0])
    RESULTS_MUTATIONS[mutation](document)
    assert _errors("results", document)


MANIFEST_MUTATIONS = {
    "file hash not hex": lambda m: m["files"].update({"index.html": "Z" * 64}),
    "manifest lists itself": lambda m: m["files"].update({"manifest.json": "0" * 64}),
    "fingerprint too short": lambda m: m.update(fingerprint="abc"),
    "input outside inputs/": lambda m: m["inputs"].append("records/r1.csv"),
    "no python version": lambda m: m["dependencies"].pop("python"),
}


@pytest.mark.parametrize("mutation", MANIFEST_MUTATIONS, ids=list(MANIFEST_MUTATIONS))
def test_manifest_schema_rejects(rich_site, mutation):
    document = copy.deepcopy(rich_site[1])
    MANIFEST_MUTATIONS[mutation](document)
    assert _errors("manifest", document)


# ----------------------------------------------------------------- the command
@pytest.mark.parametrize("name", SCHEMA_NAMES)
def test_schema_command_prints_the_shipped_file(command_group, name):
    result = invoke(command_group, "schema", name)
    assert result.exit_code == 0, result.output
    assert result.output == schema_text(name)
    assert json.loads(result.output) == load_schema(name)


def test_schema_command_refuses_unknown_name(command_group):
    result = invoke(command_group, "schema", "peaks")
    assert result.exit_code == 2
    assert "results" in result.output and "manifest" in result.output
