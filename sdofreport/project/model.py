"""Validated, SI-only description of a project (what the loader returns)."""

from __future__ import annotations

import re

from dataclasses import dataclass, field, make_dataclass
from pathlib import Path

from sdofreport.project.check_quantities import CHECK_QUANTITIES


@dataclass(frozen=True)
class ProcessingSettings:
    """Record processing; every step off unless set (Boore & Bommer 2005)."""

    baseline_order: int | None = None
    bandpass_hz: tuple[float, float] | None = None  # [Hz]
    filter_order: int = 4
    taper_s: float | None = None  # [s]

    def as_dict(self) -> dict:
        return {"baseline_order": self.baseline_order,
                "bandpass_hz": list(self.bandpass_hz) if self.bandpass_hz else None,
                "filter_order": self.filter_order, "taper_s": self.taper_s}


def natural_key(identifier: str) -> tuple:
    """
    Sort key that orders ids as people read them: ``P2`` before ``P10``, ``hcs9`` before
    ``hcs10`` (digit runs compared as numbers, the rest without regard to case).
    """
    parts = re.split(r"(\d+)", str(identifier))
    return tuple(int(part) if index % 2 else part.casefold()
                 for index, part in enumerate(parts)) + (str(identifier),)


@dataclass(frozen=True)
class Revision:
    """One row of ``[[project.revisions]]``: the history of the document's issues."""

    revision: str
    date: str | None = None
    description: str | None = None
    by: str | None = None


@dataclass(frozen=True)
class ProjectInfo:
    title: str
    reference: str
    revision: str
    prepared_by: str
    checked_by: str | None = None
    date: str | None = None
    notes_path: Path | None = None
    notes_file: str | None = None  # as written in the project file
    display_units: str = "SI"
    plain_numbers: str | None = None  # "SI": bare numbers of dimensional keys are SI
    prepared_date: str | None = None
    checked_date: str | None = None
    approved_by: str | None = None
    approved_date: str | None = None
    revisions: tuple[Revision, ...] = ()


@dataclass(frozen=True)
class AnalysisSettings:
    method: str = "exact"
    damping: tuple[float, ...] = (0.05,)
    periods_s: tuple[float, ...] = ()
    statistic: str = "auto"

    def as_dict(self) -> dict:
        return {"method": self.method, "damping": list(self.damping),
                "periods_s": {"count": len(self.periods_s), "min": min(self.periods_s),
                              "max": max(self.periods_s)},
                "statistic": self.statistic}


@dataclass(frozen=True)
class SyntheticSpec:
    """Spectrum-compatible records made from the design spectrum (seeded)."""

    count: int = 7
    duration_s: float = 20.0
    dt_s: float = 0.01
    seed: int = 1
    envelope: str = "saragoni-hart"
    period_range_s: tuple[float, float] = (0.05, 4.0)


@dataclass(frozen=True)
class RecordSpec:
    id: str
    path: Path | None  # absolute; None for a synthetic record made at build time
    file: str  # as written in the project file
    file_format: str = "auto"
    units: str = "g"
    dt_s: float | None = None
    scale: float = 1.0
    processing: ProcessingSettings = field(default_factory=ProcessingSettings)
    pair: str | None = None
    component: str | None = None  # "H1" | "H2"
    amplitude_ok: bool = False  # PGA and header-unit checks acknowledged by the user
    #: provenance keys given in the project file, ((key, value), ...) in the order of
    #: sdofreport.project.schema.PROVENANCE_KEYS (distance in km, Vs30 in m/s)
    provenance: tuple[tuple[str, object], ...] = ()


@dataclass(frozen=True)
class VerticalSpectrumSpec:
    """The vertical target ``[design_spectrum.vertical]``: kind, values as shown (given
    or derived, with where each came from) and the core parameters."""

    kind: str
    #: (label, value, basis) rows for the page, in order
    values: tuple
    #: keyword arguments of sdofreport.core.vertical_spectra.vertical_design_spectrum
    parameters: dict
    #: [low, high] fitting range as given [s], or None (the default range)
    period_range_s: tuple[float, float] | None = None

    def sa_g(self, periods_s):
        """The vertical target at ``periods_s`` [s], in g (NaN where undefined)."""
        from sdofreport.core.vertical_spectra import vertical_design_spectrum

        return vertical_design_spectrum(periods_s, self.kind, **self.parameters)


@dataclass(frozen=True)
class DesignSpectrumSpec:
    """A design spectrum: its kind, the project-file values and the core parameters."""

    kind: str
    values: dict  # as written (SI/g numbers), for display and results.json
    parameters: dict  # keyword arguments of sdofreport.core.design_spectra.design_spectrum
    #: the vertical target, or None when the project gives none
    vertical: VerticalSpectrumSpec | None = None

    def spectrum(self):
        from sdofreport.core.design_spectra import design_spectrum

        return design_spectrum(self.kind, **self.parameters)


@dataclass(frozen=True)
class ScalingSpec:
    rule: str = "none"
    period_s: float | None = None
    period_range_s: tuple[float, float] | None = None  # explicit [low, high] [s]
    suite_factor: float = 1.0
    #: named period-range option (sdofreport.codes), None when explicit
    period_range_option: str | None = None
    #: "exclude": ordinates beyond a record's usable period are left out of scaling;
    #: "include": the project overrides that
    beyond_usable: str = "exclude"
    #: period_range "isolated-system": id of the isolator system whose T_M is computed
    #: at its bounds; None: T_M = period
    isolator: str | None = None


@dataclass(frozen=True)
class FragilitySpec:
    """Optional multiple-stripe fragility: levels [g] of a measure, systems to run."""

    levels_g: tuple[float, ...]
    measure: str = "sa"
    systems: tuple[str, ...] = ()
    design_level_g: float | None = None


