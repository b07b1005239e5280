"""The Markdown documentation: present, linked, in step with the code and cautious."""

from __future__ import annotations

import re
import shlex

import pytest

from sdofreport.schemas import load_schema

from .conftest import DOCS, ROOT

PAGES = ("README.md", "tutorial.md", "project-file.md", "results-json.md", "methods.md",
         "ci.md", "nomenclature.md")


def _text(name: str) -> str:
    return (DOCS / name).read_text(encoding="utf-8")


def test_every_page_exists_and_is_indexed():
    present = {p.name for p in DOCS.glob("*.md")}
    assert set(PAGES) <= present
    index = _text("README.md")
    for name in present - {"README.md"}:
        assert f"]({name})" in index, f"docs/README.md does not link {name}"


@pytest.mark.parametrize("name", PAGES)
def test_relative_links_resolve(name):
    for target in re.findall(r"\]\(([^)#:\s]+)(?:#[^)]*)?\)", _text(name)):
        assert (DOCS / target).exists(), f"{name}: broken link {target}"


@pytest.mark.parametrize("name", ["README.md", "tutorial.md", "results-json.md",
                                  "methods.md", "ci.md", "nomenclature.md"])
def test_pages_say_a_verdict_is_not_an_approval(name):
    assert re.search(r"not an\s+(\*\*)?approval", _text(name)), name


def _property_names(node, found: set[str]) -> set[str]:
    if isinstance(node, dict):
        for key, value in node.get("properties", {}).items():
            found.add(key)
            _property_names(value, found)
        for key, value in node.items():
            if key != "properties":
                _property_names(value, found)
    elif isinstance(node, list):
        for value in node:
            _property_names(value, found)
    return found


@pytest.mark.parametrize("schema_name", ["results", "manifest"])
def test_results_page_names_every_schema_key(schema_name):
    text = _text("results-json.md")
    missing = [key for key in sorted(_property_names(load_schema(schema_name), set()))
               if not re.search(rf"[`.]{re.escape(key)}[`.]", text)]
    assert missing == [], f"results-json.md does not describe: {missing}"
    assert "sdofreport/results@1" in text and "sdofreport/manifest@1" in text


def _shell_commands(text: str) -> list[list[str]]:
    """Argument lists of every `sdofreport ...` command in the fenced shell blocks."""
    commands = []
    for block in re.findall(r"```(?:bash|sh)\n(.*?)```", text, flags=re.DOTALL):
        for line in block.splitlines():
            line = line.split(" #")[0].strip()
            for part in re.split(r"&&|\|\||;|\|", line):
                words = shlex.split(part.split(">")[0], comments=True)
                if words and words[0] == "sdofreport":
                    commands.append(words[1:])
    return commands


@pytest.mark.parametrize("name", ["tutorial.md", "ci.md", "results-json.md"])
def test_documented_commands_and_options_exist(command_group, name):
    commands = _shell_commands(_text(name))
    assert commands, f"{name} shows no sdofreport command"
    for words in commands:
        command = command_group.commands.get(words[0])
        assert command is not None, f"{name}: unknown command {words[0]!r}"
        options = {opt for param in command.params for opt in getattr(param, "opts", [])}
        for word in words[1:]:
            if word.startswith("-"):
                assert word in options, f"{name}: {words[0]} has no option {word}"


def test_ci_recipe_builds_strict_packs_verifies_and_fails_on_3():
    commands = _shell_commands(_text("ci.md"))
    assert ["build", "sdofreport.toml", "-o", "_site", "--strict", "--quiet"] in commands
    assert any(words[0] == "pack" for words in commands)
    assert any(words[0] == "verify" for words in commands)
    assert '"$status" -eq 3' in _text("ci.md")


@pytest.mark.parametrize("test_file, quoted", [
    # methods.md quotes these tolerances; each must still be asserted in the test named.
    ("test_exact.py", ["1e-8 * scale", "rel=1e-4"]),
    ("test_newmark.py", ["rel=2e-5", "rtol=1e-11", "rtol=0.15"]),
    ("test_spectra.py", ["rtol=0.005", "rtol=0.006", "rel=0.02", "rel=0.01", "rel=0.002"]),
    ("test_rotd.py", ["math.cos(math.pi / 32.0)"]),
    ("test_nonlinear.py", ["2e-3 * peak", "3e-3 * peak", "rel=1e-3", "imbalance < 0.01",
                           "rel=5e-3"]),
    ("test_inelastic_spectra.py", ["atol=0.25", "atol=0.35", "rtol=5e-3", "rtol=1e-6",
                                   "rel=2e-4", "abs=2e-3"]),
    ("test_bilinear_exact.py", ["rel=2e-4", "rel=1e-8", "rel=1e-9"]),
])
def test_methods_page_quotes_tolerances_that_tests_assert(test_file, quoted):
    source = (ROOT / "tests" / "core" / test_file).read_text(encoding="utf-8")
    for fragment in quoted:
        assert fragment in source, f"{test_file} no longer asserts {fragment}"
    methods = _text("methods.md")
    assert f"tests/core/{test_file}" in methods


def test_methods_page_cites_each_published_method():
    methods = _text("methods.md")
    for citation in ("Nigam & Jennings (1969)", "Newmark (1959)", "Boore (2010)",
                     "ASCE/SEI 7-16 §11.4.6", "EN 1998-1 §3.2.2.2", "§16.2.3",
                     "§3.2.3.1.2", "§5.7", "Uang &", "Zayas, Low & Mahin",
                     "Arias", "Trifunac & Brady", "Rathje"):
        assert citation in methods, citation
