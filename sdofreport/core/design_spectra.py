"""
Design (target) spectra: ASCE/SEI 7-16, EN 1998-1:2004 and user tables.

Every function takes natural periods [s] and returns pseudo-spectral accelerations in
units of g (the trade convention for design spectra, hence the ``_g`` suffix). One
registry, :data:`DESIGN_SPECTRUM_KINDS`, names the kinds; :func:`design_spectrum`
validates a parameter set against :data:`DESIGN_SPECTRUM_PARAMETERS` and returns a
:class:`DesignSpectrum` that can be evaluated at any periods.

References
----------
.. [1] American Society of Civil Engineers, *Minimum Design Loads and Associated
   Criteria for Buildings and Other Structures*, ASCE/SEI 7-16. Reston, VA, USA: ASCE,
   2017, §11.4.6 (design response spectrum), §11.4.7 (MCE_R spectrum).
.. [2] CEN, *Eurocode 8: Design of structures for earthquake resistance — Part 1:
   General rules, seismic actions and rules for buildings*, EN 1998-1:2004. Brussels:
   CEN, 2004, §3.2.2.2 and Tables 3.2, 3.3.
"""

from __future__ import annotations

import difflib
from dataclasses import dataclass, field

import numpy as np

from sdofreport.core import _checks
from sdofreport.core._checks import positive as _positive
from sdofreport.core.spectra_current import (
    asce7_22_spectrum,
    check_multi_period,
    damping_correction,
    en1998_1_1_spectrum,
)

__all__ = [
    "DESIGN_SPECTRUM_KINDS",
    "DESIGN_SPECTRUM_PARAMETERS",
    "ASCE7_16_LEVELS",
    "EN1998_1_GROUND_TYPES",
    "EN1998_1_SPECTRUM_TYPES",
    "EN1998_1_TABLES",
    "EN1998Parameters",
    "DesignSpectrum",
    "asce7_16_spectrum",
    "en1998_1_parameters",
    "en1998_1_spectrum",
    "table_spectrum",
    "design_spectrum",
]

#: Every design-spectrum kind accepted by :func:`design_spectrum`.
DESIGN_SPECTRUM_KINDS = ("asce7-16", "asce7-22", "en1998-1", "en1998-1-1", "table")

#: Parameter names per kind: (required, optional). The validator and its messages read this.
DESIGN_SPECTRUM_PARAMETERS: dict[str, tuple[tuple[str, ...], tuple[str, ...]]] = {
    "asce7-16": (("sds_g", "sd1_g", "tl_s"), ("level",)),
    "en1998-1": (("agr_g", "importance_factor", "ground_type", "spectrum_type"),
                 ("damping", "soil_factor", "tb_s", "tc_s", "td_s")),
    "asce7-22": (("site_class",), ("level", "mp_periods_s", "mp_sa_g", "sds_g", "sd1_g",
                                   "tl_s")),
    "en1998-1-1": (("s_alpha_rp_g", "s_beta_rp_g", "site_category"),
                   ("damping", "f_alpha", "f_beta", "chi", "td_s", "plateau_ratio")),
    "table": (("table_periods_s", "table_sa_g"), ()),
}

#: Spectrum levels of ASCE/SEI 7-16: the design spectrum (§11.4.6) and the MCE_R
#: spectrum, 1.5 times the design spectrum (§11.4.7); "mce" is the older spelling of
#: "mce_r", kept for existing project files.
ASCE7_16_LEVELS = {"mce_r": 1.5, "design": 1.0, "mce": 1.5}

#: Ground types of EN 1998-1 Tables 3.2 and 3.3 (S1 and S2 need special studies).
EN1998_1_GROUND_TYPES = ("A", "B", "C", "D", "E")
#: Spectrum types of EN 1998-1 §3.2.2.2 (Type 1: Table 3.2, Type 2: Table 3.3).
EN1998_1_SPECTRUM_TYPES = (1, 2)

