"""``sdofreport compare``: what changed between two runs, and the revision page of a site.

The comparison is a plain document (``sdofreport/comparison@1``): every check whose
demand, limit, ratio or verdict changed, systems and records added, removed or changed
(record scale, data and file SHA-256, ...), settings and project details changed, each
number with its relative change ``(new - old) / |old|``. It renders as text, JSON or a
page in the site's look.
"""

from __future__ import annotations

import base64
import json
import os
from dataclasses import dataclass
from pathlib import Path

from sdofreport.archive._pages import common_context, render, stylesheet
from sdofreport.archive._sitefiles import (
    RESULTS_PATH,
    ArchiveError,
    parse_manifest,
    parse_results,
    read_bounded,
)
from sdofreport.archive._zipfiles import read_zip
from sdofreport.outputs.serialize import json_text
from sdofreport.site.display import DISPLAY_UNITS, Display, number
from sdofreport.site.render import MANIFEST_NAME

COMPARISON_SCHEMA = "sdofreport/comparison@1"
CHECK_FIELDS = ("demand", "limit", "ratio", "verdict", "statistic")
RECORD_FIELDS = ("file", "file_sha256", "sha256", "scale", "dt_s", "npts", "units", "format",
                 "processing", "pga_g")
SYSTEM_FIELDS = ("name", "mass_kg", "stiffness_n_m", "period_s", "damping", "height_m")
PROJECT_FIELDS = ("title", "reference", "revision", "date", "prepared_by", "checked_by",
                  "display_units")
#: Damping of the overlaid spectra on the revision page [-].
REVISION_DAMPING = 0.05
#: Paths of the inputs block that the settings section already compares.
_IN_SETTINGS = ("processing.", "analysis.method", "analysis.damping", "analysis.statistic",
                "analysis.periods.count", "analysis.periods.min_s", "analysis.periods.max_s")
#: Key suffix of results.json -> dimension of the pages' display units, or a unit label
#: for values the pages show as they are (longest suffixes first).
_SUFFIX_UNITS = (("_n_m", "stiffness"), ("_m_s2", "acceleration"), ("_kg_m2", "kg·m²"),
                 ("_m4", "m⁴"), ("_pa", "Pa"), ("_kg", "mass"), ("_n", "force"),
                 ("_m", "length"), ("_hz", "Hz"), ("_s", "s"), ("_g", "g"))


@dataclass
class Run:
    """A run to compare: its results document and, for a site or archive, its manifest."""

    label: str
    results: dict
    manifest: dict | None = None


def load_run(path: str | os.PathLike) -> Run:
    """A site folder, a packed zip or a results.json file, read for comparison."""
    path = Path(path)
    if path.is_dir():
        files = {}
        for name in (RESULTS_PATH, MANIFEST_NAME):
            if (path / name).is_file():
                files[name] = read_bounded(path / name)
    elif path.is_file():
        with open(path, "rb") as stream:
            head = stream.read(2)
        if head == b"PK":
            files = read_zip(path)
        else:
            return Run(str(path), parse_results(read_bounded(path), str(path)))
    else:
        raise ArchiveError(f"{path}: not found; expected a site folder, a zip made by "
                           f"sdofreport pack or a results.json file.")
    if RESULTS_PATH not in files:
        raise ArchiveError(f"{path}: no {RESULTS_PATH} found; expected a site folder, a zip "
                           f"made by sdofreport pack or a results.json file.")
    manifest = parse_manifest(files, str(path)) if MANIFEST_NAME in files else None
    return Run(str(path), parse_results(files[RESULTS_PATH], f"{path}: {RESULTS_PATH}"),
               manifest)


# -- the comparison document ---------------------------------------------------------------

def _is_number(value: object) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def relative_change(old: object, new: object) -> float | None:
    """``(new - old) / |old|`` for two numbers with ``old`` not zero, else None."""
    if _is_number(old) and _is_number(new) and old != 0:
        return (new - old) / abs(old)
    return None


def shown(name: str, value: object, display: Display) -> str:
    """``value`` of the results.json key ``name`` in the pages' display units, its unit
    taken from the key's suffix (``yield_strength_n`` 300000 -> ``300.0 kN``)."""
    if isinstance(value, list) and value and all(_is_number(v) for v in value):
        return "[" + ", ".join(shown(name, v, display) for v in value) + "]"
    if not _is_number(value):
        return _value(value)
    key = name.rsplit(".", 1)[-1]
    for suffix, unit in _SUFFIX_UNITS:
        if key.endswith(suffix):
            if unit in DISPLAY_UNITS["SI"]:
                return display.show(float(value), unit)
            return f"{number(float(value))} {unit}"
    return _value(value)


