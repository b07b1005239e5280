"""The one way a file or folder takes the place of another: whole, or not at all.

Every rename of the package is here (a test keeps it so):

* :func:`write_atomically` — one file's bytes go to a temporary sibling with a unique
  name (same folder, so the rename cannot cross file systems), are flushed to disk
  (``fsync``), and the sibling is renamed over the target (``os.replace``, atomic on
  POSIX); then the folder is flushed, so the rename itself survives a power cut. A
  failure, or a process killed at any moment, leaves any earlier file untouched.
* :func:`move_into_place` — a finished file or folder renamed onto a free path or over
  an old one, then the folder flushed.
* :func:`exchange` — two paths swapped in one step (Linux ``renameat2``), for a site
  folder replacing the previous one (:mod:`sdofreport.site.tree`).

The caches (:mod:`sdofreport.engine.cache`, the unit memo) write with ``durable=False``: their
entries carry a SHA-256 that is checked on every read, so one torn by a power cut is
discarded and recomputed, and a flush per entry (hundreds per build) is not paid.

References
----------
.. [1] The Open Group, "rename," The Open Group Base Specifications Issue 7 (POSIX.1-2017):
   the rename is atomic for other processes.
.. [2] The Open Group, "fsync," POSIX.1-2017; Linux fsync(2): "calling fsync() does not
   necessarily ensure that the entry in the directory containing the file has also
   reached disk. For that an explicit fsync() on a file descriptor for the directory is
   also needed."
"""

from __future__ import annotations

import contextlib
import os
import secrets
from pathlib import Path

from sdofreport.errors import naming_path

#: Suffix of the temporary sibling a file is written to before it is renamed.
PARTIAL_SUFFIX = ".partial"


def sync_folder(folder: str | os.PathLike) -> None:
    """Flush ``folder``'s entries (a rename into it) to disk; a no-op where folders
    cannot be opened (Windows) and when the file system refuses."""
    if os.name != "posix":
        return
    try:
        descriptor = os.open(folder, os.O_RDONLY | getattr(os, "O_DIRECTORY", 0))
    except OSError:
        return
    try:
        os.fsync(descriptor)
    except OSError:  # some file systems cannot flush a folder; the rename still happened
        pass
    finally:
        os.close(descriptor)


def _open_sibling(target: Path, mode: int | None) -> tuple[int, Path]:
    """A new temporary sibling of ``target`` with a unique name, opened for writing:
    (descriptor, path). Created 0o600 when ``mode`` is given (set when complete), else
    0o666 less the umask, as ``open(..., "w")`` would."""
    while True:
        temporary = target.with_name(f".{target.name[:80]}.{secrets.token_hex(6)}"
                                     f"{PARTIAL_SUFFIX}")
        try:
            return os.open(temporary, os.O_WRONLY | os.O_CREAT | os.O_EXCL |
                           getattr(os, "O_BINARY", 0), 0o600 if mode is not None
                           else 0o666), temporary
        except FileExistsError:
            continue


def _write(target: Path, data: bytes, mode: int | None, durable: bool) -> None:
    descriptor, temporary = _open_sibling(target, mode)
    try:
        with os.fdopen(descriptor, "wb") as stream:
            stream.write(data)
            stream.flush()
            if mode is not None and hasattr(os, "fchmod"):
                os.fchmod(stream.fileno(), mode)
            if durable:
                os.fsync(stream.fileno())
        if mode is not None and not hasattr(os, "fchmod"):
            os.chmod(temporary, mode)
        os.replace(temporary, target)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(temporary)
        raise
    if durable:
        sync_folder(target.parent)


def write_atomically(target: str | os.PathLike, data: bytes, *, mode: int | None = 0o644,
                     durable: bool = True, name_errors: bool = True) -> Path:
    """
    Write ``data`` to ``target`` through a temporary sibling and a rename.

    Parameters
    ----------
    target : str or os.PathLike
        File to create or replace; its folder is created if needed. [-]
    data : bytes
        The whole content. [-]
    mode : int or None
        Permission bits of the written file; None: 0o666 less the umask, as an ordinary
        ``open(..., "w")`` gives. [-]
    durable : bool
        Flush the file and then its folder to disk (``fsync``) so the new content
        survives a power cut; False for cache entries that are checked when read. [-]
    name_errors : bool
        Turn an ``OSError`` into a :class:`~sdofreport.errors.BuildError` that names
        ``target`` (a full disk names no file); False lets it through, for a cache that
        reports it and carries on. [-]

    Returns
    -------
    pathlib.Path
        ``target``.
    """
    target = Path(target)
    with naming_path(target) if name_errors else contextlib.nullcontext():
        target.parent.mkdir(parents=True, exist_ok=True)
        _write(target, data, mode, durable)
    return target


def move_into_place(source: str | os.PathLike, target: str | os.PathLike) -> None:
    """
    Rename the finished file or folder ``source`` to ``target`` in one step (replacing
    a file there, or an empty folder), then flush ``target``'s folder (and
    ``source``'s, when it differs) so the move survives a power cut. ``OSError`` as
    :func:`os.replace` raises it.
    """
    os.replace(source, target)
    folders = {os.path.dirname(os.path.abspath(target)),
               os.path.dirname(os.path.abspath(source))}
    for folder in sorted(folders):
        sync_folder(folder)


def exchange(a: str | os.PathLike, b: str | os.PathLike) -> bool:
    """
    Swap two existing paths in one step (Linux ``renameat2`` with ``RENAME_EXCHANGE``,
    see rename(2)), then flush their folder; False where the system cannot (nothing was
    changed then).
    """
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
    result = renameat2(at_fdcwd, os.fsencode(os.fspath(a)), at_fdcwd,
                       os.fsencode(os.fspath(b)), rename_exchange)
    if result != 0:
        return False
    for folder in sorted({os.path.dirname(os.path.abspath(a)),
                          os.path.dirname(os.path.abspath(b))}):
        sync_folder(folder)
    return True
