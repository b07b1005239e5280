"""sdofreport verify: integrity against manifest.json, coverage, re-run, exit statuses.

Expected values are independent facts: a file whose bytes we changed has a different
SHA-256 (hashlib, FIPS 180-4), so verify must list it; the re-run must give the very
numbers the build wrote (same package version and machine).
"""

from __future__ import annotations

import hashlib
import json
import zipfile
from pathlib import Path

import pytest
from click.testing import CliRunner

from sdofreport.archive._sitefiles import RunFiles, read_run
from sdofreport.archive.verify import compare_documents, rerun_check, verify_site
from tests.archive.conftest import build, flip_byte, project_text


def _verify(group, *args):
    return CliRunner().invoke(group, ["verify", *map(str, args)])


def _rewrite_json(path: Path, edit) -> None:
    document = json.loads(path.read_text("utf-8"))
    edit(document)
    path.write_text(json.dumps(document, indent=1, ensure_ascii=False) + "\n", "utf-8")


def test_clean_site_verifies_with_exit_0(group, sites):
    result = _verify(group, sites["rev0"])
    assert result.exit_code == 0, result.output
    # Independent: the fingerprint verify recomputes is the one manifest.json states.
    manifest = json.loads((sites["rev0"] / "manifest.json").read_text("utf-8"))
    assert f"fingerprint {manifest['fingerprint']} recomputes" in result.output


@pytest.mark.parametrize("path", ["index.html", "systems/s1.html", "inputs/records/r1.csv",
                                  "inputs/sdofreport.toml", "data/results.json",
                                  "data/peaks.csv", "figures/record-psa~r1.svg",
                                  "static/style.css"])
def test_one_byte_change_anywhere_is_caught(group, sites, copy_site, path):
    site = copy_site(sites["rev0"])
    before = hashlib.sha256((site / path).read_bytes()).hexdigest()
    flip_byte(site / path)
    # Independent: one changed byte changes the SHA-256 (hashlib).
    assert hashlib.sha256((site / path).read_bytes()).hexdigest() != before
    result = _verify(group, site)
    assert result.exit_code == 4, result.output
    assert f"changed: {path}" in result.output
    assert "FAILED verification: 1 file changed" in result.output


def test_removed_and_extra_files_are_caught(group, sites, copy_site):
    site = copy_site(sites["rev0"])
    (site / "figures" / "record-sd~r2.svg").unlink()
    (site / "notes.txt").write_text("added later\n", "utf-8")
    result = _verify(group, site)
    assert result.exit_code == 4
    assert "missing: figures/record-sd~r2.svg" in result.output
    assert "added (not in manifest.json): notes.txt" in result.output


def test_extra_input_file_is_caught(group, sites, copy_site):
    site = copy_site(sites["rev0"])
    (site / "inputs" / "records" / "r3.csv").write_text("0,0\n", "utf-8")
    result = _verify(group, site)
    assert result.exit_code == 4
    assert "inputs/records/r3.csv" in result.output


def test_rehashed_manifest_still_fails_on_the_fingerprint(group, sites, copy_site):
    # Someone edits an input and updates its hash in the manifest: the fingerprint,
    # which covers every input hash, no longer recomputes.
    site = copy_site(sites["rev0"])
    record = site / "inputs" / "records" / "r1.csv"
    flip_byte(record)
    digest = hashlib.sha256(record.read_bytes()).hexdigest()
    _rewrite_json(site / "manifest.json",
                  lambda m: m["files"].__setitem__("inputs/records/r1.csv", digest))
    result = _verify(group, site)
    assert result.exit_code == 4
    assert "does not recompute" in result.output
    assert "changed:" not in result.output


def test_manifest_must_list_every_input(group, sites, copy_site):
    site = copy_site(sites["rev0"])
    _rewrite_json(site / "manifest.json",
                  lambda m: m["inputs"].remove("inputs/records/r2.txt"))
    result = _verify(group, site)
    assert result.exit_code == 4
    assert "'inputs/records/r2.txt' is hashed but not listed under 'inputs'" in result.output


