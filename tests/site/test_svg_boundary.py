"""The direct-SVG figures keep to one module boundary (issue 16, item 7).

Source of the expected values: the boundary stated in the docstrings of
``sdofreport/site/svg_panels.py`` and ``sdofreport/site/figures.py`` and in
DEVELOPERS.md (our own design rule, no outside source); the imports are read with the
standard library's ``ast``, not by running the code.
"""

from __future__ import annotations

import ast
from pathlib import Path

PACKAGE = Path(__file__).resolve().parents[2] / "sdofreport"


def _imported_modules(path: Path) -> set[str]:
    """Every module a file imports, at the top or inside a function."""
    names = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.Import):
            names.update(alias.name for alias in node.names)
        elif isinstance(node, ast.ImportFrom) and node.module:
            names.add(node.module)
            names.update(f"{node.module}.{alias.name}" for alias in node.names)
    return names


def test_only_figures_imports_the_svg_back_end():
    importers = sorted(str(path.relative_to(PACKAGE)) for path in PACKAGE.rglob("*.py")
                       if "sdofreport.site.svg_panels" in _imported_modules(path))
    assert importers == ["site/figures.py"]


def test_the_svg_back_end_never_imports_matplotlib_or_the_site_above_it():
    imported = _imported_modules(PACKAGE / "site" / "svg_panels.py")
    assert not {name for name in imported if name.split(".")[0] == "matplotlib"}
    allowed = {"sdofreport.site.ticks", "sdofreport.site.symbols"}
    ours = {name.rsplit(".", 1)[0] if name.rsplit(".", 1)[0] in allowed else name
            for name in imported if name.startswith("sdofreport")}
    assert ours <= allowed, ours


def test_drawing_schedules_figures_without_a_back_end():
    imported = _imported_modules(PACKAGE / "site" / "drawing.py")
    assert "sdofreport.site.svg_panels" not in imported
    assert not {name for name in imported if name.split(".")[0] == "matplotlib"}
