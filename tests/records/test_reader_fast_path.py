"""The one-pass reader of clean two-column files gives what the line-by-line path gives.

Reference: the line-by-line path of :mod:`sdofreport.records.readers` itself
(``_read(..., fast=False)``: detection, per-line tokens and checks), which the one-pass
path must match in every decision, value bit, time step, history line and error message;
and, for the values of clean files, Python's own ``float()`` of each written token (stdlib)
times standard gravity 9.80665 m/s² (ISO 80000-3). The generated files are built here
from random numbers with a fixed seed; no expected value is stored.
"""

from __future__ import annotations

import random
import re

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from sdofreport.errors import RecordError
from sdofreport.records import readers

G = 9.80665  # standard gravity [m/s²], ISO 80000-3
FORMATS = ("auto", "two-column", "values", "headed")

# ------------------------------------------------------------------ file generator


def _number(rng: random.Random, value: float, style: str) -> str:
    """``value`` written in one of several decimal spellings float() reads."""
    if style == "fixed":
        return f"{value:.4f}"
    if style == "sci":
        return f"{value:.8e}"
    if style == "SCI":
        return f"{value:+.6E}"
    if style == "repr":
        return repr(value)
    if style == "bare":  # .5 and 5. forms
        text = f"{value:.5f}"
        text = text.replace("0.", ".", 1) if abs(value) < 1 else text.rstrip("0")
        return text
    return _number(rng, value, rng.choice(["fixed", "sci", "SCI", "repr", "bare"]))


def _data_rows(rng: random.Random, n: int, dt: float, t0: float) -> list[list[str]]:
    time_style = rng.choice(["fixed", "repr", "sci", "bare"])
    value_style = rng.choice(["fixed", "sci", "SCI", "repr", "bare", "mixed"])
    scale = 10.0 ** rng.randint(-6, 0)
    return [[_number(rng, t0 + k * dt, time_style),
             _number(rng, rng.uniform(-1.0, 1.0) * scale, value_style)] for k in range(n)]


SEPARATORS = [",", ";", "\t", " ", ", ", " ; ", "   ", ",\t", ",,"]
LINE_ENDS = ["\n", "\r\n", "\r"]
HEADERS = ["time_s,accel_g", "t [s]; a [g]", "Time\tAccel  # units g", "time accel ",
           "zeit_s;beschl_g µ"]


def _clean_file(rng: random.Random, n: int | None = None) -> tuple[list[str], list[str]]:
    """Lines of a clean two-column file and the acceleration tokens it holds."""
    n = n or rng.randint(16, 60)
    dt = rng.choice([0.005, 0.01, 0.02, 0.0125])
    t0 = rng.choice([0.0, 0.0, 1.5, -0.25])
    rows = _data_rows(rng, n, dt, t0)
    separator = rng.choice(SEPARATORS)
    lead = rng.choice(["", "", " ", "\t", "  "])
    trail = rng.choice(["", "", " ", "\t", "  \t", ","])
    lines = [f"{lead}{t}{separator}{a}{trail}" for t, a in rows]
    prefix = []
    if rng.random() < 0.5:
        prefix.append(rng.choice(["# acceleration units: g", "#", "  # station X"]))
    if rng.random() < 0.6:
        prefix.append(rng.choice(HEADERS))
    if rng.random() < 0.3:
        prefix.insert(0, rng.choice(["", "   "]))
    return prefix + lines, [a for _, a in rows]


def _tokens_of(text: str) -> list[str]:
    return [token for token in re.split(r"[,;\s]+", text.split("#", 1)[0]) if token]


def _is_data(line: str) -> bool:
    tokens = _tokens_of(line)
    return bool(tokens) and tokens[0][0] in "+-.0123456789"


def _insert(rng, lines, text):
    lines.insert(rng.randint(0, len(lines)), text)


