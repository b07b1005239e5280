"""
Effective (secant) properties of a friction pendulum isolator at a displacement.

For a bearing of radius R carrying W with friction μ, a symmetric cycle of amplitude D
has the force ``F(D) = (W/R) D + μW`` and the loop area ``E_loop = 4 μ W D``
(Zayas, Low & Mahin 1990 [1]_). With the definitions of effective stiffness and
effective damping of isolation practice (ASCE/SEI 7-16 §17.8.5.1-§17.8.5.2 [2]_, from
memory: ``k_eff = (|F⁺| + |F⁻|)/(|Δ⁺| + |Δ⁻|)`` and
``β_eff = (2/π) E_loop / (k_eff (|Δ⁺| + |Δ⁻|)²)``):

    k_eff = W/R + μW/D,
    T_eff = 2π √(W / (g k_eff)),
    β_eff = (2/π) μ / (μ + D/R).

References
----------
.. [1] V. A. Zayas, S. S. Low and S. A. Mahin, "A simple pendulum technique for achieving
   seismic isolation," Earthquake Spectra, vol. 6, no. 2, pp. 317-333, 1990,
   doi: 10.1193/1.1585564.
.. [2] ASCE/SEI 7-16, *Minimum Design Loads and Associated Criteria for Buildings and
   Other Structures*, Chapter 17. Reston, VA, USA: ASCE, 2017.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from sdofreport.core.units import G

__all__ = ["EffectiveProperties", "pendulum_effective_properties"]


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
