"""Indented JSON text for the site's documents, the same as ``json.dumps`` but faster.

``json.dumps(document, indent=1, ensure_ascii=False, allow_nan=False)`` falls back to
the standard library's pure-Python encoder when ``indent`` is set, which spends most of
its time yielding one small string per number. The results document is mostly long
lists of floats, so :func:`json_text` writes such a list with one ``join`` over
``float.__repr__`` (the function ``json`` itself uses for floats) and strings with
``json.encoder.encode_basestring`` (what ``json`` uses when ``ensure_ascii=False``).

The output is meant to be the same text as ``json.dumps`` with those arguments for every
document made of exact ``dict`` (``str`` keys), ``list``, ``tuple``, ``str``, ``int``,
``float``, ``bool`` and ``None``. Anything else (subclasses such as numpy scalars or
enums, other key types, NaN or infinity, circular or very deep nesting) is handed to
``json.dumps`` itself, so the text or the exception is then exactly what it gives.
"""

from __future__ import annotations

import json
from json.encoder import encode_basestring

#: The ``json.dumps`` arguments whose output :func:`json_text` reproduces.
DUMPS_OPTIONS = {"indent": 1, "ensure_ascii": False, "allow_nan": False}

_INDENT = " "  # indent=1


class _Fallback(Exception):
    """Raised inside the fast encoder when ``json.dumps`` must decide instead."""


_float_repr = float.__repr__
_int_repr = int.__repr__

#: Text of a scalar of exactly this type (floats still to be checked for NaN/inf).
_SCALAR_TEXT = {
    float: _float_repr,
    int: _int_repr,
    bool: lambda value: "true" if value else "false",
    type(None): lambda value: "null",
}
_SCALAR_TYPES = frozenset(_SCALAR_TEXT)
_FLOAT_ONLY = frozenset((float,))


def _check_finite(text: str) -> str:
    """``text`` (joined scalar texts, no strings) unless a float in it was NaN or infinite.

    ``float.__repr__`` writes only digits, ``.``, ``e``, ``+`` and ``-`` for a finite
    value and ``nan``, ``inf`` or ``-inf`` otherwise; integers are digits and ``-``; the
    other scalars are ``null``, ``true`` and ``false``, none of which contains ``nan`` or
    ``inf``.
    """
    if "nan" in text or "inf" in text:
        raise _Fallback
    return text


def _scalars_text(items, separator: str, kinds) -> str:
    """``items`` (every one of a type in ``_SCALAR_TYPES``) joined by ``separator``."""
    if kinds <= _FLOAT_ONLY:
        return _check_finite(separator.join(map(_float_repr, items)))
    return _check_finite(separator.join([_SCALAR_TEXT[type(v)](v) for v in items]))


def _value_text(value, level: int) -> str:
    kind = type(value)
    if kind is str:
        return encode_basestring(value)
    if kind is dict:
        return _dict_text(value, level)
    if kind is list or kind is tuple:
        return _list_text(value, level)
    if kind in _SCALAR_TYPES:
        text = _SCALAR_TEXT[kind](value)
        return _check_finite(text) if kind is float else text
    raise _Fallback


def _list_text(items, level: int) -> str:
    if not items:
        return "[]"
    inner = "\n" + _INDENT * (level + 1)
    separator = "," + inner
    kinds = set(map(type, items))
    if kinds <= _SCALAR_TYPES:
        body = _scalars_text(items, separator, kinds)
    else:
        body = separator.join([_value_text(v, level + 1) for v in items])
    return "[" + inner + body + "\n" + _INDENT * level + "]"


def _dict_text(mapping: dict, level: int) -> str:
    if not mapping:
        return "{}"
    inner = "\n" + _INDENT * (level + 1)
    parts = []
    for key, value in mapping.items():
        if type(key) is not str:
            raise _Fallback
        parts.append(encode_basestring(key) + ": " + _value_text(value, level + 1))
    return "{" + inner + ("," + inner).join(parts) + "\n" + _INDENT * level + "}"


def json_text(document) -> str:
    """``json.dumps(document, indent=1, ensure_ascii=False, allow_nan=False) + "\\n"``."""
    try:
        text = _value_text(document, 0)
    except (_Fallback, RecursionError):  # a circular document ends in RecursionError here
        text = json.dumps(document, **DUMPS_OPTIONS)
    return text + "\n"
