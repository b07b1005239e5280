"""Where sdofreport keeps caches: a writable per-user folder, else the temporary folder.

Imported by the numba set-up before numba loads, so it must stay free of heavy imports.
"""

from __future__ import annotations

import os
import tempfile


def _writable(path: str) -> bool:
    try:
        os.makedirs(path, exist_ok=True)
        probe = os.path.join(path, f".probe-{os.getpid()}")
        with open(probe, "w", encoding="ascii") as handle:
            handle.write("ok")
        os.remove(probe)
        return True
    except OSError:
        return False


def user_cache_dir(name: str) -> str:
    """
    A writable cache folder ``<cache root>/sdofreport/<name>``, created if needed.

    The root is ``$XDG_CACHE_HOME``, else ``~/.cache``; when neither is writable (a
    read-only HOME in CI, say) the system temporary folder is used.
    """
    candidates = []
    xdg = os.environ.get("XDG_CACHE_HOME")
    if xdg:
        candidates.append(os.path.join(xdg, "sdofreport", name))
    home = os.path.expanduser("~")
    if home and home != "~":
        candidates.append(os.path.join(home, ".cache", "sdofreport", name))
    uid = os.getuid() if hasattr(os, "getuid") else "user"
    candidates.append(os.path.join(tempfile.gettempdir(), f"sdofreport-{uid}", name))
    for path in candidates:
        if _writable(path):
            return path
    return candidates[-1]