def test_zip_is_verified_and_tampered_zip_fails(group, sites, tmp_path):
    packed = tmp_path / "run.zip"
    result = CliRunner().invoke(group, ["pack", str(sites["rev0"]), "-o", str(packed)])
    assert result.exit_code == 0, result.output
    assert _verify(group, packed).exit_code == 0
    tampered = tmp_path / "tampered.zip"
    with zipfile.ZipFile(packed) as source, zipfile.ZipFile(tampered, "w") as target:
        for info in source.infolist():
            data = source.read(info)
            if info.filename == "suite.html":
                data = data.replace(b"<h1>", b"<h1 >", 1)
            target.writestr(info, data)
    result = _verify(group, tampered)
    assert result.exit_code == 4
    assert "changed: suite.html" in result.output


@pytest.mark.parametrize("make, expected", [
    (lambda p: p.mkdir(), "no manifest.json found"),
    (lambda p: None, "not found"),
    (lambda p: p.write_text("not a zip", "utf-8"), "not a zip archive"),
    (lambda p: (p.mkdir(), (p / "manifest.json").write_text('{"schema": "x"}', "utf-8")),
     "has schema 'x'"),
])
def test_bad_input_exits_2_with_a_message(group, tmp_path, make, expected):
    target = tmp_path / "thing"
    make(target)
    result = _verify(group, target)
    assert result.exit_code == 2
    assert expected in result.output
    assert "Traceback" not in result.output


def test_rerun_reproduces_exactly(group, sites):
    result = _verify(group, sites["rev1"], "--rerun", "-j", "1")
    assert result.exit_code == 0, result.output
    assert "re-run reproduces all" in result.output and "exactly" in result.output


def test_rerun_restores_a_date_taken_from_source_date_epoch(tmp_path, monkeypatch):
    # Built without [project] date, dated from SOURCE_DATE_EPOCH; re-run without it.
    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1700000000")
    site = build(tmp_path, project_text("0", date=None), tmp_path / "cache")
    monkeypatch.delenv("SOURCE_DATE_EPOCH")
    stored = json.loads((site / "data" / "results.json").read_text("utf-8"))
    # Independent: 1700000000 s after 1970-01-01 UTC is 2023-11-14 (POSIX time).
    assert stored["project"]["date"] == "2023-11-14"
    report = verify_site(site, rerun=True, jobs=1)
    assert report.ok, report.lines()


def test_rerun_reports_every_changed_number_by_json_path(sites):
    run = read_run(sites["rev0"])
    stored = json.loads(run.files["data/results.json"])
    stored["systems"][0]["checks"][0]["demand"] *= 1.5
    stored["records"][1]["pga_g"] += 1e-6
    files = {**run.files, "data/results.json": json.dumps(stored).encode("utf-8")}
    outcome = rerun_check(RunFiles("edited", "folder", files), jobs=1)
    assert outcome.performed
    paths = sorted(d.path for d in outcome.differences)
    assert paths == ["records[1].pga_g", "systems[0].checks[0].demand"]
    demand = next(d for d in outcome.differences if d.path.endswith("demand"))
    # Closed form: |x - 1.5 x| / (1.5 x) = 1/3.
    assert demand.relative == pytest.approx(1 / 3, rel=1e-12)


def test_rerun_refuses_inputs_from_outside_the_project_folder(sites):
    run = read_run(sites["rev0"])
    files = dict(run.files)
    files["inputs/_outside/002-r2.txt"] = files.pop("inputs/records/r2.txt")
    outcome = rerun_check(RunFiles("outside", "folder", files), jobs=1)
    assert not outcome.performed
    assert "input outside project folder" in outcome.reason


@pytest.mark.parametrize("old, new, tolerance, differs", [
    (1.0, 1.0 + 1e-12, 1e-9, False),   # relative 1e-12 < 1e-9
    (1.0, 1.0 + 1e-12, 0.0, True),     # exact comparison
    (1.0, 1.1, 0.05, True),            # relative 0.1 / 1.1 = 0.0909 > 0.05
    (0, 0.0, 0.0, False),              # int and float zero are the same number
    ("a", "b", 1.0, True),             # text always compares exactly
    (None, 0.0, 1.0, True),            # null is not a number
    (True, 1, 1.0, True),              # a boolean is not a number
])
def test_compare_documents_tolerance(old, new, tolerance, differs):
    differences, _ = compare_documents({"x": [old]}, {"x": [new]}, tolerance)
    assert bool(differences) is differs
    if differs and isinstance(old, float) and isinstance(new, float):
        # Definition: |new - old| / max(|new|, |old|).
        assert differences[0].relative == pytest.approx(abs(new - old) / max(old, new))
