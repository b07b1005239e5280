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
