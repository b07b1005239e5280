"""Page contexts: everything a template shows, formatted for display, plus the figures
each page needs (as specifications; drawing happens in :mod:`sdofreport.site.render`).

Nothing here recomputes a result: values come from :class:`sdofreport.engine.Results`.
"""

from __future__ import annotations

import platform
from dataclasses import dataclass, field
from importlib import metadata

import numpy as np

from sdofreport import __version__, codes
from sdofreport.engine import vertical_suite
from sdofreport.core.fragility import STATISTIC_KEYS
from sdofreport.core.processing import pad_length_s
from sdofreport.core.units import G
from sdofreport.engine import VERDICT_EXCEEDS, VERDICT_UNSTABLE, Results
from sdofreport.errors import BuildError
from sdofreport.project.ids import SAFE_ID, SAFE_ID_TEXT
from sdofreport.project.schema import HYSTERESIS_PARAMETER_KEYS
from sdofreport.site import design_formulas, provenance
from sdofreport.site.display import CHECK_LABELS, Display, number
from sdofreport.engine.suite import usable_period_max_s
from sdofreport.site.notes import render_notes
from sdofreport.outputs.results_json import signoff_block
from sdofreport.engine.results_types import Convergence, SpectrumBand

CAUTION_SHORT = ("These results support, but never replace, the judgement of a licensed "
                 "engineer. The governing local code and the authority having jurisdiction "
                 "prevail. Verdicts are checks of the stated limits, not an approval.")

CAUTION_FULL = (
    "This site was generated automatically from the inputs listed under Provenance.",
    "Its results support, but never replace, the judgement of a licensed professional "
    "engineer, who remains responsible for the model, the inputs and their "
    "interpretation.",
    "The governing local building code and the authority having jurisdiction prevail over "
    "anything shown here.",
    "A verdict of 'within limit' or 'exceeds limit' only compares a computed demand with "
    "a limit stated in the project file; it is not a design approval or certification.",
)

#: Dependencies whose versions are reported in the provenance and the manifest.
DEPENDENCIES = ("numpy", "scipy", "numba", "matplotlib", "jinja2", "markdown", "click",
                "pint")

STATISTIC_TEXT = {"mean": "mean", "max": "maximum"}


def dependency_versions() -> list[tuple[str, str]]:
    versions = [("python", platform.python_version())]
    for name in DEPENDENCIES:
        try:
            versions.append((name, metadata.version(name)))
        except metadata.PackageNotFoundError:
            versions.append((name, "not installed"))
    return versions


def statistic_reason(results: Results) -> str:
    """Why the suite statistic is what it is (the governing edition's rule)."""
    reason = results.project.statistic_choice[1]
    if results.project.analysis.statistic == "auto":
        return f"chosen automatically: {reason}"
    return reason


def suite_status(scaling) -> dict | None:
    """Whether the suite complies with the edition, in plain words, for the summary's
    first lines and the suite page; None when nothing is scaled."""
    if scaling is None or scaling.result is None:
        return None
    name = scaling.standard or "the scaling rule"
    failed = scaling.failed
    reasons = [f"{c.name}: {_criterion_number(c.achieved)}, required {c.comparison} "
               f"{_criterion_number(c.required)} ({c.source})" for c in failed]
    if failed:
        headline = f"The record suite does not comply with {name}."
    elif scaling.cautions:
        headline = (f"The record suite meets every scaling criterion of {name} as "
                    f"configured, but see the caution below.")
    else:
        headline = f"The record suite meets every scaling criterion of {name}."
    return {"complies": not failed, "headline": headline, "reasons": reasons,
            "cautions": list(scaling.cautions)}


@dataclass
class FigureSpec:
    """One figure to draw: output path (relative to the site), function name, arguments."""

    path: str
    function: str
    kwargs: dict = field(default_factory=dict)


@dataclass
class Page:
    path: str
    template: str
    context: dict


def page_name(identifier: str) -> str:
    """File name of a record's or system's page (in records/ or systems/)."""
    return f"{_checked_id(identifier)}.html"


#: Separator between the parts of a figure name; ids cannot contain it
#: (:data:`sdofreport.project.ids.SAFE_ID`), nor can the fixed figure kinds.
FIGURE_SEPARATOR = "~"
#: Figure kinds named after ids, and how many ids each takes (system, record or pair).
FIGURE_KINDS = {"record-histories": 1, "record-psa": 1, "record-sd": 1,
                "record-fourier": 1, "pair": 1, "system-response": 2, "system-loop": 2,
                "system-spectra": 1}


def _checked_id(identifier: str) -> str:
    if not isinstance(identifier, str) or not SAFE_ID.match(identifier):
        raise BuildError(f"id {identifier!r} cannot name a file of the site; expected "
                         f"{SAFE_ID_TEXT}.")
    return identifier


def figure_path(kind: str, *ids: str) -> str:
    """
    ``figures/<kind>~<id>[~<id>].svg``: distinct (kind, system, record) never share a
    name, since neither a kind nor an id may contain ``~`` (or ``/``); figures named
    by the site alone (``summary-checks``, ``suite-psa``...) hold no ``~`` at all.
    """
    if FIGURE_KINDS.get(kind) != len(ids):
        raise ValueError(f"figure kind {kind!r} takes {FIGURE_KINDS.get(kind)} ids; "
                         f"got {len(ids)}")
    return f"figures/{FIGURE_SEPARATOR.join([kind, *map(_checked_id, ids)])}.svg"


