"""
The job of ``sdofreport synthesize``: read a target spectrum, make spectrum-compatible
synthetic records (:mod:`sdofreport.core.compatible`) and write them with a summary.

Gather, then write: every record is generated and every output name checked before the
first file is written, so a failure leaves nothing half-written. The same options give
the same bytes (fixed seeds, no dates).
"""

from __future__ import annotations

import difflib
import json
import math
import tomllib
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from sdofreport.core.compatible import COMPATIBLE_ENVELOPES, spectrum_compatible_record
from sdofreport.core.design_spectra import DESIGN_SPECTRUM_KINDS, design_spectrum
from sdofreport.core.units import G
from sdofreport.errors import SdofreportError
from sdofreport.fsio import write_atomically
from sdofreport.project.bounds import MAX_SYNTHETIC_SAMPLES
from sdofreport.project.schema import DESIGN_SPECTRUM_KEYS, OPTIONAL_DESIGN_KEYS
from sdofreport.records.writers import write_two_column

__all__ = [
    "EUROCODE_NOTE",
    "METHOD_TEXT",
    "SUMMARY_FILE",
    "TOML_KEYS",
    "SynthesisTarget",
    "parse_target",
    "record_file_name",
    "synthesize",
]

#: Summary file written next to the records.
SUMMARY_FILE = "synthesis.json"

#: How the records were made, written into every file header and the summary.
METHOD_TEXT = ("random-phase sinusoids iterated to the target (Gasparini & Vanmarcke 1976, "
               "MIT report R76-4), then local wavelet adjustments near the oscillators' "
               "peak times; envelope and quadratic baseline correction inside the loop")

#: Reminder printed and stored with every set of records.
EUROCODE_NOTE = ("EN 1998-1 3.2.3.1.2: artificial accelerograms must meet the same "
                 "conditions as recorded ones (at least 3 records, mean zero-period value "
                 ">= a_g S, mean 5 % spectrum >= 90 % of the elastic spectrum over "
                 "0.2 T1 - 2 T1); check the set, not only each record.")

#: Keys of a ``[design_spectrum]`` section per kind -> parameter of design_spectrum().
TOML_KEYS: dict[str, dict[str, str]] = {
    "asce7-16": {"sds": "sds_g", "sd1": "sd1_g", "tl": "tl_s", "level": "level"},
    "en1998-1": {"agr": "agr_g", "importance_factor": "importance_factor",
                 "ground_type": "ground_type", "spectrum_type": "spectrum_type",
                 "damping": "damping"},
    "table": {"periods": "table_periods_s", "sa": "table_sa_g"},
    # the current editions read the project file's keys (sdofreport.project.schema)
    "asce7-22": DESIGN_SPECTRUM_KEYS["asce7-22"],
    "en1998-1-1": DESIGN_SPECTRUM_KEYS["en1998-1-1"],
}

# Periods at which a code spectrum is tabulated for the generator [s] (our choice: dense
# enough that log-log interpolation stays within 0.2 % of the formula at its kinks).
_TABLE_PERIODS_S = np.geomspace(0.005, 20.0, 2000)


@dataclass(frozen=True)
class SynthesisTarget:
    """A target spectrum as a table, and how the user gave it."""

    #: one line saying where the target came from, e.g. "asce7-16: sds=1.0, ..."
    description: str
    #: one of DESIGN_SPECTRUM_KINDS
    kind: str
    #: table periods, strictly increasing [s]
    periods_s: np.ndarray
    #: target spectral acceleration at periods_s [g]
    sa_g: np.ndarray
    #: damping of the EN 1998-1 spectrum when stated, else None [-]
    damping: float | None = None


def _close(word: str, allowed) -> str:
    near = difflib.get_close_matches(word, list(allowed), n=1)
    return f" (did you mean {near[0]!r}?)" if near else ""


def _from_parameters(kind: str, values: dict, where: str) -> SynthesisTarget:
    """Map user keys to design_spectrum() parameters; errors name ``where`` and the key."""
    if kind not in DESIGN_SPECTRUM_KINDS:
        raise SdofreportError(
            f"{where}: kind {kind!r} is not a design spectrum"
            f"{_close(str(kind), DESIGN_SPECTRUM_KINDS)}; "
            f"allowed: {', '.join(DESIGN_SPECTRUM_KINDS)}."
        )
    keys = TOML_KEYS[kind]
    params = {}
    for key, value in values.items():
        if key not in keys:
            raise SdofreportError(
                f"{where}: unknown key {key!r} for kind {kind!r}{_close(key, keys)}; "
                f"allowed: {', '.join(keys)}."
            )
        params[keys[key]] = value
    missing = [k for k, p in keys.items() if p not in params and k not in
               ("level", "damping", *OPTIONAL_DESIGN_KEYS.get(kind, ()))]
    if missing:
        raise SdofreportError(f"{where}: kind {kind!r} needs key(s) {', '.join(missing)}.")
    try:
        spectrum = design_spectrum(kind, **params)
        if kind == "table":
            periods = np.asarray(params["table_periods_s"], dtype=float)
            sa = np.asarray(params["table_sa_g"], dtype=float)
        else:
            periods = _TABLE_PERIODS_S
            sa = spectrum.sa_g(periods)
    except (TypeError, ValueError) as exc:
        raise SdofreportError(f"{where}: {exc}.") from None
    shown = ", ".join(f"{k}={v}" for k, v in values.items() if k not in ("periods", "sa"))
    if kind == "table":
        shown = f"{periods.size} points from {periods[0]:g} to {periods[-1]:g} s"
    damping = params.get("damping") if kind in ("en1998-1", "en1998-1-1") else None
    return SynthesisTarget(description=f"{kind}: {shown}", kind=kind, periods_s=periods,
                           sa_g=sa, damping=None if damping is None else float(damping))


