"""Fixtures for the documentation, schema and starter tests.

``command_group`` is a click group holding every command of the real ``sdofreport``
group (build, pack, verify, ...) plus ``new`` and ``schema`` registered through
:func:`sdofreport.cli.new_and_schema.register`, so these tests do not depend on whether
sdofreport.cli.app has registered them yet.

Sources of expected values: none here (fixtures only).
"""

from __future__ import annotations

import json
from pathlib import Path

import click
import pytest
from click.testing import CliRunner

from sdofreport.cli import cli
from sdofreport.cli.new_and_schema import register

ROOT = Path(__file__).resolve().parents[2]
DOCS = ROOT / "docs"


@pytest.fixture(scope="session")
def command_group() -> click.Group:
    group = click.Group("sdofreport")
    for command in cli.commands.values():
        group.add_command(command)
    register(group)
    return group


def invoke(group: click.Group, *args: str):
    """Run one command in-process; return click's Result (exit_code, output)."""
    return CliRunner().invoke(group, [str(a) for a in args])


def read_site(site: Path) -> tuple[dict, dict]:
    """(results.json, manifest.json) of a built site."""
    results = json.loads((site / "data" / "results.json").read_text("utf-8"))
    manifest = json.loads((site / "manifest.json").read_text("utf-8"))
    return results, manifest


@pytest.fixture(scope="session")
def starter_site(tmp_path_factory, command_group):
    """The starter project written by ``new`` and built by the real ``build``."""
    root = tmp_path_factory.mktemp("starter")
    project = root / "pump_house"
    result = invoke(command_group, "new", project)
    assert result.exit_code == 0, result.output
    site = root / "site"
    built = invoke(command_group, "build", project / "sdofreport.toml", "-o", site,
                   "--quiet", "--cache-dir", root / "cache")
    assert built.exit_code == 0, built.output
    return project, site
