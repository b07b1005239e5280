"""docs/project-file.md is generated from the key registry and must not drift from it.

Sources of expected values: the key registry itself (sdofreport/project/schema.py);
no published values.
"""

from __future__ import annotations

import importlib.util
import re

import pytest

from sdofreport.project import schema

from .conftest import DOCS, ROOT

REGENERATE = "python tools/gen_reference.py"


@pytest.fixture(scope="module")
def gen_reference():
    path = ROOT / "tools" / "gen_reference.py"
    spec = importlib.util.spec_from_file_location("gen_reference", path)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def test_project_file_reference_is_up_to_date(gen_reference):
    committed = (DOCS / "project-file.md").read_text(encoding="utf-8")
    assert committed == gen_reference.render_reference(), (
        f"docs/project-file.md is out of date with sdofreport/project/schema.py; "
        f"regenerate it with: {REGENERATE}")


def _sections(text: str) -> dict[str, str]:
    """Heading text -> body of each '## `...`' section of the generated reference."""
    parts = re.split(r"^## `([^`]+)`$", text, flags=re.MULTILINE)
    return dict(zip(parts[1::2], parts[2::2]))


def test_every_registry_key_is_documented_in_its_section(gen_reference):
    sections = _sections(gen_reference.render_reference())
    for name, keys in schema.SECTIONS.items():
        heading = gen_reference.SECTION_INTRO.get(name, (f"[{name}]",))[0]
        body = sections[heading].split("\n### ")[0]  # the key table, not the kinds
        rows = re.findall(r"^\| `([^`]+)` \|", body, flags=re.MULTILINE)
        assert rows == list(keys), f"section {heading}"
        for spec in keys.values():
            row = next(line for line in body.splitlines()
                       if line.startswith(f"| `{spec.name}` |"))
            if spec.required:
                assert "**required**" in row
            if spec.example:
                assert spec.example.replace("|", "\\|") in row
            for choice in spec.choices or ():
                assert str(choice) in row


def test_quantities_show_their_si_unit(gen_reference):
    text = gen_reference.render_reference()
    row = next(line for line in text.splitlines() if line.startswith("| `stiffness` |"))
    assert 'stiffness: text with a unit (N/m for a plain number with plain_numbers = "SI")' in row
    row = next(line for line in text.splitlines() if line.startswith("| `sds` |"))
    assert "| g |" in row  # "in g" in the description gives the unit column


def test_check_mode_reports_a_stale_file(gen_reference, tmp_path, monkeypatch, capsys):
    stale = tmp_path / "project-file.md"
    stale.write_text("# old\n", encoding="utf-8")
    monkeypatch.setattr(gen_reference, "TARGET", stale)
    assert gen_reference.main(["--check"]) == 1
    assert REGENERATE in capsys.readouterr().err
    assert gen_reference.main([]) == 0
    assert gen_reference.main(["--check"]) == 0
    assert stale.read_text(encoding="utf-8") == gen_reference.render_reference()
