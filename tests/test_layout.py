"""The package layout DEVELOPERS.md describes: few loose modules at the package root.

Source: DEVELOPERS.md, "Layout" table (common practice, no outside source): each concept
has one home, so a new module joins a subpackage instead of the root.
"""

from __future__ import annotations

from pathlib import Path

import sdofreport

ROOT = Path(sdofreport.__file__).resolve().parent
DEVELOPERS = ROOT.parent / "DEVELOPERS.md"

#: the modules the layout table allows at the root
ROOT_MODULES = {"__init__.py", "__main__.py", "errors.py", "fsio.py", "runtime.py",
                "_cachedir.py", "build.py"}


def test_the_package_root_holds_only_the_shared_modules():
    found = {path.name for path in ROOT.glob("*.py")}
    assert found == ROOT_MODULES, (
        f"loose modules at the package root: {sorted(found - ROOT_MODULES)}; "
        f"missing: {sorted(ROOT_MODULES - found)} (update DEVELOPERS.md's layout table)")


def test_every_subpackage_has_a_row_in_the_layout_table():
    text = DEVELOPERS.read_text(encoding="utf-8")
    packages = sorted(p.name for p in ROOT.iterdir()
                      if (p / "__init__.py").is_file() and p.name != "templates")
    missing = [name for name in packages if f"`sdofreport/{name}/" not in text]
    assert packages and not missing, missing
