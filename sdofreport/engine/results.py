"""What a run of the engine gives: the typed results of records, pairs, responses,
checks and fragility stripes, the verdicts and the rules that turn responses into checks."""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

import numpy as np

from sdofreport.core.fragility import (
    FITTED,
    Fragility,
    exceedance_probability,
    fit_fragility,
)
from sdofreport.core.intensity import IntensityMeasures
from sdofreport.core.rotd import RotDSpectrum
from sdofreport.core.spectra import ResponseSpectrum
from sdofreport.engine.isolation_bounds import BOUND_RUNS, effective_at
from sdofreport.engine.plan import _fragility_systems, _pairs
from sdofreport.engine.results_types import (
    BoundRuns,
    Convergence,
    DemandStatistics,
    EnergyBalance,
    InelasticSpectra,
    SuiteStatistics,
)
from sdofreport.engine.suite import SuiteScaling
from sdofreport.project.check_quantities import CHECK_QUANTITIES
from sdofreport.project.model import Project, RecordSpec, SystemSpec
from sdofreport.records import Record

if TYPE_CHECKING:
    from sdofreport.core.isolation import EffectiveProperties


VERDICT_WITHIN = "within limit"


VERDICT_EXCEEDS = "exceeds limit"


#: Verdict of a check when the system ran away in at least one record (dynamic
#: instability: the displacement passed the stated bound; see ResponseResult.unstable).
VERDICT_UNSTABLE = "unstable"


@dataclass(frozen=True)
class RecordResult:
    """Everything computed for one record, as used (processed and scaled)."""

    spec: RecordSpec
    record: Record
    intensity: IntensityMeasures
    spectrum: ResponseSpectrum
    velocity_m_s: np.ndarray
    displacement_m: np.ndarray
    fourier_frequency_hz: np.ndarray
    fourier_amplitude_m_s: np.ndarray
    scale_factor: float = 1.0  # the suite-scaling factor applied on top of spec.scale


@dataclass(frozen=True)
class PairResult:
    """RotD spectra of a horizontal pair (scaled records), 5 % damping."""

    name: str
    h1: str
    h2: str
    rotd: RotDSpectrum  # scaled


@dataclass(frozen=True)
class ResponseResult:
    """Response of one system to one record: peaks [SI] and histories for plotting."""

    system_id: str
    record_id: str
    peak_displacement_m: float
    peak_velocity_m_s: float
    peak_total_accel_m_s2: float
    peak_drift_ratio: float | None
    peak_base_shear_n: float | None
    time_s: np.ndarray
    displacement_m: np.ndarray
    total_accel_m_s2: np.ndarray
    model: str = "linear"
    force_n: np.ndarray | None = None  # restoring force history (nonlinear)
    ductility: float | None = None
    residual_displacement_m: float | None = None
    peak_force_n: float | None = None
    energy: EnergyBalance | None = None  # nonlinear runs
    #: nonlinear one-direction runs: term ("input", "kinetic", ...) -> history [J]
    energy_histories_j: dict[str, np.ndarray] | None = None
    convergence: Convergence | None = None
    #: True when the displacement ran past ``instability_limit_m`` (histories end there)
    unstable: bool = False
    #: bound of the instability test [m]; None when the system has none
    instability_limit_m: float | None = None
    #: peak damper force [N]; None without a damper
    peak_damper_force_n: float | None = None
    #: 2 when the system moved in both horizontal directions under the record's pair;
    #: the peaks are then of the resultant and the histories along this record
    directions: int = 1
    #: two-direction runs: peak |u| along H1 and along H2 [m]
    peak_displacement_per_direction_m: tuple[float, float] | None = None


@dataclass(frozen=True)
class Check:
    """One limit check of one system over the suite."""

    system_id: str
    quantity: str
    limit: float  # SI
    demand: float  # SI, the suite statistic of the per-record peaks
    statistic: str  # mean | max
    ratio: float
    verdict: str  # VERDICT_WITHIN | VERDICT_EXCEEDS | VERDICT_UNSTABLE
    #: True when the statistic is of absolute values (|residual displacement|, ...)
    absolute: bool = False
    #: mean, median, p84, beta, min, max of the per-record peaks (SI; beta [-]), see
    #: sdofreport.core.fragility.demand_statistics; ``statistic`` names the governing one
    statistics: DemandStatistics | None = None
    #: with property_factors: the run whose demand governs (nominal, lower or upper)
    governing_run: str | None = None


