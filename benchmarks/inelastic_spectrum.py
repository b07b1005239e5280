"""
Time a constant-ductility spectrum: 50 periods × 4 ductility targets, 10,000-step record.

A plain script (not a test): ``python benchmarks/inelastic_spectrum.py``.

Record: a seeded Kanai–Tajimi synthetic accelerogram (``kanai_tajimi_accelerogram``,
seed 7), 10,000 samples at dt = 0.005 s, PGA 3 m/s², 0.2 Hz high-pass factor.
Spectrum: 50 log-spaced periods 0.05–3 s, 5 % damping, elastic–perfectly-plastic,
targets μ = 2, 3, 4, 6, default settings (exact integration between yield events with
at least 8 steps per period, scan factor 0.95 with the window search, bisection to 0.1 %;
``sdofreport.core.inelastic_spectra``). Measured 2026-12-05 on the shared 2-core machine:
0.41-0.49 s best of 3 with one thread (the former Newmark kernel at 20 steps per period with
a 0.9 scan: 0.66 s).

Goal (from the issue): under 2 s on a 2-core machine. The compile time of the first
call is printed but not judged (numba caches it on disk for later runs). Runs are
repeated and the best time is judged, with one thread and with one thread per core
(``workers``; the compiled kernels release the GIL, so threads run periods in parallel).
"""

from __future__ import annotations

import os
import time

import numpy as np

from sdofreport.core.inelastic_spectra import constant_ductility_spectrum
from sdofreport.core.stochastic import kanai_tajimi_accelerogram
from sdofreport.runtime import configure

configure()  # as the command line does: numba's cache folder and vector width

GOAL_S = 2.0  # seconds, issue
NPTS = 10_000
DT = 0.005


def main() -> None:
    ag = kanai_tajimi_accelerogram(NPTS * DT, DT, seed=7, target_pga_m_s2=3.0,
                                   high_pass_hz=0.2)
    assert ag.size == NPTS
    periods = np.geomspace(0.05, 3.0, 50)
    targets = np.array([2.0, 3.0, 4.0, 6.0])
    cores = len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else os.cpu_count()

    t0 = time.perf_counter()
    constant_ductility_spectrum(ag[:200], DT, periods[:2], 0.05, targets)
    print(f"first call (compile or load from cache): {time.perf_counter() - t0:.2f} s")

    best = {}
    result = None
    for workers in sorted({1, cores}):
        times = []
        for _ in range(3):
            t0 = time.perf_counter()
            result = constant_ductility_spectrum(ag, DT, periods, 0.05, targets,
                                                 workers=workers)
            times.append(time.perf_counter() - t0)
        best[workers] = min(times)
        print(f"workers={workers} (threads): best of 3 = {best[workers]:.3f} s "
              f"(all: {', '.join(f'{x:.3f}' for x in times)})")

    r = result.strength_reduction_factor
    print(f"record: {NPTS} steps, dt = {DT} s; spectrum: {periods.size} periods × "
          f"{targets.size} targets; cores available: {cores}")
    print(f"R at T = {periods[-1]:.2f} s for μ = {targets.tolist()}: "
          f"{np.round(r[:, -1], 2).tolist()}; unreached targets: {int(np.isnan(r).sum())}")
    used = min(best, key=best.get)  # the other core may be busy with other work
    verdict = "PASS" if best[used] < GOAL_S else "MISS"
    print(f"{verdict}: {best[used]:.3f} s with {used} thread(s) (goal < {GOAL_S} s)")


if __name__ == "__main__":
    main()
