"""verify covers what a reader reads: the pages, figures and tables, not only the hashes.

Reproductions first: each test tampers a built site the way an editor with the manifest
at hand would (change what a page says, then re-hash ``manifest.json`` and, where it
helps, recompute the fingerprint) and expects exit status 4 naming what was changed.
Expected values are independent facts: SHA-256 from hashlib (FIPS 180-4); the
fingerprint from its definition in manifest.json (``sdofreport.site.render.fingerprint``
is the documented formula, recomputed here by hand); the build is deterministic (same
inputs, same versions, byte-identical files), so a rebuild reproduces every untouched
file.
"""

from __future__ import annotations

import hashlib
import json
from pathlib import Path

import pytest
from click.testing import CliRunner

from sdofreport.archive._sitefiles import RunFiles, read_run
from sdofreport.archive._rebuild import csv_differs
from sdofreport.archive.verify import rerun_check
from sdofreport.build import build_site
from tests.archive.conftest import project_text, write_project


def _verify(group, *args):
    return CliRunner().invoke(group, ["verify", *map(str, args)])


def _fingerprint(manifest: dict) -> str:
    # Definition (docs and summary page): SHA-256 over canonical JSON of the versions,
    # platform, settings and the hashes of inputs/ and data/results.json; 16 hex digits.
    covered = {name: manifest.get(name)
               for name in ("package", "dependencies", "platform", "settings")}
    covered["files"] = {p: d for p, d in sorted(manifest["files"].items())
                        if p.startswith("inputs/") or p == "data/results.json"}
    text = json.dumps(covered, sort_keys=True, separators=(",", ":"), ensure_ascii=True)
    return hashlib.sha256(text.encode("ascii")).hexdigest()[:16]


def _rehash(site: Path, *, refingerprint: bool = False, edit=None) -> dict:
    """Re-hash every file into manifest.json (optionally after ``edit(manifest)`` and
    with a recomputed fingerprint), as a careful tamperer would; return the manifest."""
    path = site / "manifest.json"
    manifest = json.loads(path.read_text("utf-8"))
    if edit is not None:
        edit(manifest)
    for name in list(manifest["files"]):
        manifest["files"][name] = hashlib.sha256((site / name).read_bytes()).hexdigest()
    if refingerprint:
        manifest["fingerprint"] = _fingerprint(manifest)
    path.write_text(json.dumps(manifest, indent=1), "utf-8")
    return manifest


def _replace(path: Path, old: str, new: str, count: int = 1) -> None:
    text = path.read_text("utf-8")
    assert old in text, f"{old!r} not in {path}"
    path.write_text(text.replace(old, new, count), "utf-8")


def _rehash_everywhere(site: Path, edit=None) -> None:
    """Re-hash, recompute the fingerprint and print the new one on every page."""
    old = json.loads((site / "manifest.json").read_text("utf-8"))["fingerprint"]
    new = _fingerprint(_rehash(site, edit=edit))
    for page in site.rglob("*.html"):
        page.write_text(page.read_text("utf-8").replace(old, new), "utf-8")
    _rehash(site, refingerprint=True, edit=edit)


def _halve_first_demand(site: Path) -> str:
    """Halve the first check's demand in results.json; the fingerprint before."""
    results = site / "data/results.json"
    document = json.loads(results.read_text("utf-8"))
    document["systems"][0]["checks"][0]["demand"] *= 0.5
    results.write_text(json.dumps(document, indent=1), "utf-8")
    return json.loads((site / "manifest.json").read_text("utf-8"))["fingerprint"]


def test_rehashed_page_figure_and_table_edits_fail_rerun_naming_each(group, sites,
                                                                    copy_site):
    site = copy_site(sites["rev0"])
    _replace(site / "index.html", "within limit", "exceeds limit")          # a verdict
    _replace(site / "figures/system-response~s1~r1.svg", 'stroke="#999999"', 'stroke="#999998"')
    peaks = site / "data/peaks.csv"                                         # a number
    lines = peaks.read_text("utf-8").splitlines(keepends=True)
    lines[1] = lines[1].replace(",0.", ",0.1", 1)
    peaks.write_text("".join(lines), "utf-8")
    _replace(site / "records/r1.html", "</main>", "<p>Approved.</p></main>")  # words
    manifest = _rehash(site)
    # Reproduction: the hashes and the fingerprint (pages are not in it) all still agree.
    assert _verify(group, site).exit_code == 0
    result = _verify(group, site, "--rerun", "-j", "1")
    assert result.exit_code == 4, result.output
    for path in ("index.html", "figures/system-response~s1~r1.svg", "data/peaks.csv",
                 "records/r1.html"):
        assert f"re-run: differs from the rebuild: {path}" in result.output
    assert "4 files differ from the rebuild" in result.output
    assert manifest["fingerprint"] in (site / "index.html").read_text("utf-8")


def test_results_with_recomputed_fingerprint_fail_plain_verify(group, sites, copy_site):
    site = copy_site(sites["rev0"])
    old = _halve_first_demand(site)
    new = _rehash(site, refingerprint=True)["fingerprint"]
    assert new != old
    result = _verify(group, site)
    assert result.exit_code == 4, result.output
    for page in ("index.html", "suite.html", "systems/s1.html", "records/r2.html"):
        assert (f"page: {page} shows run fingerprint '{old}', but manifest.json states "
                f"'{new}'") in result.output


