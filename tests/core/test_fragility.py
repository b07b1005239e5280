"""Demand statistics and the multiple-stripe fragility fit against numpy and scipy.stats.

The fit is the maximum-likelihood lognormal fragility on binomial counts of
J. W. Baker (2015), Earthquake Spectra 31(1), doi:10.1193/021113EQS025M.
"""

import math

import numpy as np
import pytest
from scipy import stats

from sdofreport.core import fragility as fr


def test_statistics_match_numpy_on_a_known_sample():
    values = [0.012, 0.031, 0.018, 0.025, 0.040, 0.009, 0.022]
    got = fr.demand_statistics(values)
    x = np.array(values)
    # numpy: mean, median, 84th percentile (linear), min, max of the same seven numbers.
    assert got["mean"] == pytest.approx(np.mean(x), rel=1e-14)
    assert got["median"] == pytest.approx(0.022, rel=1e-14)
    assert got["p84"] == pytest.approx(np.percentile(x, 84), rel=1e-14)
    assert got["min"] == 0.009 and got["max"] == 0.040
    # numpy: sample standard deviation (ddof = 1) of the natural logarithms.
    assert got["beta"] == pytest.approx(np.std(np.log(x), ddof=1), rel=1e-14)


def test_p84_of_a_lognormal_sample_is_median_times_exp_beta():
    # Closed form: for ln X ~ N(μ, σ²) the 84th percentile is exp(μ + σ Φ⁻¹(0.84)) (Φ⁻¹
    # from scipy.stats); a seeded sample of 200 000 lands within sampling error.
    rng = np.random.default_rng(11)
    x = np.exp(rng.normal(math.log(0.3), 0.5, 200_000))
    got = fr.demand_statistics(x)
    assert got["median"] == pytest.approx(0.3, rel=0.01)
    assert got["beta"] == pytest.approx(0.5, rel=0.01)
    assert got["p84"] == pytest.approx(0.3 * math.exp(0.5 * stats.norm.ppf(0.84)),
                                       rel=0.01)


def test_statistics_of_one_value_and_of_non_finite_values():
    # Definition: one value has no spread; a run without a number has no statistics.
    one = fr.demand_statistics([2.0])
    assert one["beta"] is None and one["mean"] == one["max"] == 2.0
    assert set(fr.demand_statistics([1.0, math.inf]).values()) == {None}
    assert fr.demand_statistics([0.0, 1.0])["beta"] is None  # ln 0 is undefined
    with pytest.raises(ValueError, match="at least one demand"):
        fr.demand_statistics([])


LEVELS = [0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.8, 1.0]
EXCEEDING = [0, 1, 3, 6, 9, 13, 17, 20]
MOTIONS = [22] * 8


def _scipy_log_likelihood(median, beta):
    """Eq. (11) of Baker (2015) written with scipy.stats: Σ ln Binom(z; n, Φ(ln(x/θ)/β))."""
    p = stats.norm.cdf(np.log(np.array(LEVELS) / median) / beta)
    return float(np.sum(stats.binom.logpmf(EXCEEDING, MOTIONS, p)))


def test_log_likelihood_equals_scipy_stats_binomial():
    # scipy.stats: binom.logpmf with p from norm.cdf, at an arbitrary (θ, β).
    assert fr.log_likelihood(0.45, 0.6, LEVELS, EXCEEDING, MOTIONS) == pytest.approx(
        _scipy_log_likelihood(0.45, 0.6), rel=1e-12)


def test_fit_maximises_the_scipy_stats_likelihood():
    fit = fr.fit_fragility(LEVELS, EXCEEDING, MOTIONS)
    assert fit.status == fr.FITTED
    best = _scipy_log_likelihood(fit.median, fit.beta)
    # scipy.stats likelihood: no point of a fine (θ, β) grid around the fit beats it.
    for dm in np.linspace(-0.05, 0.05, 21):
        for db in np.linspace(-0.05, 0.05, 21):
            assert _scipy_log_likelihood(fit.median * math.exp(dm),
                                         fit.beta * math.exp(db)) <= best + 1e-9
    # First-order conditions of the probit likelihood (score = 0), written with
    # scipy.stats.norm: Σ (z − n p) φ / (p (1 − p)) · [1, ln x] = 0.
    s = np.log(np.array(LEVELS) / fit.median) / fit.beta
    p, phi = stats.norm.cdf(s), stats.norm.pdf(s)
    w = (np.array(EXCEEDING) - np.array(MOTIONS) * p) * phi / (p * (1 - p))
    assert abs(np.sum(w)) < 1e-4 and abs(np.sum(w * np.log(LEVELS))) < 1e-4


def test_fit_recovers_a_known_lognormal_within_sampling_error():
    # Data drawn from P = Φ(ln(x/0.5)/0.4), 400 runs at each of 10 levels (seeded).
    # Standard errors here are about 0.01 on ln θ and 3 % on β (Fisher information);
    # the tolerances are about five of them.
    rng = np.random.default_rng(2015)
    levels = np.geomspace(0.15, 1.5, 10)
    motions = np.full(10, 400)
    exceeding = rng.binomial(motions, stats.norm.cdf(np.log(levels / 0.5) / 0.4))
    fit = fr.fit_fragility(levels, exceeding, motions)
    assert math.log(fit.median / 0.5) == pytest.approx(0.0, abs=0.05)
    assert fit.beta == pytest.approx(0.4, rel=0.15)


def test_never_exceeding_is_not_reached_rather_than_a_number():
    # Definition: with no exceedance the likelihood has no maximum (θ → ∞).
    fit = fr.fit_fragility([0.2, 0.4, 0.8], [0, 0, 0], [22, 22, 22])
    assert fit.status == fr.NOT_REACHED == "not reached within the levels"
    assert fit.median is None and fit.beta is None


def test_exceeding_everywhere_and_a_step_are_named():
    # Definition: all runs exceed (θ → 0) or a jump 0 → 1 with nothing between (β → 0).
    assert fr.fit_fragility([0.2, 0.4], [5, 5], [5, 5]).status == fr.EXCEEDED_EVERYWHERE
    step = fr.fit_fragility([0.2, 0.4, 0.8], [0, 0, 4], [4, 4, 4])
    assert step.status == fr.NO_SPREAD and step.beta is None
    assert step.median == pytest.approx(math.sqrt(0.4 * 0.8), rel=1e-14)


def test_probability_and_bad_counts():
    # Closed form: Φ(0) = 1/2 at the median; Φ(1) one β above it.
    assert fr.exceedance_probability(0.5, 0.5, 0.4) == pytest.approx(0.5, abs=1e-15)
    assert fr.exceedance_probability(0.5 * math.exp(0.4), 0.5, 0.4) == pytest.approx(
        stats.norm.cdf(1.0), rel=1e-12)
    with pytest.raises(ValueError, match="0 <= exceeding <= motions"):
        fr.fit_fragility([0.1, 0.2], [3, 1], [2, 2])
    with pytest.raises(ValueError, match="levels must be finite and > 0"):
        fr.fit_fragility([0.0, 0.2], [0, 1], [2, 2])
