"""Two-direction runs against two one-direction runs of the same system (issue 18 goal:
within 3×), and the CPU time to compile the example's two-direction kernels on a fresh
machine (``--compile``: each repeat in a new process with an empty numba cache, after the
linear kernels are loaded, as the build's warm-up does). Prints seconds and ratios; no
assertion (tests never time anything).

Run: python benchmarks/biaxial.py [--compile [REPEATS]]
"""

from __future__ import annotations

import json
import math
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path


from sdofreport.core.stochastic import kanai_tajimi_accelerogram
from sdofreport.core.units import G
from sdofreport.engine.jobs import biaxial_job, response_job

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
for _name, _extra in (("bouc-wen", {}), ("clough", {}), ("takeda", {}),
                      ("flag-shaped", {"dissipation_ratio": 0.5})):
    MODELS[_name] = {**MODELS["bilinear"], "model": _name, "parameters": _extra}
MODELS["bilinear + damper"] = {**MODELS["bilinear"], "damper": {"coefficient": 2e5,
                                                                "exponent": 0.4}}
MODELS["hanging"] = {"model": "linear", "period_s": 1.2, "damping": 0.02,
                     "participation": 0.8}

ROOT = Path(__file__).resolve().parents[1]
EXAMPLE = ROOT / "site_examples" / "harbourview_cold_store" / "sdofreport.toml"
_CHILD = """
import json, sys, time
from sdofreport.core._jit import load_numba
from sdofreport.engine.warmup import _later_steps, warm_kernels
from sdofreport.project import load_project
project = load_project(sys.argv[1])
load_numba()
warm_kernels(project)
steps = dict(_later_steps(project))
start = time.process_time()
steps["biaxial"]()
print(json.dumps({"cpu_s": time.process_time() - start}))
"""


def fresh_compile(repeats: int) -> None:
    """CPU seconds of the example's two-direction warm-up step with no compiled kernels."""
    figures = []
    for _ in range(repeats):
        with tempfile.TemporaryDirectory() as folder:
            env = {**os.environ, "NUMBA_CACHE_DIR": folder,
                   "PYTHONPATH": str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", "")}
            out = subprocess.run([sys.executable, "-c", _CHILD, str(EXAMPLE)], env=env,
                                 capture_output=True, text=True, check=True).stdout
            figures.append(json.loads(out.splitlines()[-1])["cpu_s"])
    print("fresh compile of the example's two-direction kernels (CPU s): "
          + ", ".join(f"{x:.2f}" for x in figures)
          + f"; median {sorted(figures)[len(figures) // 2]:.2f}")


def best_of(repeats, work):
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        work()
        times.append(time.perf_counter() - start)
    return min(times)


def main():
    if "--compile" in sys.argv:
        rest = sys.argv[sys.argv.index("--compile") + 1:]
        fresh_compile(int(rest[0]) if rest else 5)
        return
    print(f"record: {A1.size} samples at {DT} s")
    for name, model in MODELS.items():
        biaxial_job(A1, A2, DT, [model], "exact")  # compile
        response_job(A1, DT, model, "exact")
        two = best_of(5, lambda: biaxial_job(A1, A2, DT, [model], "exact"))
        one = best_of(5, lambda: (response_job(A1, DT, model, "exact"),
                                  response_job(A2, DT, model, "exact")))
        print(f"{name:18s} two-direction {two * 1e3:8.1f} ms   two one-direction "
              f"{one * 1e3:8.1f} ms   ratio {two / one:5.2f} (goal <= 3)")


if __name__ == "__main__":
    main()
