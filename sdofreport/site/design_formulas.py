"""The current editions' design spectra on the suite page: label, derived values and the
formula block a reviewer checks them against (ASCE/SEI 7-22, EN 1998-1-1:2024).

Every formula and coefficient shown here was written down from memory of the published
text (see :mod:`sdofreport.core.spectra_current`); the block says so.
"""

from __future__ import annotations

from sdofreport.core.spectra_current import (
    EN1998_1_1_RECOMMENDED,
    EN1998_1_1_SITE_FACTORS,
    en1998_1_1_parameters,
)

#: Labels of the current editions' keys (the older kinds' labels live in context.py).
KEY_LABELS = {
    "site_class": "site class (ASCE/SEI 7-22)", "site_category": "site category",
    "s_alpha_rp": "S_α,RP [g]", "s_beta_rp": "S_β,RP [g]",
    "f_alpha": "F_α (National Annex / site-specific, as given)",
    "f_beta": "F_β (National Annex / site-specific, as given)",
    "chi": "χ (National Annex, as given)",
    "plateau_ratio": "F_A (National Annex, as given)",
}

_MEMORY = "from memory: check against the published text"


def label(design) -> str | None:
    """A one-line label of the spectrum, or None for the older kinds."""
    values = design.values
    level = "design" if values.get("level") == "design" else "MCE_R"
    if design.kind == "asce7-22":
        form = (f"multi-period, {len(values['periods'])} ordinates"
                if "periods" in values else
                f"two-period, S_DS {values['sds']:g} g, S_D1 {values['sd1']:g} g, "
                f"T_L {values['tl']:g} s")
        return f"ASCE/SEI 7-22 {level} spectrum, site class {values['site_class']} ({form})"
    if design.kind == "en1998-1-1":
        return (f"EN 1998-1-1:2024 elastic spectrum (S_α,RP {values['s_alpha_rp']:g} g, "
                f"S_β,RP {values['s_beta_rp']:g} g, site category "
                f"{values['site_category']})")
    return None


def details(design) -> tuple[list[tuple[str, str]], list[str]]:
    """(derived values not given by the project, formula lines) of a current edition."""
    if design.kind == "asce7-22":
        return [], _asce7_22_formula(design)
    if design.kind == "en1998-1-1":
        return _en2024(design)
    return [], []


def _asce7_22_formula(design) -> list[str]:
    values = design.values
    level = values.get("level", "mce_r")
    lines = []
    if "periods" in values:
        lines += [
            "Multi-period MCE_R spectrum (§11.4.6, from memory): the ordinates (T_i, S_a,i) "
            "as given for the site class.",
            "S_a(T) = S_a,i + (S_a,i+1 − S_a,i)(T − T_i)/(T_i+1 − T_i) for T_i ≤ T ≤ T_i+1 "
            "(linear in T, §11.4.5.1, from memory).",
            "Beyond the last ordinate (T_n, S_a,n): S_a,n T_n/T" +
            (" up to T_L, S_a,n T_n T_L/T² beyond (the long-period branches of the "
             "two-period form, from memory)." if "tl" in values else
             " (no T_L given: our choice, no source)."),
        ]
    else:
        lines += [
            "Two-period design spectrum (§11.4.5.2, Eqs. 11.4-5 to 11.4-8, from memory), "
            "T_0 = 0.2 S_D1/S_DS, T_S = S_D1/S_DS:",
            "S_a = S_DS (0.4 + 0.6 T/T_0) for T < T_0; S_DS for T_0 ≤ T ≤ T_S; S_D1/T "
            "for T_S < T ≤ T_L; S_D1 T_L/T² for T > T_L.",
            "MCE_R spectrum (§11.4.6, from memory) = 1.5 × design, the same equations with "
            "S_MS = 1.5 S_DS and S_M1 = 1.5 S_D1.",
        ]
    if level == "design":
        lines.append("level = \"design\": 2/3 of the MCE_R spectrum (§11.4.5, from memory).")
    lines.append(f"All clause numbers and rules: {_MEMORY}.")
    return lines


def _en2024(design) -> tuple[list[tuple[str, str]], list[str]]:
    p = en1998_1_1_parameters(**design.parameters)
    category = str(design.values["site_category"]).upper()
    a, b, c, d = EN1998_1_1_SITE_FACTORS[category]
    rec = EN1998_1_1_RECOMMENDED
    rows = []
    if "f_alpha" not in p.given:
        rows.append((f"F_α = {a:g} (1 − {b:g} S_α,RP/g) (site category {category}, from "
                     f"memory)", f"{p.f_alpha:.4g}"))
    if "f_beta" not in p.given:
        rows.append((f"F_β = {c:g} (1 − {d:g} S_β,RP/g) (site category {category}, from "
                     f"memory)", f"{p.f_beta:.4g}"))
    if "chi" not in p.given:
        rows.append(("χ (recommended, from memory)", f"{rec['chi']:g}"))
    if "plateau_ratio" not in p.given:
        rows.append(("F_A (recommended, from memory)", f"{rec['plateau_ratio']:g}"))
    if "td_s" not in p.given:
        rows.append(("T_D [s] (recommended, from memory)", f"{rec['td_s']:g}"))
    rows += [("S_α = F_α S_α,RP [g]", f"{p.s_alpha_g:.4g}"),
             ("S_β = F_β S_β,RP [g]", f"{p.s_beta_g:.4g}"),
             ("T_C = S_β T_β / S_α [s]", f"{p.tc_s:.4g}"),
             ("T_B = χ T_C [s]", f"{p.tb_s:.4g}"),
             ("η = √(10/(5 + ξ)) ≥ 0.55", f"{p.eta:.4g}"),
             ("S_e(0) = S_α/F_A [g]", f"{p.zero_period_g:.4g}")]
    lines = [
        "EN 1998-1-1:2024 horizontal elastic spectrum (from memory), T_β = 1 s:",
        "S_e = S_α [1/F_A + (η − 1/F_A) T/T_B] for 0 ≤ T ≤ T_B; η S_α for T_B < T ≤ T_C;",
        "η S_β T_β/T for T_C < T ≤ T_D; η S_β T_β T_D/T² for T > T_D.",
        "S_α = F_α S_α,RP, S_β = F_β S_β,RP, T_C = S_β T_β/S_α, T_B = χ T_C; F_α, F_β, χ, "
        "F_A and T_D may be set by the National Annex (keys f_alpha, f_beta, chi, "
        "plateau_ratio, td).",
        f"Formula, site-factor table and recommended values: {_MEMORY}.",
    ]
    return rows, lines
