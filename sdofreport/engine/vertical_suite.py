"""The vertical records against the vertical target (``[design_spectrum.vertical]``).

No clause that sdofreport implements sets how vertical records are scaled, so the rule
is the project's choice, stated on the suite page as common practice (no source):

* the period range is ``[design_spectrum.vertical] period_range``, or 0.2 × the
  shortest to 2 × the longest period of the systems with ``direction = "vertical"``
  (the factors of the horizontal rules applied to the vertical periods), cut at 2 s for
  the ASCE/SEI 7-16 §11.9 spectrum, which is not defined beyond;
* each vertical record gets one factor, the log least-squares fit of its 5 %-damped PSA
  to the target over the range (:func:`sdofreport.core.scaling.scale_fit`):
  ``ln f = mean_j(ln S_target(T_j) − ln PSA(T_j))``, so the scaled record matches the
  target in the mean of the logarithms over the range;
* with ``[scaling] rule = "none"`` the records keep their factors as given and are only
  shown against the target.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from sdofreport.core import scaling as core_scaling
from sdofreport.core.units import G
from sdofreport.errors import ProjectError

#: Damping ratio of the vertical target and of the spectra fitted to it [-].
VERTICAL_DAMPING = 0.05

#: Longest period of the ASCE/SEI 7-16 §11.9 vertical spectrum (from memory) [s].
ASCE_VERTICAL_LIMIT_S = 2.0

#: The rule in words, for the suite page.
RULE_TEXT = ("each vertical record has one factor, the least-squares fit of ln PSA (5 % "
             "damping) to ln of the vertical target over the period range, ln f = "
             "mean(ln S_target − ln PSA): the scaled record matches the target in the "
             "mean of the logarithms over the range. No clause implemented here sets "
             "how vertical records are scaled; this rule and the period range are the "
             "project's choice (common practice, no source)")

#: The standard of each vertical kind, as text.
STANDARDS = {"en1998-1": "EN 1998-1:2004 §3.2.2.3 (Eqs. 3.8-3.11, Table 3.4)",
             "asce7-16": "ASCE/SEI 7-16 §11.9 (Eqs. 11.9-1 to 11.9-4, Table 11.9-1)"}


@dataclass
class VerticalScaling:
    """The vertical target, the vertical records' factors and their fit."""

    kind: str
    standard: str
    #: vertical record ids, in project order
    record_ids: list[str]
    #: record id -> factor applied on top of its ``scale`` (1 when not scaled)
    factors: dict[str, float]
    #: False with ``[scaling] rule = "none"``: factors as given, shown only
    scaled: bool
    period_range_s: tuple[float, float]
    period_range_text: str
    periods_s: np.ndarray
    #: the vertical target at ``periods_s`` [g] (NaN where undefined)
    target_sa_g: np.ndarray
    #: PSA at 5 % of each vertical record after its factor [g], shape (n, nT)
    spectra_g: np.ndarray
    #: suite mean / target at the periods in the range: lowest and highest [-]
    ratio_min: float
    ratio_max: float
    cautions: list[str] = field(default_factory=list)


def default_range(project) -> tuple[tuple[float, float], str]:
    """The fitting range [s] and its words (module docstring)."""
    given = project.design_spectrum.vertical.period_range_s
    if given is not None:
        return given, f"as given, {given[0]:g} s to {given[1]:g} s"
    periods = [s.period_s for s in project.systems if s.direction == "vertical"]
    return ((0.2 * min(periods), 2.0 * max(periods)),
            "0.2 × the shortest to 2 × the longest vertical system period (the project's "
            "choice: common practice, no source)")


