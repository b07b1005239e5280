"""Writers for sdofreport's own plain-text record formats.

Two formats, both ASCII with ``"\\n"`` line endings, written atomically
(:func:`sdofreport.fsio.write_atomically`: a temporary file in the target folder, flushed,
then renamed) and deterministically (same inputs, same bytes):

``two-column``
    ``#`` comment lines (the caller's header lines, then ``# acceleration units: <u>``),
    a header row ``time_s,accel_<u>`` and one ``time,acceleration`` row per sample,
    e.g. ``0.0100,-1.23456789e-02``. Nine significant digits (relative round-off below
    ~6e-9); the time column has at least 4 decimals, more if the step needs them.

``headed``
    At least two free-text title lines, then exactly
    ``ACCELERATION IN G, NPTS=  4000, DT= 0.01000 SEC``, then the values in g, five per
    line, each ``%15.7E`` (eight significant digits, relative round-off below ~6e-8);
    the last line may hold fewer values.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence

import numpy as np

from sdofreport.core.units import ACCELERATION_UNITS, normalise_acceleration_unit
from sdofreport.fsio import write_atomically

#: Comment line stating the units in a two-column file (``{units}`` is filled in).
TWO_COLUMN_UNITS_LINE = "# acceleration units: {units}"
#: Header row of a two-column file.
TWO_COLUMN_HEADER = "time_s,accel_{units}"
#: Values per line in a headed file.
HEADED_VALUES_PER_LINE = 8
#: First line of every headed file sdofreport writes (our own layout).
HEADED_FIRST_LINE = "sdofreport record: equally spaced ground acceleration"
#: Title lines used to fill a headed file's title block up to two lines.
HEADED_DEFAULT_TITLES: tuple[str, ...] = ("untitled record", "written by sdofreport")


def _check_time_step(time_step_s) -> float:
    try:
        dt = float(time_step_s)
    except (TypeError, ValueError):
        raise ValueError(
            f"time_step_s must be a number > 0 [s]; got {time_step_s!r}"
        ) from None
    if not math.isfinite(dt) or dt <= 0.0:
        raise ValueError(f"time_step_s must be a finite number > 0 [s]; got {time_step_s!r}")
    return dt


def _check_values(values, name: str, unit: str) -> np.ndarray:
    arr = np.asarray(values, dtype=float)
    if arr.ndim != 1:
        raise ValueError(f"{name} must be one-dimensional [{unit}]; got shape {arr.shape}")
    if arr.size == 0:
        raise ValueError(f"{name} must hold at least one value [{unit}]; got none")
    bad = np.flatnonzero(~np.isfinite(arr))
    if bad.size:
        raise ValueError(
            f"{name} must hold finite values [{unit}]; "
            f"got {float(arr[bad[0]])!r} at index {int(bad[0])}"
        )
    return arr


def _check_text_lines(lines: Iterable[str], name: str) -> list[str]:
    if isinstance(lines, str):
        raise ValueError(f"{name} must be a sequence of strings, not one string; got {lines!r}")
    out = []
    for i, line in enumerate(lines):
        if not isinstance(line, str):
            raise ValueError(f"{name}[{i}] must be a string; got {line!r}")
        if "\n" in line or "\r" in line:
            raise ValueError(f"{name}[{i}] must not contain a line break; got {line!r}")
        if not line.isascii():
            raise ValueError(f"{name}[{i}] must be plain ASCII text; got {line!r}")
        out.append(line)
    return out


def _time_decimals(dt: float) -> int:
    """Fewest decimals (at least 4, at most 10) that print ``dt`` exactly enough."""
    for decimals in range(4, 11):
        if abs(round(dt, decimals) - dt) <= 1e-9 * dt:
            return decimals
    return 10


def _write_atomic(path, text: str) -> None:
    """Write ``text`` (ASCII, ``\\n`` line endings) to ``path`` whole or not at all
    (:func:`~sdofreport.fsio.write_atomically`), with the permissions an ordinary
    ``open(..., "w")`` gives."""
    write_atomically(path, text.encode("ascii"), mode=None)


def write_two_column(
    path,
    time_step_s,
    acceleration,
    *,
    units: str = "g",
    header_lines: Sequence[str] = (),
) -> None:
    """
    Write an equally spaced record in sdofreport's two-column text format.

    Parameters
    ----------
    path : str or os.PathLike
        File to create or replace; its folder must exist. [-]
    time_step_s : float
        Sampling interval, > 0. [s]
    acceleration : array-like
        Finite acceleration samples, already expressed in ``units``. [units]
    units : str, optional
        Acceleration unit of the values, one of
        :data:`sdofreport.core.units.ACCELERATION_UNITS` or an accepted alias;
        written in its canonical spelling. [-]
    header_lines : sequence of str, optional
        Comment lines written first, each prefixed with ``"# "`` unless it already
        starts with ``"#"``; ASCII, no line breaks. [-]

    Raises
    ------
    ValueError
        If an argument is out of range (message names parameter, value and unit).

    References
    ----------
    .. [1] Python Software Foundation, "os.replace," The Python Standard Library,
       https://docs.python.org/3/library/os.html#os.replace (atomic rename on POSIX).
    """
    dt = _check_time_step(time_step_s)
    try:
        unit = normalise_acceleration_unit(units)
    except ValueError:
        allowed = ", ".join(ACCELERATION_UNITS)
        raise ValueError(f"units must be one of {allowed} [-]; got {units!r}") from None
    acc = _check_values(acceleration, "acceleration", unit)
    comments = _check_text_lines(header_lines, "header_lines")

    lines = [c if c.startswith("#") else f"# {c}" for c in comments]
    lines.append(TWO_COLUMN_UNITS_LINE.format(units=unit))
    lines.append(TWO_COLUMN_HEADER.format(units=unit))
    decimals = _time_decimals(dt)
    time_fmt = f"%.{decimals}f"
    # Times as i * dt (no accumulated round-off); nine significant digits for values.
    rows = [
        f"{time_fmt % (i * dt)},{value:.8e}" for i, value in enumerate(acc.tolist())
    ]
    _write_atomic(path, "\n".join(lines + rows) + "\n")


def headed_header_line(npts: int, time_step_s: float) -> str:
    """
    The count-and-step line of a headed file, in sdofreport's own wording.

    Parameters
    ----------
    npts : int
        Number of samples, >= 1. [-]
    time_step_s : float
        Sampling interval, > 0. [s]

    Returns
    -------
    str
        For example ``"samples: 4000, step: 0.01 s"``.
    """
    return f"samples: {int(npts)}, step: {float(time_step_s):.10g} s"


def write_headed(path, time_step_s, acceleration_g, *, title_lines: Sequence[str] = ()) -> None:
    """
    Write an equally spaced record in sdofreport's headed text format (values in g).

    The layout is our own: a first line naming the file, ``title:`` lines, the unit,
    the line ``samples: N, step: DT s``, then the values, eight per line separated by
    single spaces. :func:`sdofreport.records.read_record` reads it as ``headed``, as
    it reads other files whose free-text header states a point count and a step.

    Parameters
    ----------
    path : str or os.PathLike
        File to create or replace; its folder must exist. [-]
    time_step_s : float
        Sampling interval, > 0 and a whole multiple of 1e-5 s, since the header prints
        it with five decimals. [s]
    acceleration_g : array-like
        Finite acceleration samples in units of standard gravity; magnitudes below
        1e-99 are written as 0. [g]
    title_lines : sequence of str, optional
        Free-text title lines (ASCII, no line breaks, not containing ``"NPTS="`` and
        not starting ``samples:``); the block is filled up to two lines with
        :data:`HEADED_DEFAULT_TITLES`. [-]

    Raises
    ------
    ValueError
        If an argument is out of range (message names parameter, value and unit).

    References
    ----------
    .. [1] Python Software Foundation, "os.replace," The Python Standard Library,
       https://docs.python.org/3/library/os.html#os.replace (atomic rename on POSIX).
    """
    dt = _check_time_step(time_step_s)
    if abs(round(dt, 5) - dt) > 1e-9 * dt or round(dt, 5) <= 0.0:
        raise ValueError(
            f"time_step_s must be a whole multiple of 0.00001 s for the headed format [s]; "
            f"got {time_step_s!r}"
        )
    acc = _check_values(acceleration_g, "acceleration_g", "g")
    titles = _check_text_lines(title_lines, "title_lines")
    for i, line in enumerate(titles):
        if "NPTS=" in line.upper() or line.strip().lower().startswith("samples:"):
            raise ValueError(f"title_lines[{i}] must not contain 'NPTS=' or start with "
                             f"'samples:'; got {line!r}")
    titles = titles + list(HEADED_DEFAULT_TITLES[len(titles):])

    lines = ([HEADED_FIRST_LINE] + [f"title: {line}" for line in titles]
             + ["unit: g", headed_header_line(acc.size, dt)])
    # Eight significant digits, far finer than any instrument's resolution.
    values = acc.tolist()
    step = HEADED_VALUES_PER_LINE
    for start in range(0, len(values), step):
        lines.append(" ".join(f"{v:.7e}" for v in values[start:start + step]))
    _write_atomic(path, "\n".join(lines) + "\n")