#: (S, T_B [s], T_C [s], T_D [s]) per spectrum type and ground type: the recommended
#: values of EN 1998-1:2004 Tables 3.2 (Type 1) and 3.3 (Type 2). From memory (the
#: project's field reference); check against the standard and the National Annex.
EN1998_1_TABLES: dict[int, dict[str, tuple[float, float, float, float]]] = {
    1: {"A": (1.0, 0.15, 0.4, 2.0), "B": (1.2, 0.15, 0.5, 2.0), "C": (1.15, 0.20, 0.6, 2.0),
        "D": (1.35, 0.20, 0.8, 2.0), "E": (1.4, 0.15, 0.5, 2.0)},
    2: {"A": (1.0, 0.05, 0.25, 1.2), "B": (1.35, 0.05, 0.25, 1.2), "C": (1.5, 0.10, 0.25, 1.2),
        "D": (1.8, 0.10, 0.30, 1.2), "E": (1.6, 0.05, 0.25, 1.2)},
}



# ---------------------------------------------------------------------------- checks
def _as_periods(periods_s, name: str = "periods_s") -> np.ndarray:
    """Periods as a float array (any shape) of finite values >= 0 [s]."""
    try:
        t = np.asarray(periods_s, dtype=np.float64)
    except (TypeError, ValueError):
        raise ValueError(f"{name} must be numbers >= 0 [s]; got {periods_s!r}") from None
    if t.size and not (np.all(np.isfinite(t)) and np.all(t >= 0.0)):
        bad = float(t[~(np.isfinite(t) & (t >= 0.0))].flat[0])
        raise ValueError(f"{name} must be finite and >= 0 [s]; got {bad!r}")
    return t


# ------------------------------------------------------------------------ ASCE 7-16
def asce7_16_spectrum(periods_s, sds_g, sd1_g, tl_s, level="design") -> np.ndarray:
    """
    Design (or MCE_R) response spectrum of ASCE/SEI 7-16 §11.4.6.

    With ``T0 = 0.2 SD1/SDS`` and ``TS = SD1/SDS`` [1]_:
    ``Sa = SDS (0.4 + 0.6 T/T0)`` for ``T < T0`` (so ``Sa(0) = 0.4 SDS``); ``SDS`` for
    ``T0 <= T <= TS``; ``SD1/T`` for ``TS < T <= TL``; ``SD1 TL / T²`` for ``T > TL``.
    ``level="mce_r"`` (or ``"mce"``) multiplies by 1.5 (§11.4.7). Site-specific procedures (§11.4.8,
    Chapter 21) are outside this function.

    Parameters
    ----------
    periods_s : float or array-like
        Natural periods, >= 0, any shape. [s]
    sds_g : float
        Design spectral acceleration at short periods S_DS, > 0. [g]
    sd1_g : float
        Design spectral acceleration at 1 s S_D1, > 0. [g]
    tl_s : float
        Long-period transition period T_L, >= T_S = S_D1/S_DS. [s]
    level : {"design", "mce_r", "mce"}
        Design spectrum or MCE_R spectrum; see :data:`ASCE7_16_LEVELS`. [-]

    Returns
    -------
    numpy.ndarray
        Spectral acceleration, same shape as ``periods_s``. [g]

    References
    ----------
    .. [1] ASCE/SEI 7-16, *Minimum Design Loads and Associated Criteria for Buildings
       and Other Structures*. Reston, VA, USA: ASCE, 2017, §11.4.6, Eqs. (11.4-5) to
       (11.4-8); §11.4.7.
    """
    t = _as_periods(periods_s)
    sds = _positive(sds_g, "sds_g", "g")
    sd1 = _positive(sd1_g, "sd1_g", "g")
    tl = _positive(tl_s, "tl_s", "s")
    _checks.one_of(level, "level", ASCE7_16_LEVELS, unit="-")
    ts = sd1 / sds
    t0 = 0.2 * ts
    if tl < ts:
        raise ValueError(
            f"tl_s must be >= T_S = sd1_g / sds_g = {ts!r} [s]; got {tl!r}"
        )
    safe_t = np.where(t > 0.0, t, 1.0)
    sa = np.select(
        [t < t0, t <= ts, t <= tl],
        [sds * (0.4 + 0.6 * t / t0),   # Eq. (11.4-5)
         np.full_like(t, sds),         # plateau
         sd1 / safe_t],                # Eq. (11.4-6)
        default=sd1 * tl / safe_t**2,  # Eq. (11.4-7)
    )
    return sa * ASCE7_16_LEVELS[level]


