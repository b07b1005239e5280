"""Build-speed benchmark (not a test): the bundled example on a fresh machine, cold and
warm, and a larger synthetic study at 1 and 2 workers.

Prints wall time, CPU time and peak memory of each build, the share of time spent
computing (integration), rendering and writing (figures and pages are written as they
are rendered) and swapping the finished site in, and for the large
study the records per second and the speed-up from 1 to 2 workers.

Goals on the 2-core reference machine (from the issue): cold <= 20 s, warm <= 2 s, peak
memory <= 600 MB; a near-2x speed-up from 1 to 2 workers on the large study; the first
build on a fresh machine (no compiled kernels yet, as on a CI runner without a cache)
within 2x of the same build with the kernels compiled.

The example is built three times with its own cache folders (XDG_CACHE_HOME in a
temporary folder, NUMBA_CACHE_DIR unset): "fresh machine" (no compiled kernels, no
results), "cold" (kernels compiled by the first build, no results) and "warm" (nothing
changed). --fresh-repeats N repeats the first two N times (default 1) with new folders
and judges the median ratio, since this shared machine's speed varies between minutes.

The study is built --repeats times (default 5) at each worker count, interleaved (1, 2, 1,
2, ...): this shared 2-core machine's speed varies by tens of per cent between minutes, so
each 1-worker build is compared with the 2-worker build right after it, and the median
of those ratios is the speed-up judged. Each study build also prints the share of the
CPU the hypervisor gave to other guests meanwhile (steal time, Linux only), and the
pairs built while it took little are listed apart, as information. After each pair, two
1-worker builds run side by side: against the 1-worker build alone, that is the machine's
own 1 -> 2 speed-up on this workload (the most any 2-worker build could gain there and
then), printed beside the share of it the 2-worker build reached, as information.

Run: python benchmarks/build_example.py [--quick] [--repeats N] [--fresh-repeats N]
     [--example-only]
"""

from __future__ import annotations

import argparse
import json
import os
import subprocess
import sys
import tempfile
import textwrap
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
#: A build during which the hypervisor took less than this share of the CPU (steal time,
#: Linux /proc/stat) counts as undisturbed in the information line (our choice; no
#: published source).
CALM_STOLEN_SHARE = 0.03
EXAMPLE = ROOT / "site_examples" / "harbourview_cold_store" / "sdofreport.toml"

_CHILD = textwrap.dedent("""
    import json, resource, sys, time
    t0, c0 = time.perf_counter(), time.process_time()
    from sdofreport.build import build_site
    from sdofreport.runtime import configure
    configure()  # as the command line does
    project, output, cache, jobs = sys.argv[1:5]
    outcome = build_site(project, output, cache_dir=cache, jobs=int(jobs))
    wall = time.perf_counter() - t0
    own = resource.getrusage(resource.RUSAGE_SELF)
    kids = resource.getrusage(resource.RUSAGE_CHILDREN)
    print(json.dumps({
        "wall_s": wall,
        "cpu_s": own.ru_utime + own.ru_stime + kids.ru_utime + kids.ru_stime,
        "peak_mb": max(own.ru_maxrss, kids.ru_maxrss) / 1024.0,
        "timings": outcome.results.timings_s,
        "records": len(outcome.results.records),
        "computed": outcome.results.cache_misses,
    }))
""")


def _cpu_ticks() -> tuple[int, int] | None:
    """(all ticks, stolen ticks) of every CPU so far, from Linux's /proc/stat; None
    elsewhere. Stolen time is time the hypervisor gave to other guests while ours
    wanted to run."""
    try:
        with open("/proc/stat", encoding="ascii") as handle:
            fields = [int(value) for value in handle.readline().split()[1:9]]
    except (OSError, ValueError):
        return None
    return sum(fields), fields[7] if len(fields) > 7 else 0


