"""
ASCE/SEI 7-16 Chapter 16 (nonlinear response history analysis): the record-suite rules.

Clause numbers and values below were written down from memory of the published text
[1]_ and are marked so on the pages; check them against the standard before relying on
them:

* §16.2.1: the target spectrum is the MCE_R spectrum (1.5 × the §11.4.6 design
  spectrum, §11.4.7); the §11.4 spectra are 5 %-damped.
* §16.2.2: not less than eleven ground motions; each motion is a pair of horizontal
  components (a pair is one motion).
* §16.2.3.1: the period range has an upper bound of at least 2 T and a lower bound of at
  most 0.2 T (T the first-mode period; lower where 90 % mass participation needs it).
* §16.2.3.2: amplitude scaling; the average of the maximum-direction (RotD100) spectra
  of the suite is not below 90 % of the target over the period range.
* §16.4: acceptance reads the mean of the responses to the suite.

References
----------
.. [1] ASCE/SEI 7-16, *Minimum Design Loads and Associated Criteria for Buildings and
   Other Structures*. Reston, VA, USA: ASCE, 2017, Chapter 16.
"""

from __future__ import annotations

import dataclasses

from sdofreport.codes._edition import (
    Edition,
    PeriodRangeOption,
    ScalingInputs,
    period_range_options,
)
from sdofreport.core import scaling as core_scaling

#: Edition and chapter, as text.
STANDARD = "ASCE/SEI 7-16 Chapter 16"

#: Target levels: the chapter's own (MCE_R, §16.2.1, from memory) first.
TARGET_LEVELS = ("mce_r", "design")

#: Damping ratio of the target spectrum (§11.4 spectra are 5 %-damped; from memory).
TARGET_DAMPING = 0.05

#: Minimum number of ground motions (§16.2.2, from memory).
MINIMUM_MOTIONS = 11

#: Required ratio of the suite-mean RotD100 spectrum to the target (§16.2.3.2, memory).
REQUIRED_RATIO = 0.90

_MINIMUM_CLAUSE = "ASCE/SEI 7-16 §16.2.2 (clause number from memory)"
_AMPLITUDE_CLAUSE = "ASCE/SEI 7-16 §16.2.3.2 (clause number from memory)"
_RANGE_CLAUSE = "ASCE/SEI 7-16 §16.2.3.1, from memory"
_ACCEPTANCE_CLAUSE = "§16.4, clause number from memory"


#: Scaling period range of seismically isolated structures (ASCE/SEI 7-16 §17.3.3, from
#: memory): 0.75 T_M to 1.25 T_M, T_M the effective period of the isolation system at
#: the maximum displacement, given as ``[scaling] period``. The clause takes the lower
#: end with upper-bound and the upper end with lower-bound properties (from memory); a
#: single T_M is used here for both ends.
ISOLATION_RANGE = PeriodRangeOption(
    "isolated-system", "0.75 T_M to 1.25 T_M of the isolation system's effective period "
    "T_M = [scaling] period (ASCE/SEI 7-16 §17.3.3, from memory; the clause takes 0.75 "
    "T_M with upper-bound and 1.25 T_M with lower-bound properties)", 0.75, 1.25, True)


def auto_statistic(motions: int) -> tuple[str, str]:
    """The acceptance statistic: the mean of the responses to the suite (§16.4)."""
    return "mean", (f"{STANDARD} acceptance reads the mean of the responses to the "
                    f"suite ({_ACCEPTANCE_CLAUSE}); {motions} motion"
                    f"{'s' if motions != 1 else ''} counted")


def scale_chapter16(inputs: ScalingInputs, amplitude_clause: str, minimum_clause: str,
                    minimum_motions: int = MINIMUM_MOTIONS,
                    required_ratio: float = REQUIRED_RATIO):
    """The Chapter 16 amplitude-scaling rule (shared by the 7-16 and 7-22 editions):
    :func:`scale` with the edition's clauses."""
    result = core_scaling.scale_asce7_16(inputs.periods_s, inputs.motion_spectra_g,
                                         inputs.target_sa_g, inputs.period_range_s)
    low = float(result.ratio.min())
    n = inputs.motions_counted
    criteria = [
        core_scaling.Criterion(
            "suite mean RotD100 / target, minimum over the period range", required_ratio,
            low, core_scaling.meets(low, required_ratio), "error", amplitude_clause),
        core_scaling.Criterion(
            "number of ground motions (a horizontal pair counts as one)",
            float(minimum_motions), float(n), n >= minimum_motions, "error",
            minimum_clause),
        *[c for c in result.criteria if c.source.startswith("common practice")],
    ]
    return dataclasses.replace(result, criteria=criteria)


def scale(inputs: ScalingInputs):
    """
    One factor per motion (pairs share one): each motion fitted to the target in
    logarithms (common practice, no source), then one suite factor makes the suite mean
    RotD100 spectrum touch 90 % of the target at its lowest point (§16.2.3.2).

    Parameters
    ----------
    inputs : ScalingInputs
        ``motion_spectra_g`` are the pairs' RotD100 spectra (an unpaired record's 5 %
        PSA stands in for its RotD100) at 5 % damping. [g]

    Returns
    -------
    sdofreport.core.scaling.ScalingResult
        Factors per motion; criteria with their clauses.
    """
    return scale_chapter16(inputs, _AMPLITUDE_CLAUSE, _MINIMUM_CLAUSE)


EDITION = Edition(
    rule="asce7-16",
    standard=STANDARD,
    spectrum_kinds=("asce7-16", "table"),
    target_levels=TARGET_LEVELS,
    level_caution=("The target is the design-level spectrum (level = \"design\"), not "
                   "the MCE_R spectrum that ASCE/SEI 7-16 §16.2.1 (from memory) scales "
                   "to: this suite is not scaled as the chapter asks."),
    target_damping=TARGET_DAMPING,
    target_damping_clause="ASCE/SEI 7-16 §11.4 spectra are 5 %-damped (from memory)",
    minimum_motions=MINIMUM_MOTIONS,
    minimum_clause=_MINIMUM_CLAUSE,
    counting="a horizontal pair (H1, H2) is one motion; an unpaired record is one motion",
    factor_per="motion",
    required_ratio=REQUIRED_RATIO,
    period_ranges=period_range_options(_RANGE_CLAUSE, "T") + (ISOLATION_RANGE,),
    auto_statistic=auto_statistic,
    scale=scale,
    rule_text=("ASCE/SEI 7-16 §16.2.3.2 (from memory): one factor per motion (pairs share "
               "one); the mean of the scaled RotD100 spectra is at least 90 % of the "
               "target over the period range, touching 90 % at one period"),
    memory_note=("Clause numbers of ASCE/SEI 7-16 Chapter 16 (§16.2.1 target, §16.2.2 "
                 "eleven motions, §16.2.3.1 period range, §16.2.3.2 amplitude scaling, "
                 "§16.4 acceptance) were written down from memory; check them against "
                 "the published standard."),
)
