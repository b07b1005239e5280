"""
Builders for idealised single-degree-of-freedom systems: mass, stiffness and period.

Each builder is a pure function returning a :class:`Derived` record whose
``derivation`` lines show the formula *and* the numbers used, so a reviewer can check
the arithmetic by hand. SI units throughout: kg, N/m, Pa, m⁴, m, s.

Formulas (standard structural dynamics, e.g. [1]_ ch. 1):

* lumped system: ``T = 2π √(m/k)``;
* columns sway stiffness: ``12EI/h³`` per column with both ends fixed against rotation,
  ``3EI/h³`` with one end pinned;
* springs: parallel ``k = Σ kᵢ``, series ``1/k = Σ 1/kᵢ``;
* static deflection under self weight: ``T = 2π √(δ/g)``;
* sliding (friction) pendulum bearing of radius R: ``T = 2π √(R/g)`` [2]_;
* compound pendulum: ``T = 2π √(I/(m g d))`` with I about the pivot.

References
----------
.. [1] A. K. Chopra, *Dynamics of Structures*, 5th ed. Hoboken, NJ, USA: Pearson, 2017.
.. [2] V. A. Zayas, S. S. Low and S. A. Mahin, "A simple pendulum technique for
   achieving seismic isolation," Earthquake Spectra, vol. 6, no. 2, pp. 317-333, 1990,
   doi: 10.1193/1.1585564.
"""

from __future__ import annotations

import difflib
import math
from dataclasses import dataclass

from sdofreport.core import _checks
from sdofreport.core._checks import positive as _positive
from sdofreport.core.decimal_text import HUGE, TINY, plain_decimal
from sdofreport.core.units import G

__all__ = [
    "END_CONDITIONS",
    "NETWORK_KEYS",
    "Derived",
    "columns",
    "hanging",
    "lumped",
    "sliding_pendulum",
    "spring_network",
    "springs",
    "static_deflection",
]

#: Column end conditions and their sway-stiffness coefficient c in k = c·EI/h³ per column.
END_CONDITIONS: dict[str, float] = {"fixed-fixed": 12.0, "fixed-pinned": 3.0}

#: Keys of a spring-network node: a leaf stiffness or a list of sub-networks.
NETWORK_KEYS: tuple[str, ...] = ("k", "series", "parallel")

_TWO_PI = 2.0 * math.pi


@dataclass(frozen=True)
class Derived:
    """Mass, stiffness and period of an idealised SDOF system, with the working shown."""

    #: lumped mass [kg]; None when only the period is known
    mass_kg: float | None
    #: lateral stiffness [N/m]; None when only the period is known or not defined
    stiffness_n_m: float | None
    #: undamped natural period [s]
    period_s: float
    #: one line per step: formula = numbers = result with unit
    derivation: tuple[str, ...]


# ----------------------------------------------------------------------- formatting
_SUPERSCRIPT = str.maketrans("-0123456789", "⁻⁰¹²³⁴⁵⁶⁷⁸⁹")


def _decimal(x: float, digits: int) -> str:
    """
    ``x`` to ``digits`` significant figures without trailing zeros, in plain decimals
    from 10⁻⁴ up to (not including) 10⁶ and as ``m × 10ⁿ`` outside that range: the
    pages' one number style (:mod:`sdofreport.core.decimal_text`), never an ``e``
    exponent.
    """
    if x == 0 or not math.isfinite(x):
        return f"{x:g}"
    if TINY <= abs(x) < HUGE:
        text = plain_decimal(x, digits)
        return text.rstrip("0").rstrip(".") if "." in text else text
    exponent = int(math.floor(math.log10(abs(x))))
    mantissa = x / 10.0 ** exponent
    if round(abs(mantissa), digits - 1) >= 10.0:  # 9.9999 rounds up to 10
        mantissa, exponent = mantissa / 10.0, exponent + 1
    text = f"{mantissa:.{digits - 1}f}".rstrip("0").rstrip(".")
    return f"{text} × 10{str(exponent).translate(_SUPERSCRIPT)}"


def _v(x: float) -> str:
    """An input value as given (up to 6 significant figures)."""
    return _decimal(x, 6)


def _r(x: float) -> str:
    """A computed value (4 significant figures)."""
    return _decimal(x, 4)


# --------------------------------------------------------------------------- checks
def _period_line(m: float, k: float) -> str:
    t = _TWO_PI * math.sqrt(m / k)
    return f"T = 2π √(m/k) = 2π × √({_r(m)} kg / {_r(k)} N/m) = {_r(t)} s"