def run_build(project: Path, output: Path, cache: Path, jobs: int,
              cache_root: Path | None = None) -> dict:
    """One build in a new interpreter; with ``cache_root``, every sdofreport cache
    (kernels, results, units) lives under it, as on a machine whose caches start there."""
    env = None
    if cache_root is not None:
        env = {k: v for k, v in os.environ.items() if not k.startswith("NUMBA_")}
        env["XDG_CACHE_HOME"] = str(cache_root)
    before = _cpu_ticks()
    result = subprocess.run([sys.executable, "-c", _CHILD, str(project), str(output),
                             str(cache), str(jobs)], capture_output=True, text=True,
                            check=False, env=env)
    after = _cpu_ticks()
    if result.returncode != 0:
        raise SystemExit(f"build failed:\n{result.stderr}")
    figures = json.loads(result.stdout.strip().splitlines()[-1])
    if before and after and after[0] > before[0]:
        figures["stolen_share"] = (after[1] - before[1]) / (after[0] - before[0])
    return figures


def _stolen(figures: dict) -> str:
    share = figures.get("stolen_share")
    return "" if share is None else f", host took {100 * share:.0f} % of the CPU"


def report(name: str, figures: dict, goals: dict) -> None:
    t = figures["timings"]
    total = max(figures["wall_s"], 1e-9)
    shares = {"integration": t.get("compute_s", 0.0),
              "plotting, pages and writing them": t.get("render_s", 0.0),
              "swapping the site in": t.get("write_s", 0.0)}
    other = total - sum(shares.values())
    print(f"{name}: wall {figures['wall_s']:.2f} s, CPU {figures['cpu_s']:.2f} s, peak "
          f"memory {figures['peak_mb']:.0f} MB, {figures['computed']} jobs computed")
    print("    shares: " + ", ".join(f"{k} {100 * v / total:.0f} %" for k, v in
                                      shares.items()) + f", other (start-up, reading, "
          f"hashing) {100 * other / total:.0f} %")
    for key, (limit, label) in goals.items():
        value = figures[key]
        print(f"    goal {label} <= {limit}: {value:.2f} -> "
              f"{'PASS' if value <= limit else 'MISS'}")


def _median(values: list[float]) -> float:
    values = sorted(values)
    middle = len(values) // 2
    return values[middle] if len(values) % 2 else 0.5 * (values[middle - 1] + values[middle])


