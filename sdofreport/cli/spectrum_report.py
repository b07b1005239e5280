"""The ``sdofreport spectrum`` job: one record in, spectra and intensity measures out."""

from __future__ import annotations

from sdofreport.core.intensity import intensity_measures
from sdofreport.core.spectra import default_periods, response_spectrum
from sdofreport.errors import SdofreportError
from sdofreport.records import read_record
from sdofreport.outputs.serialize import (
    intensity_to_dict,
    record_summary,
    spectrum_csv_header,
    spectrum_csv_rows,
    spectrum_to_dict,
)


def spectrum_report(path, *, file_format="auto", units=None, dt_s=None, damping=(0.05,),
                    periods=None, method="exact") -> dict:
    """
    Read one record and compute its response spectra and intensity measures.

    Parameters
    ----------
    path : str
        Record file. [-]
    file_format, units, dt_s
        As :func:`sdofreport.records.read_record`; ``dt_s`` in [s].
    damping : sequence of float
        Damping ratios. [-]
    periods : sequence of float or None
        Periods [s]; ``None`` gives the default grid (200 log-spaced, 0.01-10 s).
    method : str
        One of :data:`sdofreport.core.spectra.SPECTRUM_METHODS`.

    Returns
    -------
    dict
        ``json``: the interface document; ``csv``: rows with a header (spectra, then
        the record's intensity measures on every row); ``read``: one line saying the
        file layout (detected or given), point count, time step and units;
        ``warnings`` and ``notes``: text for the user.
    """
    record = read_record(path, file_format=file_format, units=units, dt_s=dt_s)
    period_grid = default_periods() if periods is None else periods
    try:
        spectrum = response_spectrum(record.acceleration_m_s2, record.dt_s, period_grid,
                                     list(damping), method=method)
    except ValueError as exc:
        raise SdofreportError(f"{path}: cannot compute the spectrum: {exc}") from None
    measures = intensity_measures(record.acceleration_m_s2, record.dt_s)
    document = {
        "record": record_summary(record),
        "intensity": intensity_to_dict(measures),
        **spectrum_to_dict(spectrum),
    }
    measures_row = intensity_to_dict(measures)
    # One table: the record's intensity measures repeat on every row, so a spreadsheet
    # or csv reader gets them without a second section.
    rows = [spectrum_csv_header() + list(measures_row)] + [
        row + list(measures_row.values()) for row in spectrum_csv_rows(spectrum)]
    how = "detected" if file_format == "auto" else "as given"
    read = (f"Read {path}: layout {record.file_format} ({how}), {record.npts} points at "
            f"{record.dt_s:g} s, units {record.units}.")
    return {"json": document, "csv": rows, "warnings": list(record.warnings),
            "notes": list(record.history), "read": read}