class SiteContext:
    """Builds every page's context and figure list for one :class:`Results`."""

    def __init__(self, results: Results) -> None:
        self.results = results
        self.project = results.project
        self.display = Display(self.project.info.display_units)
        self.figures: list[FigureSpec] = []
        self._figure_paths: set[str] = set()
        self.system_periods = [s.period_s for s in self.project.systems]

    # -- shared ----------------------------------------------------------------------
    def common(self, root: str, page_title: str, page_kind: str, current_id: str = "") -> dict:
        info = self.project.info
        return {
            "root": root, "page_title": page_title, "page_kind": page_kind,
            "current_id": current_id, "version": __version__,
            "project": {"title": info.title, "reference": info.reference,
                        "revision": info.revision, "prepared_by": info.prepared_by,
                        "checked_by": info.checked_by, "date": info.date,
                        "display_units": info.display_units,
                        "file": self.project.path.name,
                        "sha256": self.project.source_sha256,
                        "sha256_short": self.project.source_sha256[:12]},
            "nav_systems": [{"id": s.id, "file": page_name(s.id)}
                            for s in self.project.systems],
            "cautions": {"short": CAUTION_SHORT, "full": CAUTION_FULL},
        }

    def _design(self, periods) -> tuple | None:
        """(periods, Sa [g], label) of the design spectrum for a figure, or None."""
        design = self.project.design_spectrum
        if design is None:
            return None
        return (np.asarray(periods), design.spectrum().sa_g(np.asarray(periods)),
                _design_label(design))

    def _figure(self, path: str, function: str, **kwargs) -> str:
        if path in self._figure_paths:  # two figures must never share one file
            raise BuildError(f"two figures of the site would both be written to {path}; "
                             f"check that record, system and pair ids are distinct.")
        self._figure_paths.add(path)
        self.figures.append(FigureSpec(path, function, kwargs))
        return path

    def _check_rows(self, checks) -> list[dict]:
        rows = []
        for c in checks:
            system = next(s for s in self.project.systems if s.id == c.system_id)
            rows.append({
                "system_id": c.system_id, "system_name": system.name,
                "system_file": page_name(c.system_id),
                "label": CHECK_LABELS[c.quantity] + (
                    f" ({STATISTIC_TEXT[c.statistic]} of |{CHECK_LABELS[c.quantity].lower()}"
                    f"| over the records)" if c.absolute else "") + (
                    f" (governing: {c.governing_run} run)" if c.governing_run else ""),
                "demand": self.display.check_value(c.quantity, c.demand),
                "limit": self.display.check_value(c.quantity, c.limit),
                "basis": system.limits.basis_of(c.quantity) or "not stated",
                "ratio": f"{c.ratio:.3f}", "verdict": c.verdict,
                "css": "exceeds" if c.verdict in (VERDICT_EXCEEDS, VERDICT_UNSTABLE)
                else "within",
            })
        return rows

    def _statistics_rows(self, checks) -> list[dict]:
        """Demand statistics of each check (system page); ``governing`` marks the one
        the verdict reads (the edition's statistic)."""
        rows = []
        for c in checks:
            cells = []
            for key in STATISTIC_KEYS:
                value = c.statistics.get(key)
                text = "–" if value is None else (
                    number(value) if key == "beta" else
                    self.display.check_value(c.quantity, value))
                cells.append({"text": text, "governing": key == c.statistic})
            rows.append({"label": CHECK_LABELS[c.quantity], "cells": cells})
        return rows

    def _fragility_bits(self, system) -> dict | None:
        """The fragility section of a system page (None when the system has none)."""
        found = [f for f in self.results.fragility if f.system_id == system.id]
        if not found:
            return None
        measure = found[0].measure
        symbol = (f"Sa(T = {number(system.period_s)} s, ζ = {100 * system.damping:.3g} %)"
                  if measure == "sa" else "PGA")
        if system.directions == 2:  # each pair scaled on its RotD50 (Boore 2010)
            symbol = f"RotD50 {symbol}"
        design = found[0].design_level_g
        basis = found[0].design_basis
        at = f"T = {number(system.period_s)} s" if measure == "sa" else "T = 0"
        design_source = None
        if basis == "given":
            design_source = "as set in [fragility] design_level"
        elif basis == "target":
            design_source = (f"the target spectrum, "
                             f"{_design_label(self.project.design_spectrum)}, at {at}")
        elif basis == "vertical-target":
            kind = self.project.design_spectrum.vertical.kind
            design_source = f"the vertical target, {vertical_suite.STANDARDS[kind]}, at {at}"
        rows, curves = [], []
        for f in found:
            fit, label = f.fit, CHECK_LABELS[f.quantity]
            rows.append({
                "label": label, "status": fit.status,
                "median": "–" if fit.median is None else f"{number(fit.median)} g",
                "beta": "–" if fit.beta is None else number(fit.beta),
                "probability": "–" if f.design_probability is None else
                f"{100 * f.design_probability:.1f} %",
                "counts": ", ".join(f"{z}/{n}" for z, n in zip(fit.exceeding, fit.motions))})
            curves.append({"label": label, "levels": list(fit.levels),
                           "fractions": [z / n for z, n in zip(fit.exceeding, fit.motions)],
                           "median": fit.median if fit.beta else None, "beta": fit.beta})
        figure = self._figure(f"figures/system-{system.id}-fragility.svg",
                              "fragility_figure", curves=curves, xlabel=f"{symbol} [g]",
                              design_level=design)
        return {"symbol": symbol, "rows": rows, "figure": figure,
                "levels": ", ".join(f"{x:g}" for x in found[0].fit.levels),
                "design": None if design is None else f"{number(design)} g",
                "design_source": design_source,
                "no_design_reason": "no vertical target was given "
                "([design_spectrum.vertical]), so no design level is read for this "
                "vertical system" if basis == "no-vertical-target" else None,
                "records": found[0].fit.motions[0], "per_pair": system.directions == 2}

    def _statistic_bits(self) -> dict:
        return {"statistic": self.results.statistic,
                "statistic_text": STATISTIC_TEXT[self.results.statistic],
                "statistic_reason": statistic_reason(self.results),
                "record_count": len(self.results.records)}

    def _record_rows(self) -> list[dict]:
        rows = []
        d = self.display
        for item in self.results.records:
            im = item.intensity
            rows.append({"id": item.record.id, "file": item.spec.file,
                         "file_html": page_name(item.record.id),
                         **_factor_bits(item, d),
                         "pgv": d.show(im.pgv_m_s, "velocity"),
                         "arias": f"{number(im.arias_m_s)} m/s",
                         "d5_95": f"{number(im.d5_95_s)} s",
                         "mean_period": f"{number(im.mean_period_s)} s",
                         "usable": _usable_short(usable_period_max_s(item.spec))})
        return rows

    # -- pages -----------------------------------------------------------------------
    def summary(self) -> Page:
        status = suite_status(self.results.scaling)
        results = self.results
        checks = sorted(results.checks, key=lambda c: -c.ratio)
        exceeding = sum(c.verdict in (VERDICT_EXCEEDS, VERDICT_UNSTABLE) for c in checks)
        if not checks:
            summary_text = "No limits are checked."
        elif exceeding:
            summary_text = (f"{exceeding} of {len(checks)} checks exceed the stated limit "
                            f"(worst demand / limit {checks[0].ratio:.3f}).")
        else:
            summary_text = (f"All {len(checks)} checks are within the stated limits "
                            f"(highest demand / limit {checks[0].ratio:.3f}).")
        figure = None
        if checks:
            figure = self._figure(
                "figures/summary-checks.svg", "checks_bar_figure",
                labels=[f"{c.system_id}: {CHECK_LABELS[c.quantity].lower()}" for c in checks],
                ratios=[c.ratio for c in checks], title=None)
        systems = []
        for s in self.project.systems:
            demand = results.statistics.systems[s.id].demand_displacement_m
            systems.append({"id": s.id, "name": s.name, "file": page_name(s.id),
                            "period": f"{number(s.period_s)} s",
                            "damping": f"{100 * s.damping:.3g} %",
                            "demand_displacement": self.display.show(demand, "length")})
        notes_html = ""
        if self.project.info.notes_path is not None:
            notes_html = render_notes(self.project.info.notes_path.read_text("utf-8"))
        input_hashes = [{"label": f"Record {item.record.id}", "file": item.spec.file,
                         "sha256": item.record.sha256} for item in results.records]
        analysis = self.project.analysis
        settings = [
            ("Method", analysis.method),
            ("Spectrum damping", ", ".join(f"{z:g}" for z in analysis.damping)),
            ("Spectrum periods", f"{len(analysis.periods_s)} from "
                                 f"{number(min(analysis.periods_s))} s to "
                                 f"{number(max(analysis.periods_s))} s"),
            ("Suite statistic", f"{analysis.statistic} → {results.statistic}"),
            ("Default processing", _processing_text(self.project.processing)),
        ]
        if self.project.info.plain_numbers:
            settings.append(("Bare numbers", "read in SI units (kg, m, s, N, N/m) for "
                             "dimensional keys, as the project states with [project] "
                             f"plain_numbers = \"{self.project.info.plain_numbers}\""))
        context = {**self.common("", "Summary", "summary"), **self._statistic_bits(),
                   "checks": self._check_rows(checks), "checks_summary": summary_text,
                   "figures": {"checks": figure}, "systems": systems,
                   "records": self._record_rows(), "notes_html": notes_html,
                   "dependencies": dependency_versions(), "input_hashes": input_hashes,
                   "settings": settings, "suite_status": status,
                   **signoff_block(self.project.info)}
        return Page("index.html", "summary.html", context)

    def record_page(self, item) -> Page:
        record, d = item.record, self.display
        rid = record.id
        time = record.time_s
        panels = [
            ("Acceleration", np.asarray(record.acceleration_m_s2) / G, "Acceleration [g]"),
            ("Velocity", d.convert(1.0, "velocity") * item.velocity_m_s,
             f"Velocity [{d.unit('velocity')}]"),
            ("Displacement", d.convert(1.0, "length") * item.displacement_m,
             f"Displacement [{d.unit('length')}]"),
        ]
        spectrum = item.spectrum
        damping_labels = [f"ζ = {100 * z:g} %" for z in spectrum.damping]
        usable = usable_period_max_s(item.spec)
        psa = [{"label": label, "values": spectrum.psa_m_s2[i] / G, "style": "emphasis",
                "usable_max_s": usable} for i, label in enumerate(damping_labels)]
        sd = [{"label": label, "values": d.convert(1.0, "length") * spectrum.sd_m[i],
               "style": "emphasis", "usable_max_s": usable}
              for i, label in enumerate(damping_labels)]
        figures = {
            "histories": self._figure(figure_path("record-histories", rid),
                                      "histories_figure", time_s=time, panels=panels),
            "psa": self._figure(figure_path("record-psa", rid), "spectra_figure",
                                periods_s=spectrum.periods_s, curves=psa,
                                ylabel="Pseudo-spectral acceleration [g]",
                                highlight_periods=self.system_periods,
                                design=self._design(spectrum.periods_s)),
            "sd": self._figure(figure_path("record-sd", rid), "spectra_figure",
                               periods_s=spectrum.periods_s, curves=sd,
                               ylabel=f"Spectral displacement [{d.unit('length')}]",
                               highlight_periods=self.system_periods),
            "fourier": self._figure(figure_path("record-fourier", rid), "fourier_figure",
                                    frequency_hz=item.fourier_frequency_hz,
                                    amplitude=item.fourier_amplitude_m_s,
                                    ylabel="Fourier amplitude [m/s]"),
        }
        im = item.intensity
        intensity = [
            {"name": "PGA", "value": d.show(im.pga_m_s2, "acceleration"),
             "definition": "peak ground acceleration, max |a|"},
            {"name": "PGV", "value": d.show(im.pgv_m_s, "velocity"),
             "definition": "peak ground velocity, by integration from rest"},
            {"name": "PGD", "value": d.show(im.pgd_m, "length"),
             "definition": "peak ground displacement, by double integration from rest"},
            {"name": "Arias intensity", "value": f"{number(im.arias_m_s)} m/s",
             "definition": "π/(2g) ∫a² dt (Arias 1970)"},
            {"name": "Significant duration D5–95", "value": f"{number(im.d5_95_s)} s",
             "definition": "time between 5 % and 95 % of Arias intensity (Trifunac & "
                           "Brady 1975)"},
            {"name": "Significant duration D5–75", "value": f"{number(im.d5_75_s)} s",
             "definition": "time between 5 % and 75 % of Arias intensity"},
            {"name": "CAV", "value": f"{number(im.cav_m_s)} m/s",
             "definition": "cumulative absolute velocity ∫|a| dt (EPRI NP-5930, 1988)"},
            {"name": "Mean period Tm", "value": f"{number(im.mean_period_s)} s",
             "definition": "Σ(C²/f)/ΣC², 0.25–20 Hz (Rathje et al. 1998)"},
        ]
        context = {**self.common("../", f"Record {rid}", "record", rid),
                   "record": {"id": rid, "file": item.spec.file, "format": record.file_format,
                              "sha256": record.sha256, "npts": record.npts,
                              "dt": number(record.dt_s), "duration": number(record.duration_s),
                              "units": record.units, **_factor_bits(item, d),
                              "history": list(record.history),
                              "warnings": list(record.warnings),
                              "provenance": provenance.record_rows(item.spec),
                              "processing": _processing_text(item.spec.processing),
                              "usable": _usable_text(usable, self.project.scaling),
                              "beyond_usable": [
                                  f"{system.name} ({system.id}, T = {system.period_s:.4g} s)"
                                  for system in self.project.systems
                                  if usable is not None and system.period_s > usable]},
                   "intensity": intensity, "figures": figures,
                   "method": self.project.analysis.method}
        return Page(f"records/{page_name(rid)}", "record.html", context)

    def suite_page(self) -> Page:
        results, d = self.results, self.display
        statistics = results.statistics
        index = statistics.damping_index
        periods = results.records[0].spectrum.periods_s
        zeta = results.records[0].spectrum.damping[index]
        scaling = results.scaling
        shaded = None
        if scaling is not None and scaling.period_range_s:
            shaded = (*scaling.period_range_s, "scaling period range")
        figures = {}
        for key, attr, scale, band, label in (
                ("psa", "psa_m_s2", 1.0 / G, statistics.psa_g,
                 "Pseudo-spectral acceleration [g]"),
                ("sd", "sd_m", d.convert(1.0, "length"),
                 statistics.sd_m.scaled(d.convert(1.0, "length")),
                 f"Spectral displacement [{d.unit('length')}]")):
            stack = [getattr(r.spectrum, attr)[index] * scale for r in results.records]
            curves = _suite_curves([r.record.id for r in results.records], stack, band)
            for curve, item in zip(curves, results.records):
                curve["usable_max_s"] = usable_period_max_s(item.spec)
            figures[key] = self._figure(
                f"figures/suite-{key}.svg", "spectra_figure", periods_s=periods,
                curves=curves,
                ylabel=label, highlight_periods=self.system_periods,
                design=self._design(periods) if key == "psa" else None,
                shaded_range=shaded if key == "psa" else None)
        motion_figure, motion_label = None, ""
        if scaling is not None and scaling.criterion_spectra_g is not None:
            motion_label = scaling.criterion_label
            curves = _suite_curves(scaling.criterion_names, scaling.criterion_spectra_g,
                                   statistics.criterion_g)
            if scaling.required_ratio is not None:
                curves.append({"label": f"{100 * scaling.required_ratio:g} % of the target",
                               "values": scaling.required_ratio * scaling.target_sa_g,
                               "style": "emphasis"})
            target = (periods, scaling.target_sa_g,
                      f"target at {100 * scaling.target_damping:g} % damping")
            motion_figure = self._figure(
                "figures/suite-criterion.svg", "spectra_figure", periods_s=periods,
                curves=curves, ylabel=f"{motion_label} pseudo-spectral acceleration at "
                                      f"ζ = {100 * scaling.target_damping:g} % [g]",
                highlight_periods=self.system_periods, design=target, shaded_range=shaded)
        pair_rows = []
        for pair in results.pairs:
            rotd = pair.rotd
            curves = [
                {"label": f"{pair.h1} (H1)", "values": rotd.psa_h1_g, "style": "record"},
                {"label": f"{pair.h2} (H2)", "values": rotd.psa_h2_g, "style": "record"},
                {"label": "geometric mean", "values": rotd.geomean_psa_g,
                 "style": "emphasis"},
                {"label": "RotD50", "values": rotd.rotd50_psa_g, "style": "emphasis"},
                {"label": "RotD100", "values": rotd.rotd100_psa_g, "style": "mean"},
            ]
            path = self._figure(figure_path("pair", pair.name), "spectra_figure",
                                periods_s=periods, curves=curves,
                                ylabel=f"PSA at ζ = {100 * rotd.damping:g} % [g]",
                                design=self._design(periods))
            pair_rows.append({"name": pair.name, "h1": pair.h1, "h2": pair.h2,
                              "h1_file": page_name(pair.h1), "h2_file": page_name(pair.h2),
                              "figure": path})
        inelastic = self._inelastic_block()
        analysis = self.project.analysis
        context = {**self.common("", "Record suite", "suite"), **self._statistic_bits(),
                   "figures": figures, "records": self._record_rows(),
                   "inelastic": inelastic,
                   "suite_damping": f"{100 * zeta:g} %",
                   "damping_text": ", ".join(f"{100 * z:g} %" for z in analysis.damping),
                   "period_text": f"{len(periods)} periods from {number(periods.min())} s "
                                  f"to {number(periods.max())} s",
                   "method": analysis.method, "design": self._design_block(),
                   "scaling": self._scaling_block(), "motion_figure": motion_figure,
                   "motion_label": motion_label, "pairs": pair_rows,
                   "provenance": provenance.suite_table(self.project.records),
                   "vertical": self._vertical_block()}
        return Page("suite.html", "suite.html", context)

    def _vertical_block(self) -> dict | None:
        """The vertical records against the vertical target (figure and table), or the
        note that no vertical target was given; None without vertical records."""
        ids = [r.id for r in self.project.records if r.component == "V"]
        if not ids:
            return None
        scaling = self.results.scaling
        vertical = scaling.vertical if scaling is not None else None
        if vertical is None:
            return {"target": None, "records": ", ".join(ids)}
        spec = self.project.design_spectrum.vertical
        low, high = vertical.period_range_s
        curves = _suite_curves(vertical.record_ids, vertical.spectra_g,
                               self.results.statistics.vertical_g)
        figure = self._figure(
            "figures/suite-vertical.svg", "spectra_figure",
            periods_s=vertical.periods_s, curves=curves,
            ylabel="Vertical PSA at ζ = 5 % [g]",
            highlight_periods=[s.period_s for s in self.project.systems
                               if s.direction == "vertical"],
            design=(vertical.periods_s, vertical.target_sa_g, "vertical target"),
            shaded_range=(low, high, "vertical fitting range"))
        return {
            "target": vertical.standard, "figure": figure, "scaled": vertical.scaled,
            "rule": vertical_suite.rule_text(vertical.scaled),
            "values": [(label, number(value) if isinstance(value, float) else value,
                        basis) for label, value, basis in spec.values],
            "formula": vertical_suite.formula(spec.kind),
            "range": f"{number(low)} s to {number(high)} s: {vertical.period_range_text}",
            "ratio": f"{number(vertical.ratio_min)} to {number(vertical.ratio_max)}",
            "factors": [{"id": i, "factor": number(vertical.factors[i])}
                        for i in vertical.record_ids],
            "cautions": list(vertical.cautions)}

    def _inelastic_block(self) -> dict | None:
        """Suite means of the inelastic spectra with the classic R–μ–T rules drawn."""
        results = self.results
        spec = self.project.inelastic
        if not results.inelastic:
            return None
        periods = np.asarray(spec.periods_s)
        means = results.statistics.inelastic
        r_mean, mu_mean = means.strength_reduction_factor, means.ductility_demand
        curves = []
        for i, mu in enumerate(spec.ductility):
            curves.append({"label": f"μ = {mu:g}: suite mean R", "values": r_mean[i],
                           "style": "emphasis"})
        for mu in spec.ductility:
            curves.append({"label": f"equal displacement R = {mu:g}",
                           "values": np.full(periods.size, mu), "style": "record"})
            curves.append({"label": f"equal energy R = √(2μ−1) = "
                                    f"{np.sqrt(2 * mu - 1):.2f}",
                           "values": np.full(periods.size, np.sqrt(2 * mu - 1)),
                           "style": "record"})
        r_figure = self._figure("figures/suite-inelastic-r.svg", "spectra_figure",
                                periods_s=periods, curves=curves,
                                ylabel="Strength reduction factor R = Fe/Fy [-]")
        mu_curves = [{"label": f"R = {r:g}: suite mean μ", "values": mu_mean[i],
                      "style": "emphasis"} for i, r in enumerate(spec.strength_reduction)]
        mu_figure = self._figure("figures/suite-inelastic-mu.svg", "spectra_figure",
                                 periods_s=periods, curves=mu_curves,
                                 ylabel="Ductility demand μ [-]")
        return {"r_figure": r_figure, "mu_figure": mu_figure,
                "damping": f"{100 * spec.damping:g} %",
                "alpha": number(spec.post_yield_ratio),
                "steps": f"{spec.steps_per_period:g}",
                "ductility": ", ".join(f"{m:g}" for m in spec.ductility),
                "reduction": ", ".join(f"{r:g}" for r in spec.strength_reduction)}

    def _design_block(self) -> dict | None:
        design = self.project.design_spectrum
        if design is None:
            return None
        labels = {**_DESIGN_KEY_LABELS, **design_formulas.KEY_LABELS}
        values = [(labels.get(k, k), v if not isinstance(v, list) else
                   ", ".join(f"{x:g}" for x in v)) for k, v in design.values.items()]
        if design.kind == "en1998-1":
            from sdofreport.core.design_spectra import en1998_1_parameters

            p = en1998_1_parameters(**design.parameters)
            for key, label, value in (("soil_factor", "S", p.soil_factor),
                                      ("tb", "T_B [s]", p.tb_s), ("tc", "T_C [s]", p.tc_s),
                                      ("td", "T_D [s]", p.td_s)):
                if key in design.values:
                    continue  # given: labelled as a National-Annex value above
                values.append((f"{label} (recommended, Table 3.{design.values['spectrum_type'] + 1}"
                               f", from memory)", f"{value:g}"))
        derived, formula = design_formulas.details(design)
        return {"label": _design_label(design), "values": values + derived,
                "formula": formula}

    def _scaling_block(self) -> dict | None:
        scaling = self.results.scaling
        if scaling is None or scaling.rule == "none":
            return None
        criteria = []
        for c in scaling.result.criteria:
            margin = c.achieved - c.required if c.comparison == ">=" else \
                c.required - c.achieved
            criteria.append({
                "name": c.name, "source": c.source,
                "required": f"{c.comparison} {_criterion_number(c.required)}",
                "achieved": _criterion_number(c.achieved),
                "margin": _criterion_number(round(margin, 9)),
                "status": "met" if c.passed else ("warning" if c.severity == "warning"
                                                  else "not met"),
                "css": "within" if c.passed else ("warning" if c.severity == "warning"
                                                  else "exceeds")})
        errors = scaling.failed
        warnings = [c for c in scaling.result.criteria if not c.passed and
                    c.severity == "warning"]
        status = suite_status(scaling)
        verdict = status["headline"]
        if errors:
            verdict += (f" {len(errors)} required criteri{'a are' if len(errors) > 1 else 'on is'}"
                        f" not met.")
        elif warnings:
            verdict += f" {len(warnings)} warning(s) below."
        flagged = set()
        if getattr(scaling.result, "flagged", None) is not None:
            for (name, members), flag in zip(scaling.motions, scaling.result.flagged):
                if flag:
                    flagged.update(members)
        factors = [{"id": r.id, "factor": number(scaling.factors.get(r.id, 1.0)),
                    "flag": r.id in flagged} for r in self.project.records]
        low, high = scaling.period_range_s
        edition = codes.edition(scaling.rule)
        level = {"mce_r": "MCE_R", "design": "design", None: "—"}[scaling.target_level]
        facts = [("Standard", scaling.standard or "none (common practice)"),
                 ("Target level", level),
                 ("Target damping", f"{100 * scaling.target_damping:g} % (spectra scaled "
                                    f"at this damping, whatever [analysis] damping lists)"),
                 ("Motions counted", f"{scaling.motions_counted}" + (
                     f" ({edition.counting}); at least {edition.minimum_motions} required"
                     f" ({edition.minimum_clause})" if edition else "")),
                 ("Period range", f"{number(low)} s to {number(high)} s: "
                                  f"{scaling.period_range_text}" +
                  (f" (option \"{scaling.period_range_option}\")"
                   if scaling.period_range_option else "")),
                 ("Period-range options", ", ".join(codes.period_range_names(
                     scaling.rule)) + ", or [low, high] in s")]
        facts += _isolation_facts(scaling.isolation, self.display)
        return {"rule": scaling.rule,
                "rule_text": edition.rule_text if edition else _FIT_TEXT,
                "range": f"{number(low)} s to {number(high)} s", "criteria": criteria,
                "verdict": verdict, "ok": not errors, "factors": factors,
                "notes": list(scaling.notes), "facts": facts,
                "cautions": list(scaling.cautions), "memory_note": scaling.memory_note}

    def _properties(self, system) -> list[dict]:
        d = self.display
        rows = [{"name": "Description", "value": _KIND_TEXT[system.kind],
                 "basis": f"kind = {system.kind}"}]
        for key, value in system.inputs.items():
            if key in _INPUT_LABELS and value is not None:
                dimension = _INPUT_DIMENSIONS.get(key)
                if isinstance(value, str):
                    shown = value
                elif dimension in d.table:
                    shown = d.show(value, dimension)
                else:
                    shown = f"{number(value)} {_SI_LABELS.get(dimension, '')}".strip()
                rows.append({"name": _INPUT_LABELS.get(key, key), "value": shown,
                             "basis": "as given"})
        if system.mass_kg is not None:
            rows.append({"name": "Mass m", "value": d.show(system.mass_kg, "mass"),
                         "basis": _basis(system, ("m =",), "as given")})
        if system.stiffness_n_m is not None:
            rows.append({"name": "Lateral stiffness k",
                         "value": d.show(system.stiffness_n_m, "stiffness"),
                         "basis": _basis(system, ("k =", "k_eq", "network"), "as given")})
        rows += [
            {"name": "Natural period T", "value": f"{number(system.period_s)} s",
             "basis": _basis(system, ("T =",), "as given")},
            {"name": "Natural frequency f", "value": f"{number(system.frequency_hz)} Hz",
             "basis": "f = 1/T"},
            {"name": "Circular frequency ω", "value":
             f"{number(2 * np.pi / system.period_s)} rad/s", "basis": "ω = 2π/T"},
            {"name": "Damping ratio ζ", "value": f"{100 * system.damping:.3g} %",
             "basis": "as given (fraction of critical" + (
                 "; with P-Δ, of the stiffness k − W/h)" if system.p_delta else ")")},
        ]
        if system.height_m is not None:
            rows.append({"name": "Height h", "value": d.show(system.height_m, "length"),
                         "basis": "as given; drift ratio = displacement / h"})
        model = system.model or {}
        if "yield_strength_n" in model:
            rows += _hysteresis_rows(system, model, d)
        if system.model_name == "sliding-pendulum":
            rows.append({"name": "Friction regularisation", "value":
                         d.show(model["slip_displacement_m"], "length"),
                         "basis": "elastic displacement before sliding (common practice, "
                                  "no source)"})
        elif model.get("participation") is not None:
            rows.append({"name": "Participation Γ", "value": number(model["participation"]),
                         "basis": "Γ = m d²/I: the centre of mass obeys ü + 2ζωu̇ + ω²u "
                                  "= −Γ üg (linearised compound pendulum)"})
        rows += _p_delta_rows(system, d) + _damper_rows(model) + _directions_rows(system)
        rows += _isolation_rows(system, self.results, d)
        return rows

    def system_page(self, system) -> Page:
        results, d = self.results, self.display
        nonlinear = system.model_name != "linear"
        checks = [c for c in results.checks if c.system_id == system.id]
        peaks, histories, energies = [], [], []
        responses = [results.response(system.id, r.id)
                     for r in self.project.records_for(system)]
        for response in responses:
            rid = response.record_id
            row = {"record": rid, "file_html": page_name(rid), "summary": False,
                   "displacement": d.show(response.peak_displacement_m, "length"),
                   "drift": number(response.peak_drift_ratio),
                   "shear": d.show(response.peak_base_shear_n, "force"),
                   "accel": d.show(response.peak_total_accel_m_s2, "acceleration")}
            if response.directions == 2:
                h1, h2 = response.peak_displacement_per_direction_m
                row["displacement"] += (f" (resultant; H1 {d.show(h1, 'length')}, "
                                        f"H2 {d.show(h2, 'length')})")
            if nonlinear:
                residual = response.residual_displacement_m
                row.update({"ductility": number(response.ductility),
                            "residual": d.show(residual, "length"),
                            "residual_abs": d.show(abs(residual), "length")
                            if residual is not None else "–"})
                if response.unstable:
                    row["unstable"] = (f"unstable: the displacement passed "
                                       f"{d.show(response.instability_limit_m, 'length')} "
                                       f"at {number(float(response.time_s[-1]))} s; the "
                                       f"run stopped there")
            peaks.append(row)
            panels = [
                ("Relative displacement", d.convert(1.0, "length") * response.displacement_m,
                 f"Displacement [{d.unit('length')}]"),
                ("Total acceleration", response.total_accel_m_s2 / G,
                 "Total acceleration [g]"),
            ]
            path = self._figure(figure_path("system-response", system.id, rid), "histories_figure",
                                time_s=response.time_s, panels=panels)
            item = {"record": rid, "file_html": page_name(rid), "figure": path,
                    "loop": None}
            if nonlinear:
                item["loop"] = self._figure(
                    figure_path("system-loop", system.id, rid), "hysteresis_figure",
                    displacement=d.convert(1.0, "length") * response.displacement_m,
                    force=d.convert(1.0, "force") * response.force_n,
                    xlabel=f"Displacement [{d.unit('length')}]",
                    ylabel=f"Restoring force [{d.unit('force')}]")
                energy = response.energy
                imbalance = energy.imbalance
                energies.append({
                    "record": rid, "input": d.show(energy.input_j, "energy"),
                    "kinetic": d.show(energy.kinetic_j, "energy"),
                    "damping": d.show(energy.damping_j, "energy"),
                    "strain": d.show(energy.strain_j, "energy"),
                    "hysteretic": d.show(energy.hysteretic_j, "energy"),
                    "imbalance": f"{100 * imbalance:.2f} %",
                    "flag": imbalance > ENERGY_IMBALANCE_FLAG,
                    "convergence": _convergence_text(response.convergence)})
            histories.append(item)
        suite = results.statistics.systems[system.id]
        for label, values in (("mean", suite.mean), ("maximum", suite.maximum)):
            def stat(value, dim):
                if value is None:
                    return "–"
                return number(value) if dim is None else d.show(value, dim)
            row = {"record": label, "file_html": None, "summary": True,
                   "displacement": stat(values.displacement_m, "length"),
                   "drift": stat(values.drift_ratio, None),
                   "shear": stat(values.base_shear_n, "force"),
                   "accel": stat(values.total_accel_m_s2, "acceleration")}
            if nonlinear:
                row.update({"ductility": stat(values.ductility, None), "residual": "–",
                            "residual_abs": stat(values.residual_displacement_abs_m,
                                                 "length")})
            peaks.append(row)
        periods = results.records[0].spectrum.periods_s
        damping = results.records[0].spectrum.damping
        z_index = int(np.argmin(np.abs(damping - system.damping)))
        own = {r.id for r in self.project.records_for(system)}
        spectrum_curves = [{"label": item.record.id, "style": "record",
                            "values": item.spectrum.psa_m_s2[z_index] / G}
                           for item in results.records if item.record.id in own]
        design = self._design(periods)
        if system.direction == "vertical":  # its own records against the vertical target
            vertical = self.project.design_spectrum and \
                self.project.design_spectrum.vertical
            design = None if not vertical else (periods, vertical.sa_g(periods),
                                                "vertical target")
        figure = self._figure(figure_path("system-spectra", system.id), "spectra_figure",
                              periods_s=periods, curves=spectrum_curves,
                              ylabel=f"PSA at ζ = {100 * damping[z_index]:g} % [g]",
                              highlight_periods=[system.period_s] + (
                                  [system.p_delta["period_s"]] if system.p_delta else []),
                              design=design)
        context = {**self.common("../", f"System {system.id}", "system", system.id),
                   **self._statistic_bits(),
                   "system": {"id": system.id, "name": system.name,
                              "damping": f"{100 * system.damping:.3g} %",
                              "spectrum_damping": f"{100 * damping[z_index]:g} %",
                              "model": _MODEL_TEXT[system.model_name],
                              "derivation": list(system.derivation)},
                   "properties": self._properties(system),
                   "checks": self._check_rows(checks), "nonlinear": nonlinear,
                   "demand_statistics": self._statistics_rows(checks),
                   "fragility": self._fragility_bits(system),
                   "mechanics_notes": _mechanics_cautions(system, responses, d),
                   "peaks": peaks, "histories": histories, "energies": energies,
                   "energy_flag": f"{100 * ENERGY_IMBALANCE_FLAG:g} %",
                   "figures": {"spectrum": figure}}
        return Page(f"systems/{page_name(system.id)}", "system.html", context)

    def pages(self) -> list[Page]:
        pages = [self.summary(), self.suite_page()]
        pages += [self.record_page(item) for item in self.results.records]
        pages += [self.system_page(system) for system in self.project.systems]
        return pages


