"""sdofreport register: every run listed, tampered runs marked, stable rebuilds."""

from __future__ import annotations

import hashlib
import json
import re
import shutil
from html.parser import HTMLParser
from pathlib import Path

import pytest
from click.testing import CliRunner

from tests.archive.conftest import flip_byte


def _register(group, folder, output):
    return CliRunner().invoke(group, ["register", str(folder), "-o", str(output)])


def _files(folder: Path) -> dict[str, bytes]:
    return {p.relative_to(folder).as_posix(): p.read_bytes() for p in folder.rglob("*")
            if p.is_file()}


@pytest.fixture
def artifacts(group, sites, tmp_path):
    """A CI-like folder: rev0 packed, rev1 as a site folder, a tampered copy of rev0."""
    folder = tmp_path / "artifacts"
    (folder / "job1").mkdir(parents=True)
    result = CliRunner().invoke(group, ["pack", str(sites["rev0"]), "-o",
                                        str(folder / "job1")])
    assert result.exit_code == 0, result.output
    shutil.copytree(sites["rev1"], folder / "job2" / "_site")
    shutil.copytree(sites["rev0"], folder / "job3" / "_site")
    flip_byte(folder / "job3" / "_site" / "figures" / "record-psa~r1.svg")
    flip_byte(folder / "job3" / "_site" / "inputs" / "records" / "r2.txt")
    return folder


class _Links(HTMLParser):
    def __init__(self):
        super().__init__()
        self.links = []

    def handle_starttag(self, tag, attrs):
        self.links += [v for k, v in attrs if k in ("href", "src") and v]


def test_every_run_listed_and_tampered_run_marked(group, artifacts, tmp_path):
    output = tmp_path / "register"
    result = _register(group, artifacts, output)
    # Exit 4: one run failed verification; the register is still written.
    assert result.exit_code == 4, result.output
    rows = json.loads((output / "register.json").read_text("utf-8"))["runs"]
    assert sorted(r["source"] for r in rows) == ["job1/" + next(
        p.name for p in (artifacts / "job1").iterdir()), "job2/_site", "job3/_site"]
    tampered = next(r for r in rows if r["source"] == "job3/_site")
    assert tampered["verified"] is False
    assert tampered["verification"] == "FAILED verification: 2 files changed"
    assert all(r["verified"] for r in rows if r is not tampered)
    page = (output / "index.html").read_text("utf-8")
    assert "FAILED verification: 2 files changed" in page
    # Ordered by reference, revision, fingerprint.
    keys = [(r["reference"], r["revision"], r["fingerprint"]) for r in rows]
    assert keys == sorted(keys)
    # Counts from each run's own results.json.
    rev1 = next(r for r in rows if r["source"] == "job2/_site")
    results = json.loads((artifacts / "job2" / "_site" / "data" / "results.json").read_text())
    checks = [c for s in results["systems"] for c in s["checks"]]
    assert rev1["checks"] == len(checks) == 2
    assert rev1["worst_ratio"] == max(c["ratio"] for c in checks)


def test_links_work_offline(group, artifacts, tmp_path):
    output = tmp_path / "register"
    _register(group, artifacts, output)
    parser = _Links()
    parser.feed((output / "index.html").read_text("utf-8"))
    assert parser.links
    for link in parser.links:
        assert not link.startswith(("http:", "https:", "//")), link
        if link == "data:,":  # the empty icon every page declares (no request at all)
            continue
        assert (output / link).is_file(), link
    # The copies are the archived bytes: each verifies from the register exactly as it
    # did where it was found (0 for verified runs, 4 for the tampered one).
    rows = json.loads((output / "register.json").read_text("utf-8"))["runs"]
    assert sorted(r["link"] for r in rows) == sorted(
        link for link in parser.links if link.startswith("runs/"))
    for row in rows:
        result = CliRunner().invoke(group, ["verify", str((output / row["link"]).parent)])
        assert result.exit_code == (0 if row["verified"] else 4), row


def test_rebuild_after_adding_a_run_changes_only_what_it_adds(group, artifacts, sites,
                                                             tmp_path):
    output = tmp_path / "register"
    _register(group, artifacts, output)
    before = _files(output)
    shutil.copytree(sites["rev2"], artifacts / "job4" / "_site")
    assert _register(group, artifacts, output).exit_code == 4
    after = _files(output)
    changed = {p for p in before if p in after and before[p] != after[p]}
    assert changed == {"index.html", "register.json"}
    assert set(before) <= set(after)
    added = set(after) - set(before)
    manifest = json.loads((sites["rev2"] / "manifest.json").read_text("utf-8"))
    prefix = f"runs/T-1_rev2_{manifest['fingerprint']}/"
    assert added and all(p.startswith(prefix) for p in added)
    # Same inputs, same bytes: a rebuild with nothing new changes nothing.
    _register(group, artifacts, output)
    assert _files(output) == after


def test_unreadable_zip_is_listed_as_failed(group, tmp_path):
    folder = tmp_path / "artifacts"
    folder.mkdir()
    (folder / "broken.zip").write_bytes(b"PK\x03\x04 truncated")
    result = _register(group, folder, tmp_path / "register")
    assert result.exit_code == 4
    rows = json.loads((tmp_path / "register" / "register.json").read_text())["runs"]
    assert len(rows) == 1 and rows[0]["source"] == "broken.zip"
    assert rows[0]["verification"].startswith("FAILED verification: ")
    assert str(tmp_path) not in (tmp_path / "register" / "register.json").read_text()