def _display(document: dict) -> Display:
    system = (document.get("project") or {}).get("display_units")
    return Display(system if system in DISPLAY_UNITS else "SI")


def _field_changes(identifier: str, old: dict, new: dict, fields,
                   display: Display | None = None) -> list[dict]:
    display = display or Display("SI")
    return [{"id": identifier, "field": name, "old": old.get(name), "new": new.get(name),
             "relative": relative_change(old.get(name), new.get(name)),
             "old_shown": shown(name, old.get(name), display),
             "new_shown": shown(name, new.get(name), display)}
            for name in fields if old.get(name) != new.get(name)]


def _input_changes(old_doc: dict, new_doc: dict, group: str, identifier: str,
                   covered, display: Display) -> list[dict]:
    """Changes of ``inputs.<group>.<identifier>`` (a system's or record's whole input
    set), leaving out keys the caller already compares (``covered``)."""
    def flat(document):
        entry = ((document.get("inputs") or {}).get(group) or {}).get(identifier)
        return _flatten(entry) if isinstance(entry, dict) else {}

    before, after = flat(old_doc), flat(new_doc)
    if not before or not after:
        return []
    names = [name for name in sorted(set(before) | set(after))
             if name.rsplit(".", 1)[-1] not in covered]
    # A value used as given (model.yield_strength_n = given.yield_strength_n) shows once.
    names = [name for name in names if not (
        name.startswith("model.") and f"given.{name[6:]}" in names and
        before.get(name) == before.get(f"given.{name[6:]}") and
        after.get(name) == after.get(f"given.{name[6:]}"))]
    return _field_changes(identifier, before, after, names, display)


def _inputs_note(old_doc: dict, new_doc: dict) -> str:
    missing = [side for side, doc in (("old", old_doc), ("new", new_doc))
               if not isinstance(doc.get("inputs"), dict)]
    if not missing:
        return ""
    return (f"The {' and '.join(missing)} run{'s' if len(missing) > 1 else ''} "
            f"{'were' if len(missing) > 1 else 'was'} built by an sdofreport without the "
            f"inputs block in results.json: changes of yield strength, friction, "
            f"scaling options and other inputs not listed above cannot be shown.")


def _by_id(items) -> dict[str, dict]:
    return {item["id"]: item for item in items or [] if isinstance(item, dict) and "id" in item}


def _flatten(value, prefix: str = "") -> dict[str, object]:
    if isinstance(value, dict):
        out = {}
        for key in sorted(value):
            out.update(_flatten(value[key], f"{prefix}.{key}" if prefix else str(key)))
        return out
    return {prefix: value}


def _file_hashes(run_manifest: dict | None, records: dict[str, dict]) -> dict[str, str]:
    """Record id → SHA-256 of its file copy under inputs/, from the manifest."""
    if not run_manifest:
        return {}
    listed = run_manifest.get("files") or {}
    return {rid: listed[f"inputs/{record.get('file')}"] for rid, record in records.items()
            if f"inputs/{record.get('file')}" in listed}


def _header(run: Run) -> dict:
    project = run.results.get("project") or {}
    return {"label": run.label, "title": project.get("title"),
            "reference": project.get("reference"), "revision": project.get("revision"),
            "date": project.get("date"), "generator": run.results.get("generator"),
            "fingerprint": (run.manifest or {}).get("fingerprint")}


def _check_rows(old: dict, new: dict) -> list[dict]:
    def checks(document):
        out = {}
        for system in document.get("systems") or []:
            for check in system.get("checks") or []:
                out[(system.get("id"), check.get("quantity"))] = check
        return out

    before, after = checks(old), checks(new)
    rows = []
    for key in sorted(set(before) | set(after), key=lambda k: (str(k[0]), str(k[1]))):
        a, b = before.get(key), after.get(key)
        if a is not None and b is not None and all(a.get(f) == b.get(f) for f in CHECK_FIELDS):
            continue
        status = "added" if a is None else "removed" if b is None else "changed"
        pick = (lambda c: None if c is None else {f: c.get(f) for f in CHECK_FIELDS})
        rows.append({"system": key[0], "quantity": key[1],
                     "unit": (b or a).get("unit"), "status": status,
                     "old": pick(a), "new": pick(b),
                     "relative": {f: relative_change(a.get(f), b.get(f))
                                  for f in ("demand", "limit", "ratio")} if a and b else {},
                     "verdict_changed": bool(a and b and a.get("verdict") != b.get("verdict"))})
    return rows


