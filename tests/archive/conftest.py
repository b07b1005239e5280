"""Small sites built once per test session for the archive tests.

The records are the synthetic ones of tests/conftest.py (inputs only). Tests that alter
a site copy it first (``copy_site``), so the built sites stay pristine.

Sources of expected values: none here (fixtures only); the tests name theirs.
"""

from __future__ import annotations

import shutil
import textwrap
from pathlib import Path

import click
import pytest

from sdofreport.build import build_site
from sdofreport.cli.archive import register_commands
from tests.conftest import ONE_SYSTEM, TWO_RECORDS, write_test_records

DATE = "2026-01-15"

SECOND_SYSTEM = """\
[[systems]]
id = "s2"
name = "System two"
damping = 0.05
mass = "10 t"
period = "1.0 s"
[systems.limits]
displacement = "100 mm"
"""


def project_text(revision: str = "0", *, date: str | None = DATE, limit: str = "50 mm",
                 r2_scale: float | None = None, second_system: bool = False,
                 title: str = "Archive test") -> str:
    """A small project: two records, one system (optionally two)."""
    head = textwrap.dedent(f"""\
        [project]
        title = "{title}"
        reference = "T-1"
        revision = "{revision}"
        prepared_by = "tester"
        """)
    if date is not None:
        head += f'date = "{date}"\n'
    records = TWO_RECORDS
    if r2_scale is not None:
        records = records.replace('file = "records/r2.txt"',
                                  f'file = "records/r2.txt"\nscale = {r2_scale}')
    systems = ONE_SYSTEM.replace('"50 mm"', f'"{limit}"')
    if second_system:
        systems += "\n" + SECOND_SYSTEM
    return head + "\n" + records + "\n" + systems


def write_project(folder: Path, text: str) -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    write_test_records(folder)
    path = folder / "sdofreport.toml"
    path.write_text(text, encoding="utf-8")
    return path


def build(folder: Path, text: str, cache: Path) -> Path:
    """Write the project under folder/project and build its site into folder/site."""
    project = write_project(folder / "project", text)
    return build_site(project, folder / "site", jobs=1, cache_dir=cache).output


@pytest.fixture(scope="session")
def sites(tmp_path_factory) -> dict[str, Path]:
    """Revision 0 (base), revision 1 (limit 40 mm, r2 scaled 1.5, system s2 added) and
    revision 2 (limit 45 mm)."""
    root = tmp_path_factory.mktemp("archive-sites")
    cache = root / "cache"
    return {
        "rev0": build(root / "rev0", project_text("0"), cache),
        "rev1": build(root / "rev1", project_text("1", limit="40 mm", r2_scale=1.5,
                                                  second_system=True), cache),
        "rev2": build(root / "rev2", project_text("2", limit="45 mm"), cache),
    }


@pytest.fixture
def copy_site(tmp_path):
    """Copy a built site into this test's folder (so it can be tampered with)."""

    def copy(site: Path, name: str = "site") -> Path:
        target = tmp_path / name
        shutil.copytree(site, target)
        return target

    return copy


@pytest.fixture(scope="session")
def group() -> click.Group:
    """A click group holding only the archive commands (the CLI wires them itself)."""
    cli = click.Group("sdofreport")
    register_commands(cli)
    return cli


def flip_byte(path: Path, offset: int | None = None) -> None:
    """Change exactly one byte of a file (XOR 0x01 at ``offset``, default the middle)."""
    data = bytearray(path.read_bytes())
    index = len(data) // 2 if offset is None else offset
    data[index] ^= 0x01
    path.write_bytes(bytes(data))
