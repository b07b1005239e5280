"""Read and validate a project file (TOML), reporting every problem at once.

Validation runs in phases: TOML syntax (with the line), then every key of every section
against :data:`~sdofreport.project.schema.SECTIONS` (unknown keys with a "did you mean"),
then cross-checks (unique ids, files present, limits that need a mass or height). Each
problem is ``(location, message)``; the location is a key path such as
``systems[2].limits.drift_ratio`` (array positions count from 1, in file order), shown
to the reader with the entry's id and the key's line (``line 31,
systems[frame].limits.drift_ratio``, see :mod:`sdofreport.project.locate`).
"""

from __future__ import annotations

import dataclasses
import difflib
import hashlib
import math
import os
import re
import tomllib
from datetime import datetime, timezone
from pathlib import Path

import numpy as np

from sdofreport import codes
from sdofreport.core.units import normalise_acceleration_unit
from sdofreport.errors import ProjectError
from sdofreport.project.model import (
    AnalysisSettings,
    DesignSpectrumSpec,
    VerticalSpectrumSpec,
    FragilitySpec,
    InelasticSpectraSpec,
    SyntheticSpec,
    ScalingSpec,
    Limits,
    ProcessingSettings,
    Project,
    Revision,
    natural_key,
    ProjectInfo,
    RecordSpec,
    SystemSpec,
)
from sdofreport.project.locate import describe, entry_ids, key_lines
from sdofreport.project.bounds import (
    MAX_NETWORK_DEPTH,
    MAX_PERIOD_S,
    MAX_SCALE,
    MAX_SPECTRAL_G,
    MAX_SYNTHETIC_SAMPLES,
)
from sdofreport.project.ids import id_case_problems, id_problem
from sdofreport.project.quantities import (
    QuantityError,
    parse_damper_coefficient,
    parse_quantity,
    save_memo,
)
from sdofreport.core.units import G
from sdofreport.project.schema import (
    DESIGN_SPECTRUM_KEYS,
    HYSTERESIS_PARAMETER_KEYS,
    OPTIONAL_DESIGN_KEYS,
    PROVENANCE_KEYS,
    PROVENANCE_RANGES,
    SECTIONS,
    SYSTEM_KIND_KEYS,
    TOP_LEVEL,
    KeySpec,
)
from sdofreport.core.hysteresis import HYSTERESIS_MODELS


class _Problems:
    """Collects ``(location, message)`` pairs in the order they are found."""

    def __init__(self, plain_si: bool = False) -> None:
        self.items: list[tuple[str, str]] = []
        #: Whether bare numbers for dimensional keys are SI ([project] plain_numbers).
        self.plain_si = plain_si

    def add(self, location: str, message: str) -> None:
        self.items.append((location, message))


def _did_you_mean(name: str, allowed) -> str:
    close = difflib.get_close_matches(name, list(allowed), n=1, cutoff=0.6)
    return f"; did you mean '{close[0]}'?" if close else \
        f"; allowed keys: {', '.join(allowed)}"


def _check_unknown(table: dict, section: str, location: str, problems: _Problems) -> None:
    allowed = SECTIONS[section]
    for key in table:
        if key not in allowed:
            problems.add(f"{location}.{key}" if location else key,
                         f"unknown key{_did_you_mean(key, allowed)}")


def _read_value(table: dict, spec: KeySpec, location: str, problems: _Problems):
    """The key's value converted to SI, its default when absent, or None on a problem."""
    where = f"{location}.{spec.name}"
    if spec.name not in table:
        if spec.required:
            problems.add(where, f"missing; expected {spec.description[0].lower()}"
                         f"{spec.description[1:].rstrip('.')} (example: {spec.name} = "
                         f"{spec.example})")
        return spec.default
    value = table[spec.name]
    if spec.type in ("text", "path"):
        if not isinstance(value, str) or not value.strip():
            problems.add(where, f"expected non-empty text, found {value!r}")
            return None
        return value.strip()
    if spec.type == "choice":
        choices = spec.choices or ()
        if spec.name == "units" and isinstance(value, str):
            try:
                return normalise_acceleration_unit(value)
            except ValueError:
                pass
        if value not in choices:
            problems.add(where, f"expected one of {', '.join(map(str, choices))}, found "
                         f"{value!r}")
            return None
        return value
    if spec.type == "boolean":
        if not isinstance(value, bool):
            problems.add(where, f"expected true or false, found {value!r}")
            return None
        return value
    if spec.type in ("number", "ratio", "integer"):
        if isinstance(value, bool) or not isinstance(value, (int, float)) or \
                not math.isfinite(float(value)):
            kind = "a whole number" if spec.type == "integer" else "a number"
            problems.add(where, f"expected {kind}, found {value!r}")
            return None
        if spec.type == "integer" and not isinstance(value, int):
            problems.add(where, f"expected a whole number, found {value!r}")
            return None
        if spec.type == "ratio" and not 0.0 <= value < 1.0:
            hint = f" (a percentage? use {value / 100:g})" if 1.0 <= value <= 100.0 else ""
            problems.add(where, f"expected a ratio from 0 up to (not including) 1, found "
                         f"{value!r}{hint}")
            return None
        return float(value) if spec.type != "integer" else int(value)
    if spec.type == "quantity":
        try:
            return parse_quantity(value, spec.dimension, plain_si=problems.plain_si,
                                  key=spec.name)
        except QuantityError as exc:
            problems.add(where, str(exc))
            return None
    return value  # lists and tables are checked by their own readers


def _positive(value, where: str, what: str, problems: _Problems, unit: str) -> bool:
    if value is not None and not value > 0:
        shown = f"{value:g} {unit}".strip()
        problems.add(where, f"{what} must be greater than 0, found {shown}")
        return False
    return True


def _input_file(base: Path, name: str, where: str, problems: _Problems) -> Path | None:
    """An input file named in the project, resolved; a problem when it is not a file."""
    try:
        path = (base / name).resolve()
    except (OSError, RuntimeError) as exc:  # e.g. a symbolic-link loop
        problems.add(where, f"file '{name}' cannot be opened ({exc})")
        return None
    if path.is_dir():
        problems.add(where, f"'{name}' is a folder, not a file (looked at {path})")
        return None
    if not path.is_file():
        problems.add(where, f"file '{name}' not found (looked for {path})")
        return None
    return path


def _read_processing(table, location: str, problems: _Problems,
                     base: ProcessingSettings) -> ProcessingSettings:
    if not isinstance(table, dict):
        problems.add(location, f"expected a table of processing settings, found {table!r}")
        return base
    _check_unknown(table, "processing", location, problems)
    spec = SECTIONS["processing"]
    order = _read_value(table, spec["baseline_order"], location, problems) \
        if "baseline_order" in table else base.baseline_order
    if order is not None and not 0 <= order <= 3:
        problems.add(f"{location}.baseline_order", f"expected an order from 0 to 3, found "
                     f"{order}")
        order = None
    band = base.bandpass_hz
    if "bandpass_hz" in table:
        raw = table["bandpass_hz"]
        if (not isinstance(raw, list) or len(raw) != 2 or
                not all(isinstance(v, (int, float)) and not isinstance(v, bool)
                        for v in raw)):
            problems.add(f"{location}.bandpass_hz", f"expected two corner frequencies "
                         f"[low, high] in Hz, found {raw!r}")
        elif not 0 < raw[0] < raw[1]:
            problems.add(f"{location}.bandpass_hz", f"expected 0 < low < high, found "
                         f"{raw!r}")
        else:
            band = (float(raw[0]), float(raw[1]))
    filter_order = base.filter_order
    if "filter_order" in table:
        filter_order = _read_value(table, spec["filter_order"], location, problems)
        if filter_order is not None and not 1 <= filter_order <= 8:
            problems.add(f"{location}.filter_order", f"expected an order from 1 to 8, "
                         f"found {filter_order}")
        if filter_order is None or not 1 <= filter_order <= 8:
            filter_order = base.filter_order
    taper = base.taper_s
    if "taper_s" in table:
        taper = _read_value(table, spec["taper_s"], location, problems)
        if taper is not None and not _positive(taper, f"{location}.taper_s", "the taper",
                                               problems, "s"):
            taper = None
    return ProcessingSettings(order, band, filter_order, taper)


