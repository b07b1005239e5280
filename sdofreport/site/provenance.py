"""Where each record came from: rows of the record page and the suite page's table.

The values are the project file's ``[[records]]`` provenance keys as given (nothing is
looked up). The suite table states the ranges of magnitude, distance and Vs30 and the
mechanisms, so that a reviewer can judge whether the suite is consistent with the
design event, as the record-selection clauses ask (ASCE/SEI 7-22 §16.2.2, EN 1998-1:2004
§3.2.3.1.2; clause numbers from memory).
"""

from __future__ import annotations

from collections import Counter

#: Label of each provenance key (the order of sdofreport.project.schema.PROVENANCE_KEYS).
LABELS = {"event": "Event", "station": "Station", "magnitude": "Magnitude M_w",
          "distance_km": "Distance [km]", "vs30_m_s": "V_s30 [m/s]",
          "mechanism": "Mechanism", "source": "Source (database, identifier or DOI)",
          "selection_note": "Selection note"}

_NUMERIC = ("magnitude", "distance_km", "vs30_m_s")


def _shown(value) -> str:
    """As written: numbers with up to 6 significant figures, text unchanged."""
    return f"{value:g}" if isinstance(value, float) else str(value)


def record_rows(spec) -> list[tuple[str, str]]:
    """(label, value) of each provenance key the record states."""
    return [(LABELS[key], _shown(value)) for key, value in spec.provenance]


def suite_table(records) -> dict | None:
    """The suite page's provenance table and summary; None when no record states any."""
    specs = list(records)
    if not any(spec.provenance for spec in specs):
        return None
    rows = []
    for spec in specs:
        given = dict(spec.provenance)
        rows.append({"id": spec.id, **{key: _shown(given[key]) if key in given else "—"
                                       for key in LABELS}})
    summary = []
    for key in _NUMERIC:
        values = [dict(s.provenance)[key] for s in specs if key in dict(s.provenance)]
        text = (f"{_shown(min(values))} to {_shown(max(values))}" if values else
                "not stated")
        summary.append((LABELS[key], f"{text} ({len(values)} of {len(specs)} records "
                                     f"state it)"))
    mechanisms = Counter(dict(s.provenance).get("mechanism") for s in specs)
    stated = sorted((m, n) for m, n in mechanisms.items() if m is not None)
    missing = mechanisms.get(None, 0)
    text = ", ".join(f"{m} ({n})" for m, n in stated) or "not stated"
    if stated and missing:
        text += f"; not stated ({missing})"
    summary.append(("Mechanisms", text))
    return {"rows": rows, "summary": summary,
            "columns": [(key, LABELS[key]) for key in LABELS]}
