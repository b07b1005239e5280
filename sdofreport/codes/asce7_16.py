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

import numpy as np

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


#: ASCE/SEI 7-16 Table 17.5-1 (from memory): effective damping β_M [-] -> damping
#: coefficient B_M, linear between rows, 0.8 below 2 % and 2.0 above 50 %.
_BM_TABLE = ((0.02, 0.8), (0.05, 1.0), (0.10, 1.2), (0.20, 1.5), (0.30, 1.7), (0.40, 1.9),
             (0.50, 2.0))


def damping_coefficient_bm(beta: float) -> float:
    """B_M of ASCE/SEI 7-16 Table 17.5-1 (from memory) for effective damping β [-]."""
    betas, values = zip(*_BM_TABLE)
    return float(np.interp(float(beta), betas, values))


#: The clauses of T_M (text for the suite page).
ISOLATION_CLAUSE_16 = ("ASCE/SEI 7-16 §17.5.3 (from memory): D_M = g S_M1 T_M/(4π² B_M) "
                       "(Eq. 17.5-1; here g S_a(T_M) T_M²/(4π² B_M) with the MCE_R "
                       "target, the same where S_a = S_M1/T), T_M = 2π√(W/(k_M g)) (Eq. "
                       "17.5-2), k_M and β_M the effective properties at D_M "
                       "(§17.8.5), B_M from Table 17.5-1")


def isolation_range(standard: str, clause: str, table: str,
                    damping_coefficient) -> PeriodRangeOption:
    """The ``isolated-system`` option of an edition: 0.75 T_M (upper-bound properties)
    to 1.25 T_M (lower-bound properties), from memory."""
    return PeriodRangeOption(
        "isolated-system", f"0.75 T_M to 1.25 T_M of the isolation system's effective "
        f"period ({standard} §17.3.3, from memory): T_M at the upper-bound properties for "
        f"0.75 T_M and at the lower-bound properties for 1.25 T_M, computed from the "
        f"isolator system ([scaling] isolator) by {table}; or T_M = [scaling] period at "
        f"both ends", 0.75, 1.25, True, damping_coefficient, clause)


#: Scaling period range of seismically isolated structures (ASCE/SEI 7-16 §17.3.3, from
#: memory): 0.75 T_M, T_M at the upper-bound properties, to 1.25 T_M, T_M at the
#: lower-bound properties (§17.2.8.4), T_M the effective period at the maximum
#: displacement (§17.5.3). Without an isolator system, T_M = [scaling] period at both.
ISOLATION_RANGE = isolation_range("ASCE/SEI 7-16", ISOLATION_CLAUSE_16,
                                  "Eqs. 17.5-1 and 17.5-2 with B_M of Table 17.5-1",
                                  damping_coefficient_bm)


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
