"""Suite statistics computed once by the engine, and result fields that carry types.

Sources of expected values: ``scipy.stats.gmean`` and ``scipy.stats.gstd`` (the
log-normal band), numpy's mean and max (the per-system peaks), the drift ratio's
definition (peak displacement / height); the no-catch-all-field rule is issue 16.
"""

from __future__ import annotations

import dataclasses
import re

import numpy as np
import pytest
from scipy import stats

from sdofreport import engine
from sdofreport.engine import isolation_bounds, results_types, suite, vertical_suite
from sdofreport.core.units import G
from sdofreport.engine import run_project
from sdofreport.project import load_project
from sdofreport.site.context import SiteContext
from sdofreport.engine.suite_statistics import spectrum_band


def test_spectrum_band_is_scipys_geometric_mean_and_standard_deviation():
    rng = np.random.default_rng(7)
    stack = np.exp(rng.normal(-1.0, 0.4, size=(7, 12)))
    band = spectrum_band(stack)
    gmean = stats.gmean(stack, axis=0)
    gstd = stats.gstd(stack, axis=0, ddof=1)  # exp(σ of ln), σ with n − 1
    np.testing.assert_allclose(band.geometric_mean, gmean, rtol=1e-12)
    np.testing.assert_allclose(band.upper, gmean * gstd, rtol=1e-12)
    np.testing.assert_allclose(band.lower, gmean / gstd, rtol=1e-12)
    np.testing.assert_allclose(band.mean, np.mean(stack, axis=0), rtol=1e-15)
    # One record: no dispersion, the band is the record itself.
    single = spectrum_band(stack[:1])
    np.testing.assert_allclose(single.lower, stack[0], rtol=1e-12)
    np.testing.assert_allclose(single.upper, stack[0], rtol=1e-12)


@pytest.fixture
def small_results(project_factory, valid_project_text):
    return run_project(load_project(project_factory(valid_project_text)), jobs=1,
                       use_cache=False)


def test_engine_statistics_are_numpys_over_the_records(small_results):
    results = small_results
    suite = results.statistics
    runs = [results.response("s1", r.id) for r in results.project.records]
    peaks = [r.peak_displacement_m for r in runs]
    system = suite.systems["s1"]
    assert system.mean.displacement_m == pytest.approx(np.mean(peaks), rel=1e-15)
    assert system.maximum.displacement_m == pytest.approx(np.max(peaks), rel=1e-15)
    # drift ratio = displacement / height (height 4 m in the project)
    assert system.maximum.drift_ratio == pytest.approx(np.max(peaks) / 4.0, rel=1e-12)
    assert system.mean.ductility is None  # a linear system has no ductility
    # two records: the statistic is the maximum (fewer motions than the mean needs)
    governing = system.mean if results.statistic == "mean" else system.maximum
    assert system.demand_displacement_m == governing.displacement_m
    check = next(c for c in results.checks if c.quantity == "displacement")
    assert check.demand == pytest.approx(system.demand_displacement_m, rel=1e-15)
    damping = results.records[0].spectrum.damping
    assert damping[suite.damping_index] == pytest.approx(0.05)
    psa = np.array([r.spectrum.psa_m_s2[suite.damping_index] / G for r in results.records])
    np.testing.assert_allclose(suite.psa_g.mean, np.mean(psa, axis=0), rtol=1e-12)
    np.testing.assert_allclose(suite.psa_g.geometric_mean, stats.gmean(psa, axis=0),
                               rtol=1e-12)


def test_site_formats_the_engine_statistics_without_recomputing(small_results):
    results = small_results
    suite = results.statistics
    planted = dataclasses.replace(suite.systems["s1"], demand_displacement_m=0.123456)
    results.statistics = dataclasses.replace(suite, systems={"s1": planted})
    context = SiteContext(results)
    row = context.summary().context["systems"][0]
    assert row["demand_displacement"] == context.display.show(0.123456, "length")


#: A catch-all annotation: object, Any, or a bare dict/tuple/list without item types.
_CATCH_ALL = re.compile(r"\b(object|Any)\b|\b(dict|tuple|list)\b(?!\[)")


@pytest.mark.parametrize("cls", [engine.RecordResult, engine.PairResult,
                                 engine.ResponseResult, engine.Check,
                                 engine.FragilityResult, engine.Results,
                                 suite.SuiteScaling, vertical_suite.VerticalScaling,
                                 isolation_bounds.IsolationPeriods,
                                 *(getattr(results_types, name)
                                   for name in results_types.__all__)])
def test_result_fields_have_types(cls):
    loose = {f.name: f.type for f in dataclasses.fields(cls)
             if _CATCH_ALL.search(str(f.type))}
    assert not loose, f"{cls.__name__} fields without a type: {loose}"
