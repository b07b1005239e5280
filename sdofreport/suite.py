"""The record suite against the design spectrum: target, period range and scale factors.

Pure bookkeeping around :mod:`sdofreport.core.scaling`: it chooses the spectra each
rule reads (pairs' RotD100 for ASCE/SEI 7-16 §16.2, 5 %-damped component spectra for
EN 1998-1 §3.2.3.1.2 and for the log fit), the period range, and maps factors back to
records. An unpaired record counts as its own motion under the ASCE rule (its 5 % PSA
stands in for RotD100), which the page says.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from sdofreport.core import scaling as core_scaling
from sdofreport.core.design_spectra import en1998_1_parameters
from sdofreport.core.units import G

#: Damping ratio of the spectra that scaling rules read (ASCE/SEI 7-16 §16.2.3 and
#: EN 1998-1 §3.2.3.1.2 both use 5 % damping).
SCALING_DAMPING = 0.05


@dataclass
class SuiteScaling:
    rule: str
    factors: dict[str, float]  # record id -> factor applied on top of its `scale`
    period_range_s: tuple[float, float] | None
    result: object | None = None  # core ScalingResult, None for rule "none"
    motions: list[tuple[str, list[str]]] = field(default_factory=list)  # (name, record ids)
    notes: list[str] = field(default_factory=list)


def period_range(project) -> tuple[float, float]:
    """The scaling period range: explicit, from the governing period, or every system's."""
    spec = project.scaling
    if spec.period_range_s:
        return spec.period_range_s
    if spec.period_s:
        return (0.2 * spec.period_s, 2.0 * spec.period_s)
    periods = [s.period_s for s in project.systems]
    return (0.2 * min(periods), 2.0 * max(periods))


def motions(project) -> list[tuple[str, list[str]]]:
    """Ground motions: each pair once (H1, H2), then each unpaired record, in file order."""
    seen, result = set(), []
    for spec in project.records:
        if spec.pair:
            if spec.pair in seen:
                continue
            seen.add(spec.pair)
            members = sorted((r for r in project.records if r.pair == spec.pair),
                             key=lambda r: r.component)
            result.append((spec.pair, [r.id for r in members]))
        else:
            result.append((spec.id, [spec.id]))
    return result


def _damping_index(damping) -> int:
    return int(np.argmin(np.abs(np.asarray(damping) - SCALING_DAMPING)))


def compute_scaling(project, spectra: dict, pairs: dict) -> SuiteScaling:
    """
    Scale factors of every record.

    Parameters
    ----------
    project : Project
    spectra : dict
        Record id -> :class:`~sdofreport.core.spectra.ResponseSpectrum` (records at their
        given ``scale``).
    pairs : dict
        Pair name -> :class:`~sdofreport.core.rotd.RotDSpectrum`.
    """
    spec = project.scaling
    ids = [r.id for r in project.records]
    if spec.rule == "none" or project.design_spectrum is None:
        return SuiteScaling("none", {i: 1.0 for i in ids}, None)
    first = spectra[ids[0]]
    periods = np.asarray(first.periods_s)
    z = _damping_index(first.damping)
    notes = []
    if abs(first.damping[z] - SCALING_DAMPING) > 1e-12:
        notes.append(f"no 5 % damped spectrum was requested; scaling used "
                     f"{100 * first.damping[z]:g} % damping")
    target = project.design_spectrum.spectrum().sa_g(periods)
    trange = period_range(project)
    psa = {i: np.asarray(spectra[i].psa_m_s2[z]) / G for i in ids}
    groups = motions(project)
    if spec.rule == "asce7-16":
        rows = []
        for name, members in groups:
            if len(members) == 2:
                rows.append(np.asarray(pairs[name].rotd100_psa_g))
            else:
                rows.append(psa[members[0]])
        result = core_scaling.scale_asce7_16(periods, np.array(rows), target, trange)
        per_motion = result.factors
    elif spec.rule == "en1998-1":
        parameters = en1998_1_parameters(**project.design_spectrum.parameters)
        pga = np.array([float(spectra[i].pga_m_s2) / G for i in ids])
        result = core_scaling.scale_en1998_1(periods, np.array([psa[i] for i in ids]),
                                             target, trange, parameters.ag_s_g, pga)
        groups = [(i, [i]) for i in ids]
        per_motion = result.factors
    else:  # fit
        result = core_scaling.scale_fit(periods, np.array([psa[i] for i in ids]), target,
                                        trange, suite_factor=spec.suite_factor)
        groups = [(i, [i]) for i in ids]
        per_motion = result.factors
    factors = {}
    for (name, members), factor in zip(groups, per_motion):
        for member in members:
            factors[member] = float(factor)
    return SuiteScaling(spec.rule, factors, (float(trange[0]), float(trange[1])), result,
                        groups, notes)