def record_figures(project, records) -> list[FigureSpec]:
    """
    The figures of the record pages (:meth:`SiteContext.record_page`), which need only
    the records' results (``RecordResult`` list, scaled): they can be drawn while the
    engine still computes the systems' responses.
    """
    context = SiteContext(Results(project, list(records), {}, [], ""))
    for item in records:
        context.record_page(item)
    return context.figures


#: Energy-balance imbalance above which a response is flagged (issue requirement; a few
#: percent at most is expected for a fine step, Uang & Bertero 1990).
ENERGY_IMBALANCE_FLAG = 0.02

_KIND_TEXT = {
    "lumped": "lumped mass on a spring",
    "columns": "mass on parallel columns (sway stiffness per column c·EI/h³)",
    "springs": "mass on a series/parallel spring network",
    "static-deflection": "weight on a spring of measured static deflection",
    "sliding-pendulum": "platform on curved sliding (friction pendulum) bearings",
    "hanging": "suspended item, compound pendulum",
}

_SOLVER_TEXT = "Newmark average acceleration with Newton–Raphson iteration, Chopra §5.7"

_MODEL_TEXT = {
    "linear": "linear elastic",
    "elastic": f"linear spring with a supplemental nonlinear viscous damper ({_SOLVER_TEXT})",
    "bilinear": f"bilinear hysteresis with kinematic hardening ({_SOLVER_TEXT})",
    "clough": "peak-oriented stiffness degradation, Clough & Johnston (1966): unloading at "
              f"k, reloading towards the largest earlier excursion ({_SOLVER_TEXT})",
    "takeda": "Takeda, Sozen & Nielsen (1970) on a bilinear backbone: unloading stiffness "
              f"k·(u_y/u_max)^β, peak-oriented reloading ({_SOLVER_TEXT})",
    "bouc-wen": "smooth Bouc–Wen hysteresis, Wen (1976): F = αku + (1−α)F_y·z, "
                f"dz/du = [1 − |z|^n (γ + β·sign(u̇z))]/u_y ({_SOLVER_TEXT})",
    "flag-shaped": "flag-shaped self-centring hysteresis, Christopoulos et al. (2002): "
                   f"energy-dissipation ratio β_E ({_SOLVER_TEXT})",
    "sliding-pendulum": "sliding pendulum: (W/R)·u + μW·sgn(u̇), friction regularised "
                        "(Zayas, Low & Mahin 1990); Newmark average acceleration with "
                        "Newton–Raphson iteration",
}

