"""Readers for ground-acceleration text files, returning :class:`~.record.Record` objects.

Three text layouts are understood (names in :data:`RECORD_FORMATS`, which the CLI and the
project validator read):

``two-column``
    Time and acceleration on each line, separated by commas, semicolons, tabs or spaces;
    ``#`` starts a comment; blank lines are skipped; one optional header row of names
    (``time_s,accel_g``) before the data. The time step comes from the time column.
``values``
    Acceleration values only, any number per line; the caller gives the time step.
``headed``
    Free-text header lines, one of which states the number of points and the time step
    (``NPTS= 4000, DT= .0100 SEC``, ``DT= 0.005 SEC, NPTS= 8000``, ``4000 0.0100 NPTS, DT``,
    ``NPTS = 4000 , DT = 0.01``), then the values, several per line. The header ends at
    the first purely numeric line after that one.

In ``values`` and ``headed`` data, numbers that run together in fixed-width columns
(``-5.0E-02-3.7E-02``) are split where each new number starts with its sign.
``auto``
    Picks one of the three (see :func:`detect_format`) and records the choice.

Values are in g unless the caller declares other units; they are converted once to m/s².
Every problem with the file is a :class:`sdofreport.errors.RecordError` naming the file
and, where it applies, the line.
Files larger than :data:`MAX_FILE_BYTES` are refused before they are read; UTF-16/32
and compressed files are named as such.
"""

from __future__ import annotations

import hashlib
import io
import math
import re
import warnings
from pathlib import Path

import numpy as np

from sdofreport.core.decimal_text import TINY, below_tiny
from sdofreport.core.units import (
    ACCELERATION_UNITS,
    G,
    acceleration_factor,
    normalise_acceleration_unit,
)
from sdofreport.errors import RecordError
from sdofreport.records.header_units import stated_units
from sdofreport.records.record import Record

#: Format names accepted by :func:`read_record` (the single registry; "auto" first).
RECORD_FORMATS = ("auto", "two-column", "values", "headed")

#: One-line description of each format, for help texts and the docs.
RECORD_FORMAT_DESCRIPTIONS = {
    "auto": "detect headed, two-column or values from the file's content",
    "two-column": "time and acceleration per line; the time step comes from the time column",
    "values": "acceleration values only, several per line; the time step must be given",
    "headed": "free-text header with a line stating NPTS and DT, then values in g",
}

#: Fewest samples a record may have. [-]
MIN_POINTS = 16
#: Largest record file read [bytes]. Reading holds up to about 55 times the file size in
#: memory (measured on a two-column file of 9-byte lines: 16 MiB took 0.86 GB), so this
#: keeps a build under 1 GB; our choice, no published source. It is still some 800 000
#: lines of time and acceleration, far more than a strong-motion record needs.
MAX_FILE_BYTES = 16 * 1024 * 1024
#: Largest allowed relative deviation of any time step from the mean step. [-]
TIME_STEP_TOLERANCE = 1e-3
#: Peaks outside this range [g] trigger an implausible-amplitude warning.
PLAUSIBLE_PEAK_G = (1e-5, 10.0)
#: Peak above which a record is refused, not only warned about [g]. Our bound (no
#: source): a million times the strongest recorded ground motions (a few g, from
#: memory) and above any unit mix-up the warning explains (a record in mm/s² read as
#: g peaks near 1e4 "g"); below it nothing in the computation can overflow.
ABSURD_PEAK_G = 1e6
#: Range [g] a suggested alternative unit must bring the peak into.
_SUGGESTED_PEAK_G = (0.01, 4.0)

_NUM = r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eEdD][+-]?\d+)?"
_NUMBER = re.compile(rf"{_NUM}\Z", re.ASCII)
_NON_FINITE = re.compile(r"[+-]?(?:nan|inf|infinity)\Z", re.IGNORECASE | re.ASCII)
_SPLIT = re.compile(r"[,;\s]+")
_HAS_NPTS = re.compile(r"\bNPTS\b", re.IGNORECASE | re.ASCII)
_HAS_DT = re.compile(r"\bDT\b", re.IGNORECASE | re.ASCII)
_NPTS_VALUE = re.compile(rf"\bNPTS\b\s*[=:,]?\s*({_NUM})(?![\w.])", re.IGNORECASE | re.ASCII)
_DT_VALUE = re.compile(
    rf"\bDT\b\s*[=:,]?\s*({_NUM})(?![\w.])\s*([A-Za-z]+)?", re.IGNORECASE | re.ASCII
)
#: The count-and-step line of the files sdofreport writes (``write_headed``):
#: ``samples: 5000, step: 0.005 s``.
_OWN_COUNT_STEP = re.compile(
    rf"^\s*samples:\s*({_NUM})\s*[,;]?\s*step:\s*({_NUM})\s*([A-Za-z]+)?\s*$",
    re.IGNORECASE | re.ASCII,
)
_VALUES_FIRST = re.compile(
    rf"^\s*({_NUM})[\s,;]+({_NUM})[\s,;]+(NPTS|DT)[\s,;]+(NPTS|DT)\b",
    re.IGNORECASE | re.ASCII,
)
_TIME_UNITS = {"s": 1.0, "sec": 1.0, "secs": 1.0, "second": 1.0, "seconds": 1.0,
               "ms": 1e-3, "msec": 1e-3}