@dataclass(frozen=True)
class FragilityResult:
    """Multiple-stripe fragility of one limit of one system (Baker 2015)."""

    system_id: str
    quantity: str
    measure: str  # "sa" (at the system's period and damping) or "pga"
    fit: Fragility  # levels and median in g
    design_level_g: float | None = None
    design_probability: float | None = None  # P(exceed | design level) [-]
    #: where the design level comes from (:data:`DESIGN_BASES`), None without one
    design_basis: str | None = None


#: Where a fragility's design level comes from: ``given`` ([fragility] design_level),
#: ``target`` (the horizontal target), ``vertical-target`` ([design_spectrum.vertical]),
#: ``no-vertical-target`` (a vertical system of a project without one: no level).
DESIGN_BASES = ("given", "target", "vertical-target", "no-vertical-target")


@dataclass
class Results:
    project: Project
    records: list[RecordResult]
    responses: dict[tuple[str, str], ResponseResult]  # (system id, record id)
    checks: list[Check]
    statistic: str
    scaling: SuiteScaling | None = None
    pairs: list[PairResult] = field(default_factory=list)
    inelastic: dict[str, InelasticSpectra] = field(default_factory=dict)  # by record id
    timings_s: dict[str, float] = field(default_factory=dict)
    cache_hits: int = 0
    cache_misses: int = 0
    fragility: list[FragilityResult] = field(default_factory=list)
    #: (system id, record id) -> the lower- and upper-bound runs, for systems with
    #: property_factors (the nominal run is in ``responses``)
    bounds: dict[tuple[str, str], BoundRuns] = field(default_factory=dict)
    #: sliding pendulums: system id -> {run: EffectiveProperties} at the suite statistic
    #: of the run's peak displacements (sdofreport.core.isolation)
    effective: dict[str, dict[str, EffectiveProperties]] = field(default_factory=dict)
    #: what the pages summarise over the suite (sdofreport.engine.suite_statistics); None only
    #: for the partial results the early record figures are drawn from
    statistics: SuiteStatistics | None = None

    def response(self, system_id: str, record_id: str) -> ResponseResult:
        return self.responses[(system_id, record_id)]

    @property
    def not_within(self) -> list[Check]:
        """Checks whose verdict is not "within limit": exceeding, or unstable."""
        return [check for check in self.checks
                if check.verdict in (VERDICT_EXCEEDS, VERDICT_UNSTABLE)]

    @property
    def exceeds(self) -> bool:
        return bool(self.not_within)


def _response_result(system: SystemSpec, record_id: str, raw: dict) -> ResponseResult:
    if raw["model"] == "linear":
        u_peak = raw["peak_displacement_m"]
        drift = u_peak / system.height_m if system.height_m else None
        shear = system.stiffness_n_m * u_peak if system.stiffness_n_m is not None else None
        return ResponseResult(system.id, record_id, u_peak, raw["peak_velocity_m_s"],
                              raw["peak_total_accel_m_s2"], drift, shear, raw["time_s"],
                              raw["displacement_m"], raw["total_accel_m_s2"])
    r = raw["response"]
    u_peak = float(r.peak_displacement_m)
    drift = u_peak / system.height_m if system.height_m else None
    model = system.model or {}
    energy = EnergyBalance(
        r.input_j, r.kinetic_j, r.damping_j, r.strain_j, r.hysteretic_j, r.imbalance,
        damper_j=r.damper_j if model.get("damper") is not None else None,
        gravity_j=r.gravity_j if model.get("gravity_stiffness_n_m") else None)
    return ResponseResult(
        system.id, record_id, u_peak, float(np.max(np.abs(r.velocity_m_s))),
        float(np.max(np.abs(r.total_accel_m_s2))), drift, float(r.peak_force_n),
        r.time_s, r.displacement_m, r.total_accel_m_s2, model=raw["model"],
        force_n=r.force_n, ductility=r.ductility,
        residual_displacement_m=float(r.residual_displacement_m),
        peak_force_n=float(r.peak_force_n), energy=energy,
        energy_histories_j=r.energy_histories_j,
        convergence=Convergence(bool(r.converged), int(r.max_iterations_used),
                                int(r.subdivided_steps)),
        unstable=bool(r.unstable),
        instability_limit_m=None if math.isinf(r.instability_limit_m)
        else float(r.instability_limit_m),
        peak_damper_force_n=float(r.peak_damper_force_n)
        if model.get("damper") is not None else None)


