"""The machine-readable results document (``data/results.json``) and CSV tables.

Keys are interface: schema tag ``sdofreport/results@1``; every value SI, with the unit
as a key suffix where it has one (``_g`` values are in standard gravities).
"""

from __future__ import annotations

import csv
import io

from sdofreport import __version__
from sdofreport.core.fragility import STATISTIC_KEYS
from sdofreport.core.units import G
from sdofreport.engine import Results
from sdofreport.project.check_quantities import CHECK_QUANTITIES
from sdofreport.engine.results_types import BoundRuns
from sdofreport.outputs.run_inputs import inputs_block
from sdofreport.outputs.serialize import (
    array_to_list,
    finite_or_none,
    intensity_to_dict,
    spectrum_csv_header,
    spectrum_csv_rows,
)
from sdofreport.engine.suite import usable_period_max_s

RESULTS_SCHEMA = "sdofreport/results@1"


def signoff_block(info) -> dict:
    """``signoff``: who prepared, checked and approved the document, with dates
    (``approved`` is None when nobody is named), and ``revisions``, oldest first."""
    approved = None
    if info.approved_by:
        approved = {"by": info.approved_by, "date": info.approved_date}
    return {
        "signoff": {"prepared": {"by": info.prepared_by, "date": info.prepared_date},
                    "checked": {"by": info.checked_by, "date": info.checked_date},
                    "approved": approved},
        "revisions": [{"revision": r.revision, "date": r.date,
                       "description": r.description, "by": r.by} for r in info.revisions],
    }


def project_block(results: Results) -> dict:
    info = results.project.info
    return {"title": info.title, "reference": info.reference, "revision": info.revision,
            "prepared_by": info.prepared_by, "checked_by": info.checked_by,
            "date": info.date, "display_units": info.display_units,
            "file": results.project.path.name, "sha256": results.project.source_sha256,
            **signoff_block(info)}


def settings_block(results: Results) -> dict:
    project = results.project
    return {"analysis": project.analysis.as_dict(),
            "processing": project.processing.as_dict(),
            "statistic_used": results.statistic}