def side_by_side(project: Path, folder: Path) -> float:
    """
    Wall time [s] of two 1-worker builds of ``project`` run at the same time, each with
    its own empty cache. Against one such build alone, it gives this machine's own 1 -> 2
    speed-up on this very workload, with no parallel code of ours involved: the most a
    2-worker build can gain here and now (two virtual cores of a shared host slow each
    other down when both are busy).
    """
    started = time.perf_counter()
    children = [subprocess.Popen([sys.executable, "-c", _CHILD, str(project),
                                  str(folder / f"site-{i}"), str(folder / f"cache-{i}"), "1"],
                                 stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
                for i in (0, 1)]
    for child in children:
        _, errors = child.communicate()
        if child.returncode != 0:
            raise SystemExit(f"build failed:\n{errors}")
    return time.perf_counter() - started


def make_study(folder: Path, n_records: int, n_systems: int) -> Path:
    """A synthetic parametric study: seeded Kanai-Tajimi records, many systems."""
    sys.path.insert(0, str(ROOT))
    from sdofreport.core.stochastic import kanai_tajimi_accelerogram
    from sdofreport.core.units import G
    from sdofreport.records.writers import write_two_column

    (folder / "records").mkdir(parents=True, exist_ok=True)
    lines = ['[project]\ntitle = "Synthetic study"\nreference = "BENCH"\nrevision = "1"\n'
             'prepared_by = "benchmark"\n\n[analysis]\ndamping = [0.02, 0.05, 0.10]\n'
             'periods = { min = 0.01, max = 10.0, count = 200 }\n']
    for i in range(n_records):
        acc = kanai_tajimi_accelerogram(20.0, 0.01, seed=1000 + i, target_pga_m_s2=0.3 * G,
                                        ground_frequency_hz=1.5 + 3.0 * (i % 7) / 6,
                                        high_pass_hz=0.15)
        write_two_column(folder / "records" / f"b{i:03d}.csv", 0.01, acc / G, units="g")
        lines.append(f'[[records]]\nid = "b{i:03d}"\nfile = "records/b{i:03d}.csv"\n')
    for j in range(n_systems):
        period = 0.1 * (30.0 ** (j / max(1, n_systems - 1)))
        lines.append(f'[[systems]]\nid = "s{j:02d}"\nname = "system {j}"\ndamping = 0.05\n'
                     f'mass = "50 t"\nperiod = {period:.4f}\n[systems.limits]\n'
                     f'displacement = "100 mm"\n')
    path = folder / "sdofreport.toml"
    path.write_text("\n".join(lines), encoding="utf-8")
    return path


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="a smaller study (20 x 5)")
    parser.add_argument("--repeats", type=int, default=5,
                        help="interleaved builds of the study per worker count")
    parser.add_argument("--fresh-repeats", type=int, default=1,
                        help="pairs of fresh-machine and cold builds of the example")
    parser.add_argument("--example-only", action="store_true",
                        help="only the example's builds, not the large study")
    args = parser.parse_args()
    print(f"cores: {os.cpu_count()}; python {sys.version.split()[0]}")
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        jobs = os.cpu_count() or 1
        ratios, cpu_ratios = [], []
        for repeat in range(max(1, args.fresh_repeats)):
            root = tmp / f"machine-{repeat}"  # a machine with no caches at all
            fresh = run_build(EXAMPLE, root / "site", root / "results-0", jobs,
                              cache_root=root / "caches")
            report("example, fresh machine (no compiled kernels, empty cache)", fresh,
                   {"peak_mb": (600.0, "peak MB")})
            cold = run_build(EXAMPLE, root / "site", root / "results-1", jobs,
                             cache_root=root / "caches")
            report("example, cold (kernels compiled, empty cache)", cold,
                   {"wall_s": (20.0, "wall s"), "peak_mb": (600.0, "peak MB")})
            ratios.append(fresh["wall_s"] / cold["wall_s"])
            cpu_ratios.append(fresh["cpu_s"] / cold["cpu_s"])
            print(f"    fresh machine / compiled kernels: wall {fresh['wall_s']:.2f} s / "
                  f"{cold['wall_s']:.2f} s = {ratios[-1]:.2f}x; CPU {fresh['cpu_s']:.2f} s "
                  f"/ {cold['cpu_s']:.2f} s = {cpu_ratios[-1]:.2f}x; kernel compilation "
                  f"about {fresh['wall_s'] - cold['wall_s']:.1f} s wall, "
                  f"{fresh['cpu_s'] - cold['cpu_s']:.1f} s CPU{_stolen(fresh)}", flush=True)
        judged = _median(ratios)
        print(f"first build on a fresh machine against the compiled build (median of "
              f"{len(ratios)}): wall {judged:.2f}x (goal <= 2x: "
              f"{'PASS' if judged <= 2.0 else 'MISS'}); CPU {_median(cpu_ratios):.2f}x "
              f"(information: on a busy shared machine the CPU time, build process and "
              f"its workers together, varies less than the wall time)")
        warm = run_build(EXAMPLE, root / "site", root / "results-1", jobs,
                         cache_root=root / "caches")
        report("example, warm (nothing changed)", warm,
               {"wall_s": (2.0, "wall s"), "peak_mb": (600.0, "peak MB")})
        if args.example_only:
            return

        n_rec, n_sys = (20, 5) if args.quick else (100, 20)
        study = make_study(tmp / "study", n_rec, n_sys)
        runs: dict[int, list[dict]] = {1: [], 2: []}
        ceilings = []
        for repeat in range(args.repeats):  # interleaved, so a slow spell hits both
            for jobs in (1, 2):
                name = f"{jobs}-{repeat}"
                figures = run_build(study, tmp / f"study-site-{name}",
                                    tmp / f"cache-{name}", jobs)
                runs[jobs].append(figures)
                t = figures["timings"]
                print(f"study {n_rec} records x {n_sys} systems, 3 damping ratios, {jobs} "
                      f"worker(s), run {repeat + 1}: wall {figures['wall_s']:.1f} s, CPU "
                      f"{figures['cpu_s']:.1f} s, integration {t['compute_s']:.1f} s, "
                      f"rendering and writing {t['render_s']:.1f} s, peak "
                      f"{figures['peak_mb']:.0f} MB{_stolen(figures)}", flush=True)
            both = side_by_side(study, tmp / f"side-{repeat}")
            ceilings.append(2.0 * runs[1][-1]["wall_s"] / both)
            print(f"    two 1-worker builds side by side: {both:.1f} s -> this machine's "
                  f"own 1 -> 2 speed-up on this workload {ceilings[-1]:.2f}x", flush=True)
        best = {jobs: min(items, key=lambda f: f["wall_s"]) for jobs, items in runs.items()}
        # Each 1-worker build and the 2-worker build right after it see nearly the same
        # machine speed, so their ratio is the least disturbed measure of the scaling;
        # the median of those ratios is the figure judged.
        pairs = sorted(one["wall_s"] / two["wall_s"] for one, two in zip(runs[1], runs[2]))
        whole = _median(pairs)
        print(f"study records per second (whole build, best of {args.repeats}): 1 worker "
              f"{n_rec / best[1]['wall_s']:.2f}, 2 workers {n_rec / best[2]['wall_s']:.2f}; "
              f"integration alone {n_rec / best[1]['timings']['compute_s']:.0f} and "
              f"{n_rec / best[2]['timings']['compute_s']:.0f}")
        print("speed-up 1 -> 2 workers of each interleaved pair of builds: "
              + ", ".join(f"{value:.2f}x" for value in pairs)
              + f"; best runs {best[1]['wall_s']:.1f} s -> {best[2]['wall_s']:.1f} s = "
              f"{best[1]['wall_s'] / best[2]['wall_s']:.2f}x")
        print(f"whole-build speed-up 1 -> 2 workers (median of the pairs): {whole:.2f}x "
              f"(goal near 2x, >= 1.7: {'PASS' if whole >= 1.7 else 'MISS'})")
        calm = sorted(one["wall_s"] / two["wall_s"] for one, two in zip(runs[1], runs[2])
                      if max(one.get("stolen_share", 1.0), two.get("stolen_share", 1.0))
                      < CALM_STOLEN_SHARE)
        print(f"pairs in which the host took under {100 * CALM_STOLEN_SHARE:.0f} % of the "
              f"CPU in both builds: " + (", ".join(f"{value:.2f}x" for value in calm)
                                        or "none") + " (information)")
        share = sorted(one["wall_s"] / two["wall_s"] / ceiling for one, two, ceiling in
                       zip(runs[1], runs[2], ceilings))
        ceilings.sort()
        print("this machine's own 1 -> 2 speed-up on this workload (two 1-worker builds "
              "side by side against one alone), each repeat: "
              + ", ".join(f"{c:.2f}x" for c in ceilings)
              + f" (median {_median(ceilings):.2f}x); the 2-worker build reached a median "
              f"{100 * _median(share):.0f} % of it (information)")
        # With workers, the kernels load while the records are read, so integration
        # is compared together with reading.
        phases = {name: sum(best[1]["timings"][key] for key in keys)
                  / sum(best[2]["timings"][key] for key in keys)
                  for name, keys in (("rendering and writing", ("render_s",)),
                                     ("reading and integration", ("read_s", "compute_s")))}
        print("phase speed-ups: " + ", ".join(f"{name} {value:.2f}x" for name, value in
                                               phases.items())
              + " (with workers the phases overlap: kernels load while records are read, "
                "record figures are drawn while responses are computed; information)")
        serial = {jobs: best[jobs]["wall_s"] - sum(best[jobs]["timings"][key] for key in
                                                   ("render_s", "compute_s", "read_s"))
                  for jobs in (1, 2)}
        print(f"outside those phases (start-up, imports, loading the project, swapping "
              f"the site in): {serial[1]:.1f} s with 1 worker, {serial[2]:.1f} s with 2; "
              f"CPU {best[1]['cpu_s']:.1f} s and {best[2]['cpu_s']:.1f} s (information)")


if __name__ == "__main__":
    main()
