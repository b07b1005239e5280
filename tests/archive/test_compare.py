"""sdofreport compare and the revision page.

Revision 1 of the test project changes three things on purpose (see conftest.py): the
displacement limit of s1 from 50 mm to 40 mm, the scale of record r2 from 1 to 1.5, and
adds system s2. Expected values follow from those edits: 50 mm = 0.05 m, 40 mm = 0.04 m,
relative change (new - old) / |old|.

Sources of expected values: the edits themselves (closed form: relative change
(new - old) / |old|); no published values.
"""

from __future__ import annotations

import copy
import html
import json
import xml.etree.ElementTree as ET
from html.parser import HTMLParser

import pytest
from click.testing import CliRunner

from sdofreport.archive.compare import compare_results, revision_page
from sdofreport.site.context import CAUTION_SHORT


def _results(site):
    return json.loads((site / "data" / "results.json").read_text("utf-8"))


@pytest.fixture(scope="module")
def comparison(sites):
    return compare_results(_results(sites["rev0"]), _results(sites["rev1"]))


def test_changed_limit_is_reported_with_its_relative_change(comparison, sites):
    row = next(r for r in comparison["checks"] if r["system"] == "s1")
    assert row["status"] == "changed" and row["quantity"] == "displacement"
    # Unit conversion: 50 mm = 0.05 m, 40 mm = 0.04 m; (0.04 - 0.05) / 0.05 = -0.2.
    assert row["old"]["limit"] == pytest.approx(0.05, rel=1e-12)
    assert row["new"]["limit"] == pytest.approx(0.04, rel=1e-12)
    assert row["relative"]["limit"] == pytest.approx(-0.2, rel=1e-9)
    # Definition: ratio = demand / limit on each side.
    assert row["new"]["ratio"] == pytest.approx(row["new"]["demand"] / 0.04, rel=1e-12)


def test_changed_record_scale_is_reported(comparison):
    changes = {(c["id"], c["field"]): c for c in comparison["records"]["changed"]}
    scale = changes[("r2", "scale")]
    # Project files: r2 unscaled (1.0) in revision 0, scale = 1.5 in revision 1.
    assert (scale["old"], scale["new"]) == (1.0, 1.5)
    assert scale["relative"] == pytest.approx(0.5, rel=1e-12)
    # Linearity: a scaled record has a proportionally scaled PGA.
    pga = changes[("r2", "pga_g")]
    assert pga["new"] == pytest.approx(1.5 * pga["old"], rel=1e-12)
    assert not any(c["id"] == "r1" for c in comparison["records"]["changed"])
    assert comparison["records"]["added"] == [] and comparison["records"]["removed"] == []


def test_added_system_and_its_checks(comparison):
    assert comparison["systems"]["added"] == ["s2"]
    assert comparison["systems"]["removed"] == []
    added = [r for r in comparison["checks"] if r["system"] == "s2"]
    assert [r["status"] for r in added] == ["added"] and added[0]["old"] is None
    # Project file: s2's displacement limit is 100 mm = 0.1 m.
    assert added[0]["new"]["limit"] == pytest.approx(0.1, rel=1e-12)


def test_file_hashes_are_compared_when_both_sides_are_sites(group, sites):
    result = CliRunner().invoke(group, ["compare", str(sites["rev0"]), str(sites["rev1"]),
                                        "--format", "json"])
    assert result.exit_code == 0, result.output
    document = json.loads(result.output)
    # The record files are the same bytes in both projects: no file hash change.
    assert not any(c["field"] == "file_sha256" for c in document["records"]["changed"])
    assert document["old"]["fingerprint"] != document["new"]["fingerprint"]


def test_settings_changes_are_listed(sites):
    old = _results(sites["rev0"])
    new = copy.deepcopy(old)
    new["settings"]["analysis"]["method"] = "newmark-average"
    document = compare_results(old, new)
    assert document["settings"] == [{"path": "settings.analysis.method", "old": "exact",
                                     "new": "newmark-average"}]
    assert document["checks"] == [] and not document["identical"]


def test_run_against_itself_is_identical(group, sites):
    results = sites["rev0"] / "data" / "results.json"
    result = CliRunner().invoke(group, ["compare", str(results), str(sites["rev0"])])
    assert result.exit_code == 0, result.output
    assert "No check, system, record, input, setting or project detail changed." in result.output


def test_text_output_names_each_change(group, sites):
    result = CliRunner().invoke(group, ["compare", str(sites["rev0"]), str(sites["rev1"])])
    assert result.exit_code == 0, result.output
    assert "limit 0.05 → 0.04 (-20 %)" in result.output
    assert "r2 scale: 1 → 1.5 (+50 %)" in result.output
    assert "Systems added: s2" in result.output


