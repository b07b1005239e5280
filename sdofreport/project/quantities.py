"""Dimensional values from the project file: plain SI numbers or strings with units.

Strings are parsed by pint, a maintained units library. pint reads a bare ``g`` as the
gram, so where an acceleration is expected a standalone ``g`` is read as standard gravity
(``g_0`` = 9.80665 m/s², ISO 80000-3).

Importing pint and building its registry costs about half a second, more than the rest
of reading a project; so every string pint has converted is remembered in a small
per-user file (:func:`save_memo`), keyed by the versions of pint and of this package, and
a project whose strings were all seen before is read without importing pint. Values in
the memo are pint's own results, so they are the same either way. The file carries the
SHA-256 of its entries: a damaged memo is discarded (and reported), never used. It lives
only in a folder no other user can write (:mod:`sdofreport._cachedir`), and builds
without a cache do not use it (:func:`without_memo`).
"""

from __future__ import annotations

import contextlib
import functools
import hashlib
import json
import logging
import math
import os
import re

from sdofreport.fsio import write_atomically

log = logging.getLogger("sdofreport.project")

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
    "slowness": ("[time] / [length]", "s/m"),
}

_BARE_G = re.compile(r"(?<![A-Za-z_0-9])g(?![A-Za-z_0-9])")


@functools.lru_cache(maxsize=1)
def _registry():
    import pint

    from sdofreport._cachedir import user_cache_dir

    # pint's parsed-definitions cache makes start-up about ten times faster; it holds
    # pickles, so only a folder no other user can write is used (None: no cache).
    folder = user_cache_dir("pint") if _MEMO_ENABLED else None
    try:
        return pint.UnitRegistry(cache_folder=folder)
    except Exception:  # an unusable cache folder must never stop a build
        return pint.UnitRegistry()


#: Memo of converted strings, "dimension|text" -> SI value (see the module docstring),
#: and the entries this process added since it last saved.
_MEMO: dict[str, float] | None = None
_MEMO_NEW: dict[str, float] = {}
#: False while the memo is switched off (:func:`without_memo`).
_MEMO_ENABLED = True
#: Version of the memo file's layout.
MEMO_FORMAT = 2


@contextlib.contextmanager
def without_memo():
    """Convert every string with pint, neither reading nor writing the memo (nor pint's
    own cache): for builds without a cache and re-runs that must recompute."""
    global _MEMO_ENABLED, _MEMO
    saved = _MEMO_ENABLED, _MEMO
    _MEMO_ENABLED, _MEMO = False, {}
    try:
        yield
    finally:
        _MEMO_ENABLED, _MEMO = saved
        _MEMO_NEW.clear()


@functools.lru_cache(maxsize=1)
def _memo_path() -> str | None:
    from importlib.metadata import version

    from sdofreport import __version__
    from sdofreport._cachedir import user_cache_dir

    folder = user_cache_dir("pint")
    if folder is None:
        return None
    return os.path.join(folder, f"quantities-{version('pint')}-{__version__}.json")


def _entries_digest(entries: dict) -> str:
    text = json.dumps(entries, sort_keys=True, separators=(",", ":"))
    return hashlib.sha256(f"{MEMO_FORMAT}|{text}".encode()).hexdigest()


def _read_memo() -> dict[str, float]:
    """The memo file's entries; an absent file reads as empty, and so does a damaged one
    (its SHA-256 does not match, or it is not the current layout), which is reported."""
    path = _memo_path()
    if path is None:
        return {}
    try:
        with open(path, encoding="utf-8") as handle:
            loaded = json.load(handle)
    except FileNotFoundError:
        return {}
    except (OSError, ValueError) as exc:
        return _discard(path, f"unreadable ({type(exc).__name__})")
    if not isinstance(loaded, dict) or loaded.get("format") != MEMO_FORMAT or \
            not isinstance(loaded.get("entries"), dict):
        return _discard(path, "not the current layout")
    entries = loaded["entries"]
    if loaded.get("sha256") != _entries_digest(entries):
        return _discard(path, "checksum mismatch")
    if not all(isinstance(key, str) and type(value) is float and math.isfinite(value)
               for key, value in entries.items()):
        return _discard(path, "an entry is not a finite number")
    return entries


def _discard(path: str, reason: str) -> dict:
    log.warning("unit memo %s discarded (%s); converting the strings afresh", path, reason)
    with contextlib.suppress(OSError):
        os.remove(path)
    return {}


def _memo() -> dict[str, float]:
    global _MEMO
    if _MEMO is None:
        _MEMO = _read_memo()
    return _MEMO


def save_memo() -> None:
    """Add the strings converted since the last save to the memo file, merged with what
    other processes stored meanwhile (atomic replace; failures ignored)."""
    if not _MEMO_NEW or not _MEMO_ENABLED or _memo_path() is None:
        _MEMO_NEW.clear()
        return
    merged = {**_read_memo(), **_MEMO_NEW}
    _MEMO_NEW.clear()
    document = {"format": MEMO_FORMAT, "sha256": _entries_digest(merged), "entries": merged}
    try:  # unflushed: a torn memo fails its SHA-256 and is rebuilt
        write_atomically(_memo_path(), json.dumps(document, sort_keys=True).encode("utf-8"),
                         mode=0o600, durable=False, name_errors=False)
    except OSError:  # a read-only cache must never stop a build
        pass


class QuantityError(ValueError):
    """A value that is not a number or a quantity of the expected dimension."""


class BareNumberError(QuantityError):
    """A plain number where a value with units is required."""


