"""The record suite against the target spectrum: target, period range and scale factors.

Pure bookkeeping around :mod:`sdofreport.codes` (which edition's rules apply) and
:mod:`sdofreport.core.scaling` (the numerics): it chooses the spectra each rule reads
(pairs' RotD100 and 5 %-damped component spectra at the target's damping), the period
range, counts motions as the edition does and maps factors back to records. An unpaired
record counts as its own motion (its PSA stands in for RotD100), which the page says.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING

import numpy as np

from sdofreport import codes
from sdofreport.core import processing as core_processing
from sdofreport.core import scaling as core_scaling
from sdofreport.core.design_spectra import design_spectrum, en1998_1_parameters
from sdofreport.core.units import G
from sdofreport.engine.isolation_bounds import IsolationPeriods, isolation_periods
from sdofreport.project.model import natural_key

if TYPE_CHECKING:  # vertical_suite imports this module
    from sdofreport.engine.vertical_suite import VerticalScaling

#: Damping ratio of the spectra that rules naming no edition ("fit") read, and of the
#: pairs' RotD spectra: 5 %, the target damping of every edition in sdofreport.codes.
SCALING_DAMPING = 0.05


@dataclass
class SuiteScaling:
    rule: str
    factors: dict[str, float]  # record id -> factor applied on top of its `scale`
    period_range_s: tuple[float, float] | None
    result: core_scaling.ScalingResult | None = None  # None for rule "none"
    motions: list[tuple[str, list[str]]] = field(default_factory=list)  # (name, record ids)
    notes: list[str] = field(default_factory=list)
    #: edition and chapter, as text; None for rules naming no standard
    standard: str | None = None
    #: "mce_r", "design", or None where the edition has no such choice
    target_level: str | None = None
    #: damping ratio of the target and of the spectra scaled [-]
    target_damping: float = SCALING_DAMPING
    #: ground motions as the edition counts them (a pair is one)
    motions_counted: int = 0
    #: named period-range option, or None when the range was typed
    period_range_option: str | None = None
    #: the period-range option in words
    period_range_text: str = ""
    #: cautions the suite page and the summary carry (not the chapter's target, ...)
    cautions: list[str] = field(default_factory=list)
    #: criterion spectra, scaled: (names, [g] shape (n, nT)) and the target [g] (nT,)
    criterion_names: list[str] = field(default_factory=list)
    criterion_spectra_g: np.ndarray | None = None
    criterion_label: str = ""
    target_sa_g: np.ndarray | None = None
    #: required ratio of the suite mean to the target (0.9 for both editions)
    required_ratio: float | None = None
    #: memory note of the edition (clauses and values written down from memory)
    memory_note: str = ""
    #: period_range "isolated-system" with an isolator system: {"upper", "lower"} ->
    #: core IsolatedPeriod (T_M at that bound), and "system", "clause"; else None
    isolation: IsolationPeriods | None = None
    #: the vertical target and the vertical records' scaling (sdofreport.engine.vertical_suite)
    vertical: VerticalScaling | None = None

    def history_note(self, record_id: str, factor: float) -> str:
        """The processing-history line of a record scaled by ``factor``."""
        if self.vertical is not None and record_id in self.vertical.factors:
            return (f"vertical scaling to the {self.vertical.kind} vertical target (log "
                    f"fit, common practice): × {factor:.6g}")
        return f"suite scaling ({self.rule}): × {factor:.6g}"

    @property
    def complies(self) -> bool | None:
        """True when every error criterion passed; None when nothing was checked."""
        if self.result is None:
            return None
        return bool(self.result.passed)

    @property
    def failed(self) -> list:
        """Error criteria that did not pass."""
        if self.result is None:
            return []
        return [c for c in self.result.criteria if not c.passed and c.severity == "error"]


def period_range(project) -> tuple[tuple[float, float], str | None, str]:
    """The scaling period range [s], its option name (None when typed) and the option in
    words, from ``[scaling] period_range`` and the edition's options."""
    spec = project.scaling
    if spec.period_range_s:
        low, high = spec.period_range_s
        return spec.period_range_s, None, f"as given, {low:g} s to {high:g} s"
    name = spec.period_range_option or ("governing-period" if spec.period_s else
                                        "every-system")
    option = codes.period_range_option(spec.rule, name)
    if option.damping_coefficient is not None and spec.isolator is not None:
        bounds = isolation_periods(project, option)
        low = bounds.upper.effective.period_s  # 0.75 T_M at the upper bound
        high = bounds.lower.effective.period_s  # 1.25 T_M at the lower bound
    elif option.needs_period:
        low = high = spec.period_s
    else:
        periods = [s.period_s for s in project.systems]
        low, high = min(periods), max(periods)
    return ((option.lower_factor * low, option.upper_factor * high), option.name,
            option.description)


