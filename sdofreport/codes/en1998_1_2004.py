"""
EN 1998-1:2004 §3.2.3.1.2 and §4.3.3.4.3: the record-suite rules of Eurocode 8 Part 1.

Clause numbers and values below were written down from memory of the published text
[1]_ and are marked so on the pages; check them against the standard and its National
Annex before relying on them:

* §3.2.2.2: the elastic spectrum, Eqs. (3.2)-(3.5), stated for periods up to 4 s; 5 %
  reference damping, other damping through η (Eq. 3.6).
* §3.2.3.1.2(4): a) at least 3 accelerograms; b) the mean zero-period spectral value is
  not below a_g·S; c) in the range 0.2 T₁ to 2 T₁ no value of the mean 5 %-damped
  spectrum is below 90 % of the elastic spectrum. The 2004 text does not say how two
  horizontal components are combined; a pair is counted as one motion here and the
  mean is taken over every component spectrum (our reading, no source).
* §4.3.3.4.3(3): the mean of the responses when at least 7 nonlinear time-history
  analyses are performed, otherwise the most unfavourable (the maximum).

References
----------
.. [1] CEN, *Eurocode 8: Design of structures for earthquake resistance — Part 1*,
   EN 1998-1:2004. Brussels: CEN, 2004, §3.2.2.2, §3.2.3.1.2, §4.3.3.4.3.
"""

from __future__ import annotations

import dataclasses

from sdofreport.codes._edition import Edition, ScalingInputs, period_range_options
from sdofreport.core import scaling as core_scaling

#: Edition and clauses, as text.
STANDARD = "EN 1998-1:2004 §3.2.3.1.2 and §4.3.3.4.3"

#: Reference damping of the elastic spectrum (§3.2.2.2(1)P, from memory).
TARGET_DAMPING = 0.05

#: Minimum number of accelerograms (§3.2.3.1.2(4)a, from memory).
MINIMUM_MOTIONS = 3

#: Motions from which the mean response may be used (§4.3.3.4.3(3), from memory).
MEAN_FROM_MOTIONS = 7

#: Required ratio of the mean spectrum to the elastic spectrum (§3.2.3.1.2(4)c, memory).
REQUIRED_RATIO = 0.90

#: Longest period of Eq. (3.5) as stated in §3.2.2.2 (from memory) [s].
SPECTRUM_LIMIT_S = 4.0

_CLAUSE = "EN 1998-1:2004 §3.2.3.1.2(4)"
_MEMORY = " (clause number from memory)"
_STATISTIC_CLAUSE = "EN 1998-1:2004 §4.3.3.4.3(3), clause number from memory"


def auto_statistic(motions: int) -> tuple[str, str]:
    """The mean with at least 7 motions, otherwise the maximum (§4.3.3.4.3(3))."""
    if motions >= MEAN_FROM_MOTIONS:
        return "mean", (f"{motions} motions counted, at least {MEAN_FROM_MOTIONS}: the "
                        f"mean ({_STATISTIC_CLAUSE})")
    return "max", (f"{motions} motion{'s' if motions != 1 else ''} counted, fewer than "
                   f"{MEAN_FROM_MOTIONS}: the most unfavourable response, the maximum "
                   f"({_STATISTIC_CLAUSE})")


def scale(inputs: ScalingInputs):
    """
    One suite factor, the smallest that meets (4)b and (4)c, on every record.

    Parameters
    ----------
    inputs : ScalingInputs
        ``component_spectra_g``: 5 %-damped PSA of every record; ``component_pga_g``:
        their zero-period values; ``target_zero_period_g``: a_g·S. [g]

    Returns
    -------
    sdofreport.core.scaling.ScalingResult
        Factors per record; criteria with their clauses.
    """
    result = core_scaling.scale_en1998_1(
        inputs.periods_s, inputs.component_spectra_g, inputs.target_sa_g,
        inputs.period_range_s, inputs.target_zero_period_g, inputs.component_pga_g)
    by_name = {c.name: c for c in result.criteria}
    n = inputs.motions_counted
    zero = by_name["mean zero-period spectral value / (a_g S)"]
    ratio = by_name["mean spectrum / elastic spectrum, minimum over the period range"]
    criteria = [
        core_scaling.Criterion("number of ground motions (a horizontal pair counts as "
                               "one)", float(MINIMUM_MOTIONS), float(n),
                               n >= MINIMUM_MOTIONS, "error", f"{_CLAUSE}a{_MEMORY}"),
        dataclasses.replace(zero, source=f"{_CLAUSE}b{_MEMORY}"),
        dataclasses.replace(ratio, source=f"{_CLAUSE}c{_MEMORY}"),
        *[c for c in result.criteria if c.source.startswith("common practice")],
    ]
    return dataclasses.replace(result, criteria=criteria)


EDITION = Edition(
    rule="en1998-1",
    standard=STANDARD,
    spectrum_kinds=("en1998-1",),
    target_levels=(),
    level_caution="",
    target_damping=TARGET_DAMPING,
    target_damping_clause="EN 1998-1:2004 §3.2.2.2 reference damping 5 % (from memory)",
    minimum_motions=MINIMUM_MOTIONS,
    minimum_clause=f"{_CLAUSE}a{_MEMORY}",
    counting="a horizontal pair (H1, H2) is one motion; an unpaired record is one motion "
             "(our reading: the 2004 text counts accelerograms, not pairs)",
    factor_per="suite",
    required_ratio=REQUIRED_RATIO,
    period_ranges=period_range_options("EN 1998-1:2004 §3.2.3.1.2(4)c, from memory",
                                       "T₁"),
    auto_statistic=auto_statistic,
    scale=scale,
    rule_text=("EN 1998-1:2004 §3.2.3.1.2(4) (from memory): one suite factor; mean "
               "zero-period value at least a_g·S and mean 5 % spectrum at least 90 % of "
               "the elastic spectrum over the period range"),
    spectrum_limit_s=SPECTRUM_LIMIT_S,
    spectrum_limit_caution=("The period range reaches beyond 4 s, where Eq. (3.5) of "
                            "EN 1998-1:2004 §3.2.2.2 is no longer stated (from memory): "
                            "the elastic spectrum there is our extrapolation of "
                            "a_g·S·2.5η·T_C·T_D/T², not the standard's."),
    memory_note=("Clause numbers and the values of EN 1998-1:2004 (§3.2.2.2 Tables 3.2 "
                 "and 3.3, §3.2.3.1.2(4), §4.3.3.4.3(3)) were written down from memory; "
                 "check them against the published standard and its National Annex."),
)