# ------------------------------------------------------------------------- EN 1998-1
@dataclass(frozen=True)
class EN1998Parameters:
    """Parameters of the EN 1998-1 §3.2.2.2 horizontal elastic spectrum."""

    #: design ground acceleration on type A ground a_g = γ_I a_gR [g]
    ag_g: float
    #: soil factor S [-]
    soil_factor: float
    #: lower limit of the constant-acceleration branch T_B [s]
    tb_s: float
    #: upper limit of the constant-acceleration branch T_C [s]
    tc_s: float
    #: start of the constant-displacement branch T_D [s]
    td_s: float
    #: damping correction factor η = √(10/(5+ξ)) >= 0.55 [-]
    eta: float

    @property
    def ag_s_g(self) -> float:
        """a_g·S, the spectrum's zero-period value [g]."""
        return self.ag_g * self.soil_factor


def en1998_1_parameters(agr_g, importance_factor, ground_type, spectrum_type,
                        damping=0.05, soil_factor=None, tb_s=None, tc_s=None,
                        td_s=None) -> EN1998Parameters:
    """
    Parameters of the EN 1998-1 horizontal elastic response spectrum.

    ``a_g = γ_I a_gR`` (§3.2.1(3)); S, T_B, T_C, T_D from Table 3.2 (Type 1) or Table 3.3
    (Type 2), recommended values written down from memory (:data:`EN1998_1_TABLES`);
    ``η = √(10/(5+ξ)) >= 0.55`` with ξ in percent, Eq. (3.6).

    Parameters
    ----------
    agr_g : float
        Reference peak ground acceleration on type A ground a_gR, > 0. [g]
    importance_factor : float
        Importance factor γ_I, > 0. [-]
    ground_type : {"A", "B", "C", "D", "E"}
        Ground type of §3.1.2 (case-insensitive). [-]
    spectrum_type : {1, 2}
        Spectrum type of §3.2.2.2(2). [-]
    damping : float, optional
        Viscous damping ratio ξ as a fraction (0.05 = 5 %), 0 <= ξ < 1. [-]
    soil_factor, tb_s, tc_s, td_s : float, optional
        National-Annex values of S [-], T_B, T_C and T_D [s] replacing the recommended
        ones of the tables (each > 0, T_B < T_C < T_D). [-], [s]

    Returns
    -------
    EN1998Parameters

    References
    ----------
    .. [1] CEN, EN 1998-1:2004, Eurocode 8 Part 1, §3.2.2.2, Eq. (3.6), Tables 3.2, 3.3.
    """
    agr = _positive(agr_g, "agr_g", "g")
    gamma_i = _positive(importance_factor, "importance_factor", "-")
    key = ground_type.upper() if isinstance(ground_type, str) else ground_type
    if key not in EN1998_1_GROUND_TYPES:
        allowed = ", ".join(EN1998_1_GROUND_TYPES)
        raise ValueError(
            f"ground_type must be one of {allowed} (S1 and S2 need special studies) [-]; "
            f"got {ground_type!r}"
        )
    if isinstance(spectrum_type, bool) or spectrum_type not in EN1998_1_SPECTRUM_TYPES:
        raise ValueError(f"spectrum_type must be 1 or 2 [-]; got {spectrum_type!r}")
    eta = damping_correction(damping)  # Eq. (3.6)
    soil, tb, tc, td = EN1998_1_TABLES[int(spectrum_type)][key]
    given = {"soil_factor": soil_factor, "tb_s": tb_s, "tc_s": tc_s, "td_s": td_s}
    for name, value in given.items():
        if value is not None:
            unit = "-" if name == "soil_factor" else "s"
            given[name] = _positive(value, name, unit)
    soil = given["soil_factor"] or soil
    tb, tc, td = given["tb_s"] or tb, given["tc_s"] or tc, given["td_s"] or td
    if not tb < tc < td:
        raise ValueError(f"tb_s < tc_s < td_s must hold [s]; got T_B {tb!r}, T_C {tc!r}, "
                         f"T_D {td!r}")
    return EN1998Parameters(ag_g=agr * gamma_i, soil_factor=soil, tb_s=tb, tc_s=tc,
                            td_s=td, eta=eta)