_INPUT_LABELS = {
    "count": "Number of columns n", "elastic_modulus": "Young's modulus E",
    "second_moment": "Second moment of area I", "end_condition": "End condition",
    "weight": "Weight W", "deflection": "Static deflection δ", "radius": "Radius R",
    "friction": "Friction coefficient μ", "pivot_inertia": "Inertia about the pivot I",
    "pivot_to_centre": "Pivot to centre of mass d",
    "friction_slow": "Friction at low speed μ_slow",
    "friction_rate": "Friction rate parameter a [s/m]",
}

_INPUT_DIMENSIONS = {
    "count": None, "elastic_modulus": "pressure", "second_moment": "second_moment",
    "weight": "force", "deflection": "length", "radius": "length", "friction": None,
    "pivot_inertia": "inertia", "pivot_to_centre": "length", "friction_slow": None,
    "friction_rate": None,
}

_SI_LABELS = {"pressure": "Pa", "second_moment": "m⁴", "inertia": "kg·m²"}


#: Stability coefficient above which P-Δ earns a caution (common practice, no source).
P_DELTA_CAUTION = 0.1

_PARAMETER_ROWS = {
    "unloading_exponent": ("Unloading-stiffness exponent β",
                           "takeda: k_u = k (u_y/u_max)^β (0.4 in Takeda et al. 1970, from "
                           "memory)"),
    "bouc_wen_exponent": ("Smoothness exponent n", "bouc-wen: large n approaches bilinear"),
    "bouc_wen_beta": ("Shape parameter β (γ = 1 − β)", "bouc-wen, with A = 1"),
    "dissipation_ratio": ("Energy-dissipation ratio β_E",
                          "flag-shaped: 0 nonlinear elastic, 1 full flag"),
    "deterioration_capacity": ("Deterioration capacity λ",
                               "E_t = λ F_y u_y; β_i = (E_i/(E_t − ΣE_j))^c (Ibarra, Medina "
                               "& Krawinkler 2005)"),
    "deterioration_exponent": ("Deterioration exponent c", "Ibarra et al. (2005)"),
}


