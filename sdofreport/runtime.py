"""The one explicit set-up of a process that runs sdofreport: :func:`configure`.

Importing sdofreport sets no environment variable, creates no folder and changes no
other module. The command-line entry point calls :func:`configure` once, before any
kernel runs; so do the engine's warm-up (the first kernels of a build) and every job a
worker runs (:func:`sdofreport.engine.jobs.run_job`: a spawned pool worker or a Dask worker
has not run the entry point). A program that calls the core directly may call it too;
without it the kernels give the same numbers, compiled in each process without numba's
disk cache and with the processor's default vector width.

What it does:

- Numba caches compiled machine code next to the source file by default. An installed
  package folder is often read-only (and in CI so is HOME), so unless the user has chosen
  ``NUMBA_CACHE_DIR``, it points that variable at a safe, writable per-user cache folder
  (:func:`sdofreport._cachedir.user_cache_dir`, created if needed). Numba's cache index
  files are pickles, loaded back when a kernel is compiled, so a folder that another
  user could write (also one the user chose) is not used: kernels are then compiled
  without a disk cache, and a warning says so.
- It lets LLVM use 512-bit vectors where the processor has them
  (:func:`_wide_vectors`).

Both must happen before numba compiles a kernel; numba reads its settings when it is
imported, so when numba is already loaded they are read again.
"""

from __future__ import annotations

import os
import sys

_CONFIGURED = False


def _choose_cache_folder() -> bool:
    """Point ``NUMBA_CACHE_DIR`` at a safe folder; False when there is none (then the
    kernels are compiled without numba's disk cache)."""
    from sdofreport._cachedir import private_folder, report_unusable, user_cache_dir

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


def configure() -> None:
    """
    Set this process up for sdofreport's compiled kernels: numba's cache folder and
    vector width (module docstring). Call it before the first kernel runs; later calls
    do nothing. Processes forked afterwards inherit the set-up.
    """
    global _CONFIGURED
    if _CONFIGURED:
        return
    _CONFIGURED = True
    disk_cache = _choose_cache_folder()
    _wide_vectors()
    if "numba" in sys.modules:  # imported already (not by us): let it read them again
        from numba.core import config

        config.reload_config()
    from sdofreport.core import _jit

    _jit.use_disk_cache(disk_cache)


__all__ = ["configure"]
