"""
Hysteresis models of a single oscillator, P-Δ, supplemental dampers, and the compiled
kernel that integrates them.

Equation of motion (relative displacement u, base acceleration üg):

    m ü + c u̇ + F_d(u̇) + F(u, history) − (W/h) u = −m üg(t),

where F is the restoring force of the hysteresis model, ``−(W/h) u`` the geometric
(P-Δ) stiffness of a gravity load W on a cantilever of height h ([1]_ sec. 7.11, on every
branch of every model), and ``F_d = C |u̇|^α sign(u̇)`` a nonlinear viscous damper [7]_.

Models (bilinear backbone: initial stiffness k, strength F_y, u_y = F_y/k, post-yield
stiffness ratio a):

* ``bilinear`` — kinematic hardening ([1]_ sec. 7.1): force inside the band
  ``a k u ± (1−a) F_y``, elastic at k within it;
* ``clough`` — peak-oriented stiffness degradation [2]_: unloading at k; once the force
  crosses zero, reloading aims at the largest earlier excursion on that side (initially
  the yield point), then follows the backbone ``±F_y + a k (u ∓ u_y)``;
* ``takeda`` — as clough with the unloading stiffness ``k (u_y/u_max)^β`` of Takeda,
  Sozen & Nielsen [3]_ (β = 0.4 in [3]_, from memory); u_max is the largest excursion on
  the side being unloaded. [3]_ uses a trilinear (cracking–yield) backbone; here the
  backbone is bilinear, and reloading after a partial unloading retraces the unloading
  stiffness up to the reloading line;
* cyclic deterioration of clough and takeda after Ibarra, Medina & Krawinkler [8]_:
  at every zero-force crossing the hysteretic energy E_i of the excursion just ended
  gives ``β_i = (E_i / (E_t − ΣE_j))^c`` with ``E_t = λ F_y u_y``; the backbone's
  strength and hardening stiffness (basic strength deterioration) and the unloading
  stiffness are each multiplied by ``1 − β_i``, and reloading aims at the earlier peak
  displacement on the deteriorated backbone. Once ΣE_j reaches E_t no strength is left
  and the run is reported unstable. The post-capping and accelerated-reloading modes of
  [8]_ are not modelled;
* ``bouc-wen`` — smooth hysteresis of Wen [4]_: ``F = a k u + (1−a) F_y z`` with
  ``dz/du = [A − |z|^n (γ + β sign(u̇ z))] / u_y``, here with A = 1 and γ = 1 − β so that
  |z| <= 1 and F_y keeps its meaning (a common normalisation); integrated by backward
  Euler over sub-increments of at most u_y/20 with a consistent tangent;
* ``flag-shaped`` — self-centring [5]_: loading branch as bilinear, unloading branch
  parallel to it and meeting the elastic line at ``(1−β_E) F_y``; β_E in [0, 1] is the
  energy-dissipation ratio (0: nonlinear elastic; 1: the unloading branch passes through
  the origin). The force stays between the two branches and is elastic at k between
  them, so the system returns to u = 0 when unloaded;
* ``friction`` — the parallel pair of a linear spring and an elastic–perfectly-plastic
  element used for the sliding pendulum [6]_ (see :mod:`sdofreport.core.nonlinear`),
  with a dashpot beside the pre-sliding spring (a damped stick branch, ζ = 0.5) so that
  a bearing at rest does not ring; the element's force (spring plus dashpot) is capped
  at μW, so the friction force never exceeds μW.

The damper law is made linear below a small velocity ``v_r`` (slope ``C v_r^(α−1)``) so
that the Newton–Raphson tangent stays finite for α < 1 (common practice, no source).

References
----------
.. [1] A. K. Chopra, *Dynamics of Structures*, 5th ed. Hoboken, NJ, USA: Pearson, 2017.
.. [2] R. W. Clough and S. B. Johnston, "Effect of stiffness degradation on earthquake
   ductility requirements," in Proc. Japan Earthquake Eng. Symp., Tokyo, 1966,
   pp. 227-232.
.. [3] T. Takeda, M. A. Sozen and N. N. Nielsen, "Reinforced concrete response to
   simulated earthquakes," J. Struct. Div. ASCE, vol. 96, no. ST12, pp. 2557-2573, 1970.
.. [4] Y.-K. Wen, "Method for random vibration of hysteretic systems," J. Eng. Mech.
   Div. ASCE, vol. 102, no. EM2, pp. 249-263, 1976.
.. [5] C. Christopoulos, A. Filiatrault, C.-M. Uang and B. Folz, "Posttensioned energy
   dissipating connections for moment-resisting steel frames," J. Struct. Eng., vol.
   128, no. 9, pp. 1111-1120, 2002, doi: 10.1061/(ASCE)0733-9445(2002)128:9(1111).
.. [6] V. A. Zayas, S. S. Low and S. A. Mahin, "A simple pendulum technique for
   achieving seismic isolation," Earthquake Spectra, vol. 6, no. 2, pp. 317-333, 1990,
   doi: 10.1193/1.1585564.
.. [7] M. C. Constantinou and M. D. Symans, "Experimental and analytical investigation
   of seismic response of structures with supplemental fluid viscous dampers," NCEER
   Rep. 92-0032, State Univ. of New York at Buffalo, 1992.
.. [8] L. F. Ibarra, R. A. Medina and H. Krawinkler, "Hysteretic models that incorporate
   strength and stiffness deterioration," Earthquake Eng. Struct. Dyn., vol. 34, no. 12,
   pp. 1489-1511, 2005, doi: 10.1002/eqe.495.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from sdofreport.core import _checks
from sdofreport.core._jit import JIT_OPTIONS, njit

__all__ = [
    "DEFAULT_BOUC_WEN_BETA",
    "DEFAULT_BOUC_WEN_EXPONENT",
    "DEFAULT_DISSIPATION_RATIO",
    "DEFAULT_UNLOADING_EXPONENT",
    "HYSTERESIS_MODELS",
    "Damper",
    "Hysteresis",
    "collapse_displacement",
    "damper",
    "force_path",
    "hysteresis",
]

#: Hysteresis model names accepted by :func:`hysteresis` and the project file.
HYSTERESIS_MODELS = ("bilinear", "clough", "takeda", "bouc-wen", "flag-shaped")
#: Length of the kernel's state vector (see :func:`_restoring`).
_STATE = 16
#: Kernel codes of the models (``friction`` is the sliding pendulum's element).
_CODES = {"bilinear": 0, "friction": 0, "clough": 1, "takeda": 1, "bouc-wen": 2,
          "flag-shaped": 3}
#: Takeda's unloading-stiffness exponent β (Takeda, Sozen & Nielsen 1970; from memory).
DEFAULT_UNLOADING_EXPONENT = 0.4
#: Bouc–Wen smoothness exponent n (our default; n -> inf approaches bilinear).
DEFAULT_BOUC_WEN_EXPONENT = 2.0
#: Bouc–Wen β with γ = 1 − β (β = γ = 0.5 is the usual choice; common practice).
DEFAULT_BOUC_WEN_BETA = 0.5
#: Flag-shaped energy-dissipation ratio β_E (our default: a full flag).
DEFAULT_DISSIPATION_RATIO = 1.0
#: Exponent c of the cyclic deterioration rule (Ibarra, Medina & Krawinkler 2005 used
#: c = 1 to 2; from memory): 1.
DEFAULT_DETERIORATION_EXPONENT = 1.0
#: Velocity below which the damper law is linear, relative to the damper's
#: characteristic velocity u_y ω (our choice, no source). [-]
DAMPER_LINEAR_BELOW = 1e-3
#: Damping ratio of the friction element's pre-sliding branch (our choice: half critical, so
#: a stuck bearing settles within about one stick-phase period; no source). [-]
STICK_DAMPING_RATIO = 0.5


@dataclass(frozen=True)
class Hysteresis:
    """A checked hysteresis model; see the module docstring for each ``model``."""

    #: one of :data:`HYSTERESIS_MODELS`
    model: str
    #: initial (elastic) stiffness k [N/m]
    stiffness_n_m: float
    #: yield strength F_y [N]
    yield_strength_n: float
    #: post-yield stiffness ratio a, 0 <= a < 1 [-]
    hardening_ratio: float = 0.0
    #: takeda: unloading-stiffness exponent β, 0 <= β <= 1 [-]
    unloading_exponent: float = DEFAULT_UNLOADING_EXPONENT
    #: bouc-wen: smoothness exponent n, 1 <= n <= 200 [-]
    bouc_wen_exponent: float = DEFAULT_BOUC_WEN_EXPONENT
    #: bouc-wen: β in [0.5, 1], γ = 1 − β [-]
    bouc_wen_beta: float = DEFAULT_BOUC_WEN_BETA
    #: flag-shaped: energy-dissipation ratio β_E in [0, 1] [-]
    dissipation_ratio: float = DEFAULT_DISSIPATION_RATIO
    #: clough, takeda: cyclic deterioration capacity λ, E_t = λ F_y u_y (0: none) [-]
    deterioration_capacity: float = 0.0
    #: clough, takeda: deterioration exponent c [-]
    deterioration_exponent: float = DEFAULT_DETERIORATION_EXPONENT

    @property
    def yield_displacement_m(self) -> float:
        """u_y = F_y / k [m]."""
        return self.yield_strength_n / self.stiffness_n_m

    def kernel_parameters(self) -> tuple[int, np.ndarray]:
        """The kernel's model code and parameter vector (SI)."""
        k, fy, a = self.stiffness_n_m, self.yield_strength_n, self.hardening_ratio
        if self.model == "bilinear":
            return 0, np.array([a * k, (1.0 - a) * k, (1.0 - a) * fy, 0.0, 0.0, 0.0])
        if self.model in ("clough", "takeda"):
            beta = self.unloading_exponent if self.model == "takeda" else 0.0
            e_t = self.deterioration_capacity * fy * fy / k  # E_t = λ F_y u_y
            return 1, np.array([k, fy, a, beta, e_t, self.deterioration_exponent])
        if self.model == "bouc-wen":
            return 2, np.array([k, fy, a, self.bouc_wen_exponent, self.bouc_wen_beta,
                                1.0 - self.bouc_wen_beta])
        return 3, np.array([k, fy, a, self.dissipation_ratio, 0.0, 0.0])


