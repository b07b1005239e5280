"""Ids that become file names: one safe pattern, reserved names, no case-only twins.

Record ids, system ids and pair names end up in page and figure file names
(``records/<id>.html``, ``figures/system-response~<system>~<record>.svg``). Each is
checked here, at load, against one pattern: letters, digits, ``_``, ``-`` and ``.``;
starting and ending with a letter or digit (Windows drops a trailing dot, so ``a.``
would be ``a`` there); at most 64 characters. No ``/``, ``\\``, ``..`` or ``~`` can
pass, so an id can neither leave the site nor forge the separator that
:func:`sdofreport.site.context.figure_path` puts between the parts of a figure name.
Names the site itself uses, and the device names Windows reserves (``CON``, ``NUL``,
``COM1``...), are refused, and so are ids of one kind that differ only in case (they
would be one file on a case-insensitive file system, as on Windows and macOS).
"""

from __future__ import annotations

import re

#: The one pattern every id that reaches a path must match.
SAFE_ID = re.compile(r"^[A-Za-z0-9](?:[A-Za-z0-9_.-]{0,62}[A-Za-z0-9])?$")
SAFE_ID_TEXT = ("letters, digits, '-', '_' or '.' (1 to 64, starting and ending with a "
                "letter or digit)")
#: Windows device names (any case, with or without an extension) and the names of the
#: site's own pages, folders and files.
RESERVED_IDS = frozenset(
    {"con", "prn", "aux", "nul", *(f"com{i}" for i in range(10)),
     *(f"lpt{i}" for i in range(10))}
    | {"index", "suite", "revision", "register", "manifest", "static", "figures", "data",
       "inputs", "records", "systems", "runs"})


def id_problem(value) -> str | None:
    """Why ``value`` cannot name a file of the site, or None when it can."""
    if not isinstance(value, str) or not SAFE_ID.match(value):
        return f"expected {SAFE_ID_TEXT}, found {value!r}"
    if value.split(".", 1)[0].lower() in RESERVED_IDS:
        return (f"{value!r} is a name the site or Windows reserves "
                f"({', '.join(sorted(RESERVED_IDS - {'com0', 'lpt0'})[:6])}...); "
                f"choose another")
    return None


def case_twins(ids: list[tuple[str, str]]) -> list[tuple[str, str]]:
    """``(where, message)`` for each id of ``(where, id)`` whose lower case repeats."""
    seen: dict[str, tuple[str, str]] = {}
    problems = []
    for where, value in ids:
        folded = value.casefold()
        if folded in seen and seen[folded][1] != value:
            problems.append((where, f"{value!r} differs only in case from "
                             f"{seen[folded][1]!r} ({seen[folded][0]}); they would be one "
                             f"file on Windows or macOS"))
        seen.setdefault(folded, (where, value))
    return problems


def id_case_problems(document: dict) -> list[tuple[str, str]]:
    """Record ids, system ids and pair names of ``document`` that differ only in case."""
    problems = []
    for section, key in (("records", "id"), ("systems", "id"), ("records", "pair")):
        items = document.get(section)
        if not isinstance(items, list):
            continue
        found = [(f"{section}[{index}].{key}", table[key])
                 for index, table in enumerate(items, start=1)
                 if isinstance(table, dict) and isinstance(table.get(key), str)]
        problems += case_twins(found)
    return problems
