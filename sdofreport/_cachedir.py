"""Where sdofreport keeps caches: only in folders that no other user can write.

Cache folders hold files that are loaded back (numba's and pint's caches hold pickles,
which run code when loaded), so a folder is used only when it and every folder above it
are safe: the folder belongs to this user and nobody else may write to it, and each
folder above belongs to this user or to root and is not writable by others unless it
has the sticky bit (like ``/tmp``, where nobody may rename or remove another user's
entries). Symbolic links are resolved first and the real path is the one used, so a link
swapped after the check cannot redirect the cache. A folder that fails is not used: the
build runs without that cache and says so once (a warning).

Imported by the numba set-up before numba loads, so it must stay free of heavy imports.
"""

from __future__ import annotations

import logging
import os
import stat
import tempfile

log = logging.getLogger("sdofreport.engine.cache")

#: Mode of the cache folders we create: only their owner may enter them.
PRIVATE_MODE = 0o700

# Reasons already reported, so each unusable folder is reported once per process.
_REPORTED: set[str] = set()


def _uid() -> int | None:
    return os.getuid() if hasattr(os, "getuid") else None


def unsafe_reason(path: str | os.PathLike) -> str | None:
    """
    Why the existing folder ``path`` is not a safe place for a cache, or None when it is.

    See the module docstring for the rule. On systems without user ids (Windows) every
    folder is accepted.
    """
    uid = _uid()
    real = os.path.realpath(path)
    try:
        info = os.stat(real)
    except OSError as exc:
        return f"{real} cannot be read ({exc.strerror or exc})"
    if not stat.S_ISDIR(info.st_mode):
        return f"{real} is not a folder"
    if uid is None:
        return None
    if info.st_uid != uid:
        return f"{real} belongs to another user (uid {info.st_uid})"
    if info.st_mode & (stat.S_IWGRP | stat.S_IWOTH):
        return f"{real} may be written by other users (mode {stat.S_IMODE(info.st_mode):o})"
    return _above_reason(os.path.dirname(real), uid)


def _above_reason(folder: str, uid: int) -> str | None:
    """Why ``folder`` or a folder above it may be changed by other users, or None."""
    above = folder
    while True:
        try:
            info = os.stat(above)
        except OSError as exc:
            return f"{above} cannot be read ({exc.strerror or exc})"
        if info.st_uid not in (uid, 0):
            return f"{above} belongs to another user (uid {info.st_uid})"
        if info.st_mode & (stat.S_IWGRP | stat.S_IWOTH) and not info.st_mode & stat.S_ISVTX:
            return (f"{above} may be written by other users (mode "
                    f"{stat.S_IMODE(info.st_mode):o}, no sticky bit)")
        parent = os.path.dirname(above)
        if parent == above:
            return None
        above = parent


def _make_private(path: str) -> str | None:
    """Create ``path`` and any missing folder above it, each only for this user, once
    the existing folder they go into is found safe; why not, or None."""
    missing = []
    current = os.path.abspath(path)
    while not os.path.isdir(current):
        missing.append(current)
        parent = os.path.dirname(current)
        if parent == current:
            break
        current = parent
    if not missing:
        return None
    uid = _uid()
    if uid is not None:
        reason = _above_reason(os.path.realpath(current), uid)
        if reason is not None:
            return f"{path} would be made inside {current}, and {reason}"
    for folder in reversed(missing):
        try:
            os.mkdir(folder, PRIVATE_MODE)
        except FileExistsError:
            pass  # made meanwhile, perhaps by someone else: the check after decides
    return None


def private_folder(path: str | os.PathLike, *, writable: bool = False) \
        -> tuple[str | None, str | None]:
    """
    ``(real path, None)`` when ``path`` is (or could be created as) a safe cache folder,
    else ``(None, reason)``. With ``writable`` the folder must also accept a new file.
    """
    path = os.fspath(path)
    try:
        reason = _make_private(path)
    except OSError as exc:
        return None, f"{path} cannot be created ({exc.strerror or exc})"
    reason = reason or unsafe_reason(path)
    if reason is not None:
        return None, reason
    real = os.path.realpath(path)
    if writable:
        try:
            descriptor, probe = tempfile.mkstemp(dir=real, prefix=".probe-")
            os.close(descriptor)
            os.remove(probe)
        except OSError as exc:
            return None, f"{real} cannot be written ({exc.strerror or exc})"
    return real, None


def report_unusable(what: str, reason: str) -> None:
    """Warn once per process that ``what`` runs without its cache, and why."""
    text = f"{what}: not using the cache folder, because {reason}; running without it"
    if text not in _REPORTED:
        _REPORTED.add(text)
        log.warning("%s", text)


def user_cache_dir(name: str, *, report: bool = True) -> str | None:
    """
    A safe, writable cache folder ``<cache root>/sdofreport/<name>``, created if needed,
    or None when there is none (then reported once, unless ``report`` is False).

    The root is ``$XDG_CACHE_HOME``, else ``~/.cache``; when neither gives a safe
    writable folder (a read-only HOME in CI, say), ``<temporary folder>/sdofreport-<uid>``
    is tried, which is used only when this user made it (another user may have made it
    first, to plant entries).
    """
    candidates = []
    xdg = os.environ.get("XDG_CACHE_HOME")
    if xdg:
        candidates.append(os.path.join(xdg, "sdofreport", name))
    home = os.path.expanduser("~")
    if home and home != "~":
        candidates.append(os.path.join(home, ".cache", "sdofreport", name))
    uid = _uid()
    candidates.append(os.path.join(tempfile.gettempdir(),
                                   f"sdofreport-{uid if uid is not None else 'user'}", name))
    reasons = []
    for path in candidates:
        folder, reason = private_folder(path, writable=True)
        if folder is not None:
            return folder
        reasons.append(reason)
    if report:
        report_unusable(f"{name} cache", "; ".join(reasons))
    return None
