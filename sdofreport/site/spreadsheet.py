"""``data/results.xlsx``: the checks, peaks, spectra and scaling of a run as a workbook.

Built only from the results document (``data/results.json``), so the workbook can never
say anything the JSON does not. Written with openpyxl (maintained, pure Python, the
reference writer of the Office Open XML spreadsheet format in Python) and then re-packed
with fixed member dates, so the same inputs give the same bytes.
"""

from __future__ import annotations

import datetime
import io
import zipfile

from sdofreport.core.fragility import STATISTIC_KEYS

#: Member date of every entry of the re-packed workbook (the earliest a zip can hold).
_ZIP_DATE = (1980, 1, 1, 0, 0, 0)

#: Sheet names in order; keys are interface (tests and users read them by name).
SHEETS = ("checks", "peaks", "spectra", "scaling")

_CHECK_COLUMNS = (("system", "system"), ("quantity", "quantity"), ("unit", "unit"),
                  ("limit", "limit"), ("demand", "demand"), ("statistic", "statistic"),
                  ("ratio", "ratio"), ("verdict", "verdict"), ("basis", "basis"))
#: Statistics of the per-record peaks appended to each checks row (results.json
#: ``checks[].statistics``; the ``statistic`` column names the governing one).
_STATISTIC_COLUMNS = STATISTIC_KEYS
_PEAK_COLUMNS = ("peak_displacement_m", "peak_drift_ratio", "peak_base_shear_n",
                 "peak_total_accel_g", "ductility", "residual_displacement_m")
_SPECTRUM_COLUMNS = ("sd_m", "psa_g", "sa_g", "sv_m_s")


def _document_date(document: dict) -> datetime.datetime:
    """The run's date (``[project] date``) at midnight, else 2000-01-01: never 'now'."""
    text = (document.get("project") or {}).get("date")
    try:
        return datetime.datetime.strptime(str(text)[:10], "%Y-%m-%d")
    except (TypeError, ValueError):
        return datetime.datetime(2000, 1, 1)


def _cell(value):
    """A cell value: numbers and text as they are, anything else as text, None empty."""
    if value is None or isinstance(value, (bool, int, float, str)):
        return value
    return str(value)


def _sheet(workbook, title: str, header: list[str], rows: list[list]) -> None:
    sheet = workbook.create_sheet(title)
    sheet.append(header)
    for row in rows:
        sheet.append([_cell(value) for value in row])
    sheet.freeze_panes = "A2"


def _checks_rows(document: dict) -> list[list]:
    rows = []
    for system in document.get("systems", []):
        for check in system.get("checks", []):
            statistics = check.get("statistics") or {}
            rows.append([system["id"]] + [check.get(key) for _, key in _CHECK_COLUMNS[1:]]
                        + [statistics.get(key) for key in _STATISTIC_COLUMNS])
    return rows


def _peaks_rows(document: dict) -> list[list]:
    rows = []
    for system in document.get("systems", []):
        for response in system.get("responses", []):
            rows.append([system["id"], response.get("record")]
                        + [response.get(key) for key in _PEAK_COLUMNS])
    return rows


def _spectra_rows(document: dict) -> list[list]:
    spectra = document.get("spectra") or {}
    periods = spectra.get("periods_s") or []
    damping = spectra.get("damping") or []
    rows = []
    for record in document.get("records", []):
        block = spectra.get(record["id"])
        if not block:
            continue
        for z, zeta in enumerate(damping):
            for p, period in enumerate(periods):
                rows.append([record["id"], zeta, period]
                            + [block[key][z][p] for key in _SPECTRUM_COLUMNS])
    return rows


def _scaling_rows(document: dict) -> tuple[list[str], list[list]]:
    scaling = document.get("scaling")
    header = ["item", "name", "value", "required", "passed", "source"]
    if not scaling:
        return header, [["rule", "none", None, None, None, None]]
    rows = [["rule", scaling.get("rule"), None, None, None, scaling.get("standard")]]
    for key in ("complies", "target_level", "target_damping", "motions_counted"):
        if key in scaling:
            rows.append(["setting", key, scaling[key], None, None, None])
    period_range = scaling.get("period_range_s")
    if period_range:
        rows.append(["period range [s]", "from", period_range[0], None, None, None])
        rows.append(["period range [s]", "to", period_range[1], None, None, None])
    for criterion in scaling.get("criteria", []):
        rows.append(["criterion", criterion.get("name"), criterion.get("achieved"),
                     criterion.get("required"), criterion.get("passed"),
                     criterion.get("source")])
    totals = {record["id"]: record for record in document.get("records", [])}
    for record in scaling.get("records", []):
        total = totals.get(record["id"], {}).get("total_scale")
        rows.append(["record factor", record["id"], record.get("factor"), None, None,
                     None if total is None else f"total scale {total!r}"])
    for note in scaling.get("notes", []):
        rows.append(["note", note, None, None, None, None])
    return header, rows


def results_workbook(document: dict) -> bytes:
    """
    The bytes of ``data/results.xlsx`` for a results document.

    Parameters
    ----------
    document : dict
        The results document (``sdofreport.outputs.results_json.results_document``); values are
        SI with the unit in the column name, as in the JSON.

    Returns
    -------
    bytes
        An Office Open XML workbook with the sheets of :data:`SHEETS`; identical bytes
        for an identical document.
    """
    from openpyxl import Workbook
    from openpyxl.writer.excel import ExcelWriter

    workbook = Workbook()
    workbook.remove(workbook.active)
    stamp = _document_date(document)
    workbook.properties.created = stamp
    workbook.properties.modified = stamp
    workbook.properties.creator = str(document.get("generator", "sdofreport"))
    workbook.properties.title = str((document.get("project") or {}).get("title") or "")
    _sheet(workbook, "checks", [label for label, _ in _CHECK_COLUMNS] +
           list(_STATISTIC_COLUMNS), _checks_rows(document))
    _sheet(workbook, "peaks", ["system", "record", *_PEAK_COLUMNS], _peaks_rows(document))
    _sheet(workbook, "spectra", ["record", "damping", "period_s", *_SPECTRUM_COLUMNS],
           _spectra_rows(document))
    header, rows = _scaling_rows(document)
    _sheet(workbook, "scaling", header, rows)
    raw = io.BytesIO()
    with zipfile.ZipFile(raw, "w", zipfile.ZIP_DEFLATED, allowZip64=True) as archive:
        ExcelWriter(workbook, archive).write_data()  # save_workbook would stamp 'now'
    return _repack(raw.getvalue())


def _repack(data: bytes) -> bytes:
    """The same zip members in the same order with fixed dates and attributes."""
    out = io.BytesIO()
    with zipfile.ZipFile(io.BytesIO(data)) as source, \
            zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as target:
        for info in source.infolist():
            member = zipfile.ZipInfo(info.filename, date_time=_ZIP_DATE)
            member.compress_type = zipfile.ZIP_DEFLATED
            member.external_attr = 0o644 << 16
            target.writestr(member, source.read(info.filename), compresslevel=6)
    return out.getvalue()
