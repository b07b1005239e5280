"""Content-addressed cache of job results and figures (pickles in a folder).

A damaged or unreadable entry is a miss, never an error; writes are atomic (temporary
file, then rename), so a build killed at any moment leaves the cache usable.
"""

from __future__ import annotations

import hashlib
import json
import logging
import os
import pickle
import tempfile
from pathlib import Path

from sdofreport._cachedir import user_cache_dir

log = logging.getLogger("sdofreport.cache")


def default_cache_dir() -> str:
    """The default result cache folder (per user)."""
    return user_cache_dir("results")


def content_hash(payload: dict) -> str:
    """SHA-256 of a JSON-able payload in canonical form (sorted keys, no spaces)."""
    text = json.dumps(payload, sort_keys=True, separators=(",", ":"), default=str)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


class ResultCache:
    """Pickled job results in a folder, keyed by a content hash; ``None`` disables it."""

    def __init__(self, folder: str | os.PathLike | None) -> None:
        self.folder = Path(folder) if folder else None
        if self.folder is not None:
            self.folder.mkdir(parents=True, exist_ok=True)

    def _path(self, key: str) -> Path:
        return self.folder / key[:2] / f"{key}.pickle"

    def has(self, key: str) -> bool:
        """True when an entry is stored under ``key`` (without reading it)."""
        return self.folder is not None and self._path(key).is_file()

    def get(self, key: str):
        if self.folder is None:
            return None
        path = self._path(key)
        try:
            with open(path, "rb") as handle:
                return pickle.load(handle)
        except FileNotFoundError:
            return None
        except Exception:  # a damaged entry is a miss, never an error
            log.debug("cache entry %s unreadable; recomputing", path)
            return None

    def put(self, key: str, value) -> None:
        if self.folder is None:
            return
        path = self._path(key)
        try:
            path.parent.mkdir(parents=True, exist_ok=True)
            fd, tmp = tempfile.mkstemp(dir=path.parent, suffix=".tmp")
        except OSError as exc:  # a full or read-only cache must not stop a build
            log.warning("cache not written (%s)", exc)
            return
        try:
            with os.fdopen(fd, "wb") as handle:
                pickle.dump(value, handle, protocol=pickle.HIGHEST_PROTOCOL)
            os.replace(tmp, path)
        except OSError as exc:  # a full disk must not stop a build either: say where
            Path(tmp).unlink(missing_ok=True)
            log.warning("cache entry %s not written (%s)", path, exc.strerror or exc)
        except BaseException:
            Path(tmp).unlink(missing_ok=True)
            raise