# --------------------------------------------------------------------------- helpers


def _where(path: str, line: int | None = None) -> str:
    return f"record file '{path}'" + (f" line {line}" if line is not None else "")


def _fail(path: str, line: int | None, message: str) -> RecordError:
    return RecordError(f"{_where(path, line)}: {message}")


def _load_bytes(path: str) -> bytes:
    file = Path(path)
    if not file.exists():
        raise _fail(path, None, "not found; check the path (relative paths start from "
                    "the project folder or the current folder)")
    if file.is_dir():
        raise _fail(path, None, "is a folder, expected a text file of acceleration values")
    limit = (f"the largest record file read is {MAX_FILE_BYTES // 2 ** 20} MiB (some 800 000 "
             "lines of time and acceleration): decimate the record or split it into "
             "shorter ones")
    try:
        size = file.stat().st_size
        if size > MAX_FILE_BYTES:  # refused before reading a byte
            raise _fail(path, None, f"is {size / 2 ** 20:.0f} MiB; {limit}")
        # Bounded read: a device or a pipe (/dev/zero) states no useful size.
        with open(file, "rb") as handle:
            data = handle.read(MAX_FILE_BYTES + 1)
    except OSError as exc:
        raise _fail(path, None, f"cannot be read ({exc.strerror or exc})") from None
    if len(data) > MAX_FILE_BYTES:
        raise _fail(path, None, f"holds more than {MAX_FILE_BYTES // 2 ** 20} MiB (a device "
                    f"or a pipe?); {limit}")
    return data


#: Leading bytes of files that are not plain text, with what to tell the user.
_NOT_TEXT = (
    (b"\x00\x00\xfe\xff", "starts with a UTF-32 byte-order mark (0x00 0x00 0xfe 0xff): the "
     "file is UTF-32 text; expected UTF-8 or ASCII (save it as UTF-8)"),
    (b"\xff\xfe\x00\x00", "starts with a UTF-32 byte-order mark (0xff 0xfe 0x00 0x00): the "
     "file is UTF-32 text; expected UTF-8 or ASCII (save it as UTF-8)"),
    (b"\xff\xfe", "starts with a UTF-16 byte-order mark (0xff 0xfe): the file is UTF-16 "
     "text; expected UTF-8 or ASCII (save it as UTF-8)"),
    (b"\xfe\xff", "starts with a UTF-16 byte-order mark (0xfe 0xff): the file is UTF-16 "
     "text; expected UTF-8 or ASCII (save it as UTF-8)"),
    (b"\x1f\x8b", "is gzip-compressed (it starts with 0x1f 0x8b); expected a plain text "
     "file: decompress it first"),
    (b"PK\x03\x04", "is a zip archive (it starts with 'PK'); expected a plain text file: "
     "extract the record first"),
)


def _decode(data: bytes, path: str) -> str:
    if not data.strip():
        raise _fail(path, None, "is empty; expected acceleration values")
    if not data.removeprefix(b"\xef\xbb\xbf").strip():
        raise _fail(path, 1, "holds only a UTF-8 byte-order mark (0xef 0xbb 0xbf) and no "
                    "values; expected acceleration values")
    for magic, message in _NOT_TEXT:
        if data.startswith(magic):
            raise _fail(path, 1, message)
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = data.count(b"\n", 0, exc.start) + 1
        raise _fail(
            path, line,
            f"byte {exc.start} (0x{data[exc.start]:02x}) is not valid UTF-8 or ASCII text; "
            "expected a plain text file (save it as UTF-8, or check that it is not a "
            "binary or compressed file)",
        ) from None
    return text


def _normalise_line_ends(text: str) -> str:
    """``text`` with CRLF and CR line ends turned into LF."""
    return text.replace("\r\n", "\n").replace("\r", "\n")


