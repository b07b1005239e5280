"""Fragility-speed benchmark (not a test): 22 pairs x 15 levels x one yielding system.

Writes an invented study of 22 horizontal pairs (44 seeded synthetic records, Kanai-Tajimi
filtered noise, 20 s at 0.01 s), scaled to an ASCE/SEI 7-16 target, with one yielding
(bilinear) system and a ``[fragility]`` section of 15 levels; builds it from a cold result
cache with 2 workers, then the same study without ``[fragility]`` (also cold), and
prints wall and CPU time of both, the difference (what the 660 stripe runs and the fit
cost) and the goal of issue 20: the fragility build under 30 s on the 2-core machine.
The compiled kernels stay in their own (warm) cache: "cold" is the result cache.

Run: python benchmarks/fragility.py [--jobs N]
"""

from __future__ import annotations

import argparse
import sys
import tempfile
from pathlib import Path

from build_example import run_build

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from sdofreport.core.stochastic import kanai_tajimi_accelerogram
from sdofreport.core.units import G
from sdofreport.records.writers import write_two_column

PAIRS = 22
LEVELS = [round(0.05 * 1.25 ** k, 4) for k in range(15)]  # 0.05 g to about 1.1 g
GOAL_S = 30.0

HEAD = """\
[project]
title = "Fragility benchmark (invented)"
reference = "BENCH-20"
revision = "0"
prepared_by = "benchmark"

[analysis]
method = "exact"
damping = [0.05]
periods = { min = 0.02, max = 5.0, count = 100 }

[design_spectrum]
kind = "asce7-16"
sds = 1.0
sd1 = 0.6
tl = "8 s"

[scaling]
rule = "asce7-16"
period = "1.2 s"

[[systems]]
id = "pier"
name = "Yielding pier"
mass = "60 t"
period = "1.2 s"
height = "8 m"
damping = 0.05
yield_strength = "150 kN"
post_yield_ratio = 0.03
[systems.limits]
drift_ratio = 0.02
ductility = 4.0
residual_displacement = "40 mm"
"""


def write_study(folder: Path, fragility: bool) -> Path:
    records = folder / "records"
    records.mkdir(parents=True, exist_ok=True)
    parts = [HEAD]
    if fragility:
        parts.append(f"\n[fragility]\nlevels = {LEVELS}\nsystems = [\"pier\"]\n")
    for pair in range(PAIRS):
        for component in ("H1", "H2"):
            seed = 2 * pair + (component == "H2") + 1
            name = f"b{seed:02d}"
            path = records / f"{name}.csv"
            if not path.exists():
                acc = kanai_tajimi_accelerogram(20.0, 0.01, seed=seed,
                                                target_pga_m_s2=0.3 * G, high_pass_hz=0.2)
                write_two_column(path, 0.01, acc / G, units="g")
            parts.append(f'\n[[records]]\nid = "{name}"\nfile = "records/{name}.csv"\n'
                         f'pair = "P{pair + 1}"\ncomponent = "{component}"\n')
    project = folder / ("with.toml" if fragility else "without.toml")
    project.write_text("".join(parts), encoding="utf-8")
    return project


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--jobs", type=int, default=2)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory(prefix="sdofreport-fragility-bench-") as tmp:
        root = Path(tmp)
        figures = {}
        for fragility in (True, False):
            project = write_study(root, fragility)
            name = "with" if fragility else "without"
            figures[name] = run_build(project, root / f"site-{name}",
                                      root / f"cache-{name}", args.jobs)
        w, wo = figures["with"], figures["without"]
        print(f"{PAIRS} pairs ({2 * PAIRS} records) x {len(LEVELS)} levels x 1 yielding "
              f"system = {2 * PAIRS * len(LEVELS)} stripe runs, {args.jobs} workers, "
              f"cold result cache")
        print(f"    build with [fragility]:    wall {w['wall_s']:.2f} s, CPU "
              f"{w['cpu_s']:.2f} s, {w['computed']} jobs computed")
        print(f"    build without [fragility]: wall {wo['wall_s']:.2f} s, CPU "
              f"{wo['cpu_s']:.2f} s, {wo['computed']} jobs computed")
        print(f"    fragility cost: wall {w['wall_s'] - wo['wall_s']:+.2f} s, CPU "
              f"{w['cpu_s'] - wo['cpu_s']:+.2f} s "
              f"(ratio of walls {w['wall_s'] / max(wo['wall_s'], 1e-9):.2f})")
        print(f"    goal: build with [fragility] <= {GOAL_S:g} s: {w['wall_s']:.2f} -> "
              f"{'PASS' if w['wall_s'] <= GOAL_S else 'MISS'}")


if __name__ == "__main__":
    main()