# ------------------------------------------------------------------------- builders
def lumped(mass_kg=None, stiffness_n_m=None, natural_period_s=None) -> Derived:
    """
    A lumped SDOF system from two of mass, stiffness and period, or the period alone.

    Parameters
    ----------
    mass_kg : float or None
        Lumped mass, > 0. [kg]
    stiffness_n_m : float or None
        Lateral stiffness, > 0. [N/m]
    natural_period_s : float or None
        Undamped natural period, > 0. [s]

    Returns
    -------
    Derived
        With ``T = 2π √(m/k)`` solved for the missing quantity; mass and stiffness are
        None when only the period is given.

    Raises
    ------
    ValueError
        For a value <= 0 or not finite, or a combination other than mass and stiffness,
        mass and period, stiffness and period, or period alone.

    References
    ----------
    .. [1] A. K. Chopra, *Dynamics of Structures*, 5th ed. Hoboken, NJ, USA: Pearson,
       2017, sec. 2.1.
    """
    given = {
        name: value
        for name, value in (("mass_kg", mass_kg), ("stiffness_n_m", stiffness_n_m),
                            ("natural_period_s", natural_period_s))
        if value is not None
    }
    allowed = ("give mass_kg and stiffness_n_m, mass_kg and natural_period_s, stiffness_n_m and "
               "natural_period_s, or natural_period_s alone")
    if len(given) == 3 or (len(given) == 1 and natural_period_s is None) or not given:
        got = " and ".join(given) if given else "nothing"
        raise ValueError(f"lumped: {allowed}; got {got}")
    m = None if mass_kg is None else _positive(mass_kg, "mass_kg", "kg")
    k = None if stiffness_n_m is None else _positive(stiffness_n_m, "stiffness_n_m", "N/m")
    t = None if natural_period_s is None else _positive(natural_period_s, "natural_period_s", "s")
    if t is None:
        t = _TWO_PI * math.sqrt(m / k)
        lines = (_period_line(m, k),)
    elif m is not None:
        k = _TWO_PI ** 2 * m / t ** 2
        lines = (f"k = 4π² m / T² = 4π² × {_v(m)} kg / ({_v(t)} s)² = {_r(k)} N/m",)
    elif k is not None:
        m = k * t ** 2 / _TWO_PI ** 2
        lines = (f"m = k T² / 4π² = {_v(k)} N/m × ({_v(t)} s)² / 4π² = {_r(m)} kg",)
    else:
        lines = (f"T = {_v(t)} s (given; mass and stiffness not needed)",)
    return Derived(mass_kg=m, stiffness_n_m=k, period_s=t, derivation=lines)


def columns(count, elastic_modulus_pa, second_moment_m4, height_m, end_condition,
            mass_kg) -> Derived:
    """
    A storey carried by identical columns that sway with a rigid floor.

    Parameters
    ----------
    count : int
        Number of columns, >= 1. [-]
    elastic_modulus_pa : float
        Young's modulus E of the column material, > 0. [Pa]
    second_moment_m4 : float
        Second moment of area I of one column about the bending axis, > 0. [m⁴]
    height_m : float
        Column height h, > 0. [m]
    end_condition : {"fixed-fixed", "fixed-pinned"}
        Both ends fixed against rotation (``12EI/h³`` per column) or one end pinned
        (``3EI/h³``); see :data:`END_CONDITIONS`. [-]
    mass_kg : float
        Lumped floor mass, > 0. [kg]

    Returns
    -------
    Derived
        ``k = n c EI/h³`` and ``T = 2π √(m/k)``.

    References
    ----------
    .. [1] A. K. Chopra, *Dynamics of Structures*, 5th ed. Hoboken, NJ, USA: Pearson,
       2017, sec. 1.3.
    """
    count = _checks.integer(count, "count", 1)
    e = _positive(elastic_modulus_pa, "elastic_modulus_pa", "Pa")
    i = _positive(second_moment_m4, "second_moment_m4", "m⁴")
    h = _positive(height_m, "height_m", "m")
    _checks.one_of(end_condition, "end_condition", END_CONDITIONS)
    m = _positive(mass_kg, "mass_kg", "kg")
    c = END_CONDITIONS[end_condition]
    k = count * c * e * i / h ** 3
    lines = (
        f"k = n · {c:g}EI/h³ ({end_condition}) = {count} × {c:g} × {_v(e)} Pa × "
        f"{_v(i)} m⁴ / ({_v(h)} m)³ = {_r(k)} N/m",
        _period_line(m, k),
    )
    return Derived(mass_kg=m, stiffness_n_m=k, period_s=_TWO_PI * math.sqrt(m / k),
                   derivation=lines)