def results_document(results: Results) -> dict:
    """The whole results.json document as plain data."""
    project = results.project
    records = []
    for item in results.records:
        record, spec = item.record, item.spec
        records.append({
            "id": record.id, "file": spec.file, "sha256": record.sha256,
            "dt_s": float(record.dt_s), "npts": int(record.npts), "scale": spec.scale,
            "scale_factor": item.scale_factor, "total_scale": spec.scale * item.scale_factor,
            "pair": spec.pair, "component": spec.component,
            "units": record.units, "format": record.file_format,
            "processing": list(record.history),
            "provenance": dict(spec.provenance),
            "usable_period_max_s": usable_period_max_s(spec),
            **intensity_to_dict(item.intensity),
        })
    spectra: dict = {}
    if results.records:
        first = results.records[0].spectrum
        spectra = {"periods_s": array_to_list(first.periods_s),
                   "damping": array_to_list(first.damping)}
    for item in results.records:
        spectrum = item.spectrum
        spectra[item.record.id] = {
            "sd_m": array_to_list(spectrum.sd_m),
            "psa_g": array_to_list(spectrum.psa_m_s2, 1.0 / G),
            "sa_g": array_to_list(spectrum.sa_m_s2, 1.0 / G),
            "sv_m_s": array_to_list(spectrum.sv_m_s),
        }
    systems = []
    for system in project.systems:
        responses = []
        for spec in project.records_for(system):
            response = results.response(system.id, spec.id)
            entry = {
                "record": spec.id,
                "peak_displacement_m": finite_or_none(response.peak_displacement_m),
                "peak_drift_ratio": None if response.peak_drift_ratio is None else
                finite_or_none(response.peak_drift_ratio),
                "peak_base_shear_n": None if response.peak_base_shear_n is None else
                finite_or_none(response.peak_base_shear_n),
                "peak_total_accel_g": finite_or_none(response.peak_total_accel_m_s2 / G),
            }
            if response.model != "linear":
                entry.update({
                    "ductility": None if response.ductility is None else
                    finite_or_none(response.ductility),
                    "residual_displacement_m": finite_or_none(
                        response.residual_displacement_m),
                    "peak_force_n": finite_or_none(response.peak_force_n),
                    "energy": {k: finite_or_none(v)
                               for k, v in response.energy.as_dict().items()},
                    "energy_units": "J",
                    "convergence": response.convergence.as_dict(),
                    "unstable": bool(response.unstable),
                    "instability_limit_m": response.instability_limit_m,
                })
                if response.peak_damper_force_n is not None:
                    entry["peak_damper_force_n"] = finite_or_none(
                        response.peak_damper_force_n)
            entry.update(_directions_entry(response))
            entry.update(_bounds_entry(results.bounds.get((system.id, spec.id))))
            responses.append(entry)
        checks = [{"quantity": c.quantity, "unit": CHECK_QUANTITIES[c.quantity].si_unit,
                   "limit": c.limit, "demand": c.demand, "statistic": c.statistic,
                   "ratio": c.ratio, "verdict": c.verdict, "of_absolute_values": c.absolute,
                   "basis": system.limits.basis_of(c.quantity),
                   "statistics": statistics_block(c),
                   **fragility_block(results, c),
                   **({"governing_run": c.governing_run} if c.governing_run else {})}
                  for c in results.checks if c.system_id == system.id]
        systems.append({
            "id": system.id, "name": system.name, "mass_kg": system.mass_kg,
            "stiffness_n_m": system.stiffness_n_m, "period_s": system.period_s,
            "frequency_hz": system.frequency_hz, "damping": system.damping,
            "height_m": system.height_m, "kind": system.kind, "model": system.model_name,
            "directions": system.directions,
            **_isolation_block(system, results),
            "derivation": "; ".join(system.derivation),
            **_mechanics_block(system),
            "responses": responses, "checks": checks,
        })
    document = {"schema": RESULTS_SCHEMA, "generator": f"sdofreport {__version__}",
                "project": project_block(results), "settings": settings_block(results),
                "statistic": results.statistic, "records": records, "spectra": spectra,
                "systems": systems}
    document.update(suite_blocks(results))
    document["inputs"] = inputs_block(results)
    return document


def _directions_entry(response) -> dict:
    """Two-direction runs: the peaks are of the resultant; the per-direction peaks."""
    if response.directions == 1:
        return {}
    return {"directions": 2, "peak_displacement_per_direction_m": [
        finite_or_none(v) for v in response.peak_displacement_per_direction_m]}


def _bounds_entry(bounds: BoundRuns | None) -> dict:
    """The lower- and upper-bound runs' peaks of one record (property_factors)."""
    if not bounds:
        return {}
    return {"bounds": {run: {
        "peak_displacement_m": finite_or_none(r.peak_displacement_m),
        "peak_drift_ratio": None if r.peak_drift_ratio is None else
        finite_or_none(r.peak_drift_ratio),
        "peak_base_shear_n": None if r.peak_base_shear_n is None else
        finite_or_none(r.peak_base_shear_n),
        "peak_force_n": None if r.peak_force_n is None else finite_or_none(r.peak_force_n),
        "peak_total_accel_g": finite_or_none(r.peak_total_accel_m_s2 / G),
        "residual_displacement_m": None if r.residual_displacement_m is None else
        finite_or_none(r.residual_displacement_m)} for run, r in bounds.items()}}


def _isolation_block(system, results) -> dict:
    """Property factors and effective properties of a sliding pendulum (when any)."""
    block: dict = {}
    model = system.model or {}
    if model.get("property_factors"):
        block["property_factors"] = list(model["property_factors"])
    runs = results.effective.get(system.id)
    if runs:
        block["effective_properties"] = {run: {
            "displacement_m": e.displacement_m, "stiffness_n_m": e.stiffness_n_m,
            "period_s": e.period_s, "damping": e.damping} for run, e in runs.items()}
    return block