def _read_periods(value, problems: _Problems,
                  where: str = "analysis.periods") -> tuple[float, ...]:
    if isinstance(value, list):
        ok = value and all(isinstance(v, (int, float)) and not isinstance(v, bool)
                           and math.isfinite(v) and v > 0 for v in value)
        if not ok:
            problems.add(where, f"expected a list of periods greater than 0 s, found "
                         f"{value!r}")
            return (1.0,)
        return tuple(sorted(float(v) for v in set(value)))
    if isinstance(value, dict):
        unknown = [k for k in value if k not in ("min", "max", "count")]
        for key in unknown:
            problems.add(f"{where}.{key}", f"unknown key"
                         f"{_did_you_mean(key, ('min', 'max', 'count'))}")
        try:  # bare numbers are seconds: the key is documented "in s"
            low = parse_quantity(value.get("min", 0.01), "time")
            high = parse_quantity(value.get("max", 10.0), "time")
        except QuantityError as exc:
            problems.add(where, str(exc))
            return (1.0,)
        count = value.get("count", 200)
        if isinstance(count, bool) or not isinstance(count, int) or not 2 <= count <= 5000:
            problems.add(f"{where}.count", f"expected a whole number from 2 to 5000, "
                         f"found {count!r}")
            return (1.0,)
        if not 0 < low < high:
            problems.add(where, f"expected 0 < min < max, found min {low:g} s, max "
                         f"{high:g} s")
            return (1.0,)
        return tuple(float(v) for v in np.geomspace(low, high, count))
    problems.add(where, f"expected {{min, max, count}} or a list of periods, found "
                 f"{value!r}")
    return (1.0,)


def _read_analysis(table, problems: _Problems) -> AnalysisSettings:
    if not isinstance(table, dict):
        problems.add("analysis", f"expected a table, found {table!r}")
        table = {}
    _check_unknown(table, "analysis", "analysis", problems)
    spec = SECTIONS["analysis"]
    method = _read_value(table, spec["method"], "analysis", problems) or "exact"
    statistic = _read_value(table, spec["statistic"], "analysis", problems) or "auto"
    damping_raw = table.get("damping", spec["damping"].default)
    if isinstance(damping_raw, (int, float)) and not isinstance(damping_raw, bool):
        damping_raw = [damping_raw]
    damping: list[float] = []
    if not isinstance(damping_raw, list) or not damping_raw:
        problems.add("analysis.damping", f"expected a list of damping ratios, found "
                     f"{damping_raw!r}")
    else:
        for i, value in enumerate(damping_raw, start=1):
            if isinstance(value, bool) or not isinstance(value, (int, float)) or \
                    not 0.0 <= value < 1.0:
                hint = f" (a percentage? use {value / 100:g})" if \
                    isinstance(value, (int, float)) and 1 <= value <= 100 else ""
                problems.add(f"analysis.damping[{i}]", f"expected ratios from 0 up to "
                             f"(not including) 1, found {value!r}{hint}")
            else:
                damping.append(float(value))
    periods = _read_periods(table.get("periods", spec["periods"].default), problems)
    _check_longest_period(periods, "analysis.periods", problems)
    return AnalysisSettings(method, tuple(sorted(set(damping))) or (0.05,), periods,
                            statistic)


def _read_info(table, project_path: Path, problems: _Problems) -> ProjectInfo:
    if not isinstance(table, dict):
        problems.add("project", f"expected a table, found {table!r}")
        table = {}
    _check_unknown(table, "project", "project", problems)
    spec = SECTIONS["project"]
    values = {name: _read_value(table, key, "project", problems) for name, key in
              spec.items()}
    notes_path = None
    if values["notes"]:
        notes_path = _input_file(project_path.parent, values["notes"], "project.notes",
                                 problems)
    date = values["date"]
    if date is None and os.environ.get("SOURCE_DATE_EPOCH", "").strip():
        try:
            stamp = int(os.environ["SOURCE_DATE_EPOCH"])
            date = datetime.fromtimestamp(stamp, tz=timezone.utc).strftime("%Y-%m-%d")
        except ValueError:
            problems.add("SOURCE_DATE_EPOCH", f"expected whole seconds since 1970, found "
                         f"{os.environ['SOURCE_DATE_EPOCH']!r}")
    for key in ("prepared_date", "checked_date", "approved_date"):
        values[key] = _iso_date(values[key], f"project.{key}", problems)
    return ProjectInfo(
        title=values["title"] or "", reference=values["reference"] or "",
        revision=values["revision"] or "", prepared_by=values["prepared_by"] or "",
        checked_by=values["checked_by"], date=date, notes_path=notes_path,
        notes_file=values["notes"], display_units=values["display_units"] or "SI",
        plain_numbers=values["plain_numbers"],
        prepared_date=values["prepared_date"], checked_date=values["checked_date"],
        approved_by=values["approved_by"], approved_date=values["approved_date"],
        revisions=_read_revisions(values["revisions"], problems))


def _iso_date(value: str | None, where: str, problems: _Problems) -> str | None:
    """A calendar date written YYYY-MM-DD, or a problem naming ``where``."""
    if value is None:
        return None
    try:
        return datetime.strptime(value, "%Y-%m-%d").strftime("%Y-%m-%d")
    except ValueError:
        problems.add(where, f"expected a date written YYYY-MM-DD, found {value!r}")
        return None


#: Keys of one ``[[project.revisions]]`` table.
REVISION_KEYS = ("revision", "date", "description", "by")


def _read_revisions(value, problems: _Problems) -> tuple[Revision, ...]:
    """The ``[[project.revisions]]`` tables, each checked; every problem collected."""
    if value is None:
        return ()
    if not isinstance(value, list):
        problems.add("project.revisions", f"expected [[project.revisions]] tables, found "
                     f"{value!r}")
        return ()
    rows = []
    for index, table in enumerate(value, start=1):
        where = f"project.revisions[{index}]"
        if not isinstance(table, dict):
            problems.add(where, f"expected a table with {', '.join(REVISION_KEYS)}, found "
                         f"{table!r}")
            continue
        for key in table:
            if key not in REVISION_KEYS:
                problems.add(f"{where}.{key}", f"unknown key"
                             f"{_did_you_mean(key, REVISION_KEYS)}")
        fields = {}
        for key in REVISION_KEYS:
            text = table.get(key)
            if text is None:
                if key == "revision":
                    problems.add(f"{where}.revision", "missing; each revision needs its "
                                 "mark (example: revision = \"A\")")
                continue
            if not isinstance(text, str) or not text.strip():
                problems.add(f"{where}.{key}", f"expected non-empty text, found {text!r}")
                continue
            fields[key] = text.strip()
        fields["date"] = _iso_date(fields.get("date"), f"{where}.date", problems)
        if "revision" in fields:
            rows.append(Revision(**fields))
    return tuple(rows)


def _read_id(table: dict, where: str, seen: dict, problems: _Problems) -> str | None:
    value = table.get("id")
    if value is None:
        problems.add(f"{where}.id", "missing; every entry needs a unique id")
        return None
    problem = id_problem(value)
    if problem is not None:
        problems.add(f"{where}.id", problem)
        return None
    if value in seen:
        problems.add(f"{where}.id", f"duplicate id {value!r} (also {seen[value]})")
        return None
    seen[value] = where
    return value


def _read_records(items, root: Path, processing: ProcessingSettings,
                  problems: _Problems) -> list[RecordSpec]:
    if not isinstance(items, list) or not items:
        problems.add("records", "expected at least one [[records]] entry")
        return []
    spec = SECTIONS["records[]"]
    records, seen = [], {}
    for index, table in enumerate(items, start=1):
        where = f"records[{index}]"
        if not isinstance(table, dict):
            problems.add(where, f"expected a table, found {table!r}")
            continue
        _check_unknown(table, "records[]", where, problems)
        record_id = _read_id(table, where, seen, problems)
        file = _read_value(table, spec["file"], where, problems)
        fmt = _read_value(table, spec["format"], where, problems) or "auto"
        units = _read_value(table, spec["units"], where, problems) or "g"
        dt_s = _read_value(table, spec["dt"], where, problems)
        _positive(dt_s, f"{where}.dt", "the time step", problems, "s")
        scale = _read_value(table, spec["scale"], where, problems)
        _positive(scale, f"{where}.scale", "the scale factor", problems, "")
        _check_bounded(scale, f"{where}.scale", MAX_SCALE, "scale factor", problems)
        own = _read_processing(table.get("processing", {}), f"{where}.processing",
                               problems, processing)
        pair = _read_pair(table, spec["pair"], where, problems)
        component = _read_value(table, spec["component"], where, problems)
        amplitude_ok = bool(_read_value(table, spec["amplitude_ok"], where, problems))
        if component == "V" and "pair" in table:
            problems.add(f"{where}.pair", "a vertical record (component = \"V\") stands "
                         "alone: give no pair")
        elif ("pair" in table) != ("component" in table) and component != "V":
            problems.add(where, "a paired record needs both pair and component "
                         "(H1 or H2)")
        provenance = _read_provenance(table, where, problems)
        path = _input_file(root, file, f"{where}.file", problems) if file else None
        if record_id and file and path is not None:
            records.append(RecordSpec(record_id, path, file, fmt, units, dt_s,
                                      scale if scale else 1.0, own, pair, component,
                                      amplitude_ok, provenance))
    _check_pairs(records, problems)
    return records


