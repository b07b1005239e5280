"""Unit constants and the acceleration-unit table used at the records boundary.

Everything inside :mod:`sdofreport.core` is SI (m, s, kg, N). Conversions happen once,
where data enters (records, project file) or leaves (pages, JSON keys with unit suffixes).
"""

from __future__ import annotations

#: Standard acceleration of gravity [m/s²], ISO 80000-3 (exact by definition).
G = 9.80665

#: Length of one international inch [m] (exact by definition, 1959 agreement).
INCH = 0.0254
#: Length of one international foot [m] (exact by definition).
FOOT = 0.3048

#: Acceleration units a record may be declared in, mapped to their size [m/s²].
ACCELERATION_UNITS: dict[str, float] = {
    "g": G,
    "m/s2": 1.0,
    "cm/s2": 0.01,
    "gal": 0.01,
    "mm/s2": 0.001,
    "in/s2": INCH,
    "ft/s2": FOOT,
}

#: Spellings accepted for the same units (normalised to the keys above).
_ACCELERATION_ALIASES: dict[str, str] = {
    "m/s^2": "m/s2", "m/s²": "m/s2", "mps2": "m/s2",
    "cm/s^2": "cm/s2", "cm/s²": "cm/s2",
    "mm/s^2": "mm/s2", "mm/s²": "mm/s2",
    "in/s^2": "in/s2", "in/s²": "in/s2",
    "ft/s^2": "ft/s2", "ft/s²": "ft/s2",
    "gals": "gal",
}


def acceleration_unit_names() -> list[str]:
    """Canonical names of the supported acceleration units, in table order."""
    return list(ACCELERATION_UNITS)


def normalise_acceleration_unit(name: str) -> str:
    """
    Canonical spelling of an acceleration unit name.

    Parameters
    ----------
    name : str
        A unit such as ``"g"``, ``"cm/s^2"`` or ``"Gal"``. [-]

    Returns
    -------
    str
        One of :data:`ACCELERATION_UNITS`' keys.

    Raises
    ------
    ValueError
        If the name is not a supported acceleration unit.
    """
    key = str(name).strip()
    if key in ACCELERATION_UNITS:
        return key
    low = key.lower()
    if low in ACCELERATION_UNITS:
        return low
    if low in _ACCELERATION_ALIASES:
        return _ACCELERATION_ALIASES[low]
    allowed = ", ".join(ACCELERATION_UNITS)
    raise ValueError(f"acceleration unit must be one of {allowed}; got {name!r}")


def acceleration_factor(name: str) -> float:
    """Size of one unit of ``name`` in [m/s²] (multiply a value in that unit by it)."""
    return ACCELERATION_UNITS[normalise_acceleration_unit(name)]