@dataclass(frozen=True)
class Damper:
    """Nonlinear viscous damper ``F = C |v|^α sign(v)``."""

    #: coefficient C [N·(s/m)^α]
    coefficient: float
    #: velocity exponent α, 0 < α <= 2 [-]
    exponent: float


def _ratio(value, name: str, low: float, high: float, *, low_open=False) -> float:
    return _checks.in_range(value, name, "-", low, high, low_open=low_open, high_open=False)


def hysteresis(model, stiffness_n_m, yield_strength_n, hardening_ratio=0.0, *,
               unloading_exponent=DEFAULT_UNLOADING_EXPONENT,
               bouc_wen_exponent=DEFAULT_BOUC_WEN_EXPONENT,
               bouc_wen_beta=DEFAULT_BOUC_WEN_BETA,
               dissipation_ratio=DEFAULT_DISSIPATION_RATIO, deterioration_capacity=0.0,
               deterioration_exponent=DEFAULT_DETERIORATION_EXPONENT) -> Hysteresis:
    """
    A checked hysteresis model.

    Parameters
    ----------
    model : {"bilinear", "clough", "takeda", "bouc-wen", "flag-shaped"}
        Model name (module docstring). [-]
    stiffness_n_m : float
        Initial stiffness k, finite and > 0. [N/m]
    yield_strength_n : float
        Yield strength F_y, finite and > 0. [N]
    hardening_ratio : float, optional
        Post-yield stiffness ratio a, 0 <= a < 1. [-]
    unloading_exponent : float, optional
        takeda: β in [0, 1] of the unloading stiffness ``k (u_y/u_max)^β``. [-]
    bouc_wen_exponent : float, optional
        bouc-wen: smoothness n in [1, 200]. [-]
    bouc_wen_beta : float, optional
        bouc-wen: β in [0.5, 1] (γ = 1 − β, so |γ| <= β and unloading is stiffer than
        loading or equal). [-]
    dissipation_ratio : float, optional
        flag-shaped: energy-dissipation ratio β_E in [0, 1]. [-]
    deterioration_capacity : float, optional
        clough, takeda: λ >= 0 of the hysteretic energy capacity E_t = λ F_y u_y of
        Ibarra, Medina & Krawinkler (2005); 0 (default) means no deterioration. [-]
    deterioration_exponent : float, optional
        clough, takeda: exponent c in (0, 10] of β_i = (E_i / (E_t − ΣE_j))^c. [-]

    Returns
    -------
    Hysteresis

    References
    ----------
    .. [1] L. F. Ibarra, R. A. Medina and H. Krawinkler, "Hysteretic models that
       incorporate strength and stiffness deterioration," Earthquake Eng. Struct. Dyn.,
       vol. 34, no. 12, pp. 1489-1511, 2005, doi: 10.1002/eqe.495.
    """
    _checks.one_of(model, "hysteresis", HYSTERESIS_MODELS)
    k = _ratio(stiffness_n_m, "stiffness_n_m", 0.0, math.inf, low_open=True)
    fy = _ratio(yield_strength_n, "yield_strength_n", 0.0, math.inf, low_open=True)
    if not (math.isfinite(k) and math.isfinite(fy)):
        raise ValueError(f"stiffness_n_m [N/m] and yield_strength_n [N] must be finite; "
                         f"got {stiffness_n_m!r}, {yield_strength_n!r}")
    a = _ratio(hardening_ratio, "hardening_ratio", 0.0, 1.0)
    if a >= 1.0:
        raise ValueError(f"hardening_ratio must be in [0, 1) [-]; got {hardening_ratio!r}")
    capacity = _ratio(deterioration_capacity, "deterioration_capacity", 0.0, math.inf)
    if not math.isfinite(capacity) or (capacity > 0.0 and model not in ("clough", "takeda")):
        raise ValueError(f"deterioration_capacity must be finite, and > 0 only for clough "
                         f"or takeda [-]; got {deterioration_capacity!r} for {model!r}")
    return Hysteresis(
        model, k, fy, a,
        unloading_exponent=_ratio(unloading_exponent, "unloading_exponent", 0.0, 1.0),
        bouc_wen_exponent=_ratio(bouc_wen_exponent, "bouc_wen_exponent", 1.0, 200.0),
        bouc_wen_beta=_ratio(bouc_wen_beta, "bouc_wen_beta", 0.5, 1.0),
        dissipation_ratio=_ratio(dissipation_ratio, "dissipation_ratio", 0.0, 1.0),
        deterioration_capacity=capacity,
        deterioration_exponent=_ratio(deterioration_exponent, "deterioration_exponent", 0.0,
                                      10.0, low_open=True))