def _read_provenance(table: dict, where: str, problems: _Problems) -> tuple:
    """The record's provenance keys that are given, as ((key, value), ...) in
    :data:`PROVENANCE_KEYS` order; numbers checked against plausible ranges."""
    spec = SECTIONS["records[]"]
    found = []
    for key in PROVENANCE_KEYS:
        if key not in table:
            continue
        value = _read_value(table, spec[key], where, problems)
        if value is None:
            continue
        if key in PROVENANCE_RANGES:
            low, high, inclusive = PROVENANCE_RANGES[key]
            if not ((value >= low if inclusive else value > low) and value <= high):
                relation = ">=" if inclusive else ">"
                problems.add(f"{where}.{key}", f"expected a number {relation} {low:g} and "
                             f"<= {high:g}, found {value:g}")
                continue
        found.append((key, value))
    return tuple(found)


def _read_pair(table: dict, spec: KeySpec, where: str, problems: _Problems) -> str | None:
    """The pair name: it names a figure file, so it is an id like any other."""
    pair = _read_value(table, spec, where, problems)
    if pair is not None and (problem := id_problem(pair)) is not None:
        problems.add(f"{where}.pair", problem)
        return None
    return pair


def _check_pairs(records: list[RecordSpec], problems: _Problems) -> None:
    """Every pair has exactly one H1 and one H2."""
    members: dict[str, list[RecordSpec]] = {}
    for record in records:
        if record.pair:
            members.setdefault(record.pair, []).append(record)
    for pair, items in members.items():
        components = sorted(r.component or "" for r in items)
        if components != ["H1", "H2"]:
            found = ", ".join(f"{r.id} ({r.component or 'no component'})" for r in items)
            problems.add(f"records pair {pair!r}", f"expected one H1 and one H2 record, "
                         f"found {found}")


def _read_limits(table, where: str, mass, height, problems: _Problems) -> Limits:
    if not isinstance(table, dict):
        problems.add(where, f"expected a table of limits, found {table!r}")
        return Limits()
    _check_unknown(table, "systems[].limits", where, problems)
    spec = SECTIONS["systems[].limits"]
    table, basis = _limits_and_basis(table, where, problems)
    values = {}
    for name, key in spec.items():
        value = _read_value(table, key, where, problems) if name in table else None
        if value is not None and not value > 0:
            problems.add(f"{where}.{name}", f"a limit must be greater than 0, found "
                         f"{table[name]!r}")
            value = None
        values[name] = value
    if values["base_shear"] is not None and mass is None:
        problems.add(f"{where}.base_shear", "a base-shear limit needs the system's mass "
                     "(give mass with stiffness or period)")
    if values["drift_ratio"] is not None and height is None:
        problems.add(f"{where}.drift_ratio", "a drift-ratio limit needs the system's "
                     "height")
    return Limits.of(values, tuple((name, basis[name]) for name in spec if name in basis
                                   and values[name] is not None))


#: Keys of a limit written as a table: ``displacement = { value = "50 mm", basis = "..." }``.
LIMIT_TABLE_KEYS = ("value", "basis")


def _limits_and_basis(table: dict, where: str, problems: _Problems) -> tuple[dict, dict]:
    """
    Split limits written as ``{ value = ..., basis = "..." }`` into their values (a
    table of plain limits, as the rest of the reader expects) and their stated basis
    (quantity -> text); every problem is named.
    """
    values, basis = {}, {}
    for name, raw in table.items():
        if not isinstance(raw, dict):
            values[name] = raw
            continue
        for key in raw:
            if key not in LIMIT_TABLE_KEYS:
                problems.add(f"{where}.{name}.{key}", f"unknown key"
                             f"{_did_you_mean(key, LIMIT_TABLE_KEYS)}")
        if "value" not in raw:
            problems.add(f"{where}.{name}.value", f"missing; a limit written as a table "
                         f"needs its value (example: {name} = {{ value = ..., basis = "
                         f"\"owner's specification\" }})")
        else:
            values[name] = raw["value"]
        text = raw.get("basis")
        if text is not None:
            if not isinstance(text, str) or not text.strip():
                problems.add(f"{where}.{name}.basis", f"expected non-empty text, found "
                             f"{text!r}")
            else:
                basis[name] = text.strip()
    return values, basis


_COMMON_SYSTEM_KEYS = ("id", "name", "kind", "damping", "height", "limits", "directions",
                       "direction")


def _network_to_si(node, path: str, problems: _Problems):
    """A copy of a spring network with every leaf stiffness converted to N/m."""
    if isinstance(node, dict):
        out = {}
        for key, value in node.items():
            if key == "k":
                try:
                    out[key] = parse_quantity(value, "stiffness",
                                              plain_si=problems.plain_si, key="k")
                except QuantityError as exc:
                    problems.add(f"{path}.k", str(exc))
                    return None
            elif isinstance(value, list):
                items = [_network_to_si(v, f"{path}.{key}[{i}]", problems)
                         for i, v in enumerate(value)]
                if any(item is None for item in items):
                    return None
                out[key] = items
            else:
                out[key] = value
        return out
    return node


def _build(kind: str, values: dict, where: str, problems: _Problems):
    """Call the kind's builder; its ValueError becomes a problem naming the key."""
    from sdofreport.core import builders

    try:
        if kind == "lumped":
            return builders.lumped(values.get("mass"), values.get("stiffness"),
                                   values.get("period"))
        if kind == "columns":
            return builders.columns(values["count"], values["elastic_modulus"],
                                    values["second_moment"], values["height"],
                                    values["end_condition"], values["mass"])
        if kind == "springs":
            return builders.springs(values["network"], values["mass"])
        if kind == "static-deflection":
            return builders.static_deflection(values["weight"], values["deflection"])
        if kind == "sliding-pendulum":
            return builders.sliding_pendulum(values["weight"], values["radius"],
                                             values["friction"])
        return builders.hanging(values["mass"], values["pivot_inertia"],
                                values["pivot_to_centre"])
    except ValueError as exc:
        text = str(exc)
        location = where
        if text.startswith("network"):
            location = f"{where}.{text.split(' ', 1)[0].rstrip(':')}"
        problems.add(location, text)
        return None


def _hysteresis_keys(values: dict, table: dict, where: str, problems: _Problems):
    """The checked hysteresis model name and parameters, or None on a problem."""
    from sdofreport.core import hysteresis as hy

    name = values.get("hysteresis") or "bilinear"
    parameters = {}
    for key, owners in HYSTERESIS_PARAMETER_KEYS.items():
        if key in table and name not in owners:
            allowed = " or ".join(repr(owner) for owner in owners)
            problems.add(f"{where}.{key}", f"applies only to hysteresis = {allowed}; this "
                         f"system's hysteresis is {name!r}")
            return None
        if key in values:
            parameters[key] = values[key]
    if "deterioration_exponent" in parameters and "deterioration_capacity" not in parameters:
        problems.add(f"{where}.deterioration_exponent", "applies only with "
                     "deterioration_capacity")
        return None
    if "deterioration_capacity" in parameters and not parameters["deterioration_capacity"] > 0:
        problems.add(f"{where}.deterioration_capacity", "must be greater than 0 (omit it "
                     f"for no deterioration), found {parameters['deterioration_capacity']!r}")
        return None
    for key, value in parameters.items():
        try:
            hy.hysteresis(name, 1.0, 1.0, **{key: value})
        except ValueError as exc:
            problems.add(f"{where}.{key}", str(exc).split(" [-]")[0] + f", found {value!r}")
            return None
    return name, parameters


