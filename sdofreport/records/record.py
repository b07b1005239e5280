"""The :class:`Record` type: one equally spaced ground-acceleration history, SI inside."""

from __future__ import annotations

import hashlib
from dataclasses import dataclass, field

import numpy as np

from sdofreport.core.units import acceleration_factor, normalise_acceleration_unit


@dataclass(frozen=True, eq=False)
class Record:
    """
    One ground-acceleration time history, read from a file or built in memory.

    Equality is identity (``eq=False``): two records holding equal arrays are still
    different objects; compare ``sha256`` and the arrays explicitly when needed.

    Attributes
    ----------
    id : str
        Name used in the project and on the site (defaults to the file stem).
    dt_s : float
        Time step. [s]
    acceleration_m_s2 : numpy.ndarray
        Ground acceleration, read-only float64, first sample at t = 0. [m/s²]
    source_path : str or None
        File the record was read from; None for records built in memory.
    sha256 : str
        SHA-256 of the file bytes as read (of the float64 bytes for in-memory records);
        processing does not change it.
    units : str
        Acceleration units the user declared (canonical name from
        :data:`sdofreport.core.units.ACCELERATION_UNITS`); values were converted from them.
    file_format : str
        Format actually used to read the file (after automatic detection).
    history : tuple of str
        Human-readable steps from the file to these values, in order.
    warnings : tuple of str
        Things the user should look at (implausible amplitude, ...); not errors.
    stated_units : tuple of (str, int, str)
        Acceleration units the file's header lines state: (canonical unit, line, line
        text) each (see :mod:`sdofreport.records.header_units`); empty when none.
    """

    id: str
    dt_s: float
    acceleration_m_s2: np.ndarray
    source_path: str | None
    sha256: str
    units: str
    file_format: str
    history: tuple[str, ...] = field(default=())
    warnings: tuple[str, ...] = field(default=())
    stated_units: tuple[tuple[str, int, str], ...] = field(default=())

    def __post_init__(self) -> None:
        values = np.array(self.acceleration_m_s2, dtype=np.float64, copy=True)
        if values.ndim != 1:
            raise ValueError(
                f"acceleration_m_s2 must be one-dimensional [m/s²]; got shape {values.shape}"
            )
        values.flags.writeable = False
        dt = float(self.dt_s)
        if not np.isfinite(dt) or dt <= 0.0:
            raise ValueError(f"dt_s must be a finite number > 0 [s]; got {self.dt_s!r}")
        object.__setattr__(self, "acceleration_m_s2", values)
        object.__setattr__(self, "dt_s", dt)
        object.__setattr__(self, "history", tuple(self.history))
        object.__setattr__(self, "warnings", tuple(self.warnings))

    @property
    def npts(self) -> int:
        """Number of samples. [-]"""
        return int(self.acceleration_m_s2.size)

    @property
    def duration_s(self) -> float:
        """Time from the first to the last sample, (npts − 1)·dt. [s]"""
        return max(self.npts - 1, 0) * self.dt_s

    @property
    def time_s(self) -> np.ndarray:
        """Sample instants, starting at 0. [s]"""
        return np.arange(self.npts) * self.dt_s


def record_from_array(
    acceleration,
    dt_s,
    *,
    units="m/s2",
    record_id="record",
    source_path=None,
) -> Record:
    """
    Build a :class:`Record` from values in memory (synthetic motions, tests).

    Parameters
    ----------
    acceleration : array-like
        Equally spaced acceleration in ``units``. [units]
    dt_s : float
        Time step. [s]
    units : str, optional
        Units of ``acceleration``; converted to m/s². [-]
    record_id : str, optional
        Record name.
    source_path : str or None, optional
        Where the values came from, if anywhere.

    Returns
    -------
    Record
        With ``sha256`` of the float64 bytes of ``acceleration`` as given (before
        conversion) and ``file_format`` ``"array"``.

    Raises
    ------
    ValueError
        For an unknown unit, a non-positive time step, or non-finite or too few values.
    """
    canonical = normalise_acceleration_unit(units)
    values = np.array(acceleration, dtype=np.float64)
    if values.ndim != 1 or values.size < 2:
        raise ValueError(
            f"acceleration must be a 1-D sequence of at least 2 values [{canonical}]; "
            f"got shape {values.shape}"
        )
    if not np.all(np.isfinite(values)):
        bad = int(np.flatnonzero(~np.isfinite(values))[0])
        raise ValueError(
            f"acceleration must be finite [{canonical}]; sample {bad} is {values[bad]}"
        )
    digest = hashlib.sha256(np.ascontiguousarray(values).tobytes()).hexdigest()
    return Record(
        id=str(record_id),
        dt_s=dt_s,
        acceleration_m_s2=values * acceleration_factor(canonical),
        source_path=None if source_path is None else str(source_path),
        sha256=digest,
        units=canonical,
        file_format="array",
        history=(f"built in memory from {values.size} values in {canonical}",),
    )