def _hysteresis_rows(system, model: dict, d) -> list[dict]:
    """Strength, yield displacement, post-yield ratio and the model's parameters."""
    from sdofreport.core.hysteresis import hysteresis

    fy = model["yield_strength_n"]
    rows = [
        {"name": "Yield strength F_y", "value": d.show(fy, "force"),
         "basis": "as given" if "yield_strength" in system.inputs else "F_y = k u_y"},
        {"name": "Yield displacement u_y", "value":
         d.show(fy / model["stiffness_n_m"], "length"), "basis": "u_y = F_y / k"},
        {"name": "Post-yield stiffness ratio α", "value": number(model["post_yield_ratio"]),
         "basis": f"{model['model']} backbone (α = 0: elastic-perfectly plastic)"}]
    # every parameter of the model, with its default when not given
    full = hysteresis(model["model"], 1.0, 1.0, **model.get("parameters", {}))
    for key, (label, basis) in _PARAMETER_ROWS.items():
        if model["model"] in HYSTERESIS_PARAMETER_KEYS[key]:
            if key.startswith("deterioration") and key not in model.get("parameters", {}):
                continue  # no deterioration unless asked for
            given = key in model.get("parameters", {})
            rows.append({"name": label, "value": number(getattr(full, key)),
                         "basis": basis + ("" if given else " (default)")})
    return rows