def _split_lines(text: str) -> list[tuple[int, str]]:
    """(line number from 1, raw text) for every line of ``text``."""
    text = _normalise_line_ends(text)
    return [(number, line) for number, line in enumerate(text.split("\n"), start=1)]


def _strip_comment(line: str) -> str:
    return line.split("#", 1)[0].strip()


def _quoted_numbers(text: str, path: str) -> None:
    """Refuse numbers written in quotes (``"0.01","0.25"``), naming the first such line."""
    for number, line in enumerate(text.split("\n", 200)[:200], start=1):
        if '"' not in line and "'" not in line:
            continue
        tokens = _tokens(line)
        quoted = [t for t in tokens if len(t) >= 2 and t[0] == t[-1] and t[0] in "\"'"]
        if quoted and all(_numeric_like(t.strip("\"'")) for t in tokens):
            raise _fail(path, number, f"the numbers are in quotes ({quoted[0]}); expected "
                        f"plain numbers: save the file without quotes around values "
                        f"(a spreadsheet's CSV export option)")


def _tokens(text: str) -> list[str]:
    return [token for token in _SPLIT.split(text.strip()) if token]


def _numeric_like(token: str) -> bool:
    return bool(_NUMBER.match(token) or _NON_FINITE.match(token))


def _to_float(token: str, path: str, line: int) -> float:
    # Fast path: for ASCII text without underscores Python's float() accepts exactly the
    # decimal numbers of _NUMBER (less the Fortran 'd' exponent) plus nan/inf, which are
    # not finite; anything else takes the checked path below, which names the problem.
    if token.isascii() and "_" not in token:
        try:
            value = float(token)
        except ValueError:
            pass
        else:
            if math.isfinite(value):
                return value
    if _NUMBER.match(token):
        value = float(token.replace("d", "e").replace("D", "e"))
        if math.isfinite(value):
            return value
        raise _fail(path, line, f"{token!r} is too large to be a finite number")
    if _NON_FINITE.match(token):
        raise _fail(path, line, f"{token!r} is not a finite number; every value must be "
                    "a finite number (fill gaps in the record before reading it)")
    raise _fail(path, line, f"{token!r} is not a number; expected decimal numbers such "
                "as 0.0123, -1.5e-3 or 12")


_RUN_TOGETHER_PIECE = re.compile(rf"{_NUM}", re.ASCII)


def _value_tokens(text: str) -> list[str]:
    """Tokens of a values line; numbers run together in fixed-width columns
    (``-5.0E-02-3.7E-02``) are split where each new number starts with its sign."""
    tokens = []
    for token in _tokens(text):
        if not _numeric_like(token):
            pieces = _RUN_TOGETHER_PIECE.findall(token)
            if (len(pieces) > 1 and "".join(pieces) == token
                    and all(piece[0] in "+-" for piece in pieces[1:])):
                tokens.extend(pieces)
                continue
        tokens.append(token)
    return tokens


def _data_lines(lines: list[tuple[int, str]]) -> list[tuple[int, str]]:
    """Lines with comments removed, blank ones dropped."""
    kept = []
    for number, raw in lines:
        text = _strip_comment(raw)
        if text:
            kept.append((number, text))
    return kept


def _check_count(path: str, count: int) -> None:
    if count < MIN_POINTS:
        raise _fail(path, None, f"has {count} acceleration values; at least {MIN_POINTS} "
                    "are needed for a time history")


def _given_time_step(dt_s, path: str) -> float | None:
    if dt_s is None:
        return None
    try:
        dt = float(dt_s)
    except (TypeError, ValueError):
        raise _fail(path, None, f"time step dt_s must be a number > 0 [s]; got {dt_s!r}") \
            from None
    if not math.isfinite(dt) or dt <= 0.0:
        raise _fail(path, None, f"zero or negative time step: dt_s must be a finite "
                    f"number > 0 [s]; got {dt_s!r}")
    return dt


def _check_agreement(path: str, given: float | None, found: float, source: str) -> None:
    if given is not None and abs(given - found) > TIME_STEP_TOLERANCE * found:
        raise _fail(path, None, f"the given time step dt_s={given:g} s disagrees with the "
                    f"{source} ({found:g} s); remove dt_s or correct it")


# --------------------------------------------------------------------- the formats


_TO_SPACE = str.maketrans(",;\t", "   ")


def _numpy_table(text: str) -> np.ndarray | None:
    """
    Rows of whitespace-separated numbers in ``text`` parsed by numpy's compiled text
    reader (blank lines skipped) as a 2-D array, or None if numpy refuses any of it.
    """
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error")
            return np.loadtxt(io.StringIO(text), dtype=np.float64, ndmin=2, comments=None)
    except (ValueError, UserWarning):
        return None