@dataclass(frozen=True)
class InelasticSpectraSpec:
    """Optional constant-ductility and constant-strength spectra of every record."""

    ductility: tuple[float, ...] = (2.0, 4.0, 6.0)
    strength_reduction: tuple[float, ...] = (2.0, 4.0)
    periods_s: tuple[float, ...] = ()
    damping: float = 0.05
    post_yield_ratio: float = 0.0
    #: fewest integration steps per initial period (>= 4) [-]
    steps_per_period: float = 8.0


#: One SI field per check quantity (``displacement_m``, ``drift_ratio``, ...; None where
#: not checked), made from the registry so a quantity added there is a field here.
_LimitValues = make_dataclass(
    "_LimitValues", [(q.limit_name, "float | None", field(default=None))
                     for q in CHECK_QUANTITIES.values()], frozen=True)
_LimitValues.__module__ = __name__


@dataclass(frozen=True)
class Limits(_LimitValues):
    """Limits in SI, one field per check quantity of
    :data:`sdofreport.project.check_quantities.CHECK_QUANTITIES` (named by its
    ``limit_name``); ``None`` where not checked."""

    #: (quantity, basis) for limits that state where they come from (a clause, the
    #: owner's specification), in the order of :meth:`items`.
    basis: tuple[tuple[str, str], ...] = ()

    @classmethod
    def of(cls, values: dict[str, float | None],
           basis: tuple[tuple[str, str], ...] = ()) -> Limits:
        """Limits from values by quantity key (``{"displacement": 0.05}``) [SI]."""
        return cls(**{CHECK_QUANTITIES[key].limit_name: value
                      for key, value in values.items()}, basis=basis)

    def basis_of(self, quantity: str) -> str | None:
        """The stated basis of the limit on ``quantity``, or None."""
        return dict(self.basis).get(quantity)

    def items(self) -> list[tuple[str, float]]:
        """(quantity, limit) pairs that are set, in the registry's order."""
        values = ((q.key, getattr(self, q.limit_name)) for q in CHECK_QUANTITIES.values())
        return [(n, v) for n, v in values if v is not None]


@dataclass(frozen=True)
class SystemSpec:
    """A linear single-degree-of-freedom system in SI units."""

    id: str
    name: str
    damping: float  # [-]
    period_s: float
    mass_kg: float | None = None
    stiffness_n_m: float | None = None
    height_m: float | None = None
    limits: Limits = field(default_factory=Limits)
    derivation: tuple[str, ...] = ()  # formulas used, human readable
    kind: str = "lumped"
    model: dict | None = None  # nonlinear model parameters for the engine (SI)
    inputs: dict = field(default_factory=dict)  # the builder's inputs (SI), for display
    #: P-Δ when on: gravity_load_n, height_m, gravity_stiffness_n_m, stability_coefficient
    #: θ = W/(k h), period_s (elastic, with P-Δ: T/√(1−θ)), weight_given
    p_delta: dict | None = None
    #: 1: each record drives its own one-direction oscillator; 2: each horizontal pair
    #: drives one oscillator in both directions (sdofreport.core.biaxial)
    directions: int = 1
    #: "horizontal" (driven by the horizontal records) or "vertical" (by component V)
    direction: str = "horizontal"

    @property
    def frequency_hz(self) -> float:
        return 1.0 / self.period_s

    @property
    def model_name(self) -> str:
        """``linear``, ``elastic`` (with a damper), a hysteresis model name or
        ``sliding-pendulum``."""
        return (self.model or {}).get("model", "linear")

    @property
    def is_isolator(self) -> bool:
        """A sliding pendulum of finite radius, or a bilinear yielding system (an
        isolator whose bounds and T_M sdofreport.engine.isolation_bounds computes)."""
        if self.model_name == "sliding-pendulum":
            return self.model["radius_m"] != float("inf")
        return self.model_name == "bilinear"


@dataclass(frozen=True)
class Project:
    path: Path  # the project file, absolute
    source_sha256: str
    info: ProjectInfo
    analysis: AnalysisSettings
    processing: ProcessingSettings
    records: tuple[RecordSpec, ...]
    systems: tuple[SystemSpec, ...]
    design_spectrum: DesignSpectrumSpec | None = None
    scaling: ScalingSpec = field(default_factory=ScalingSpec)
    inelastic: InelasticSpectraSpec | None = None
    synthetic: SyntheticSpec | None = None
    fragility: FragilitySpec | None = None

    @property
    def root(self) -> Path:
        return self.path.parent

    def records_for(self, system) -> tuple:
        """The records that drive ``system``: component V for a vertical system, the
        others for a horizontal one."""
        vertical = system.direction == "vertical"
        return tuple(r for r in self.records if (r.component == "V") == vertical)

    @property
    def motions_counted(self) -> int:
        """Ground motions as the standards count them: a horizontal pair is one
        (vertical records are not counted)."""
        pairs = {r.pair for r in self.records if r.pair}
        return len(pairs) + sum(1 for r in self.records if not r.pair and
                                r.component != "V")

    @property
    def statistic_used(self) -> str:
        """``mean`` or ``max``: ``auto`` resolved by the governing edition."""
        return self.statistic_choice[0]

    @property
    def statistic_choice(self) -> tuple[str, str]:
        """(``mean`` or ``max``, why), ``auto`` resolved by the governing edition
        counting motions (:func:`sdofreport.codes.auto_statistic`)."""
        if self.analysis.statistic != "auto":
            return self.analysis.statistic, "as set in the project file"
        from sdofreport.codes import auto_statistic

        return auto_statistic(self.scaling.rule, self.motions_counted)
