"""The command-line interface: spectrum output, exit statuses and messages."""

from __future__ import annotations

import csv
import io
import json

import numpy as np
import pytest
from click.testing import CliRunner

from sdofreport import __version__
from sdofreport.cli import cli
from sdofreport.core.units import G
from tests.conftest import write_test_records
from tests.test_engine import lsim_peak_displacement


@pytest.fixture
def records(tmp_path):
    return tmp_path, write_test_records(tmp_path)


def run(*args):
    return CliRunner().invoke(cli, list(args), catch_exceptions=False)


def test_version_names_dependencies():
    result = run("--version")
    assert result.exit_code == 0
    for name in (f"sdofreport {__version__}", "numpy", "scipy", "numba"):
        assert name in result.output


def test_spectrum_json_interface_and_values(records):
    folder, accelerations = records
    result = run("spectrum", str(folder / "records" / "r1.csv"), "--damping", "0.05",
                 "--damping", "0.02", "--periods", "0.2,1.0")
    assert result.exit_code == 0, result.output
    doc = json.loads(result.stdout)
    assert list(doc) == ["record", "intensity", "method", "damping", "periods_s", "sd_m",
                         "sv_m_s", "psv_m_s", "psa_g", "sa_g"]
    assert set(doc["record"]) == {"id", "dt_s", "npts", "sha256", "units"}
    assert set(doc["intensity"]) == {"pga_g", "pgv_m_s", "pgd_m", "arias_m_s", "d5_95_s",
                                     "d5_75_s", "cav_m_s", "mean_period_s"}
    acc = accelerations["r1"]
    # Definition: PGA = max |a|; the file holds the values in g to 9 significant figures.
    assert doc["intensity"]["pga_g"] == pytest.approx(np.max(np.abs(acc)) / G, rel=1e-7)
    assert doc["damping"] == [0.05, 0.02]  # in the order given
    assert np.array(doc["sd_m"]).shape == (2, 2)
    for i, zeta in enumerate(doc["damping"]):
        for j, period in enumerate(doc["periods_s"]):
            # Independent reference: scipy.signal.lsim on a 32x finer grid.
            expected = lsim_peak_displacement(acc, 0.01, period, zeta)
            assert doc["sd_m"][i][j] == pytest.approx(expected, rel=5e-3)
            # Definition: PSA = ω² SD, in g.
            omega = 2 * np.pi / period
            assert doc["psa_g"][i][j] == pytest.approx(omega ** 2 * doc["sd_m"][i][j] / G)


def test_spectrum_csv(records):
    folder, _ = records
    result = run("spectrum", str(folder / "records" / "r2.txt"), "--format", "csv",
                 "--periods", "0.1,0.5,2", "--method", "newmark-average")
    assert result.exit_code == 0, result.output
    rows = list(csv.reader(io.StringIO(result.stdout)))
    assert rows[0][:7] == ["damping", "period_s", "sd_m", "sv_m_s", "psv_m_s", "psa_g",
                           "sa_g"]
    assert len(rows) == 1 + 3
    # The intensity measures are in the csv too, equal to the json's.
    doc = json.loads(run("spectrum", str(folder / "records" / "r2.txt"), "--periods",
                         "0.1,0.5,2", "--method", "newmark-average").stdout)
    for name, value in doc["intensity"].items():
        column = rows[0].index(name)
        assert {row[column] for row in rows[1:]} == {"" if value is None else repr(value)}
    # The detected layout is said without -v (on standard error).
    assert "layout" in result.stderr and "detected" in result.stderr


def test_spectrum_old_spellings_still_work_with_a_deprecation(records, tmp_path):
    """'--output csv' (a format) and '--format headed' (a layout) keep working for one
    release, each with a deprecation message; '-o' now writes a file."""
    folder, _ = records
    path = str(folder / "records" / "r2.txt")
    new = run("spectrum", path, "--format", "csv", "--periods", "0.5")
    old = run("spectrum", path, "--output", "csv", "--periods", "0.5")
    assert old.exit_code == 0 and old.stdout == new.stdout
    assert "Deprecated" in old.stderr and "--format csv" in old.stderr
    target = tmp_path / "out.csv"
    written = run("spectrum", path, "--format", "csv", "--periods", "0.5", "-o", str(target))
    assert written.exit_code == 0 and target.read_text("utf-8") == new.stdout
    layout_old = run("spectrum", path, "--format", "headed", "--periods", "0.5")
    layout_new = run("spectrum", path, "--layout", "headed", "--periods", "0.5")
    assert layout_old.exit_code == 0 and layout_old.stdout == layout_new.stdout
    assert "--layout headed" in layout_old.stderr
    bad = run("spectrum", path, "--format", "xml")
    assert bad.exit_code == 2 and "--format" in bad.output


def test_spectrum_values_file_needs_dt(tmp_path):
    path = tmp_path / "v.txt"
    path.write_text("\n".join(f"{np.sin(i / 5):.5f}" for i in range(100)) + "\n")
    result = run("spectrum", str(path), "--layout", "values")
    assert result.exit_code == 2
    assert "v.txt" in result.output and "time step" in result.output
    ok = run("spectrum", str(path), "--layout", "values", "--dt", "0.01", "--units", "m/s2",
             "--periods", "0.5")
    assert ok.exit_code == 0, ok.output


@pytest.mark.parametrize("args, fragment", [
    (["spectrum", "missing.txt"], "missing.txt"),
    (["spectrum", "{rec}", "--damping", "5"], "damping"),
    (["spectrum", "{rec}", "--periods", "0.1,abc"], "--periods: expected numbers"),
])
def test_spectrum_bad_input_exit_2(records, args, fragment):
    folder, _ = records
    args = [a.replace("{rec}", str(folder / "records" / "r1.csv")) for a in args]
    result = CliRunner().invoke(cli, args)
    assert result.exit_code == 2
    assert fragment in result.output
    assert "Traceback" not in result.output