class _Refs(HTMLParser):
    def __init__(self):
        super().__init__()
        self.refs = []

    def handle_starttag(self, tag, attrs):
        self.refs += [v for k, v in attrs if k in ("href", "src") and v]


def test_html_output_is_self_contained_and_cautioned(group, sites, tmp_path):
    out = tmp_path / "compare.html"
    result = CliRunner().invoke(group, ["compare", str(sites["rev0"]), str(sites["rev1"]),
                                        "--format", "html", "-o", str(out)])
    assert result.exit_code == 0, result.output
    page = out.read_text("utf-8")
    assert html.escape(CAUTION_SHORT, quote=False) in page
    assert "<style>" in page and "static/style.css" not in page
    parser = _Refs()
    parser.feed(page)
    # Self-contained: every reference is an in-page anchor or a data: URI.
    assert parser.refs and all(r.startswith(("data:", "#")) for r in parser.refs)


def test_user_text_is_escaped(sites):
    old, new = _results(sites["rev0"]), _results(sites["rev1"])
    new = copy.deepcopy(new)
    new["project"]["revision"] = "<script>alert(1)</script>"
    page = revision_page(old, new)["revision.html"].decode("utf-8")
    assert "<script>" not in page
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in page


def test_revision_page_files(sites):
    files = revision_page(_results(sites["rev0"]), _results(sites["rev1"]))
    # Only r2 changed (scaled); r1 is the same record in both runs.
    assert sorted(files) == ["figures/revision-r2.svg", "revision.html"]
    ET.fromstring(files["figures/revision-r2.svg"])  # well-formed SVG
    page = files["revision.html"].decode("utf-8")
    assert 'src="figures/revision-r2.svg"' in page
    assert html.escape(CAUTION_SHORT, quote=False) in page
    assert "not an approval" in page


@pytest.mark.parametrize("content, expected", [
    ('{"schema": "other"}', "expected 'sdofreport/results@1'"),
    ("{not json", "not valid JSON"),
])
def test_bad_inputs_exit_2(group, sites, tmp_path, content, expected):
    bad = tmp_path / "results.json"
    bad.write_text(content, "utf-8")
    result = CliRunner().invoke(group, ["compare", str(bad), str(sites["rev0"])])
    assert result.exit_code == 2
    assert expected in result.output


def test_missing_path_exits_2(group, sites, tmp_path):
    result = CliRunner().invoke(group, ["compare", str(tmp_path / "nope"), str(sites["rev0"])])
    assert result.exit_code == 2 and "not found" in result.output


def test_old_spellings_still_work_with_a_deprecation(group, sites, tmp_path):
    """'--output html -o FILE' and '--output-file FILE' of the earlier release give the
    same page as '--format html -o FILE', each with a deprecation message."""
    pages = {}
    for name, args in {"new": ["--format", "html", "-o"],
                       "old": ["--output", "html", "-o"],
                       "older": ["--output", "html", "--output-file"]}.items():
        out = tmp_path / f"{name}.html"
        result = CliRunner().invoke(group, ["compare", str(sites["rev0"]),
                                            str(sites["rev1"]), *args, str(out)])
        assert result.exit_code == 0, result.output
        assert ("Deprecated" in result.stderr) == (name != "new")
        pages[name] = out.read_bytes()
    assert pages["old"] == pages["new"] == pages["older"]


def test_verify_format_and_output_file(group, sites, tmp_path):
    """verify: '--format json' is the report format and '-o' a file; the earlier
    '--output json' still works with a deprecation message."""
    out = tmp_path / "report.json"
    new = CliRunner().invoke(group, ["verify", str(sites["rev0"]), "--format", "json",
                                     "-o", str(out)])
    assert new.exit_code == 0, new.output
    report = json.loads(out.read_text("utf-8"))
    old = CliRunner().invoke(group, ["verify", str(sites["rev0"]), "--output", "json"])
    assert old.exit_code == 0 and json.loads(old.stdout) == report
    assert "Deprecated" in old.stderr


def test_comparison_document_follows_its_published_schema(group, sites):
    """The JSON of 'compare --format json' validates against the shipped
    comparison.schema.json (jsonschema, Draft 2020-12), both ways round."""
    import jsonschema

    from sdofreport.schemas import load_schema

    validator = jsonschema.Draft202012Validator(load_schema("comparison"))
    for old, new in (("rev0", "rev1"), ("rev1", "rev0"), ("rev0", "rev0")):
        result = CliRunner().invoke(group, ["compare", str(sites[old]), str(sites[new]),
                                            "--format", "json"])
        assert result.exit_code == 0, result.output
        validator.validate(json.loads(result.stdout))