def _damper(table, where: str, problems: _Problems):
    """The damper table as {"coefficient": C [N·(s/m)^α], "exponent": α}, or None."""
    from sdofreport.core import hysteresis as hy

    if not isinstance(table, dict):
        problems.add(where, f"expected a table {{ coefficient = ..., exponent = ... }}, "
                     f"found {table!r}")
        return None
    unknown = [key for key in table if key not in ("coefficient", "exponent")]
    if unknown:
        problems.add(f"{where}.{unknown[0]}", "unknown key; a damper reads coefficient and "
                     "exponent")
        return None
    missing = [key for key in ("coefficient", "exponent") if key not in table]
    if missing:
        problems.add(f"{where}.{missing[0]}", "missing; a damper needs coefficient (C of "
                     "F = C·|v|^α·sign(v)) and exponent (α)")
        return None
    alpha = table["exponent"]
    if isinstance(alpha, bool) or not isinstance(alpha, (int, float)) or \
            not 0.0 < float(alpha) <= 2.0:
        problems.add(f"{where}.exponent", f"expected a number greater than 0 and at most "
                     f"2, found {alpha!r}")
        return None
    try:
        coefficient = parse_damper_coefficient(table["coefficient"], float(alpha),
                                               plain_si=problems.plain_si)
        hy.damper(coefficient, float(alpha))
    except (QuantityError, ValueError) as exc:
        problems.add(f"{where}.coefficient", str(exc))
        return None
    if not coefficient > 0.0:
        problems.add(f"{where}.coefficient", f"must be greater than 0, found "
                     f"{table['coefficient']!r}")
        return None
    return {"coefficient": coefficient, "exponent": float(alpha)}


def _p_delta(kind: str, table: dict, values: dict, derived, where: str,
             problems: _Problems):
    """P-Δ of a system: None when off; else W, h, W/h, θ and the elastic period with
    P-Δ, T/√(1−θ) (Chopra 2017 sec. 7.11: k_eff = k − W/h)."""
    if kind not in ("lumped", "columns", "springs"):
        return None
    height = values.get("height")
    complete = (height is not None and derived.mass_kg is not None
                and derived.stiffness_n_m is not None)
    wanted = values.get("p_delta")
    if wanted is None:
        wanted = complete
    if not wanted:
        if "gravity_load" in table:
            problems.add(f"{where}.gravity_load", "applies only with P-Δ (p_delta = true)")
        return None
    if not complete:
        problems.add(f"{where}.p_delta", "P-Δ needs the system's height, mass and "
                     "stiffness (give height, and mass with stiffness or period)")
        return None
    weight = values.get("gravity_load", derived.mass_kg * G)
    k = derived.stiffness_n_m
    k_geo = weight / height
    theta = k_geo / k
    if k_geo >= k:
        keys = "gravity_load, height" if "gravity_load" in table else "mass, height"
        problems.add(where, f"the gravity load cannot be carried: W/h = {weight:.6g} N / "
                     f"{height:.6g} m = {k_geo:.6g} N/m is not below the lateral stiffness "
                     f"k = {k:.6g} N/m (stability coefficient θ = W/(k h) = {theta:.3g} >= "
                     f"1); check {keys} and the stiffness, or set p_delta = false")
        return None
    return {"gravity_load_n": weight, "height_m": height, "gravity_stiffness_n_m": k_geo,
            "stability_coefficient": theta,
            "period_s": derived.period_s / math.sqrt(1.0 - theta),
            "weight_given": "gravity_load" in table}


def _nonlinear_model(kind: str, values: dict, table: dict, derived, pdelta, damper,
                     where: str, problems: _Problems):
    """The engine's model dict for a yielding, sliding or damped system; None (linear)."""
    from sdofreport.core.hysteresis import collapse_displacement

    extras = {"damper": damper}
    if kind == "sliding-pendulum":
        return {"model": "sliding-pendulum", "weight_n": values["weight"],
                "radius_m": values["radius"], "friction": values["friction"],
                "slip_displacement_m": values.get("slip_displacement", 0.25e-3), **extras,
                **_isolator_keys(values, table, where, problems)}
    k_geo = pdelta["gravity_stiffness_n_m"] if pdelta else 0.0
    extras.update({"gravity_stiffness_n_m": k_geo,
                   "instability_limit_m": pdelta["height_m"] if pdelta else None})
    strength = values.get("yield_strength")
    displacement = values.get("yield_displacement")
    if strength is None and displacement is None:
        for key in ("post_yield_ratio", "hysteresis", *HYSTERESIS_PARAMETER_KEYS,
                    "property_factors"):
            if key in table:
                problems.add(f"{where}.{key}", "applies only with yield_strength or "
                             "yield_displacement")
                return None
        if damper is None:
            return None
        if derived.stiffness_n_m is None or derived.mass_kg is None:
            problems.add(f"{where}.damper", "a damper needs the system's mass and "
                         "stiffness (give mass with stiffness or period)")
            return None
        return {"model": "elastic", "stiffness_n_m": derived.stiffness_n_m,
                "mass_kg": derived.mass_kg, **extras}
    if strength is not None and displacement is not None:
        problems.add(where, "give yield_strength or yield_displacement, not both")
        return None
    if derived.stiffness_n_m is None or derived.mass_kg is None:
        problems.add(where, "a yielding system needs its mass and stiffness (give mass "
                     "with stiffness or period)")
        return None
    if strength is None:
        strength = derived.stiffness_n_m * displacement
    chosen = _hysteresis_keys(values, table, where, problems)
    if chosen is None:
        return None
    name, parameters = chosen
    alpha = values.get("post_yield_ratio", 0.0)
    collapse = collapse_displacement(derived.stiffness_n_m, strength, alpha, k_geo)
    return {"model": name, "stiffness_n_m": derived.stiffness_n_m,
            "yield_strength_n": strength, "post_yield_ratio": alpha,
            "mass_kg": derived.mass_kg, "parameters": parameters,
            "collapse_displacement_m": None if math.isinf(collapse) else collapse,
            **extras, **_bilinear_factors(name, alpha, table, where, problems)}


def _isolator_keys(values: dict, table: dict, where: str, problems: _Problems) -> dict:
    """Velocity-dependent friction and the property factors of a sliding pendulum (only
    the keys given, so models without them keep their cache keys)."""
    out: dict = {}
    if ("friction_slow" in values) != ("friction_rate" in values):
        problems.add(where, "velocity-dependent friction needs both friction_slow and "
                     "friction_rate")
    elif "friction_slow" in values:
        if values["friction_slow"] > values["friction"]:
            problems.add(f"{where}.friction_slow", f"expected at most friction (μ_fast = "
                         f"{values['friction']:g}), found {values['friction_slow']:g}")
        if "damper" in table:
            problems.add(f"{where}.friction_slow", "velocity-dependent friction and a "
                         "damper together are not supported; give one of them")
        out.update(friction_slow=values["friction_slow"],
                   friction_rate_s_m=values["friction_rate"])
    if "property_factors" in table:
        factors = _property_factors(table, where, problems)
        if factors is not None and factors[1] * values["friction"] >= 1.0:
            problems.add(f"{where}.property_factors", f"the upper-bound friction "
                         f"{factors[1]:g} × {values['friction']:g} is not below 1")
        elif factors is not None:
            out["property_factors"] = factors
    return out


def _property_factors(table: dict, where: str, problems: _Problems) -> list | None:
    """``property_factors = [lower, upper]`` with 0 < lower <= 1 <= upper, or None."""
    raw = table["property_factors"]
    if not (isinstance(raw, list) and len(raw) == 2 and all(
            isinstance(v, (int, float)) and not isinstance(v, bool) and
            math.isfinite(v) for v in raw) and 0 < raw[0] <= 1 <= raw[1]):
        problems.add(f"{where}.property_factors", f"expected [lower, upper] with "
                     f"0 < lower <= 1 <= upper, found {raw!r}")
        return None
    return [float(raw[0]), float(raw[1])]


