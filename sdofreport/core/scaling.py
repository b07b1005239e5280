"""
Amplitude scaling of ground-motion suites to a target spectrum, with code checks.

Three rules (:data:`SCALING_RULES`):

* ``"asce7-16"`` — ASCE/SEI 7-16 §16.2.3.2 [1]_ (clause numbers from memory): one factor per pair of horizontal
  components; the average of the scaled maximum-direction (RotD100) spectra must not fall
  below 90 % of the target anywhere in the period range. How the per-pair factors are
  chosen is left to the engineer; we follow common practice (no source): each pair is
  first fitted to the target (:func:`scale_fit`), then one suite factor makes the suite
  mean touch exactly 90 % of the target at its lowest point.
* ``"en1998-1"`` — EN 1998-1:2004 §3.2.3.1.2 [2]_: at least 3 records; mean zero-period
  value >= a_g·S; mean 5 % spectrum >= 90 % of the elastic spectrum over 0.2T₁–2T₁. One
  suite factor, the smallest meeting both.
* ``"fit"`` — per-record least-squares fit in logarithms, closed form.

Periods of the check: the grid periods inside the range plus both ends of the range;
spectra are interpolated there linearly in log T and log Sa (common practice, no
source). Spectra must be positive inside the range.

References
----------
.. [1] ASCE/SEI 7-16, *Minimum Design Loads and Associated Criteria for Buildings and
   Other Structures*. Reston, VA, USA: ASCE, 2017, §16.2.1-§16.2.3.
.. [2] CEN, EN 1998-1:2004, Eurocode 8 Part 1, §3.2.3.1.2 and §4.3.3.4.3.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from sdofreport.core._checks import period_pair
from sdofreport.core._checks import positive as _positive

from sdofreport.core.design_spectra import _as_periods

__all__ = [
    "SCALING_RULES",
    "SEVERITIES",
    "FACTOR_LIMITS",
    "ROUND_OFF",
    "Criterion",
    "ScalingResult",
    "period_range_asce7_16",
    "period_range_en1998_1",
    "flag_factors",
    "meets",
    "scale_fit",
    "scale_asce7_16",
    "scale_en1998_1",
]

#: Every scaling rule name (CLI choices and the validator read this).
SCALING_RULES = ("asce7-16", "en1998-1", "fit")

#: Criterion severities: a failed "error" criterion fails the suite; a failed
#: "warning" criterion is reported but does not.
SEVERITIES = ("error", "warning")

#: Factors outside (low, high) are flagged. Common practice (no source).
FACTOR_LIMITS = (0.25, 4.0)

#: Relative allowance when comparing an achieved ratio with its requirement, so a suite
#: scaled to touch a limit exactly is not failed by round-off (our choice, no source).
ROUND_OFF = 1e-9


@dataclass(frozen=True)
class Criterion:
    """One check of a suite against a rule: ``achieved`` compared with ``required``."""

    #: what is checked, in words
    name: str
    #: required value (a lower bound unless ``comparison`` says "<=")
    required: float
    #: value achieved by the scaled suite
    achieved: float
    #: whether the requirement is met
    passed: bool
    #: "error" or "warning" (see SEVERITIES)
    severity: str
    #: clause or "common practice (no source)"
    source: str
    #: ">=" or "<="
    comparison: str = ">="


@dataclass(frozen=True)
class ScalingResult:
    """Scale factors for a suite and the criteria they were checked against."""

    #: one of SCALING_RULES
    rule: str
    #: final factor per record (record factor × suite factor), shape (n,) [-]
    factors: np.ndarray
    #: factor per record before the suite factor, shape (n,) [-]
    record_factors: np.ndarray
    #: common factor applied on top of record_factors [-]
    suite_factor: float
    #: (lower, upper) period range [s]
    period_range_s: tuple[float, float]
    #: periods at which the range checks were made [s], shape (nR,)
    check_periods_s: np.ndarray
    #: mean of the scaled spectra at the input periods [g], shape (nT,)
    mean_scaled_g: np.ndarray
    #: mean scaled spectrum / target at check_periods_s [-], shape (nR,)
    ratio: np.ndarray
    #: True where a factor lies outside FACTOR_LIMITS, shape (n,)
    flagged: np.ndarray
    #: checks made
    criteria: list[Criterion] = field(default_factory=list)

    @property
    def passed(self) -> bool:
        """True when every error-severity criterion passed."""
        return all(c.passed for c in self.criteria if c.severity == "error")

    @property
    def warnings(self) -> list[Criterion]:
        """Warning-severity criteria that did not pass."""
        return [c for c in self.criteria if c.severity == "warning" and not c.passed]


# ---------------------------------------------------------------------- period ranges
def period_range_asce7_16(natural_period_s) -> tuple[float, float]:
    """
    Period range of ASCE/SEI 7-16 §16.2.3.1 (from memory) for a first-mode period T: (0.2 T, 2 T).

    The standard sets the upper bound at no less than 2T and the lower bound at no more
    than 0.2T (lower still if needed to cover 90 % mass participation); this returns the
    narrowest range allowed.

    Parameters
    ----------
    natural_period_s : float
        First-mode period T, > 0. [s]

    Returns
    -------
    tuple of float
        (0.2 T, 2 T). [s]

    References
    ----------
    .. [1] ASCE/SEI 7-16, §16.2.3.1 (clause number from memory).
    """
    t = _positive(natural_period_s, "natural_period_s", "s")
    return (0.2 * t, 2.0 * t)


def period_range_en1998_1(natural_period_s) -> tuple[float, float]:
    """
    Period range of EN 1998-1 §3.2.3.1.2(4)c: (0.2 T₁, 2 T₁).

    Parameters
    ----------
    natural_period_s : float
        Fundamental period T₁ in the direction considered, > 0. [s]

    Returns
    -------
    tuple of float
        (0.2 T₁, 2 T₁). [s]

    References
    ----------
    .. [1] CEN, EN 1998-1:2004, §3.2.3.1.2.
    """
    t = _positive(natural_period_s, "natural_period_s", "s")
    return (0.2 * t, 2.0 * t)


def flag_factors(factors, low=FACTOR_LIMITS[0], high=FACTOR_LIMITS[1]) -> np.ndarray:
    """
    Flag scale factors outside ``[low, high]``.

    Common practice (no source): factors far from 1 change a record's character
    (magnitude, duration) too much to stand for the scenario.

    Parameters
    ----------
    factors : array-like
        Scale factors, > 0. [-]
    low, high : float, optional
        Accepted range, 0 < low <= high. [-]

    Returns
    -------
    numpy.ndarray
        Boolean, True where a factor lies outside ``[low, high]``. [-]

    References
    ----------
    .. [1] None: common practice.
    """
    f = np.asarray(factors, dtype=np.float64)
    lo = _positive(low, "low", "-")
    hi = _positive(high, "high", "-")
    if hi < lo:
        raise ValueError(f"high must be >= low = {lo!r} [-]; got {hi!r}")
    return (f < lo) | (f > hi)


# -------------------------------------------------------------------------- checks
def _check_suite(periods, spectra_g, target_sa_g, period_range_s, spectra_name):
    """Validate and return periods (nT,), spectra (n, nT), target (nT,), (lo, hi)."""
    t = _as_periods(periods, "periods_s")
    if t.ndim != 1 or t.size < 2 or np.any(np.diff(t) <= 0.0):
        raise ValueError(
            f"periods_s must be a strictly increasing 1-D list of >= 2 periods [s]; "
            f"got shape {t.shape}"
        )
    try:
        sa = np.asarray(spectra_g, dtype=np.float64)
        target = np.asarray(target_sa_g, dtype=np.float64)
    except (TypeError, ValueError):
        raise ValueError(f"{spectra_name} [g] and target_sa_g [g] must be numbers") from None
    if sa.ndim == 1:
        sa = sa[None, :]
    if sa.ndim != 2 or sa.shape[1] != t.size or sa.shape[0] == 0:
        raise ValueError(
            f"{spectra_name} must have shape (n_records, {t.size}) [g]; got {sa.shape}"
        )
    if target.shape != t.shape:
        raise ValueError(f"target_sa_g must have shape ({t.size},) [g]; got {target.shape}")
    if not (np.all(np.isfinite(sa)) and np.all(np.isfinite(target))):
        raise ValueError(f"{spectra_name} [g] and target_sa_g [g] must be finite")
    lo, hi = period_pair(period_range_s, "period_range_s")
    if lo < t[0] or hi > t[-1]:
        raise ValueError(
            f"period_range_s {period_range_s!r} [s] must lie within the spectrum periods "
            f"{t[0]!r} to {t[-1]!r} s"
        )
    return t, sa, target, (lo, hi)


def _on_range(t, values, lo, hi, name):
    """Check periods (range ends + grid inside) and values there (2-D), log-log interpolated."""
    inside = (t > lo) & (t < hi)
    tr = np.concatenate([[lo], t[inside], [hi]])
    lo_i = max(np.searchsorted(t, lo, side="right") - 1, 0)
    hi_i = min(np.searchsorted(t, hi, side="left"), t.size - 1)
    used = values[..., lo_i:hi_i + 1]
    if not np.all(used > 0.0) or t[lo_i] <= 0.0:
        raise ValueError(
            f"periods [s] and {name} [g] must be > 0 from {t[lo_i]!r} to {t[hi_i]!r} s, the "
            f"grid periods that span the period range (log-log interpolation)"
        )
    log_t = np.log(t[lo_i:hi_i + 1])
    log_v = np.log(used)
    flat = log_v.reshape(-1, log_t.size)
    out = np.array([np.exp(np.interp(np.log(tr), log_t, row)) for row in flat])
    # Grid periods inside the range keep their values exactly (no exp(log()) round-off).
    out[:, 1:-1] = used.reshape(-1, log_t.size)[:, inside[lo_i:hi_i + 1]]
    return tr, out


def _check_factors(values, name, n):
    try:
        f = np.asarray(values, dtype=np.float64)
    except (TypeError, ValueError):
        f = np.array([np.nan])
    if f.ndim == 0:
        f = np.full(n, float(f))
    if f.shape != (n,) or not (np.all(np.isfinite(f)) and np.all(f > 0.0)):
        raise ValueError(f"{name} must be {n} finite numbers > 0 [-]; got {values!r}")
    return f


def _factor_criterion(factors, low=FACTOR_LIMITS[0], high=FACTOR_LIMITS[1]):
    flagged = flag_factors(factors, low, high)
    return flagged, Criterion(
        name=f"records with a scale factor outside [{low:g}, {high:g}]",
        required=0.0,
        achieved=float(np.count_nonzero(flagged)),
        passed=not bool(np.any(flagged)),
        severity="warning",
        source="common practice (no source)",
        comparison="<=",
    )


def _fit_factors(t_range, sa_range, target_range):
    """ln f_i = mean over check periods of (ln target − ln Sa_i): the least-squares fit."""
    return np.exp(np.mean(np.log(target_range)[None, :] - np.log(sa_range), axis=1))


def meets(achieved, required) -> bool:
    """True when ``achieved >= required`` allowing :data:`ROUND_OFF` (relative)."""
    return bool(achieved >= required * (1.0 - ROUND_OFF))


_meets = meets


# ----------------------------------------------------------------------------- rules
def scale_fit(periods_s, psa_g_per_record, target_sa_g, period_range_s,
              suite_factor=1.0) -> ScalingResult:
    """
    Per-record factors that best fit the target in logarithms over a period range.

    ``f_i`` minimises ``Σ_j (ln(f_i Sa_i(T_j)) − ln Sa_target(T_j))²`` over the check
    periods T_j, so ``ln f_i = mean_j(ln Sa_target − ln Sa_i)`` (closed form of a
    one-parameter least-squares problem); ``suite_factor`` multiplies every ``f_i``.

    Parameters
    ----------
    periods_s : array-like
        Spectrum periods, strictly increasing, shape (nT,). [s]
    psa_g_per_record : array-like
        Spectrum of each record (any definition), shape (n, nT). [g]
    target_sa_g : array-like
        Target spectrum at ``periods_s``, shape (nT,). [g]
    period_range_s : tuple of float
        (lower, upper) period range within ``periods_s``. [s]
    suite_factor : float, optional
        Common factor applied on top, > 0. [-]

    Returns
    -------
    ScalingResult
        ``rule="fit"``; criteria: the factor-range flag only (warning).

    References
    ----------
    .. [1] Common practice (no source); the fit is ordinary least squares.
    """
    t, sa, target, (lo, hi) = _check_suite(periods_s, psa_g_per_record, target_sa_g,
                                           period_range_s, "psa_g_per_record")
    suite = _positive(suite_factor, "suite_factor", "-")
    tr, sa_r = _on_range(t, sa, lo, hi, "psa_g_per_record")
    _, target_r = _on_range(t, target, lo, hi, "target_sa_g")
    record = _fit_factors(tr, sa_r, target_r[0])
    factors = record * suite
    flagged, crit = _factor_criterion(factors)
    mean_r = np.mean(factors[:, None] * sa_r, axis=0)
    return ScalingResult(
        rule="fit", factors=factors, record_factors=record, suite_factor=suite,
        period_range_s=(lo, hi), check_periods_s=tr,
        mean_scaled_g=np.mean(factors[:, None] * sa, axis=0),
        ratio=mean_r / target_r[0], flagged=flagged, criteria=[crit],
    )


def scale_asce7_16(periods_s, rotd100_psa_g_per_pair, target_sa_g, period_range_s, *,
                   pair_fit=True, record_factors=None) -> ScalingResult:
    """
    Scale a suite of horizontal pairs to a target spectrum per ASCE/SEI 7-16 §16.2.3.

    Step 1 (common practice, no source): each pair gets the factor of :func:`scale_fit`
    (``pair_fit=True``), the given ``record_factors``, or 1. Step 2: one suite factor
    ``s = 0.90 / min_T(mean_i(f_i RotD100_i) / target)`` so the suite mean of the scaled
    RotD100 spectra is at least 90 % of the target at every check period and exactly
    90 % at one (§16.2.3.2, the mean being linear in ``s``).

    Criteria: "suite mean RotD100 / target, minimum over the period range" >= 0.90
    (error, §16.2.3.2); "number of ground motions" >= 11 (error, §16.2.2: a suite of
    fewer motions does not comply); factors outside :data:`FACTOR_LIMITS` (warning,
    common practice). Clause numbers from memory (see :mod:`sdofreport.codes.asce7_16`).

    Parameters
    ----------
    periods_s : array-like
        Spectrum periods, strictly increasing, shape (nT,). [s]
    rotd100_psa_g_per_pair : array-like
        RotD100 pseudo-spectral acceleration of each pair, shape (n_pairs, nT). [g]
    target_sa_g : array-like
        Target (MCE_R) spectrum at ``periods_s``, shape (nT,). [g]
    period_range_s : tuple of float
        (lower, upper) period range, see :func:`period_range_asce7_16`. [s]
    pair_fit : bool, optional
        Fit each pair to the target before the suite factor (ignored when
        ``record_factors`` is given). [-]
    record_factors : array-like, optional
        Factors per pair to use in step 1 instead, > 0. [-]

    Returns
    -------
    ScalingResult
        ``rule="asce7-16"``.

    References
    ----------
    .. [1] ASCE/SEI 7-16, *Minimum Design Loads and Associated Criteria for Buildings
       and Other Structures*. Reston, VA, USA: ASCE, 2017, §16.2.2, §16.2.3.2 (clause numbers from memory).
    """
    t, sa, target, (lo, hi) = _check_suite(periods_s, rotd100_psa_g_per_pair, target_sa_g,
                                           period_range_s, "rotd100_psa_g_per_pair")
    n = sa.shape[0]
    tr, sa_r = _on_range(t, sa, lo, hi, "rotd100_psa_g_per_pair")
    _, target_r = _on_range(t, target, lo, hi, "target_sa_g")
    target_r = target_r[0]
    if record_factors is not None:
        record = _check_factors(record_factors, "record_factors", n)
    elif pair_fit:
        record = _fit_factors(tr, sa_r, target_r)
    else:
        record = np.ones(n)
    # §16.2.3.2: mean of scaled RotD100 >= 0.9 target; the mean is linear in the suite
    # factor, so the factor that touches 0.9 at the lowest point is 0.9 / min ratio.
    ratio0 = np.mean(record[:, None] * sa_r, axis=0) / target_r
    suite = 0.9 / float(ratio0.min())
    factors = record * suite
    ratio = np.mean(factors[:, None] * sa_r, axis=0) / target_r
    flagged, factor_crit = _factor_criterion(factors)
    criteria = [
        Criterion("suite mean RotD100 / target, minimum over the period range", 0.90,
                  float(ratio.min()), _meets(float(ratio.min()), 0.90), "error",
                  "ASCE/SEI 7-16 §16.2.3.2 (clause number from memory)"),
        Criterion("number of ground motions", 11.0, float(n), n >= 11, "error",
                  "ASCE/SEI 7-16 §16.2.2 (clause number from memory)"),
        factor_crit,
    ]
    return ScalingResult(
        rule="asce7-16", factors=factors, record_factors=record, suite_factor=suite,
        period_range_s=(lo, hi), check_periods_s=tr,
        mean_scaled_g=np.mean(factors[:, None] * sa, axis=0), ratio=ratio,
        flagged=flagged, criteria=criteria,
    )


def scale_en1998_1(periods_s, psa_g_per_record, target_sa_g, period_range_s, ag_s_g,
                   zero_period_g, *, record_factors=None) -> ScalingResult:
    """
    Scale a suite of records to an EN 1998-1 elastic spectrum (§3.2.3.1.2).

    One suite factor ``s`` on top of ``record_factors`` (default 1 each): the smallest
    meeting both (§3.2.3.1.2(4)b, c)

    * ``mean_i(s f_i PGA_i) >= a_g S``, i.e. ``s >= a_g S / mean_i(f_i PGA_i)``;
    * ``mean_i(s f_i Sa_i(T)) >= 0.9 S_e(T)`` over the range, i.e.
      ``s >= 0.9 / min_T(mean_i(f_i Sa_i) / S_e)``.

    Criteria: "number of records" >= 3 (error, (4)a); the two conditions above (error);
    "records for using the mean response" >= 7 (warning, §4.3.3.4.3: with fewer, the
    most unfavourable response is used); factors outside :data:`FACTOR_LIMITS`
    (warning, common practice).

    Parameters
    ----------
    periods_s : array-like
        Spectrum periods, strictly increasing, shape (nT,). [s]
    psa_g_per_record : array-like
        5 %-damped spectrum of each record, shape (n, nT). [g]
    target_sa_g : array-like
        Elastic spectrum S_e at ``periods_s``, shape (nT,). [g]
    period_range_s : tuple of float
        (lower, upper), see :func:`period_range_en1998_1`. [s]
    ag_s_g : float
        a_g·S of the elastic spectrum, > 0 (``EN1998Parameters.ag_s_g``). [g]
    zero_period_g : array-like
        Zero-period spectral value (PGA) of each record, > 0, shape (n,). [g]
    record_factors : array-like, optional
        Factors per record applied before the suite factor, > 0. [-]

    Returns
    -------
    ScalingResult
        ``rule="en1998-1"``.

    References
    ----------
    .. [1] CEN, EN 1998-1:2004, Eurocode 8 Part 1, §3.2.3.1.2(4) and §4.3.3.4.3(3).
    """
    t, sa, target, (lo, hi) = _check_suite(periods_s, psa_g_per_record, target_sa_g,
                                           period_range_s, "psa_g_per_record")
    n = sa.shape[0]
    ags = _positive(ag_s_g, "ag_s_g", "g")
    pga = _check_factors(zero_period_g, "zero_period_g", n)
    record = np.ones(n) if record_factors is None else _check_factors(
        record_factors, "record_factors", n)
    tr, sa_r = _on_range(t, sa, lo, hi, "psa_g_per_record")
    _, target_r = _on_range(t, target, lo, hi, "target_sa_g")
    target_r = target_r[0]
    ratio0 = np.mean(record[:, None] * sa_r, axis=0) / target_r
    pga0 = float(np.mean(record * pga))
    suite = max(0.9 / float(ratio0.min()), ags / pga0)
    factors = record * suite
    ratio = np.mean(factors[:, None] * sa_r, axis=0) / target_r
    mean_pga = float(np.mean(factors * pga))
    flagged, factor_crit = _factor_criterion(factors)
    criteria = [
        Criterion("number of records", 3.0, float(n), n >= 3, "error",
                  "EN 1998-1:2004 §3.2.3.1.2(4)a"),
        Criterion("mean zero-period spectral value / (a_g S)", 1.0, mean_pga / ags,
                  _meets(mean_pga / ags, 1.0), "error", "EN 1998-1:2004 §3.2.3.1.2(4)b"),
        Criterion("mean spectrum / elastic spectrum, minimum over the period range", 0.90,
                  float(ratio.min()), _meets(float(ratio.min()), 0.90), "error",
                  "EN 1998-1:2004 §3.2.3.1.2(4)c"),
        Criterion("records for using the mean response", 7.0, float(n), n >= 7, "warning",
                  "EN 1998-1:2004 §4.3.3.4.3(3)"),
        factor_crit,
    ]
    return ScalingResult(
        rule="en1998-1", factors=factors, record_factors=record, suite_factor=suite,
        period_range_s=(lo, hi), check_periods_s=tr,
        mean_scaled_g=np.mean(factors[:, None] * sa, axis=0), ratio=ratio,
        flagged=flagged, criteria=criteria,
    )
