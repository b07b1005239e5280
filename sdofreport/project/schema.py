"""The single registry of project-file sections and keys.

The loader validates against it, the documentation is generated from it and a test
checks that the two cannot drift. Each key states its type, its dimension (for values
that may carry units), whether it is required, its default and an example.
"""

from __future__ import annotations

from dataclasses import dataclass

from sdofreport.codes import EDITIONS, GENERIC_PERIOD_RANGES
from sdofreport.core.design_spectra import (
    ASCE7_16_LEVELS,
    DESIGN_SPECTRUM_KINDS,
    EN1998_1_GROUND_TYPES,
    EN1998_1_SPECTRUM_TYPES,
)
from sdofreport.core.hysteresis import HYSTERESIS_MODELS
from sdofreport.core.spectra import SPECTRUM_METHODS
from sdofreport.core.spectra_current import (
    ASCE7_22_SITE_CLASSES,
    EN1998_1_1_SITE_CATEGORIES,
)
from sdofreport.core.units import acceleration_unit_names
from sdofreport.core.vertical_spectra import VERTICAL_SITE_CLASSES, VERTICAL_SPECTRUM_KINDS
from sdofreport.project.check_quantities import CHECK_QUANTITIES
from sdofreport.records import RECORD_FORMATS

#: Ways the suite statistic may be chosen. ``auto``: the governing edition's rule
#: (:func:`sdofreport.codes.auto_statistic`), counting motions, not components.
STATISTICS = ("auto", "mean", "max")

#: Suite scaling rules: one per standard edition (sdofreport.codes), "fit" (common
#: practice) and "none" (factors as given).
SCALING_RULES = (*EDITIONS, "fit", "none")

#: Named period-range options (every rule offers these; see sdofreport.codes).
PERIOD_RANGE_OPTIONS = tuple(o.name for o in GENERIC_PERIOD_RANGES)

#: Levels of the ASCE/SEI 7-16 target: MCE_R (the Chapter 16 target) or design.
ASCE7_16_LEVEL_CHOICES = tuple(ASCE7_16_LEVELS)

#: Provenance keys of ``[[records]]`` in the order shown (all optional).
PROVENANCE_KEYS = ("event", "station", "magnitude", "distance_km", "vs30_m_s", "mechanism",
                   "source", "selection_note")

#: Plausible ranges of the numeric provenance keys: (lowest, highest, inclusive low).
PROVENANCE_RANGES = {"magnitude": (0.0, 10.0, True), "distance_km": (0.0, 20000.0, True),
                     "vs30_m_s": (0.0, 10000.0, False)}

#: Intensity measures of the fragility stripes (sdofreport.engine.jobs.stripe_job).
FRAGILITY_MEASURES = ("sa", "pga")

#: Components of a horizontal pair.
COMPONENTS = ("H1", "H2", "V")

#: Design-spectrum keys of the project file per kind: TOML key -> core parameter name.
DESIGN_SPECTRUM_KEYS: dict[str, dict[str, str]] = {
    "asce7-16": {"sds": "sds_g", "sd1": "sd1_g", "tl": "tl_s", "level": "level"},
    "en1998-1": {"agr": "agr_g", "importance_factor": "importance_factor",
                 "ground_type": "ground_type", "spectrum_type": "spectrum_type",
                 "damping": "damping", "soil_factor": "soil_factor", "tb": "tb_s",
                 "tc": "tc_s", "td": "td_s"},
    "asce7-22": {"site_class": "site_class", "level": "level", "periods": "mp_periods_s",
                 "sa": "mp_sa_g", "sds": "sds_g", "sd1": "sd1_g", "tl": "tl_s"},
    "en1998-1-1": {"s_alpha_rp": "s_alpha_rp_g", "s_beta_rp": "s_beta_rp_g",
                   "site_category": "site_category", "damping": "damping",
                   "f_alpha": "f_alpha", "f_beta": "f_beta", "chi": "chi", "td": "td_s",
                   "plateau_ratio": "plateau_ratio"},
    "table": {"periods": "table_periods_s", "sa": "table_sa_g"},
}

#: Design-spectrum keys each kind may leave out although they have no default
#: (National-Annex values; the other form of ASCE/SEI 7-22).
OPTIONAL_DESIGN_KEYS: dict[str, tuple[str, ...]] = {
    "en1998-1": ("soil_factor", "tb", "tc", "td"),
    "asce7-22": ("periods", "sa", "sds", "sd1", "tl"),
    "en1998-1-1": ("f_alpha", "f_beta", "chi", "td", "plateau_ratio"),
}

#: How a system may be described (the builders of sdofreport.core.builders).
SYSTEM_KINDS = ("lumped", "columns", "springs", "static-deflection", "sliding-pendulum",
                "hanging")

