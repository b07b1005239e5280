"""The ``inputs`` block of results.json: every input that can change a number.

A revision is reviewable only if every changed input shows: a pier's raised yield
strength flips its verdict, so it must appear between the two runs. The block lists,
SI with unit-suffixed keys, each system's whole property set as written and as used by
the engine (yield strength, post-yield ratio, friction, radius, ...), its limits and
their basis, each record's file hash, declared units, time step, scale and suite
factor, processing, the scaling options, the design spectrum's parameters, the spectrum
grid and the optional inelastic and synthetic settings. ``sdofreport compare`` and the
revision page diff it key by key.
"""

from __future__ import annotations

import dataclasses
import hashlib
import json

from sdofreport.project.quantities import DIMENSIONS
from sdofreport.project.schema import SECTIONS

#: Key suffix of each dimension's SI unit (results.json naming).
SUFFIXES = {"length": "_m", "mass": "_kg", "time": "_s", "force": "_n",
            "stiffness": "_n_m", "acceleration": "_m_s2", "pressure": "_pa",
            "second_moment": "_m4", "inertia": "_kg_m2", "frequency": "_hz",
            "slowness": "_s_m"}
assert set(SUFFIXES) == set(DIMENSIONS)


def _si_name(section: str, key: str) -> str:
    """``yield_strength`` -> ``yield_strength_n`` from the key's dimension."""
    spec = SECTIONS[section].get(key)
    if spec is not None and spec.type == "quantity" and spec.dimension:
        return key + SUFFIXES[spec.dimension]
    return key


def _network(node):
    """A spring network with each leaf ``k`` renamed ``k_n_m`` (values already SI)."""
    if isinstance(node, dict):
        return {("k_n_m" if key == "k" else key): _network(value)
                for key, value in node.items()}
    if isinstance(node, list):
        return [_network(item) for item in node]
    return node


def _system(system, statistic: str) -> dict:
    given = {}
    for key, value in sorted(system.inputs.items()):
        given[_si_name("systems[]", key)] = _network(value) if key == "network" else value
    limits = {}
    for quantity, value in system.limits.items():
        limits[_si_name("systems[].limits", quantity)] = value
    return {
        "kind": system.kind, "damping": system.damping, "given": given,
        "mass_kg": system.mass_kg, "stiffness_n_m": system.stiffness_n_m,
        "period_s": system.period_s, "height_m": system.height_m,
        "model": dict(sorted((system.model or {"model": "linear"}).items())),
        "limits": limits,
        # What a limit is compared with: the suite statistic of the per-record peaks, and
        # the height a drift ratio is taken over.
        "limit_basis": {"statistic": statistic, "height_m": system.height_m},
    }


def _record(item) -> dict:
    spec = item.spec
    return {
        "file": spec.file, "sha256": item.record.sha256, "format": spec.file_format,
        "units": spec.units, "dt_s": spec.dt_s, "scale": spec.scale,
        "scale_factor": item.scale_factor, "processing": spec.processing.as_dict(),
        "pair": spec.pair, "component": spec.component,
        "amplitude_ok": spec.amplitude_ok,
    }


def _plain(spec) -> dict | None:
    """Every field of a settings dataclass (tuples as lists), so a field added later is
    recorded too; None for an absent section."""
    if spec is None:
        return None
    return {key: list(value) if isinstance(value, tuple) else value
            for key, value in dataclasses.asdict(spec).items()}


def _grid(periods_s) -> dict:
    """A period grid by its count, ends and the SHA-256 of its values as JSON."""
    values = [float(p) for p in periods_s]
    digest = hashlib.sha256(json.dumps(values).encode("ascii")).hexdigest()
    return {"count": len(values), "min_s": min(values, default=None),
            "max_s": max(values, default=None), "sha256": digest}


def inputs_block(results) -> dict:
    """
    The ``inputs`` block of results.json (plain data, SI, unit-suffixed keys).

    Parameters
    ----------
    results : sdofreport.engine.Results

    Returns
    -------
    dict
        ``plain_numbers``, ``analysis``, ``processing``, ``scaling``,
        ``design_spectrum``, ``inelastic_spectra``, ``synthetic_records`` (None when the
        section is absent), ``records`` and ``systems`` (by id).
    """
    project = results.project
    analysis = project.analysis
    scaling = project.scaling
    design = project.design_spectrum
    inelastic = project.inelastic
    synthetic = project.synthetic
    return {
        "plain_numbers": project.info.plain_numbers,
        "analysis": {"method": analysis.method, "damping": list(analysis.damping),
                     "periods": _grid(analysis.periods_s),
                     "statistic": analysis.statistic, "statistic_used": results.statistic},
        "processing": project.processing.as_dict(),
        # [scaling] isolator only when set, so projects without it record what they did
        "scaling": {key: value for key, value in _plain(scaling).items()
                    if key != "isolator" or value is not None},
        "design_spectrum": None if design is None else {
            "kind": design.kind,
            "parameters": dict(sorted(design.parameters.items())),
            **({} if design.vertical is None else {"vertical": {
                "kind": design.vertical.kind,
                "parameters": dict(sorted(design.vertical.parameters.items())),
                "period_range_s": None if design.vertical.period_range_s is None else
                list(design.vertical.period_range_s)}})},
        "inelastic_spectra": None if inelastic is None else {
            **{key: value for key, value in _plain(inelastic).items()
               if key != "periods_s"}, "periods": _grid(inelastic.periods_s)},
        "synthetic_records": _plain(synthetic),
        "records": {item.spec.id: _record(item) for item in results.records},
        "systems": {system.id: _system(system, results.statistic)
                    for system in project.systems},
    }
