"""The wheel, installed the way offices and CI runners install it, builds the same site.

Sources of expected values: the files under templates/, the package list of
pyproject.toml and the package's own modules, read back from the wheel with an
independent reference library (zipfile); the example site built from the checkout, which
the integration tests check against closed forms.

Cost: one wheel build (pip, about 10 s), one virtual environment that sees the installed
dependencies (``--system-site-packages``) so only the wheel is new, and one build of the
example from it (its kernels are compiled afresh for the installed files' paths: 10-20 s
on the 2-core reference machine).
"""

from __future__ import annotations

import zipfile
from pathlib import Path

import pytest

from sdofreport import __version__
from tests.conftest import EXAMPLE, fresh_venv, run_checked as _run

ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture(scope="module")
def wheel(built_wheel) -> Path:
    return built_wheel


@pytest.fixture(scope="module")
def installed(wheel, tmp_path_factory) -> tuple[Path, dict]:
    """
    (scripts folder, environment variables) of a fresh virtual environment with only
    the wheel installed into it: the dependencies come from the system site-packages,
    and commands run from a folder outside the checkout, which is not importable.
    """
    scripts, env = fresh_venv(tmp_path_factory.mktemp("venv") / "env")
    _run([scripts / "python", "-m", "pip", "install", "--no-deps", "--no-index", "-q",
          wheel], env=env)
    return scripts, env


def _files(site: Path) -> dict[str, bytes]:
    return {p.relative_to(site).as_posix(): p.read_bytes() for p in site.rglob("*")
            if p.is_file()}


def test_wheel_contains_templates_schemas_and_every_module(wheel):
    names = set(zipfile.ZipFile(wheel).namelist())
    for template in (ROOT / "templates").rglob("*"):
        if template.is_file():
            relative = template.relative_to(ROOT / "templates").as_posix()
            assert f"sdofreport/templates/{relative}" in names
    for schema in ("results", "manifest"):
        assert f"sdofreport/schemas/{schema}.schema.json" in names
    # Every module of the package, generated tables (site/font_metrics.py) included:
    # a sub-package missing from pyproject.toml's list would be missing here.
    for module in (ROOT / "sdofreport").rglob("*.py"):
        assert module.relative_to(ROOT).as_posix() in names
    assert f"sdofreport-{__version__}.dist-info/entry_points.txt" in names


def test_installed_wheel_runs_outside_the_checkout(installed, tmp_path):
    scripts, env = installed
    where = _run([scripts / "python", "-c",
                  "import sdofreport; print(sdofreport.__file__)"], env=env, cwd=tmp_path)
    assert Path(where.stdout.strip()).resolve().is_relative_to(scripts.parent.resolve())
    command = _run([scripts / "sdofreport", "--version"], env=env, cwd=tmp_path)
    module = _run([scripts / "python", "-m", "sdofreport", "--version"], env=env,
                  cwd=tmp_path)
    assert command.stdout == module.stdout
    assert command.stdout.startswith(f"sdofreport {__version__} ")


def test_installed_wheel_builds_the_example_byte_identical_to_the_checkout(installed,
                                                                           built_example,
                                                                           tmp_path):
    scripts, env = installed
    from_wheel = tmp_path / "wheel-site"
    _run([scripts / "sdofreport", "build", EXAMPLE / "sdofreport.toml", "-o", from_wheel,
          "--quiet", "--no-cache"], env=env, cwd=tmp_path)
    # The checkout's build: the session's shared one (from its result cache; a cached
    # build is byte-identical to a fresh one, tests/integration checks that).
    wheel_files, checkout_files = _files(from_wheel), _files(built_example.site)
    assert sorted(wheel_files) == sorted(checkout_files)
    differ = [name for name in checkout_files if wheel_files[name] != checkout_files[name]]
    assert differ == []