#: Keys of a yielding system with P-Δ and a supplemental damper (lumped, columns, springs).
_HYSTERETIC_KEYS = ("yield_strength", "yield_displacement", "post_yield_ratio",
                    "hysteresis", "unloading_exponent", "bouc_wen_exponent",
                    "bouc_wen_beta", "dissipation_ratio", "deterioration_capacity",
                    "deterioration_exponent", "p_delta", "gravity_load", "damper",
                    "property_factors")

#: Hysteresis-model parameters and the models each applies to.
HYSTERESIS_PARAMETER_KEYS: dict[str, tuple[str, ...]] = {
    "unloading_exponent": ("takeda",),
    "bouc_wen_exponent": ("bouc-wen",), "bouc_wen_beta": ("bouc-wen",),
    "dissipation_ratio": ("flag-shaped",),
    "deterioration_capacity": ("clough", "takeda"),
    "deterioration_exponent": ("clough", "takeda"),
}

#: Keys each system kind reads besides id, name, kind, damping, height and limits.
SYSTEM_KIND_KEYS: dict[str, tuple[tuple[str, ...], tuple[str, ...]]] = {
    # kind: (required, optional)
    "lumped": ((), ("mass", "stiffness", "period") + _HYSTERETIC_KEYS),
    "columns": (("count", "elastic_modulus", "second_moment", "height", "end_condition",
                 "mass"), _HYSTERETIC_KEYS),
    "springs": (("network", "mass"), _HYSTERETIC_KEYS),
    "static-deflection": (("weight", "deflection"), ()),
    "sliding-pendulum": (("weight", "radius", "friction"), ("slip_displacement",
                                                            "damper", "friction_slow",
                                                            "friction_rate",
                                                            "property_factors")),
    "hanging": (("mass", "pivot_inertia", "pivot_to_centre"), ()),
}

#: Unit systems the pages may be shown in (results.json always stays SI).
DISPLAY_UNITS = ("SI", "US")

#: What a bare number for a dimensional key (type "quantity") may mean: only SI, and
#: only when the project says so; otherwise it is refused.
PLAIN_NUMBERS = ("SI",)


@dataclass(frozen=True)
class KeySpec:
    """One project-file key: how to read it and how to document it."""

    name: str
    type: str  # text | path | number | integer | ratio | quantity | choice | list | table
    #            | boolean
    description: str
    required: bool = False
    default: object = None
    dimension: str | None = None  # for quantities: a key of quantities.DIMENSIONS
    choices: tuple | None = None
    example: str = ""


def _keys(*specs: KeySpec) -> dict[str, KeySpec]:
    return {spec.name: spec for spec in specs}


_PROCESSING_KEYS = _keys(
    KeySpec("baseline_order", "integer", "Order (0-3) of the least-squares polynomial "
            "removed as baseline correction (Boore & Bommer 2005). Omit for none.",
            example="1"),
    KeySpec("bandpass_hz", "list", "Corner frequencies [low, high] of the acausal "
            "Butterworth band-pass with zero pads (Boore 2005), in Hz. Omit for none.",
            example="[0.1, 25.0]"),
    KeySpec("filter_order", "integer", "Order of the Butterworth band-pass.", default=4,
            example="4"),
    KeySpec("taper_s", "number", "Length of the cosine taper at each end, in s. Omit "
            "for none.", example="0.5"),
)

