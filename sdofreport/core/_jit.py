"""Numba set-up shared by the compiled kernels, and numba loaded only when a kernel runs.

Numba caches compiled machine code next to the source file by default. An installed
package folder is often read-only (and in CI so is HOME), and then cached functions fail
at import. Unless the user has chosen ``NUMBA_CACHE_DIR``, we point it at a safe,
writable per-user cache folder (:func:`sdofreport._cachedir.user_cache_dir`). Numba's
cache index files are pickles, loaded back when a kernel is compiled, so a folder that
another user could write (also one the user chose) is not used: kernels are then
compiled without a disk cache, and a warning says so. This must happen before numba is
imported, which is why every kernel module gets numba through here.

Importing numba costs about 0.3 s, and a build whose results all come from the cache
runs no kernel. So :func:`njit` returns a stand-in that records the function and its
options; the first call of any kernel (or :func:`load_numba`) imports numba, compiles or
loads every recorded kernel exactly as the decorator would have, and puts the numba
dispatchers in place of the stand-ins in our modules, so kernels that call one another
are compiled against dispatchers. Kernels defined after that are compiled at once.
"""

from __future__ import annotations

import os
import sys
from typing import Any, Callable

from sdofreport._cachedir import private_folder, report_unusable, user_cache_dir


def _choose_cache_folder() -> bool:
    """Point ``NUMBA_CACHE_DIR`` at a safe folder; False when there is none (then the
    kernels are compiled without numba's disk cache)."""
    chosen = os.environ.get("NUMBA_CACHE_DIR")
    if chosen:
        folder, reason = private_folder(chosen)
        if folder is not None:
            return True
        report_unusable("numba cache (NUMBA_CACHE_DIR)", reason)
        return False
    folder = user_cache_dir("numba")
    if folder is None:
        return False
    os.environ["NUMBA_CACHE_DIR"] = folder
    return True


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


#: Decorator options shared by every kernel: compiled once, cached on disk.
JIT_OPTIONS = {"cache": True, "fastmath": False, "nogil": True}

_NUMBA: Any = None  # the numba module, once loaded
#: False when no safe folder was found for numba's cache (chosen now: numba reads
#: NUMBA_CACHE_DIR when it is imported, and something may import it before a kernel runs).
_DISK_CACHE = _choose_cache_folder()
_PENDING: list[_Kernel] = []  # stand-ins made before numba was loaded


class _Kernel:
    """Stands for a compiled kernel until numba is loaded; then forwards to it."""

    __slots__ = ("py_func", "options", "dispatcher")

    def __init__(self, py_func: Callable, options: dict) -> None:
        self.py_func, self.options, self.dispatcher = py_func, options, None

    def __call__(self, *args, **kwargs):
        if self.dispatcher is None:
            load_numba()
        return self.dispatcher(*args, **kwargs)

    def __getattr__(self, name: str):  # signatures, inspect_types, ... of the dispatcher
        if self.dispatcher is None:
            load_numba()
        return getattr(self.dispatcher, name)

    def __repr__(self) -> str:
        return f"<compiled kernel {self.py_func.__module__}.{self.py_func.__qualname__}>"


def _with_cache_choice(options: dict) -> dict:
    """``options`` without numba's disk cache when no safe folder was found for it."""
    return options if _DISK_CACHE else {**options, "cache": False}


def njit(function: Callable | None = None, **options):
    """``numba.njit`` with the same arguments, compiled when a kernel first runs."""

    def decorate(py_func: Callable):
        if _NUMBA is not None:
            return _NUMBA.njit(**_with_cache_choice(options))(py_func)
        kernel = _Kernel(py_func, options)
        _PENDING.append(kernel)
        return kernel

    return decorate(function) if function is not None else decorate


def load_numba():
    """
    Import numba (after choosing its cache folder and vector width) and turn every
    kernel stand-in into a numba dispatcher, also where our modules imported one by
    name; the numba module. Called by the first kernel call; cheap afterwards.
    """
    global _NUMBA
    if _NUMBA is not None:
        return _NUMBA
    _wide_vectors()
    import numba

    for kernel in _PENDING:
        kernel.dispatcher = numba.njit(**_with_cache_choice(kernel.options))(kernel.py_func)
    for name, module in list(sys.modules.items()):
        if name == "sdofreport" or name.startswith("sdofreport."):
            for attribute, value in list(vars(module).items()):
                if isinstance(value, _Kernel):
                    setattr(module, attribute, value.dispatcher)
    _PENDING.clear()
    _NUMBA = numba
    return numba


__all__ = ["JIT_OPTIONS", "load_numba", "njit"]
