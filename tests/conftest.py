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
from dataclasses import dataclass
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


# ------------------------------------------------------------------ the built example

@dataclass(frozen=True)
class BuiltExample:
    """The bundled example as the ``build`` command wrote it, and the result cache used."""

    site: Path
    cache: Path


@pytest.fixture(scope="session")
def built_example(tmp_path_factory) -> BuiltExample:
    """
    The bundled example built once for the whole test session, through the command line
    as a user builds it (``build --quiet --cache-dir``), with its own result cache.

    Every test that reads the example's pages shares this one build: treat the folder as
    read-only. A test that must change files copies it first
    (``shutil.copytree(built_example.site, tmp_path / "site")``).
    """
    from click.testing import CliRunner

    from sdofreport.cli import cli

    root = tmp_path_factory.mktemp("example-build")
    site, cache = root / "site", root / "cache"
    result = CliRunner().invoke(cli, ["build", str(EXAMPLE / "sdofreport.toml"), "-o",
                                      str(site), "--quiet", "--cache-dir", str(cache)])
    assert result.exit_code == 0, result.output
    return BuiltExample(site=site, cache=cache)


def process_alive(pid: int) -> bool:
    """True while ``pid`` exists and is not a zombie (state in /proc/<pid>/stat, proc(5))."""
    try:
        with open(f"/proc/{pid}/stat", encoding="ascii") as handle:
            return handle.read().rsplit(")", 1)[1].split()[0] != "Z"
    except OSError:
        return False


# ---------------------------------------------------------------------- the wheel
#: Left out of the copy the wheel is built from: what a clean clone does not have.
_NOT_SOURCES = (".git", "build", "dist", "*.egg-info", "__pycache__", "_site", "_artifacts",
                ".pytest_cache", ".hypothesis", "*.nbi", "*.nbc")


def run_checked(args, **kwargs):
    """Run a command (arguments made strings); fail the test with its output if it fails."""
    import subprocess

    result = subprocess.run([str(a) for a in args], capture_output=True, text=True,
                            check=False, **kwargs)
    assert result.returncode == 0, f"{args}: {result.stdout[-3000:]}{result.stderr[-3000:]}"
    return result


@pytest.fixture(scope="session")
def built_wheel(tmp_path_factory) -> Path:
    """The wheel pip builds from a clean copy of the repository, as docs/ci.md says
    (about 10 s: pip fetches the build backend into an isolated environment)."""
    import shutil
    import sys

    root = tmp_path_factory.mktemp("wheel")
    source = root / "sdofreport-src"
    shutil.copytree(EXAMPLE.parents[1], source, ignore=shutil.ignore_patterns(*_NOT_SOURCES))
    run_checked([sys.executable, "-m", "pip", "wheel", "--no-deps", "-q", "-w",
                 root / "dist", source])
    (wheel,) = (root / "dist").glob("sdofreport-*.whl")
    return wheel


def fresh_venv(folder: Path) -> tuple[Path, dict]:
    """
    A new virtual environment in ``folder`` that sees the installed dependencies
    (``--system-site-packages``, so nothing is downloaded) but holds no sdofreport of its
    own; returns (its scripts folder, environment variables with that folder first on
    PATH and no PYTHONPATH, so the checkout is not importable from outside it).
    """
    import sys

    run_checked([sys.executable, "-m", "venv", "--system-site-packages", folder])
    scripts = folder / ("Scripts" if os.name == "nt" else "bin")
    if sys.prefix != sys.base_prefix:
        # Run from inside a virtual environment, whose packages --system-site-packages
        # does not reach: list its folders after the new environment's own (a .pth file
        # only extends sys.path; the .pth files in those folders, such as an editable
        # install's, are not run).
        import site

        purelib = run_checked([scripts / "python", "-c",
                               "import sysconfig; print(sysconfig.get_path('purelib'))"])
        Path(purelib.stdout.strip(), "_test_parent_packages.pth").write_text(
            "\n".join(site.getsitepackages()) + "\n", encoding="utf-8")
    # Not inherited either: numba settings this test process made for itself
    # (sdofreport.core._jit sets NUMBA_CACHE_DIR when it is imported).
    env = {k: v for k, v in os.environ.items()
           if k not in ("PYTHONPATH", "PYTHONHOME") and not k.startswith("NUMBA_")}
    env["PATH"] = f"{scripts}{os.pathsep}{env.get('PATH', '')}"
    return scripts, env
