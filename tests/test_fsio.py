"""The one atomic write (sdofreport.fsio): whole or not at all, flushed, unique temporary
names, and no other module renaming files.

Sources of expected values: POSIX.1-2017 rename() (the target names the old file or the
new one, never a mix, for any other process) and fsync(); Linux fsync(2) (a rename is
durable once its folder is flushed); the permission bits ``open(2)`` gives a new file
(0o666 less the umask); Python's ``ast`` module to read the package's own source.
"""

from __future__ import annotations

import ast
import os
import signal
import stat
import subprocess
import sys
from pathlib import Path

import pytest

from sdofreport import fsio
from sdofreport.errors import BuildError

PACKAGE = Path(__file__).resolve().parents[1] / "sdofreport"


def _renames(source: str) -> list[int]:
    """Lines of ``source`` that rename a path: os.replace/rename/renames, shutil.move,
    anything's ``.rename(...)``, and ``.replace(target)`` with one argument (pathlib's;
    str.replace takes two, dataclasses.replace keywords)."""
    lines = []
    for node in ast.walk(ast.parse(source)):
        if not (isinstance(node, ast.Call) and isinstance(node.func, ast.Attribute)):
            continue
        owner = node.func.value.id if isinstance(node.func.value, ast.Name) else None
        name = node.func.attr
        if (owner == "os" and name in ("replace", "rename", "renames")) or \
                (owner == "shutil" and name == "move") or name == "rename" or \
                (name == "replace" and owner != "dataclasses" and len(node.args) == 1
                 and not node.keywords):
            lines.append(node.lineno)
    return lines


def test_no_module_but_fsio_renames_files():
    found = {str(path.relative_to(PACKAGE)): _renames(path.read_text("utf-8"))
             for path in sorted(PACKAGE.rglob("*.py"))}
    assert found["fsio.py"], "the check finds no rename even in fsio (it cannot fail)"
    assert {path: lines for path, lines in found.items()
            if lines and path != "fsio.py"} == {}


def test_a_write_interrupted_before_the_rename_leaves_the_old_file(tmp_path, monkeypatch):
    target = tmp_path / "results.json"
    target.write_bytes(b"old")

    def interrupted(descriptor):  # the new bytes are written, not yet renamed
        raise KeyboardInterrupt

    monkeypatch.setattr(fsio.os, "fsync", interrupted)
    with pytest.raises(KeyboardInterrupt):
        fsio.write_atomically(target, b"new" * 1000)
    assert target.read_bytes() == b"old"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["results.json"]  # no sibling


def test_a_full_disk_names_the_file_and_keeps_the_old_one(tmp_path, monkeypatch):
    target = tmp_path / "table.csv"
    target.write_bytes(b"old")

    def full(descriptor):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(fsio.os, "fsync", full)
    with pytest.raises(BuildError, match="table.csv: could not be written: No space"):
        fsio.write_atomically(target, b"new")
    with pytest.raises(OSError):  # a cache reports the OSError itself
        fsio.write_atomically(target, b"new", name_errors=False)
    assert target.read_bytes() == b"old"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["table.csv"]


_KILLED = r"""
import os, sys, time
from sdofreport import fsio
def stall(descriptor):            # the new bytes are in the sibling: now kill me
    print("written", flush=True)
    time.sleep(600)
fsio.os.fsync = stall
fsio.write_atomically(sys.argv[1], b"new" * 100000)
"""


@pytest.mark.skipif(os.name != "posix", reason="SIGKILL")
def test_a_process_killed_while_writing_leaves_the_old_file(tmp_path):
    target = tmp_path / "record.csv"
    target.write_bytes(b"old")
    process = subprocess.Popen([sys.executable, "-c", _KILLED, str(target)],
                               stdout=subprocess.PIPE, text=True)
    try:
        assert process.stdout.readline().strip() == "written"
    finally:
        process.send_signal(signal.SIGKILL)
        process.wait()
    assert target.read_bytes() == b"old"
    # The unfinished sibling stays behind, hidden, under a name of its own.
    left = [p.name for p in tmp_path.iterdir() if p.name != "record.csv"]
    assert len(left) == 1 and left[0].startswith(".record.csv.") and \
        left[0].endswith(fsio.PARTIAL_SUFFIX)


def test_durable_writes_flush_the_file_and_then_its_folder(tmp_path, monkeypatch):
    flushed = []
    real_fsync = os.fsync

    def record(descriptor):
        flushed.append("folder" if stat.S_ISDIR(os.fstat(descriptor).st_mode) else "file")
        real_fsync(descriptor)

    monkeypatch.setattr(fsio.os, "fsync", record)
    fsio.write_atomically(tmp_path / "a.txt", b"a")
    assert flushed == ["file", "folder"]
    flushed.clear()
    fsio.write_atomically(tmp_path / "b.entry", b"b", durable=False)  # cache entries
    assert flushed == []
    assert (tmp_path / "a.txt").read_bytes() == b"a"
    assert (tmp_path / "b.entry").read_bytes() == b"b"


def test_a_temporary_name_already_taken_is_never_overwritten(tmp_path, monkeypatch):
    taken = tmp_path / f".out.txt.aaaa{fsio.PARTIAL_SUFFIX}"
    taken.write_bytes(b"someone else's")
    tokens = iter(["aaaa", "aaaa", "bbbb"])
    monkeypatch.setattr(fsio.secrets, "token_hex", lambda size: next(tokens))
    fsio.write_atomically(tmp_path / "out.txt", b"mine")
    assert taken.read_bytes() == b"someone else's"
    assert (tmp_path / "out.txt").read_bytes() == b"mine"


@pytest.mark.skipif(os.name != "posix", reason="POSIX permission bits")
def test_modes_fixed_or_as_open_gives(tmp_path):
    old = os.umask(0o027)
    try:
        fsio.write_atomically(tmp_path / "fixed", b"x", mode=0o644)
        fsio.write_atomically(tmp_path / "private", b"x", mode=0o600)
        fsio.write_atomically(tmp_path / "as-open", b"x", mode=None)
    finally:
        os.umask(old)
    modes = {p.name: stat.S_IMODE(p.stat().st_mode) for p in tmp_path.iterdir()}
    assert modes == {"fixed": 0o644, "private": 0o600, "as-open": 0o666 & ~0o027}