#: Bytes a clean two-column body may hold once its comments are removed: the characters
#: of plain decimal numbers (no Fortran 'D' exponent, no nan/inf, no underscore) and the
#: separators. For tokens made of these, ``float`` succeeds exactly when the token
#: matches ``_NUMBER`` (the decimal-literal grammar of the Python reference, less 'D').
_CLEAN_BODY_BYTES = b"0123456789.eE+-,; \t\n"
_COMMENT = re.compile(r"#[^\n]*")


def _clean_two_column(text: str, detecting: bool):
    """
    Read the common clean two-column file in one pass, or return None whenever the
    line-by-line path (:func:`detect_format`, :func:`_parse_two_column`) might decide
    anything differently; it then runs and decides, or names the problem. This is the
    readers' one fast path.

    ``text`` has LF line ends. Clean means: blank and comment lines, then one optional
    header row, then a body whose lines, with comments removed, are blank or hold two
    plain decimal numbers separated by commas, semicolons, spaces or tabs, all finite.
    With ``detecting`` the file must also have no line naming both NPTS and DT, at
    least two data rows and a strictly increasing first column, which is when
    :func:`detect_format` answers ``two-column`` with :data:`_EVERY_ROW_TWO`.

    Returns
    -------
    tuple or None
        (header-row history line or None, line numbers of the data rows, (n, 2) array
        of time and acceleration), exactly as the line-by-line path finds them.
    """
    if detecting and _may_state_npts_and_dt(text):
        return None
    number, start = 1, 0
    while True:  # blank and comment lines, up to the first data row
        end = text.find("\n", start)
        row = _strip_comment(text[start:] if end < 0 else text[start:end])
        if row:
            break
        if end < 0:
            return None
        number, start = number + 1, end + 1
    header = None
    if not any(_numeric_like(token) for token in _tokens(row)):
        if end < 0:
            return None
        header = _header_row_note(number, row)
        number, start = number + 1, end + 1
    body = text[start:]
    if "#" in body:
        body = _COMMENT.sub("", body)  # as _strip_comment does, line by line
    if not body.isascii() or body.encode("ascii").translate(None, _CLEAN_BODY_BYTES):
        return None
    body = body.rstrip()
    if not body:
        return None
    table = _numpy_table(body.translate(_TO_SPACE))
    if table is None or table.shape[1] != 2 or not np.all(np.isfinite(table)):
        return None
    count = body.count("\n") + 1
    if len(table) == count:  # numpy skips only blank lines, so none was blank
        numbers = range(number, number + count)
    else:
        numbers = [number + k for k, line in enumerate(body.split("\n")) if line.strip()]
        if len(numbers) != len(table):  # a line of separators only
            return None
    if detecting:
        with np.errstate(all="ignore"):
            if len(table) < 2 or not np.all(np.diff(table[:, 0]) > 0.0):
                return None
    return header, numbers, table


def _two_columns_checked(rows, path) -> tuple[list[float], list[float]]:
    """Times and values of ``rows`` read line by line; the first problem is an error
    naming its line."""
    times, values = [], []
    for number, text in rows:
        tokens = _tokens(text)
        if len(tokens) != 2:
            hint = ""
            if len(tokens) == 4 and ";" in text:
                hint = " (decimal commas are not supported; use points)"
            raise _fail(path, number, f"expected two numbers (time and acceleration), found "
                        f"{len(tokens)} item{'s' if len(tokens) != 1 else ''} in {text!r}{hint}")
        times.append(_to_float(tokens[0], path, number))
        values.append(_to_float(tokens[1], path, number))
    return times, values


def _header_row_note(number: int, row: str) -> str:
    return f"header row on line {number} skipped: {row!r}"


def _parse_two_column(lines, path, dt_given):
    rows = _data_lines(lines)
    history = []
    if rows and not any(_numeric_like(token) for token in _tokens(rows[0][1])):
        history.append(_header_row_note(*rows[0]))
        rows = rows[1:]
    if not rows:
        raise _fail(path, None, "has no data lines; expected lines of time and acceleration")
    times, values = _two_columns_checked(rows, path)
    return _from_time_column(times, values, [number for number, _ in rows], history,
                             path, dt_given)