def damper(coefficient, exponent) -> Damper:
    """
    A checked nonlinear viscous damper.

    Parameters
    ----------
    coefficient : float
        C, finite and >= 0. [N·(s/m)^α]
    exponent : float
        α in (0, 2]; 1 is a linear dashpot. [-]

    Returns
    -------
    Damper
    """
    c = _ratio(coefficient, "coefficient", 0.0, math.inf)
    if not math.isfinite(c):
        raise ValueError(f"coefficient must be finite [N·(s/m)^α]; got {coefficient!r}")
    return Damper(c, _ratio(exponent, "exponent", 0.0, 2.0, low_open=True))


def collapse_displacement(stiffness_n_m, yield_strength_n, hardening_ratio,
                          gravity_stiffness_n_m) -> float:
    """
    Displacement at which the backbone's restoring force under P-Δ falls to zero.

    ``a k u + (1−a) F_y − (W/h) u = 0`` gives ``u = (1−a) F_y / (W/h − a k)`` when the
    post-yield stiffness including P-Δ, ``a k − W/h``, is negative ([1]_ sec. 7.11);
    beyond it gravity pushes the mass further out (static instability). inf otherwise.

    Parameters
    ----------
    stiffness_n_m : float
        Initial stiffness k. [N/m]
    yield_strength_n : float
        Yield strength F_y. [N]
    hardening_ratio : float
        Post-yield stiffness ratio a. [-]
    gravity_stiffness_n_m : float
        W/h. [N/m]

    Returns
    -------
    float
        [m]
    """
    slope = gravity_stiffness_n_m - hardening_ratio * stiffness_n_m
    if slope <= 0.0 or not math.isfinite(yield_strength_n):
        return math.inf
    return (1.0 - hardening_ratio) * yield_strength_n / slope


