"""Generate docs/project-file.md from the key registry, sdofreport.project.schema.

Run from the repository root after changing the registry:

    python tools/gen_reference.py          # rewrite docs/project-file.md
    python tools/gen_reference.py --check  # exit 1 when the file is out of date

tests/docs/test_reference.py regenerates the text in memory and fails when the
committed file differs, so the reference cannot drift from what the loader accepts.
"""

from __future__ import annotations

import argparse
import re
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
TARGET = ROOT / "docs" / "project-file.md"

try:
    import sdofreport  # noqa: F401
except ImportError:  # running from a checkout without an installed package
    sys.path.insert(0, str(ROOT))

from sdofreport.project import schema  # noqa: E402
from sdofreport.project.quantities import DIMENSIONS  # noqa: E402

#: How each registry section is written in TOML, and a sentence about it. A section the
#: registry gains later falls back to a generic heading, so generation never fails.
SECTION_INTRO: dict[str, tuple[str, str]] = {
    "project": ("[project]", "Who, what and which revision: printed on every page and "
                "recorded in `data/results.json` and `manifest.json`. Required."),
    "analysis": ("[analysis]", "How spectra and histories are computed and which suite "
                 "statistic the checks use. Optional; every key has a default."),
    "processing": ("[processing]", "Record processing applied to every record before "
                   "analysis, in the order baseline, band-pass, taper. Optional; each "
                   "step is off when its key is omitted."),
    "design_spectrum": ("[design_spectrum]", "A target spectrum, drawn on the spectrum "
                        "figures and used by `[scaling]`. Optional. The keys that apply "
                        "depend on `kind` (see the table after this one)."),
    "design_spectrum.vertical": ("[design_spectrum.vertical]", "The vertical target, a "
                                 "table inside `[design_spectrum]`. Optional. Vertical "
                                 "records (`component = \"V\"`) are fitted to it over "
                                 "a stated period range (the project's choice, common "
                                 "practice: no clause here sets the rule) unless "
                                 "`[scaling] rule = \"none\"`, shown against it on the "
                                 "suite page, and the systems with `direction = "
                                 "\"vertical\"` run under the scaled records. Without "
                                 "it vertical records are used as given and the suite "
                                 "page says no vertical target was given."),
    "scaling": ("[scaling]", "Amplitude scaling of the suite to the design spectrum. "
                "Optional; needs `[design_spectrum]` unless `rule = \"none\"`."),
    "synthetic_records": ("[synthetic_records]", "Spectrum-compatible synthetic records "
                          "made from the design spectrum when the project lists no "
                          "`[[records]]`. Optional; for trials and demonstrations, never "
                          "a substitute for a selected suite."),
    "inelastic_spectra": ("[inelastic_spectra]", "Constant-ductility and "
                          "constant-strength spectra of a bilinear system for every "
                          "record. Optional; omit the section to skip them."),
    "records[]": ("[[records]]", "One table per ground-motion record. At least one."),
    "records[].processing": ("[records.processing]", "Per-record overrides of "
                             "`[processing]`, written as `processing = { ... }` inside a "
                             "`[[records]]` table; same keys."),
    "systems[]": ("[[systems]]", "One table per single-degree-of-freedom system. At "
                  "least one. The keys that apply depend on `kind` (see the table after "
                  "this one)."),
    "systems[].limits": ("[systems.limits]", "Limits checked against the suite "
                         "statistic of each demand. Each verdict says whether the demand "
                         "is within the stated limit; it is not an approval. Any limit "
                         "may state its basis by being written as a table, e.g. "
                         "`displacement = { value = \"40 mm\", basis = \"owner's "
                         "specification KB-S-12 §4\" }`; the basis is shown beside the "
                         "limit in the checks tables and in results.json."),
}

TYPE_TEXT = {
    "text": "text",
    "path": "text (path)",
    "number": "number",
    "integer": "integer",
    "ratio": "ratio",
    "quantity": "quantity",
    "choice": "choice",
    "list": "list",
    "table": "table",
    "boolean": "true or false",
}


def _cell(text: str) -> str:
    """Text made safe for one Markdown table cell."""
    return str(text).replace("|", "\\|").replace("\n", " ")