def compare_runs(old: Run, new: Run) -> dict:
    """The comparison document of two runs (plain data, JSON-ready)."""
    old_doc, new_doc = old.results, new.results
    old_systems, new_systems = _by_id(old_doc.get("systems")), _by_id(new_doc.get("systems"))
    old_records, new_records = _by_id(old_doc.get("records")), _by_id(new_doc.get("records"))
    if old.manifest and new.manifest:  # file hashes only when both sides have them
        for records, run in ((old_records, old), (new_records, new)):
            for rid, digest in _file_hashes(run.manifest, records).items():
                records[rid] = {**records[rid], "file_sha256": digest}
    display = _display(new_doc)
    record_changes = []
    for rid in sorted(set(old_records) & set(new_records)):
        record_changes += _field_changes(rid, old_records[rid], new_records[rid],
                                         RECORD_FIELDS, display)
        record_changes += _input_changes(old_doc, new_doc, "records", rid, RECORD_FIELDS,
                                         display)
    system_changes = []
    for sid in sorted(set(old_systems) & set(new_systems)):
        system_changes += _field_changes(sid, old_systems[sid], new_systems[sid],
                                         SYSTEM_FIELDS, display)
        system_changes += _input_changes(old_doc, new_doc, "systems", sid, SYSTEM_FIELDS,
                                         display)
    old_inputs = _flatten({key: value for key, value in (old_doc.get("inputs") or {}).items()
                           if key not in ("systems", "records")})
    new_inputs = _flatten({key: value for key, value in (new_doc.get("inputs") or {}).items()
                           if key not in ("systems", "records")})
    inputs = []
    if old_inputs and new_inputs:
        paths = [path for path in sorted(set(old_inputs) | set(new_inputs))
                 if not path.startswith(_IN_SETTINGS)]
        inputs = [{**change, "path": change["field"]} for change in _field_changes(
            "inputs", old_inputs, new_inputs, paths, display)]
    old_settings = _flatten({"settings": old_doc.get("settings"),
                             "statistic": old_doc.get("statistic")})
    new_settings = _flatten({"settings": new_doc.get("settings"),
                             "statistic": new_doc.get("statistic")})
    settings = [{"path": key, "old": old_settings.get(key), "new": new_settings.get(key)}
                for key in sorted(set(old_settings) | set(new_settings))
                if old_settings.get(key) != new_settings.get(key)]
    project = _field_changes("project", old_doc.get("project") or {},
                             new_doc.get("project") or {}, PROJECT_FIELDS)
    document = {
        "schema": COMPARISON_SCHEMA, "old": _header(old), "new": _header(new),
        "checks": _check_rows(old_doc, new_doc),
        "systems": {"added": sorted(set(new_systems) - set(old_systems)),
                    "removed": sorted(set(old_systems) - set(new_systems)),
                    "changed": system_changes},
        "records": {"added": sorted(set(new_records) - set(old_records)),
                    "removed": sorted(set(old_records) - set(new_records)),
                    "changed": record_changes},
        "settings": settings, "project": project,
        "inputs": inputs, "inputs_note": _inputs_note(old_doc, new_doc),
    }
    document["identical"] = not (document["checks"] or settings or project or inputs or any(
        document[group][kind] for group in ("systems", "records")
        for kind in ("added", "removed", "changed")))
    return document


def compare_results(old_results: dict, new_results: dict) -> dict:
    """The comparison document of two results.json documents."""
    return compare_runs(Run("old", old_results), Run("new", new_results))


def compare_paths(old: str | os.PathLike, new: str | os.PathLike) -> tuple[dict, Run, Run]:
    """Load two runs (site, zip or results.json) and compare them."""
    old_run, new_run = load_run(old), load_run(new)
    return compare_runs(old_run, new_run), old_run, new_run


# -- text and JSON ---------------------------------------------------------------------------

def _value(value: object) -> str:
    if value is None:
        return "–"
    if _is_number(value):
        return f"{value:.6g}"
    if isinstance(value, (list, dict)):
        return json.dumps(value, ensure_ascii=False)
    return str(value)


def _percent(relative: float | None) -> str:
    return "" if relative is None else f"{100 * relative:+.3g} %"


def _change(old: object, new: object, relative: float | None = None) -> str:
    if old == new:
        return _value(new)
    if isinstance(old, list) and isinstance(new, list):  # e.g. processing steps
        steps = ([f"- {_value(x)}" for x in old if x not in new] +
                 [f"+ {_value(x)}" for x in new if x not in old])
        return "; ".join(steps) if steps else "same items, reordered"
    text = f"{_value(old)} → {_value(new)}"
    return f"{text} ({_percent(relative)})" if relative is not None else text