def _bilinear_factors(name: str, alpha: float, table: dict, where: str,
                      problems: _Problems) -> dict:
    """``property_factors`` of a yielding system: bilinear only, with λ_upper α < 1."""
    if "property_factors" not in table:
        return {}
    if name != "bilinear":
        problems.add(f"{where}.property_factors", f"applies to a sliding pendulum or a "
                     f"bilinear isolator (hysteresis = \"bilinear\"); this system has "
                     f"hysteresis {name!r}")
        return {}
    factors = _property_factors(table, where, problems)
    if factors is not None and factors[1] * alpha >= 1.0:
        problems.add(f"{where}.property_factors", f"the upper-bound post-yield ratio "
                     f"{factors[1]:g} × {alpha:g} is not below 1")
        return {}
    return {} if factors is None else {"property_factors": factors}


def _read_system(table: dict, where: str, seen: dict, problems: _Problems):
    spec = SECTIONS["systems[]"]
    _check_unknown(table, "systems[]", where, problems)
    system_id = _read_id(table, where, seen, problems)
    name = _read_value(table, spec["name"], where, problems)
    damping = _read_value(table, spec["damping"], where, problems)
    kind = _read_value(table, spec["kind"], where, problems) or "lumped"
    required, optional = SYSTEM_KIND_KEYS[kind]
    before = len(problems.items)
    for key in table:
        if key in spec and key not in _COMMON_SYSTEM_KEYS and key not in required + \
                optional:
            problems.add(f"{where}.{key}", f"does not apply to kind {kind!r}; it reads "
                         f"{', '.join(required + optional) or 'mass, stiffness, period'}")
    values: dict = {}
    for key in required + optional + ("height",):
        if key not in table:
            if key in required:
                problems.add(f"{where}.{key}", f"missing; kind {kind!r} needs it "
                             f"({spec[key].description})")
            continue
        if key == "network":
            if not _network_depth_ok(table[key], f"{where}.network", problems):
                continue
            values[key] = _network_to_si(table[key], f"{where}.network", problems)
            continue
        if key in ("damper", "property_factors"):
            continue  # read by _damper and _isolator_keys
        if key in HYSTERESIS_PARAMETER_KEYS:
            value = _read_value(table, spec[key], where, problems)
            if value is not None:
                values[key] = value
            continue
        value = _read_value(table, spec[key], where, problems)
        if value is None:
            continue
        if spec[key].type in ("quantity", "number", "integer") and key != "post_yield_ratio" \
                and not value > 0:
            problems.add(f"{where}.{key}", f"{key} must be greater than 0, found "
                         f"{table[key]!r}")
            continue
        values[key] = value
    values["_post_given"] = "post_yield_ratio" in table
    if kind == "sliding-pendulum" and "friction" in values and values["friction"] <= 0:
        pass  # μ = 0 is a frictionless pendulum: allowed
    if kind == "lumped":
        given = tuple(k for k in ("mass", "stiffness", "period") if k in table)
        if given not in {("mass", "stiffness"), ("mass", "period"), ("period",)}:
            problems.add(where, f"expected mass + stiffness, mass + period, or period "
                         f"alone; found {' + '.join(given) if given else 'none of them'}")
            return None
    if len(problems.items) > before or None in (system_id, name, damping):
        return None
    derived = _build(kind, values, where, problems)
    if derived is None:
        return None
    damper = _damper(table["damper"], f"{where}.damper", problems) \
        if "damper" in table else None
    pdelta = _p_delta(kind, table, values, derived, where, problems)
    if len(problems.items) > before:
        return None
    model = _nonlinear_model(kind, values, table, derived, pdelta, damper, where, problems)
    if model is None and pdelta is not None:
        model = {"model": "linear", "period_s": pdelta["period_s"]}
    height = values.get("height")
    mass = derived.mass_kg
    if kind in ("static-deflection", "sliding-pendulum"):
        mass = values["weight"] / G
    limits = _read_limits(table.get("limits", {}), f"{where}.limits",
                          mass if mass is not None else None, height, problems)
    if limits.ductility is not None and (model is None or
                                         model["model"] not in HYSTERESIS_MODELS):
        problems.add(f"{where}.limits.ductility", "a ductility limit needs a yielding "
                     "system (yield_strength or yield_displacement)")
    if limits.bearing_displacement_m is not None and kind != "sliding-pendulum":
        problems.add(f"{where}.limits.bearing_displacement", "applies only to kind "
                     "'sliding-pendulum'")
    stiffness = derived.stiffness_n_m
    if kind == "hanging":
        # Linearised compound pendulum under base acceleration: the centre of mass moves
        # as an oscillator driven by Γ üg with Γ = m d²/I (moments about the moving pivot).
        gamma = values["mass"] * values["pivot_to_centre"] ** 2 / values["pivot_inertia"]
        model = {"model": "linear", "participation": gamma}
    inputs = {k: v for k, v in values.items() if not k.startswith("_")}
    directions = _read_directions(table, where, problems)
    direction = _read_value(table, spec["direction"], where, problems) or "horizontal"
    if direction == "vertical" and directions == 2:
        problems.add(f"{where}.directions", "directions = 2 applies to horizontal "
                     "systems; this system has direction = \"vertical\"")
    return SystemSpec(system_id, name, damping, derived.period_s, mass, stiffness, height,
                      limits, tuple(derived.derivation), kind, model, inputs, pdelta,
                      directions, direction)


def _read_directions(table: dict, where: str, problems: _Problems) -> int:
    """``directions`` (1 or 2); every system kind and model runs in two directions
    (sdofreport.core.biaxial), a hanging item as a spherical compound pendulum."""
    value = _read_value(table, SECTIONS["systems[]"]["directions"], where, problems)
    if value is None or value == 1:
        return 1
    if value != 2:
        problems.add(f"{where}.directions", f"expected 1 or 2, found {table['directions']!r}")
        return 1
    return 2


def _check_directions_have_records(records: list, systems: list,
                                   problems: _Problems) -> None:
    """Every system has records of its direction (vertical: component V)."""
    for system in systems:
        vertical = system.direction == "vertical"
        wanted = 'vertical (component = "V")' if vertical else "horizontal"
        if records and not any((r.component == "V") == vertical for r in records):
            problems.add(f"systems {system.id}", f"direction = {system.direction!r} needs "
                         f"{wanted} records; the suite has none")


def _check_two_directions(records: list, systems: list, problems: _Problems) -> None:
    """A system with ``directions = 2`` needs every record in a horizontal pair."""
    two = [s.id for s in systems if s.directions == 2]
    lone = [r.id for r in records if not r.pair and r.component != "V"]
    if two and (lone or not records):
        problems.add(f"systems {', '.join(two)}", "directions = 2 needs every record in "
                     "a horizontal pair (pair and component H1/H2); unpaired: "
                     f"{', '.join(lone) or 'no [[records]] given'}")


def _read_systems(items, problems: _Problems) -> list[SystemSpec]:
    if not isinstance(items, list) or not items:
        problems.add("systems", "expected at least one [[systems]] entry")
        return []
    systems, seen = [], {}
    for index, table in enumerate(items, start=1):
        where = f"systems[{index}]"
        if not isinstance(table, dict):
            problems.add(where, f"expected a table, found {table!r}")
            continue
        system = _read_system(table, where, seen, problems)
        if system is not None:
            systems.append(system)
    return systems


def _period_range(table: dict, where: str, default, problems: _Problems):
    """``period_range = [low, high]`` in s with 0 < low < high, or ``default``."""
    if "period_range" not in table:
        return default
    raw = table["period_range"]
    if (not isinstance(raw, list) or len(raw) != 2 or not all(
            isinstance(v, (int, float)) and not isinstance(v, bool) for v in raw)
            or not 0 < raw[0] < raw[1]):
        problems.add(f"{where}.period_range", f"expected [low, high] in s with "
                     f"0 < low < high, found {raw!r}")
        return default
    return (float(raw[0]), float(raw[1]))


def _section(table, name: str, problems: _Problems) -> dict | None:
    """An optional top-level table, checked for unknown keys; None when absent or bad."""
    if table is None:
        return None
    if not isinstance(table, dict):
        problems.add(name, f"expected a table, found {table!r}")
        return None
    _check_unknown(table, name, name, problems)
    return table