# -------------------------------------------------------------------- spring networks
def _reduce(node, path: str, lines: list[str], parent: str | None) -> float:
    """Equivalent stiffness [N/m] of ``node``; appends one line per composite node."""
    if not isinstance(node, dict):
        raise ValueError(
            f"{path} must be a table with one of the keys {', '.join(NETWORK_KEYS)}; "
            f"got {type(node).__name__} {node!r}"
        )
    unknown = [key for key in node if key not in NETWORK_KEYS]
    if unknown:
        key = unknown[0]
        near = difflib.get_close_matches(str(key), NETWORK_KEYS, n=1)
        hint = f" (did you mean {near[0]!r}?)" if near else ""
        raise ValueError(
            f"{path}: unknown key {key!r}{hint}; allowed keys are {', '.join(NETWORK_KEYS)}"
        )
    if len(node) != 1:
        keys = ", ".join(repr(key) for key in node) if node else "none"
        raise ValueError(
            f"{path} must have exactly one of the keys {', '.join(NETWORK_KEYS)}; "
            f"got {keys}"
        )
    (key, value), = node.items()
    where = f"{path}.{key}"
    if key == "k":
        if isinstance(value, bool):
            raise ValueError(f"{where} must be a number > 0 [N/m]; got {value!r}")
        try:
            k = float(value)
        except (TypeError, ValueError):
            raise ValueError(f"{where} must be a number > 0 [N/m]; got {value!r}") from None
        if math.isnan(k):
            raise ValueError(f"{where} must be a number > 0 [N/m]; got {value!r}")
        if math.isinf(k) and k > 0:
            if parent == "series":
                raise ValueError(
                    f"{where} must be finite [N/m]; got {value!r} (an infinitely stiff "
                    f"link in series adds nothing: leave it out)"
                )
            raise ValueError(
                f"{where} must be finite [N/m]; got {value!r} (an infinitely stiff spring "
                f"makes the whole system rigid)"
            )
        if k <= 0.0:
            raise ValueError(f"{where} must be > 0 [N/m]; got {value!r}")
        return k
    if not isinstance(value, (list, tuple)) or len(value) == 0:
        raise ValueError(
            f"{where} must be a non-empty list of sub-networks; got {value!r}"
        )
    parts = [_reduce(sub, f"{where}[{n}]", lines, key) for n, sub in enumerate(value)]
    if key == "parallel":
        k = math.fsum(parts)
        terms = " + ".join(_r(p) for p in parts)
        lines.append(f"{path}: parallel k = Σkᵢ = {terms} = {_r(k)} N/m")
    else:
        flexibility = math.fsum(1.0 / p for p in parts)
        k = 1.0 / flexibility
        terms = " + ".join(f"1/({_r(p)})" if " × " in _r(p) else f"1/{_r(p)}"
                           for p in parts)
        lines.append(f"{path}: series 1/k = Σ1/kᵢ = {terms} → k = {_r(k)} N/m")
    return k


def spring_network(network) -> float:
    """
    Equivalent stiffness of a nested series/parallel spring network.

    The network is plain Python data: a node is ``{"k": stiffness}`` (a spring, N/m),
    ``{"series": [node, ...]}`` or ``{"parallel": [node, ...]}``, for example
    ``{"series": [{"k": 2.0e7}, {"parallel": [{"k": 1e6}, {"k": 2e6}]}]}``.

    Parameters
    ----------
    network : dict
        The network description; spring stiffnesses finite and > 0. [N/m]

    Returns
    -------
    float
        Parallel ``k = Σkᵢ``, series ``1/k = Σ1/kᵢ``, reduced from the leaves up. [N/m]

    Raises
    ------
    ValueError
        Naming the path inside the network, e.g.
        ``network.series[1].parallel[0].k must be > 0 [N/m]; got -3``.
    """
    return _reduce(network, "network", [], None)


def springs(network, mass_kg) -> Derived:
    """
    A mass on a series/parallel spring network, with the reduction shown step by step.

    Parameters
    ----------
    network : dict
        As in :func:`spring_network`. [N/m]
    mass_kg : float
        Lumped mass, > 0. [kg]

    Returns
    -------
    Derived
        One derivation line per series or parallel group (innermost first), then
        ``T = 2π √(m/k)``.
    """
    lines: list[str] = []
    k = _reduce(network, "network", lines, None)
    m = _positive(mass_kg, "mass_kg", "kg")
    if not lines:
        lines.append(f"network: a single spring k = {_r(k)} N/m")
    lines.append(_period_line(m, k))
    return Derived(mass_kg=m, stiffness_n_m=k, period_s=_TWO_PI * math.sqrt(m / k),
                   derivation=tuple(lines))


