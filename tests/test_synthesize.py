"""End-to-end tests of ``sdofreport synthesize`` on a small click group built with register()."""

from __future__ import annotations

import json

import click
import numpy as np
import pytest
from click.testing import CliRunner
from scipy import signal

from sdofreport.cli.synthesize import register
from sdofreport.core.units import G
from sdofreport.authoring.synthesize import parse_target

INLINE = "asce7-16:sds=1.0,sd1=0.6,tl=8"
FAST = ["--duration", "20", "--range", "0.05,2"]


@click.group()
def group():
    """Test group."""


register(group)


def _run(*args):
    return CliRunner().invoke(group, ["synthesize", *args])


def _asce(t):
    """ASCE/SEI 7-16 §11.4.6 with SDS = 1.0, SD1 = 0.6, TL = 8 (written out here)."""
    t = np.asarray(t, float)
    return np.where(t < 0.12, 0.4 + 0.6 * t / 0.12, np.where(t <= 0.6, 1.0, 0.6 / t))


def _read(path):
    rows = [line for line in path.read_text().splitlines()
            if line and not line.startswith("#") and not line.startswith("time_s")]
    data = np.array([[float(x) for x in row.split(",")] for row in rows])
    return data[:, 0], data[:, 1]


def _lsim_psa_g(acc_g, dt, period, zeta=0.05, refine=8):
    t = np.arange(acc_g.size) * dt
    fine = np.linspace(0.0, t[-1], (acc_g.size - 1) * refine + 1)
    wn = 2 * np.pi / period
    _, u, _ = signal.lsim(signal.lti([-1.0], [1.0, 2 * zeta * wn, wn * wn]),
                          np.interp(fine, t, acc_g * G), fine)
    return wn * wn * np.max(np.abs(u)) / G


@pytest.fixture(scope="module")
def made(tmp_path_factory):
    folder = tmp_path_factory.mktemp("syn")
    result = _run("--target", INLINE, "--count", "2", *FAST, "-o", str(folder))
    return folder, result


def test_writes_records_summary_and_lines(made):
    folder, result = made
    assert result.exit_code == 0, result.output
    assert sorted(p.name for p in folder.iterdir()) == ["syn01.csv", "syn02.csv",
                                                        "synthesis.json"]
    assert result.output.count("max deviation") == 2
    assert "EN 1998-1 3.2.3.1.2" in result.output
    summary = json.loads((folder / "synthesis.json").read_text())
    assert summary["seeds"] == [1, 2]
    assert summary["period_range_s"] == [0.05, 2.0]
    header = (folder / "syn01.csv").read_text().splitlines()[:6]
    assert header[0] == "# synthetic spectrum-compatible record (not a recorded earthquake)"
    assert "Gasparini & Vanmarcke 1976" in header[1]
    assert header[2].startswith("# seed: 1;")
    for name, entry in zip(("syn01.csv", "syn02.csv"), summary["records"]):
        time, acc_g = _read(folder / name)
        assert time[1] == pytest.approx(0.01)
        assert acc_g.size == 2001
        assert entry["max_deviation"] < 0.10
        for period in (0.05, 0.2, 0.6, 1.5, 2.0):
            # Independent: scipy.signal.lsim, input linear between samples, 8x finer;
            # formula ASCE/SEI 7-16 §11.4.6. Common practice (no source): ±10 %.
            # File values carry 9 significant digits, far below the tolerance.
            assert abs(_lsim_psa_g(acc_g, 0.01, period) / _asce(period) - 1.0) < 0.10


def test_same_options_same_bytes_and_refuses_overwrite(made, tmp_path):
    folder, _ = made
    again = _run("--target", INLINE, "--count", "2", *FAST, "-o", str(tmp_path))
    assert again.exit_code == 0
    for name in ("syn01.csv", "syn02.csv", "synthesis.json"):
        assert (tmp_path / name).read_bytes() == (folder / name).read_bytes()
    refused = _run("--target", INLINE, *FAST, "-o", str(tmp_path))
    assert refused.exit_code == 2
    assert "syn01.csv, synthesis.json already exist(s); use --force" in refused.output