def en1998_1_spectrum(periods_s, agr_g, importance_factor, ground_type, spectrum_type,
                      damping=0.05, soil_factor=None, tb_s=None, tc_s=None,
                      td_s=None) -> np.ndarray:
    """
    Horizontal elastic response spectrum S_e(T) of EN 1998-1:2004 §3.2.2.2.

    Eqs. (3.2)-(3.5): ``a_g S [1 + T/T_B (2.5η − 1)]`` for ``0 <= T <= T_B``;
    ``a_g S 2.5η`` up to ``T_C``; ``a_g S 2.5η T_C/T`` up to ``T_D``;
    ``a_g S 2.5η T_C T_D / T²`` beyond. The standard states the last branch up to 4 s;
    this function continues it beyond 4 s (our choice; Annex A covers longer periods).

    Parameters
    ----------
    periods_s : float or array-like
        Natural periods, >= 0, any shape. [s]
    agr_g, importance_factor, ground_type, spectrum_type, damping
        As in :func:`en1998_1_parameters`.
    soil_factor, tb_s, tc_s, td_s : float, optional
        National-Annex values, as in :func:`en1998_1_parameters`. [-], [s]

    Returns
    -------
    numpy.ndarray
        Elastic spectral acceleration, same shape as ``periods_s``. [g]

    References
    ----------
    .. [1] CEN, EN 1998-1:2004, Eurocode 8 Part 1, §3.2.2.2, Eqs. (3.2)-(3.6).
    """
    t = _as_periods(periods_s)
    p = en1998_1_parameters(agr_g, importance_factor, ground_type, spectrum_type, damping,
                            soil_factor, tb_s, tc_s, td_s)
    plateau = p.ag_g * p.soil_factor * 2.5 * p.eta
    safe_t = np.where(t > 0.0, t, 1.0)
    return np.select(
        [t <= p.tb_s, t <= p.tc_s, t <= p.td_s],
        [p.ag_s_g * (1.0 + t / p.tb_s * (2.5 * p.eta - 1.0)),  # Eq. (3.2)
         np.full_like(t, plateau),                             # Eq. (3.3)
         plateau * p.tc_s / safe_t],                           # Eq. (3.4)
        default=plateau * p.tc_s * p.td_s / safe_t**2,         # Eq. (3.5)
    )


# ----------------------------------------------------------------------------- table
def _check_table(table_periods_s, table_sa_g) -> tuple[np.ndarray, np.ndarray]:
    tp = _as_periods(table_periods_s, "table_periods_s")
    try:
        sa = np.asarray(table_sa_g, dtype=np.float64)
    except (TypeError, ValueError):
        raise ValueError(f"table_sa_g must be numbers > 0 [g]; got {table_sa_g!r}") from None
    if tp.ndim != 1 or sa.shape != tp.shape:
        raise ValueError(
            f"table_periods_s [s] and table_sa_g [g] must be 1-D lists of the same length; "
            f"got shapes {tp.shape} and {sa.shape}"
        )
    if tp.size < 2:
        raise ValueError(f"table_periods_s must hold at least 2 periods [s]; got {tp.size}")
    if np.any(np.diff(tp) <= 0.0):
        raise ValueError("table_periods_s must increase strictly [s]")
    if not (np.all(np.isfinite(sa)) and np.all(sa > 0.0)):
        bad = float(sa[~(np.isfinite(sa) & (sa > 0.0))][0])
        raise ValueError(f"table_sa_g must be finite and > 0 [g]; got {bad!r}")
    if tp[0] == 0.0 and tp.size < 3:
        raise ValueError(
            "table_periods_s must hold at least 2 periods > 0 besides T = 0 [s]"
        )
    return tp, sa


def table_spectrum(periods_s, table_periods_s, table_sa_g) -> np.ndarray:
    """
    Spectrum given as a table of (T, Sa) points, interpolated log-log.

    Between positive table periods, ``ln Sa`` is linear in ``ln T``. Outside the table
    the spectrum is held constant (our choice, no source): at and beyond the last period
    it equals the last value; below the first positive period it equals the first
    positive period's value, unless the table starts at ``T = 0``, in which case Sa is
    interpolated linearly (in T and Sa) between ``T = 0`` and the first positive period.

    Parameters
    ----------
    periods_s : float or array-like
        Natural periods, >= 0, any shape. [s]
    table_periods_s : array-like
        Table periods, strictly increasing, >= 0; at least 2 of them > 0. [s]
    table_sa_g : array-like
        Spectral accelerations at ``table_periods_s``, > 0. [g]

    Returns
    -------
    numpy.ndarray
        Spectral acceleration, same shape as ``periods_s``. [g]

    References
    ----------
    .. [1] ASCE/SEI 7-16, §11.4.6 and §21.3 (spectra given point by point are
       customarily drawn on log-log axes; the interpolation rule is common practice).
    """
    t = _as_periods(periods_s)
    tp, sa = _check_table(table_periods_s, table_sa_g)
    has_zero = tp[0] == 0.0
    tpos, sapos = (tp[1:], sa[1:]) if has_zero else (tp, sa)
    safe_t = np.where(t > 0.0, t, tpos[0])
    out = np.exp(np.interp(np.log(safe_t), np.log(tpos), np.log(sapos)))
    if has_zero:
        low = t < tpos[0]
        out = np.where(low, sa[0] + (sapos[0] - sa[0]) * t / tpos[0], out)
    return out


