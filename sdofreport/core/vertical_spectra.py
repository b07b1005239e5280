"""
Vertical elastic design spectra.

* EN 1998-1:2004 §3.2.2.3, Eqs. (3.8)-(3.11) with the recommended values of Table 3.4
  (from memory; a National Annex may change them):

  ====  ========  =====  =====  =====
  type  a_vg/a_g  T_B    T_C    T_D
  ====  ========  =====  =====  =====
  1     0.90      0.05   0.15   1.0
  2     0.45      0.05   0.15   1.0
  ====  ========  =====  =====  =====

  S_ve = a_vg [1 + T/T_B (3.0 η − 1)] (0 ≤ T ≤ T_B); a_vg 3.0 η (T_B ≤ T ≤ T_C);
  a_vg 3.0 η T_C/T (T_C ≤ T ≤ T_D); a_vg 3.0 η T_C T_D/T² (T_D ≤ T ≤ 4 s), with
  η = √(10/(5 + ξ)) ≥ 0.55 (ξ in percent, Eq. 3.6). No soil factor applies.
* ASCE/SEI 7-16 §11.9.2, Eqs. 11.9-1 to 11.9-4 (from memory): the MCE_R vertical
  spectrum S_aMv = 0.3 C_v S_MS (T_v ≤ 0.025 s); 20 C_v S_MS (T_v − 0.025) + 0.3 C_v S_MS
  (0.025 < T_v ≤ 0.05 s); 0.8 C_v S_MS (0.05 < T_v ≤ 0.15 s); 0.8 C_v S_MS (0.15/T_v)^0.75
  (0.15 < T_v ≤ 2.0 s); not defined above 2 s (NaN here: the clause asks for a
  site-specific procedure). C_v from Table 11.9-1 (from memory), linear between the
  rows of S_MS. The design vertical spectrum is 2/3 of S_aMv (§11.9.3, from memory).
"""

from __future__ import annotations

import math

import numpy as np

__all__ = ["EN1998_VERTICAL_TABLE_3_4", "VERTICAL_SITE_CLASSES", "VERTICAL_SPECTRUM_KINDS",
           "asce7_16_vertical_coefficient", "asce7_16_vertical_spectrum",
           "en1998_1_vertical_spectrum", "vertical_design_spectrum"]

#: Vertical spectrum kinds (``[design_spectrum.vertical] kind``).
VERTICAL_SPECTRUM_KINDS = ("en1998-1", "asce7-16")

#: Site classes of ASCE/SEI 7-16 Table 11.9-1.
VERTICAL_SITE_CLASSES = ("A", "B", "C", "D", "E", "F")

#: EN 1998-1:2004 Table 3.4, recommended values (from memory): type -> (a_vg/a_g, T_B,
#: T_C, T_D) with periods in [s].
EN1998_VERTICAL_TABLE_3_4 = {1: (0.90, 0.05, 0.15, 1.0), 2: (0.45, 0.05, 0.15, 1.0)}

#: ASCE/SEI 7-16 Table 11.9-1 (from memory): rows of S_MS [g] and C_v for site classes
#: A-B, C and D-F.
_CV_SMS = (0.2, 0.3, 0.6, 1.0, 2.0)
_CV = {"AB": (0.7, 0.8, 0.9, 0.9, 0.9), "C": (0.7, 0.8, 1.0, 1.1, 1.3),
       "DEF": (0.7, 0.9, 1.1, 1.3, 1.5)}


def _periods(periods_s) -> np.ndarray:
    t = np.asarray(periods_s, dtype=float)
    if t.ndim > 1 or not np.all(np.isfinite(t)) or np.any(t < 0):
        raise ValueError(f"periods_s must be finite and >= 0 [s]; got {periods_s!r}")
    return t


