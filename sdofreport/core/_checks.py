"""Argument checks shared by the core modules; messages name parameter, value and unit."""

from __future__ import annotations

import math


def _number(value, name: str, unit: str, relation: str) -> float:
    if isinstance(value, bool):
        raise ValueError(f"{name} must be a number {relation} [{unit}]; got {value!r}")
    try:
        return float(value)
    except (TypeError, ValueError):
        raise ValueError(f"{name} must be a number {relation} [{unit}]; got {value!r}") \
            from None


def positive(value, name: str, unit: str) -> float:
    """``value`` as a float, or ValueError unless it is a finite number > 0."""
    x = _number(value, name, unit, "> 0")
    if not math.isfinite(x) or x <= 0.0:
        raise ValueError(f"{name} must be a finite number > 0 [{unit}]; got {value!r}")
    return x


def nonnegative(value, name: str, unit: str) -> float:
    """``value`` as a float, or ValueError unless it is a finite number >= 0."""
    x = _number(value, name, unit, ">= 0")
    if not math.isfinite(x) or x < 0.0:
        raise ValueError(f"{name} must be a finite number >= 0 [{unit}]; got {value!r}")
    return x


def period_pair(value, name: str) -> tuple[float, float]:
    """``(lower, upper)`` periods as floats, or ValueError unless 0 < lower < upper [s]."""
    try:
        lo, hi = (float(x) for x in value)
    except (TypeError, ValueError):
        raise ValueError(f"{name} must be a pair (lower, upper) [s]; got {value!r}") \
            from None
    if not (math.isfinite(lo) and math.isfinite(hi) and 0.0 < lo < hi):
        raise ValueError(f"{name} must satisfy 0 < lower < upper [s]; got {value!r}")
    return lo, hi
