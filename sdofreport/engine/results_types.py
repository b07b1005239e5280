"""Typed parts of the engine's results: what a response, a check and the suite hold.

Plain frozen dataclasses, no rendering: the engine (:mod:`sdofreport.engine`) fills
them and the site, ``results.json``, the CSV tables and the workbook only read and
format them. Every field has a type; none is a catch-all ``dict`` or ``object``.
Where a machine-readable output keeps a key order, ``as_dict`` gives the fields in
that order.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING

import numpy as np

from sdofreport.core.fragility import STATISTIC_KEYS, demand_statistics
from sdofreport.core.inelastic_spectra import (
    ConstantDuctilitySpectrum,
    ConstantStrengthSpectrum,
)

if TYPE_CHECKING:  # the response type stays in the engine; no import cycle at run time
    from sdofreport.engine import ResponseResult


@dataclass(frozen=True)
class EnergyBalance:
    """Energy terms at the end of a nonlinear run [J] and the relative imbalance [-]
    (Uang & Bertero 1990, relative-motion energy equation)."""

    input_j: float
    kinetic_j: float
    damping_j: float
    strain_j: float
    hysteretic_j: float
    #: |input − (kinetic + damping + strain + hysteretic (+ damper, gravity))| / input [-]
    imbalance: float
    #: energy dissipated by a viscous damper element; None without one [J]
    damper_j: float | None = None
    #: work of the gravity (P-Δ) stiffness; None without one [J]
    gravity_j: float | None = None

    def as_dict(self) -> dict[str, float]:
        """The terms in the order of ``results.json`` (``energy``); absent ones left out."""
        out = {"input_j": self.input_j, "kinetic_j": self.kinetic_j,
               "damping_j": self.damping_j, "strain_j": self.strain_j,
               "hysteretic_j": self.hysteretic_j, "imbalance": self.imbalance}
        if self.damper_j is not None:
            out["damper_j"] = self.damper_j
        if self.gravity_j is not None:
            out["gravity_j"] = self.gravity_j
        return out


@dataclass(frozen=True)
class Convergence:
    """How the nonlinear integration of one run went."""

    converged: bool
    max_iterations_used: int
    subdivided_steps: int

    def as_dict(self) -> dict[str, bool | int]:
        """``results.json``'s ``convergence`` block."""
        return {"converged": self.converged,
                "max_iterations_used": self.max_iterations_used,
                "subdivided_steps": self.subdivided_steps}


@dataclass(frozen=True)
class DemandStatistics:
    """Statistics of one check's per-record peaks (absolute values) over the suite, in
    the check's SI unit (``beta`` [-]); see
    :func:`sdofreport.core.fragility.demand_statistics`. None where not defined."""

    mean: float | None
    median: float | None
    p84: float | None
    beta: float | None
    min: float | None
    max: float | None

    @classmethod
    def of(cls, values) -> DemandStatistics:
        """The statistics of ``values`` (per-record peaks, absolute)."""
        return cls(**demand_statistics(values))

    def get(self, key: str) -> float | None:
        """One statistic by its key (:data:`~sdofreport.core.fragility.STATISTIC_KEYS`)."""
        if key not in STATISTIC_KEYS:
            raise KeyError(key)
        return getattr(self, key)

    def as_dict(self) -> dict[str, float | None]:
        """The statistics in :data:`~sdofreport.core.fragility.STATISTIC_KEYS` order."""
        return {key: getattr(self, key) for key in STATISTIC_KEYS}


@dataclass(frozen=True)
class InelasticSpectra:
    """Inelastic spectra of one record (bilinear SDOF; Miranda & Bertero 1994)."""

    ductility: ConstantDuctilitySpectrum
    strength: ConstantStrengthSpectrum


# ---------------------------------------------------------------------------------------
# Suite statistics: computed once by the engine (sdofreport.engine.suite_statistics)


@dataclass(frozen=True)
class SpectrumBand:
    """Statistics across the records of one spectral ordinate, period by period: the
    arithmetic mean (the statistic the scaling criteria test) and the log-normal band,
    geometric mean and exp(mean ± 1σ) of the natural logarithms (σ with n − 1)."""

    mean: np.ndarray
    geometric_mean: np.ndarray
    lower: np.ndarray
    upper: np.ndarray

    def scaled(self, factor: float) -> SpectrumBand:
        """The band in another unit (every statistic is proportional to the values)."""
        if factor == 1.0:
            return self
        return SpectrumBand(self.mean * factor, self.geometric_mean * factor,
                            self.lower * factor, self.upper * factor)


@dataclass(frozen=True)
class PeakStatistics:
    """One statistic (mean or maximum) over a system's records of each response peak
    [SI]; None when a record's run has no such peak (no height, no yielding...)."""

    displacement_m: float
    drift_ratio: float | None
    base_shear_n: float | None
    total_accel_m_s2: float
    ductility: float | None
    #: of |residual displacement| [m]
    residual_displacement_abs_m: float | None


@dataclass(frozen=True)
class SystemStatistics:
    """A system's peaks over its records: mean, maximum and the suite statistic."""

    mean: PeakStatistics
    maximum: PeakStatistics
    #: the suite statistic (Results.statistic) of the peak displacements [m]
    demand_displacement_m: float
    #: with property_factors: run ("lower", "upper") -> the suite statistic of that
    #: run's peak displacements [m]
    bound_displacement_m: dict[str, float] = field(default_factory=dict)


@dataclass(frozen=True)
class InelasticMeans:
    """Suite means (NaN-skipping) of the inelastic spectra, row per target."""

    #: (ductility targets × periods): mean strength reduction factor R [-]
    strength_reduction_factor: np.ndarray
    #: (strength reduction factors × periods): mean ductility demand μ [-]
    ductility_demand: np.ndarray


@dataclass(frozen=True)
class SuiteStatistics:
    """Everything the pages summarise over the suite, computed once by the engine."""

    #: the suite statistic of the checks: "mean" or "max"
    statistic: str
    #: row of the records' spectra nearest 5 % damping, and that ratio [-]
    damping_index: int
    damping: float
    #: pseudo-spectral acceleration at ``damping`` [g]
    psa_g: SpectrumBand
    #: spectral displacement at ``damping`` [m]
    sd_m: SpectrumBand
    #: the scaling criterion's spectra (per motion) [g]; None without one
    criterion_g: SpectrumBand | None
    #: the vertical records' spectra against the vertical target [g]; None without
    vertical_g: SpectrumBand | None
    #: system id -> its peaks' statistics
    systems: dict[str, SystemStatistics]
    #: None without [inelastic_spectra]
    inelastic: InelasticMeans | None = None


@dataclass(frozen=True)
class BoundRuns:
    """The lower- and upper-bound runs of one system and record (property_factors)."""

    lower: ResponseResult
    upper: ResponseResult

    def __getitem__(self, run: str) -> ResponseResult:
        if run not in ("lower", "upper"):
            raise KeyError(run)
        return getattr(self, run)

    def items(self) -> list[tuple[str, ResponseResult]]:
        """(run, result) in run order."""
        return [("lower", self.lower), ("upper", self.upper)]


__all__ = ["BoundRuns", "Convergence", "DemandStatistics", "EnergyBalance",
           "InelasticMeans", "InelasticSpectra", "PeakStatistics", "SpectrumBand",
           "SuiteStatistics", "SystemStatistics"]
