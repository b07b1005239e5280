"""Numba set-up shared by the compiled kernels.

Numba caches compiled machine code next to the source file by default. An installed
package folder is often read-only (and in CI so is HOME), and then cached functions fail
at import. Unless the user has chosen ``NUMBA_CACHE_DIR``, we point it at a writable
per-user cache folder, falling back to the system temporary folder. This must run before
numba is imported, which is why every kernel module imports numba through here.
"""

from __future__ import annotations

import os

from sdofreport._cachedir import user_cache_dir

if not os.environ.get("NUMBA_CACHE_DIR"):
    os.environ["NUMBA_CACHE_DIR"] = user_cache_dir("numba")

import numba  # noqa: E402  (must follow the cache-folder choice above)

#: Decorator options shared by every kernel: compiled once, cached on disk.
JIT_OPTIONS = {"cache": True, "fastmath": False, "nogil": True}

njit = numba.njit

__all__ = ["JIT_OPTIONS", "njit", "numba"]