def _isolation_periods_block(isolation) -> dict:
    """``scaling.isolation_periods``: T_M at the upper and the lower bound (SI)."""
    if not isolation:
        return {}
    return {"isolation_periods": {"system": isolation.system, **{run: {
        "period_s": found.effective.period_s,
        "displacement_m": found.effective.displacement_m,
        "stiffness_n_m": found.effective.stiffness_n_m,
        "damping": found.effective.damping,
        "damping_coefficient": found.damping_coefficient,
        "spectral_accel_g": found.spectral_accel_g}
        for run, found in isolation.runs().items()}}}


def _vertical_block(vertical) -> dict:
    """``vertical_spectrum``: the vertical target and the vertical records' factors."""
    if vertical is None:
        return {}
    return {"vertical_spectrum": {
        "kind": vertical.kind, "standard": vertical.standard, "scaled": vertical.scaled,
        "period_range_s": list(vertical.period_range_s),
        "records": [{"id": i, "factor": vertical.factors[i]} for i in vertical.record_ids],
        "ratio_min": vertical.ratio_min, "ratio_max": vertical.ratio_max,
        "periods_s": array_to_list(vertical.periods_s),
        "sa_g": array_to_list(vertical.target_sa_g), "cautions": list(vertical.cautions)}}


def statistics_block(check) -> dict:
    """``checks[].statistics``: mean, median, p84, min, max (the check's SI unit) and
    beta [-] of the per-record peaks; null where not defined."""
    return {key: finite_or_none(value) if value is not None else None
            for key, value in check.statistics.as_dict().items()}


def fragility_block(results: Results, check) -> dict:
    """``checks[].fragility`` (only for the systems of ``[fragility]``): the stripes'
    counts and the fitted lognormal curve; levels and median in ``unit`` (g)."""
    found = next((f for f in results.fragility if (f.system_id, f.quantity) ==
                  (check.system_id, check.quantity)), None)
    if found is None:
        return {}
    fit = found.fit
    return {"fragility": {
        "measure": found.measure, "unit": "g", "status": fit.status,
        "median": fit.median, "beta": fit.beta, "levels": list(fit.levels),
        "exceeding": list(fit.exceeding), "motions": list(fit.motions),
        "design_level": found.design_level_g,
        "design_probability": found.design_probability}}


def _mechanics_block(system) -> dict:
    """P-Δ, hysteresis parameters and damper of a system (each None when absent)."""
    model = system.model or {}
    pdelta = None
    if system.p_delta is not None:
        pdelta = {k: v for k, v in system.p_delta.items() if k != "weight_given"}
    hysteresis = None
    if "yield_strength_n" in model:
        hysteresis = {"yield_strength_n": model["yield_strength_n"],
                      "post_yield_ratio": model["post_yield_ratio"],
                      **model.get("parameters", {})}
    return {"p_delta": pdelta, "hysteresis_parameters": hysteresis,
            "damper": model.get("damper")}


