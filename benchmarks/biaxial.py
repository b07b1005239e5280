"""Two-direction runs against two one-direction runs of the same system (issue 18 goal:
within 3×). Prints seconds and ratios; no assertion (tests never time anything)."""

from __future__ import annotations

import math
import time

import numpy as np

from sdofreport.core.stochastic import kanai_tajimi_accelerogram
from sdofreport.core.units import G
from sdofreport.jobs import biaxial_job, response_job

DT = 0.005
A1 = kanai_tajimi_accelerogram(40.0, DT, seed=1, target_pga_m_s2=0.4 * G, high_pass_hz=0.2)
A2 = kanai_tajimi_accelerogram(40.0, DT, seed=2, target_pga_m_s2=0.35 * G, high_pass_hz=0.2)

MODELS = {
    "elastic": {"model": "linear", "period_s": 1.0, "damping": 0.05,
                "stiffness_n_m": 4e6},
    "bilinear": {"model": "bilinear", "stiffness_n_m": 4e6, "yield_strength_n": 1.2e5,
                 "post_yield_ratio": 0.05, "mass_kg": 1e5, "damping": 0.05,
                 "period_s": 2 * math.pi * math.sqrt(1e5 / 4e6), "parameters": {}},
    "sliding-pendulum": {"model": "sliding-pendulum", "weight_n": 1e6, "radius_m": 2.5,
                         "friction": 0.06, "slip_displacement_m": 0.25e-3,
                         "damping": 0.0, "period_s": 2 * math.pi * math.sqrt(2.5 / G)},
}


def best_of(repeats, work):
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        work()
        times.append(time.perf_counter() - start)
    return min(times)


def main():
    print(f"record: {A1.size} samples at {DT} s")
    for name, model in MODELS.items():
        biaxial_job(A1, A2, DT, [model], "exact")  # compile
        response_job(A1, DT, model, "exact")
        two = best_of(5, lambda: biaxial_job(A1, A2, DT, [model], "exact"))
        one = best_of(5, lambda: (response_job(A1, DT, model, "exact"),
                                  response_job(A2, DT, model, "exact")))
        print(f"{name:17s} two-direction {two * 1e3:8.1f} ms   two one-direction "
              f"{one * 1e3:8.1f} ms   ratio {two / one:5.2f} (goal <= 3)")


if __name__ == "__main__":
    main()
