"""docs/ci.md's CI recipe, run as written against a wheel built from the repository; and
no documented or suggested install asks a package index for a name this project does
not own.

Sources of expected values: the recipe's own promises in docs/ci.md (exit statuses 0 or 3
with a site and a verified archive; a wheel whose hash differs is refused; the pinned
version is installed); the SHA-256 of the wheel from Python's hashlib, beside pip's own
``pip hash``; the Python Packaging User Guide's requirement forms (PEP 508: a bare name,
optionally with extras and a version, is looked up on an index; ``name @ URL`` is not).

Cost: one fresh virtual environment (the dependencies come from the system
site-packages, so only the wheel is installed) and one build of the example through the
recipe's scripts, kernels compiled afresh for the new installation (10-20 s on the 2-core
reference machine).
"""

from __future__ import annotations

import hashlib
import re
import shutil
import sys
import zipfile
from pathlib import Path

import pytest

from tests.conftest import EXAMPLE, fresh_venv, run_checked

from .conftest import DOCS, ROOT

#: A pip command that installs sdofreport by its bare name (PEP 508 name, optional extras
#: and version), so pip would look that name up on an index; ``sdofreport @ URL``, paths,
#: wheel files and ``-e .`` do not match.
_INDEX_NAME = re.compile(
    r"""pip3?\s+install\s+(?:--?[\w-]+(?:[=\s]\S+)?\s+)*?["']?sdofreport"""
    r"""(?:\[[^\]]*\])?\s*(?:[=<>!~]=?\s*[\w.*]+)?["']?(?=[\s`)\]]|$)(?!\s*@)""")


def _recipe() -> str:
    return (DOCS / "ci.md").read_text(encoding="utf-8")


def _scripts(text: str) -> dict[str, str]:
    """The recipe's shell scripts, by the file name their second line gives."""
    found = {}
    for block in re.findall(r"```bash\n(.*?)```", text, flags=re.DOTALL):
        named = re.match(r"#!/usr/bin/env bash\n# (ci/[\w.-]+\.sh):", block)
        if named:
            found[named.group(1)] = block
    return found


def _workflow(text: str) -> str:
    (block,) = re.findall(r"```yaml\n(.*?)```", text, flags=re.DOTALL)
    return block


@pytest.mark.parametrize("command, by_name", [
    ("pip install sdofreport", True),
    ("python -m pip install sdofreport==0.1.0", True),
    ("pip install -U 'sdofreport[dask]'", True),
    ("- run: python -m pip install sdofreport", True),
    ('pip install "sdofreport @ file:///w/sdofreport-0.1.0-py3-none-any.whl#sha256=ab"',
     False),
    ('python3 -m pip install -e ".[test,dask]"', False),
    ("pip install --no-deps ./dist/sdofreport-0.1.0-py3-none-any.whl", False),
    ("pip install sdofreport-0.1.0-py3-none-any.whl", False),
    ("pip install 'dask[distributed]>=2024.1'", False),
])
def test_the_index_name_detector_itself(command, by_name):
    # PEP 508: only the bare-name forms are resolved through a package index.
    assert bool(_INDEX_NAME.search(command)) is by_name


def test_nothing_installs_sdofreport_by_an_index_name():
    here = Path(__file__).resolve()
    files = [ROOT / "README.md", ROOT / "DEVELOPERS.md", ROOT / ".ci" / "run",
             ROOT / "pyproject.toml", *DOCS.glob("*.md"),
             *(path for path in (ROOT / "sdofreport").rglob("*.py")),
             *(path for path in (ROOT / "tests").rglob("*.py") if path != here)]
    found = [f"{path.relative_to(ROOT)}: {match.group(0)}" for path in files
             for match in _INDEX_NAME.finditer(path.read_text(encoding="utf-8"))]
    assert found == []