# ----------------------------------------------------------------- gravity systems
def static_deflection(weight_n, deflection_m) -> Derived:
    """
    A system whose spring deflects ``δ`` under its own weight ``W``.

    Parameters
    ----------
    weight_n : float
        Weight carried by the spring, > 0. [N]
    deflection_m : float
        Static deflection under that weight, > 0. [m]

    Returns
    -------
    Derived
        ``m = W/g``, ``k = W/δ`` and ``T = 2π √(δ/g)`` with standard gravity g.
    """
    w = _positive(weight_n, "weight_n", "N")
    d = _positive(deflection_m, "deflection_m", "m")
    m = w / G
    k = w / d
    t = _TWO_PI * math.sqrt(d / G)
    lines = (
        f"m = W/g = {_v(w)} N / {G} m/s² = {_r(m)} kg",
        f"k = W/δ = {_v(w)} N / {_v(d)} m = {_r(k)} N/m",
        f"T = 2π √(δ/g) = 2π × √({_v(d)} m / {G} m/s²) = {_r(t)} s",
    )
    return Derived(mass_kg=m, stiffness_n_m=k, period_s=t, derivation=lines)


def sliding_pendulum(weight_n, radius_m, friction) -> Derived:
    """
    A friction pendulum bearing: a weight sliding on a spherical dish of radius R.

    Parameters
    ----------
    weight_n : float
        Weight carried by the bearing, > 0. [N]
    radius_m : float
        Radius of curvature of the sliding surface, > 0. [m]
    friction : float
        Coefficient of sliding friction μ, 0 <= μ < 1. [-]

    Returns
    -------
    Derived
        Mass ``W/g``, post-sliding stiffness ``W/R`` and period ``T = 2π √(R/g)``
        (Eq. for the pendulum period in [1]_); the friction force ``μW`` is shown in the
        derivation for reference.

    References
    ----------
    .. [1] V. A. Zayas, S. S. Low and S. A. Mahin, "A simple pendulum technique for
       achieving seismic isolation," Earthquake Spectra, vol. 6, no. 2, pp. 317-333,
       1990, doi: 10.1193/1.1585564.
    """
    w = _positive(weight_n, "weight_n", "N")
    r = _positive(radius_m, "radius_m", "m")
    mu = _checks.ratio(friction, "friction")
    m = w / G
    k = w / r
    t = _TWO_PI * math.sqrt(r / G)
    lines = (
        f"m = W/g = {_v(w)} N / {G} m/s² = {_r(m)} kg",
        f"k = W/R = {_v(w)} N / {_v(r)} m = {_r(k)} N/m (after sliding starts)",
        f"T = 2π √(R/g) = 2π × √({_v(r)} m / {G} m/s²) = {_r(t)} s",
        f"friction force μW = {_v(mu)} × {_v(w)} N = {_r(mu * w)} N",
    )
    return Derived(mass_kg=m, stiffness_n_m=k, period_s=t, derivation=lines)


def hanging(mass_kg, pivot_inertia_kg_m2, pivot_to_centre_m) -> Derived:
    """
    A compound (physical) pendulum swinging about a fixed pivot, small angles.

    Parameters
    ----------
    mass_kg : float
        Mass of the swinging body, > 0. [kg]
    pivot_inertia_kg_m2 : float
        Moment of inertia about the pivot; at least ``m d²`` (parallel-axis theorem:
        I = I_centre + m d² with I_centre >= 0). [kg·m²]
    pivot_to_centre_m : float
        Distance d from the pivot to the centre of mass, > 0. [m]

    Returns
    -------
    Derived
        ``T = 2π √(I/(m g d))``; ``stiffness_n_m`` is None because the pendulum is not
        a mass on a translational spring (the effective inertia is ``I/d²``, not m).
    """
    m = _positive(mass_kg, "mass_kg", "kg")
    i = _positive(pivot_inertia_kg_m2, "pivot_inertia_kg_m2", "kg·m²")
    d = _positive(pivot_to_centre_m, "pivot_to_centre_m", "m")
    i_min = m * d * d
    if i < i_min:
        raise ValueError(
            f"pivot_inertia_kg_m2 must be >= m d² = {_v(m)} kg × ({_v(d)} m)² = "
            f"{_r(i_min)} [kg·m²] (parallel-axis theorem); got {pivot_inertia_kg_m2!r}"
        )
    t = _TWO_PI * math.sqrt(i / (m * G * d))
    lines = (
        f"I >= m d² = {_v(m)} kg × ({_v(d)} m)² = {_r(i_min)} kg·m² (parallel-axis "
        f"theorem): I = {_v(i)} kg·m² is admissible",
        f"T = 2π √(I/(m g d)) = 2π × √({_v(i)} kg·m² / ({_v(m)} kg × {G} m/s² × "
        f"{_v(d)} m)) = {_r(t)} s",
    )
    return Derived(mass_kg=m, stiffness_n_m=None, period_s=t, derivation=lines)