def _p_delta_rows(system, d) -> list[dict]:
    """P-Δ rows: W, W/h, θ and the elastic period with P-Δ (Chopra 2017 sec. 7.11)."""
    p = system.p_delta
    if p is None:
        return []
    return [
        {"name": "Gravity load W (P-Δ)", "value": d.show(p["gravity_load_n"], "force"),
         "basis": "as given (gravity_load)" if p["weight_given"] else "W = m g"},
        {"name": "Geometric stiffness W/h", "value":
         d.show(p["gravity_stiffness_n_m"], "stiffness"),
         "basis": "acts as −W/h on every branch (P-Δ)"},
        {"name": "Stability coefficient θ", "value": number(p["stability_coefficient"]),
         "basis": "θ = W/(k h)" + (f"; above {P_DELTA_CAUTION:g}: see the caution"
                                   if p["stability_coefficient"] > P_DELTA_CAUTION else "")},
        {"name": "Elastic period with P-Δ", "value": f"{number(p['period_s'])} s",
         "basis": "T/√(1−θ)"},
    ]


def _damper_rows(model: dict) -> list[dict]:
    spec = model.get("damper")
    if spec is None:
        return []
    alpha = spec["exponent"]
    return [{"name": "Damper coefficient C", "value":
             f"{number(spec['coefficient'])} N·(s/m)^{alpha:g}",
             "basis": f"F = C·|v|^α·sign(v) with α = {alpha:g} (linear below a small "
                      "velocity, common practice)"}]