def _inline_value(text: str):
    for convert in (int, float):
        try:
            return convert(text)
        except ValueError:
            pass
    return text


def _parse_inline(text: str) -> SynthesisTarget:
    kind, _, rest = text.partition(":")
    kind = kind.strip()
    where = f"--target {text!r}"
    if kind == "table":
        raise SdofreportError(f"{where}: give a table target as a file of period [s] and "
                              f"Sa [g] columns, not inline.")
    values = {}
    for item in filter(None, (p.strip() for p in rest.split(","))):
        key, eq, value = item.partition("=")
        if not eq or not key.strip() or not value.strip():
            raise SdofreportError(f"{where}: expected key=value, got {item!r}.")
        values[key.strip()] = _inline_value(value.strip())
    return _from_parameters(kind, values, where)


def _parse_project(path: Path) -> SynthesisTarget:
    try:
        data = tomllib.loads(path.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError) as exc:
        raise SdofreportError(f"{path}: cannot read the project file ({exc}).") from None
    except tomllib.TOMLDecodeError as exc:
        raise SdofreportError(f"{path}: not valid TOML ({exc}).") from None
    section = data.get("design_spectrum")
    if not isinstance(section, dict):
        raise SdofreportError(f"{path}: no [design_spectrum] section; add one with kind = "
                              f"{' | '.join(repr(k) for k in DESIGN_SPECTRUM_KINDS)}.")
    values = dict(section)
    values.pop("vertical", None)  # [design_spectrum.vertical]: the horizontal target only
    kind = values.pop("kind", None)
    if kind is None:
        raise SdofreportError(f"{path} [design_spectrum]: missing key 'kind'; allowed: "
                              f"{', '.join(DESIGN_SPECTRUM_KINDS)}.")
    head = data.get("project")
    plain_si = isinstance(head, dict) and head.get("plain_numbers") == "SI"
    return _from_parameters(kind, _project_quantities(values, plain_si, path),
                            f"{path} [design_spectrum]")


def _project_quantities(values: dict, plain_si: bool, path: Path) -> dict:
    """``values`` with dimensional keys (``tl = "8 s"``) converted to SI, read as the
    project loader reads them (a bare number only with plain_numbers = "SI")."""
    from sdofreport.project.quantities import QuantityError, parse_quantity
    from sdofreport.project.schema import SECTIONS

    out = dict(values)
    for key, value in values.items():
        spec = SECTIONS["design_spectrum"].get(key)
        if spec is None or spec.type != "quantity":
            continue
        try:
            out[key] = parse_quantity(value, spec.dimension, plain_si=plain_si, key=key)
        except QuantityError as exc:
            raise SdofreportError(f"{path} [design_spectrum] {key}: {exc}.") from None
    return out


def _parse_table_file(path: Path) -> SynthesisTarget:
    try:
        lines = path.read_text(encoding="utf-8").splitlines()
    except (OSError, UnicodeDecodeError) as exc:
        raise SdofreportError(f"{path}: cannot read the target table ({exc}).") from None
    periods, values = [], []
    for number, line in enumerate(lines, start=1):
        text = line.split("#", 1)[0].strip()
        if not text:
            continue
        fields = text.replace(",", " ").split()
        try:
            row = [float(x) for x in fields]
        except ValueError:
            raise SdofreportError(f"{path} line {number}: expected two numbers, period [s] "
                                  f"and Sa [g]; got {line.strip()!r}.") from None
        if len(row) != 2 or not all(math.isfinite(x) for x in row):
            raise SdofreportError(f"{path} line {number}: expected two finite numbers, "
                                  f"period [s] and Sa [g]; got {line.strip()!r}.")
        periods.append(row[0])
        values.append(row[1])
    try:
        design_spectrum("table", table_periods_s=periods, table_sa_g=values)
    except ValueError as exc:
        raise SdofreportError(f"{path}: {exc}.") from None
    p, s = np.asarray(periods), np.asarray(values)
    return SynthesisTarget(description=f"table {path.name}: {p.size} points from {p[0]:g} "
                           f"to {p[-1]:g} s", kind="table", periods_s=p, sa_g=s)