def _from_time_column(times, values, numbers, history, path, dt_given):
    """Values, time step, history and line lookup of two-column data rows (``times`` a
    list of floats; ``numbers`` the rows' line numbers), after checking the time column."""
    _check_count(path, len(values))
    time = np.array(times)
    with np.errstate(all="ignore"):
        steps = np.diff(time)
        not_increasing = np.flatnonzero(~(steps > 0.0))
        if not_increasing.size:
            index = int(not_increasing[0])
            raise _fail(path, numbers[index + 1],
                        f"time {times[index + 1]:g} s is not greater than the time "
                        f"{times[index]:g} s on line {numbers[index]}; the time column must "
                        "be strictly increasing")
        dt = (time[-1] - time[0]) / (time.size - 1)
        if not math.isfinite(dt) or dt <= 0.0:
            raise _fail(path, None, f"zero or negative time step ({dt:g} s) from the time "
                        "column")
        # The typical (median) step is the reference, so one bad step is the one named.
        typical = float(np.median(steps))
        deviation = np.abs(steps - typical) / typical
    uneven = np.flatnonzero(~(deviation <= TIME_STEP_TOLERANCE))
    if uneven.size:
        index = int(uneven[0])
        raise _fail(path, numbers[index + 1],
                    f"time step {steps[index]:g} s (from line {numbers[index]}) differs from "
                    f"the typical step {typical:g} s by {100 * deviation[index]:.3g} %; at most "
                    f"{100 * TIME_STEP_TOLERANCE:g} % is allowed (the record must be equally "
                    "spaced)")
    _check_agreement(path, dt_given, dt, "time column")
    largest = 100 * float(np.max(deviation))
    # Below 0.0001 % the deviation is rounding in the file's time column; the one rule
    # for tiny values (sdofreport.core.decimal_text) says so without an exponent.
    largest_text = below_tiny(largest) if largest < TINY else f"{largest:.2g}"
    history.append(f"time step {dt:g} s from the time column (largest step deviation "
                   f"{largest_text} %)")
    if time[0] != 0.0:
        history.append(f"time column starts at {time[0]:g} s; samples re-timed to start "
                       "at 0 s")
    return np.array(values), dt, history, numbers.__getitem__


def _parse_values(lines, path, dt_given, reason=""):
    if dt_given is None:
        raise _fail(path, None, "no time step: the values format has no time column or "
                    f"header{reason}, so the time step (dt_s) must be given")
    values, spans = _values_with_spans(_data_lines(lines), path)
    if not values:
        raise _fail(path, None, "has no data lines; expected acceleration values")
    _check_count(path, len(values))
    return (np.array(values), dt_given, [f"time step {dt_given:g} s given by the user"],
            lambda index: _line_of_value(spans, index))


def _values_with_spans(rows, path):
    """Every value of ``rows`` and (line number, count of values) for each line."""
    values, spans = [], []
    for number, text in rows:
        found = [_to_float(token, path, number) for token in _value_tokens(text)]
        values.extend(found)
        spans.append((number, len(found)))
    return values, spans


def _line_of_value(spans, index: int) -> int | None:
    """The line that holds value number ``index`` (from 0), given (line, count) spans."""
    for number, count in spans:
        if index < count:
            return number
        index -= count
    return None


def _header_values(text: str):
    """(npts token, dt token, dt unit word or None) stated on one header line, or None."""
    own = _OWN_COUNT_STEP.match(text)
    if own:
        return own.group(1), own.group(2), own.group(3)
    npts, dt = _NPTS_VALUE.search(text), _DT_VALUE.search(text)
    if npts and dt:
        return npts.group(1), dt.group(1), dt.group(2)
    first = _VALUES_FIRST.match(text)
    if first and {first.group(3).upper(), first.group(4).upper()} == {"NPTS", "DT"}:
        stated = {first.group(3).upper(): first.group(1), first.group(4).upper(): first.group(2)}
        return stated["NPTS"], stated["DT"], None
    return None


def _may_state_npts_and_dt(text: str) -> bool:
    """
    False only if no line of ``text`` names both NPTS and DT. A line's match of
    ``_HAS_NPTS`` is also a match in the whole text (a line break is no word character,
    so ``\\b`` holds at line ends too), and those patterns fold ASCII case only, which
    ``bytes.lower`` does; the substring tests skip the slower searches for most files.
    """
    folded = text.encode("utf-8", "surrogatepass").lower()
    if b"samples:" in folded and b"step:" in folded:
        return True  # perhaps sdofreport's own count-and-step line
    return (b"npts" in folded and b"dt" in folded
            and _HAS_NPTS.search(text) is not None and _HAS_DT.search(text) is not None)


def _find_header_line(lines):
    """Index into ``lines`` of the first line naming both NPTS and DT (or stating
    ``samples: N, step: DT`` as sdofreport writes it), or None."""
    if not _may_state_npts_and_dt("\n".join(raw for _, raw in lines)):
        return None
    for index, (_, raw) in enumerate(lines):
        if _OWN_COUNT_STEP.match(raw) or (_HAS_NPTS.search(raw) and _HAS_DT.search(raw)):
            return index
    return None