SECTIONS: dict[str, dict[str, KeySpec]] = {
    "project": _keys(
        KeySpec("title", "text", "Title shown on every page.", required=True,
                example='"Harbourview Cold Store - seismic checks"'),
        KeySpec("reference", "text", "Job number or reference.", required=True,
                example='"KB-2291"'),
        KeySpec("revision", "text", "Revision of this run.", required=True, example='"B"'),
        KeySpec("prepared_by", "text", "Who prepared the run.", required=True,
                example='"A. Engineer"'),
        KeySpec("prepared_date", "text", "Date (YYYY-MM-DD) the run was prepared, for "
                "the sign-off block (optional).", example='"2026-11-28"'),
        KeySpec("checked_by", "text", "Who checked it (optional).", example='"B. Checker"'),
        KeySpec("checked_date", "text", "Date (YYYY-MM-DD) it was checked (optional).",
                example='"2026-11-29"'),
        KeySpec("approved_by", "text", "Who approved the document for issue (optional). "
                "This signs off the document, not the structure: the verdicts stay "
                "checks of stated limits.", example='"C. Approver"'),
        KeySpec("approved_date", "text", "Date (YYYY-MM-DD) of that approval (optional).",
                example='"2026-11-30"'),
        KeySpec("date", "text", "Date printed on the pages (optional; otherwise taken "
                "from SOURCE_DATE_EPOCH, else omitted).", example='"2026-11-30"'),
        KeySpec("notes", "path", "Markdown file rendered on the summary page, relative "
                "to the project file (optional).", example='"notes.md"'),
        KeySpec("revisions", "list", "Revision history, one `[[project.revisions]]` "
                "table per issue with `revision`, `date` (YYYY-MM-DD), `description` and "
                "`by` (all text; revision required); shown on the summary page and in the "
                "review packet, oldest first (optional).",
                example='[{ revision = "A", date = "2026-11-02", description = "First '
                        'issue", by = "A. Engineer" }]'),
        KeySpec("display_units", "choice", "Units shown on the pages: SI (mm, kN, m/s², "
                "g) or US customary (in, kip, in/s², g). results.json stays SI.",
                default="SI", choices=DISPLAY_UNITS, example='"SI"'),
        KeySpec("plain_numbers", "choice", "Omit it, and every dimensional value (a key "
                "whose type is quantity) must be text with its unit (mass = \"6 t\"): "
                "a bare number is an error. State \"SI\" to read bare numbers for those "
                "keys in SI units (kg, m, s, N, N/m, Pa, m/s²); the provenance on the summary "
                "page then says so. Ratios, factors and the keys defined in g or "
                "with their unit in the name (damping, post_yield_ratio, friction, "
                "drift_ratio, ductility, sds, sd1, agr, scale, suite_factor, taper_s, "
                "bandpass_hz, the period lists and ranges, given in seconds) are plain numbers in "
                "either case.",
                choices=PLAIN_NUMBERS, example='"SI"'),
    ),
    "analysis": _keys(
        KeySpec("method", "choice", "Integration method for spectra and histories.",
                default="exact", choices=SPECTRUM_METHODS, example='"exact"'),
        KeySpec("damping", "list", "Damping ratios of the response spectra (fractions "
                "of critical, 0 <= value < 1).", default=[0.05], example="[0.02, 0.05]"),
        KeySpec("periods", "table", "Spectrum periods: {min, max, count} log-spaced, "
                "in s, or an explicit list.", default={"min": 0.01, "max": 10.0,
                                                        "count": 200},
                example="{ min = 0.02, max = 5.0, count = 120 }"),
        KeySpec("statistic", "choice", "Suite statistic of the demands: auto = the rule "
                "of the governing edition, counting motions (a horizontal pair is one): "
                "asce7-16 the mean (ASCE/SEI 7-16 §16.4); en1998-1 and rules naming no "
                "standard the mean with 7 or more motions, otherwise the maximum "
                "(EN 1998-1:2004 §4.3.3.4.3(3)); clause numbers from memory.",
                default="auto", choices=STATISTICS, example='"auto"'),
    ),
    "processing": _PROCESSING_KEYS,
    "design_spectrum": _keys(
        KeySpec("kind", "choice", "Which design spectrum: ASCE/SEI 7-16 §11.4.6, "
                "ASCE/SEI 7-22 (multi-period ordinates or the two-period form), "
                "EN 1998-1:2004 §3.2.2.2, EN 1998-1-1:2024, or a table of (T, Sa) points "
                "for any other code.",
                required=True, choices=DESIGN_SPECTRUM_KINDS, example='"asce7-22"'),
        KeySpec("sds", "number", "asce7-16, asce7-22 (two-period form): S_DS, design "
                "short-period spectral acceleration, in g.", example="1.0"),
        KeySpec("sd1", "number", "asce7-16, asce7-22 (two-period form): S_D1, design 1-s "
                "spectral acceleration, in g.", example="0.6"),
        KeySpec("tl", "quantity", "asce7-16, asce7-22: long-period transition period T_L "
                "(asce7-22 multi-period: optional, the decay beyond the last ordinate).",
                dimension="time", example='"8 s"'),
        KeySpec("level", "choice", "asce7-16, asce7-22: the MCE_R spectrum (the target of "
                "Chapter 16, §16.2.1, from memory; asce7-16: 1.5 × design; asce7-22: the "
                "ordinates as given, or 1.5 × the two-period design spectrum) or the "
                "design spectrum (2/3 of MCE_R); with level = \"design\" the pages caution "
                "that the suite is not scaled to the chapter's target. \"mce\" is an "
                "older spelling of \"mce_r\".",
                default="mce_r", choices=ASCE7_16_LEVEL_CHOICES, example='"mce_r"'),
        KeySpec("site_class", "choice", "asce7-22: site class of ASCE/SEI 7-22 §20.2 "
                "(from memory), including BC, CD and DE; \"default\" for default site "
                "conditions (§11.4.3). Shown on the pages; the ordinates or S_DS, S_D1 "
                "carry its effect. Site class F needs a site response analysis: give "
                "that spectrum as kind = \"table\".", choices=ASCE7_22_SITE_CLASSES,
                example='"CD"'),
        KeySpec("agr", "number", "en1998-1: reference peak ground acceleration a_gR on "
                "ground type A, in g.", example="0.25"),
        KeySpec("importance_factor", "number", "en1998-1: importance factor γ_I.",
                default=1.0, example="1.0"),
        KeySpec("ground_type", "choice", "en1998-1: ground type (Tables 3.2/3.3).",
                choices=EN1998_1_GROUND_TYPES, example='"B"'),
        KeySpec("spectrum_type", "choice", "en1998-1: spectrum type 1 or 2.",
                choices=EN1998_1_SPECTRUM_TYPES, example="1"),
        KeySpec("damping", "ratio", "en1998-1, en1998-1-1: viscous damping ratio for η "
                "(EN 1998-1:2004 Eq. 3.6).", default=0.05, example="0.05"),
        KeySpec("soil_factor", "number", "en1998-1: National-Annex soil factor S "
                "(default: the recommended value of Table 3.2/3.3, from memory); shown "
                "as a National-Annex value.", example="1.2"),
        KeySpec("tb", "quantity", "en1998-1: National-Annex T_B (default: Table 3.2/3.3).",
                dimension="time", example='"0.15 s"'),
        KeySpec("tc", "quantity", "en1998-1: National-Annex T_C (default: Table 3.2/3.3).",
                dimension="time", example='"0.5 s"'),
        KeySpec("td", "quantity", "en1998-1: National-Annex T_D (default: Table 3.2/3.3); "
                "en1998-1-1: National-Annex T_D (default 2 s, recommended value from "
                "memory).", dimension="time", example='"2 s"'),
        KeySpec("s_alpha_rp", "number", "en1998-1-1: S_alpha,RP, reference spectral "
                "acceleration of the plateau on site category A at the return period, in "
                "g.", example="0.6"),
        KeySpec("s_beta_rp", "number", "en1998-1-1: S_beta,RP, reference spectral "
                "acceleration at T_beta = 1 s on site category A, in g.", example="0.2"),
        KeySpec("site_category", "choice", "en1998-1-1: site category A to F "
                "(EN 1998-1-1:2024 §5.1, from memory).",
                choices=EN1998_1_1_SITE_CATEGORIES, example='"C"'),
        KeySpec("f_alpha", "number", "en1998-1-1: National-Annex or site-specific site "
                "factor F_alpha (default: the table value, from memory).", example="1.4"),
        KeySpec("f_beta", "number", "en1998-1-1: National-Annex or site-specific site "
                "factor F_beta (default: the table value, from memory).", example="2.0"),
        KeySpec("chi", "number", "en1998-1-1: National-Annex χ in T_B = χ T_C (default "
                "0.25, recommended value from memory).", example="0.25"),
        KeySpec("plateau_ratio", "number", "en1998-1-1: National-Annex F_A, ratio of the "
                "plateau to the zero-period value (default 2.5, from memory).",
                example="2.5"),
        KeySpec("periods", "list", "table: periods of the points, in s; asce7-22: the "
                "periods of the multi-period MCE_R ordinates, from 0 s, increasing.",
                example="[0.0, 0.2, 1.0, 4.0]"),
        KeySpec("sa", "list", "table: spectral accelerations of the points, in g; "
                "asce7-22: the multi-period MCE_R ordinates as copied from the official "
                "source for the site class, in g.", example="[0.4, 1.0, 0.5, 0.1]"),
        KeySpec("vertical", "table", "The vertical target, written as the table "
                "[design_spectrum.vertical] (see that section): vertical records "
                "(component = \"V\") are scaled to it and shown against it, and the "
                "vertical systems run under the scaled records. Without it vertical "
                "records are used as given and the suite page says no vertical target "
                "was given.", example='{ kind = "en1998-1", spectrum_type = 1 }'),
    ),
    "design_spectrum.vertical": _keys(
        KeySpec("kind", "choice", "Which vertical spectrum: EN 1998-1:2004 §3.2.2.3 "
                "(Eqs. 3.8-3.11, Table 3.4) or ASCE/SEI 7-16 §11.9 (Eqs. 11.9-1 to "
                "11.9-4, Table 11.9-1); table values and clause numbers from memory.",
                required=True, choices=VERTICAL_SPECTRUM_KINDS, example='"en1998-1"'),
        KeySpec("spectrum_type", "choice", "en1998-1: spectrum type 1 or 2 of Table 3.4 "
                "(default: the horizontal en1998-1 spectrum's type).",
                choices=EN1998_1_SPECTRUM_TYPES, example="1"),
        KeySpec("avg", "number", "en1998-1: design vertical ground acceleration a_vg, in "
                "g (default: a_vg/a_g of Table 3.4, 0.90 for type 1 and 0.45 for type 2, "
                "from memory, times a_g = γ_I a_gR of the horizontal en1998-1 spectrum).",
                example="0.3"),
        KeySpec("tb", "quantity", "en1998-1: National-Annex T_B (default 0.05 s, Table "
                "3.4, from memory).", dimension="time", example='"0.05 s"'),
        KeySpec("tc", "quantity", "en1998-1: National-Annex T_C (default 0.15 s).",
                dimension="time", example='"0.15 s"'),
        KeySpec("td", "quantity", "en1998-1: National-Annex T_D (default 1.0 s).",
                dimension="time", example='"1 s"'),
        KeySpec("sms", "number", "asce7-16: S_MS, MCE_R short-period spectral "
                "acceleration, in g (default: 1.5 × sds of the horizontal asce7-16 "
                "spectrum, S_DS = 2/3 S_MS, §11.4.5, from memory).", example="1.5"),
        KeySpec("site_class", "choice", "asce7-16: site class A to F for C_v of Table "
                "11.9-1 (from memory).", choices=VERTICAL_SITE_CLASSES, example='"D"'),
        KeySpec("level", "choice", "asce7-16: the MCE_R vertical spectrum S_aMv or the "
                "design one, 2/3 of it (§11.9.3, from memory); default: the level of the "
                "horizontal asce7-16 spectrum, otherwise mce_r.",
                choices=("mce_r", "design"), example='"mce_r"'),
        KeySpec("period_range", "list", "[low, high] periods in s over which each "
                "vertical record is fitted to the vertical target (default: 0.2 × the "
                "shortest to 2 × the longest period of the systems with direction = "
                "\"vertical\"; no clause sets a vertical range here, so this is the "
                "project's choice: common practice, no source). asce7-16 defines the "
                "spectrum up to 2 s only; the range is cut there, with a caution.",
                example="[0.05, 0.6]"),
    ),
    "scaling": _keys(
        KeySpec("rule", "choice", "Suite scaling rule: " + "; ".join(
                    f"{e.rule} ({e.standard})" for e in EDITIONS.values()) +
                "; fit (per-record log least squares, common practice) or none (factors "
                "as given).", default="none", choices=SCALING_RULES, example='"asce7-16"'),
        KeySpec("period", "quantity", "Governing period T for the period range (default: "
                "the range covers every system, 0.2 × shortest to 2 × longest).",
                dimension="time", example='"0.8 s"'),
        KeySpec("period_range", "list", "Period range of the scaling: a named option, "
                "\"governing-period\" (0.2 T to 2 T of period) or \"every-system\" "
                "(0.2 × the shortest to 2 × the longest system period), or explicit "
                "[low, high] in s; with rule asce7-16 or asce7-22 also \"isolated-system\" "
                "(0.75 T_M at the upper-bound to 1.25 T_M at the lower-bound properties "
                "of the isolator system, see isolator, or T_M = period at both ends; "
                "ASCE/SEI 7-16/7-22 §17.3.3, from memory). Default: "
                "governing-period when period is given, otherwise every-system.",
                example='"every-system"'),
        KeySpec("isolator", "text", "period_range = \"isolated-system\": id of the "
                "isolator system (a sliding pendulum, or a bilinear system) whose "
                "effective period T_M at the maximum displacement is computed at its "
                "upper-bound properties (for 0.75 T_M) and at its lower-bound properties "
                "(for 1.25 T_M) from property_factors and the MCE_R target (ASCE/SEI "
                "7-16/7-22 §17.3.3, §17.5.3, from memory). Default: the project's only "
                "isolator system when [scaling] period is not given; with period and no "
                "isolator, T_M = period at both ends.", example='"fps"'),
        KeySpec("suite_factor", "number", "fit: one factor applied on top of the "
                "per-record factors.", default=1.0, example="1.0"),
        KeySpec("beyond_usable", "choice", "Spectral ordinates beyond a record's usable "
                "period, 1/(1.25 × its high-pass corner) (NGA-West2 rule, Ancheta et al. "
                "2014, from memory; common practice): \"exclude\" cuts the scaling "
                "period range at the shortest usable period of the suite, with a caution; "
                "\"include\" keeps them, with a caution.", default="exclude",
                choices=("exclude", "include"), example='"exclude"'),
    ),
    "synthetic_records": _keys(
        KeySpec("count", "integer", "Number of spectrum-compatible records to make "
                "(Gasparini & Vanmarcke 1976) when no [[records]] are given.", default=7,
                example="7"),
        KeySpec("duration", "quantity", "Duration of each record.", dimension="time",
                default=20.0, example='"20 s"'),
        KeySpec("dt", "quantity", "Time step.", dimension="time", default=0.01,
                example='"0.01 s"'),
        KeySpec("seed", "integer", "Seed of the first record; record i uses seed + i.",
                default=1, example="1"),
        KeySpec("envelope", "choice", "Amplitude envelope.", default="saragoni-hart",
                choices=("saragoni-hart", "trapezoidal"), example='"saragoni-hart"'),
        KeySpec("period_range", "list", "[low, high] periods matched, in s (default "
                "0.05–4 s).", example="[0.05, 4.0]"),
    ),
    "inelastic_spectra": _keys(
        KeySpec("ductility", "list", "Target ductilities μ of the constant-ductility "
                "spectra (strength found by bisection).", default=[2.0, 4.0, 6.0],
                example="[2, 4, 6]"),
        KeySpec("strength_reduction", "list", "Strength reduction factors R of the "
                "constant-strength spectra.", default=[2.0, 4.0], example="[2, 4]"),
        KeySpec("periods", "table", "Periods: {min, max, count} log-spaced, in s.",
                default={"min": 0.05, "max": 3.0, "count": 30},
                example="{ min = 0.05, max = 3.0, count = 30 }"),
        KeySpec("damping", "ratio", "Damping ratio.", default=0.05, example="0.05"),
        KeySpec("post_yield_ratio", "ratio", "Post-yield stiffness ratio α.",
                default=0.0, example="0.0"),
        KeySpec("steps_per_period", "number", "Fewest integration steps per initial "
                "period, at least 4. The bilinear system is integrated exactly between "
                "yield events, so this only bounds the step in which events and peaks are "
                "looked for; the elastic force matches the exact elastic spectrum to "
                "round-off at any setting.", default=8.0, example="8"),
    ),
    "fragility": _keys(
        KeySpec("levels", "list", "Intensity levels of the multiple-stripe analysis, in g "
                "(at least 2; sorted): each record of the scaled suite is scaled again so "
                "its measure equals each level, and every listed system is run at each "
                "level (Baker 2015, Earthquake Spectra 31(1)).", required=True,
                example="[0.1, 0.2, 0.3, 0.45, 0.6]"),
        KeySpec("measure", "choice", "Intensity measure: sa, the "
                "pseudo-spectral acceleration at the system's own period and damping; "
                "pga, the peak ground acceleration.", default="sa",
                choices=FRAGILITY_MEASURES, example='"sa"'),
        KeySpec("systems", "list", "Ids of the systems to run (default: every system "
                "with limits).", example='["pier"]'),
        KeySpec("design_level", "number", "Level at which the probability of exceeding "
                "each limit is stated, in g (default: the target spectrum at the "
                "system's period, or at T = 0 for pga).", example="0.42"),
    ),
    "records[]": _keys(
        KeySpec("id", "text", "Unique short name of the record; it names files, so letters, "
                "digits, '-', '_' or '.', starting and ending with a letter or digit, "
                "unique regardless of case.", required=True,
                example='"rec01"'),
        KeySpec("file", "path", "Record file, relative to the project file.",
                required=True, example='"records/rec01.txt"'),
        KeySpec("format", "choice", "File layout.", default="auto", choices=RECORD_FORMATS,
                example='"auto"'),
        KeySpec("units", "choice", "Units of the acceleration values.", default="g",
                choices=tuple(acceleration_unit_names()), example='"g"'),
        KeySpec("dt", "quantity", "Time step, for files that do not state it.",
                dimension="time", example='"0.01 s"'),
        KeySpec("scale", "number", "Amplitude scale factor applied to the record.",
                default=1.0, example="1.25"),
        KeySpec("processing", "table", "Per-record overrides of [processing].",
                example="{ baseline_order = 1 }"),
        KeySpec("pair", "text", "Name of the horizontal pair this record belongs to "
                "(two records share it, one H1 and one H2); it names a figure file, so "
                "the same characters as an id.", example='"p1"'),
        KeySpec("component", "choice", "Component: H1 or H2 of a horizontal pair (with "
                "pair), or V for a vertical record (without pair; not scaled by the "
                "suite rule, drives only systems with direction = \"vertical\").",
                choices=COMPONENTS,
                example='"H1"'),
        KeySpec("amplitude_ok", "boolean", "Acknowledges an amplitude the build would "
                "otherwise stop at: a PGA after scaling above 4 g or below 0.001 g, or a "
                "file header that states a unit other than units. Set it only after "
                "checking the record.", default=False, example="true"),
        # provenance (all optional; shown on the record and suite pages and in
        # results.json records[].provenance)
        KeySpec("event", "text", "Provenance: the earthquake (name, date).",
                example='"Invented Valley earthquake, 2031-04-02"'),
        KeySpec("station", "text", "Provenance: the recording station.",
                example='"Station VLY-03"'),
        KeySpec("magnitude", "number", "Provenance: moment magnitude M_w (0 to 10).",
                example="6.7"),
        KeySpec("distance_km", "number", "Provenance: source-to-site distance in km "
                "(state the measure, e.g. R_rup, in selection_note).", example="12.5"),
        KeySpec("vs30_m_s", "number", "Provenance: time-averaged shear-wave velocity of "
                "the top 30 m at the station, in m/s.", example="360"),
        KeySpec("mechanism", "text", "Provenance: faulting mechanism.",
                example='"reverse"'),
        KeySpec("source", "text", "Provenance: database and record identifier, or DOI.",
                example='"Example database, record 0042"'),
        KeySpec("selection_note", "text", "Provenance: why this record was selected.",
                example='"magnitude and distance near the deaggregation mode"'),
    ),
    "records[].processing": _PROCESSING_KEYS,
    "systems[]": _keys(
        KeySpec("id", "text", "Unique short name of the system; it names files, so letters, "
                "digits, '-', '_' or '.', starting and ending with a letter or digit, "
                "unique regardless of case.", required=True,
                example='"frame"'),
        KeySpec("name", "text", "Descriptive name.", required=True,
                example='"Cold-store portal frame"'),
        KeySpec("kind", "choice", "How the system is described: lumped (mass with "
                "stiffness or period), columns, springs, static-deflection, "
                "sliding-pendulum or hanging.", default="lumped", choices=SYSTEM_KINDS,
                example='"columns"'),
        KeySpec("damping", "ratio", "Damping ratio (fraction of critical).", required=True,
                example="0.05"),
        KeySpec("mass", "quantity", "Mass (lumped, columns, springs, hanging).",
                dimension="mass", example='"120 t"'),
        KeySpec("stiffness", "quantity", "Lateral stiffness.", dimension="stiffness",
                example='"4.2 MN/m"'),
        KeySpec("period", "quantity", "Natural period.", dimension="time",
                example='"0.35 s"'),
        KeySpec("height", "quantity", "Height used for the drift ratio (columns: the "
                "column height).", dimension="length", example='"6 m"'),
        KeySpec("count", "integer", "columns: number of columns.", example="4"),
        KeySpec("elastic_modulus", "quantity", "columns: Young's modulus E.",
                dimension="pressure", example='"200 GPa"'),
        KeySpec("second_moment", "quantity", "columns: second moment of area I of one "
                "column about the bending axis.", dimension="second_moment",
                example='"8.36e-5 m**4"'),
        KeySpec("end_condition", "choice", "columns: fixed-fixed (both ends fixed "
                "against rotation, 12EI/h³) or fixed-pinned (one end pinned, 3EI/h³).",
                choices=("fixed-fixed", "fixed-pinned"), example='"fixed-fixed"'),
        KeySpec("network", "table", "springs: a spring network; a node is {k = ...}, "
                "{series = [nodes]} or {parallel = [nodes]}.",
                example='{ series = [{ k = "80 MN/m" }, { parallel = [{ k = "3 MN/m" }, '
                        '{ k = "3 MN/m" }] }] }'),
        KeySpec("weight", "quantity", "static-deflection, sliding-pendulum: supported "
                "weight W.", dimension="force", example='"850 kN"'),
        KeySpec("deflection", "quantity", "static-deflection: static deflection δ under "
                "the weight.", dimension="length", example='"12 mm"'),
        KeySpec("radius", "quantity", "sliding-pendulum: effective radius R of the "
                "curved sliding surface.", dimension="length", example='"2.2 m"'),
        KeySpec("friction", "ratio", "sliding-pendulum: friction coefficient μ.",
                example="0.06"),
        KeySpec("slip_displacement", "quantity", "sliding-pendulum: elastic displacement "
                "before sliding, which regularises friction (default 0.25 mm: common "
                "practice, no source).", dimension="length", default=0.25e-3,
                example='"0.25 mm"'),
        KeySpec("friction_slow", "ratio", "sliding-pendulum: friction coefficient at "
                "very low sliding speed μ_slow; with it friction depends on the speed, "
                "μ = μ_fast − (μ_fast − μ_slow)·exp(−a|v|) with μ_fast = friction "
                "(Constantinou, Mokha & Reinhorn 1990). Needs friction_rate.",
                example="0.03"),
        KeySpec("friction_rate", "quantity", "sliding-pendulum: rate parameter a of the "
                "velocity-dependent friction (for example \"20 s/m\").",
                dimension="slowness", example='"20 s/m"'),
        KeySpec("property_factors", "list", "sliding-pendulum, and a bilinear yielding "
                "system used as an isolator (hysteresis = \"bilinear\"): [lower, upper] "
                "property modification factors for the lower- and upper-bound analyses "
                "beside the nominal one: the friction coefficients, or the characteristic "
                "strength Q_d = (1 − α) F_y and the post-yield stiffness k_d = α k (the "
                "elastic stiffness kept), are multiplied by each factor; each check takes "
                "the governing run (ASCE/SEI 7-16 §17.2.8.4, from memory).",
                example="[0.8, 1.3]"),
        KeySpec("pivot_inertia", "quantity", "hanging: moment of inertia about the pivot.",
                dimension="inertia", example='"2400 kg*m**2"'),
        KeySpec("pivot_to_centre", "quantity", "hanging: distance from the pivot to the "
                "centre of mass.", dimension="length", example='"1.5 m"'),
        KeySpec("yield_strength", "quantity", "Yielding system: yield strength F_y "
                "(or give yield_displacement).", dimension="force", example='"300 kN"'),
        KeySpec("yield_displacement", "quantity", "Yielding system: yield "
                "displacement u_y.", dimension="length", example='"25 mm"'),
        KeySpec("post_yield_ratio", "ratio", "Yielding system: post-yield stiffness "
                "ratio α (0 = elastic-perfectly plastic).", default=0.0, example="0.03"),
        KeySpec("hysteresis", "choice", "Hysteresis model of a yielding system: bilinear "
                "(kinematic hardening), clough (peak-oriented stiffness degradation, Clough "
                "& Johnston 1966), takeda (Takeda, Sozen & Nielsen 1970, bilinear "
                "backbone), bouc-wen (smooth, Wen 1976) or flag-shaped (self-centring, "
                "Christopoulos et al. 2002). All share k, F_y and α.", default="bilinear",
                choices=HYSTERESIS_MODELS, example='"takeda"'),
        KeySpec("unloading_exponent", "number", "takeda: exponent β of the unloading "
                "stiffness k (u_y/u_max)^β, 0 to 1 (0.4 in Takeda et al. 1970, from "
                "memory).", default=0.4, example="0.4"),
        KeySpec("bouc_wen_exponent", "number", "bouc-wen: smoothness exponent n, 1 to 200 "
                "(large n approaches bilinear).", default=2.0, example="2"),
        KeySpec("bouc_wen_beta", "number", "bouc-wen: shape parameter β, 0.5 to 1, with A "
                "= 1 and γ = 1 − β (β = γ = 0.5 is usual).", default=0.5, example="0.5"),
        KeySpec("dissipation_ratio", "number", "flag-shaped: energy-dissipation ratio β_E, "
                "0 (nonlinear elastic) to 1 (unloading branch through the origin).",
                default=1.0, example="0.8"),
        KeySpec("deterioration_capacity", "number", "clough, takeda: cyclic deterioration "
                "(Ibarra, Medina & Krawinkler 2005) with the hysteretic energy capacity "
                "E_t = λ·F_y·u_y; λ > 0 (omit for none). Strength, hardening and unloading "
                "stiffness scale by 1 − β_i at each zero-force crossing.", example="80"),
        KeySpec("deterioration_exponent", "number", "clough, takeda: exponent c of "
                "β_i = (E_i/(E_t − ΣE_j))^c, above 0 and at most 10.", default=1.0,
                example="1.0"),
        KeySpec("p_delta", "boolean", "P-Δ: the gravity load W on the height h adds the "
                "stiffness −W/h to every branch. Default: on when the system has a height, "
                "a mass and a stiffness (lumped, columns, springs).", example="true"),
        KeySpec("gravity_load", "quantity", "P-Δ: gravity load W carried on the height "
                "(default W = m·g).", dimension="force", example='"650 kN"'),
        KeySpec("damper", "table", "Supplemental viscous damper F = C·|v|^α·sign(v): "
                "coefficient C, text with units such as \"120 kN*s/m\" (a bare number "
                "in N·(s/m)^α only with plain_numbers = \"SI\"), and exponent α "
                "(0 < α <= 2; 1 is linear).",
                example='{ coefficient = "40 kN*(s/m)**0.5", exponent = 0.5 }'),
        KeySpec("direction", "choice", "horizontal (driven by the horizontal records) "
                "or vertical (for example equipment on springs or a hanging item moving "
                "up and down: driven by the component = \"V\" records only).",
                default="horizontal", choices=("horizontal", "vertical"),
                example='"vertical"'),
        KeySpec("directions", "integer", "1: each record drives its own one-direction "
                "oscillator; 2: each horizontal pair drives one isotropic oscillator in "
                "both directions and the peaks are of the resultant (needs every record "
                "in a pair; every kind and model, see the methods).", default=1,
                example="2"),
        KeySpec("limits", "table", "Limits checked against the demands.",
                example="{ displacement = \"40 mm\" }"),
    ),
    # One key per check quantity, from the one registry of them.
    "systems[].limits": _keys(*(KeySpec(q.key, q.key_type, q.description,
                                        dimension=q.dimension, example=q.example)
                                for q in CHECK_QUANTITIES.values())),
}

#: Top-level tables and arrays of tables of the project file.
TOP_LEVEL = ("project", "analysis", "processing", "design_spectrum", "scaling",
             "synthetic_records", "inelastic_spectra", "fragility", "records", "systems")