def _mutate(rng: random.Random, lines: list[str], name: str) -> list[str]:
    lines = list(lines)
    data = [k for k, line in enumerate(lines) if _is_data(line)] or [0]
    pick = rng.choice(data)
    if name == "comments":
        for _ in range(rng.randint(1, 3)):
            _insert(rng, lines, rng.choice(["# note", "   # indented", "#", "# a#b"]))
    elif name == "trailing comment":
        lines[pick] += rng.choice([" # note", "#", "\t# x, y"])
    elif name == "blank lines":
        for _ in range(rng.randint(1, 3)):
            _insert(rng, lines, rng.choice(["", "  ", "\t", " \t "]))
        lines += [""] * rng.randint(0, 2)
    elif name == "d exponent":
        lines[pick] = re.sub(r"[eE]", rng.choice(["D", "d"]), lines[pick]) \
            if re.search(r"[eE]", lines[pick]) else lines[pick] + "D+00"
    elif name == "truncated last row":
        lines[data[-1]] = lines[data[-1]][: rng.randint(1, max(1, len(lines[data[-1]]) - 2))]
    elif name == "repeated time":
        if pick + 1 < len(lines):
            first = re.split(r"[,;\s]+", lines[pick].strip())[0]
            lines[pick + 1] = re.sub(r"^\s*[^,;\s]+", first, lines[pick + 1])
    elif name == "decimal commas":
        lines = [line.replace(",", ";").replace(".", ",") if k in data else line
                 for k, line in enumerate(lines)]
    elif name == "separator-only line":
        _insert(rng, lines, rng.choice([",,", ";", " , ", ",\t;"]))
    elif name == "non-finite":
        lines[pick] = re.sub(r"[^,;\s]+\s*$", rng.choice(["nan", "inf", "1e999", "-1E400",
                                                          "Infinity"]), lines[pick])
    elif name == "huge value":  # finite in g, infinite in m/s²
        lines[pick] = re.sub(r"[^,;\s]+\s*$", "1.5e308", lines[pick])
    elif name == "underscore":
        lines[pick] = lines[pick].replace("0", "0_0", 1)
    elif name == "non-ascii":
        choice = rng.choice(["comment", "digit", "space"])
        if choice == "comment":
            _insert(rng, lines, "# Köln – Station")
        elif choice == "digit":
            lines[pick] = lines[pick].replace("1", "\uff11", 1)
        else:
            lines[pick] = lines[pick].replace(",", "\u00a0", 1).replace(" ", "\u2003", 1)
    elif name == "odd whitespace":
        lines[pick] = lines[pick].replace(",", rng.choice(["\x0c", "\x0b", "\x1f"]), 1) \
            .replace(" ", "\x0c", 1)
    elif name == "third column":
        lines = [line.rstrip() + ",0.5" if k in data else line for k, line in enumerate(lines)]
    elif name == "swap times":
        if len(data) > 3:
            a, b = data[1], data[2]
            lines[a], lines[b] = lines[b], lines[a]
    elif name == "uneven step":
        first = re.split(r"[,;\s]+", lines[pick].strip())[0]
        try:
            shifted = repr(float(first) + 0.003)
        except ValueError:
            shifted = first
        lines[pick] = lines[pick].replace(first, shifted, 1)
    elif name == "npts line":
        _insert(rng, lines, rng.choice(["# NPTS= 40, DT= 0.01 SEC", "# npts only",
                                        "# dt only", "# DTs and NPTSx", "# NPTS_DT",
                                        "# NPTS here", "# 4000 0.0100 NPTS, DT"]))
        if rng.random() < 0.5:
            _insert(rng, lines, "# DT= 0.01")
    elif name == "second header":
        lines.insert(data[0] if data else 0, "time_s,accel_g")
    elif name == "leading separators":
        lines = [("," + line if k in data else line) for k, line in enumerate(lines)]
    elif name == "plus and dots":
        lines[pick] = re.sub(r"(^|[,;\s])(\d)", r"\1+\2", lines[pick], count=1)
    elif name == "bad token":
        lines[pick] = lines[pick].replace(rng.choice(["0", "1", "."]), rng.choice(
            ["..", "e", "+-", "x", "1e", "--"]), 1)
    return lines


MUTATIONS = ["comments", "trailing comment", "blank lines", "d exponent",
             "truncated last row", "repeated time", "decimal commas", "separator-only line",
             "non-finite", "huge value", "underscore", "non-ascii", "odd whitespace",
             "third column", "swap times", "uneven step", "npts line", "second header",
             "leading separators", "plus and dots", "bad token"]
#: Mutations after which a file is still clean (the one-pass reader must take it).
CLEAN_MUTATIONS = {"comments", "trailing comment", "blank lines", "leading separators",
                   "plus and dots"}
#: Mutations the one-pass reader also takes, leaving the error to the shared time-column
#: and unit checks.
TAKEN_MUTATIONS = {"uneven step", "huge value"}