def bare_number_message(key: str, number: float, dimension: str) -> str:
    """Plain-English refusal of ``key = number`` with the fix written out."""
    units = _FIX_UNITS[dimension]
    shown = f"{number:g}"
    fixes = " or ".join(f'{key} = "{shown} {unit}"' for unit in units)
    return (f"found the bare number {shown}, which has no unit; write the {dimension} "
            f"with its unit as text, for example {fixes} (or, if every bare number in "
            f'this file is meant in SI units, state [project] plain_numbers = "SI", '
            f"which reads this one as {shown} {DIMENSIONS[dimension][1]})")


def parse_quantity(value: object, dimension: str, *, plain_si: bool = True,
                   key: str | None = None) -> float:
    """
    Convert a project-file value to a float in SI units.

    Parameters
    ----------
    value : int, float or str
        A string such as ``"120 t"``, ``"4.2 MN/m"``, ``"26 kip/in"``, ``"18 ft"`` or
        ``"0.35 g"``, or a plain number (taken as SI when ``plain_si``). [-]
    dimension : str
        One of :data:`DIMENSIONS`.
    plain_si : bool, optional
        Whether a plain number (``6`` or ``"6"``) is read in SI units; when False it is
        refused with :class:`BareNumberError`, since ``mass = 6`` meant as tonnes would
        silently become 6 kg.
    key : str, optional
        The key's name, used in the example of the fix.

    Returns
    -------
    float
        The value in the SI unit of ``dimension``.

    Raises
    ------
    QuantityError
        With a message saying what was expected and what was found.
    BareNumberError
        For a plain number when ``plain_si`` is False.
    """
    si_unit = DIMENSIONS[dimension][1]
    if isinstance(value, bool):
        raise QuantityError(f"expected a {dimension} (number in {si_unit} or text with "
                            f"units), found {value!r}")
    if isinstance(value, (int, float)):
        number = float(value)
        if not math.isfinite(number):
            raise QuantityError(f"expected a finite {dimension}, found {value!r}")
        if not plain_si:
            raise BareNumberError(bare_number_message(key or dimension, number, dimension))
        return number
    if not isinstance(value, str):
        raise QuantityError(f"expected a {dimension} (number in {si_unit} or text with "
                            f"units such as '{_EXAMPLES[dimension]}'), found "
                            f"{type(value).__name__} {value!r}")
    text = value.strip()
    try:  # a bare number written as text ("120") is a bare number too
        number = float(text)
    except ValueError:
        pass
    else:
        if not math.isfinite(number):
            raise QuantityError(f"expected a finite {dimension}, found {value!r}")
        if not plain_si:
            raise BareNumberError(bare_number_message(key or dimension, number, dimension))
        return number
    if dimension == "acceleration":
        text = _BARE_G.sub("g_0", text)
    key = f"{dimension}|{text}"
    remembered = _memo().get(key)
    if remembered is not None:
        return remembered
    number = _convert(text, value, dimension)
    _memo()[key] = number
    if _MEMO_ENABLED:
        _MEMO_NEW[key] = number
    return number


def _convert(text: str, value: str, dimension: str) -> float:
    """pint's conversion of ``text`` (``value`` as written) to the SI unit of
    ``dimension``."""
    pint_dim = DIMENSIONS[dimension][0]
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


def _bare_damper(number: float, unit: str) -> str:
    return (f"found the bare number {number:g}, which has no unit; write the damper "
            f"coefficient with its unit as text, for example coefficient = "
            f"\"{number:g} {unit}\" (or, if every bare number in this file is meant in SI "
            f"units, state [project] plain_numbers = \"SI\")")


def parse_damper_coefficient(value: object, exponent: float, *,
                             plain_si: bool = True) -> float:
    """
    A damper coefficient C of ``F = C |v|^α sign(v)`` in SI, [N·(s/m)^α].

    Parameters
    ----------
    value : int, float or str
        A number already in N·(s/m)^α, or text with units such as ``"120 kN*s/m"`` or
        ``"40 kN*(s/m)**0.5"``. [-]
    exponent : float
        The velocity exponent α. [-]
    plain_si : bool, optional
        Whether a plain number is read in N·(s/m)^α; when False it is refused with
        :class:`BareNumberError` (see :func:`parse_quantity`).

    Returns
    -------
    float
        C in N·(s/m)^α.

    Raises
    ------
    QuantityError
        When the text cannot be read or has another dimension than force·(time/length)^α.
    """
    unit = f"N*(s/m)**{exponent:g}"
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        raise QuantityError(f"expected a damper coefficient (number in {unit} or text with "
                            f"units), found {value!r}")
    if isinstance(value, (int, float)):
        number = float(value)
        if not plain_si and math.isfinite(number):
            raise BareNumberError(_bare_damper(number, unit))
    else:
        try:
            number = float(value.strip())
        except ValueError:
            ureg = _registry()
            try:
                quantity = ureg.Quantity(value.strip())
                number = float(quantity.to(unit).magnitude)
            except Exception:
                raise QuantityError(f"expected a damper coefficient in units of force × "
                                    f"(time/length)^{exponent:g}, such as '{unit}', found "
                                    f"{value!r}") from None
        else:  # a bare number written as text
            if not plain_si and math.isfinite(number):
                raise BareNumberError(_bare_damper(number, unit))
    if not math.isfinite(number):
        raise QuantityError(f"expected a finite damper coefficient, found {value!r}")
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

#: Units offered in the fix of a bare number, most common first.
_FIX_UNITS = {
    "length": ("m", "mm"),
    "mass": ("t", "kg"),
    "time": ("s",),
    "force": ("kN", "N"),
    "stiffness": ("kN/m", "MN/m"),
    "acceleration": ("g", "m/s**2"),
    "pressure": ("GPa", "MPa"),
    "second_moment": ("m**4", "mm**4"),
    "inertia": ("kg*m**2", "t*m**2"),
    "frequency": ("Hz",),
}