def test_build_strict_exit_3_and_bad_project_exit_2(project_factory, valid_project_text,
                                                     tmp_path):
    tight = valid_project_text.replace('displacement = "50 mm"', 'displacement = "0.1 mm"')
    path = project_factory(tight)
    out = tmp_path / "site"
    cache = tmp_path / "cache"
    result = run("build", str(path), "-o", str(out), "--strict", "--quiet", "--jobs", "1",
                 "--cache-dir", str(cache))
    assert result.exit_code == 3
    assert (out / "index.html").is_file()
    before = {p: p.read_bytes() for p in out.rglob("*") if p.is_file()}
    broken = project_factory(tight.replace("damping = 0.05", "damping = 7"), "bad.toml")
    result = CliRunner().invoke(cli, ["build", str(broken), "-o", str(out), "--quiet"])
    assert result.exit_code == 2
    assert "systems[s1].damping" in result.output
    # Nothing half-written: the previous site is untouched and no staging folder remains.
    after = {p: p.read_bytes() for p in out.rglob("*") if p.is_file()}
    assert after == before
    assert not [p for p in tmp_path.iterdir() if p.name.startswith(".site.")]


def test_build_refuses_foreign_folder(project_factory, valid_project_text, tmp_path):
    path = project_factory(valid_project_text)
    foreign = tmp_path / "precious"
    foreign.mkdir()
    (foreign / "thesis.txt").write_text("do not delete")
    result = CliRunner().invoke(cli, ["build", str(path), "-o", str(foreign), "--quiet"])
    assert result.exit_code == 2
    assert "not a site built by sdofreport" in result.output
    assert (foreign / "thesis.txt").read_text() == "do not delete"


def test_build_refuses_outside_inputs(project_factory, valid_project_text, tmp_path):
    sub = tmp_path / "proj"
    sub.mkdir()
    text = valid_project_text.replace("records/r1.csv", "../records/r1.csv").replace(
        "records/r2.txt", "../records/r2.txt")
    path = sub / "sdofreport.toml"
    path.write_text(text)
    result = CliRunner().invoke(cli, ["build", str(path), "-o", str(tmp_path / "o"), "-q"])
    assert result.exit_code == 2
    assert "outside the project folder" in result.output and "--allow-outside" in \
        result.output
    ok = CliRunner().invoke(cli, ["build", str(path), "-o", str(tmp_path / "o"), "-q",
                                  "--allow-outside", "--jobs", "1"])
    assert ok.exit_code == 0, ok.output


def test_build_compare_to_adds_a_revision_page(project_factory, valid_project_text,
                                               tmp_path):
    cache = str(tmp_path / "cache")
    old = tmp_path / "old"
    first = run("build", str(project_factory(valid_project_text)), "-o", str(old), "-q",
                "--jobs", "1", "--cache-dir", cache)
    assert first.exit_code == 0, first.output
    revised = valid_project_text.replace('displacement = "50 mm"', 'displacement = "40 mm"')
    new = tmp_path / "new"
    second = run("build", str(project_factory(revised, "rev.toml")), "-o", str(new), "-q",
                 "--jobs", "1", "--cache-dir", cache, "--compare-to", str(old))
    assert second.exit_code == 0, second.output
    page = (new / "revision.html").read_text()
    # The one change made above: the limit 0.05 m -> 0.04 m (relative change -20 %).
    assert "s1" in page and "0.05" in page and "0.04" in page and "-20" in page
    manifest = json.loads((new / "manifest.json").read_text())
    assert "revision.html" in manifest["files"]
    assert 'href="revision.html"' in (new / "index.html").read_text()


def test_display_units_us_on_pages_and_si_in_json(project_factory, valid_project_text,
                                                  tmp_path):
    text = valid_project_text.replace('prepared_by = "tester"',
                                      'prepared_by = "tester"\ndisplay_units = "US"')
    out = tmp_path / "us"
    result = run("build", str(project_factory(text)), "-o", str(out), "-q", "--jobs", "1",
                 "--cache-dir", str(tmp_path / "cache"))
    assert result.exit_code == 0, result.output
    page = (out / "systems" / "s1.html").read_text()
    doc = json.loads((out / "data" / "results.json").read_text())
    (check,) = doc["systems"][0]["checks"]
    # Definition: 1 in = 0.0254 m; the 50 mm limit is 1.969 in on a US page.
    assert "1.969 in" in page and " kip" in page and " mm<" not in page
    assert check["limit"] == pytest.approx(0.05) and check["unit"] == "m"


@pytest.mark.parametrize("args", [["--version"], ["--help"], ["build", "--help"],
                                  ["build", "no-such-project.toml"]])
def test_python_m_sdofreport_runs_the_same_command(args, tmp_path):
    # Reference: the console-script entry point pyproject.toml declares for the
    # `sdofreport` command (sdofreport.cli:main, called as pip's launcher calls it).
    import subprocess
    import sys

    launcher = "import sys; from sdofreport.cli import main; sys.exit(main())"
    as_module = subprocess.run([sys.executable, "-m", "sdofreport", *args], cwd=tmp_path,
                               capture_output=True, text=True, check=False)
    as_command = subprocess.run([sys.executable, "-c", launcher, *args], cwd=tmp_path,
                                capture_output=True, text=True, check=False)
    assert (as_module.returncode, as_module.stdout, as_module.stderr) == \
        (as_command.returncode, as_command.stdout, as_command.stderr)
    # Exit statuses as README documents them: 2 for bad input (a missing project file).
    assert as_module.returncode == (2 if args[-1].endswith(".toml") else 0)