# ------------------------------------------------------------------------ kernels
@njit(**JIT_OPTIONS)
def _initial_state(model, p, state):
    """State vector at rest: [u, F, then model-specific] (see :func:`_restoring`)."""
    for i in range(state.size):
        state[i] = 0.0
    if model == 1:
        uy = p[1] / p[0]
        state[2] = uy
        state[3] = p[1]
        state[4] = -uy
        state[5] = -p[1]
        state[8] = p[0]
        state[9] = p[0]
        state[13] = 1.0
        state[14] = 1.0


@njit(**JIT_OPTIONS)
def _friction_pair(p, sc, u, v, dvdu, st):
    """Linear spring k_lin = p[0] plus a friction element: a pre-sliding spring k_p = p[1]
    with a dashpot c_s = p[3] in parallel, their force capped at ±f_p = p[2] (sliding).
    State [u, F, u_p]; ``dvdu`` is dv/du of the integrator (0 for a static call)."""
    k_lin = p[0]
    k_p = p[1]
    f_p = p[2]
    c_s = p[3]
    up = sc[2]
    fe = k_p * (u - up) + c_s * v
    if fe > f_p:
        st[2] = u - f_p / k_p
        return k_lin * u + f_p, k_lin, k_lin + k_p
    if fe < -f_p:
        st[2] = u + f_p / k_p
        return k_lin * u - f_p, k_lin, k_lin + k_p
    return k_lin * u + fe, k_lin + k_p + c_s * dvdu, k_lin + k_p


