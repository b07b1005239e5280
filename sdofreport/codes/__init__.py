"""
Standard editions: one module per edition and the registry every layer reads.

Each edition (:class:`~sdofreport.codes._edition.Edition`) supplies its target
spectrum kinds and level, the damping of the target, its period-range options, its
scaling criteria with clauses, its minimum number of motions and how motions are counted,
and the statistic of the demands its acceptance uses. The loader, the CLI choices, the
engine, the site and the documentation read :data:`EDITIONS`; nothing else names a
clause. Later editions plug in by adding a module and a line here.
"""

from __future__ import annotations

from sdofreport.codes import asce7_16, asce7_22, en1998_1_2004
from sdofreport.codes._edition import (
    Edition,
    PeriodRangeOption,
    ScalingInputs,
    period_range_options,
)

#: ``[scaling] rule`` -> edition.
EDITIONS: dict[str, Edition] = {e.rule: e for e in (asce7_16.EDITION,
                                                    asce7_22.EDITION,
                                                    en1998_1_2004.EDITION)}

#: Period-range options of rules that name no edition ("fit").
GENERIC_PERIOD_RANGES = period_range_options("common practice, no source", "T")

#: Motions from which the mean is used by ``statistic = "auto"`` when no edition governs.
GENERIC_MEAN_FROM_MOTIONS = en1998_1_2004.MEAN_FROM_MOTIONS


def edition(rule: str | None) -> Edition | None:
    """The edition a scaling rule follows, or None ("fit", "none")."""
    return EDITIONS.get(rule or "")


def period_range_names(rule: str | None) -> tuple[str, ...]:
    """Named period-range options of a rule."""
    found = edition(rule)
    return found.period_range_names if found else tuple(o.name for o in
                                                         GENERIC_PERIOD_RANGES)


def period_range_option(rule: str | None, name: str) -> PeriodRangeOption | None:
    found = edition(rule)
    options = found.period_ranges if found else GENERIC_PERIOD_RANGES
    return next((o for o in options if o.name == name), None)


def auto_statistic(rule: str | None, motions: int) -> tuple[str, str]:
    """
    ``statistic = "auto"`` resolved: (``"mean"`` or ``"max"``, the reason in words).

    The governing edition decides, counting motions (a pair once). With no edition
    ("fit", "none"), the mean with at least 7 motions, otherwise the maximum, the rule
    of EN 1998-1:2004 §4.3.3.4.3(3) (from memory), which the reason says.
    """
    found = edition(rule)
    if found is not None:
        return found.auto_statistic(motions)
    statistic, reason = en1998_1_2004.auto_statistic(motions)
    return statistic, (f"no scaling rule names a standard; the rule of "
                       f"EN 1998-1:2004 §4.3.3.4.3(3) is used: {reason}")


__all__ = [
    "EDITIONS",
    "GENERIC_PERIOD_RANGES",
    "Edition",
    "PeriodRangeOption",
    "ScalingInputs",
    "auto_statistic",
    "edition",
    "period_range_names",
    "period_range_option",
]