def motions(project) -> list[tuple[str, list[str]]]:
    """Ground motions: each pair once (H1, H2) and each unpaired record, in natural order
    of their names (P1, P2, ... P10)."""
    seen, result = set(), []
    for spec in project.records:
        if spec.component == "V":  # vertical records are no horizontal motion
            continue
        if spec.pair:
            if spec.pair in seen:
                continue
            seen.add(spec.pair)
            members = sorted((r for r in project.records if r.pair == spec.pair),
                             key=lambda r: r.component)
            result.append((spec.pair, [r.id for r in members]))
        else:
            result.append((spec.id, [spec.id]))
    return sorted(result, key=lambda motion: natural_key(motion[0]))


def usable_period_max_s(spec) -> float | None:
    """Longest usable period of a record [s]: 1/(1.25 f_c) of its high-pass corner
    (:func:`sdofreport.core.processing.usable_period_max_s`), None without one."""
    band = spec.processing.bandpass_hz
    if not band or band[0] is None:
        return None
    return core_processing.usable_period_max_s(band[0])


def damping_index(damping, target: float = SCALING_DAMPING) -> int:
    """Index of ``target`` in ``damping`` (exact), or ValueError."""
    values = np.asarray(damping, dtype=float)
    found = np.flatnonzero(np.abs(values - target) <= 1e-12)
    if not found.size:
        raise ValueError(f"no spectrum at the target damping {target:g} among "
                         f"{values.tolist()!r}")
    return int(found[0])


def scaling_damping(project) -> float | None:
    """Damping ratio of the spectra suite scaling reads, or None when nothing is scaled."""
    rule = project.scaling.rule
    if project.design_spectrum is None:
        return None
    if rule == "none":  # the vertical target is shown at 5 % even when nothing is scaled
        return SCALING_DAMPING if project.design_spectrum.vertical is not None else None
    edition = codes.edition(rule)
    return edition.target_damping if edition else SCALING_DAMPING


def _target(project, edition, periods):
    """(target Sa [g], level, cautions, notes) of the edition from the design spectrum."""
    design = project.design_spectrum
    level, cautions, notes = None, [], []
    if edition is not None and edition.target_levels and "level" in design.parameters:
        level = design.parameters.get("level", edition.target_levels[0])
        level = "mce_r" if level == "mce" else level
        if level != edition.target_levels[0]:
            cautions.append(edition.level_caution)
    elif edition is not None and edition.target_levels:
        notes.append(f"the {design.kind} spectrum is taken as the target as given (no "
                     f"level is applied to it)")
    parameters = dict(design.parameters)
    if "damping" in parameters and edition is not None:
        parameters["damping"] = edition.target_damping  # the target at its own damping
    return design_spectrum(design.kind, **parameters).sa_g(periods), level, cautions, notes


def _usable_range(project, trange) -> tuple[tuple[float, float], str]:
    """The period range cut at the shortest usable period of the suite (ordinates beyond
    a record's usable period are left out of scaling), and the caution saying so; the
    range unchanged when ``[scaling] beyond_usable = "include"`` (with a caution)."""
    limits = [(usable_period_max_s(r), r.id) for r in project.records]
    limits = [(t, rid) for t, rid in limits if t is not None]
    if not limits:
        return trange, ""
    tmax, rid = min(limits)
    if trange[1] <= tmax:
        return trange, ""
    rule = ("1/(1.25 × high-pass corner), the NGA-West2 rule (Ancheta et al. 2014, from "
            "memory; common practice, not a code requirement)")
    if project.scaling.beyond_usable == "include":
        return trange, (f"The period range reaches {trange[1]:.4g} s, beyond the usable "
                        f"period {tmax:.4g} s of record {rid} ({rule}); the project "
                        f"includes those ordinates in scaling (beyond_usable = "
                        f"\"include\").")
    if tmax <= trange[0]:
        return trange, (f"The whole period range {trange[0]:.4g} s to {trange[1]:.4g} s "
                        f"lies beyond the usable period {tmax:.4g} s of record {rid} "
                        f"({rule}): it is kept, but these ordinates are not reliable; "
                        f"choose a lower high-pass corner or other records.")
    return (trange[0], tmax), (
        f"The period range the rule asks for ends at {trange[1]:.4g} s, but record {rid} "
        f"is usable only up to {tmax:.4g} s ({rule}): scaling and its criteria use "
        f"{trange[0]:.4g} s to {tmax:.4g} s, so the range above {tmax:.4g} s is not "
        f"checked. Set [scaling] beyond_usable = \"include\" to override.")


