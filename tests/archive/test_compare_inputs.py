"""Revisions show every changed input (issue 14 part 4).

Before the fix, raising a pier's yield strength changed its checks while both
``compare`` and the revision page said "No system added, removed or changed". Two
small sites are built through the CLI, the second with a higher yield strength and with
``--compare-to`` the first. Expected values are unit definitions (1 kN = 1000 N;
1 kip = 4448.2216152605 N, NIST SP 811 Appendix B) applied to the project's inputs.
"""

from __future__ import annotations

import copy
import json

import pytest
from click.testing import CliRunner

from sdofreport.archive.compare import compare_results, comparison_text
from sdofreport.cli import cli
from tests.archive.conftest import write_project

PIER = """\
[project]
title = "Pier revision test"
reference = "T-14"
revision = "{revision}"
prepared_by = "tester"
display_units = "{units}"

[[records]]
id = "r1"
file = "records/r1.csv"

[[systems]]
id = "pier"
name = "Jetty pier"
damping = 0.05
mass = "60 t"
period = "1.2 s"
height = "9 m"
yield_strength = "{strength}"
post_yield_ratio = 0.03
[systems.limits]
displacement = "80 mm"
"""


def _build(folder, text, *extra):
    project = write_project(folder, text)
    result = CliRunner().invoke(cli, ["build", str(project), "-o", str(folder / "site"),
                                      "--quiet", "--jobs", "1", "--no-cache", *extra])
    assert result.exit_code in (0, 3), result.output
    return folder / "site"


@pytest.fixture(scope="module")
def pair(tmp_path_factory):
    root = tmp_path_factory.mktemp("pier")
    old = _build(root / "a", PIER.format(revision="A", units="SI", strength="40 kN"))
    new = _build(root / "b", PIER.format(revision="B", units="SI", strength="60 kN"),
                 "--compare-to", str(old))
    return old, new


def _fingerprint(site) -> str:
    return json.loads((site / "manifest.json").read_text())["fingerprint"]


def _results(site) -> dict:
    return json.loads((site / "data" / "results.json").read_text())


def test_results_json_records_the_whole_property_set(pair):
    inputs = _results(pair[0])["inputs"]
    pier = inputs["systems"]["pier"]
    assert pier["given"]["yield_strength_n"] == pytest.approx(40e3)  # 1 kN = 1000 N
    assert pier["given"]["post_yield_ratio"] == 0.03
    assert pier["model"]["yield_strength_n"] == pytest.approx(40e3)
    assert pier["limits"] == {"displacement_m": pytest.approx(0.080)}
    assert pier["limit_basis"]["height_m"] == pytest.approx(9.0)
    record = inputs["records"]["r1"]
    assert record["units"] == "g" and record["scale"] == 1.0 and len(record["sha256"]) == 64
    assert inputs["scaling"]["rule"] == "none"


def test_compare_names_a_changed_yield_strength_and_both_fingerprints(pair):
    old, new = pair
    result = CliRunner().invoke(cli, ["compare", str(old), str(new)])
    assert result.exit_code == 0, result.output
    assert "pier given.yield_strength_n: 40.00 kN → 60.00 kN (+50 %)" in result.output
    assert "No system added, removed or changed" not in result.output
    assert _fingerprint(old) in result.output and _fingerprint(new) in result.output


def test_compare_json_gives_old_and_new_si_values(pair):
    result = CliRunner().invoke(cli, ["compare", str(pair[0]), str(pair[1]), "--format",
                                      "json"])
    document = json.loads(result.output)
    change = next(c for c in document["systems"]["changed"]
                  if c["field"] == "given.yield_strength_n")
    assert (change["old"], change["new"]) == (pytest.approx(40e3), pytest.approx(60e3))
    assert change["relative"] == pytest.approx(0.5)  # (60 − 40) / 40
    assert not document["identical"]


def test_revision_page_lists_the_change_and_both_fingerprints(pair):
    old, new = pair
    page = (new / "revision.html").read_text(encoding="utf-8")
    assert "given.yield_strength_n" in page and "40.00 kN → 60.00 kN (+50 %)" in page
    assert _fingerprint(old) in page and _fingerprint(new) in page
    assert "No system added, removed or changed" not in page


def test_changes_show_in_us_display_units(pair):
    old, new = (_results(site) for site in pair)
    new["project"]["display_units"] = "US"
    text = comparison_text(compare_results(old, new))
    # 40 kN / 4448.2216152605 N/kip = 8.992 kip; 60 kN = 13.49 kip.
    assert "given.yield_strength_n: 8.992 kip → 13.49 kip (+50 %)" in text


def test_other_inputs_and_a_missing_inputs_block(pair):
    old = _results(pair[0])
    new = copy.deepcopy(old)
    new["inputs"]["scaling"]["suite_factor"] = 1.2
    new["inputs"]["records"]["r1"]["amplitude_ok"] = True
    document = compare_results(old, new)
    assert [(c["path"], c["old"], c["new"]) for c in document["inputs"]] == \
        [("scaling.suite_factor", 1.0, 1.2)]
    assert [(c["id"], c["field"]) for c in document["records"]["changed"]] == \
        [("r1", "amplitude_ok")]
    del old["inputs"]
    document = compare_results(old, new)
    assert "The old run was built by an sdofreport without the inputs block" in \
        comparison_text(document)


def test_plain_numbers_si_is_said_and_gives_the_same_numbers(pair, tmp_path):
    # 60 t written as the bare SI number 60000 kg (1 t = 1000 kg): only the bare-number
    # mode may differ from revision A; the summary page's provenance says so.
    text = PIER.format(revision="A", units="SI", strength="40 kN").replace(
        'prepared_by = "tester"', 'prepared_by = "tester"\nplain_numbers = "SI"').replace(
        'mass = "60 t"', "mass = 60000")
    site = _build(tmp_path / "c", text)
    summary = (site / "index.html").read_text(encoding="utf-8")
    assert "Bare numbers" in summary and "plain_numbers = &#34;SI&#34;" in summary
    document = compare_results(_results(pair[0]), _results(site))
    assert document["checks"] == [] and document["systems"]["changed"] == []
    assert [(c["path"], c["old"], c["new"]) for c in document["inputs"]] == \
        [("plain_numbers", None, "SI")]