def _headed_file(rng: random.Random) -> list[str]:
    n = rng.randint(12, 45)
    values = [_number(rng, rng.uniform(-0.3, 0.3), "SCI") for _ in range(n)]
    stated = n if rng.random() < 0.8 else n + 1
    header = rng.choice([f"NPTS= {stated}, DT= .0100 SEC", f"DT= 0.005 SEC, NPTS= {stated}",
                         f"{stated} 0.0100 NPTS, DT", f"NPTS = {stated} , DT = 0.01"])
    per_line = rng.randint(1, 6)
    body = [" ".join(values[k:k + per_line]) for k in range(0, n, per_line)]
    return ["title line", "station and component", header] + body


def _values_file(rng: random.Random) -> list[str]:
    n = rng.randint(12, 45)
    values = [rng.uniform(-0.3, 0.3) for _ in range(n)]
    if rng.random() < 0.5:  # one value per line
        return [_number(rng, value, "mixed") for value in values]
    # run-together fixed-width columns, as some writers leave them
    cells = [f"{value:9.1E}".replace(" ", "") for value in values]
    return ["".join(cells[k:k + 4]) for k in range(0, n, 4)]


def _variants(seed: int, count: int):
    """(name, file text) pairs: clean two-column files, mutated ones and other formats."""
    rng = random.Random(seed)
    for index in range(count):
        kind = rng.random()
        if kind < 0.08:
            yield "headed", _join(rng, _headed_file(rng))
        elif kind < 0.16:
            yield "values", _join(rng, _values_file(rng))
        elif kind < 0.2:
            lines, _ = _clean_file(rng, n=rng.randint(1, 17))
            yield "short", _join(rng, lines)
        else:
            lines, _ = _clean_file(rng)
            names = rng.sample(MUTATIONS, rng.choice([0, 1, 1, 1, 2]))
            for name in names:
                lines = _mutate(rng, lines, name)
            yield "+".join(names) or "clean", _join(rng, lines)


def _join(rng: random.Random, lines: list[str]) -> str:
    end = rng.choice(LINE_ENDS)
    text = end.join(lines) + (end if rng.random() < 0.8 else "")
    if rng.random() < 0.05:
        text = "\ufeff" + text
    return text


# ------------------------------------------------------------------ comparison


def _outcome(path, file_format, units, dt_s, fast):
    """Everything a read gives (or its error message), for comparing the two paths."""
    try:
        record = readers._read(path, file_format, units, dt_s, None, fast=fast)
    except RecordError as exc:
        return ("error", str(exc)), None
    values = record.acceleration_m_s2
    summary = ("record", record.file_format, float(record.dt_s).hex(), values.dtype.str,
               values.shape, values.tobytes(), record.history, record.warnings, record.units,
               record.id, record.sha256, record.source_path)
    return summary, record


def _assert_same(path, file_format, units, dt_s):
    fast, fast_record = _outcome(path, file_format, units, dt_s, True)
    slow, slow_record = _outcome(path, file_format, units, dt_s, False)
    assert fast == slow, (path.read_bytes()[:300], file_format, units, dt_s)
    if fast_record is not None:
        assert np.array_equal(fast_record.acceleration_m_s2, slow_record.acceleration_m_s2)
    return fast


@pytest.mark.parametrize("seed", range(4))
def test_one_pass_matches_line_by_line(tmp_path, seed):
    rng = random.Random(1000 + seed)
    seen = set()
    for number, (name, text) in enumerate(_variants(seed, 120)):
        path = tmp_path / f"v{number}.txt"
        path.write_bytes(text.encode("utf-8", "surrogatepass"))
        for file_format in FORMATS:
            units = rng.choice([None, None, "g", "cm/s2", "m/s2"])
            dt_s = rng.choice([None, None, 0.01, 0.02])
            outcome = _assert_same(path, file_format, units, dt_s)
            seen.add(outcome[0] if outcome[0] == "error" else outcome[1])
    # The comparison covered records of every format and errors (else it proves little).
    assert seen == {"error", "two-column", "values", "headed"}


@pytest.mark.parametrize("seed", range(3))
def test_clean_files_take_the_one_pass_path_with_float_values(tmp_path, seed):
    rng = random.Random(seed)
    for number in range(60):
        lines, written = _clean_file(rng)
        for name in rng.sample(sorted(CLEAN_MUTATIONS), rng.randint(0, 2)):
            lines = _mutate(rng, lines, name)
        text = _join(rng, lines)
        normalised = readers._normalise_line_ends(text.lstrip("\ufeff"))
        clean = readers._clean_two_column(normalised, detecting=True)
        assert clean is not None, text[:300]
        path = tmp_path / f"c{number}.csv"
        path.write_text(text, encoding="utf-8", newline="")
        record = readers.read_record(path)
        # Reference: Python float() of each acceleration token in the file, times g, and
        # the numbers of the lines that hold them.
        rows = [(k + 1, _tokens_of(line)) for k, line in enumerate(normalised.split("\n"))
                if _is_data(line)]
        assert len(rows) == len(written)
        expected = np.array([float(row[1]) for _, row in rows]) * G
        assert record.file_format == "two-column"
        assert record.acceleration_m_s2.tobytes() == expected.tobytes()
        assert np.array_equal(clean[2][:, 0], [float(row[0]) for _, row in rows])
        assert list(clean[1]) == [k for k, _ in rows]
        _assert_same(path, "auto", None, None)


