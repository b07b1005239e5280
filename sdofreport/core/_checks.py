"""
Argument checks shared by the core modules.

Every check returns the cleaned value or raises ``ValueError`` whose message names the
parameter (with its unit suffix, as the naming convention in DEVELOPERS.md asks), the
allowed range with the unit in brackets and the value found, for example
``time_step_s must be a finite number > 0 [s]; got -0.01``.
"""

from __future__ import annotations

import math

import numpy as np

#: Hint added when a damping ratio looks like a percentage.
PERCENT_HINT = " (a percentage? use 0.05 for 5 %)"


def _floats(value) -> np.ndarray | None:
    """``value`` as a float64 array, or None when it holds non-numbers."""
    try:
        return np.asarray(value, dtype=np.float64)
    except (TypeError, ValueError):
        return None


def number(value, name: str, unit: str, relation: str = "") -> float:
    """``value`` as a float, or ValueError unless it is a number (``bool`` refused)."""
    what = f"a number {relation}".rstrip()
    if isinstance(value, bool):
        raise ValueError(f"{name} must be {what} [{unit}]; got {value!r}")
    try:
        return float(value)
    except (TypeError, ValueError):
        raise ValueError(f"{name} must be {what} [{unit}]; got {value!r}") from None


def positive(value, name: str, unit: str) -> float:
    """``value`` as a float, or ValueError unless it is a finite number > 0."""
    x = number(value, name, unit, "> 0")
    if not math.isfinite(x) or x <= 0.0:
        raise ValueError(f"{name} must be a finite number > 0 [{unit}]; got {value!r}")
    return x


def nonnegative(value, name: str, unit: str) -> float:
    """``value`` as a float, or ValueError unless it is a finite number >= 0."""
    x = number(value, name, unit, ">= 0")
    if not math.isfinite(x) or x < 0.0:
        raise ValueError(f"{name} must be a finite number >= 0 [{unit}]; got {value!r}")
    return x


def in_range(value, name: str, unit: str, low: float, high: float, *,
             low_open: bool = False, high_open: bool = True, hint: str = "") -> float:
    """``value`` as a float, or ValueError unless it lies in the interval low..high.

    ``low_open`` / ``high_open`` exclude the ends; the message writes the interval
    as ``[0, 1)`` and so on. ``hint`` is appended when the value is a finite number
    above ``high``.
    """
    interval = f"{'(' if low_open else '['}{low:g}, {high:g}{')' if high_open else ']'}"
    x = number(value, name, unit, f"in {interval}")
    below = x <= low if low_open else x < low
    above = x >= high if high_open else x > high
    if math.isnan(x) or below or above:
        extra = hint if math.isfinite(x) and above else ""
        raise ValueError(f"{name} must be in {interval} [{unit}]; got {value!r}{extra}")
    return x


def ratio(value, name: str) -> float:
    """A dimensionless ratio in [0, 1) (hardening ratio, friction coefficient, ...)."""
    return in_range(value, name, "-", 0.0, 1.0)


def damping_ratio(value, name: str = "damping_ratio") -> float:
    """A fraction of critical damping in [0, 1), with a hint when it looks like a percentage."""
    return in_range(value, name, "-", 0.0, 1.0, hint=PERCENT_HINT)


def integer(value, name: str, minimum: int) -> int:
    """``value`` as an int, or ValueError unless it is an int (or numpy integer) >= ``minimum``.

    ``bool`` and floats (even integral ones such as ``4.0``) are refused.
    """
    if isinstance(value, bool) or not isinstance(value, (int, np.integer)) or value < minimum:
        raise ValueError(f"{name} must be an integer >= {minimum} [-]; got {value!r}")
    return int(value)


def one_of(value, name: str, choices, unit: str | None = None) -> str:
    """``value`` unchanged, or ValueError listing ``choices`` unless it is one of them.

    ``unit`` (``"-"`` for a dimensionless option) is written in brackets when given.
    """
    if not isinstance(value, str) or value not in choices:
        bracket = "" if unit is None else f" [{unit}]"
        raise ValueError(f"{name} must be one of {', '.join(choices)}{bracket}; got {value!r}")
    return value


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


def time_step(value, name: str = "time_step_s") -> float:
    """A sampling interval: a finite number > 0 [s]."""
    return positive(value, name, "s")


