"""The archive commands as a click group sees them.

Sources of expected values: exit statuses and option names are our own interface
(README.md); file contents are checked against independent readers (reference library:
hashlib, zipfile, json).
"""

from __future__ import annotations

import click
import pytest
from click.testing import CliRunner

from sdofreport.cli.archive import register_commands


def test_register_commands_adds_the_four_commands():
    group = click.Group()
    register_commands(group)
    assert sorted(group.commands) == ["compare", "pack", "register", "verify"]


@pytest.mark.parametrize("name", ["verify", "compare", "pack", "register"])
def test_help_ends_with_a_worked_example(group, name):
    result = CliRunner().invoke(group, [name, "--help"])
    assert result.exit_code == 0
    description = result.output.split("Options:")[0].rstrip().splitlines()
    assert description[-2].strip() == "Example:"
    assert description[-1].strip().startswith(f"sdofreport {name} ")