def _read_design_spectrum(table, problems: _Problems) -> DesignSpectrumSpec | None:
    where = "design_spectrum"
    table = _section(table, where, problems)
    if table is None:
        return None
    spec = SECTIONS["design_spectrum"]
    kind = _read_value(table, spec["kind"], where, problems)
    if kind is None:
        return None
    mapping = DESIGN_SPECTRUM_KEYS[kind]
    for key in table:
        if key not in ("kind", "vertical") and key in spec and key not in mapping:
            problems.add(f"{where}.{key}", f"does not apply to kind {kind!r}; its keys are "
                         f"{', '.join(mapping)}")
    values, parameters = {}, {}
    count = len(problems.items)
    for key, name in mapping.items():
        if key not in table:
            if key in OPTIONAL_DESIGN_KEYS.get(kind, ()):
                continue
            if spec[key].default is None:
                problems.add(f"{where}.{key}", f"missing; kind {kind!r} needs it "
                             f"({spec[key].description})")
            else:
                values[key] = parameters[name] = spec[key].default
            continue
        if key in ("periods", "sa"):
            raw = table[key]
            if not isinstance(raw, list) or len(raw) < 2 or not all(
                    isinstance(v, (int, float)) and not isinstance(v, bool) and
                    math.isfinite(v) and v >= 0 for v in raw):
                problems.add(f"{where}.{key}", f"expected a list of at least 2 numbers "
                             f">= 0, found {raw!r}")
                continue
            value = [float(v) for v in raw]
        else:
            if key in ("site_class", "site_category") and isinstance(table[key], str):
                # accepted as text in any case: "cd" is site class CD
                raw = table[key].strip()
                table = {**table, key: raw.lower() if raw.lower() == "default" else
                         raw.upper()}
            value = _read_value(table, spec[key], where, problems)
            if value is None:
                continue
        if key == "level" and value == "mce":
            value = "mce_r"  # the older spelling
        values[key] = value
        parameters[name] = value
    if len(problems.items) > count:
        return None
    try:
        DesignSpectrumSpec(kind, values, parameters).spectrum()
    except ValueError as exc:
        message = str(exc)
        for key, name in mapping.items():  # the file's key names, not the core's
            if name != key:
                message = re.sub(rf"\b{re.escape(name)}\b", key, message)
        problems.add(where, message)
        return None
    vertical = _read_vertical(table.get("vertical"), kind, values, problems)
    return DesignSpectrumSpec(kind, values, parameters, vertical)


def _read_vertical(table, kind: str, horizontal: dict,
                   problems: _Problems) -> VerticalSpectrumSpec | None:
    """``[design_spectrum.vertical]``: the vertical target, its missing values taken from
    the horizontal spectrum where the standard relates them (each row says so)."""
    from sdofreport.core.vertical_spectra import EN1998_VERTICAL_TABLE_3_4

    where = "design_spectrum.vertical"
    table = _section(table, where, problems) if table is not None else None
    if table is None:
        return None
    spec = SECTIONS[where]
    vkind = _read_value(table, spec["kind"], where, problems)
    if vkind is None:
        return None
    own = {"en1998-1": ("spectrum_type", "avg", "tb", "tc", "td"),
           "asce7-16": ("sms", "site_class", "level")}[vkind]
    count = len(problems.items)
    for key in table:
        if key not in ("kind", "period_range") + own and key in spec:
            problems.add(f"{where}.{key}", f"does not apply to kind {vkind!r}; its keys "
                         f"are {', '.join(own + ('period_range',))}")
    if isinstance(table.get("site_class"), str):  # "d" is site class D
        table = {**table, "site_class": table["site_class"].strip().upper()}
    if isinstance(table.get("spectrum_type"), bool):
        table = {**table, "spectrum_type": str(table["spectrum_type"]).lower()}
    got = {key: _read_value(table, spec[key], where, problems) for key in own
           if key in table}
    rows, parameters = [], {}

    def inherit(key: str, label: str, source_key: str, derive, basis: str):
        """The value as given, else derived from the horizontal spectrum, else missing."""
        if got.get(key) is not None:
            rows.append((label, got[key], "as given"))
            return got[key]
        if kind == vkind and horizontal.get(source_key) is not None:
            value = derive(horizontal[source_key])
            rows.append((label, value, basis))
            return value
        if key not in table:
            problems.add(f"{where}.{key}", f"missing; the horizontal spectrum (kind "
                         f"{kind!r}) does not give it ({spec[key].description})")
        return None

    if vkind == "en1998-1":
        stype = inherit("spectrum_type", "spectrum type", "spectrum_type", int,
                        "the horizontal spectrum's type")
        if stype is None:
            return None
        ratio = EN1998_VERTICAL_TABLE_3_4[stype]
        ag = horizontal.get("agr", 0.0) * horizontal.get("importance_factor", 1.0)
        avg = inherit("avg", "a_vg [g]", "agr", lambda _: ratio[0] * ag,
                      f"a_vg/a_g = {ratio[0]:g} (Table 3.4, from memory) × a_g = γ_I a_gR "
                      f"= {ag:g} g")
        periods = []
        for key, default in zip(("tb", "tc", "td"), ratio[1:]):
            value = got.get(key) if key in table else default
            rows.append((f"T_{key[1].upper()} [s]", value, "National Annex, as given"
                         if key in table else "Table 3.4 (from memory)"))
            periods.append(value)
        if None not in periods and not 0 < periods[0] < periods[1] < periods[2]:
            problems.add(where, f"tb < tc < td must hold [s]; got T_B {periods[0]:g}, "
                         f"T_C {periods[1]:g}, T_D {periods[2]:g}")
        _positive(avg, f"{where}.avg", "a_vg", problems, "g")
        parameters = {"avg_g": avg, "tb_s": periods[0], "tc_s": periods[1],
                      "td_s": periods[2], "damping": 0.05}
    else:
        sms = inherit("sms", "S_MS [g]", "sds", lambda sds: 1.5 * sds,
                      "1.5 × S_DS of the horizontal spectrum (S_DS = 2/3 S_MS, "
                      "§11.4.5, from memory)")
        _positive(sms, f"{where}.sms", "S_MS", problems, "g")
        site = got.get("site_class")
        if site is None and "site_class" not in table:
            problems.add(f"{where}.site_class", f"missing; kind 'asce7-16' needs it "
                         f"({spec['site_class'].description})")
        rows.append(("site class", site, "as given"))
        level = got.get("level") or ("mce_r" if horizontal.get("level") in (None, "mce")
                                     else horizontal["level"])
        rows.append(("level", level, "as given" if "level" in got else
                     "the horizontal spectrum's level" if "level" in horizontal else
                     "default"))
        parameters = {"sms_g": sms, "site_class": site, "level": level}
    period_range = _period_range(table, where, None, problems)
    if len(problems.items) > count:
        return None
    found = VerticalSpectrumSpec(vkind, tuple(rows), parameters, period_range)
    peak = float(np.nanmax(found.sa_g(np.array([0.0, 0.05, 0.15]))))
    if not peak <= MAX_SPECTRAL_G:
        problems.add(where, f"the vertical spectrum reaches {peak:.3g} g; expected at most "
                     f"{MAX_SPECTRAL_G:g} g: check the values and units")
        return None
    return found


def _scaling_range(table: dict, where: str, rule: str, period, problems: _Problems):
    """(explicit range or None, option name or None) of ``[scaling] period_range``."""
    raw = table.get("period_range")
    if isinstance(raw, str):
        names = codes.period_range_names(rule)
        option = codes.period_range_option(rule, raw)
        if option is None:
            problems.add(f"{where}.period_range", f"expected one of {', '.join(names)} "
                         f"or [low, high] in s, found {raw!r}")
            return None, None
        if option.needs_period and period is None and option.damping_coefficient is None:
            problems.add(f"{where}.period_range", f"option {raw!r} needs [scaling] "
                         f"period, the governing period (example: period = \"0.8 s\")")
        return None, raw
    explicit = _period_range(table, where, None, problems)
    if explicit is not None:
        return explicit, None
    return None, "governing-period" if period is not None else "every-system"