def parse_target(text: str) -> SynthesisTarget:
    """
    Read a target given as a project file, a period/Sa table file or an inline spec.

    Parameters
    ----------
    text : str
        A ``.toml`` project file with a ``[design_spectrum]`` section; a text file of
        period [s] and Sa [g] columns (comma or blank separated, ``#`` comments); or
        ``kind:key=value,...`` with the keys of :data:`TOML_KEYS`. [-]

    Returns
    -------
    SynthesisTarget

    Raises
    ------
    SdofreportError
        Naming the file, line or key that is wrong.
    """
    path = Path(text)
    if path.is_file():
        if path.suffix.lower() == ".toml":
            return _parse_project(path)
        return _parse_table_file(path)
    kind = text.partition(":")[0].strip()
    if ":" in text and kind in DESIGN_SPECTRUM_KINDS:
        return _parse_inline(text)
    raise SdofreportError(
        f"--target {text!r}: no such file, and not an inline spectrum like "
        f"'asce7-16:sds=1.0,sd1=0.6,tl=8' (kinds: {', '.join(DESIGN_SPECTRUM_KINDS)})."
    )


def record_file_name(index: int) -> str:
    """File name of the index-th record (1-based): syn01.csv, syn02.csv, ..."""
    return f"syn{index:02d}.csv"


def synthesize(target: SynthesisTarget, folder, *, count=1, duration_s=25.0, dt_s=0.01,
               seed=1, envelope="saragoni-hart", period_range_s=None, damping=None,
               force=False) -> list[dict]:
    """
    Generate ``count`` records (seeds ``seed, seed + 1, ...``) and write them.

    Returns one summary dict per record (file, seed, max and mean deviation over the
    range); writes ``syn01.csv``... (acceleration in g) and :data:`SUMMARY_FILE`.

    Raises
    ------
    SdofreportError
        For options the generator refuses, or existing files without ``force``.
    """
    if envelope not in COMPATIBLE_ENVELOPES:
        raise SdofreportError(f"--envelope {envelope!r}: allowed: "
                              f"{', '.join(COMPATIBLE_ENVELOPES)}.")
    if dt_s > 0 and duration_s / dt_s > MAX_SYNTHETIC_SAMPLES:
        raise SdofreportError(f"--duration {duration_s:g} s at --dt {dt_s:g} s makes "
                              f"{duration_s / dt_s:.3g} samples per record; expected at most "
                              f"{MAX_SYNTHETIC_SAMPLES:,} (shorten the duration or coarsen "
                              f"dt).")
    zeta = damping if damping is not None else (target.damping or 0.05)
    folder = Path(folder)
    names = [record_file_name(i + 1) for i in range(count)] + [SUMMARY_FILE]
    if not force:
        existing = [n for n in names if (folder / n).exists()]
        if existing:
            raise SdofreportError(f"{folder}: {', '.join(existing)} already exist(s); "
                                  f"use --force to replace, or choose another folder.")

    records = []
    for i in range(count):
        try:
            result = spectrum_compatible_record(
                target.periods_s, target.sa_g, duration_s, dt_s, seed=seed + i,
                damping_ratio=zeta, envelope=envelope, period_range_s=period_range_s)
        except ValueError as exc:
            raise SdofreportError(f"cannot synthesize for {target.description}: {exc}.") from None
        records.append(result)

    lo, hi = records[0].period_range_s
    summaries = []
    folder.mkdir(parents=True, exist_ok=True)
    for i, result in enumerate(records):
        header = [
            "synthetic spectrum-compatible record (not a recorded earthquake)",
            f"method: {METHOD_TEXT}",
            f"seed: {result.seed}; envelope: {envelope}; damping: {zeta:g}",
            f"target: {target.description}",
            f"match over {lo:g}-{hi:g} s: max deviation {100 * result.max_deviation:.1f} %, "
            f"mean {100 * result.mean_deviation:+.1f} %",
        ]
        name = record_file_name(i + 1)
        write_two_column(folder / name, dt_s, result.acceleration_m_s2 / G, units="g",
                         header_lines=header)
        summaries.append({
            "file": name,
            "seed": result.seed,
            "max_deviation": round(result.max_deviation, 6),
            "mean_deviation": round(result.mean_deviation, 6),
            "pga_g": round(float(np.max(np.abs(result.acceleration_m_s2))) / G, 6),
        })
    summary = {
        "target": target.description,
        "method": METHOD_TEXT,
        "duration_s": duration_s,
        "dt_s": dt_s,
        "damping": zeta,
        "envelope": envelope,
        "period_range_s": [lo, hi],
        "seeds": [r.seed for r in records],
        "records": summaries,
        "note": EUROCODE_NOTE,
    }
    text = json.dumps(summary, indent=2) + "\n"
    write_atomically(folder / SUMMARY_FILE, text.encode("utf-8"), mode=None)
    return summaries