def test_project_and_table_targets(tmp_path):
    project = tmp_path / "p.toml"
    project.write_text('[design_spectrum]\nkind = "en1998-1"\nagr = 0.25\n'
                       'importance_factor = 1.0\nground_type = "B"\nspectrum_type = 1\n')
    target = parse_target(str(project))
    # Published formula: EN 1998-1 Eq. (3.3), plateau a_g S 2.5 with S = 1.2 for ground
    # type B, Type 1 (Table 3.2, memory): 0.25 * 1.2 * 2.5 = 0.75 g at T = 0.3 s.
    assert np.interp(0.3, target.periods_s, target.sa_g) == pytest.approx(0.75, rel=1e-3)
    table = tmp_path / "t.txt"
    table.write_text("# period_s sa_g\n0.1 0.5\n1.0, 0.8\n3.0 0.2\n")
    target = parse_target(str(table))
    np.testing.assert_array_equal(target.sa_g, [0.5, 0.8, 0.2])


def test_project_target_reads_tl_with_its_unit(tmp_path):
    # The bundled example writes tl = "8 s", as every dimensional key must be written.
    project = tmp_path / "p.toml"
    project.write_text('[design_spectrum]\nkind = "asce7-16"\nsds = 1.0\nsd1 = 0.6\n'
                       'tl = "2 s"\n')
    target = parse_target(str(project))
    # Published formula: ASCE/SEI 7-16 Eq. (11.4-8), Sa = S_D1 T_L / T² beyond T_L:
    # 0.6 × 2 / 3² at T = 3 s.
    assert np.interp(3.0, target.periods_s, target.sa_g) == pytest.approx(0.6 * 2 / 9,
                                                                          rel=1e-3)


@pytest.mark.parametrize("files, target, message", [
    ({}, "asce7-16:sds=1.0,sd1=0.6", "kind 'asce7-16' needs key(s) tl"),
    ({}, "asce7-16:sds=1.0,sd2=0.6,tl=8", "unknown key 'sd2' for kind 'asce7-16' "
                                          "(did you mean 'sds'?)"),
    ({}, "nope.csv", "--target 'nope.csv': no such file"),
    ({"t.txt": "0.1 0.5\n0.2 abc\n"}, "t.txt", "t.txt line 2: expected two numbers"),
    ({"p.toml": "[project]\nname = 'x'\n"}, "p.toml", "p.toml: no [design_spectrum] section"),
    ({"p.toml": "[design_spectrum]\nkind = 'asce7-16'\nsds = -1\nsd1 = 0.6\ntl = '8 s'\n"},
     "p.toml", "p.toml [design_spectrum]: sds_g must be a finite number > 0 [g]; got -1"),
    # A project file's tl is read as the project loader reads it: a bare number is refused.
    ({"p.toml": "[design_spectrum]\nkind = 'asce7-16'\nsds = 1.0\nsd1 = 0.6\ntl = 8\n"},
     "p.toml", "p.toml [design_spectrum] tl: found the bare number 8"),
])
def test_bad_targets_exit_2(tmp_path, monkeypatch, files, target, message):
    monkeypatch.chdir(tmp_path)
    for name, text in files.items():
        (tmp_path / name).write_text(text)
    result = _run("--target", target, "-o", "out")
    assert result.exit_code == 2
    assert message in result.output
    assert "Traceback" not in result.output
    assert not (tmp_path / "out").exists()


def test_bad_range_exit_2(tmp_path):
    result = _run("--target", INLINE, "--range", "0.05", "-o", str(tmp_path / "o"))
    assert result.exit_code == 2
    assert "--range '0.05': expected two periods in seconds" in result.output
    result = _run("--target", INLINE, "--range", "0.01,2", "-o", str(tmp_path / "o"))
    assert result.exit_code == 2
    assert "period_range_s (0.01, 2.0) [s] must lie within" in result.output
