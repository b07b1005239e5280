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


def _wide_vectors() -> None:
    """
    Let LLVM use 512-bit vectors where the processor has them.

    On processors with AVX-512, LLVM prefers 256-bit vectors by default (subtarget
    feature ``prefer-256-bit``), which halves the lanes of our oscillator loops. Turning
    that preference off keeps the same arithmetic per lane (results are bitwise the same,
    checked by the tests) and made the exact spectrum kernel about 1.7 times faster on
    the reference machine (measured; no published source). Skipped when the user has
    chosen NUMBA_CPU_FEATURES or NUMBA_CPU_NAME, or set SDOFREPORT_NARROW_VECTORS=1.
    """
    if any(os.environ.get(name) for name in ("NUMBA_CPU_FEATURES", "NUMBA_CPU_NAME",
                                                 "SDOFREPORT_NARROW_VECTORS")):
        return
    try:
        import llvmlite.binding as llvm

        features = llvm.get_host_cpu_features()
        if features.get("avx512f"):
            os.environ["NUMBA_CPU_FEATURES"] = features.flatten() + ",-prefer-256-bit"
    except Exception:  # never let a tuning step stop the program
        return


_wide_vectors()

import numba  # noqa: E402  (must follow the cache-folder choice above)

#: Decorator options shared by every kernel: compiled once, cached on disk.
JIT_OPTIONS = {"cache": True, "fastmath": False, "nogil": True}

njit = numba.njit

__all__ = ["JIT_OPTIONS", "njit", "numba"]
