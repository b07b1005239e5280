"""Absurd inputs and plain messages (issue 15, part 7) that the bad-input corpus table
does not cover: a byte-order mark before a valid project, a full disk, warnings.

Sources: POSIX ``errno`` ENOSPC ("No space left on device") as the standard library's
``os.strerror`` words it; the UTF-8 byte-order mark EF BB BF (Unicode Standard, §23.8);
the project's rule (DEVELOPERS.md) that a user error exits 2 naming file, line or key.
"""

from __future__ import annotations

import errno
import hashlib
import os
import subprocess
import sys
import textwrap
from pathlib import Path

import pytest

from sdofreport.errors import BuildError
from sdofreport.project.loader import load_project
from sdofreport.site import tree as tree_module
from sdofreport.site.tree import StagedTree
from tests.conftest import write_test_records
from tests.hardening.conftest import CORPUS

ROOT = Path(__file__).resolve().parents[2]


def test_byte_order_mark_before_a_project_is_accepted(tmp_path):
    folder = tmp_path / "p"
    write_test_records(folder)
    data = (CORPUS / "projects" / "bom_project.toml").read_bytes()
    assert data.startswith(b"\xef\xbb\xbf")
    (folder / "sdofreport.toml").write_bytes(data)
    project = load_project(folder / "sdofreport.toml")
    assert project.info.reference == "BAD-1"
    # The hash is of the file as it is, mark included (what verify will recompute).
    assert project.source_sha256 == hashlib.sha256(data).hexdigest()


def test_full_disk_names_the_path(tmp_path, monkeypatch):
    def full(descriptor, data):
        raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))

    monkeypatch.setattr(tree_module.os, "write", full)
    with StagedTree(tmp_path / "site") as tree:
        with pytest.raises(BuildError) as info:
            tree.write("figures/a.svg", b"<svg/>")
        staging = tree.folder
    message = info.value.message
    assert f"{staging / 'figures' / 'a.svg'}: could not be written: " \
           f"{os.strerror(errno.ENOSPC)}" in message
    assert not (tmp_path / "site").exists() and not staging.exists()


def test_os_error_without_a_file_name_is_one_plain_line():
    script = textwrap.dedent("""
        import errno, os, sys
        import sdofreport.cli as cli
        def boom(*args, **kwargs):
            raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
        cli.cli.main = boom
        cli.main(["build", "x.toml"])
    """)
    result = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True,
                            cwd=ROOT, env={**os.environ, "PYTHONPATH": str(ROOT)},
                            timeout=120)
    assert result.returncode == 2
    assert result.stderr.startswith(f"Error: {os.strerror(errno.ENOSPC)}")
    assert "Traceback" not in result.stderr and "Error: :" not in result.stderr


def test_numpy_warnings_never_reach_the_terminal(tmp_path):
    # A command whose computation overflows in numpy: the warning is debug log only.
    script = textwrap.dedent("""
        import numpy as np
        import sdofreport.cli as cli
        import click

        @cli.cli.command("overflow")
        def overflow():
            np.float64(1e300) * np.float64(1e300)
            np.array([1.0]) / np.array([0.0])
            click.echo("done")

        cli.main(["overflow"] + __import__("sys").argv[1:])
    """)
    env = {**os.environ, "PYTHONPATH": str(ROOT), "PYTHONWARNINGS": "default"}
    quiet = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True,
                           cwd=ROOT, env=env, timeout=120)
    assert quiet.returncode == 0 and quiet.stdout == "done\n"
    assert quiet.stderr == ""
    # With -v the same warnings are shown as debug log lines (positive control).
    verbose = subprocess.run([sys.executable, "-c", script.replace('["overflow"]',
                                                                   '["-v", "overflow"]')],
                             capture_output=True, text=True, cwd=ROOT, env=env, timeout=120)
    assert "RuntimeWarning" in verbose.stderr and "overflow" in verbose.stderr


@pytest.mark.parametrize("writer", ["record", "starter"])
def test_full_disk_names_the_file_of_every_writer(tmp_path, monkeypatch, writer):
    # Path.write_bytes and file objects fail inside write() with no file name, as a full
    # disk does (ENOSPC); the message must still name the file.
    class _Full:
        def __init__(self, handle):
            self.handle = handle

        def write(self, data):
            raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))

        def __getattr__(self, name):
            return getattr(self.handle, name)

        def __enter__(self):
            return self

        def __exit__(self, *exc):
            self.handle.close()

    if writer == "record":
        from sdofreport import fsio
        from sdofreport.records import writers

        # the record writers write through fsio.write_atomically (the one atomic write)
        real_fdopen = os.fdopen
        monkeypatch.setattr(fsio.os, "fdopen", lambda *a, **k: _Full(real_fdopen(*a, **k)))
        target = tmp_path / "r.csv"
        with pytest.raises(BuildError, match=f"{target}: could not be written: "
                                             f"{os.strerror(errno.ENOSPC)}"):
            writers.write_two_column(target, 0.01, [0.0, 0.1, 0.0], units="g")
        assert list(tmp_path.iterdir()) == []  # no temporary file left behind
    else:
        from sdofreport.authoring import starter

        def full(self, data):
            raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))

        monkeypatch.setattr(starter.Path, "write_bytes", full)
        with pytest.raises(BuildError, match=f"{tmp_path / 'new'}/.*: could not be written"):
            starter.write_starter(tmp_path / "new")


@pytest.mark.parametrize("option, found", [(["--duration", "1e9"], "1e+11 samples"),
                                           (["--dt", "1e-12"], "2.5e+13 samples")])
def test_synthesize_refuses_records_beyond_memory(tmp_path, option, found):
    # 1e11 float64 samples are 800 GB (arithmetic); the machine has 24 GiB.
    from click.testing import CliRunner

    from sdofreport.cli import cli

    result = CliRunner().invoke(cli, ["synthesize", "--target", "asce7-16:sds=1.0,sd1=0.6,"
                                      "tl=8", "-o", str(tmp_path / "out"), *option])
    assert result.exit_code == 2, result.output
    assert found in result.output and "at most 1,000,000" in result.output
    assert not (tmp_path / "out").exists()