def finite_array(value, name: str, unit: str, *, min_size: int = 1) -> np.ndarray:
    """A 1-D float64 array of at least ``min_size`` finite values, or ValueError.

    The message names the first bad sample and its index.
    """
    x = _floats(value)
    if x is None:
        raise ValueError(
            f"{name} must be a 1-D array of numbers [{unit}]; got {type(value).__name__}"
        )
    if x.ndim != 1:
        raise ValueError(f"{name} must be 1-D [{unit}]; got an array of shape {x.shape}")
    if x.size < min_size:
        raise ValueError(
            f"{name} must have at least {min_size} samples [{unit}]; got {x.size}"
        )
    if not np.all(np.isfinite(x)):
        bad = int(np.flatnonzero(~np.isfinite(x))[0])
        raise ValueError(f"{name} must be finite [{unit}]; got {float(x[bad])!r} at sample {bad}")
    return x


def acceleration_history(value, name: str = "acceleration_m_s2") -> np.ndarray:
    """An equally spaced ground acceleration: >= 2 finite samples [m/s²], read-only.

    Always a read-only contiguous view: numba compiles a kernel once per argument type,
    and a read-only array is a different type from a writeable one, so without this the
    costliest kernels would be compiled (and cached) twice, once for each kind.
    """
    view = np.ascontiguousarray(finite_array(value, name, "m/s²", min_size=2)).view()
    view.flags.writeable = False
    return view


def same_length(first: np.ndarray, second: np.ndarray, names: tuple[str, str],
                unit: str) -> None:
    """ValueError unless two 1-D arrays have the same length."""
    if first.shape != second.shape:
        raise ValueError(
            f"{names[0]} and {names[1]} must have the same length [{unit}]; "
            f"got {first.size} and {second.size} samples"
        )


def oscillators(natural_periods_s, damping_ratios, *, allow_zero_period=True,
                periods_name="natural_periods_s", ratios_name="damping_ratios"):
    """Broadcast periods [s] and damping ratios [-] to two flat float64 arrays."""
    periods, zetas = _floats(natural_periods_s), _floats(damping_ratios)
    if periods is None:
        raise ValueError(f"{periods_name} must be numbers >= 0 [s]; got {natural_periods_s!r}")
    if zetas is None:
        raise ValueError(f"{ratios_name} must be numbers in [0, 1) [-]; got {damping_ratios!r}")
    if periods.size == 0:
        raise ValueError(f"{periods_name} must hold at least one period [s]; got none")
    if zetas.size == 0:
        raise ValueError(f"{ratios_name} must hold at least one ratio [-]; got none")
    bad = ~np.isfinite(periods) | (periods < 0.0 if allow_zero_period else periods <= 0.0)
    if np.any(bad):
        value = float(periods.ravel()[np.flatnonzero(bad.ravel())[0]])
        allowed = ">= 0" if allow_zero_period else "> 0"
        raise ValueError(f"{periods_name} must be finite and {allowed} [s]; got {value!r}")
    bad = ~np.isfinite(zetas) | (zetas < 0.0) | (zetas >= 1.0)
    if np.any(bad):
        value = float(zetas.ravel()[np.flatnonzero(bad.ravel())[0]])
        hint = PERCENT_HINT if np.isfinite(value) and value >= 1 else ""
        raise ValueError(
            f"{ratios_name} must be in [0, 1) [-] (critical and over-damped systems are "
            f"not supported); got {value!r}{hint}"
        )
    try:
        periods, zetas = np.broadcast_arrays(periods, zetas)
    except ValueError:
        raise ValueError(
            f"{periods_name} (shape {periods.shape}) and {ratios_name} "
            f"(shape {zetas.shape}) must broadcast to one list of oscillators"
        ) from None
    return (
        np.ascontiguousarray(periods.ravel(), dtype=np.float64),
        np.ascontiguousarray(zetas.ravel(), dtype=np.float64),
    )


def values_above(value, name: str, unit: str, minimum: float, *,
                 strict: bool = True) -> np.ndarray:
    """A non-empty 1-D float64 array of finite values > ``minimum`` (>= when not strict).

    A scalar becomes a one-element array; the message names the first bad value.
    """
    x = _floats(value)
    if x is None:
        raise ValueError(f"{name} must be numbers [{unit}]; got {value!r}")
    x = np.atleast_1d(x)
    if x.ndim != 1 or x.size == 0:
        raise ValueError(f"{name} must be a non-empty 1-D list [{unit}]; got shape {x.shape}")
    bad = ~np.isfinite(x) | ((x <= minimum) if strict else (x < minimum))
    if np.any(bad):
        rule = f"> {minimum:g}" if strict else f">= {minimum:g}"
        raise ValueError(
            f"{name} must be finite and {rule} [{unit}]; "
            f"got {float(x[np.flatnonzero(bad)[0]])!r}"
        )
    return x