def _read_scaling(table, design: DesignSpectrumSpec | None, had_design: bool,
                  problems: _Problems) -> ScalingSpec:
    where = "scaling"
    table = _section(table, where, problems)
    if table is None:
        return ScalingSpec()
    spec = SECTIONS["scaling"]
    rule = _read_value(table, spec["rule"], where, problems) or "none"
    period = _read_value(table, spec["period"], where, problems)
    _positive(period, f"{where}.period", "the period", problems, "s")
    suite = _read_value(table, spec["suite_factor"], where, problems)
    _positive(suite, f"{where}.suite_factor", "the suite factor", problems, "")
    period_range, option = _scaling_range(table, where, rule, period, problems)
    if rule != "none" and not had_design:
        problems.add(f"{where}.rule", f"rule {rule!r} needs a [design_spectrum] section "
                     f"(the target)")
    edition = codes.edition(rule)
    if edition is not None and design is not None and \
            design.kind not in edition.spectrum_kinds:
        kinds = " or ".join(f'kind = "{k}"' for k in edition.spectrum_kinds)
        problems.add(f"{where}.rule", f"rule {rule!r} ({edition.standard}) needs {kinds} "
                     f"in [design_spectrum], found {design.kind!r}")
    beyond = _read_value(table, spec["beyond_usable"], where, problems) or "exclude"
    isolator = _read_value(table, spec["isolator"], where, problems)
    return ScalingSpec(rule, period, period_range, suite if suite else 1.0, option, beyond,
                       isolator)


def _check_vertical_range(design, records: list, systems: list,
                          problems: _Problems) -> None:
    """The vertical target's fitting range needs vertical systems, or to be given."""
    vertical = design.vertical if design is not None else None
    if vertical is None or vertical.period_range_s is not None:
        return
    if any(r.component == "V" for r in records) and \
            not any(s.direction == "vertical" for s in systems):
        problems.add("design_spectrum.vertical.period_range", "missing; no system has "
                     "direction = \"vertical\", so the default range (0.2 × the "
                     "shortest to 2 × the longest vertical period) is not defined; give "
                     "period_range = [low, high] in s")


def _resolve_isolator(scaling: ScalingSpec, systems: list,
                      problems: _Problems) -> ScalingSpec:
    """The isolator system of ``period_range = "isolated-system"`` (named, or the only
    one when no period is given), checked; ``isolator`` applies only to that option."""
    where = "scaling.isolator"
    named = scaling.isolator
    option = codes.period_range_option(scaling.rule, scaling.period_range_option or "")
    if option is None or option.damping_coefficient is None:
        if named is not None:
            problems.add(where, f"applies only with period_range = \"isolated-system\" "
                         f"(rule asce7-16 or asce7-22), found period_range = "
                         f"{scaling.period_range_option or list(scaling.period_range_s or ())!r}")
        return scaling
    isolators = [s.id for s in systems if s.is_isolator]
    if named is None:
        if scaling.period_s is not None:
            return scaling  # T_M = period at both ends, as given
        if len(isolators) != 1:
            problems.add("scaling.period_range", "option 'isolated-system' needs [scaling] "
                         "period (T_M) or one isolator system (a sliding pendulum or a "
                         "bilinear system); " + (f"name one with isolator, of "
                                                 f"{', '.join(isolators)}" if isolators
                                                 else "the project has none"))
            return scaling
        named = isolators[0]
    elif named not in isolators:
        known = [s.id for s in systems]
        problems.add(where, f"expected the id of an isolator system (a sliding pendulum "
                     f"or a bilinear system: {', '.join(isolators) or 'none here'}), "
                     f"found {named!r}" + ("" if named in known else
                                           f"; the system ids are {', '.join(known)}"))
        return scaling
    return dataclasses.replace(scaling, isolator=named)


def _number_list(value, where: str, minimum: float, problems: _Problems,
                 strict: bool = False):
    ok = isinstance(value, list) and value and all(
        isinstance(v, (int, float)) and not isinstance(v, bool) and math.isfinite(v) and
        (v > minimum if strict else v >= minimum) for v in value)
    if not ok:
        relation = ">" if strict else ">="
        problems.add(where, f"expected a list of numbers {relation} {minimum:g}, found "
                     f"{value!r}")
        return None
    return tuple(sorted(set(float(v) for v in value)))


def _read_synthetic(table, design, problems: _Problems) -> SyntheticSpec | None:
    where = "synthetic_records"
    table = _section(table, where, problems)
    if table is None:
        return None
    spec = SECTIONS["synthetic_records"]
    values = {name: _read_value(table, key, where, problems) for name, key in spec.items()
              if name != "period_range"}
    count, duration, dt = values["count"], values["duration"], values["dt"]
    if count is not None and not 1 <= count <= 100:
        problems.add(f"{where}.count", f"expected 1 to 100 records, found {count}")
        values["count"] = None  # never make (or list) that many records
    if duration is not None and dt is not None and not 0 < 20 * dt <= duration:
        problems.add(f"{where}.dt", f"expected 0 < dt and at least 20 steps in the "
                     f"duration, found dt {dt:g} s for {duration:g} s")
    if not _synthetic_length_ok(duration, dt, where, problems):
        values["duration"] = None
    period_range = _period_range(table, where, (0.05, 4.0), problems)
    if design is None:
        problems.add(where, "synthetic records need a [design_spectrum] section (their "
                     "target)")
    if None in values.values():
        return None
    return SyntheticSpec(count, duration, dt, values["seed"], values["envelope"],
                         period_range)


def _read_inelastic(table, problems: _Problems) -> InelasticSpectraSpec | None:
    where = "inelastic_spectra"
    table = _section(table, where, problems)
    if table is None:
        return None
    spec = SECTIONS["inelastic_spectra"]
    ductility = _number_list(table.get("ductility", spec["ductility"].default),
                             f"{where}.ductility", 1.0, problems)
    reduction = _number_list(table.get("strength_reduction",
                                       spec["strength_reduction"].default),
                             f"{where}.strength_reduction", 1.0, problems)
    periods = _read_periods(table.get("periods", spec["periods"].default), problems,
                            f"{where}.periods")
    _check_longest_period(periods, f"{where}.periods", problems)
    damping = _read_value(table, spec["damping"], where, problems)
    alpha = _read_value(table, spec["post_yield_ratio"], where, problems)
    steps = _read_value(table, spec["steps_per_period"], where, problems)
    from sdofreport.core.bilinear_exact import MIN_STEPS_PER_PERIOD

    if steps is not None and steps < MIN_STEPS_PER_PERIOD:
        problems.add(f"{where}.steps_per_period", f"expected a number of at least "
                     f"{MIN_STEPS_PER_PERIOD:g}, found {steps:g}")
        steps = None
    if None in (ductility, reduction, damping, alpha, steps):
        return None
    return InelasticSpectraSpec(ductility, reduction, periods, damping, alpha, steps)


def _without_bom(text: str) -> str:
    """``text`` without a leading byte-order mark (some Windows editors write one)."""
    return text.removeprefix("\ufeff")


def _too_deep_message(path: Path, text: str) -> str:
    """The message for TOML nested beyond what the parser (and Python) can follow."""
    depth, deepest, line = 0, 0, 1
    for number, row in enumerate(text.splitlines(), start=1):
        for char in row:
            depth += char in "[{"
            depth -= char in "]}"
            if depth > deepest:
                deepest, line = depth, number
    return (f"{path} line {line}: brackets and braces nested {deepest} deep, beyond what "
            f"the TOML reader follows; expected a spring network of at most "
            f"{MAX_NETWORK_DEPTH} levels of series and parallel groups.")


def _check_bounded(value, where: str, limit: float, what: str, problems: _Problems) -> None:
    """A problem when ``value`` (already > 0) exceeds ``limit``."""
    if isinstance(value, (int, float)) and value > limit:
        problems.add(where, f"expected a {what} of at most {limit:g}, found {value:g}")


def _check_absurd_design(design: DesignSpectrumSpec | None, scaling: ScalingSpec,
                         analysis: AnalysisSettings, problems: _Problems) -> None:
    """Problems for a design spectrum beyond any real one, or an absurd suite factor."""
    _check_bounded(scaling.suite_factor, "scaling.suite_factor", MAX_SCALE, "suite factor",
                   problems)
    if design is None:
        return
    # Zero period too: a huge plateau can lie entirely below the analysis periods.
    periods = sorted({0.0, *analysis.periods_s, *(design.values.get("periods") or [])})
    with np.errstate(all="ignore"):
        peak = float(np.max(design.spectrum().sa_g(np.asarray(periods, dtype=float))))
    if not (math.isfinite(peak) and peak <= MAX_SPECTRAL_G):
        shown = ", ".join(f"{key} = {value!r}" for key, value in design.values.items())
        problems.add("design_spectrum", f"the spectrum reaches {peak:.3g} g ({shown}); "
                     f"expected at most {MAX_SPECTRAL_G:g} g: check the values and units")