@njit(inline="always", **JIT_OPTIONS)
def _deteriorate(p, sc, st, e_cross):
    """At a zero-force crossing: the excursion's hysteretic energy E_i and
    β_i = (E_i / (E_t − ΣE_j))^c of Ibarra, Medina & Krawinkler (2005); the strength
    (and hardening) factor and the unloading-stiffness factor are each multiplied by
    1 − β_i (p[4] = E_t, p[5] = c). State [.., 10 ∫F du, 11 ∫F du at the last crossing,
    12 ΣE_j, 13 strength factor, 14 unloading factor]."""
    e_i = e_cross - sc[11]
    st[11] = e_cross
    if e_i <= 0.0:
        return
    total = sc[12] + e_i
    st[12] = total
    remaining = p[4] - total
    b = 1.0 if remaining <= 0.0 else (e_i / remaining) ** p[5]
    if b >= 1.0:
        b = 1.0
    st[13] = sc[13] * (1.0 - b)
    st[14] = sc[14] * (1.0 - b)


@njit(inline="always", **JIT_OPTIONS)
def _peak_oriented(p, sc, u, st):
    """Peak-oriented model with cyclic deterioration when p[4] > 0; see
    :func:`_peak_oriented_force`. Tracks ∫F du (state 10) for the deterioration."""
    f, kt, ku = _peak_oriented_force(p, sc, u, st)
    if p[4] > 0.0:
        if st[11] != sc[11]:  # crossed zero force at u0 = state 15 in this trial
            st[10] = st[11] + 0.5 * f * (u - st[15])
        else:
            st[10] = sc[10] + 0.5 * (sc[1] + f) * (u - sc[0])
    return f, kt, ku


@njit(inline="always", **JIT_OPTIONS)
def _peak_oriented_force(p, sc, u, st):
    """Clough (p[3] = 0) or Takeda (p[3] = β) peak-oriented model; state
    [u, F, u+, F+, u−, F−, u0+, u0−, k+, k−, ...]: peaks on each side, the zero crossings
    from which reloading on each side started, and the unloading stiffness of each side
    (before deterioration, see :func:`_deteriorate`). Moving in −u is the mirror image of
    moving in +u (:func:`_peak_toward`)."""
    # one call site, so the rules are compiled (inlined) once, not once for each side
    if u - sc[0] >= 0.0:
        x, sgn, i_peak, i_zero, i_own, i_other = u, 1.0, 2, 6, 8, 9
    else:
        x, sgn, i_peak, i_zero, i_own, i_other = -u, -1.0, 4, 7, 9, 8
    return _peak_toward(p, sc, st, x, sgn, i_peak, i_zero, i_own, i_other)


@njit(inline="always", **JIT_OPTIONS)
def _peak_toward(p, sc, st, x, sgn, i_peak, i_zero, i_own, i_other):
    """The peak-oriented rules for motion towards the side ``sgn`` (+1 or −1), written
    in mirrored coordinates x = sgn·u, force sgn·F: state ``i_peak`` (and the next
    index) holds that side's peak, ``i_zero`` its reloading start, ``i_own`` and
    ``i_other`` the unloading stiffness of that side and of the other side."""
    k = p[0]
    fy0 = p[1]
    ak0 = p[2] * k
    beta = p[3]
    uy0 = fy0 / k
    xc = sgn * sc[0]
    fc = sgn * sc[1]
    x_peak = sgn * sc[i_peak]
    sf = sc[13]
    uf = sc[14]
    k_own = sc[i_own] * uf
    k_other = sc[i_other] * uf
    if fc < 0.0:  # unloading from the other side
        f_try = fc + k_other * (x - xc)
        if f_try <= 0.0:
            return sgn * f_try, k_other, k_other
        x0 = xc - fc / k_other
        st[i_zero] = sgn * x0
        if p[4] > 0.0:
            st[15] = sgn * x0
            _deteriorate(p, sc, st, sc[10] + 0.5 * fc * (x0 - xc))
            sf = st[13]
            uf = st[14]
            k_own = sc[i_own] * uf
        x_from = x0
        f_from = 0.0
    else:
        x0 = sgn * sc[i_zero]
        x_from = xc
        f_from = fc
    fy = sf * fy0
    ak = sf * ak0
    uy = fy / k
    f_el = f_from + k_own * (x - x_from)
    if x > x_peak:
        env = fy + ak * (x - uy)
        k_env = ak
    elif x > x0 and x_peak > x0:
        target = min(sgn * sc[i_peak + 1], fy + ak * (x_peak - uy))
        k_env = target / (x_peak - x0)
        env = k_env * (x - x0)
    else:
        return sgn * f_el, k_own, k_own
    if f_el <= env:
        return sgn * f_el, k_own, k_own
    if x > x_peak:
        st[i_peak] = sgn * x
        st[i_peak + 1] = sgn * env
        base = sc[i_own]
        if beta != 0.0:
            base = k * (uy0 / x) ** beta
        st[i_own] = base
        k_own = base * uf
    return sgn * env, k_env, k_own