def item_change(item: dict) -> str:
    """Old → new of one changed field, numbers in the display units of the new run."""
    old, new = item.get("old"), item.get("new")
    if "old_shown" not in item or (isinstance(old, list) and isinstance(new, list) and not
                                   all(_is_number(v) for v in old + new)):
        return _change(old, new, item.get("relative"))
    text = f"{item['old_shown']} → {item['new_shown']}"
    relative = item.get("relative")
    return f"{text} ({_percent(relative)})" if relative is not None else text


def _run_line(header: dict) -> str:
    date = f", {header['date']}" if header.get("date") else ""
    fp = f", fingerprint {header['fingerprint']}" if header.get("fingerprint") else ""
    return (f"{header['label']} ({header.get('reference')} revision "
            f"{header.get('revision')}{date}{fp})")


def _check_cells(row: dict) -> dict:
    old, new, rel = row["old"] or {}, row["new"] or {}, row["relative"]
    if row["status"] != "changed":
        side = new if row["status"] == "added" else old
        return {f: f"{_value(side.get(f))} ({row['status']})" for f in
                ("demand", "limit", "ratio", "verdict")}
    return {"demand": _change(old.get("demand"), new.get("demand"), rel.get("demand")),
            "limit": _change(old.get("limit"), new.get("limit"), rel.get("limit")),
            "ratio": _change(old.get("ratio"), new.get("ratio"), rel.get("ratio")),
            "verdict": _change(old.get("verdict"), new.get("verdict"))}


def comparison_text(document: dict) -> str:
    """The comparison as plain text (one section per kind of change)."""
    lines = [f"Old: {_run_line(document['old'])}", f"New: {_run_line(document['new'])}"]
    if document["identical"]:
        lines.append("No check, system, record, input, setting or project detail "
                     "changed.")
    if document["checks"]:
        lines.append(f"Checks changed ({len(document['checks'])}):")
        for row in document["checks"]:
            cells = _check_cells(row)
            lines.append(f"  {row['system']} {row['quantity']} [{row['unit']}]: demand "
                         f"{cells['demand']}; limit {cells['limit']}; ratio {cells['ratio']}; "
                         f"verdict {cells['verdict']}")
    for group in ("systems", "records"):
        section = document[group]
        for kind in ("added", "removed"):
            if section[kind]:
                lines.append(f"{group.capitalize()} {kind}: {', '.join(section[kind])}")
        if section["changed"]:
            lines.append(f"{group.capitalize()} changed:")
            lines += [f"  {item['id']} {item['field']}: {item_change(item)}"
                      for item in section["changed"]]
    if document.get("inputs"):
        lines.append("Inputs changed:")
        lines += [f"  {item['path']}: {item_change(item)}" for item in document["inputs"]]
    if document.get("inputs_note"):
        lines.append(document["inputs_note"])
    if document["settings"]:
        lines.append("Settings changed:")
        lines += [f"  {item['path']}: {_change(item['old'], item['new'])}"
                  for item in document["settings"]]
    if document["project"]:
        lines.append("Project details changed:")
        lines += [f"  {item['field']}: {_change(item['old'], item['new'])}"
                  for item in document["project"]]
    lines.append("A changed verdict is a changed check of a stated limit, not an approval.")
    return "\n".join(lines) + "\n"


def comparison_json(document: dict) -> str:
    return json_text(document)


# -- pages ---------------------------------------------------------------------------------

def _damping_index(spectra: dict) -> int:
    damping = spectra.get("damping") or []
    return min(range(len(damping)), key=lambda i: abs(damping[i] - REVISION_DAMPING),
               default=-1)