def en1998_1_vertical_spectrum(periods_s, ag_g, spectrum_type=1, damping=0.05,
                               table=None) -> np.ndarray:
    """
    Vertical elastic response spectrum of EN 1998-1:2004 §3.2.2.3 [g].

    Parameters
    ----------
    periods_s : array-like
        Periods, 0 to 4 s. [s]
    ag_g : float
        Design ground acceleration on type A ground a_g = γ_I a_gR. [g]
    spectrum_type : {1, 2}
        Spectrum type (Table 3.4). [-]
    damping : float
        Viscous damping ratio ξ (fraction). [-]
    table : tuple, optional
        (a_vg/a_g, T_B, T_C, T_D) instead of the recommended values (National Annex).

    Returns
    -------
    numpy.ndarray
        S_ve(T). [g]
    """
    t = _periods(periods_s)
    if spectrum_type not in EN1998_VERTICAL_TABLE_3_4:
        raise ValueError(f"spectrum_type must be 1 or 2; got {spectrum_type!r}")
    if not (math.isfinite(ag_g) and ag_g > 0 and 0 <= damping < 1):
        raise ValueError(f"need a_g > 0 [g] and 0 <= damping < 1; got {ag_g!r}, "
                         f"{damping!r}")
    ratio, tb, tc, td = table or EN1998_VERTICAL_TABLE_3_4[spectrum_type]
    avg = ratio * ag_g
    eta = max(math.sqrt(10.0 / (5.0 + 100.0 * damping)), 0.55)
    plateau = avg * 3.0 * eta
    return np.where(t <= tb, avg * (1.0 + t / tb * (3.0 * eta - 1.0)),
                    np.where(t <= tc, plateau,
                             np.where(t <= td, plateau * tc / np.maximum(t, tc),
                                      plateau * tc * td / np.maximum(t, td) ** 2)))


def asce7_16_vertical_coefficient(sms_g, site_class) -> float:
    """C_v of ASCE/SEI 7-16 Table 11.9-1 (from memory), linear between rows of S_MS.

    Parameters
    ----------
    sms_g : float
        MCE_R short-period spectral acceleration S_MS. [g]
    site_class : {"A", "B", "C", "D", "E", "F"}
    """
    group = next((g for g in _CV if str(site_class).upper() in g), None)
    if group is None or len(str(site_class)) != 1:
        raise ValueError(f"site_class must be one of A-F; got {site_class!r}")
    if not (math.isfinite(sms_g) and sms_g >= 0):
        raise ValueError(f"sms_g must be finite and >= 0 [g]; got {sms_g!r}")
    return float(np.interp(sms_g, _CV_SMS, _CV[group]))


def asce7_16_vertical_spectrum(periods_s, sms_g, site_class, level="mce_r") -> np.ndarray:
    """
    Vertical spectrum of ASCE/SEI 7-16 §11.9 (from memory) [g]; NaN above 2 s.

    Parameters
    ----------
    periods_s : array-like
        Vertical periods T_v. [s]
    sms_g : float
        S_MS. [g]
    site_class : str
        Site class A-F.
    level : {"mce_r", "design"}
        S_aMv, or the design value 2/3 S_aMv.

    Returns
    -------
    numpy.ndarray
        [g]
    """
    t = _periods(periods_s)
    if level not in ("mce_r", "design"):
        raise ValueError(f"level must be 'mce_r' or 'design'; got {level!r}")
    a = asce7_16_vertical_coefficient(sms_g, site_class) * sms_g
    with np.errstate(divide="ignore"):
        sa = np.where(t <= 0.025, 0.3 * a,
                      np.where(t <= 0.05, 20.0 * a * (t - 0.025) + 0.3 * a,
                               np.where(t <= 0.15, 0.8 * a,
                                        0.8 * a * (0.15 / np.maximum(t, 0.15)) ** 0.75)))
    sa = np.where(t > 2.0, np.nan, sa)
    return sa * (2.0 / 3.0 if level == "design" else 1.0)


def vertical_design_spectrum(periods_s, kind, **parameters) -> np.ndarray:
    """
    A vertical spectrum by kind [g] (NaN where the kind is not defined).

    Parameters
    ----------
    periods_s : array-like
        Periods. [s]
    kind : {"en1998-1", "asce7-16"}
        ``en1998-1``: ``avg_g`` (a_vg [g]), ``tb_s``, ``tc_s``, ``td_s`` [s] and
        ``damping`` [-], Eqs. (3.8)-(3.11) with a_vg given (the Table 3.4 ratio already
        applied); ``asce7-16``: ``sms_g`` [g], ``site_class`` and ``level``.

    Returns
    -------
    numpy.ndarray
        [g]
    """
    if kind == "en1998-1":
        return en1998_1_vertical_spectrum(
            periods_s, parameters["avg_g"], damping=parameters.get("damping", 0.05),
            table=(1.0, parameters["tb_s"], parameters["tc_s"], parameters["td_s"]))
    if kind == "asce7-16":
        return asce7_16_vertical_spectrum(periods_s, parameters["sms_g"],
                                          parameters["site_class"],
                                          parameters.get("level", "mce_r"))
    raise ValueError(f"kind must be one of {', '.join(VERTICAL_SPECTRUM_KINDS)}; got "
                     f"{kind!r}")
