"""`sdofreport new`: a deterministic starter project that builds as it is.

Sources of expected values: hand calculation of periods and stiffness (closed form
T = 2π√(m/k), k = n·12EI/h³, Chopra ch. 1) written out in the tests; the rest is our
own interface.
"""

from __future__ import annotations

import hashlib
import tomllib

import numpy as np
import pytest

from sdofreport.core.units import G
from sdofreport.project import load_project
from sdofreport.records import read_record
from sdofreport.authoring.starter import STARTER_MOTIONS, starter_files, write_starter

from .conftest import invoke, read_site


def test_new_then_build_succeeds(starter_site):
    project, site = starter_site
    assert sorted(p.relative_to(project).as_posix() for p in project.rglob("*")
                  if p.is_file()) == [".gitignore", "notes.md", "records/README.md",
                                      "records/mby01.csv",
                                      "records/mby02.csv", "records/mby03.csv",
                                      "sdofreport.toml"]
    results, manifest = read_site(site)
    assert [r["id"] for r in results["records"]] == ["mby01", "mby02", "mby03"]
    assert [s["id"] for s in results["systems"]] == ["skid", "frame"]
    # Every stated limit becomes one check (two per system in the starter).
    assert [len(s["checks"]) for s in results["systems"]] == [2, 2]
    assert (site / "index.html").is_file() and (site / "systems" / "frame.html").is_file()
    assert "inputs/notes.md" in manifest["inputs"]


def test_starter_builds_strict_and_packs(starter_site, command_group, tmp_path):
    project, site = starter_site
    # The starter's demands are all within their limits, so --strict exits 0 (not 3).
    strict = invoke(command_group, "build", project / "sdofreport.toml", "-o",
                    tmp_path / "strict", "--strict", "--quiet", "--cache-dir",
                    site.parent / "cache")
    assert strict.exit_code == 0, strict.output
    packed = invoke(command_group, "pack", site, "-o", tmp_path)
    assert packed.exit_code == 0, packed.output
    archive = packed.output.strip().splitlines()[-1]
    assert archive.endswith(".zip") and "MBY-0001_revA_" in archive
    verified = invoke(command_group, "verify", archive)
    assert verified.exit_code == 0, verified.output


def test_starter_gitignore_covers_the_site_and_the_packet(starter_site):
    """The default site folder and the default --pdf file (sdofreport.site.pdf) of a
    build in the starter folder are both ignored by git (fnmatch, as git's patterns)."""
    import fnmatch

    from sdofreport.site.pdf import default_pdf_path

    project, _ = starter_site
    patterns = [line for line in (project / ".gitignore").read_text("utf-8").splitlines()
                if line and not line.startswith("#")]
    site = project / "_site"
    pdf = default_pdf_path(site)
    assert pdf.parent == project.resolve()
    assert any(fnmatch.fnmatch(pdf.name, p) for p in patterns)
    assert any(p.rstrip("/") == site.name for p in patterns)


def test_starter_systems_follow_their_inputs(starter_site):
    project, _ = starter_site
    systems = {s.id: s for s in load_project(project / "sdofreport.toml").systems}
    # Hand calculation: T = 2π √(m/k) = 2π √(6000 kg / 2.4e6 N/m) = π/10 s.
    assert systems["skid"].period_s == pytest.approx(np.pi / 10, rel=1e-12)
    # Hand calculation: k = n·12EI/h³ = 4 × 12 × 200e9 × 8e-5 / 4.5³ (both ends fixed).
    k = 4 * 12 * 200e9 * 8e-5 / 4.5 ** 3
    assert systems["frame"].stiffness_n_m == pytest.approx(k, rel=1e-12)


@pytest.mark.parametrize("motion", STARTER_MOTIONS, ids=lambda m: m.id)
def test_starter_records_are_short_synthetic_and_in_g(starter_site, motion):
    project, _ = starter_site
    record = read_record(project / "records" / f"{motion.id}.csv", file_format="two-column",
                         units="g", record_id=motion.id)
    duration = (record.npts - 1) * record.dt_s
    # Issue requirement: three short records, 10-15 s long.
    assert 10.0 - motion.dt_s <= duration <= 15.0
    assert record.dt_s == pytest.approx(motion.dt_s, rel=1e-12)
    # Definition: the generator scales max|a| to the stated PGA; the file keeps nine
    # significant figures of the value in g.
    peak_g = np.max(np.abs(record.acceleration_m_s2)) / G
    assert peak_g == pytest.approx(motion.pga_g, rel=1e-7)


def test_starter_files_are_deterministic(tmp_path):
    first = starter_files()
    second = starter_files()
    assert first == second
    write_starter(tmp_path / "a")
    write_starter(tmp_path / "b")
    for relative, data in first.items():
        assert (tmp_path / "a" / relative).read_bytes() == data
        assert (tmp_path / "b" / relative).read_bytes() == data
    # Different seeds give different records (no accidental reuse of one stream).
    digests = {hashlib.sha256(first[f"records/{m.id}.csv"]).hexdigest()
               for m in STARTER_MOTIONS}
    assert len(digests) == len(STARTER_MOTIONS)


def test_starter_project_is_commented_and_parses():
    text = starter_files()["sdofreport.toml"].decode("utf-8")
    data = tomllib.loads(text)
    assert {"project", "analysis", "records", "systems"} <= set(data)
    assert all("limits" in system for system in data["systems"])
    # Commented: a comment line opens the file and most sections explain themselves.
    assert text.startswith("#") and text.count("#") >= 20


def test_new_refuses_a_non_empty_folder(command_group, tmp_path):
    folder = tmp_path / "busy"
    folder.mkdir()
    (folder / "mine.txt").write_text("keep me", encoding="utf-8")
    result = invoke(command_group, "new", folder)
    assert result.exit_code == 2
    assert str(folder) in result.output and "not empty" in result.output
    assert "Traceback" not in result.output
    # Nothing was written next to the user's file.
    assert [p.name for p in folder.iterdir()] == ["mine.txt"]


def test_new_refuses_a_file_and_accepts_an_empty_folder(command_group, tmp_path):
    target = tmp_path / "file.toml"
    target.write_text("", encoding="utf-8")
    result = invoke(command_group, "new", target)
    assert result.exit_code == 2
    assert str(target) in result.output and "not a folder" in result.output
    empty = tmp_path / "empty"
    empty.mkdir()
    ok = invoke(command_group, "new", empty)
    assert ok.exit_code == 0, ok.output
    assert (empty / "sdofreport.toml").is_file()


def test_starter_targets_asce7_22(starter_site):
    # The requirement: ASCE/SEI 7-22 is the starter's default target. Published
    # formula (from memory): the two-period MCE_R spectrum is 1.5 × the design spectrum,
    # so its plateau is 1.5 S_DS = 1.5 × 0.70 g (the starter's S_DS).
    _, site = starter_site
    results, _ = read_site(site)
    design = results["design_spectrum"]
    assert design["kind"] == "asce7-22" and design["parameters"]["site_class"] == "CD"
    assert max(design["sa_g"]) == pytest.approx(1.5 * 0.70, rel=1e-12)
