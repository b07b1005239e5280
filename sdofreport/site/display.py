"""Display units for the pages (results.json stays SI).

SI pages show mm, kN, t, kN/m, m/s and m/s² (accelerations also in g); US customary
pages show in, kip, kip·s²/in, kip/in, in/s and in/s² (accelerations also in g).
Conversion factors are exact by definition of the units (1 in = 0.0254 m,
1 lbf = 0.45359237 kg × 9.80665 m/s²).
"""

from __future__ import annotations

import math

from sdofreport.core.decimal_text import HUGE, TINY, below_tiny, plain_decimal
from sdofreport.core.units import G, INCH
from sdofreport.project.check_quantities import CHECK_QUANTITIES

_KIP_N = 1000.0 * 0.45359237 * G  # [N], exact by definition of the pound-force

#: quantity -> (unit label, factor: shown = SI value × factor), per display system.
DISPLAY_UNITS: dict[str, dict[str, tuple[str, float]]] = {
    "SI": {
        "length": ("mm", 1000.0),
        "velocity": ("m/s", 1.0),
        "acceleration": ("m/s²", 1.0),
        "force": ("kN", 1e-3),
        "mass": ("t", 1e-3),
        "stiffness": ("kN/m", 1e-3),
        "energy": ("kJ", 1e-3),
    },
    "US": {
        "length": ("in", 1.0 / INCH),
        "velocity": ("in/s", 1.0 / INCH),
        "acceleration": ("in/s²", 1.0 / INCH),
        "force": ("kip", 1.0 / _KIP_N),
        "mass": ("kip·s²/in", INCH / _KIP_N),
        "stiffness": ("kip/in", INCH / _KIP_N),
        "energy": ("kip·in", 1.0 / (_KIP_N * INCH)),
    },
}

#: Page label of each check quantity (the registry's, by key).
CHECK_LABELS = {key: q.label for key, q in CHECK_QUANTITIES.items()}


def number(value: float | None, digits: int = 4) -> str:
    """
    A value as every page writes numbers: ``digits`` significant figures in plain
    decimal notation, never an exponent.

    The one rule for small values (:mod:`sdofreport.core.decimal_text`): a magnitude
    below :data:`TINY` (0.0001 in the unit shown) is written ``"< 0.0001"``
    (``"> −0.0001"`` when negative); zero is ``"0"``. From 10⁶ up, whole numbers with
    thin-space thousands separators.
    """
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return "–"
    if value == 0:
        return "0"
    magnitude = abs(value)
    if magnitude < TINY:
        return below_tiny(value)
    if magnitude < HUGE:
        return plain_decimal(value, digits)
    return f"{value:,.0f}".replace(",", "\u2009")


class Display:
    """Formats SI values for one display system (``"SI"`` or ``"US"``)."""

    def __init__(self, system: str = "SI") -> None:
        self.system = system
        self.table = DISPLAY_UNITS[system]

    def unit(self, dimension: str) -> str:
        return self.table[dimension][0]

    def convert(self, value: float, dimension: str) -> float:
        return value * self.table[dimension][1]

    def show(self, value: float | None, dimension: str | None, digits: int = 4) -> str:
        """``"12.34 mm"``; accelerations as ``"0.312 g (3.06 m/s²)"``."""
        if value is None:
            return "–"
        if dimension is None:
            return number(value, digits)
        text = f"{number(self.convert(value, dimension), digits)} {self.unit(dimension)}"
        if dimension == "acceleration":
            return f"{number(value / G, digits)} g ({text})"
        return text

    def check_value(self, quantity: str, value: float) -> str:
        return self.show(value, CHECK_QUANTITIES[quantity].dimension)
