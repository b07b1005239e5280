"""What every standard edition supplies to suite scaling and acceptance (no I/O)."""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np


@dataclass(frozen=True)
class PeriodRangeOption:
    """A named period-range option that an edition permits."""

    #: option name as written in the project file (``[scaling] period_range = "..."``)
    name: str
    #: what the option covers, in words, with its clause
    description: str
    #: lower bound as a multiple of the (shortest) period [-]
    lower_factor: float
    #: upper bound as a multiple of the (longest) period [-]
    upper_factor: float
    #: True when the option reads ``[scaling] period``; False: every system's period
    needs_period: bool
    #: isolated systems: β_eff [-] -> damping coefficient B_M [-] of the edition's table,
    #: with which T_M is computed at the upper and the lower bound from the isolator
    #: system's properties (``[scaling] isolator``); None for the other options
    damping_coefficient: Callable[[float], float] | None = field(default=None,
                                                                 repr=False)
    #: the clauses of T_M, D_M and B_M, in words (isolated systems)
    isolation_clause: str = ""


def period_range_options(clause: str, symbol: str) -> tuple[PeriodRangeOption, ...]:
    """The two named options both editions permit: 0.2 to 2 times the governing period
    (the narrowest range the clause allows), or that range for every system at once."""
    return (
        PeriodRangeOption("governing-period",
                          f"0.2 {symbol} to 2 {symbol} of the governing period "
                          f"[scaling] period ({clause})", 0.2, 2.0, True),
        PeriodRangeOption("every-system",
                          f"0.2 × the shortest to 2 × the longest system period, the "
                          f"range of {clause} for every system at once", 0.2, 2.0, False),
    )


@dataclass(frozen=True)
class ScalingInputs:
    """What a suite brings to an edition's scaling rule (spectra at the target damping)."""

    #: spectrum periods, strictly increasing [s], shape (nT,)
    periods_s: np.ndarray
    #: one spectrum per motion (a pair's RotD100, an unpaired record's PSA) [g]
    motion_spectra_g: np.ndarray
    #: one PSA spectrum per record (component) [g], shape (n_records, nT)
    component_spectra_g: np.ndarray
    #: zero-period spectral value (PGA) of each record [g], shape (n_records,)
    component_pga_g: np.ndarray
    #: target spectrum at ``periods_s`` [g]
    target_sa_g: np.ndarray
    #: (lower, upper) period range [s]
    period_range_s: tuple[float, float]
    #: ground motions as the edition counts them
    motions_counted: int
    #: zero-period value of the target where the edition checks it (EN: a_g·S) [g]
    target_zero_period_g: float | None = None


@dataclass(frozen=True)
class Edition:
    """
    One standard edition's rules for a record suite.

    Every value that the engine, the site or results.json shows about a standard comes
    from here; nothing else names a clause.
    """

    #: ``[scaling] rule`` value that selects this edition
    rule: str
    #: edition and chapter, as text (results.json ``scaling.standard``)
    standard: str
    #: design-spectrum kinds accepted as the target (``[design_spectrum] kind``)
    spectrum_kinds: tuple[str, ...]
    #: target levels the edition offers, the chapter's own first; () when no such choice
    target_levels: tuple[str, ...]
    #: caution shown when the project picks a level other than the chapter's own
    level_caution: str
    #: damping ratio of the target spectrum, the damping of the spectra scaled [-]
    target_damping: float
    #: clause of the target damping
    target_damping_clause: str
    #: minimum number of ground motions, and its clause
    minimum_motions: int
    minimum_clause: str
    #: how motions are counted, in words
    counting: str
    #: "motion" (one factor per motion, pairs share it) or "suite" (one factor for all)
    factor_per: str
    #: named period-range options
    period_ranges: tuple[PeriodRangeOption, ...]
    #: required ratio of the suite-mean spectrum to the target over the range [-]
    required_ratio: float = 0.9
    #: statistic of the demands for ``statistic = "auto"``: motions -> (statistic, reason)
    auto_statistic: Callable[[int], tuple[str, str]] = field(repr=False, default=None)
    #: the rule: ScalingInputs -> core ScalingResult whose criteria carry their clauses
    scale: Callable = field(repr=False, default=None)
    #: the scaling rule in words, for the suite page
    rule_text: str = ""
    #: longest period to which the target spectrum's equations are stated [s], or None
    spectrum_limit_s: float | None = None
    #: caution when the target is used beyond ``spectrum_limit_s``
    spectrum_limit_caution: str = ""
    #: which clauses and values were written down from memory
    memory_note: str = ""

    def period_range_option(self, name: str) -> PeriodRangeOption | None:
        return next((o for o in self.period_ranges if o.name == name), None)

    @property
    def period_range_names(self) -> tuple[str, ...]:
        return tuple(o.name for o in self.period_ranges)
