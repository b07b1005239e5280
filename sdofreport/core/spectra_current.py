"""
Design spectra of the current editions: ASCE/SEI 7-22 and EN 1998-1-1:2024.

Every function takes natural periods [s] and returns spectral accelerations in units of
g. The clause numbers, coefficients and interpolation rules below were **written down
from memory** of the published texts [1]_ [2]_ and are marked so in the docs and on the
pages; every coefficient may be overridden by the project (National-Annex or
site-specific values). Check them against the standards before relying on them.

References
----------
.. [1] American Society of Civil Engineers, *Minimum Design Loads and Associated
   Criteria for Buildings and Other Structures*, ASCE/SEI 7-22. Reston, VA, USA: ASCE,
   2022, §11.4.3 (site classes), §11.4.5 (design spectra), §11.4.6 (MCE_R spectrum).
.. [2] CEN, *Eurocode 8: Design of structures for earthquake resistance — Part 1-1:
   General rules and seismic action*, EN 1998-1-1:2024. Brussels: CEN, 2024, §5.2
   (elastic response spectrum, site categories and amplification factors).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from sdofreport.core import _checks
from sdofreport.core._checks import positive as _positive

__all__ = [
    "ASCE7_22_LEVELS",
    "ASCE7_22_SITE_CLASSES",
    "EN1998_1_1_RECOMMENDED",
    "EN1998_1_1_SITE_CATEGORIES",
    "EN1998_1_1_SITE_FACTORS",
    "EN2024Parameters",
    "asce7_22_spectrum",
    "check_multi_period",
    "damping_correction",
    "en1998_1_1_parameters",
    "en1998_1_1_spectrum",
]

#: Site classes of ASCE/SEI 7-22 §20.2 and §11.4.3 (from memory): the nine-class scheme
#: with the intermediate classes BC, CD and DE, and "default" site conditions
#: (§11.4.3, the most critical of C, CD and D). Site class F needs a site response
#: analysis (§11.4.8, Chapter 21): give that spectrum as ``kind = "table"``.
ASCE7_22_SITE_CLASSES = ("A", "B", "BC", "C", "CD", "D", "DE", "E", "default")

#: Levels relative to the MCE_R spectrum: MCE_R (§11.4.6) and design, 2/3 of MCE_R
#: (§11.4.5, Eq. 11.4-3/-4 for the two-period form), from memory.
ASCE7_22_LEVELS = {"mce_r": 1.0, "design": 2.0 / 3.0}

#: Site categories of EN 1998-1-1:2024 §5.1 (from memory).
EN1998_1_1_SITE_CATEGORIES = ("A", "B", "C", "D", "E", "F")

#: Site amplification factors of EN 1998-1-1:2024 (from memory; check the table of the
#: published text and its National Annex): ``F_α = a (1 − b S_α,RP/g)`` and
#: ``F_β = c (1 − d S_β,RP/g)``; per site category (a, b, c, d).
EN1998_1_1_SITE_FACTORS: dict[str, tuple[float, float, float, float]] = {
    "A": (1.0, 0.0, 1.0, 0.0),
    "B": (1.3, 0.1, 1.6, 0.2),
    "C": (1.6, 0.2, 2.3, 0.3),
    "D": (1.8, 0.3, 3.2, 0.4),
    "E": (2.2, 0.5, 3.2, 0.4),
    "F": (1.7, 0.3, 4.0, 0.5),
}

#: Recommended values of the Nationally Determined Parameters used here (from memory):
#: χ in T_B = χ T_C, T_D [s], F_A = plateau / zero-period value, T_β [s].
EN1998_1_1_RECOMMENDED = {"chi": 0.25, "td_s": 2.0, "plateau_ratio": 2.5, "t_beta_s": 1.0}

# Lower limit of the damping correction η, EN 1998-1:2004 Eq. (3.6) (kept in
# EN 1998-1-1:2024, from memory).
_ETA_MIN = 0.55


def _periods(periods_s) -> np.ndarray:
    from sdofreport.core.design_spectra import _as_periods

    return _as_periods(periods_s)


def damping_correction(damping) -> float:
    """
    Damping correction factor ``η = √(10/(5+ξ)) >= 0.55``, ξ in percent: EN 1998-1:2004
    Eq. (3.6), kept in EN 1998-1-1:2024 (from memory).

    Parameters
    ----------
    damping : float
        Viscous damping ratio ξ as a fraction (0.05 = 5 %), 0 <= ξ < 1. [-]

    Returns
    -------
    float
        η. [-]
    """
    try:
        xi = float(damping)
    except (TypeError, ValueError):
        xi = math.nan
    if not 0.0 <= xi < 1.0:
        raise ValueError(f"damping must be a ratio in [0, 1) (0.05 for 5 %) [-]; got "
                         f"{damping!r}")
    return max(math.sqrt(10.0 / (5.0 + 100.0 * xi)), _ETA_MIN)


# ------------------------------------------------------------------------ ASCE 7-22
def check_multi_period(periods_s, sa_g) -> tuple[np.ndarray, np.ndarray]:
    """The multi-period ordinates checked: 1-D, same length, at least 2, starting at
    T = 0, strictly increasing periods [s], finite Sa > 0 [g]."""
    try:
        tp = np.asarray(periods_s, dtype=np.float64)
        sa = np.asarray(sa_g, dtype=np.float64)
    except (TypeError, ValueError):
        raise ValueError(f"multi-period ordinates must be numbers; got periods "
                         f"{periods_s!r} and sa {sa_g!r}") from None
    if tp.ndim != 1 or sa.shape != tp.shape:
        raise ValueError(f"multi-period periods [s] and sa [g] must be lists of the same "
                         f"length; got {tp.size} periods and {sa.size} values")
    if tp.size < 2:
        raise ValueError(f"multi-period periods must hold at least 2 ordinates [s]; got "
                         f"{tp.size}")
    if not np.all(np.isfinite(tp)) or tp[0] != 0.0:
        raise ValueError(f"multi-period periods must start at T = 0 (the spectrum is "
                         f"given from 0 s) [s]; got first period {float(tp[0])!r}")
    steps = np.diff(tp)
    if np.any(steps <= 0.0):
        i = int(np.flatnonzero(steps <= 0.0)[0])
        raise ValueError(f"multi-period periods must increase strictly [s]; got "
                         f"{tp[i]:g} then {tp[i + 1]:g}")
    if not (np.all(np.isfinite(sa)) and np.all(sa > 0.0)):
        bad = float(sa[~(np.isfinite(sa) & (sa > 0.0))][0])
        raise ValueError(f"multi-period sa must be finite and > 0 [g]; got {bad!r}")
    return tp, sa


def _site_class(site_class) -> str:
    if site_class not in ASCE7_22_SITE_CLASSES:
        hint = (" (site class F needs a site response analysis, ASCE/SEI 7-22 §11.4.8, "
                "from memory: give that spectrum as kind = \"table\")"
                if site_class == "F" else "")
        raise ValueError(f"site_class must be one of {', '.join(ASCE7_22_SITE_CLASSES)}"
                         f"{hint} [-]; got {site_class!r}")
    return site_class


def asce7_22_spectrum(periods_s, site_class, level="mce_r", mp_periods_s=None,
                      mp_sa_g=None, sds_g=None, sd1_g=None, tl_s=None) -> np.ndarray:
    """
    MCE_R (or design) response spectrum of ASCE/SEI 7-22, multi-period or two-period.

    **Multi-period** (``mp_periods_s``, ``mp_sa_g``): the multi-period MCE_R spectrum of
    §11.4.6 given as its ordinates for the site class, copied by the user from the
    official source. Between ordinates Sa is interpolated linearly in T (§11.4.5.1, from
    memory). Beyond the last ordinate (T_n, S_n): ``S_n T_n / T`` up to ``T_L`` and
    ``S_n T_n T_L / T²`` beyond when ``tl_s`` is given (the long-period branches of the
    two-period form, from memory); without T_L the 1/T branch continues (our choice, no
    source). The design spectrum is 2/3 of it (§11.4.5, from memory).

    **Two-period** (``sds_g``, ``sd1_g``, ``tl_s``): the design spectrum of §11.4.5.2,
    Eqs. (11.4-5) to (11.4-8) (from memory, the same equations as ASCE/SEI 7-16
    §11.4.6) with the design values S_DS and S_D1, ``T_0 = 0.2 S_D1/S_DS``,
    ``T_S = S_D1/S_DS``; the MCE_R spectrum (§11.4.6) is 1.5 × the design spectrum,
    i.e. the same equations with S_MS = 1.5 S_DS and S_M1 = 1.5 S_D1.

    Parameters
    ----------
    periods_s : float or array-like
        Natural periods, >= 0. [s]
    site_class : str
        One of :data:`ASCE7_22_SITE_CLASSES` (shown; the ordinates carry its effect). [-]
    level : {"mce_r", "design"}
        The MCE_R spectrum (the Chapter 16 target) or the design spectrum (2/3). [-]
    mp_periods_s, mp_sa_g : array-like, optional
        Multi-period MCE_R ordinates: periods from 0, strictly increasing [s]; Sa [g].
    sds_g, sd1_g : float, optional
        Design spectral accelerations S_DS and S_D1 of the two-period form. [g]
    tl_s : float, optional
        Long-period transition period T_L (required by the two-period form). [s]

    Returns
    -------
    numpy.ndarray
        Spectral acceleration, same shape as ``periods_s``. [g]
    """
    from sdofreport.core.design_spectra import asce7_16_spectrum

    t = _periods(periods_s)
    _site_class(site_class)
    _checks.one_of(level, "level", ASCE7_22_LEVELS, unit="-")
    multi = mp_periods_s is not None or mp_sa_g is not None
    two = sds_g is not None or sd1_g is not None
    if multi and two:
        raise ValueError("give either the multi-period ordinates (periods, sa) or the "
                         "two-period values (sds, sd1, tl), not both")
    if not multi:
        missing = [n for n, v in (("sds_g", sds_g), ("sd1_g", sd1_g), ("tl_s", tl_s))
                   if v is None]
        if missing:
            raise ValueError(f"the two-period form needs sds_g, sd1_g and tl_s; missing "
                             f"{', '.join(missing)} (or give the multi-period ordinates "
                             f"periods and sa)")
        design = asce7_16_spectrum(t, sds_g, sd1_g, tl_s, "design")
        return design * 1.5 * ASCE7_22_LEVELS[level]  # §11.4.6: MCE_R = 1.5 × design
    tp, sa = check_multi_period(mp_periods_s, mp_sa_g)
    tn, sn = float(tp[-1]), float(sa[-1])
    safe_t = np.where(t > 0.0, t, 1.0)
    if tl_s is None:
        beyond = sn * tn / safe_t
    else:  # a T_L shorter than the last ordinate starts the 1/T² branch there
        tl = max(_positive(tl_s, "tl_s", "s"), tn)
        beyond = np.where(t <= tl, sn * tn / safe_t, sn * tn * tl / safe_t**2)
    out = np.where(t <= tn, np.interp(t, tp, sa), beyond)
    return out * ASCE7_22_LEVELS[level]


# ------------------------------------------------------------------ EN 1998-1-1:2024
@dataclass(frozen=True)
class EN2024Parameters:
    """Parameters of the EN 1998-1-1:2024 horizontal elastic spectrum (5 % reference)."""

    #: reference spectral accelerations on site category A: plateau and at T_β [g]
    s_alpha_rp_g: float
    s_beta_rp_g: float
    #: site amplification factors F_α, F_β [-]
    f_alpha: float
    f_beta: float
    #: site spectral accelerations S_α = F_α S_α,RP and S_β = F_β S_β,RP [g]
    s_alpha_g: float
    s_beta_g: float
    #: corner periods T_B, T_C, T_D and the reference period T_β [s]
    tb_s: float
    tc_s: float
    td_s: float
    t_beta_s: float
    #: χ in T_B = χ T_C [-]; F_A, plateau / zero-period value [-]; η [-]
    chi: float
    plateau_ratio: float
    eta: float
    #: True for each value given by the project (National Annex or site-specific)
    given: tuple[str, ...] = ()

    @property
    def zero_period_g(self) -> float:
        """S_e(0) = S_α / F_A [g]."""
        return self.s_alpha_g / self.plateau_ratio


def en1998_1_1_parameters(s_alpha_rp_g, s_beta_rp_g, site_category, damping=0.05,
                          f_alpha=None, f_beta=None, chi=None, td_s=None,
                          plateau_ratio=None) -> EN2024Parameters:
    """
    Parameters of the EN 1998-1-1:2024 elastic spectrum (from memory, see module).

    ``S_α = F_α S_α,RP``, ``S_β = F_β S_β,RP``; ``T_C = S_β T_β / S_α`` (T_β = 1 s, where
    the plateau meets the 1/T branch); ``T_B = χ T_C``; T_D a Nationally Determined
    Parameter; ``η = √(10/(5+ξ)) >= 0.55`` (ξ in percent). Recommended values are
    :data:`EN1998_1_1_RECOMMENDED` and :data:`EN1998_1_1_SITE_FACTORS`, all from memory.

    Parameters
    ----------
    s_alpha_rp_g, s_beta_rp_g : float
        Reference spectral accelerations S_α,RP and S_β,RP on site category A, > 0. [g]
    site_category : {"A", "B", "C", "D", "E", "F"}
        Site category. [-]
    damping : float, optional
        Viscous damping ratio ξ (0.05 = 5 %), 0 <= ξ < 1. [-]
    f_alpha, f_beta, chi, plateau_ratio : float, optional
        National-Annex or site-specific F_α, F_β, χ, F_A (> 0). [-]
    td_s : float, optional
        National-Annex T_D (> T_C). [s]

    Returns
    -------
    EN2024Parameters
    """
    sa_rp = _positive(s_alpha_rp_g, "s_alpha_rp_g", "g")
    sb_rp = _positive(s_beta_rp_g, "s_beta_rp_g", "g")
    key = site_category.upper() if isinstance(site_category, str) else site_category
    if key not in EN1998_1_1_SITE_CATEGORIES:
        raise ValueError(f"site_category must be one of "
                         f"{', '.join(EN1998_1_1_SITE_CATEGORIES)} [-]; got "
                         f"{site_category!r}")
    eta = damping_correction(damping)
    a, b, c, d = EN1998_1_1_SITE_FACTORS[key]
    given = []
    if f_alpha is None:
        fa = a * (1.0 - b * sa_rp)
    else:
        fa = _positive(f_alpha, "f_alpha", "-")
        given.append("f_alpha")
    if f_beta is None:
        fb = c * (1.0 - d * sb_rp)
    else:
        fb = _positive(f_beta, "f_beta", "-")
        given.append("f_beta")
    if fa <= 0.0 or fb <= 0.0:
        raise ValueError(f"the site factors of category {key} come out <= 0 at these "
                         f"reference accelerations (F_alpha {fa:.3g}, F_beta {fb:.3g}) "
                         f"[-]; give f_alpha and f_beta from a site-specific study")
    rec = EN1998_1_1_RECOMMENDED
    values = {}
    for name, value, unit in (("chi", chi, "-"), ("td_s", td_s, "s"),
                              ("plateau_ratio", plateau_ratio, "-")):
        if value is None:
            values[name] = rec[name]
        else:
            values[name] = _positive(value, name, unit)
            given.append(name)
    s_alpha, s_beta = fa * sa_rp, fb * sb_rp
    t_beta = rec["t_beta_s"]
    tc = s_beta * t_beta / s_alpha
    tb = values["chi"] * tc
    td = values["td_s"]
    if not tb < tc < td:
        raise ValueError(f"td_s must exceed T_C = S_beta T_beta / S_alpha = {tc:.4g} s "
                         f"and chi must be < 1 [s]; got T_B {tb:.4g}, T_C {tc:.4g}, "
                         f"T_D {td:.4g}")
    return EN2024Parameters(sa_rp, sb_rp, fa, fb, s_alpha, s_beta, tb, tc, td, t_beta,
                            values["chi"], values["plateau_ratio"], eta, tuple(given))


def en1998_1_1_spectrum(periods_s, s_alpha_rp_g, s_beta_rp_g, site_category,
                        damping=0.05, f_alpha=None, f_beta=None, chi=None, td_s=None,
                        plateau_ratio=None) -> np.ndarray:
    """
    Horizontal elastic spectrum S_e(T) of EN 1998-1-1:2024 (from memory).

    ``S_α [1/F_A + (η − 1/F_A) T/T_B]`` for ``0 <= T <= T_B`` (rising to the plateau);
    ``η S_α`` up to ``T_C``; ``η S_β T_β / T`` up to ``T_D``; ``η S_β T_β T_D / T²``
    beyond. Parameters as in :func:`en1998_1_1_parameters`.

    Returns
    -------
    numpy.ndarray
        Elastic spectral acceleration, same shape as ``periods_s``. [g]
    """
    t = _periods(periods_s)
    p = en1998_1_1_parameters(s_alpha_rp_g, s_beta_rp_g, site_category, damping,
                              f_alpha, f_beta, chi, td_s, plateau_ratio)
    inv_fa = 1.0 / p.plateau_ratio
    safe_t = np.where(t > 0.0, t, 1.0)
    return np.select(
        [t <= p.tb_s, t <= p.tc_s, t <= p.td_s],
        [p.s_alpha_g * (inv_fa + (p.eta - inv_fa) * t / p.tb_s),
         np.full_like(t, p.eta * p.s_alpha_g),
         p.eta * p.s_beta_g * p.t_beta_s / safe_t],
        default=p.eta * p.s_beta_g * p.t_beta_s * p.td_s / safe_t**2,
    )