def compute_scaling(project, spectra: dict, pairs: dict) -> SuiteScaling:
    """
    Scale factors of every record.

    Parameters
    ----------
    project : Project
    spectra : dict
        Record id -> :class:`~sdofreport.core.spectra.ResponseSpectrum` (records at their
        given ``scale``), holding the target damping (:func:`scaling_damping`).
    pairs : dict
        Pair name -> :class:`~sdofreport.core.rotd.RotDSpectrum` at that damping.
    """
    spec = project.scaling
    ids = [r.id for r in project.records if r.component != "V"]  # vertical: not scaled
    groups = motions(project)
    if spec.rule == "none" or project.design_spectrum is None:
        return SuiteScaling("none", {i: 1.0 for i in ids}, None, motions=groups,
                            motions_counted=len(groups))
    edition = codes.edition(spec.rule)
    zeta = scaling_damping(project)
    first = spectra[ids[0]]
    periods = np.asarray(first.periods_s)
    z = damping_index(first.damping, zeta)
    target, level, cautions, notes = _target(project, edition, periods)
    trange, option, option_text = period_range(project)
    trange, usable_caution = _usable_range(project, trange)
    if usable_caution:
        cautions.append(usable_caution)
    psa = np.array([np.asarray(spectra[i].psa_m_s2[z]) / G for i in ids])
    motion_rows = []
    for name, members in groups:
        motion_rows.append(np.asarray(pairs[name].rotd100_psa_g) if len(members) == 2
                           else psa[ids.index(members[0])])
    motion_rows = np.array(motion_rows)
    if edition is None:  # fit
        result = core_scaling.scale_fit(periods, psa, target, trange,
                                        suite_factor=spec.suite_factor)
        per_group = [(i, [i]) for i in ids]
        names, stack, label = ids, psa * result.factors[:, None], "PSA"
        required = None
    else:
        zero = None
        if project.design_spectrum.kind == "en1998-1":
            zero = en1998_1_parameters(**project.design_spectrum.parameters).ag_s_g
        pga = np.array([float(spectra[i].pga_m_s2) / G for i in ids])
        inputs = codes.ScalingInputs(periods, motion_rows, psa, pga, target, trange,
                                     len(groups), zero)
        result = edition.scale(inputs)
        if edition.factor_per == "motion":
            per_group = groups
            names = [name for name, _ in groups]
            stack, label = motion_rows * result.factors[:, None], "RotD100"
        else:
            per_group = [(i, [i]) for i in ids]
            names, stack, label = ids, psa * result.factors[:, None], "PSA"
        required = edition.required_ratio
        if edition.spectrum_limit_s is not None and trange[1] > edition.spectrum_limit_s:
            cautions.append(edition.spectrum_limit_caution)
    factors = {}
    for (name, members), factor in zip(per_group, result.factors):
        for member in members:
            factors[member] = float(factor)
    return SuiteScaling(
        spec.rule, factors, (float(trange[0]), float(trange[1])), result, groups, notes,
        standard=edition.standard if edition else None, target_level=level,
        target_damping=zeta, motions_counted=len(groups), period_range_option=option,
        period_range_text=option_text, cautions=cautions, criterion_names=list(names),
        criterion_spectra_g=stack, criterion_label=label, target_sa_g=target,
        required_ratio=required, memory_note=edition.memory_note if edition else "",
        isolation=_isolation(project, option))


def _isolation(project, name: str | None) -> IsolationPeriods | None:
    """T_M at both bounds when the range is "isolated-system" of an isolator system."""
    option = codes.period_range_option(project.scaling.rule, name or "")
    if option is None or option.damping_coefficient is None or \
            project.scaling.isolator is None:
        return None
    return isolation_periods(project, option)