def _mechanics_cautions(system, responses, d) -> list[str]:
    """Cautions of the system page about P-Δ and dynamic instability."""
    notes = []
    p = system.p_delta
    model = system.model or {}
    if p is not None and p["stability_coefficient"] > P_DELTA_CAUTION:
        notes.append(f"The stability coefficient θ = W/(k h) = "
                     f"{number(p['stability_coefficient'])} exceeds {P_DELTA_CAUTION:g} "
                     "(a common threshold, no source): gravity (P-Δ) effects are "
                     "significant; check the stability rules of the governing code.")
    if p is not None and "yield_strength_n" in model and \
            model["post_yield_ratio"] * model["stiffness_n_m"] < p["gravity_stiffness_n_m"]:
        collapse = model.get("collapse_displacement_m")
        notes.append("With P-Δ the post-yield stiffness α k − W/h is negative: past the "
                     "yield point the system loses strength and may run away"
                     + (f"; the backbone's restoring force reaches zero at "
                        f"{d.show(collapse, 'length')}" if collapse else "") + ".")
    unstable = [r.record_id for r in responses if r.unstable]
    if unstable:
        notes.append(f"Dynamic instability under {', '.join(unstable)}: the displacement "
                     "ran past the stated bound, so those runs stopped and their demands "
                     "are not meaningful (verdict 'unstable').")
    return notes


def _basis(system, prefixes: tuple[str, ...], default: str) -> str:
    """The derivation lines that start with one of ``prefixes``, or ``default``."""
    lines = [line for line in system.derivation if line.startswith(prefixes)]
    return "; ".join(lines) if lines else default


def _convergence_text(convergence: Convergence | None) -> str:
    if convergence is None:
        return ""
    state = "converged" if convergence.converged else "NOT converged"
    return (f"{state}; at most {convergence.max_iterations_used} iterations, "
            f"{convergence.subdivided_steps} steps subdivided")


_DESIGN_KEY_LABELS = {
    "sds": "S_DS [g]", "sd1": "S_D1 [g]", "tl": "T_L [s]", "level": "level",
    "agr": "a_gR [g]", "importance_factor": "γ_I", "ground_type": "ground type",
    "spectrum_type": "spectrum type", "damping": "damping ratio ξ",
    "periods": "periods [s]", "sa": "Sa [g]",
    "soil_factor": "S (National Annex, as given)", "tb": "T_B [s] (National Annex, as given)",
    "tc": "T_C [s] (National Annex, as given)", "td": "T_D [s] (National Annex, as given)",
}

_FIT_TEXT = ("per-record factor minimising the log misfit to the target over the period "
             "range (common practice), times the suite factor")


def _criterion_number(value: float) -> str:
    """Counts as whole numbers, everything else with four significant figures."""
    return f"{value:.0f}" if float(value).is_integer() else number(value)


def _factor_bits(item, display) -> dict:
    """Given, suite and total scale factors and the PGA unscaled and as used."""
    total = item.spec.scale * item.scale_factor
    pga = item.intensity.pga_m_s2
    return {"scale": number(item.spec.scale), "suite_factor": number(item.scale_factor),
            "total_scale": number(total),
            "pga": display.show(pga, "acceleration"),
            "pga_unscaled": display.show(pga / total, "acceleration")}


def _design_label(design) -> str:
    values = design.values
    current = design_formulas.label(design)
    if current is not None:
        return current
    if design.kind == "asce7-16":
        level = "MCE_R" if values.get("level") in ("mce", "mce_r") else "design"
        return (f"ASCE/SEI 7-16 {level} spectrum (S_DS {values['sds']:g} g, S_D1 "
                f"{values['sd1']:g} g, T_L {values['tl']:g} s)")
    if design.kind == "en1998-1":
        return (f"EN 1998-1 type {values['spectrum_type']} elastic spectrum (a_gR "
                f"{values['agr']:g} g, ground {values['ground_type']})")
    return "design spectrum (table)"


def _suite_curves(names: list[str], stack, band: SpectrumBand) -> list[dict]:
    """Each curve, the log-normal band (geometric mean ± 1σ of ln) and the arithmetic
    suite mean, the statistic the scaling criteria test (``band``, computed by the
    engine: sdofreport.engine.suite_statistics)."""
    curves = [{"label": name, "values": stack[i], "style": "record"}
              for i, name in enumerate(names)]
    curves.append({"label": "log-normal: geometric mean ± 1σ of ln",
                   "values": band.geometric_mean, "lower": band.lower,
                   "upper": band.upper, "style": "band"})
    curves.append({"label": "suite mean (arithmetic)", "values": band.mean,
                   "style": "mean"})
    return curves


def _usable_short(usable: float | None) -> str:
    return "all" if usable is None else f"≤ {usable:.4g} s"


def _usable_text(usable: float | None, scaling) -> str:
    """The record's usable period range in words, with the rule and what follows."""
    if usable is None:
        return "no high-pass filter: the whole period range is taken as usable"
    use = ("left out of scaling (the scaling period range is cut there)"
           if scaling.beyond_usable == "exclude" else
           "kept in scaling, as the project asks (beyond_usable = \"include\")")
    return (f"up to {usable:.4g} s = 1/(1.25 × high-pass corner), the NGA-West2 rule "
            f"(Ancheta et al. 2014, from memory; common practice); spectral ordinates "
            f"beyond it are drawn dashed and {use}")


