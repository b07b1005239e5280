"""
Effective (secant) properties of isolators at a displacement, their bound properties,
and the effective period at the displacement the target spectrum gives.

For a bearing of radius R carrying W with friction μ, a symmetric cycle of amplitude D
has the force ``F(D) = (W/R) D + μW`` and the loop area ``E_loop = 4 μ W D``
(Zayas, Low & Mahin 1990 [1]_). With the definitions of effective stiffness and
effective damping of isolation practice (ASCE/SEI 7-16 §17.8.5.1-§17.8.5.2 [2]_, from
memory: ``k_eff = (|F⁺| + |F⁻|)/(|Δ⁺| + |Δ⁻|)`` and
``β_eff = (2/π) E_loop / (k_eff (|Δ⁺| + |Δ⁻|)²)``):

    k_eff = W/R + μW/D,
    T_eff = 2π √(W / (g k_eff)),
    β_eff = (2/π) μ / (μ + D/R).

A bilinear isolator (elastic stiffness k_u, characteristic strength Q_d, post-yield
stiffness k_d, yield displacement D_y = Q_d/(k_u − k_d)) cycled to D > D_y has
``F(D) = Q_d + k_d D`` and ``E_loop = 4 Q_d (D − D_y)`` (Naeim & Kelly 1999 [3]_,
§4.3, from memory), so ``k_eff = Q_d/D + k_d`` and
``β_eff = 4 Q_d (D − D_y) / (2π k_eff D²)``; below D_y it is elastic (k_eff = k_u,
β_eff = 0).

Property modification (ASCE/SEI 7-16 §17.2.8.4 [2]_, from memory) multiplies Q_d and
k_d by the factor λ; the elastic stiffness k_u is kept (our choice; common practice, no
source). With F_y = Q_d/(1 − α) and k_d = α k_u this gives α' = λα and
F_y' = λ Q_d/(1 − λα).

The effective period at the maximum displacement (ASCE/SEI 7-16 §17.5.3, Eqs. 17.5-1
and 17.5-2, from memory) is the fixed point of

    D_M = g S_a(T_M) T_M² / (4π² B_M),   T_M = 2π √(W/(k_M g)),

with k_M, β_M the effective properties at D_M and B_M the damping coefficient of
β_M; where the target is S_M1/T this is Eq. 17.5-1, ``D_M = g S_M1 T_M/(4π² B_M)``.

References
----------
.. [1] V. A. Zayas, S. S. Low and S. A. Mahin, "A simple pendulum technique for achieving
   seismic isolation," Earthquake Spectra, vol. 6, no. 2, pp. 317-333, 1990,
   doi: 10.1193/1.1585564.
.. [2] ASCE/SEI 7-16, *Minimum Design Loads and Associated Criteria for Buildings and
   Other Structures*, Chapter 17. Reston, VA, USA: ASCE, 2017.
.. [3] F. Naeim and J. M. Kelly, *Design of Seismic Isolated Structures: From Theory
   to Practice*. New York, NY, USA: Wiley, 1999.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from sdofreport.core.units import G

__all__ = ["EffectiveProperties", "IsolatedPeriod", "bilinear_bound_properties",
           "bilinear_effective_properties", "isolated_period",
           "pendulum_effective_properties"]


@dataclass(frozen=True)
class EffectiveProperties:
    """Secant properties of an isolator at one displacement amplitude."""

    #: displacement amplitude D [m]
    displacement_m: float
    #: effective (secant) stiffness k_eff [N/m]
    stiffness_n_m: float
    #: effective period T_eff [s]
    period_s: float
    #: effective damping ratio β_eff [-]
    damping: float


def pendulum_effective_properties(weight_n, radius_m, friction, displacement_m
                                  ) -> EffectiveProperties:
    """
    Effective stiffness, period and damping of a friction pendulum (module docstring).

    Parameters
    ----------
    weight_n : float
        Weight carried W, > 0. [N]
    radius_m : float
        Radius of the sliding surface R, > 0. [m]
    friction : float
        Friction coefficient μ, >= 0. [-]
    displacement_m : float
        Displacement amplitude D, > 0. [m]

    Returns
    -------
    EffectiveProperties
    """
    w, r, mu, d = float(weight_n), float(radius_m), float(friction), float(displacement_m)
    if not (w > 0 and r > 0 and mu >= 0 and d > 0) or not all(
            math.isfinite(x) for x in (w, mu, d)):
        raise ValueError(f"need W > 0 [N], R > 0 [m], μ >= 0 [-] and D > 0 [m]; got "
                         f"{weight_n!r}, {radius_m!r}, {friction!r}, {displacement_m!r}")
    k_eff = w / r + mu * w / d
    return EffectiveProperties(displacement_m=d, stiffness_n_m=k_eff,
                               period_s=2.0 * math.pi * math.sqrt(w / (G * k_eff)),
                               damping=2.0 / math.pi * mu / (mu + d / r))


def bilinear_bound_properties(stiffness_n_m, yield_strength_n, post_yield_ratio, factor
                              ) -> tuple[float, float]:
    """
    Yield strength and post-yield ratio of a bilinear isolator whose characteristic
    strength Q_d and post-yield stiffness k_d are multiplied by ``factor`` (module
    docstring), the elastic stiffness kept.

    Parameters
    ----------
    stiffness_n_m : float
        Elastic stiffness k_u, > 0. [N/m]
    yield_strength_n : float
        Yield strength F_y, > 0. [N]
    post_yield_ratio : float
        α = k_d/k_u, 0 <= α < 1. [-]
    factor : float
        Property modification factor λ, > 0, with λα < 1. [-]

    Returns
    -------
    tuple of float
        (F_y' [N], α' [-]).
    """
    k, fy, alpha, lam = (float(stiffness_n_m), float(yield_strength_n),
                         float(post_yield_ratio), float(factor))
    if not (k > 0 and fy > 0 and 0 <= alpha < 1 and lam > 0 and lam * alpha < 1) or \
            not all(math.isfinite(x) for x in (k, fy, lam)):
        raise ValueError(f"need k_u > 0 [N/m], F_y > 0 [N], 0 <= α < 1, λ > 0 and λα < 1 "
                         f"[-]; got {stiffness_n_m!r}, {yield_strength_n!r}, "
                         f"{post_yield_ratio!r}, {factor!r}")
    qd = fy * (1.0 - alpha)  # Q_d: the post-yield branch's force at zero displacement
    return lam * qd / (1.0 - lam * alpha), lam * alpha


def bilinear_effective_properties(weight_n, stiffness_n_m, yield_strength_n,
                                  post_yield_ratio, displacement_m) -> EffectiveProperties:
    """
    Effective stiffness, period and damping of a bilinear isolator (module docstring).

    Parameters
    ----------
    weight_n : float
        Weight carried W, > 0. [N]
    stiffness_n_m : float
        Elastic stiffness k_u, > 0. [N/m]
    yield_strength_n : float
        Yield strength F_y, > 0. [N]
    post_yield_ratio : float
        α = k_d/k_u, 0 <= α < 1. [-]
    displacement_m : float
        Displacement amplitude D, > 0. [m]

    Returns
    -------
    EffectiveProperties
    """
    w, k, fy, alpha, d = (float(weight_n), float(stiffness_n_m), float(yield_strength_n),
                          float(post_yield_ratio), float(displacement_m))
    if not (w > 0 and k > 0 and fy > 0 and 0 <= alpha < 1 and d > 0) or \
            not all(math.isfinite(x) for x in (w, k, fy, d)):
        raise ValueError(f"need W > 0 [N], k_u > 0 [N/m], F_y > 0 [N], 0 <= α < 1 [-] "
                         f"and D > 0 [m]; got {weight_n!r}, {stiffness_n_m!r}, "
                         f"{yield_strength_n!r}, {post_yield_ratio!r}, {displacement_m!r}")
    dy = fy / k
    if d <= dy:
        k_eff, beta = k, 0.0
    else:
        qd, kd = fy * (1.0 - alpha), alpha * k
        k_eff = qd / d + kd
        beta = 4.0 * qd * (d - dy) / (2.0 * math.pi * k_eff * d * d)
    return EffectiveProperties(displacement_m=d, stiffness_n_m=k_eff,
                               period_s=2.0 * math.pi * math.sqrt(w / (G * k_eff)),
                               damping=beta)


@dataclass(frozen=True)
class IsolatedPeriod:
    """The effective properties at the displacement the target spectrum gives."""

    #: effective properties at D_M (period_s is T_M)
    effective: EffectiveProperties
    #: damping coefficient B_M of the effective damping [-]
    damping_coefficient: float
    #: target ordinate S_a(T_M) [g]
    spectral_accel_g: float


def isolated_period(effective, spectral_accel_g, damping_coefficient,
                    largest_m: float = 10.0) -> IsolatedPeriod | None:
    """
    T_M and D_M of an isolator under a target spectrum (module docstring): the largest
    root of ``D − g S_a(T(D)) T(D)² / (4π² B(β(D)))`` on a log grid from 10 µm to
    ``largest_m``, refined by bisection to 1e-12 relative.

    Parameters
    ----------
    effective : callable
        D [m] -> :class:`EffectiveProperties` at that amplitude.
    spectral_accel_g : callable
        T [s] -> S_a(T) of the target. [g]
    damping_coefficient : callable
        β_eff [-] -> B [-].
    largest_m : float
        Largest displacement searched. [m]

    Returns
    -------
    IsolatedPeriod or None
        None when the target moves the isolator by no displacement in the range (for
        example friction above what the spectrum can overcome).
    """
    def demand(d):
        e = effective(d)
        sa = float(spectral_accel_g(e.period_s))
        return e, sa, G * sa * e.period_s ** 2 / (4.0 * math.pi ** 2 *
                                                  float(damping_coefficient(e.damping)))

    def gap(d):
        value = d - demand(d)[2]
        return value if math.isfinite(value) else math.inf

    grid = [1e-5 * (largest_m / 1e-5) ** (i / 400) for i in range(401)]
    values = [gap(d) for d in grid]
    root = None
    for i in range(len(grid) - 1, 0, -1):
        if values[i - 1] < 0 <= values[i]:
            lo, hi = grid[i - 1], grid[i]
            while hi - lo > 1e-12 * hi:
                mid = 0.5 * (lo + hi)
                lo, hi = (mid, hi) if gap(mid) < 0 else (lo, mid)
            root = 0.5 * (lo + hi)
            break
    if root is None:
        return None
    e, sa, _ = demand(root)
    return IsolatedPeriod(e, float(damping_coefficient(e.damping)), sa)