def _biaxial_result(system: SystemSpec, record_id: str, direction: int,
                    raw: dict) -> ResponseResult:
    """The response of a ``directions = 2`` system to the pair of ``record_id``: peaks of
    the resultant, histories along the record's own direction (0: H1, 1: H2)."""
    r = raw["biaxial"]
    u_peak = float(r.peak_displacement_m)
    drift = u_peak / system.height_m if system.height_m else None
    common = dict(directions=2, peak_displacement_per_direction_m=tuple(
        r.peak_displacement_per_direction_m), unstable=bool(r.unstable))
    if raw.get("one_direction"):  # a one-direction run through the biaxial kernel
        common.update(directions=1, peak_displacement_per_direction_m=None)
    if raw["model"] == "linear":
        return ResponseResult(system.id, record_id, u_peak, r.peak_velocity_m_s,
                              r.peak_total_accel_m_s2, drift, r.peak_force_n, r.time_s,
                              r.displacement_m[direction], r.total_accel_m_s2[direction],
                              **common)
    terms = dict(r.energy_j)
    supplied = terms["input_j"]
    total = sum(terms.get(k, 0.0) for k in ("kinetic_j", "damping_j", "damper_j",
                                              "strain_j", "hysteretic_j"))
    energy = EnergyBalance(**terms, imbalance=abs(supplied - total) / max(abs(supplied),
                                                                           1e-300))
    model = system.model or {}
    yield_m = (model["yield_strength_n"] / model["stiffness_n_m"]
               if "yield_strength_n" in model else None)
    limit = model.get("instability_limit_m")
    if r.peak_damper_force_n is not None:
        common["peak_damper_force_n"] = r.peak_damper_force_n
    return ResponseResult(
        system.id, record_id, u_peak, r.peak_velocity_m_s, r.peak_total_accel_m_s2, drift,
        r.peak_force_n, r.time_s, r.displacement_m[direction],
        r.total_accel_m_s2[direction], model=raw["model"], force_n=r.force_n[direction],
        ductility=None if yield_m is None else u_peak / yield_m,
        residual_displacement_m=float(np.hypot(*r.residual_displacement_m)),
        peak_force_n=r.peak_force_n, energy=energy,
        convergence=Convergence(bool(r.converged), int(r.max_iterations_used),
                                int(r.subdivided_steps)),
        instability_limit_m=limit, **common)


#: Check quantity -> ResponseResult attribute read for its per-record peak (from the
#: one registry, sdofreport.project.check_quantities).
CHECK_ATTRIBUTES = {key: q.attribute for key, q in CHECK_QUANTITIES.items()}


#: Check quantities whose per-record value carries a sign: their statistic is of |value|.
SIGNED_QUANTITIES = tuple(key for key, q in CHECK_QUANTITIES.items() if q.signed)


def _statistic(values: list[float], statistic: str) -> float:
    return float(np.mean(values)) if statistic == "mean" else float(np.max(values))


def _checks(project: Project, responses: dict, statistic: str) -> list[Check]:
    checks = []
    for system in project.systems:
        records = project.records_for(system)
        for quantity, limit in system.limits.items():
            peaks = [getattr(responses[(system.id, r.id)], CHECK_ATTRIBUTES[quantity])
                     for r in records]
            peaks = [p for p in peaks if p is not None]
            if not peaks:
                continue
            absolute = quantity in SIGNED_QUANTITIES or any(p < 0 for p in peaks)
            demand = _statistic([abs(p) for p in peaks], statistic)
            ratio = demand / limit
            verdict = VERDICT_WITHIN if ratio <= 1.0 else VERDICT_EXCEEDS
            if any(responses[(system.id, r.id)].unstable for r in records):
                verdict = VERDICT_UNSTABLE  # the demand of a runaway record means nothing
            checks.append(Check(system.id, quantity, limit, demand, statistic, ratio,
                                verdict, absolute, DemandStatistics.of(np.abs(peaks))))
    return checks


def _split_bounds(responses: dict) -> dict:
    """Move the bound runs out of ``responses``: (system id, record id) -> {run: result}."""
    bounds: dict = {}
    for (sid, rid) in [key for key in responses if "@" in key[0]]:
        system_id, run = sid.split("@")
        bounds.setdefault((system_id, rid), {})[run] = dataclasses.replace(
            responses.pop((sid, rid)), system_id=system_id)
    return bounds