def spectra_overlays(old_doc: dict, new_doc: dict) -> tuple[dict[str, str], str]:
    """
    SVG text of old/new PSA spectra (damping nearest 5 %) of every record in both runs
    whose spectrum or record entry changed, by record id; and a note when none can be
    overlaid.
    """
    from sdofreport.site.figures import spectra_figure

    old_spectra, new_spectra = old_doc.get("spectra") or {}, new_doc.get("spectra") or {}
    periods = new_spectra.get("periods_s")
    if not periods or old_spectra.get("periods_s") != periods:
        return {}, ("Spectra are not overlaid: the two runs use different period grids."
                    if periods and old_spectra.get("periods_s") else "")
    i_old, i_new = _damping_index(old_spectra), _damping_index(new_spectra)
    if i_old < 0 or i_new < 0:
        return {}, ""
    old_records, new_records = _by_id(old_doc.get("records")), _by_id(new_doc.get("records"))
    labels = []
    for doc, index in ((old_doc, i_old), (new_doc, i_new)):
        project = doc.get("project") or {}
        zeta = (doc.get("spectra") or {})["damping"][index]
        labels.append(f"revision {project.get('revision')} (ζ = {100 * zeta:g} %)")
    if labels[0] == labels[1]:
        labels = ["old " + labels[0], "new " + labels[1]]
    figures = {}
    for rid in sorted(set(old_records) & set(new_records)):
        try:
            before = old_spectra[rid]["psa_g"][i_old]
            after = new_spectra[rid]["psa_g"][i_new]
        except (KeyError, IndexError, TypeError):
            continue
        if before == after and all(old_records[rid].get(f) == new_records[rid].get(f)
                                   for f in RECORD_FIELDS):
            continue
        curves = [{"label": labels[0], "values": before, "style": "emphasis"},
                  {"label": labels[1], "values": after, "style": "emphasis"}]
        figures[rid] = spectra_figure(periods, curves,
                                      ylabel="Pseudo-spectral acceleration [g]",
                                      title=f"Record {rid}: old and new")
    return figures, ""


def _page_context(document: dict, figure_sources: dict[str, str], note: str) -> dict:
    rows = []
    for row in document["checks"]:
        cells = _check_cells(row)
        verdict = (row["new"] or {}).get("verdict")
        css = "exceeds" if verdict not in (None, "within limit") else "within"
        rows.append({**row, **cells, "css": css})
    return {"comparison": document, "check_rows": rows,
            "figures": [{"record": rid, "src": src} for rid, src in
                        sorted(figure_sources.items())],
            "figure_note": note, "show": _value, "change": _change,
            "item_change": item_change}


def _project_of(doc: dict) -> dict:
    project = doc.get("project") or {}
    return {key: project.get(key) for key in ("title", "reference", "revision", "date",
                                               "file", "sha256")}


def comparison_html(document: dict, old_doc: dict, new_doc: dict) -> str:
    """A self-contained comparison page: stylesheet inlined, figures as data URIs."""
    figures, note = spectra_overlays(old_doc, new_doc)
    sources = {rid: "data:image/svg+xml;base64," +
               base64.b64encode(svg.encode("utf-8")).decode("ascii")
               for rid, svg in figures.items()}
    context = {**common_context(root="", page_title="Comparison", page_kind="comparison",
                                project=_project_of(new_doc)),
               **_page_context(document, sources, note),
               "standalone": True, "inline_css": stylesheet()}
    return render("compare.html", context).decode("utf-8")


def revision_page(old_results_doc: dict, new_results_doc: dict, *,
                  fingerprint: str = "", old_fingerprint: str = "") -> dict[str, bytes]:
    """
    Files of a revision page for the new run's site: ``revision.html`` (at the site's
    root) and ``figures/revision-<record>.svg`` for each changed record's spectra.
    ``fingerprint`` and ``old_fingerprint`` are the two runs' fingerprints (manifest.json),
    shown side by side.
    """
    context, files = revision_context(old_results_doc, new_results_doc,
                                      fingerprint=fingerprint,
                                      old_fingerprint=old_fingerprint)
    files["revision.html"] = render(REVISION_TEMPLATE, context)
    return dict(sorted(files.items()))


#: The template of the revision page (``revision.html``) and of ``compare --format html``.
REVISION_TEMPLATE = "compare.html"


def revision_context(old_results_doc: dict, new_results_doc: dict, *,
                     fingerprint: str = "", old_fingerprint: str = ""
                     ) -> tuple[dict, dict[str, bytes]]:
    """
    The page data of the revision page (:func:`revision_page`): the context of
    :data:`REVISION_TEMPLATE` and the figure files it links (site path -> SVG bytes).
    """
    document = compare_runs(
        Run("old", old_results_doc, {"fingerprint": old_fingerprint or None}),
        Run("new", new_results_doc, {"fingerprint": fingerprint or None}))
    figures, note = spectra_overlays(old_results_doc, new_results_doc)
    files = {f"figures/revision-{rid}.svg": svg.encode("utf-8")
             for rid, svg in figures.items()}
    sources = {rid: f"figures/revision-{rid}.svg" for rid in figures}
    nav = [{"id": s.get("id"), "file": f"{s.get('id')}.html"}
           for s in new_results_doc.get("systems") or []]
    context = {**common_context(root="", page_title="Revision", page_kind="revision",
                                project=_project_of(new_results_doc), nav_systems=nav,
                                fingerprint=fingerprint),
               **_page_context(document, sources, note),
               "standalone": False, "inline_css": ""}
    return context, files