@njit(**JIT_OPTIONS)
def _abs_pow(x, n):
    """|x|^n, without a power call for n = 1 and n = 2 (the usual Bouc–Wen choices)."""
    a = abs(x)
    if n == 2.0:
        return a * a
    if n == 1.0:
        return a
    return a ** n


@njit(**JIT_OPTIONS)
def _bouc_wen_increment(z0, d, s, n, beta, gamma):
    """One backward-Euler increment z1 = z0 + s φ(z1) of the Bouc–Wen variable by a
    bracketed Newton iteration; z1, φ(z1) and g'(z1) = 1 − s φ'(z1)."""
    if d > 0.0:
        lo = z0
        hi = max(z0, 1.0)
    else:
        lo = min(z0, -1.0)
        hi = z0
    # explicit Euler predictor, kept inside the bracket
    sg0 = 1.0 if d * z0 > 0.0 else -1.0
    x = z0 + s * (1.0 - _abs_pow(z0, n) * (gamma + beta * sg0))
    if not (lo < x < hi):
        x = 0.5 * (lo + hi)
    g_d = 1.0
    phi = 0.0
    for _it in range(60):
        ax = abs(x)
        sg = 1.0 if d * x > 0.0 else -1.0
        w = gamma + beta * sg
        pw = _abs_pow(x, n - 1.0) if ax > 0.0 else 0.0  # |z|^(n−1)
        phi = 1.0 - pw * ax * w
        g = x - z0 - s * phi
        sx = 1.0 if x > 0.0 else (-1.0 if x < 0.0 else 0.0)
        g_d = 1.0 + s * n * pw * sx * w
        if abs(g) <= 1e-13:
            break
        if g > 0.0:
            hi = x
        else:
            lo = x
        x_new = x - g / g_d
        if not (lo < x_new < hi):
            x_new = 0.5 * (lo + hi)
        if abs(x_new - x) <= 1e-9:  # Newton: the error left is of order step²
            x = x_new
            break
        x = x_new
    return x, phi, g_d


@njit(**JIT_OPTIONS)
def _bouc_wen(k, fy, a, n, beta, gamma, uc, z, u):
    """Bouc–Wen with A = 1, γ = 1 − β from committed (u_c, z) to u: force, tangent and
    the new z (state [u, F, z]). Backward Euler on dz/du. Scalars only, so that the call
    costs no reference counting when the compiler does not inline it."""
    inv_uy = k / fy
    du = u - uc
    if du == 0.0:  # tangent of further loading
        dzdu = (1.0 - _abs_pow(z, n) * (gamma + beta)) * inv_uy
        return a * k * u + (1.0 - a) * fy * z, a * k + (1.0 - a) * fy * dzdu, z
    pieces = 1 + int(abs(du) * (20.0 * inv_uy))
    if pieces > 10000:
        pieces = 10000
    d = du / pieces
    s = d * inv_uy
    dzdu = 0.0
    for _ in range(pieces):
        z, phi, g_d = _bouc_wen_increment(z, d, s, n, beta, gamma)
        dzdu = dzdu / g_d + (phi * inv_uy) / (pieces * g_d)
    return a * k * u + (1.0 - a) * fy * z, a * k + (1.0 - a) * fy * dzdu, z


@njit(**JIT_OPTIONS)
def _flag_shaped(p, sc, u, st):
    """Flag-shaped self-centring model: force between the loading and unloading
    branches (module docstring), elastic at k between them; state [u, F]."""
    k = p[0]
    fy = p[1]
    ak = p[2] * k
    b = p[3]
    uy = fy / k
    x = abs(u)
    up_line = fy + ak * (x - uy)
    lo_line = (1.0 - b) * fy + ak * (x - (1.0 - b) * uy)
    upper = k * x
    k_up = k
    if up_line < upper:
        upper = up_line
        k_up = ak
    lower = k * x
    k_lo = k
    if lo_line < lower:
        lower = lo_line
        k_lo = ak
    if u >= 0.0:
        lo, k_lo_b, hi, k_hi_b = lower, k_lo, upper, k_up
    else:
        lo, k_lo_b, hi, k_hi_b = -upper, k_up, -lower, k_lo
    f = sc[1] + k * (u - sc[0])
    if f > hi:
        return hi, k_hi_b, k
    if f < lo:
        return lo, k_lo_b, k
    return f, k, k