def _parse_headed(lines, path, dt_given):
    index = _find_header_line(lines)
    if index is None:
        raise _fail(path, None, "has no header line stating NPTS and DT (for example "
                    "'NPTS= 4000, DT= 0.01 SEC'); expected by the headed format")
    header_number, header_text = lines[index]
    stated = _header_values(header_text)
    if stated is None:
        raise _fail(path, header_number, f"names NPTS and DT but their values could not be "
                    f"read from {header_text.strip()!r}; expected for example "
                    "'NPTS= 4000, DT= 0.01 SEC' or '4000 0.01 NPTS, DT'")
    npts_token, dt_token, unit_word = stated
    npts_value = float(npts_token.replace("d", "e").replace("D", "e"))
    if not (math.isfinite(npts_value) and npts_value == int(npts_value) and npts_value > 0):
        raise _fail(path, header_number, f"NPTS must be a whole number > 0; found "
                    f"{npts_token!r}")
    npts = int(npts_value)
    scale = _TIME_UNITS.get(unit_word.lower(), 1.0) if unit_word else 1.0
    dt = float(dt_token.replace("d", "e").replace("D", "e")) * scale
    if not math.isfinite(dt) or dt <= 0.0:
        raise _fail(path, header_number, f"zero or negative time step: DT is {dt_token!r}; "
                    "expected a number > 0 in seconds")

    data_start = None
    for position in range(index + 1, len(lines)):
        tokens = _value_tokens(_strip_comment(lines[position][1]))
        if tokens and all(_numeric_like(token) for token in tokens):
            data_start = position
            break
    if data_start is None:
        raise _fail(path, header_number, "no acceleration values follow the NPTS/DT header "
                    "line; expected lines of numbers")
    values, spans = _values_with_spans(_data_lines(lines[data_start:]), path)
    if len(values) != npts:
        raise _fail(path, header_number, f"states NPTS={npts} but {len(values)} values were "
                    f"found (lines {lines[data_start][0]} to {lines[-1][0]}); the stated count "
                    "must match the values")
    _check_count(path, len(values))
    _check_agreement(path, dt_given, dt, f"DT on header line {header_number}")
    history = [f"header lines 1 to {lines[data_start][0] - 1} skipped; time step {dt:g} s "
               f"and {npts} points from line {header_number}"]
    return np.array(values), dt, history, lambda index: _line_of_value(spans, index)


def detect_format(lines: list[tuple[int, str]]) -> tuple[str, str]:
    """
    Choose a format for the numbered ``lines`` of a file and say why.

    ``headed`` if a line names both NPTS and DT; ``two-column`` if every data line
    (after an optional header row of names) holds exactly two numbers and the first
    column strictly increases; ``values`` otherwise.

    A file that is two-column except for a few faulty lines (a truncated last row, a
    repeated time, a stray delimiter, decimal commas) is still taken as ``two-column``,
    so that reading it names the faulty line instead of asking for a time step: at least
    :data:`_MOSTLY` of the data lines must hold two numbers (or two decimal-comma
    numbers) and their first column must increase at :data:`_MOSTLY` of the steps. An
    accelerogram written two values per line oscillates, so its first column does not.

    Returns
    -------
    tuple of str
        The format name and a short reason.
    """
    header = _find_header_line(lines)
    if header is not None:
        return "headed", f"line {lines[header][0]} states NPTS and DT"
    rows = _data_lines(lines)
    if rows and not any(_numeric_like(token) for token in _tokens(rows[0][1])):
        rows = rows[1:]
    if len(rows) >= 2:
        split = [_tokens(text) for _, text in rows]
        if all(len(tokens) == 2 and _NUMBER.match(tokens[0]) for tokens in split):
            with np.errstate(all="ignore"):
                first = np.array([float(t[0].replace("d", "e").replace("D", "e"))
                                  for t in split])
                increasing = bool(np.all(np.diff(first) > 0.0))
            if increasing:
                return "two-column", _EVERY_ROW_TWO
        if _mostly_two_column(rows):
            return "two-column", ("most data lines hold two numbers and the first column "
                                  "increases")
    return "values", "no NPTS/DT header line and not two increasing columns"


#: Reason :func:`detect_format` gives for a file whose every data row is two numbers.
_EVERY_ROW_TWO = "every data line holds two numbers and the first column increases"

