"""
ASCE/SEI 7-22 Chapter 16 (nonlinear response history analysis): the record-suite rules.

Everything below was written down **from memory** of the published text [1]_ and is
marked so on the pages; check it against the standard before relying on it:

* §16.2.1: the target spectrum is the MCE_R response spectrum of §11.4.6, in 7-22 the
  multi-period MCE_R spectrum for the site class (or the two-period form, 1.5 × the
  §11.4.5.2 design spectrum, or a site-specific spectrum); 5 %-damped.
* §16.2.2: not less than eleven ground motions; each motion a pair of horizontal
  components (a pair is one motion).
* §16.2.3.1 / §16.2.1: period range T_lower to T_upper, T_upper at least twice the
  largest first-mode period, T_lower not above the period reaching 90 % mass
  participation nor 20 % of the smallest first-mode period. For one oscillator of
  period T (all its mass in its one mode): 0.2 T to 2 T.
* §16.2.3.2: amplitude scaling; the mean of the maximum-direction (RotD100) spectra of
  the suite is not below 90 % of the target over the period range. (The 7-22 wording of
  this criterion differs from 7-16 in detail; we apply the 90 % form, from memory.)
* §16.4: acceptance reads the mean of the responses to the suite.

References
----------
.. [1] ASCE/SEI 7-22, *Minimum Design Loads and Associated Criteria for Buildings and
   Other Structures*. Reston, VA, USA: ASCE, 2022, §11.4.5, §11.4.6, Chapter 16.
"""

from __future__ import annotations

import dataclasses

from sdofreport.codes import asce7_16
from sdofreport.codes._edition import ScalingInputs, period_range_options

#: Edition and chapter, as text.
STANDARD = "ASCE/SEI 7-22 Chapter 16"

#: Target levels: the chapter's own (MCE_R, §16.2.1, from memory) first.
TARGET_LEVELS = ("mce_r", "design")

#: Damping ratio of the target spectrum (§11.4 spectra are 5 %-damped; from memory).
TARGET_DAMPING = 0.05

#: Minimum number of ground motions (§16.2.2, from memory).
MINIMUM_MOTIONS = 11

#: Required ratio of the suite-mean RotD100 spectrum to the target (§16.2.3.2, memory).
REQUIRED_RATIO = 0.90

_MINIMUM_CLAUSE = "ASCE/SEI 7-22 §16.2.2 (from memory)"
_AMPLITUDE_CLAUSE = "ASCE/SEI 7-22 §16.2.3.2 (from memory)"
_RANGE_CLAUSE = "ASCE/SEI 7-22 §16.2.1 T_lower to T_upper, from memory"
_ACCEPTANCE_CLAUSE = "ASCE/SEI 7-22 §16.4, from memory"

#: Scaling period range of seismically isolated structures (ASCE/SEI 7-22 §17.3.3, from
#: memory): as in 7-16, 0.75 T_M at the upper-bound and 1.25 T_M at the lower-bound
#: properties, T_M by §17.5.3 with B_M of Table 17.5-1 (the same values, from memory;
#: check whether the edition changed the factors or the table).
ISOLATION_RANGE = asce7_16.isolation_range(
    "ASCE/SEI 7-22", asce7_16.ISOLATION_CLAUSE_16.replace("7-16", "7-22"),
    "Eqs. 17.5-1 and 17.5-2 with B_M of Table 17.5-1", asce7_16.damping_coefficient_bm)


def auto_statistic(motions: int) -> tuple[str, str]:
    """The acceptance statistic: the mean of the responses to the suite (§16.4)."""
    return "mean", (f"{STANDARD} acceptance reads the mean of the responses to the "
                    f"suite ({_ACCEPTANCE_CLAUSE}); {motions} motion"
                    f"{'s' if motions != 1 else ''} counted")


def scale(inputs: ScalingInputs):
    """
    One factor per motion (pairs share one), fitted in logarithms (common practice),
    then one suite factor: the suite mean RotD100 spectrum touches 90 % of the MCE_R
    target at its lowest point over the range (§16.2.3.2, from memory).

    Parameters
    ----------
    inputs : ScalingInputs
        ``motion_spectra_g``: the pairs' 5 %-damped RotD100 spectra (an unpaired
        record's PSA stands in). [g]

    Returns
    -------
    sdofreport.core.scaling.ScalingResult
        Factors per motion; criteria with their clauses.
    """
    return asce7_16.scale_chapter16(inputs, _AMPLITUDE_CLAUSE, _MINIMUM_CLAUSE, MINIMUM_MOTIONS,
                           REQUIRED_RATIO)


#: As ASCE/SEI 7-16 Chapter 16 (target level and damping, counting, factors per
#: motion), with this edition's target kinds, clauses and rule text.
EDITION = dataclasses.replace(
    asce7_16.EDITION,
    rule="asce7-22",
    standard=STANDARD,
    spectrum_kinds=("asce7-22", "table"),
    target_levels=TARGET_LEVELS,
    level_caution=("The target is the design-level spectrum (level = \"design\", 2/3 of "
                   "MCE_R), not the MCE_R spectrum that ASCE/SEI 7-22 §16.2.1 (from "
                   "memory) scales to: this suite is not scaled as the chapter asks."),
    target_damping=TARGET_DAMPING,
    target_damping_clause="ASCE/SEI 7-22 §11.4 spectra are 5 %-damped (from memory)",
    minimum_motions=MINIMUM_MOTIONS,
    minimum_clause=_MINIMUM_CLAUSE,
    required_ratio=REQUIRED_RATIO,
    period_ranges=period_range_options(_RANGE_CLAUSE, "T") + (ISOLATION_RANGE,),
    auto_statistic=auto_statistic,
    scale=scale,
    rule_text=("ASCE/SEI 7-22 §16.2.3.2 (from memory): one factor per motion (pairs share "
               "one); mean of the scaled RotD100 spectra ≥ 0.9 × S_a,MCE_R(T) for every "
               "T in T_lower ≤ T ≤ T_upper (for one oscillator 0.2 T to 2 T), touching "
               "90 % at one period"),
    memory_note=("ASCE/SEI 7-22 Chapter 16 (§16.2.1 MCE_R target and period range, "
                 "§16.2.2 eleven motions, §16.2.3.2 the 90 % criterion, §16.4 the mean) "
                 "and §11.4.5/§11.4.6 (multi-period spectrum, linear interpolation "
                 "between ordinates, MCE_R = 1.5 × the two-period design spectrum) were "
                 "written down from memory; check them against the published standard."),
)