# -------------------------------------------------------------------------- registry
@dataclass(frozen=True)
class DesignSpectrum:
    """A validated design spectrum: its kind and parameters; evaluate with :meth:`sa_g`."""

    #: one of DESIGN_SPECTRUM_KINDS
    kind: str
    #: keyword parameters of the kind's function (see DESIGN_SPECTRUM_PARAMETERS)
    parameters: dict = field(default_factory=dict)

    def sa_g(self, periods_s) -> np.ndarray:
        """
        Spectral acceleration at ``periods_s``.

        Parameters
        ----------
        periods_s : float or array-like
            Natural periods, >= 0. [s]

        Returns
        -------
        numpy.ndarray
            Spectral acceleration, same shape as ``periods_s``. [g]
        """
        return _FUNCTIONS[self.kind](periods_s, **self.parameters)


_FUNCTIONS = {
    "asce7-16": asce7_16_spectrum,
    "asce7-22": asce7_22_spectrum,
    "en1998-1": en1998_1_spectrum,
    "en1998-1-1": en1998_1_1_spectrum,
    "table": table_spectrum,
}


def design_spectrum(kind, **parameters) -> DesignSpectrum:
    """
    Validate a design-spectrum definition and return it as a :class:`DesignSpectrum`.

    Parameters
    ----------
    kind : {"asce7-16", "asce7-22", "en1998-1", "en1998-1-1", "table"}
        See :data:`DESIGN_SPECTRUM_KINDS`. [-]
    **parameters
        The kind's parameters, named as in :data:`DESIGN_SPECTRUM_PARAMETERS` (the
        arguments of :func:`asce7_16_spectrum`, :func:`en1998_1_spectrum` or
        :func:`table_spectrum`, or of
        :mod:`sdofreport.core.spectra_current` for ASCE/SEI 7-22 and EN 1998-1-1:2024,
        after ``periods_s``).

    Returns
    -------
    DesignSpectrum

    Raises
    ------
    ValueError
        Unknown kind, unknown or missing parameter (named, with the nearest valid name),
        or a bad value (the kind's function's own message).

    References
    ----------
    .. [1] ASCE/SEI 7-16, §11.4.6; CEN, EN 1998-1:2004, §3.2.2.2.
    """
    _checks.one_of(kind, "kind", DESIGN_SPECTRUM_KINDS)
    required, optional = DESIGN_SPECTRUM_PARAMETERS[kind]
    valid = required + optional
    for key in parameters:
        if key not in valid:
            near = difflib.get_close_matches(key, valid, n=1)
            hint = f" (did you mean {near[0]!r}?)" if near else ""
            raise ValueError(
                f"unknown parameter {key!r} for design spectrum {kind!r}{hint}; "
                f"allowed: {', '.join(valid)}"
            )
    missing = [key for key in required if key not in parameters]
    if missing:
        raise ValueError(
            f"design spectrum {kind!r} is missing parameter(s) {', '.join(missing)}"
        )
    params = dict(parameters)
    if kind == "table":
        tp, sa = _check_table(params["table_periods_s"], params["table_sa_g"])
        params = {"table_periods_s": tp.copy(), "table_sa_g": sa.copy()}
    if kind == "asce7-22" and params.get("mp_periods_s") is not None:
        tp, sa = check_multi_period(params["mp_periods_s"], params.get("mp_sa_g"))
        params.update(mp_periods_s=tp.copy(), mp_sa_g=sa.copy())
    spectrum = DesignSpectrum(kind=kind, parameters=params)
    spectrum.sa_g(0.0)  # runs every value check of the kind's function
    return spectrum
