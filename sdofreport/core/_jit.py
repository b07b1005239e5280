"""Numba loaded only when a kernel runs; every kernel module gets ``njit`` from here.

Importing numba costs about 0.3 s, and a build whose results all come from the cache
runs no kernel. So :func:`njit` returns a stand-in that records the function and its
options; the first call of any kernel (or :func:`load_numba`) imports numba and
compiles or loads every recorded kernel exactly as the decorator would have. The
stand-ins stay where they are (no other module is changed): each forwards calls and
attributes to its numba dispatcher, and numba types a stand-in as that dispatcher
(``_numba_type_``), so kernels that call one another are compiled against dispatchers.
Kernels defined after that are compiled at once.

Numba's disk cache is used only when :func:`sdofreport.runtime.configure` has found a
safe folder for it (it calls :func:`use_disk_cache`); that choice, like the vector width,
is made there, once per process, and never on import.
"""

from __future__ import annotations

from typing import Any, Callable


#: Decorator options shared by every kernel: compiled once, cached on disk.
JIT_OPTIONS = {"cache": True, "fastmath": False, "nogil": True}

_NUMBA: Any = None  # the numba module, once loaded
#: True once sdofreport.runtime.configure has found a safe folder for numba's cache.
_DISK_CACHE = False
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

    @property
    def _numba_type_(self):  # how numba types this stand-in: as its dispatcher
        if self.dispatcher is None:
            load_numba()
        return self.dispatcher._numba_type_

    def __repr__(self) -> str:
        return f"<compiled kernel {self.py_func.__module__}.{self.py_func.__qualname__}>"


def use_disk_cache(enabled: bool) -> None:
    """Let the kernels use numba's disk cache (``enabled``: a safe folder was chosen) or
    not; kernels already compiled keep their choice. Called by
    :func:`sdofreport.runtime.configure`."""
    global _DISK_CACHE
    _DISK_CACHE = bool(enabled)


def _with_cache_choice(options: dict) -> dict:
    """``options`` without numba's disk cache when no safe folder was chosen for it."""
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
    Import numba and give every kernel stand-in its numba dispatcher; the numba module.
    Called by the first kernel call; cheap afterwards.
    """
    global _NUMBA
    if _NUMBA is not None:
        return _NUMBA
    import numba

    for kernel in _PENDING:
        kernel.dispatcher = numba.njit(**_with_cache_choice(kernel.options))(kernel.py_func)
    _PENDING.clear()
    _NUMBA = numba
    return numba


__all__ = ["JIT_OPTIONS", "load_numba", "njit", "use_disk_cache"]
