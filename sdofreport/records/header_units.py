"""Acceleration units stated in the header lines of a record file.

A file declared as g whose header says ``UNITS: CM/S/S`` would be read 981 times too
strong. The header lines are the lines before the first line of numbers (comment lines
included). A unit counts as stated when it is written as a unit, not as part of a
quantity: ``cm/s2``, ``cm/sec/sec``, ``m/s**2``, ``gal``... anywhere except right after a
number (``PGA 294 cm/s2`` is a value), and ``g`` only where it can only be a unit:
after ``units``/``units of``/``in``, as a column name (``accel_g``) or in brackets
(``(g)``, ``[g]``). ``PGA 0.41 g`` states a value, not the file's unit.
"""

from __future__ import annotations

import re

from sdofreport.core.units import ACCELERATION_UNITS

#: Header lines examined at most (the data start well before this in any real file).
MAX_HEADER_LINES = 200

_LENGTH_UNITS = {"mm": "mm/s2", "cm": "cm/s2", "m": "m/s2", "in": "in/s2", "ft": "ft/s2"}
_PER_SECOND_SQUARED = r"(?:\s*/\s*(?:s|sec)(?:\s*(?:\^|\*\*)?\s*2(?!\d)|²|\s*/\s*(?:s|sec)\b))"
_UNIT = re.compile(
    rf"(?<![A-Za-z])(?P<length>mm|cm|m|in|ft){_PER_SECOND_SQUARED}"
    r"|(?<![A-Za-z])(?P<gal>gals?)(?![A-Za-z])", re.IGNORECASE)
_G = re.compile(
    r"(?:(?<![A-Za-z])units?\s*(?:of|in|are|is)?\s*[:=]?\s*|(?<![A-Za-z])in\s+"
    r"|accel(?:eration)?s?_|[\[(]\s*)(?P<g>g)(?![A-Za-z0-9_/])", re.IGNORECASE)
_NUMBER_BEFORE = re.compile(r"\d\.?\s*$")
_NUMBER = re.compile(r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eEdD][+-]?\d+)?\Z")
_SPLIT = re.compile(r"[,;\s]+")


def _numbers_only(line: str) -> bool:
    tokens = [t for t in _SPLIT.split(line.split("#", 1)[0].strip()) if t]
    return bool(tokens) and all(_NUMBER.match(t) for t in tokens)


def _units_in(line: str) -> list[str]:
    found = []
    for match in _UNIT.finditer(line):
        if _NUMBER_BEFORE.search(line[:match.start()]):
            continue  # a value such as "294 cm/s2", not the file's unit
        found.append("gal" if match.group("gal") else
                     _LENGTH_UNITS[match.group("length").lower()])
    found.extend("g" for _ in _G.finditer(line))
    return found


def stated_units(text: str) -> tuple[tuple[str, int, str], ...]:
    """
    Units the header lines of a record file state for its accelerations.

    Parameters
    ----------
    text : str
        The file's text with LF line ends.

    Returns
    -------
    tuple of (unit, line, text)
        Canonical unit name (a key of
        :data:`sdofreport.core.units.ACCELERATION_UNITS`), its line from 1 and the
        line's text, for every unit stated before the first line of numbers.
    """
    found = []
    start = 0
    for number in range(1, MAX_HEADER_LINES + 1):
        end = text.find("\n", start)
        line = text[start:] if end < 0 else text[start:end]
        if _numbers_only(line):
            break
        found.extend((unit, number, line.strip()) for unit in _units_in(line))
        if end < 0:
            break
        start = end + 1
    return tuple(found)


def disagreement(declared: str, stated) -> tuple[str, int, str] | None:
    """The first stated unit of a different size from ``declared`` when no stated unit
    agrees with it (``gal`` and ``cm/s2`` agree), else None."""
    size = ACCELERATION_UNITS[declared]
    if not stated or any(ACCELERATION_UNITS[unit] == size for unit, _, _ in stated):
        return None
    return stated[0]
