"""The wheel carries the templates and schemas, so an installed package builds sites.

Sources of expected values: the files under templates/ and the package list of
pyproject.toml, read back from the wheel with an independent reference library
(zipfile).
"""

from __future__ import annotations

import subprocess
import sys
import zipfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]


def test_wheel_contains_templates_and_schemas(tmp_path):
    result = subprocess.run([sys.executable, "-m", "pip", "wheel", str(ROOT), "--no-deps",
                             "-q", "-w", str(tmp_path)],
                            capture_output=True, text=True, check=False)
    if result.returncode != 0:
        pytest.skip(f"could not build a wheel here: {result.stderr.strip()[-300:]}")
    (wheel,) = tmp_path.glob("sdofreport-*.whl")
    names = set(zipfile.ZipFile(wheel).namelist())
    for template in (ROOT / "templates").rglob("*"):
        if template.is_file():
            relative = template.relative_to(ROOT / "templates").as_posix()
            assert f"sdofreport/templates/{relative}" in names
    for schema in ("results", "manifest"):
        assert f"sdofreport/schemas/{schema}.schema.json" in names
    for package in ("core", "records", "project", "site", "archive"):
        assert f"sdofreport/{package}/__init__.py" in names