def compute_vertical(project, spectra: dict, scaled: bool) -> VerticalScaling | None:
    """
    The vertical records fitted to the vertical target (module docstring).

    Parameters
    ----------
    project : Project
    spectra : dict
        Record id -> ResponseSpectrum (records at their given ``scale``), holding 5 %.
    scaled : bool
        False keeps every factor at 1 (``[scaling] rule = "none"``).

    Returns
    -------
    VerticalScaling or None
        None without vertical records or without a vertical target.
    """
    design = project.design_spectrum
    ids = [r.id for r in project.records if r.component == "V"]
    if not ids or design is None or design.vertical is None:
        return None
    vertical = design.vertical
    first = spectra[ids[0]]
    periods = np.asarray(first.periods_s, dtype=float)
    z = int(np.flatnonzero(np.abs(np.asarray(first.damping) - VERTICAL_DAMPING)
                           <= 1e-12)[0])
    psa = np.array([np.asarray(spectra[i].psa_m_s2[z]) / G for i in ids])
    target = np.asarray(vertical.sa_g(periods), dtype=float)
    (low, high), text = default_range(project)
    cautions = []
    if vertical.kind == "asce7-16" and high > ASCE_VERTICAL_LIMIT_S:
        cautions.append(f"The vertical period range reaches {high:.4g} s, beyond the 2 s "
                        f"to which ASCE/SEI 7-16 §11.9 defines the vertical spectrum (from "
                        f"memory; it asks for a site-specific procedure beyond): the fit "
                        f"uses {low:.4g} s to 2 s.")
        high = ASCE_VERTICAL_LIMIT_S
    inside = (periods >= low * (1 - 1e-9)) & (periods <= high * (1 + 1e-9))
    if np.count_nonzero(inside) < 2 or low >= high:
        raise ProjectError(
            f"{project.path.name}: [design_spectrum.vertical] period range {low:.4g} s "
            f"to {high:.4g} s holds fewer than 2 of the spectrum periods ([analysis] "
            f"periods); widen the range or the period grid")
    factors = np.ones(len(ids))
    if scaled:
        fit = core_scaling.scale_fit(periods[inside], psa[:, inside], target[inside],
                                     (periods[inside][0], periods[inside][-1]))
        factors = np.asarray(fit.factors, dtype=float)
    stack = psa * factors[:, None]
    ratio = np.mean(stack[:, inside], axis=0) / target[inside]
    return VerticalScaling(
        vertical.kind, STANDARDS[vertical.kind], ids,
        {i: float(f) for i, f in zip(ids, factors)}, scaled, (float(low), float(high)),
        text, periods, target, stack, float(ratio.min()), float(ratio.max()), cautions)


def attach_vertical(scaling, project, spectra: dict) -> None:
    """Compute the vertical scaling and put it and its factors on ``scaling``
    (:class:`sdofreport.engine.suite.SuiteScaling`), so the engine scales the vertical records
    and the vertical systems run under them."""
    found = compute_vertical(project, spectra, scaling.rule != "none")
    scaling.vertical = found
    if found is not None and found.scaled:
        scaling.factors.update(found.factors)


def rule_text(scaled: bool) -> str:
    """The rule in words, or that the records were only shown (rule "none")."""
    if scaled:
        return RULE_TEXT
    return ("[scaling] rule = \"none\": the vertical records keep their factors as given "
            "and are only shown against the vertical target")


def formula(kind: str) -> list[str]:
    """The vertical target's equations, for the suite page (from memory)."""
    if kind == "en1998-1":
        return ["EN 1998-1:2004 §3.2.2.3, Eqs. (3.8)-(3.11) (from memory): S_ve = a_vg "
                "[1 + T/T_B (3.0 η − 1)] for 0 ≤ T ≤ T_B; a_vg 3.0 η for T_B ≤ T ≤ T_C; "
                "a_vg 3.0 η T_C/T for T_C ≤ T ≤ T_D; a_vg 3.0 η T_C T_D/T² for T_D ≤ T ≤ "
                "4 s",
                "η = √(10/(5 + ξ)) ≥ 0.55 (Eq. 3.6) with ξ = 5 %: η = 1; no soil factor",
                "Table 3.4 recommended values (from memory): type 1 a_vg/a_g 0.90, "
                "type 2 0.45; T_B 0.05 s, T_C 0.15 s, T_D 1.0 s for both"]
    return ["ASCE/SEI 7-16 §11.9.2, Eqs. 11.9-1 to 11.9-4 (from memory): S_aMv = 0.3 C_v "
            "S_MS for T_v ≤ 0.025 s; 20 C_v S_MS (T_v − 0.025) + 0.3 C_v S_MS for "
            "0.025 < T_v ≤ 0.05 s; 0.8 C_v S_MS for 0.05 < T_v ≤ 0.15 s; 0.8 C_v S_MS "
            "(0.15/T_v)^0.75 for 0.15 < T_v ≤ 2.0 s; not defined beyond 2 s",
            "C_v from Table 11.9-1 (from memory), linear between the rows of S_MS "
            "(0.2, 0.3, 0.6, 1.0, ≥ 2.0 g): site class A-B 0.7, 0.8, 0.9, 0.9, 0.9; C "
            "0.7, 0.8, 1.0, 1.1, 1.3; D-F 0.7, 0.9, 1.1, 1.3, 1.5",
            "design vertical spectrum = 2/3 S_aMv (§11.9.3, from memory)"]