def suite_blocks(results: Results) -> dict:
    """``design_spectrum``, ``scaling`` and ``pairs`` blocks (present when they apply)."""
    blocks: dict = {}
    project = results.project
    periods = results.records[0].spectrum.periods_s if results.records else []
    if project.design_spectrum is not None:
        design = project.design_spectrum
        blocks["design_spectrum"] = {
            "kind": design.kind, "parameters": dict(design.values),
            "periods_s": array_to_list(periods),
            "sa_g": array_to_list(design.spectrum().sa_g(periods))}
    scaling = results.scaling
    if scaling is not None:
        criteria = []
        if scaling.result is not None:
            criteria = [{"name": c.name, "required": c.required, "achieved": c.achieved,
                         "passed": bool(c.passed), "severity": c.severity,
                         "source": c.source, "comparison": c.comparison}
                        for c in scaling.result.criteria]
        blocks["scaling"] = {
            "rule": scaling.rule,
            "complies": scaling.complies,
            "standard": scaling.standard,
            "target_level": scaling.target_level,
            "target_damping": scaling.target_damping,
            "motions_counted": scaling.motions_counted,
            "period_range_option": scaling.period_range_option,
            "cautions": list(scaling.cautions),
            "period_range_s": list(scaling.period_range_s) if scaling.period_range_s
            else None,
            "records": [{"id": r.id, "factor": scaling.factors.get(r.id, 1.0)}
                        for r in project.records],
            "criteria": criteria,
            "motions": [{"id": name, "records": members}
                        for name, members in scaling.motions],
            "notes": list(scaling.notes)}
        blocks["scaling"].update(_isolation_periods_block(scaling.isolation))
        blocks.update(_vertical_block(scaling.vertical))
    if results.inelastic:
        spec = project.inelastic
        blocks["inelastic_spectra"] = {
            "periods_s": list(spec.periods_s), "damping": spec.damping,
            "post_yield_ratio": spec.post_yield_ratio,
            "steps_per_period": spec.steps_per_period,
            "ductility_targets": list(spec.ductility),
            "strength_reduction_factors": list(spec.strength_reduction),
            "records": {rid: {
                "strength_reduction_factor": array_to_list(
                    out.ductility.strength_reduction_factor),
                "ductility_demand": array_to_list(out.strength.ductility)}
                for rid, out in results.inelastic.items()}}
    if results.pairs:
        blocks["pairs"] = [{
            "id": pair.name, "h1": pair.h1, "h2": pair.h2,
            "damping": float(pair.rotd.damping),
            "rotd50_psa_g": array_to_list(pair.rotd.rotd50_psa_g),
            "rotd100_psa_g": array_to_list(pair.rotd.rotd100_psa_g),
            "geomean_psa_g": array_to_list(pair.rotd.geomean_psa_g),
            "srss_psa_g": array_to_list(pair.rotd.srss_psa_g)} for pair in results.pairs]
    return blocks


def _csv_text(rows: list[list]) -> str:
    buffer = io.StringIO()
    csv.writer(buffer, lineterminator="\n").writerows(rows)
    return buffer.getvalue()


def spectra_csv(results: Results) -> str:
    """``data/spectra.csv``: the header, then :func:`spectrum_csv_rows` of each record."""
    rows = [spectrum_csv_header(("record",))]
    for item in results.records:
        rows.extend(spectrum_csv_rows(item.spectrum, (item.record.id,)))
    return _csv_text(rows)


PEAKS_CSV_HEADER = ["system", "record", "peak_displacement_m", "peak_drift_ratio",
                    "peak_base_shear_n", "peak_total_accel_g"]


def peaks_csv(results: Results) -> str:
    rows: list[list] = [PEAKS_CSV_HEADER]
    for system in results.project.systems:
        for spec in results.project.records_for(system):
            r = results.response(system.id, spec.id)
            rows.append([system.id, spec.id, r.peak_displacement_m,
                         "" if r.peak_drift_ratio is None else r.peak_drift_ratio,
                         "" if r.peak_base_shear_n is None else r.peak_base_shear_n,
                         r.peak_total_accel_m_s2 / G])
    return _csv_text(rows)


#: ``data/checks.csv`` columns: the check, its governing statistic, then every statistic.
CHECKS_CSV_HEADER = ["system", "quantity", "unit", "limit", "demand", "governing_statistic",
                     "ratio", "verdict", *STATISTIC_KEYS]


def checks_csv(results: Results) -> str:
    """``data/checks.csv``: one row per check, SI (``unit``; ``beta`` dimensionless)."""
    rows: list[list] = [CHECKS_CSV_HEADER]
    for c in results.checks:
        statistics = statistics_block(c)
        rows.append([c.system_id, c.quantity, CHECK_QUANTITIES[c.quantity].si_unit,
                     c.limit, c.demand, c.statistic, c.ratio, c.verdict,
                     *("" if statistics.get(k) is None else statistics[k]
                       for k in STATISTIC_KEYS)])
    return _csv_text(rows)
