"""Shared helpers of the hardening tests: project folders, CLI runs, byte snapshots.

The bad-input corpus lives in ``tests/data/bad`` (hand-made, see its README.md); the good
records are the small seeded synthetic ones of ``tests/conftest.py``.

Sources of expected values: none here (helpers only).
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest
from click.testing import CliRunner

from sdofreport.cli import cli
from tests.conftest import ONE_SYSTEM, PROJECT_HEAD, TWO_RECORDS, write_test_records

CORPUS = Path(__file__).resolve().parents[1] / "data" / "bad"
#: The valid project of tests/conftest.py with a coarse period grid, to keep builds short.
GOOD_PROJECT = (PROJECT_HEAD + "\n[analysis]\nperiods = { min = 0.05, max = 4.0, count = 24 }\n\n"
                + TWO_RECORDS + "\n" + ONE_SYSTEM)

#: Prefixes of the folders a build stages beside the site (sdofreport/site/tree.py).
STAGING_MARKERS = (".building-", ".previous-")


def make_project_folder(folder: Path) -> Path:
    """A project folder: good records in records/, the corpus records in bad/, and a good
    sdofreport.toml; returns the project file."""
    write_test_records(folder)
    shutil.copytree(CORPUS / "records", folder / "bad", dirs_exist_ok=True)
    path = folder / "sdofreport.toml"
    path.write_text(GOOD_PROJECT, encoding="utf-8")
    return path


def invoke(*args: str):
    """Run the CLI in this process; unexpected exceptions are kept in ``result.exception``."""
    return CliRunner().invoke(cli, [str(a) for a in args], catch_exceptions=True)


def snapshot(folder: Path) -> dict[str, bytes]:
    """Every file under ``folder`` (relative POSIX path -> bytes); {} if it is absent."""
    if not folder.exists():
        return {}
    return {p.relative_to(folder).as_posix(): p.read_bytes()
            for p in sorted(folder.rglob("*")) if p.is_file()}


def listing(folder: Path) -> dict[str, tuple[int, int]]:
    """Every file under ``folder`` with its size and modification time (cheap to take)."""
    return {p.relative_to(folder).as_posix(): (p.stat().st_size, p.stat().st_mtime_ns)
            for p in sorted(folder.rglob("*")) if p.is_file()}


def staging_leftovers(output: Path) -> list[str]:
    """Names of staging or retired folders a build left beside ``output``."""
    return sorted(p.name for p in output.parent.iterdir()
                  if p.name.startswith(f".{output.name}.") and
                  any(marker in p.name for marker in STAGING_MARKERS))


def assert_user_error(result, *fragments: str) -> None:
    """Exit status 2 through a handled SdofreportError: message fragments, no traceback."""
    # Project rule (DEVELOPERS.md): a user error exits 2 with a message, never a traceback.
    assert result.exit_code == 2, (result.exit_code, result.output, result.exception)
    assert isinstance(result.exception, SystemExit), repr(result.exception)
    assert "Traceback" not in result.output
    for fragment in fragments:
        assert fragment in result.output, f"{fragment!r} not in {result.output!r}"


@pytest.fixture(scope="session")
def good_build(tmp_path_factory):
    """The good project built once (jobs 1, its own cache): folder, project, cache, site
    and the byte snapshot of the site."""
    folder = tmp_path_factory.mktemp("hardening-good")
    project = make_project_folder(folder / "proj")
    cache = folder / "cache"
    site = folder / "site"
    result = invoke("build", project, "-o", site, "--cache-dir", cache, "--jobs", "1", "-q")
    assert result.exit_code == 0, (result.output, result.exception)
    return {"folder": folder, "project": project, "cache": cache, "site": site,
            "snapshot": snapshot(site)}