#: Share of lines and of time steps that make a file "mostly two-column" (a choice of
#: ours: it tolerates one faulty line in ten; no published source).
_MOSTLY = 0.9


def _mostly_two_column(rows: list[tuple[int, str]]) -> bool:
    firsts = []
    for _, text in rows:
        tokens = _tokens(text)
        if len(tokens) == 4 and ";" in text and all(t.lstrip("+-").isdigit()
                                                    for t in tokens):
            tokens = [f"{tokens[0]}.{tokens[1]}", f"{tokens[2]}.{tokens[3]}"]  # 0,01;0,25
        if len(tokens) == 2 and _NUMBER.match(tokens[0]) and _numeric_like(tokens[1]):
            firsts.append(float(tokens[0].replace("d", "e").replace("D", "e")))
    if len(firsts) < max(2, _MOSTLY * len(rows)):
        return False
    with np.errstate(all="ignore"):
        steps = np.diff(np.array(firsts))
    return bool(np.mean(steps > 0.0) >= _MOSTLY)


def _resolve_units(units, path: str) -> tuple[str, str | None]:
    if units is None:
        return "g", "units: none declared; values taken as g"
    try:
        return normalise_acceleration_unit(units), None
    except ValueError:
        allowed = ", ".join(ACCELERATION_UNITS)
        raise _fail(path, None, f"unknown acceleration unit {units!r}; allowed units are "
                    f"{allowed}") from None


def _format_g(value: float) -> str:
    if 0.01 <= value < 1000.0:
        text = f"{value:.3g}"
        return text if ("." in text or value >= 100.0) else f"{text}.0"
    return f"{value:.2e}"


def _amplitude_warning(peak_raw: float, units: str) -> str | None:
    """Warning text if the peak is implausible in ``units``, suggesting units that fit."""
    low, high = PLAUSIBLE_PEAK_G
    peak_g = peak_raw * acceleration_factor(units) / G
    if low <= peak_g <= high:
        return None
    if peak_raw == 0.0:
        return "peak 0 g: every acceleration value is zero"
    lead = (f"peak {_format_g(peak_g)} g is implausible for a ground motion "
            f"(declared units {units})")
    suggestions, seen = [], {}
    for name, factor in ACCELERATION_UNITS.items():
        if name == units or factor == acceleration_factor(units):
            continue
        if factor in seen:
            seen[factor].append(name)
            continue
        candidate_g = peak_raw * factor / G
        if _SUGGESTED_PEAK_G[0] <= candidate_g <= _SUGGESTED_PEAK_G[1]:
            seen[factor] = [name]
            suggestions.append((seen[factor], candidate_g))
    if not suggestions:
        return f"{lead}; no supported unit would make it plausible: check the file"
    parts = []
    for position, (names, candidate_g) in enumerate(suggestions):
        label = names[0] + (f" (or {', '.join(names[1:])})" if len(names) > 1 else "")
        if position == 0:
            parts.append(f"if the file is in {label} the peak would be "
                         f"{_format_g(candidate_g)} g")
        else:
            parts.append(f"in {label}, {_format_g(candidate_g)} g")
    return f"{lead}; " + "; ".join(parts)


def _refuse_absurd(acceleration, raw, units: str, path: str, line_of) -> None:
    """A RecordError naming the line of the first value beyond :data:`ABSURD_PEAK_G`."""
    over = np.flatnonzero(np.abs(acceleration) > ABSURD_PEAK_G * G)
    if over.size:
        index = int(over[0])
        in_g = "" if units == "g" else f" ({abs(acceleration[index]) / G:.3g} g)"
        raise _fail(path, line_of(index),
                    f"the value {raw[index]:g} {units}{in_g} is beyond any ground motion "
                    f"(at most {ABSURD_PEAK_G:g} g is accepted); check the values and units")


def _parse(text, file_format, path, dt_given, fast):
    """(format, detection history, values, dt, history, line lookup) of the LF-ended
    ``text``; ``fast`` tries :func:`_clean_two_column` before the line-by-line path."""
    clean = None
    if fast and file_format in ("auto", "two-column"):
        clean = _clean_two_column(text, detecting=file_format == "auto")
    if clean is not None:
        header, numbers, table = clean
        detected = ([f"format: detected two-column ({_EVERY_ROW_TWO})"]
                    if file_format == "auto" else [])
        return ("two-column", detected,
                *_from_time_column(table[:, 0].tolist(), table[:, 1], numbers,
                                   [header] if header else [], path, dt_given))
    lines = _split_lines(text)
    detected = []
    chosen, reason = file_format, ""
    if file_format == "auto":
        chosen, reason = detect_format(lines)
        detected.append(f"format: detected {chosen} ({reason})")
    if chosen == "two-column":
        parsed = _parse_two_column(lines, path, dt_given)
    elif chosen == "headed":
        parsed = _parse_headed(lines, path, dt_given)
    else:
        why = f" (auto detection: {reason})" if reason else ""
        parsed = _parse_values(lines, path, dt_given, why)
    return (chosen, detected, *parsed)