def _synthetic_length_ok(duration, dt, where: str, problems: _Problems) -> bool:
    """False (with a problem) when a synthetic record would hold too many samples."""
    if duration is None or dt is None or not dt > 0:
        return True
    samples = duration / dt
    if samples <= MAX_SYNTHETIC_SAMPLES:
        return True
    problems.add(f"{where}.duration", f"duration {duration:g} s at dt {dt:g} s makes "
                 f"{samples:.3g} samples per record; expected at most "
                 f"{MAX_SYNTHETIC_SAMPLES:,} (shorten the duration or coarsen dt)")
    return False


def _check_longest_period(periods, where: str, problems: _Problems) -> None:
    """A problem when a spectrum period exceeds :data:`MAX_PERIOD_S`."""
    if periods and max(periods) > MAX_PERIOD_S:
        problems.add(where, f"expected periods of at most {MAX_PERIOD_S:g} s, found "
                     f"{max(periods):g} s")


def _network_depth_ok(node, where: str, problems: _Problems) -> bool:
    """False (with a problem) when a spring network nests deeper than allowed.

    Measured without recursion, so a network hundreds of levels deep is a message, not
    a RecursionError."""
    deepest, stack = 0, [(node, 1)]
    while stack:
        item, depth = stack.pop()
        deepest = max(deepest, depth)
        if deepest > MAX_NETWORK_DEPTH:
            problems.add(where, f"nested more than {MAX_NETWORK_DEPTH} levels deep; expected "
                         f"a spring network of at most {MAX_NETWORK_DEPTH} levels of series "
                         f"and parallel groups")
            return False
        children = item.values() if isinstance(item, dict) else (
            item if isinstance(item, list) else ())
        # A level is a node (a table); the lists between nodes do not count.
        stack += [(child, depth + isinstance(child, dict)) for child in children
                  if isinstance(child, (dict, list))]
    return True

def _read_fragility(table, systems, problems: _Problems) -> FragilitySpec | None:
    where = "fragility"
    table = _section(table, where, problems)
    if table is None:
        return None
    spec = SECTIONS["fragility"]
    levels = None
    if "levels" not in table:
        problems.add(f"{where}.levels", f"missing; expected a list of at least 2 levels "
                     f"in g (example: levels = {spec['levels'].example})")
    else:
        levels = _number_list(table["levels"], f"{where}.levels", 0.0, problems,
                              strict=True)
        if levels is not None and not 2 <= len(levels) <= 50:
            problems.add(f"{where}.levels", f"expected 2 to 50 different levels, found "
                         f"{len(levels)}")
            levels = None
    measure = _read_value(table, spec["measure"], where, problems)
    design = _read_value(table, spec["design_level"], where, problems)
    _positive(design, f"{where}.design_level", "the design level", problems, "g")
    known = [s.id for s in systems]
    chosen = table.get("systems", [s.id for s in systems if s.limits.items()])
    if not isinstance(chosen, list) or not chosen or \
            not all(isinstance(i, str) for i in chosen):
        problems.add(f"{where}.systems", f"expected a list of system ids, found {chosen!r}")
        chosen = None
    else:
        for name in chosen:
            if name not in known:
                problems.add(f"{where}.systems", f"no system has id {name!r}; the ids are "
                             f"{', '.join(known)}")
                chosen = None
    if levels is None or measure is None or chosen is None:
        return None
    return FragilitySpec(levels, measure, tuple(dict.fromkeys(chosen)), design)


def _syntax_error_message(path: Path, exc: tomllib.TOMLDecodeError, text_in: str) -> str:
    text = str(exc)
    match = re.search(r"\(at line (\d+), column (\d+)\)", text)
    reason = re.sub(r"\s*\(at (line \d+, column \d+|end of document)\)", "", text)
    if match:
        where = f" line {match.group(1)}, column {match.group(2)}"
    else:  # "at end of document": name the last line that has text
        lines = text_in.rstrip().splitlines()
        where = f" line {len(lines)} (end of file)" if lines else ""
    return (f"{path}{where}: not valid TOML: {reason}. Check quotes around text, '=' "
            f"between key and value, and [section] headers.")


def format_problems(path: Path, problems: list[tuple[str, str]], text: str = "",
                    document: dict | None = None) -> str:
    """One message listing every problem, each starting with where it is: the key path
    with array entries named by id, and the line of the key in ``text``."""
    count = len(problems)
    head = f"{path} has {count} problem{'s' if count != 1 else ''}:"
    lines, names = key_lines(text), entry_ids(document or {})
    return "\n".join([head, *(f"  {describe(where, lines, names)}: {message}"
                              for where, message in problems)])


def load_project(path) -> Project:
    """
    Read, validate and convert a project file to SI.

    Parameters
    ----------
    path : str or Path
        The project file (TOML). Relative paths inside it are relative to its folder.

    Returns
    -------
    Project

    Raises
    ------
    ProjectError
        Listing every problem found, each with its key path (or line, for syntax).
    """
    path = Path(path)
    if path.is_dir():
        path = path / "sdofreport.toml"
    if not path.is_file():
        raise ProjectError(f"{path}: project file not found; expected a TOML file such as "
                           f"sdofreport.toml.")
    raw = path.read_bytes()
    try:
        text = _without_bom(raw.decode("utf-8"))
    except UnicodeDecodeError as exc:
        line = raw[:exc.start].count(b"\n") + 1
        raise ProjectError(f"{path} line {line}: not UTF-8 text (byte {exc.start}); save "
                           f"the project file as UTF-8.") from None
    try:
        document = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise ProjectError(_syntax_error_message(path, exc, text)) from None
    except RecursionError:
        raise ProjectError(_too_deep_message(path, text)) from None
    shown = path
    path = path.resolve()
    head = document.get("project")
    problems = _Problems(plain_si=isinstance(head, dict) and
                         head.get("plain_numbers") == "SI")
    for key in document:
        if key not in TOP_LEVEL:
            problems.add(key, f"unknown section{_did_you_mean(key, TOP_LEVEL)}")
    if "project" not in document:
        problems.add("project", "missing section [project] (title, reference, revision, "
                     "prepared_by)")
    info = _read_info(document.get("project", {}), path, problems)
    analysis = _read_analysis(document.get("analysis", {}), problems)
    processing = _read_processing(document.get("processing", {}), "processing", problems,
                                  ProcessingSettings())
    design_early = document.get("design_spectrum")
    synthetic_table = document.get("synthetic_records")
    if synthetic_table is not None and document.get("records"):
        problems.add("synthetic_records", "give either [[records]] or "
                     "[synthetic_records], not both")
    if synthetic_table is None:
        records = _read_records(document.get("records"), path.parent, processing, problems)
    else:
        records = []
    systems = _read_systems(document.get("systems"), problems)
    design = _read_design_spectrum(document.get("design_spectrum"), problems)
    scaling = _read_scaling(document.get("scaling"), design, "design_spectrum" in document,
                            problems)
    inelastic = _read_inelastic(document.get("inelastic_spectra"), problems)
    _check_absurd_design(design, scaling, analysis, problems)

    fragility = _read_fragility(document.get("fragility"), systems, problems)
    synthetic = _read_synthetic(synthetic_table, design if design_early is not None else
                                None, problems)
    if synthetic is not None:
        records = [RecordSpec(f"syn{i + 1:02d}", None,
                              f"synthetic (seed {synthetic.seed + i})", "synthetic", "g",
                              synthetic.dt_s, 1.0, processing)
                   for i in range(synthetic.count)]
    scaling = _resolve_isolator(scaling, systems, problems)
    _check_vertical_range(design, records, systems, problems)
    _check_two_directions(records, systems, problems)
    _check_directions_have_records(records, systems, problems)
    save_memo()  # unit strings pint converted, so the next read need not import it
    for where, message in id_case_problems(document):
        problems.add(where, message)
    if problems.items:
        raise ProjectError(format_problems(shown, problems.items, text, document))
    # Records in natural order of their ids (P1, P2, ... P10), wherever they are listed.
    records = sorted(records, key=lambda spec: natural_key(spec.id))
    return Project(path, hashlib.sha256(raw).hexdigest(), info, analysis, processing,
                   tuple(records), tuple(systems), design, scaling, inelastic, synthetic,
                   fragility)
