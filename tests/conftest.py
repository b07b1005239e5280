"""Shared fixtures: small projects written into a temporary folder.

The records here are synthetic (Kanai-Tajimi filtered noise with a Saragoni-Hart
envelope, fixed seeds): inputs for the tests, never expected values. Expected values
come from independent references named in each test (published standard, closed form,
reference library, common practice or memory).
"""

from __future__ import annotations

import contextlib
import os
import shutil
import subprocess
import textwrap
from pathlib import Path

import numpy as np
import pytest
from hypothesis import settings

from sdofreport.core.stochastic import kanai_tajimi_accelerogram
from sdofreport.core.units import G
from sdofreport.records.writers import write_headed, write_two_column

# Property tests draw the same examples on every run, so a CI run is reproducible; set
# HYPOTHESIS_PROFILE=explore to draw fresh ones locally.
settings.register_profile("repeatable", derandomize=True)
settings.register_profile("explore", derandomize=False)
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "repeatable"))

EXAMPLE = Path(__file__).resolve().parents[1] / "site_examples" / "harbourview_cold_store"

PROJECT_HEAD = """\
[project]
title = "Test project"
reference = "T-1"
revision = "0"
prepared_by = "tester"
"""

TWO_RECORDS = """\
[[records]]
id = "r1"
file = "records/r1.csv"

[[records]]
id = "r2"
file = "records/r2.txt"
"""

ONE_SYSTEM = """\
[[systems]]
id = "s1"
name = "System one"
damping = 0.05
mass = "100 t"
period = "0.5 s"
height = "4 m"
[systems.limits]
displacement = "50 mm"
"""


def synthetic_acceleration(seed: int, duration_s: float = 8.0, dt_s: float = 0.01,
                           pga_g: float = 0.3) -> np.ndarray:
    """A short seeded synthetic accelerogram [m/s²] for test inputs."""
    return kanai_tajimi_accelerogram(duration_s, dt_s, seed=seed, target_pga_m_s2=pga_g * G,
                                     high_pass_hz=0.2)


def write_test_records(folder: Path) -> dict[str, np.ndarray]:
    """Write r1.csv (two-column, g) and r2.txt (headed, g); return accelerations [m/s²]."""
    records = folder / "records"
    records.mkdir(parents=True, exist_ok=True)
    a1 = synthetic_acceleration(11)
    a2 = synthetic_acceleration(12, duration_s=6.0, dt_s=0.005, pga_g=0.25)
    write_two_column(records / "r1.csv", 0.01, a1 / G, units="g")
    write_headed(records / "r2.txt", 0.005, a2 / G, title_lines=("test record r2",
                                                               "synthetic"))
    return {"r1": a1, "r2": a2}


@pytest.fixture
def project_factory(tmp_path):
    """Write a project file (dedented text) beside two small records; return its path."""
    write_test_records(tmp_path)

    def make(text: str, name: str = "sdofreport.toml") -> Path:
        path = tmp_path / name
        path.write_text(textwrap.dedent(text), encoding="utf-8")
        return path

    return make


@pytest.fixture
def valid_project_text() -> str:
    return PROJECT_HEAD + "\n" + TWO_RECORDS + "\n" + ONE_SYSTEM


@contextlib.contextmanager
def read_only_folder(folder: Path):
    """
    ``folder`` read-only for this process while inside: mode 500, and for root (who
    writes anyway) the immutable attribute, chattr +i. Skips the test when neither works.
    """
    root = hasattr(os, "getuid") and os.getuid() == 0
    if root:
        if shutil.which("chattr") is None or subprocess.run(
                ["chattr", "+i", str(folder)], capture_output=True, check=False).returncode:
            pytest.skip("no immutable folders here (chattr +i), and root writes anyway")
    else:
        folder.chmod(0o500)
    try:
        yield folder
    finally:
        if root:
            subprocess.run(["chattr", "-i", str(folder)], check=True)
        folder.chmod(0o700)


def process_alive(pid: int) -> bool:
    """True while ``pid`` exists and is not a zombie (state in /proc/<pid>/stat, proc(5))."""
    try:
        with open(f"/proc/{pid}/stat", encoding="ascii") as handle:
            return handle.read().rsplit(")", 1)[1].split()[0] != "Z"
    except OSError:
        return False