def test_refuses_to_overwrite_a_folder_that_is_not_a_register(group, artifacts, tmp_path):
    output = tmp_path / "precious"
    output.mkdir()
    (output / "keep.txt").write_text("mine", "utf-8")
    result = _register(group, artifacts, output)
    assert result.exit_code == 2
    assert "not a register built by sdofreport" in result.output
    assert _files(output) == {"keep.txt": b"mine"}


def test_output_inside_the_scanned_folder_is_not_registered(group, artifacts):
    output = artifacts / "register"
    _register(group, artifacts, output)
    _register(group, artifacts, output)
    rows = json.loads((output / "register.json").read_text())["runs"]
    assert len(rows) == 3


def test_register_has_the_site_header_and_breakable_file_names(group, artifacts, tmp_path):
    """The register page keeps the site's header element and column (base.html's
    <header class="masthead">) and lets long file names wrap after / _ . - (a <wbr>
    after each; HTML Living Standard, the wbr element)."""
    output = tmp_path / "register"
    _register(group, artifacts, output)
    page = (output / "index.html").read_text("utf-8")
    assert '<header class="masthead">' in page and 'class="masthead-id"' in page
    assert "Register of archived runs" in page
    names = re.findall(r'<code class="file-name">(.*?)</code>', page)
    assert "job2/<wbr>_<wbr>site" in names
    assert all("<wbr>" in name for name in names)


def _forge(site: Path, path: str, text_from, text_to) -> None:
    """Edit one page of ``site`` and re-hash it in the manifest, as a forger (or an older
    sdofreport that let a script-carrying link through) would leave it: it verifies."""
    target = site / path
    data = target.read_bytes()
    assert text_from in data, path
    target.write_bytes(data.replace(text_from, text_to, 1))
    manifest = json.loads((site / "manifest.json").read_text("utf-8"))
    manifest["files"][path] = hashlib.sha256(target.read_bytes()).hexdigest()
    (site / "manifest.json").write_text(json.dumps(manifest), "utf-8")


# Each payload is one class: a notes link that runs script once its character references
# are resolved (HTML Living Standard, "character reference state"), an event handler, an
# off-site link that a browser reads as '//host' (WHATWG URL Standard: '\' is '/'), a
# script element, a meta refresh, and a figure that runs script when opened by itself.
FORGED = [
    ("index.html", b"<main>", b'<main><p><a href="jav&#x61;script:window.x=1">n</a></p>'),
    ("index.html", b"<main>", b'<main><p onmouseover="window.x=1">n</p>'),
    ("index.html", b"<main>", b'<main><a href="/\\evil.example/">n</a>'),
    ("suite.html", b"<main>", b"<main><script>window.x=1</script>"),
    ("index.html", b"<head>", b'<head><meta http-equiv="refresh" content="0;url=data:,x">'),
    ("figures/record-psa~r1.svg", b"<svg ", b'<svg onload="window.x=1" '),
]


@pytest.mark.parametrize("path, before, after", FORGED)
def test_run_with_script_is_listed_but_not_copied(group, sites, tmp_path, path, before,
                                                   after):
    folder = tmp_path / "artifacts"
    shutil.copytree(sites["rev0"], folder / "clean" / "_site")
    forged = folder / "forged" / "_site"
    shutil.copytree(sites["rev1"], forged)
    _forge(forged, path, before, after)
    assert CliRunner().invoke(group, ["verify", str(forged)]).exit_code == 0
    output = tmp_path / "register"
    result = _register(group, folder, output)
    assert result.exit_code == 4, result.output
    rows = {r["source"]: r for r in
            json.loads((output / "register.json").read_text("utf-8"))["runs"]}
    bad = rows["forged/_site"]
    assert bad["verified"] is False and bad["link"] is None
    assert bad["verification"].startswith(f"NOT COPIED: '{path}' holds "), bad
    assert not (output / "runs" / bad["name"]).exists()
    assert after not in b"".join(p.read_bytes() for p in output.rglob("*") if p.is_file())
    # The clean run beside it is copied as before.
    assert rows["clean/_site"]["verified"] and (output / rows["clean/_site"]["link"]).is_file()


def test_unstable_and_unknown_verdicts_are_not_counted_as_within():
    """A register row never reads safer than its run: every verdict other than
    "within limit" (exceeding, unstable, anything unknown) is counted as not within
    (our own rule: fail closed)."""
    from sdofreport.archive.register import _results_summary
    from sdofreport.archive.verify import RESULTS_PATH

    verdicts = ["within limit", "exceeds limit", "unstable", "something else"]
    checks = [{"ratio": 0.5 + i, "verdict": v} for i, v in enumerate(verdicts)]
    document = {"schema": "sdofreport/results@1", "systems": [{"checks": checks}]}
    summary = _results_summary({RESULTS_PATH: json.dumps(document).encode("utf-8")})
    assert (summary["checks"], summary["within"], summary["exceeding"]) == (4, 1, 3)