@njit(**JIT_OPTIONS)
def _restoring(model, p, sc, u, v, dvdu, st):
    """Restoring force, tangent dF/du and unloading stiffness at trial displacement u
    (velocity v, ``dvdu`` = dv/du of the integrator) from committed state ``sc``; the
    trial state goes to ``st`` (a copy of ``sc`` with u and F updated)."""
    for i in range(sc.size):
        st[i] = sc[i]
    if model == 0:
        f, kt, ku = _friction_pair(p, sc, u, v, dvdu, st)
    elif model == 1:
        f, kt, ku = _peak_oriented(p, sc, u, st)
    elif model == 2:
        f, kt, z = _bouc_wen(p[0], p[1], p[2], p[3], p[4], p[5], sc[0], sc[2], u)
        st[2] = z
        ku = p[0]
    else:
        f, kt, ku = _flag_shaped(p, sc, u, st)
    st[0] = u
    st[1] = f
    return f, kt, ku


@njit(**JIT_OPTIONS)
def _damper_force(v, c_d, a_d, v_r):
    """Damper force and its derivative d F/d v (linear below ``v_r``)."""
    if c_d == 0.0:
        return 0.0, 0.0
    av = abs(v)
    if av <= v_r:
        slope = c_d * v_r ** (a_d - 1.0)
        return slope * v, slope
    if a_d == 1.0:
        return c_d * v, c_d
    slope = c_d * av ** (a_d - 1.0)
    f = slope * av
    return (f if v > 0.0 else -f), a_d * slope


