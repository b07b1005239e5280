"""A folder written in full beside its destination, then swapped in.

Files go into a temporary sibling folder (``.<name>.building-*``), from this process or
from worker processes, each with fixed permissions (folders 755, files 644) whatever the
umask. :meth:`StagedTree.commit` swaps the finished folder in: atomically where the
system allows (Linux ``renameat2`` exchange), else by two renames with the previous tree
kept aside (``.<name>.previous-*/site``) until the new one is in place. Nothing is ever
written into the destination itself, so a run killed at any moment leaves either the
previous tree or the new one, and a failure leaves the previous one untouched.
"""

from __future__ import annotations

import hashlib
import os
import shutil
import tempfile
from pathlib import Path

from sdofreport.errors import BuildError, naming_path

FOLDER_MODE = 0o755
FILE_MODE = 0o644

STAGING_PREFIX = ".building-"
RETIRED_PREFIX = ".previous-"


def _exchange(a: Path, b: Path) -> bool:
    """Atomically swap two paths (Linux renameat2 RENAME_EXCHANGE); False if unsupported."""
    if os.name != "posix":
        return False
    try:
        import ctypes
        import ctypes.util

        libc = ctypes.CDLL(ctypes.util.find_library("c") or None, use_errno=True)
        renameat2 = libc.renameat2
    except (OSError, AttributeError):
        return False
    at_fdcwd, rename_exchange = -100, 2
    result = renameat2(at_fdcwd, os.fsencode(str(a)), at_fdcwd, os.fsencode(str(b)),
                       rename_exchange)
    return result == 0


def inside_parts(root: Path, relative: str) -> list[str]:
    """
    The parts of ``relative`` when it names a file inside ``root``; else a BuildError.

    Refused: anything but a plain relative ``/``-separated path (absolute, empty parts,
    ``.`` or ``..``, a backslash, a control character), and a path that resolves
    outside ``root`` (through a symbolic link planted in the tree, say).
    """
    parts = relative.split("/") if isinstance(relative, str) else []
    plain = bool(parts) and all(
        part not in ("", ".", "..") and "\\" not in part and
        not any(ord(c) < 32 or ord(c) == 127 for c in part) for part in parts)
    if plain:
        base = Path(os.path.realpath(root))
        target = Path(os.path.realpath(Path(root, *parts)))
        plain = target != base and target.is_relative_to(base)
    if not plain:
        raise BuildError(f"refusing to write {relative!r}: it resolves outside the site "
                         f"folder being built ({root}); nothing was written there. An id "
                         f"or name that reached a file name is not safe.")
    return parts


def write_file(root: Path, relative: str, data: bytes, made: set[str]) -> str:
    """
    Write ``data`` to ``root/relative`` (mode 644, folders 755) and return its SHA-256.

    ``made`` holds the relative folders this process already created, so each is made
    (and its mode set) once; another process creating the same folder is harmless.
    Safe to call from several processes writing different files into one tree. A path
    that would leave ``root`` is refused before anything is made (:func:`inside_parts`);
    the file itself is opened without following a symbolic link.
    """
    parts = inside_parts(root, relative)
    with naming_path(root / relative):  # disk full, quota: say where, never a traceback
        return _write_file(root, relative, parts, data, made)


def _write_file(root: Path, relative: str, parts: list[str], data: bytes,
                made: set[str]) -> str:
    for depth in range(1, len(parts)):
        folder = "/".join(parts[:depth])
        if folder not in made:
            path = root / folder
            try:
                os.mkdir(path)
            except FileExistsError:
                pass
            os.chmod(path, FOLDER_MODE)
            made.add(folder)
    flags = os.O_WRONLY | os.O_CREAT | os.O_TRUNC | getattr(os, "O_NOFOLLOW", 0)
    descriptor = os.open(root / relative, flags, FILE_MODE)
    try:
        if hasattr(os, "fchmod"):
            os.fchmod(descriptor, FILE_MODE)  # the umask may have narrowed the mode
        view = memoryview(data)
        while view:
            view = view[os.write(descriptor, view):]
    finally:
        os.close(descriptor)
    if not hasattr(os, "fchmod"):
        os.chmod(root / relative, FILE_MODE)
    return hashlib.sha256(data).hexdigest()


class StagedTree:
    """
    A staging folder beside ``output`` that becomes ``output`` on :meth:`commit`.

    Use as a context manager: leaving it by an exception removes the staging folder.
    """

    def __init__(self, output: str | os.PathLike) -> None:
        self.output = Path(output)
        parent = self.output.resolve().parent
        parent.mkdir(parents=True, exist_ok=True)
        self.parent = parent
        self.folder = Path(tempfile.mkdtemp(prefix=f".{self.output.name}{STAGING_PREFIX}",
                                            dir=parent))
        self._made: set[str] = set()
        self._open = True

    def __enter__(self) -> StagedTree:
        return self

    def __exit__(self, kind, value, traceback) -> None:
        if self._open:
            self.discard()

    def write(self, relative: str, data: bytes) -> str:
        """Write one file (path relative to the tree, ``/``-separated); its SHA-256."""
        return write_file(self.folder, relative, data, self._made)

    def discard(self) -> None:
        """Remove the staging folder and everything in it."""
        self._open = False
        shutil.rmtree(self.folder, ignore_errors=True)

    def commit(self) -> Path:
        """Swap the finished tree in for ``output`` and return ``output``."""
        self.folder.chmod(FOLDER_MODE)
        output = self.output
        try:
            if output.exists():
                if _exchange(self.folder, output):
                    shutil.rmtree(self.folder, ignore_errors=True)  # now the old tree
                else:
                    retired = Path(tempfile.mkdtemp(
                        prefix=f".{output.name}{RETIRED_PREFIX}", dir=self.parent))
                    os.replace(output, retired / "site")
                    os.replace(self.folder, output)
                    shutil.rmtree(retired, ignore_errors=True)
            else:
                os.replace(self.folder, output)
        except BaseException:
            self.discard()
            raise
        self._open = False
        return output


def write_tree(files: dict[str, bytes], output: str | os.PathLike) -> Path:
    """Write ``files`` (relative path → bytes) as a tree that replaces ``output``."""
    with StagedTree(output) as tree:
        for path, data in sorted(files.items()):
            tree.write(path, data)
        return tree.commit()
