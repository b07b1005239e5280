"""Plain-dict views of core results with unit-suffixed keys, shared by every output.

The keys here are interface (``sdofreport spectrum`` JSON and ``results.json``): they
carry their unit as a suffix and stay SI except where the suffix says ``_g``.
"""

from __future__ import annotations

import json
import math
from typing import Any

import numpy as np

from sdofreport.core.units import G


def finite_or_none(value: float) -> float | None:
    """A float for JSON: NaN and infinities become ``None`` (JSON has no NaN)."""
    value = float(value)
    return value if math.isfinite(value) else None


def array_to_list(values: np.ndarray, scale: float = 1.0) -> list:
    """Nested lists of floats from an array, each value multiplied by ``scale``.

    NaN and infinities become ``None`` (see :func:`finite_or_none`).
    """
    arr = np.asarray(values, dtype=float) * scale
    if arr.ndim == 0 or arr.dtype != np.float64:  # element by element, as it always was
        return [finite_or_none(v) for v in arr] if arr.ndim == 1 else [
            array_to_list(row) for row in arr
        ]
    nested = arr.tolist()
    return nested if np.isfinite(arr).all() else _finite_or_none_nested(nested)


def _finite_or_none_nested(nested: list) -> list:
    """``nested`` (lists of floats from ``ndarray.tolist``) with non-finite floats ``None``."""
    if nested and isinstance(nested[0], list):
        return [_finite_or_none_nested(row) for row in nested]
    return [v if math.isfinite(v) else None for v in nested]


def json_text(document) -> str:
    """The text of every JSON file we write: indented by one space, UTF-8 characters
    as they are, NaN and infinities refused (``ValueError``), one final line break."""
    return json.dumps(document, indent=1, ensure_ascii=False, allow_nan=False) + "\n"


def record_summary(record: Any) -> dict:
    """``{"id", "dt_s", "npts", "sha256", "units"}`` of a :class:`~sdofreport.records.Record`."""
    return {
        "id": record.id,
        "dt_s": float(record.dt_s),
        "npts": int(record.npts),
        "sha256": record.sha256,
        "units": record.units,
    }


def intensity_to_dict(measures: Any) -> dict:
    """Intensity measures keyed as in the interface (PGA in g, the rest SI)."""
    return {
        "pga_g": finite_or_none(measures.pga_m_s2 / G),
        "pgv_m_s": finite_or_none(measures.pgv_m_s),
        "pgd_m": finite_or_none(measures.pgd_m),
        "arias_m_s": finite_or_none(measures.arias_m_s),
        "d5_95_s": finite_or_none(measures.d5_95_s),
        "d5_75_s": finite_or_none(measures.d5_75_s),
        "cav_m_s": finite_or_none(measures.cav_m_s),
        "mean_period_s": finite_or_none(measures.mean_period_s),
    }


def spectrum_to_dict(spectrum: Any) -> dict:
    """Response spectrum arrays indexed [damping][period], keyed with units."""
    return {
        "method": spectrum.method,
        "damping": array_to_list(spectrum.damping),
        "periods_s": array_to_list(spectrum.periods_s),
        "sd_m": array_to_list(spectrum.sd_m),
        "sv_m_s": array_to_list(spectrum.sv_m_s),
        "psv_m_s": array_to_list(spectrum.psv_m_s),
        "psa_g": array_to_list(spectrum.psa_m_s2, 1.0 / G),
        "sa_g": array_to_list(spectrum.sa_m_s2, 1.0 / G),
    }


#: Columns of the spectrum CSV, in order: (header, attribute, scale).
SPECTRUM_CSV_COLUMNS = (
    ("sd_m", "sd_m", 1.0),
    ("sv_m_s", "sv_m_s", 1.0),
    ("psv_m_s", "psv_m_s", 1.0),
    ("psa_g", "psa_m_s2", 1.0 / G),
    ("sa_g", "sa_m_s2", 1.0 / G),
)


def spectrum_csv_rows(spectrum: Any, prefix: tuple = ()) -> list[list]:
    """Rows ``[*prefix, damping, period_s, sd_m, sv_m_s, psv_m_s, psa_g, sa_g]``.

    One row per (damping, period), damping outer; every number a Python float. Spectra
    of float64 arrays with the documented shapes are done as whole arrays (the values
    are the same: ``array * scale`` rounds each product as ``array[i, j] * scale``
    does); anything else goes value by value.
    """
    block = spectrum_csv_block(spectrum)
    if block is None:
        return _spectrum_csv_rows_by_value(spectrum, prefix)
    rows = block.tolist()
    return [[*prefix, *row] for row in rows] if prefix else rows


def spectrum_csv_block(spectrum: Any) -> np.ndarray | None:
    """The CSV numbers as one float64 array ``(n_damping * n_periods, 7)``, or ``None``."""
    damping, periods = spectrum.damping, spectrum.periods_s
    columns = [getattr(spectrum, attr) for _, attr, _ in SPECTRUM_CSV_COLUMNS]
    arrays = [damping, periods, *columns]
    if not all(type(a) is np.ndarray and a.dtype == np.float64 for a in arrays):
        return None
    if damping.ndim != 1 or periods.ndim != 1:
        return None
    shape = (damping.size, periods.size)
    if any(c.shape != shape for c in columns):
        return None
    block = np.empty((damping.size * periods.size, 2 + len(columns)), dtype=np.float64)
    block[:, 0] = np.repeat(damping, periods.size)
    block[:, 1] = np.tile(periods, damping.size)
    for k, (column, (_, _, scale)) in enumerate(zip(columns, SPECTRUM_CSV_COLUMNS)):
        block[:, 2 + k] = (column * scale).reshape(-1)
    return block


def _spectrum_csv_rows_by_value(spectrum: Any, prefix: tuple) -> list[list]:
    rows = []
    for i, zeta in enumerate(spectrum.damping):
        for j, period in enumerate(spectrum.periods_s):
            values = [getattr(spectrum, attr)[i, j] * scale for _, attr, scale in SPECTRUM_CSV_COLUMNS]
            rows.append([*prefix, float(zeta), float(period), *map(float, values)])
    return rows


def spectrum_csv_header(prefix: tuple = ()) -> list[str]:
    """Header row matching :func:`spectrum_csv_rows`."""
    return [*prefix, "damping", "period_s", *(name for name, _, _ in SPECTRUM_CSV_COLUMNS)]
