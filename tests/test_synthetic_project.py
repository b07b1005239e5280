"""[synthetic_records]: spectrum-compatible records made at build time from the target."""

from __future__ import annotations

import json

import numpy as np
import pytest
from click.testing import CliRunner

from sdofreport.cli import cli
from sdofreport.errors import ProjectError
from sdofreport.project import load_project
from tests.test_suite_scaling import _asce_sa

PROJECT = """\
[project]
title = "Synthetic suite"
reference = "SYN"
revision = "1"
prepared_by = "tester"

[analysis]
periods = { min = 0.05, max = 4.0, count = 60 }

[design_spectrum]
kind = "asce7-16"
sds = 1.0
sd1 = 0.6
tl = "8 s"

[synthetic_records]
count = 2
duration = "10 s"
dt = "0.01 s"
seed = 3
period_range = [0.1, 2.0]

[[systems]]
id = "s1"
name = "one"
damping = 0.05
mass = "10 t"
period = "0.5 s"
"""


def test_synthetic_records_build_and_match(tmp_path):
    path = tmp_path / "sdofreport.toml"
    path.write_text(PROJECT)
    out = tmp_path / "site"
    result = CliRunner().invoke(cli, ["build", str(path), "-o", str(out), "-q", "--jobs",
                                      "1", "--cache-dir", str(tmp_path / "cache")])
    assert result.exit_code == 0, result.output
    doc = json.loads((out / "data" / "results.json").read_text())
    assert [r["id"] for r in doc["records"]] == ["syn01", "syn02"]
    assert (out / "data" / "synthetic" / "syn01.csv").is_file()
    periods = np.array(doc["spectra"]["periods_s"])
    inside = (periods >= 0.1) & (periods <= 2.0)
    # Without `level` the [design_spectrum] is the MCE_R spectrum, 1.5 × design
    # (ASCE/SEI 7-16 §11.4.7; the Chapter 16 target, §16.2.1, from memory).
    target = 1.5 * _asce_sa(periods[inside])
    zeta = doc["spectra"]["damping"].index(0.05)
    for rid in ("syn01", "syn02"):
        psa = np.array(doc["spectra"][rid]["psa_g"][zeta])[inside]
        # Common practice (no source): within ±10 % of the target over the matched range;
        # the target is ASCE/SEI 7-16 Eqs. 11.4-5 to 11.4-8 evaluated by hand.
        assert np.max(np.abs(psa / target - 1.0)) <= 0.10


def test_records_and_synthetic_records_are_exclusive(tmp_path):
    (tmp_path / "r.txt").write_text("\n".join(["0.0"] * 20))
    path = tmp_path / "sdofreport.toml"
    path.write_text(PROJECT + '\n[[records]]\nid = "r"\nfile = "r.txt"\ndt = \"0.01 s\"\n')
    with pytest.raises(ProjectError, match="either \\[\\[records\\]\\] or"):
        load_project(path)


def test_synthetic_records_need_a_target(tmp_path):
    text = PROJECT.replace('[design_spectrum]\nkind = "asce7-16"\nsds = 1.0\nsd1 = 0.6\n'
                           'tl = "8 s"\n', "")
    path = tmp_path / "sdofreport.toml"
    path.write_text(text)
    with pytest.raises(ProjectError, match="synthetic records need a \\[design_spectrum\\]"):
        load_project(path)
