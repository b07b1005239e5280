"""Where a key of a project file is: its line, and its array entry named by id.

The loader reports problems at key paths with array positions (``systems[2].dampng``,
counting from 1 in file order). For the reader these become the entry's id and the line
of the key (``line 14, systems[skid].dampng``). The line map comes from a small scan of
the TOML text (table headers and ``key =`` lines); it runs only after the file has
parsed, so it need not handle invalid TOML. A key inside an inline table or a
multi-line value is placed at the line of the key that opens it.
"""

from __future__ import annotations

import re

_HEADER = re.compile(r"^\[\[?\s*(?P<name>[^\[\]]+?)\s*\]\]?\s*(#.*)?$")
_KEY = re.compile(r"^(?P<key>(?:[A-Za-z0-9_-]+|\"[^\"]*\"|'[^']*')"
                  r"(?:\s*\.\s*(?:[A-Za-z0-9_-]+|\"[^\"]*\"|'[^']*'))*)\s*=")
_STEP = re.compile(r"\.[^.\[]+|\[\d+\]")
_POSITION = re.compile(r"^(records|systems)\[(\d+)\]")
_SAFE_ID = re.compile(r"^[A-Za-z0-9][A-Za-z0-9_.-]{0,63}$")


def _parts(dotted: str) -> list[str]:
    """The names of a dotted TOML key (quotes removed)."""
    names = re.findall(r"\"[^\"]*\"|'[^']*'|[A-Za-z0-9_-]+", dotted)
    return [name[1:-1] if name[:1] in "\"'" else name for name in names]


def _depth_change(value: str) -> tuple[int, str | None]:
    """Net bracket depth opened by ``value`` (strings and comments skipped) and the
    delimiter of a multi-line string left open, if any."""
    depth, index = 0, 0
    while index < len(value):
        char = value[index]
        if value.startswith('"""', index) or value.startswith("'''", index):
            quote = value[index:index + 3]
            end = value.find(quote, index + 3)
            if end < 0:
                return depth, quote
            index = end + 3
            continue
        if char in "\"'":
            end = index + 1
            while end < len(value) and value[end] != char:
                end += 2 if char == '"' and value[end] == "\\" else 1
            index = end + 1
            continue
        if char == "#":
            break
        depth += (char in "[{") - (char in "]}")
        index += 1
    return depth, None


def key_lines(text: str) -> dict[str, int]:
    """
    Line (from 1) of every table header and key of a valid TOML document.

    Returns
    -------
    dict
        Key path as the loader writes it (``systems[2].limits.drift_ratio``, array
        positions from 1) -> line number.
    """
    lines: dict[str, int] = {}
    counts: dict[str, int] = {}
    table: str = ""
    depth, open_string = 0, None
    for number, raw in enumerate(text.splitlines(), start=1):
        if open_string is not None:  # inside a multi-line string
            if open_string in raw:
                rest = raw.split(open_string, 1)[1]
                open_string = None
                change, open_string = _depth_change(rest)
                depth += change
            continue
        if depth > 0:  # inside a multi-line array or table value
            change, open_string = _depth_change(raw)
            depth += change
            continue
        line = raw.strip()
        if not line or line.startswith("#"):
            continue
        header = _HEADER.match(line)
        if header:
            names = _parts(header.group("name"))
            array = line.startswith("[[")
            plain = path = ""
            for position, name in enumerate(names):
                plain = f"{plain}.{name}" if plain else name
                path = f"{path}.{name}" if path else name
                if array and position == len(names) - 1:
                    counts[plain] = counts.get(plain, 0) + 1
                if plain in counts:
                    path = f"{path}[{counts[plain]}]"
            table = path
            lines.setdefault(table, number)
            continue
        key = _KEY.match(line)
        if key:
            path = ".".join([table, *_parts(key.group("key"))]) if table else \
                ".".join(_parts(key.group("key")))
            lines.setdefault(path, number)
            depth, open_string = _depth_change(line[key.end():])
    return lines


def line_of(location: str, lines: dict[str, int]) -> int | None:
    """Line of ``location`` or of the nearest enclosing key that has one."""
    path = location
    while path:
        if path in lines:
            return lines[path]
        steps = list(_STEP.finditer(path))
        if not steps:
            return None
        path = path[:steps[-1].start()]
    return None


def entry_ids(document: dict) -> dict[str, str]:
    """``records[2]`` -> ``records[r2]`` for every entry whose id is valid and unique."""
    names: dict[str, str] = {}
    for section in ("records", "systems"):
        items = document.get(section)
        if not isinstance(items, list):
            continue
        ids = [item.get("id") if isinstance(item, dict) else None for item in items]
        for position, value in enumerate(ids, start=1):
            if isinstance(value, str) and _SAFE_ID.match(value) and ids.count(value) == 1:
                names[f"{section}[{position}]"] = f"{section}[{value}]"
    return names


def describe(location: str, lines: dict[str, int], names: dict[str, str]) -> str:
    """``systems[2].dampng`` -> ``line 14, systems[skid].dampng``."""
    line = line_of(location, lines)
    match = _POSITION.match(location)
    shown = location
    if match and match.group(0) in names:
        shown = names[match.group(0)] + location[match.end():]
    return f"line {line}, {shown}" if line is not None else shown