def _governing_checks(project: Project, checks: list[Check], responses: dict,
                      bounds: dict, statistic: str) -> list[Check]:
    """With bound runs: each check of such a system takes the run of the largest demand
    ratio (an unstable run governs), naming it in ``governing_run``."""
    if not bounds:
        return checks
    bounded = {sid for sid, _ in bounds}
    per_run = {run: _checks(project, {**responses, **{k: v[run] for k, v in
                                                      bounds.items()}}, statistic)
               for run in BOUND_RUNS}
    out = []
    for i, check in enumerate(checks):
        if check.system_id not in bounded:
            out.append(check)
            continue
        options = [("nominal", check)] + [(run, per_run[run][i]) for run in BOUND_RUNS]
        run, best = max(options, key=lambda o: (o[1].verdict == VERDICT_UNSTABLE,
                                                 o[1].ratio))
        out.append(dataclasses.replace(best, governing_run=run))
    return out


def _effective_properties(project: Project, responses: dict, bounds: dict,
                          statistic: str) -> dict:
    """Effective period and damping of each sliding pendulum and each bilinear isolator
    with property_factors, per run, at the suite statistic of that run's peak
    (resultant) displacements."""
    out = {}
    for system in project.systems:
        model = system.model or {}
        if not system.is_isolator or (system.model_name == "bilinear" and
                                       not model.get("property_factors")):
            continue
        factors = dict(zip(BOUND_RUNS, model.get("property_factors") or ()))
        runs = {}
        for run, factor in [("nominal", 1.0), *factors.items()]:
            peaks = [(responses[(system.id, r.id)] if run == "nominal" else
                      bounds[(system.id, r.id)][run]).peak_displacement_m
                     for r in project.records_for(system)]
            demand = _statistic(peaks, statistic)
            if demand > 0:
                runs[run] = effective_at(model, factor)(demand)
        out[system.id] = runs
    return out


def run_exceeds(response: ResponseResult, quantity: str, limit: float) -> bool:
    """Whether one run exceeds a limit. A run that became unstable (the ``unstable``
    verdict of the checks), or did not give a finite number, exceeds every limit."""
    value = getattr(response, CHECK_ATTRIBUTES[quantity])
    if response.unstable or value is None or not np.isfinite(value):
        return True
    return abs(value) > limit


def _design_level(project: Project, system: SystemSpec) -> tuple[float | None, str | None]:
    """The level at which P(exceed) is stated [g] and its basis (:data:`DESIGN_BASES`):
    [fragility] design_level, else the target spectrum at the system's period (``sa``)
    or at T = 0 (``pga``), else (None, None). A vertical system reads the vertical target
    (``[design_spectrum.vertical]``), never the horizontal one: without a vertical
    target it has no design level."""
    spec = project.fragility
    if spec.design_level_g is not None:
        return spec.design_level_g, "given"
    if project.design_spectrum is None:
        return None, None
    period = system.period_s if spec.measure == "sa" else 0.0
    if system.direction == "vertical":
        vertical = project.design_spectrum.vertical
        if vertical is None:
            return None, "no-vertical-target"
        ordinates, basis = vertical.sa_g(np.array([period])), "vertical-target"
    else:
        ordinates = project.design_spectrum.spectrum().sa_g(np.array([period]))
        basis = "target"
    value = float(np.asarray(ordinates).ravel()[0])
    return (value, basis) if np.isfinite(value) and value > 0 else (None, None)


def _fragility_results(project: Project, outputs: list) -> list[FragilityResult]:
    """Counts of exceeding runs per level and limit, and their lognormal fit."""
    spec = project.fragility
    results, position = [], 0
    for system in _fragility_systems(project):
        stripes = outputs[position:position + len(spec.levels_g)]
        position += len(spec.levels_g)
        # two directions: one run per pair, named by its H1 record
        ids = [h1 for h1, _ in _pairs(project).values()] if system.directions == 2 \
            else [r.id for r in project.records_for(system)]
        responses = [[_biaxial_result(system, rid, 0, raw) if "biaxial" in raw else
                      _response_result(system, rid, {**raw, "time_s": np.zeros(0)}
                                       if raw["model"] == "linear" else raw)
                      for rid, raw in zip(ids, stripe["runs"])]
                     for stripe in stripes]
        design, basis = _design_level(project, system)
        for quantity, limit in system.limits.items():
            if getattr(responses[0][0], CHECK_ATTRIBUTES[quantity]) is None:
                continue
            exceeding = [sum(run_exceeds(r, quantity, limit) for r in runs)
                         for runs in responses]
            fit = fit_fragility(spec.levels_g, exceeding, [len(r) for r in responses])
            probability = None
            if fit.status == FITTED and design is not None:
                probability = exceedance_probability(design, fit.median, fit.beta)
            results.append(FragilityResult(system.id, quantity, spec.measure, fit, design,
                                           probability, basis))
    return results
