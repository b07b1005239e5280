"""Suite statistics of demands and lognormal fragility from multiple-stripe analysis.

Numbers in, numbers out: no files, no plotting.

* :func:`demand_statistics` — mean, median, 84th percentile, logarithmic standard
  deviation, minimum and maximum of the per-record peaks of one check;
* :func:`fit_fragility` — the lognormal fragility P(exceed | IM = x) = Φ(ln(x/θ)/β)
  fitted by maximum likelihood to the counts of exceeding runs at each intensity level
  (multiple-stripe analysis), the binomial likelihood of [1]_ (its Eqs. (11)-(12);
  equation numbers from memory);
* :func:`exceedance_probability` — that curve evaluated.

References
----------
.. [1] J. W. Baker, "Efficient analytical fragility function fitting using dynamic
   structural analysis," Earthquake Spectra, vol. 31, no. 1, pp. 579-599, 2015,
   doi:10.1193/021113EQS025M.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

#: Keys of :func:`demand_statistics`, in the order the pages and tables show them.
STATISTIC_KEYS = ("mean", "median", "p84", "beta", "min", "max")

#: Fit outcomes of :class:`Fragility`.
FITTED = "fitted"
NOT_REACHED = "not reached within the levels"
EXCEEDED_EVERYWHERE = "exceeded at every level"
NO_SPREAD = "no spread between two levels"


def demand_statistics(values) -> dict[str, float | None]:
    """
    Statistics of one check's per-record peak demands over a suite.

    Parameters
    ----------
    values : array-like
        Per-record peak demands (absolute values), in the check's unit. [unit]

    Returns
    -------
    dict
        ``mean``, ``median`` and ``p84`` (the 84th percentile, linear interpolation
        between order statistics, numpy's default), ``min`` and ``max`` [unit];
        ``beta``, the sample standard deviation (n − 1) of ln(values) [-], None when a
        value is not positive or there is only one value. Every entry is None when a
        value is not finite (a run that did not give a number).
    """
    x = np.asarray(values, dtype=float).ravel()
    if x.size == 0:
        raise ValueError("values must hold at least one demand; got none")
    if not np.all(np.isfinite(x)):
        return dict.fromkeys(STATISTIC_KEYS)
    beta = float(np.std(np.log(x), ddof=1)) if x.size > 1 and np.all(x > 0) else None
    return {"mean": float(np.mean(x)), "median": float(np.median(x)),
            "p84": float(np.percentile(x, 84.0)), "beta": beta,
            "min": float(np.min(x)), "max": float(np.max(x))}


@dataclass(frozen=True)
class Fragility:
    """A fitted (or not fittable) lognormal fragility of one limit."""

    #: intensity levels, increasing [measure unit]
    levels: tuple[float, ...]
    #: runs exceeding the limit at each level [-]
    exceeding: tuple[int, ...]
    #: runs at each level [-]
    motions: tuple[int, ...]
    #: one of FITTED, NOT_REACHED, EXCEEDED_EVERYWHERE, NO_SPREAD
    status: str
    #: median θ (fitted), or the geometric mean of the two levels the fraction jumps
    #: between (NO_SPREAD); None otherwise [measure unit]
    median: float | None = None
    #: logarithmic standard deviation β (FITTED only) [-]
    beta: float | None = None


def _check_counts(levels, exceeding, motions):
    x = np.asarray(levels, dtype=float)
    z = np.asarray(exceeding)
    n = np.asarray(motions)
    if x.ndim != 1 or x.size == 0 or z.shape != x.shape or n.shape != x.shape:
        raise ValueError(f"levels, exceeding and motions must be 1-D of one length; got "
                         f"shapes {x.shape}, {z.shape}, {n.shape}")
    if not np.all(np.isfinite(x)) or np.any(x <= 0):
        raise ValueError(f"levels must be finite and > 0 [measure unit]; got {x.tolist()}")
    if np.any(n < 1) or np.any(z < 0) or np.any(z > n) or \
            np.any(z != np.round(z)) or np.any(n != np.round(n)):
        raise ValueError(f"expected whole counts 0 <= exceeding <= motions, motions >= 1; "
                         f"got exceeding {z.tolist()}, motions {n.tolist()}")
    order = np.argsort(x, kind="stable")
    return x[order], z[order].astype(int), n[order].astype(int)


def log_likelihood(median, beta, levels, exceeding, motions) -> float:
    """
    Binomial log-likelihood of the counts under a lognormal fragility, Eq. (11) in [1]_.

    Parameters
    ----------
    median : float
        Median θ of the fragility. [measure unit]
    beta : float
        Logarithmic standard deviation β, > 0. [-]
    levels, exceeding, motions : array-like
        Intensity levels [measure unit], runs exceeding and runs at each level. [-]

    Returns
    -------
    float
        Σ ln C(n, z) + z ln p + (n − z) ln(1 − p), p = Φ(ln(x/θ)/β). [-]
    """
    from scipy.special import gammaln, log_ndtr

    x, z, n = (np.asarray(v, dtype=float) for v in (levels, exceeding, motions))
    s = np.log(x / median) / beta
    # ln p = ln Φ(s) and ln(1 − p) = ln Φ(−s), both accurate in the tails.
    return float(np.sum(gammaln(n + 1) - gammaln(z + 1) - gammaln(n - z + 1) +
                        z * log_ndtr(s) + (n - z) * log_ndtr(-s)))


def fit_fragility(levels, exceeding, motions) -> Fragility:
    """
    Lognormal fragility by maximum likelihood on multiple-stripe counts, [1]_.

    Maximises :func:`log_likelihood` over (ln θ, ln β), Eq. (12) in [1]_. Three cases
    have no maximum and are reported as such: no run exceeds at any level
    (:data:`NOT_REACHED`), every run exceeds at every level (:data:`EXCEEDED_EVERYWHERE`),
    and fractions that jump from 0 to 1 between two adjacent levels with nothing in
    between (:data:`NO_SPREAD`: the likelihood grows without bound as β → 0).

    Parameters
    ----------
    levels : array-like
        Intensity levels of the stripes, > 0. [measure unit]
    exceeding : array-like of int
        Runs exceeding the limit at each level. [-]
    motions : array-like of int
        Runs at each level. [-]

    Returns
    -------
    Fragility
    """
    from scipy.optimize import minimize

    x, z, n = _check_counts(levels, exceeding, motions)
    record = (tuple(x.tolist()), tuple(z.tolist()), tuple(n.tolist()))
    if not z.any():
        return Fragility(*record, NOT_REACHED)
    if np.all(z == n):
        return Fragility(*record, EXCEEDED_EVERYWHERE)
    partial = (z > 0) & (z < n)
    last_zero = np.flatnonzero(z == 0).max(initial=-1)
    first_full = np.flatnonzero(z == n).min(initial=x.size)
    if not partial.any() and last_zero < first_full:  # zeros, then every run
        low = x[last_zero] if last_zero >= 0 else x[0]
        high = x[first_full] if first_full < x.size else x[-1]
        return Fragility(*record, NO_SPREAD, median=float(math.sqrt(low * high)))
    lx = np.log(x)
    # Start: θ where the observed fraction crosses one half (log-linear between levels),
    # β a quarter of the span of ln x (common practice, no source; only a start).
    fraction = z / n
    start_median = float(np.exp(np.interp(0.5, np.maximum.accumulate(fraction), lx)))
    start_beta = max(0.25 * float(lx[-1] - lx[0]), 0.1)

    def negative(params):
        return -log_likelihood(math.exp(params[0]), math.exp(params[1]), x, z, n)

    best = minimize(negative, [math.log(start_median), math.log(start_beta)],
                    method="Nelder-Mead",
                    options={"xatol": 1e-10, "fatol": 1e-12, "maxiter": 4000})
    return Fragility(*record, FITTED, median=float(math.exp(best.x[0])),
                     beta=float(math.exp(best.x[1])))


def exceedance_probability(intensity, median, beta):
    """
    P(exceed | IM = x) = Φ(ln(x/θ)/β) of a lognormal fragility, Eq. (1) in [1]_.

    Parameters
    ----------
    intensity : float or array-like
        Intensity x, > 0. [measure unit]
    median : float
        Median θ. [measure unit]
    beta : float
        Logarithmic standard deviation β, > 0. [-]

    Returns
    -------
    float or ndarray
        Probability of exceeding. [-]
    """
    from scipy.special import ndtr

    if not (median > 0 and beta > 0):
        raise ValueError(f"median [measure unit] and beta [-] must be > 0; got {median}, "
                         f"{beta}")
    p = ndtr(np.log(np.asarray(intensity, dtype=float) / median) / beta)
    return float(p) if np.ndim(p) == 0 else p


__all__ = [
    "EXCEEDED_EVERYWHERE",
    "FITTED",
    "NOT_REACHED",
    "NO_SPREAD",
    "STATISTIC_KEYS",
    "Fragility",
    "demand_statistics",
    "exceedance_probability",
    "fit_fragility",
    "log_likelihood",
]