@pytest.mark.parametrize("name", sorted(set(MUTATIONS) - CLEAN_MUTATIONS - TAKEN_MUTATIONS))
def test_unusual_files_fall_back_to_the_line_by_line_path(tmp_path, name):
    """Each unusual form is left to the checked path at least once, and both agree."""
    rng = random.Random(name)
    declined = 0
    for number in range(25):
        lines, _ = _clean_file(rng)
        text = _join(rng, _mutate(rng, lines, name))
        normalised = readers._normalise_line_ends(text)
        declined += readers._clean_two_column(normalised, detecting=True) is None
        path = tmp_path / f"u{number}.txt"
        path.write_text(text, encoding="utf-8", newline="")
        for file_format in ("auto", "two-column"):
            _assert_same(path, file_format, None, None)
    assert declined > 0


# Chunks a file is assembled from at random: separators, line ends, numbers of every
# spelling the readers meet, comments, header words and stray characters.
_CHUNKS = st.sampled_from([
    "0.01", "0.02", "-1.5e-3", "+.5", "5.", "1E5", "2d-3", "1D+2", "nan", "inf", "1e999",
    "1_0", "0", "12", "-0.0", ",", ";", " ", "\t", "\n", "\r\n", "\r", "#", "# c", "NPTS",
    "DT", "npts=", "dt=", "time_s", "accel_g", "\u00a0", "\x0c", "é", "-", "e", ".",
])


@settings(max_examples=300, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(head=st.lists(_CHUNKS, max_size=12), inside=st.lists(_CHUNKS, max_size=2),
       seed=st.integers(0, 2 ** 16), mutation=st.sampled_from(["", *MUTATIONS]))
def test_random_text_gives_the_same_outcome(tmp_path, head, inside, seed, mutation):
    rng = random.Random(seed)
    lines, _ = _clean_file(rng, n=rng.randint(1, 24))
    if mutation:
        lines = _mutate(rng, lines, mutation)
    text = "".join(head) + _join(rng, lines)
    for chunk in inside:
        cut = rng.randint(0, len(text))
        text = text[:cut] + chunk + text[cut:]
    path = tmp_path / "h.txt"
    path.write_bytes(text.encode("utf-8"))
    for file_format in ("auto", "two-column"):
        _assert_same(path, file_format, None, None)


# ------------------------------------------------------------------ the shortcuts


@settings(max_examples=400, deadline=None, derandomize=True)
@given(st.text(alphabet="0123456789.eE+-", min_size=1, max_size=8))
def test_float_reads_exactly_the_plain_decimal_tokens(token):
    """The one-pass path lets float()/numpy decide tokens made of these characters; that
    is exact because float() accepts such a token just when it matches ``_NUMBER``.
    Reference: Python's float() (stdlib), whose accepted strings are the decimal
    floating-point literals of the language reference, without underscores here."""
    try:
        float(token)
        accepted = True
    except ValueError:
        accepted = False
    assert accepted == bool(readers._NUMBER.match(token))


_LINE_PIECES = st.sampled_from(["NPTS", "npts", "Npts", "DT", "dt", "Dt", "x", "_", "1", " ",
                                "=", ",", "\u017f", "\u212a", "é", "\n", "\r", "\t", "."])


@settings(max_examples=400, deadline=None, derandomize=True)
@given(st.lists(st.lists(_LINE_PIECES, max_size=8).map("".join), max_size=6))
def test_header_line_search_matches_the_per_line_search(raws):
    """Reference: the two regular expressions applied line by line (the definition)."""
    lines = list(enumerate(raws, start=1))
    expected = next((index for index, (_, raw) in enumerate(lines)
                     if readers._HAS_NPTS.search(raw) and readers._HAS_DT.search(raw)), None)
    assert readers._find_header_line(lines) == expected
    whole = readers._may_state_npts_and_dt("\n".join(raws))
    assert whole or expected is None
