"""
Isolation practice around the engine: bound models and T_M at the bounds.

* :func:`bound_model` — the lower- or upper-bound model of an isolator system with
  ``property_factors`` (ASCE/SEI 7-16 §17.2.8.4, from memory): a sliding pendulum's
  friction coefficients, or a bilinear isolator's characteristic strength Q_d and
  post-yield stiffness k_d, multiplied by the factor
  (:func:`sdofreport.core.isolation.bilinear_bound_properties`).
* :func:`effective_at` — the effective properties of a system's run at a displacement
  (:mod:`sdofreport.core.isolation`).
* :func:`isolation_periods` — T_M at the upper- and the lower-bound properties, for the
  ``isolated-system`` scaling period range (ASCE/SEI 7-16 / 7-22 §17.3.3, from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from sdofreport.core.design_spectra import design_spectrum
from sdofreport.core.hysteresis import collapse_displacement
from sdofreport.core.isolation import (
    IsolatedPeriod,
    bilinear_bound_properties,
    bilinear_effective_properties,
    isolated_period,
    pendulum_effective_properties,
)
from sdofreport.core.units import G
from sdofreport.errors import ProjectError

#: The bound analyses of systems with property_factors, in the factors' order.
BOUND_RUNS = ("lower", "upper")


def bound_model(model: dict, factor: float) -> dict:
    """The engine's model of a bound run: ``model`` (without ``property_factors``) with
    the friction (sliding pendulum) or Q_d and k_d (bilinear) multiplied by ``factor``."""
    out = {k: v for k, v in model.items() if k != "property_factors"}
    if out["model"] == "sliding-pendulum":
        for key in ("friction", "friction_slow"):
            if key in out:
                out[key] = out[key] * factor
        return out
    strength, alpha = bilinear_bound_properties(out["stiffness_n_m"],
                                                out["yield_strength_n"],
                                                out["post_yield_ratio"], factor)
    collapse = collapse_displacement(out["stiffness_n_m"], strength, alpha,
                                     out.get("gravity_stiffness_n_m") or 0.0)
    out.update(yield_strength_n=strength, post_yield_ratio=alpha,
               collapse_displacement_m=None if math.isinf(collapse) else collapse)
    return out


def effective_at(model: dict, factor: float = 1.0):
    """D [m] -> EffectiveProperties of the isolator ``model`` with its properties
    multiplied by ``factor`` (1: nominal)."""
    if model["model"] == "sliding-pendulum":
        return lambda d: pendulum_effective_properties(
            model["weight_n"], model["radius_m"], model["friction"] * factor, d)
    run = bound_model(model, factor) if factor != 1.0 else model
    return lambda d: bilinear_effective_properties(
        model["mass_kg"] * G, run["stiffness_n_m"], run["yield_strength_n"],
        run["post_yield_ratio"], d)


def _mce_target(design):
    """T [s] -> S_a [g] of the MCE_R target (the level set to MCE_R where the kind has
    one; 5 % damping where it has a damping), the spectrum §17.5.3 reads."""
    parameters = dict(design.parameters)
    if "level" in parameters:
        parameters["level"] = "mce_r"
    if "damping" in parameters:
        parameters["damping"] = 0.05
    spectrum = design_spectrum(design.kind, **parameters)
    return lambda t: float(np.asarray(spectrum.sa_g(np.array([t]))).ravel()[0])


@dataclass(frozen=True)
class IsolationPeriods:
    """T_M of the isolated-system period range at the two bounds (ASCE/SEI 7-16 §17.3.3,
    from memory): the range runs from 0.75 T_M at the upper-bound properties to 1.25 T_M
    at the lower-bound properties."""

    #: id of the isolator system (``[scaling] isolator``)
    system: str
    #: the clause the range comes from (shown on the suite page)
    clause: str
    #: T_M and its effective properties at the upper-bound properties
    upper: IsolatedPeriod
    #: T_M and its effective properties at the lower-bound properties
    lower: IsolatedPeriod

    def runs(self) -> dict[str, IsolatedPeriod]:
        """``{"upper": ..., "lower": ...}`` in the order results.json writes them."""
        return {"upper": self.upper, "lower": self.lower}


def isolation_periods(project, option) -> IsolationPeriods:
    """
    T_M at the upper- and the lower-bound properties of ``[scaling] isolator``.

    Parameters
    ----------
    project : Project
    option : sdofreport.codes.PeriodRangeOption
        The edition's ``isolated-system`` option (its damping coefficient table).

    Returns
    -------
    IsolationPeriods
        T_M at the upper and the lower bound; without ``property_factors`` both are the
        nominal properties.

    Raises
    ------
    ProjectError
        When the target moves the isolator by no displacement up to 10 m.
    """
    system = next(s for s in project.systems if s.id == project.scaling.isolator)
    factors = (system.model or {}).get("property_factors") or (1.0, 1.0)
    target = _mce_target(project.design_spectrum)
    out = {}
    for run, factor in (("upper", factors[1]), ("lower", factors[0])):
        found = isolated_period(effective_at(system.model, factor), target,
                                option.damping_coefficient)
        if found is None:
            raise ProjectError(
                f"{project.path.name}: [scaling] isolator = {system.id!r}: the MCE_R "
                f"target gives no displacement of the isolator at its {run}-bound "
                f"properties (D_M = g S_a T_M²/(4π² B_M) has no root up to 10 m), so "
                f"T_M is not defined; check the isolator's properties, or give T_M as "
                f"[scaling] period without isolator")
        out[run] = found
    return IsolationPeriods(system=system.id, clause=option.isolation_clause, **out)