def _processing_text(settings) -> str:
    parts = []
    if settings.baseline_order is not None:
        parts.append(f"baseline order {settings.baseline_order}")
    if settings.bandpass_hz:
        low, high = settings.bandpass_hz
        pad = pad_length_s(low, settings.filter_order)
        parts.append(f"acausal Butterworth band-pass {low:g}–{high:g} Hz (order "
                     f"{settings.filter_order}, forward and backward), zero pads of "
                     f"{pad:g} s in total (1.5 n/f_c, Boore 2005), kept after filtering")
    if settings.taper_s:
        parts.append(f"taper {settings.taper_s:g} s")
    return ", ".join(parts) if parts else "none"


#: What a two-direction run of each model is, for the system page (docs/methods.md).
_TWO_DIRECTION_RULES = {
    "bouc-wen": "biaxial Bouc–Wen of Park, Wen & Ang (1986): coupled hysteretic "
                "components z = (z₁, z₂), dz = [du − |z|^(n−2) z (β(|du₁z₁| + |du₂z₂|) + "
                "γ du·z)]/u_y, F = a k u + (1 − a) F_y z (n = 2 is the published law; "
                "other n our extension, the same along one axis as the one-direction "
                "model)",
    "clough": "one independent clough spring along H1 and one along H2 (no single "
              "standard coupled rule exists; independent springs are common practice "
              "for uncoupled orthogonal frames): a diagonal motion reaches √2 F_y of "
              "resultant force",
    "takeda": "one independent takeda spring along H1 and one along H2 (no single "
              "standard coupled rule exists; independent springs are common practice "
              "for uncoupled orthogonal frames): a diagonal motion reaches √2 F_y of "
              "resultant force",
    "flag-shaped": "one independent flag-shaped spring along H1 and one along H2 (no "
                   "single standard coupled rule exists; independent springs are common "
                   "practice for uncoupled orthogonal frames): a diagonal motion reaches "
                   "√2 F_y of resultant force",
    "elastic": "a linear spring in every direction",
    "bilinear": "a circular yield surface (radial return)",
    "sliding-pendulum": "friction along the sliding velocity (Mokha, Constantinou & "
                        "Reinhorn 1993)",
}


def _isolation_facts(isolation, d) -> list[tuple[str, str]]:
    """T_M at the upper and the lower bound of the isolated-system range, with D_M, k_M,
    β_M, B_M and S_a(T_M), and the clauses (none without an isolator system)."""
    if not isolation:
        return []
    rows = []
    for run, factor, end in (("upper", 0.75, "lower end"), ("lower", 1.25, "upper end")):
        found = isolation.runs()[run]
        e = found.effective
        rows.append((f"T_M at the {run}-bound properties of {isolation.system}",
                     f"{number(e.period_s)} s ({end}: {factor:g} T_M = "
                     f"{number(factor * e.period_s)} s): D_M = "
                     f"{d.show(e.displacement_m, 'length')}, k_M = "
                     f"{d.show(e.stiffness_n_m, 'stiffness')}, β_M = "
                     f"{100 * e.damping:.3g} %, B_M = {number(found.damping_coefficient)}, "
                     f"S_a(T_M) = {number(found.spectral_accel_g)} g"))
    rows.append(("T_M, formula", isolation.clause + "; k_M, β_M: pendulum k = W/R + "
                 "μW/D, β = (2/π) μ/(μ + D/R); bilinear k = Q_d/D + k_d, β = 4 Q_d (D − "
                 "D_y)/(2π k D²) (sdofreport.core.isolation); the bound properties from "
                 "property_factors"))
    return rows


def _directions_rows(system) -> list[dict]:
    """The two-direction row of a system's properties (none for one direction)."""
    if system.directions == 1:
        return []
    model = system.model or {}
    name = model.get("model", "linear")
    if name in ("linear", "bilinear", "sliding-pendulum") and model.get("damper") is None \
            and system.kind != "hanging":
        basis = ("each horizontal pair drives one isotropic oscillator along H1 and "
                 "H2 at once; peaks are of the resultant (elastic: the pair's RotD100 "
                 "at T, Boore 2010); friction along the sliding velocity (Mokha, "
                 "Constantinou & Reinhorn 1993); yielding: a circular yield surface; "
                 "histories are shown along each record's own direction")
    else:
        rule = _TWO_DIRECTION_RULES.get(name, "the same oscillator in every direction")
        if system.kind == "hanging":
            rule = ("a compound pendulum hung from one point, small angles, the same in "
                    "every vertical plane: ü + 2ζωu̇ + ω²u = −Γ üg in each direction, "
                    "Γ = m d²/I")
        if model.get("damper") is not None:
            rule += "; damper force C|u̇|^α along the velocity u̇ (vector form)"
        basis = (f"each horizontal pair drives one oscillator along H1 and H2 at once; "
                 f"peaks are of the resultant; {rule}; histories are shown along each "
                 f"record's own direction")
    return [{"name": "Directions", "value": "2 (both horizontal directions at once)",
             "basis": basis}]


def _isolation_rows(system, results, d) -> list[dict]:
    """Velocity-dependent friction, bound runs and effective properties of a sliding
    pendulum, each with its formula and source."""
    model = system.model or {}
    rows = []
    if "friction_slow" in model:
        rows.append({"name": "Velocity-dependent friction", "value": "μ(v)",
                     "basis": "μ = μ_fast − (μ_fast − μ_slow)·exp(−a|v|), μ_fast = μ "
                              "(Constantinou, Mokha & Reinhorn 1990); |v| at the start of "
                              "each integration sub-step"})
    factors = model.get("property_factors")
    if factors:
        peaks = {run: d.show(value, "length") for run, value in
                 results.statistics.systems[system.id].bound_displacement_m.items()}
        varied = ("friction × factor" if system.model_name == "sliding-pendulum" else
                  "Q_d = (1 − α) F_y and k_d = α k × factor (elastic stiffness kept: "
                  "F_y' = λ Q_d/(1 − λα), α' = λα)")
        rows.append({"name": "Property factors (lower, upper)",
                     "value": f"{number(factors[0])}, {number(factors[1])}",
                     "basis": f"{varied} for two more runs per record beside the "
                              "nominal one; each check takes the governing run (ASCE/SEI "
                              f"7-16 §17.2.8.4, from memory); {STATISTIC_TEXT[results.statistic]}"
                              " peak displacement: lower "
                              f"{peaks['lower']}, upper {peaks['upper']}"})
    for run, e in results.effective.get(system.id, {}).items():
        rows.append({"name": f"Effective period T_eff, damping β_eff ({run})",
                     "value": f"{number(e.period_s)} s, {100 * e.damping:.3g} %",
                     "basis": f"at D = {d.show(e.displacement_m, 'length')} "
                              f"({STATISTIC_TEXT[results.statistic]} peak): " + (
                                  "k_eff = W/R + μW/D, T_eff = 2π√(W/(g k_eff)), β_eff = "
                                  "(2/π)·μ/(μ + D/R) (Zayas, Low & Mahin 1990"
                                  if system.model_name == "sliding-pendulum" else
                                  "k_eff = Q_d/D + k_d, T_eff = 2π√(m/k_eff), β_eff = 4 "
                                  "Q_d (D − D_y)/(2π k_eff D²) (Naeim & Kelly 1999, from "
                                  "memory") + "; definitions of ASCE/SEI 7-16 §17.8.5, "
                              "from memory)"})
    return rows