@njit(**JIT_OPTIONS)
def integrate_model(ag, dt, n_sub, m, c, model, p, k_geo, c_d, a_d, v_r,
                    u_init, v_init, tol_force, max_iter, max_halvings, u_stop, hist,
                    stats):
    """
    Newmark average acceleration + Newton–Raphson through one record, any model.

    ``hist`` (10, npts) receives u, v, total acceleration, F (hysteretic), E_input,
    E_viscous, ∫F du, E_damper, damper force and the unloading
    stiffness. ``stats`` (14,): peak|u|, final u, final v, final F, peak|F|, max
    iterations, subdivided steps, all converged (1/0), E_input, E_viscous, ∫F du,
    E_damper, stopped (1/0: |u| >= ``u_stop`` or not finite), samples stored.
    The run stops after the step in which |u| >= ``u_stop``.
    Short names (DEVELOPERS.md, names of inputs): ``ag`` acceleration_m_s2 [m/s²],
    ``dt`` time_step_s [s], ``n_sub`` sub-steps per sample, ``m`` mass_kg [kg].
    """
    npts = ag.size
    # np.empty and loops rather than np.zeros: one array constructor fewer for numba to
    # compile in the process that compiles this kernel on a fresh machine
    sc = np.empty(_STATE)
    st = np.empty(_STATE)
    tsc = np.empty(_STATE)
    for q in range(_STATE):
        st[q] = 0.0
        tsc[q] = 0.0
    _initial_state(model, p, sc)  # sets every entry of sc
    u = u_init
    v = v_init
    f, _, ku = _restoring(model, p, sc, u, v, 0.0, st)
    for q in range(_STATE):
        sc[q] = st[q]
    fd = _damper_force(v, c_d, a_d, v_r)[0]
    a = (-m * ag[0] - c * v - fd - f + k_geo * u) / m
    e_in = 0.0
    e_d = 0.0
    e_f = 0.0
    e_x = 0.0
    peak_u = abs(u)
    peak_f = abs(f)
    iters_max = 0
    n_split = 0
    all_ok = 1
    stopped = 0
    hist[0, 0] = u
    hist[1, 0] = v
    hist[2, 0] = a + ag[0]
    hist[3, 0] = f
    hist[4, 0] = 0.0
    hist[5, 0] = 0.0
    hist[6, 0] = 0.0
    hist[7, 0] = 0.0
    hist[8, 0] = fd
    hist[9, 0] = ku
    stored = 1
    for i in range(npts - 1):
        g_lo = ag[i]
        g_hi = ag[i + 1]
        n_try = n_sub
        for attempt in range(max_halvings + 1):
            last = attempt == max_halvings
            tu = u
            tv = v
            ta = a
            tf = f
            tfd = fd
            tku = ku
            for q in range(_STATE):
                tsc[q] = sc[q]
            t_in = e_in
            t_d = e_d
            t_f = e_f
            t_x = e_x
            t_pu = peak_u
            t_pf = peak_f
            t_it = iters_max
            ok = True
            h = dt / n_try
            kdyn = 4.0 * m / (h * h) + 2.0 * c / h
            for s in range(n_try):
                g0 = g_lo + (g_hi - g_lo) * s / n_try
                g1 = g_lo + (g_hi - g_lo) * (s + 1) / n_try
                p1 = -m * g1
                du = 0.0
                it = 0
                conv = False
                while True:
                    u1 = tu + du
                    a1 = 4.0 * du / (h * h) - 4.0 * tv / h - ta
                    v1 = 2.0 * du / h - tv
                    f1, kt1, ku1 = _restoring(model, p, tsc, u1, v1, 2.0 / h, st)
                    fd1, dfd1 = _damper_force(v1, c_d, a_d, v_r)
                    r = p1 - m * a1 - c * v1 - fd1 - f1 + k_geo * u1
                    if abs(r) <= tol_force:
                        conv = True
                        break
                    if it == max_iter:
                        break
                    kk = kdyn + kt1 - k_geo + (2.0 / h) * dfd1
                    if kk <= 0.0:  # the tangent cannot be used: take the mass term only
                        kk = 4.0 * m / (h * h)
                    du = du + r / kk
                    it += 1
                if it > t_it:
                    t_it = it
                if not conv:
                    ok = False
                    if not last:
                        break
                t_in += -m * 0.5 * (g0 + g1) * du
                t_d += c * 0.5 * (tv + v1) * du
                t_f += 0.5 * (tf + f1) * du
                t_x += 0.5 * (tfd + fd1) * du
                tu = u1
                tv = v1
                ta = a1
                tf = f1
                tfd = fd1
                tku = ku1
                for q in range(_STATE):
                    tsc[q] = st[q]
                if abs(u1) > t_pu:
                    t_pu = abs(u1)
                if abs(f1) > t_pf:
                    t_pf = abs(f1)
            if ok or last:
                if attempt > 0:
                    n_split += 1
                if not ok:
                    all_ok = 0
                u = tu
                v = tv
                a = ta
                f = tf
                fd = tfd
                ku = tku
                for q in range(_STATE):
                    sc[q] = tsc[q]
                e_in = t_in
                e_d = t_d
                e_f = t_f
                e_x = t_x
                peak_u = t_pu
                peak_f = t_pf
                iters_max = t_it
                break
            n_try *= 2
        hist[0, i + 1] = u
        hist[1, i + 1] = v
        hist[2, i + 1] = a + g_hi
        hist[3, i + 1] = f
        hist[4, i + 1] = e_in
        hist[5, i + 1] = e_d
        hist[6, i + 1] = e_f
        hist[7, i + 1] = e_x
        hist[8, i + 1] = fd
        hist[9, i + 1] = ku
        stored = i + 2
        # unstable: past the bound, not finite, or (Ibarra et al. 2005) the energy
        # capacity used up so that no strength is left
        if not (peak_u < u_stop) or not math.isfinite(u) or (model == 1 and
                                                             sc[13] <= 0.0):
            stopped = 1
            break
    stats[0] = peak_u
    stats[1] = u
    stats[2] = v
    stats[3] = f
    stats[4] = peak_f
    stats[5] = iters_max
    stats[6] = n_split
    stats[7] = all_ok
    stats[8] = e_in
    stats[9] = e_d
    stats[10] = e_f
    stats[11] = e_x
    stats[12] = stopped
    stats[13] = stored


@njit(**JIT_OPTIONS)
def _force_path(model, p, path, out):
    """Restoring force along an imposed displacement path (one commit per sample)."""
    sc = np.zeros(_STATE)
    st = np.zeros(_STATE)
    _initial_state(model, p, sc)
    for i in range(path.size):
        out[i] = _restoring(model, p, sc, path[i], 0.0, 0.0, st)[0]
        for q in range(_STATE):
            sc[q] = st[q]


def force_path(model: Hysteresis, displacement_m) -> np.ndarray:
    """
    Restoring force of ``model`` along an imposed (quasi-static) displacement history.

    Parameters
    ----------
    model : Hysteresis
        The hysteresis model. [-]
    displacement_m : array-like
        Displacement at each sample, starting from rest; each sample is one committed
        state, so a path should move by small increments. [m]

    Returns
    -------
    numpy.ndarray
        Force at each sample. [N]
    """
    path = np.ascontiguousarray(displacement_m, dtype=np.float64)
    if path.ndim != 1 or not np.all(np.isfinite(path)):
        raise ValueError("displacement_m must be a 1-D array of finite values [m]")
    code, params = model.kernel_parameters()
    out = np.empty(path.size)
    _force_path(code, params, path, out)
    return out
