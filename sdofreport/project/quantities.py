"""Dimensional values from the project file: plain SI numbers or strings with units.

Strings are parsed by pint, a maintained units library. pint reads a bare ``g`` as the
gram, so where an acceleration is expected a standalone ``g`` is read as standard gravity
(``g_0`` = 9.80665 m/s², ISO 80000-3).
"""

from __future__ import annotations

import functools
import math
import re

#: Dimensions a project value may have: name -> (pint dimensionality text, SI unit).
DIMENSIONS: dict[str, tuple[str, str]] = {
    "length": ("[length]", "m"),
    "mass": ("[mass]", "kg"),
    "time": ("[time]", "s"),
    "force": ("[mass] * [length] / [time] ** 2", "N"),
    "stiffness": ("[mass] / [time] ** 2", "N/m"),
    "acceleration": ("[length] / [time] ** 2", "m/s²"),
    "pressure": ("[mass] / [length] / [time] ** 2", "Pa"),
    "second_moment": ("[length] ** 4", "m⁴"),
    "inertia": ("[mass] * [length] ** 2", "kg·m²"),
    "frequency": ("1 / [time]", "Hz"),
}

_BARE_G = re.compile(r"(?<![A-Za-z_0-9])g(?![A-Za-z_0-9])")


@functools.lru_cache(maxsize=1)
def _registry():
    import pint

    from sdofreport._cachedir import user_cache_dir

    try:  # pint's parsed-definitions cache makes start-up about ten times faster
        return pint.UnitRegistry(cache_folder=user_cache_dir("pint"))
    except Exception:  # an unusable cache folder must never stop a build
        return pint.UnitRegistry()


class QuantityError(ValueError):
    """A value that is not a number or a quantity of the expected dimension."""


def parse_quantity(value: object, dimension: str) -> float:
    """
    Convert a project-file value to a float in SI units.

    Parameters
    ----------
    value : int, float or str
        A number already in SI units, or a string such as ``"120 t"``, ``"4.2 MN/m"``,
        ``"26 kip/in"``, ``"18 ft"`` or ``"0.35 g"``. [-]
    dimension : str
        One of :data:`DIMENSIONS`.

    Returns
    -------
    float
        The value in the SI unit of ``dimension``.

    Raises
    ------
    QuantityError
        With a message saying what was expected and what was found.
    """
    pint_dim, si_unit = DIMENSIONS[dimension]
    if isinstance(value, bool):
        raise QuantityError(f"expected a {dimension} (number in {si_unit} or text with "
                            f"units), found {value!r}")
    if isinstance(value, (int, float)):
        number = float(value)
        if not math.isfinite(number):
            raise QuantityError(f"expected a finite {dimension}, found {value!r}")
        return number
    if not isinstance(value, str):
        raise QuantityError(f"expected a {dimension} (number in {si_unit} or text with "
                            f"units such as '{_EXAMPLES[dimension]}'), found "
                            f"{type(value).__name__} {value!r}")
    text = value.strip()
    try:  # a bare number written as text ("120") is an SI value
        number = float(text)
    except ValueError:
        pass
    else:
        if not math.isfinite(number):
            raise QuantityError(f"expected a finite {dimension}, found {value!r}")
        return number
    if dimension == "acceleration":
        text = _BARE_G.sub("g_0", text)
    ureg = _registry()
    try:
        quantity = ureg.Quantity(text)
    except Exception:  # pint raises several unrelated types for unreadable text
        raise QuantityError(f"cannot read {value!r} as a {dimension}; write a number and "
                            f"a unit such as '{_EXAMPLES[dimension]}'") from None
    if not hasattr(quantity, "dimensionality"):
        number = float(quantity)
    else:
        try:
            number = float(quantity.to_base_units().magnitude) if \
                quantity.dimensionality == ureg.get_dimensionality(pint_dim) else None
        except Exception:
            number = None
        if number is None:
            if quantity.dimensionless:
                raise QuantityError(
                    f"expected a {dimension} (for example '{_EXAMPLES[dimension]}'), found "
                    f"{value!r}, which is dimensionless, not a {dimension}")
            else:
                raise QuantityError(
                    f"expected a {dimension} (for example '{_EXAMPLES[dimension]}'), found "
                    f"{value!r}, which is a {quantity.dimensionality}")
    if not math.isfinite(number):
        raise QuantityError(f"expected a finite {dimension}, found {value!r}")
    return number


_EXAMPLES = {
    "length": "300 mm",
    "mass": "120 t",
    "time": "0.5 s",
    "force": "450 kN",
    "stiffness": "4.2 MN/m",
    "acceleration": "0.35 g",
    "pressure": "200 GPa",
    "second_moment": "8.5e-5 m**4",
    "inertia": "2400 kg*m**2",
    "frequency": "2 Hz",
}