def _toml_value(value) -> str:
    """A default value written the way it would appear in the TOML file."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, str):
        return f'"{value}"'
    if isinstance(value, (int, float)):
        return repr(value)
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(_toml_value(v) for v in value) + "]"
    if isinstance(value, dict):
        return "{ " + ", ".join(f"{k} = {_toml_value(v)}" for k, v in value.items()) + " }"
    return str(value)


#: Units stated in a description as "in g", "in s" or "in Hz" (plain numbers).
_STATED_UNIT = re.compile(r"\bin (g|s|Hz)\b(?=[.,;)]| \()")


def _units(spec: schema.KeySpec) -> str:
    if spec.type == "quantity" and spec.dimension:
        si_unit = DIMENSIONS[spec.dimension][1]
        return f"{spec.dimension}: text with a unit ({si_unit} for a plain number " \
            f"with plain_numbers = \"SI\")"
    if spec.type == "ratio":
        return "fraction [-]"
    stated = _STATED_UNIT.search(spec.description)
    if stated:
        return stated.group(1)
    return "—"


def _default(spec: schema.KeySpec) -> str:
    if spec.required:
        return "**required**"
    if spec.default is None:
        return "none"
    text = _toml_value(spec.default)
    if spec.type == "quantity" and spec.dimension:
        text += f" ({DIMENSIONS[spec.dimension][1]})"
    return f"`{text}`"


def _description(spec: schema.KeySpec) -> str:
    text = spec.description
    if spec.choices:
        text += " One of " + ", ".join(f"`{_toml_value(c)}`" for c in spec.choices) + "."
    return text


def _section(name: str, keys: dict[str, schema.KeySpec]) -> list[str]:
    heading, intro = SECTION_INTRO.get(name, (f"[{name}]", "Section of the project file."))
    lines = [f"## `{heading}`", "", intro, "",
             "| key | type | units | default | description | example |",
             "| --- | --- | --- | --- | --- | --- |"]
    for spec in keys.values():
        lines.append(
            f"| `{spec.name}` | {TYPE_TEXT.get(spec.type, spec.type)} | {_cell(_units(spec))} "
            f"| {_cell(_default(spec))} | {_cell(_description(spec))} "
            f"| {'`' + _cell(spec.example) + '`' if spec.example else '—'} |")
    lines.append("")
    return lines


def _design_kinds() -> list[str]:
    lines = ["### Keys of each design-spectrum kind", "",
             "| kind | keys |", "| --- | --- |"]
    for kind, mapping in schema.DESIGN_SPECTRUM_KEYS.items():
        lines.append(f"| `{kind}` | " + ", ".join(f"`{key}`" for key in mapping) + " |")
    lines.append("")
    return lines


def _system_kinds() -> list[str]:
    lines = ["### Keys of each system kind", "",
             "Every kind also takes `id`, `name`, `kind`, `damping`, `height` and "
             "`limits`.", "",
             "| kind | required | optional |", "| --- | --- | --- |"]
    for kind, (required, optional) in schema.SYSTEM_KIND_KEYS.items():
        req = ", ".join(f"`{k}`" for k in required) or "—"
        opt = ", ".join(f"`{k}`" for k in optional) or "—"
        lines.append(f"| `{kind}` | {req} | {opt} |")
    lines.append("")
    return lines


def _dimensions() -> list[str]:
    lines = ["## Units of quantities", "",
             "A *quantity* (a dimensional key: mass, stiffness, lengths, forces, periods "
             "and times, moduli, inertias, accelerations of limits) is text with a unit, "
             "read with pint, such as `\"120 t\"`, `\"4.2 MN/m\"`, `\"26 kip/in\"`, "
             "`\"18 ft\"` or `\"0.35 g\"` (`g` is standard gravity, 9.80665 m/s²). A "
             "bare number (`mass = 6`, or `\"6\"`) is an error naming the key, the "
             "system or record by its id and the line, with the fix (`mass = \"6 t\"`): "
             "6 meant as tonnes would otherwise become 6 kg. With `[project] "
             "plain_numbers = \"SI\"` bare numbers are read in the SI unit of the "
             "table below, and the provenance on the summary page says so. A value of "
             "the wrong dimension is an error naming the key.",
             "",
             "Not dimensional, so plain numbers: ratios and fractions (`damping`, "
             "`post_yield_ratio`, `friction`, `drift_ratio`, the `damping` lists), "
             "factors (`scale`, `suite_factor`, `importance_factor`, `ductility`, "
             "`strength_reduction`), values the standards define in g (`sds`, `sd1`, "
             "`agr`, a table's `sa`), and keys whose unit is fixed by their name or "
             "definition (`taper_s`, `bandpass_hz`, `period_range` and the period lists "
             "and `{min, max, count}` tables in s).",
             "", "| dimension | SI unit (plain numbers with plain_numbers = \"SI\") |",
             "| --- | --- |"]
    for name, (_, si_unit) in DIMENSIONS.items():
        lines.append(f"| {name} | {si_unit} |")
    lines.append("")
    return lines


def render_reference() -> str:
    """The whole text of docs/project-file.md, generated from the registry."""
    lines = [
        "# Project file reference",
        "",
        "<!-- Generated by tools/gen_reference.py from sdofreport/project/schema.py; do not "
        "edit by hand. Run `python tools/gen_reference.py` after changing the registry. -->",
        "",
        "A project is one TOML file, by convention `sdofreport.toml`. Paths in it are "
        "relative to the file. Top-level sections: "
        + ", ".join(f"`{name}`" for name in schema.TOP_LEVEL) + ". "
        "An unknown key is an error that names it and suggests the nearest valid key; "
        "every problem in the file is reported at once. `sdofreport new DIR` writes a "
        "commented project that uses most sections; "
        "`site_examples/harbourview_cold_store/sdofreport.toml` uses all of them.",
        "",
        "Types: *text*; *number*; *integer*; *ratio* (a fraction, 0.05 for 5 %); "
        "*true or false*; "
        "*quantity* (see [Units of quantities](#units-of-quantities)); *choice* (one of "
        "the listed values); *list* (a TOML array); *table* (an inline or nested TOML "
        "table).",
        "",
    ]
    for name, keys in schema.SECTIONS.items():
        lines.extend(_section(name, keys))
        if name == "design_spectrum":
            lines.extend(_design_kinds())
        if name == "systems[]":
            lines.extend(_system_kinds())
    lines.extend(_dimensions())
    return "\n".join(lines).rstrip("\n") + "\n"


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--check", action="store_true",
                        help="Exit 1 when docs/project-file.md is out of date.")
    args = parser.parse_args(argv)
    text = render_reference()
    if args.check:
        current = TARGET.read_text(encoding="utf-8") if TARGET.exists() else ""
        if current != text:
            print(f"{TARGET} is out of date; run: python tools/gen_reference.py",
                  file=sys.stderr)
            return 1
        return 0
    TARGET.parent.mkdir(parents=True, exist_ok=True)
    TARGET.write_text(text, encoding="utf-8", newline="\n")
    print(f"Wrote {TARGET}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