def test_the_workflow_runs_the_two_scripts_and_caches_the_folders_it_names():
    text = _recipe()
    workflow = _workflow(text)
    assert set(_scripts(text)) == {"ci/install-sdofreport.sh", "ci/build-site.sh"}
    runs = re.findall(r"- run: (.*)", workflow)
    assert runs == ["bash ci/install-sdofreport.sh", "bash ci/build-site.sh"]
    # The cached folder is the one sdofreport uses under the XDG_CACHE_HOME it sets
    # (sdofreport._cachedir: <XDG_CACHE_HOME>/sdofreport/<numba|results|pint>).
    assert "XDG_CACHE_HOME: ${{ github.workspace }}/.cache" in workflow
    assert re.search(r"path: \.cache/sdofreport\n", workflow)
    for folder in ("`numba/`", "`results/`", "`NUMBA_CACHE_DIR`", "`XDG_CACHE_HOME`",
                   "--cache-dir"):
        assert folder in text


def _pinned(script: str, version: str, sha256: str) -> str:
    """The install script with its two pin lines set, as a maintainer fills them in."""
    script, n_version = re.subn(r'^SDOFREPORT_VERSION=".*"$', f'SDOFREPORT_VERSION="{version}"',
                                script, flags=re.MULTILINE)
    script, n_hash = re.subn(r'^SDOFREPORT_SHA256=".*"$', f'SDOFREPORT_SHA256="{sha256}"',
                             script, flags=re.MULTILINE)
    assert (n_version, n_hash) == (1, 1), "the install script's pin lines changed form"
    return script


@pytest.mark.skipif(shutil.which("git") is None or shutil.which("bash") is None,
                    reason="the recipe runs in bash inside a git checkout")
def test_the_recipe_runs_as_written_against_a_wheel_built_from_the_repository(
        built_wheel, tmp_path):
    project = tmp_path / "project"  # a project repository: the example, at its root
    shutil.copytree(EXAMPLE, project)
    wheels = project / "ci" / "wheels"
    wheels.mkdir(parents=True)
    wheel = Path(shutil.copy2(built_wheel, wheels))
    version = re.match(r"sdofreport-([^-]+)-", wheel.name).group(1)
    sha256 = hashlib.sha256(wheel.read_bytes()).hexdigest()
    printed = run_checked([sys.executable, "-m", "pip", "hash", wheel]).stdout
    assert f"--hash=sha256:{sha256}" in printed  # the hash the recipe says to paste
    scripts = _scripts(_recipe())
    for name, text in scripts.items():
        (project / name).write_text(text, encoding="utf-8")
    git = ["git", "-C", project, "-c", "user.name=ci", "-c", "user.email=ci@example.invalid"]
    run_checked([*git, "init", "-q"])
    run_checked([*git, "add", "-A"])
    run_checked([*git, "commit", "-q", "-m", "project"])

    _, env = fresh_venv(tmp_path / "runner-python")
    env["XDG_CACHE_HOME"] = str(project / ".cache")  # as the workflow sets it
    install = project / "ci" / "install-sdofreport.sh"

    # A wheel whose hash differs from the pin is refused, and nothing is installed.
    install.write_text(_pinned(scripts["ci/install-sdofreport.sh"], version, "0" * 64))
    refused = run_unchecked(["bash", install], cwd=project, env=env)
    assert refused.returncode != 0 and "hash" in (refused.stdout + refused.stderr).lower()

    install.write_text(_pinned(scripts["ci/install-sdofreport.sh"], version, sha256))
    installed = run_checked(["bash", install], cwd=project, env=env)
    assert installed.stdout.splitlines()[-1].startswith(f"sdofreport {version} ")
    where = run_checked(["python", "-c", "import sdofreport; print(sdofreport.__file__)"],
                        cwd=tmp_path, env=env).stdout.strip()
    assert Path(where).resolve().is_relative_to((tmp_path / "runner-python").resolve())

    built = run_unchecked(["bash", project / "ci" / "build-site.sh"], cwd=project, env=env)
    # docs/ci.md: 0 when every check is within its limit, 3 when one exceeds it; the
    # site and the verified archive exist either way.
    assert built.returncode in (0, 3), built.stdout + built.stderr
    assert (project / "_site" / "index.html").is_file()
    (archive,) = (project / "archive").glob("*.zip")
    with zipfile.ZipFile(archive) as packed:
        assert packed.testzip() is None
    assert (project / ".cache" / "sdofreport" / "numba").is_dir()  # what CI caches


def run_unchecked(args, **kwargs):
    import subprocess

    return subprocess.run([str(a) for a in args], capture_output=True, text=True,
                          check=False, **kwargs)