def _read(path, file_format, units, dt_s, record_id, *, fast=True) -> Record:
    path_text = str(path)
    if file_format not in RECORD_FORMATS:
        raise _fail(path_text, None, f"unknown record format {file_format!r}; allowed formats "
                    f"are {', '.join(RECORD_FORMATS)}")
    canonical_units, units_note = _resolve_units(units, path_text)
    dt_given = _given_time_step(dt_s, path_text)
    data = _load_bytes(path_text)
    text = _normalise_line_ends(_decode(data, path_text))
    _quoted_numbers(text, path_text)
    # ``fast=False`` keeps to the line-by-line path (the reference the tests compare with).
    chosen, history, raw, dt, steps, line_of = _parse(text, file_format, path_text,
                                                      dt_given, fast)
    history.insert(0, f"read {raw.size} values from '{Path(path_text).name}' as {chosen}")
    history.extend(steps)

    factor = acceleration_factor(canonical_units)
    with np.errstate(all="ignore"):
        acceleration = raw * factor
    if not np.all(np.isfinite(acceleration)):
        index = int(np.flatnonzero(~np.isfinite(acceleration))[0])
        raise _fail(path_text, line_of(index),
                    f"the value {raw[index]:g} becomes infinite when converted from "
                    f"{canonical_units} to m/s2; check the values and units")
    _refuse_absurd(acceleration, raw, canonical_units, path_text, line_of)
    history.append(units_note or f"units: {canonical_units} (declared)")
    if factor != 1.0:
        history.append(f"converted from {canonical_units} to m/s2 (x {factor:g})")

    warning = _amplitude_warning(float(np.max(np.abs(raw))), canonical_units)
    return Record(
        id=str(record_id) if record_id is not None else Path(path_text).stem,
        dt_s=dt,
        acceleration_m_s2=acceleration,
        source_path=path_text,
        sha256=hashlib.sha256(data).hexdigest(),
        units=canonical_units,
        file_format=chosen,
        history=tuple(history),
        warnings=(warning,) if warning else (),
        stated_units=stated_units(text),
    )


# ------------------------------------------------------------------------- public


def read_record(path, *, file_format="auto", units=None, dt_s=None, record_id=None) -> Record:
    """
    Read one ground-acceleration record from a text file.

    Parameters
    ----------
    path : str or os.PathLike
        The file.
    file_format : str, optional
        One of :data:`RECORD_FORMATS`; ``"auto"`` detects it (see :func:`detect_format`)
        and records the choice in ``Record.file_format`` and ``Record.history``.
    units : str or None, optional
        Units of the acceleration values (see
        :data:`sdofreport.core.units.ACCELERATION_UNITS`); None means g.
    dt_s : float or None, optional
        Time step; required by ``values``, checked against the file otherwise. [s]
    record_id : str or None, optional
        Record name; defaults to the file stem.

    Returns
    -------
    Record
        Acceleration in m/s², with history and any amplitude warning.

    Raises
    ------
    sdofreport.errors.RecordError
        For any problem with the file or the arguments, naming the file and line.
    """
    return _read(path, file_format, units, dt_s, record_id)


def read_two_column(path, *, units=None, dt_s=None, record_id=None) -> Record:
    """Read a ``two-column`` (time, acceleration) file; see :func:`read_record`."""
    return _read(path, "two-column", units, dt_s, record_id)


def read_values(path, *, units=None, dt_s=None, record_id=None) -> Record:
    """Read a ``values`` file (acceleration only; ``dt_s`` required); see :func:`read_record`."""
    return _read(path, "values", units, dt_s, record_id)


def read_headed(path, *, units=None, dt_s=None, record_id=None) -> Record:
    """Read a ``headed`` file (NPTS/DT header line, then values); see :func:`read_record`."""
    return _read(path, "headed", units, dt_s, record_id)


__all__ = [
    "ABSURD_PEAK_G",
    "MIN_POINTS",
    "PLAUSIBLE_PEAK_G",
    "RECORD_FORMATS",
    "RECORD_FORMAT_DESCRIPTIONS",
    "TIME_STEP_TOLERANCE",
    "detect_format",
    "read_headed",
    "read_record",
    "read_two_column",
    "read_values",
]