def _add_page(site: Path) -> None:
    (site / "approval.html").write_bytes((site / "suite.html").read_bytes())
    _rehash(site, edit=lambda m: m["files"].__setitem__("approval.html", ""))


def _halve_demand_everywhere(site: Path) -> None:
    _halve_first_demand(site)
    _rehash_everywhere(site)


def _change_settings_everywhere(site: Path) -> None:
    _rehash_everywhere(site, lambda m: m["settings"].__setitem__("statistic_used", "mean"))


@pytest.mark.parametrize("tamper, expected", [
    (_add_page, "re-run: not made by the rebuild: approval.html"),
    (_halve_demand_everywhere, "re-run: systems[0].checks[0].demand: stored"),
    (_change_settings_everywhere,
     're-run: manifest.json: settings.statistic_used: stored "mean", recomputed "max"'),
])
def test_consistent_tampering_passes_plain_verify_but_fails_rerun(group, sites, copy_site,
                                                                  tamper, expected):
    site = copy_site(sites["rev0"])
    tamper(site)
    # Reproduction: hashes, fingerprint and every printed value agree.
    assert _verify(group, site).exit_code == 0
    result = _verify(group, site, "--rerun", "-j", "1")
    assert result.exit_code == 4
    assert expected in result.output


def test_page_without_fingerprint_or_with_another_project_hash_fails(group, sites,
                                                                     copy_site):
    site = copy_site(sites["rev0"])
    fingerprint = json.loads((site / "manifest.json").read_text("utf-8"))["fingerprint"]
    _replace(site / "suite.html", f'<code class="fingerprint">{fingerprint}</code>',
             "<code>see manifest</code>")
    project_sha = hashlib.sha256((site / "inputs/sdofreport.toml").read_bytes()).hexdigest()
    _replace(site / "records/r1.html", f"SHA-256 {project_sha[:12]}", "SHA-256 0123456789ab")
    # A declaration html.parser gives up on: whatever follows could show anything.
    _replace(site / "records/r2.html", "<main", "<![hidden[ x ]]><main")
    _rehash(site)
    result = _verify(group, site)
    assert result.exit_code == 4
    assert "page: records/r2.html cannot be parsed as HTML to its end" in result.output
    assert "page: suite.html shows no run fingerprint" in result.output
    assert (f"page: records/r1.html shows project file SHA-256 '0123456789ab', but "
            f"'inputs/sdofreport.toml' has '{project_sha[:12]}'") in result.output
    assert "3 page problems" in result.output


def test_revision_page_is_rebuilt_from_the_kept_earlier_results(group, sites, tmp_path):
    project = write_project(tmp_path / "project", project_text("1", limit="40 mm"))
    site = build_site(project, tmp_path / "site", jobs=1, use_cache=False,
                      compare_to=sites["rev0"]).output
    # The earlier run's results are kept as an input, so the fingerprint covers them.
    manifest = json.loads((site / "manifest.json").read_text("utf-8"))
    assert "inputs/_compare-to/results.json" in manifest["inputs"]
    assert rerun_check(read_run(site), jobs=1).ok
    # Reproduction: a changed row of the revision page, re-hashed, fails the re-run.
    _replace(site / "revision.html", "0.05", "0.06")
    _rehash(site)
    assert _verify(group, site).exit_code == 0
    result = _verify(group, site, "--rerun", "-j", "1")
    assert result.exit_code == 4
    assert "re-run: differs from the rebuild: revision.html" in result.output


def test_rerun_names_differing_versions_before_the_numbers(sites):
    run = read_run(sites["rev0"])
    manifest = json.loads(run.files["manifest.json"])
    installed = manifest["dependencies"]["numpy"]
    manifest["dependencies"]["numpy"] = "0.0.1"
    stored = json.loads(run.files["data/results.json"])
    stored["records"][0]["pga_g"] *= 2
    files = {**run.files, "manifest.json": json.dumps(manifest).encode("utf-8"),
             "data/results.json": json.dumps(stored).encode("utf-8")}
    outcome = rerun_check(RunFiles("other numpy", "folder", files), jobs=1)
    assert outcome.versions == [f"numpy: site 0.0.1, installed {installed}"]
    assert outcome.tolerance == 1e-9  # another version: the documented default tolerance
    lines = outcome.lines()
    version = next(i for i, line in enumerate(lines) if "version: numpy" in line)
    number = next(i for i, line in enumerate(lines) if "records[0].pga_g" in line)
    assert version < number


def test_csv_numbers_compare_within_the_tolerance():
    # Definition of the relative difference: |a - b| / max(|a|, |b|).
    assert not csv_differs(b"x,a\n1.0,s\n", b"x,a\n1.0000000000001,s\n", 1e-9)  # 1e-13
    assert csv_differs(b"x,a\n1.0,s\n", b"x,a\n1.00001,s\n", 1e-9)             # 1e-5
    assert csv_differs(b"x,a\n1.0,s\n", b"x,a\n1.0,t\n", 1e-9)                 # text
    assert csv_differs(b"x,a\n1.0,s\n", b"x,a\n1.0,s,extra\n", 1e-9)           # shape
