"""
Throughput of the compiled response-spectrum kernels on one core.

A plain script (not a test): ``python benchmarks/spectrum_kernel.py``.

Record: 11,000 steps at dt = 0.005 s of seeded, band-passed Gaussian noise under a
Saragoni-Hart-type envelope, made inline with numpy/scipy. Spectrum: 500 log-spaced
periods 0.01-10 s, 5 % damping. Two counts are printed for each kernel:

* record oscillator-steps/s = n_oscillators × (npts − 1) / time;
* executed oscillator-steps/s = integration steps actually run, including the sub-steps
  the default settings add for short periods, with peaks refined as the defaults do.

The goals (>= 1,000 M executed oscillator-steps/s for the exact peaks kernel, and >= 25x
the numpy loop) are judged on the executed count with default settings. The machine is
shared: each figure is the best of several runs, and a busy machine still lowers them.
Baselines: (i) a numpy loop over time, vectorised across periods, with the
same exact recurrence at the record's own step (no sub-steps, no refinement); (ii)
``scipy.signal.lsim`` per period, timed on a subset of periods and scaled to 500.
"""

from __future__ import annotations

import os
import time

import numpy as np
from scipy import signal

from sdofreport.core._jit import load_numba
from sdofreport.core import spectra
from sdofreport.core.exact import exact_coefficients
from sdofreport.core.spectra import _recurrence_peaks, substep_counts
from sdofreport.runtime import configure

configure()  # as the command line does: numba's cache folder and vector width

GOAL_EXACT = 1000e6  # executed oscillator-steps/s, exact kernel (issue)
GOAL_RATIO_NUMPY = 25.0  # × the numpy loop (issue)
REPEAT = 15  # best of 15: this shared machine's speed varies from run to run


def make_record(npts=11_000, dt=0.005, seed=20240601):
    rng = np.random.default_rng(seed)
    t = np.arange(npts) * dt
    b, a = signal.butter(2, [0.1, 25.0], "bandpass", fs=1.0 / dt)
    noise = signal.lfilter(b, a, rng.standard_normal(npts))
    envelope = (t / 8.0) ** 2 * np.exp(2.0 - t / 4.0)
    ag = noise * envelope
    return 3.0 * ag / np.max(np.abs(ag)), dt


def best_of(fn, repeat=3):
    """Best wall time of ``repeat`` runs (also kept: the best thread CPU time, in CPU_BEST)."""
    best = np.inf
    best_cpu = np.inf
    out = None
    for _ in range(repeat):
        c0 = time.thread_time()
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
        best_cpu = min(best_cpu, time.thread_time() - c0)
    CPU_BEST.append(best_cpu)
    return best, out


# Best thread CPU time of each best_of call, in call order: on a shared machine it shows
# what the kernel does when it runs, while the wall time includes waiting for a core.
CPU_BEST = []


def numpy_loop(ag, dt, periods, zeta):
    coef = exact_coefficients(periods, zeta, dt)
    a11, a12, a21, a22, b1, b2, b3, b4 = coef
    u = np.zeros(periods.size)
    v = np.zeros(periods.size)
    peak = np.zeros(periods.size)
    for i in range(ag.size - 1):
        u, v = (a11 * u + a12 * v + b1 * ag[i] + b2 * ag[i + 1],
                a21 * u + a22 * v + b3 * ag[i] + b4 * ag[i + 1])
        np.maximum(peak, np.abs(u), out=peak)
    return peak


def lsim_one(ag, dt, period, zeta):
    w = 2.0 * np.pi / period
    sys_ = signal.StateSpace([[0.0, 1.0], [-w * w, -2.0 * zeta * w]], [[0.0], [-1.0]],
                             [[1.0, 0.0]], [[0.0]])
    _, y, _ = signal.lsim(sys_, ag, np.arange(ag.size) * dt, interp=True)
    return np.max(np.abs(y))


def executed_steps(ag, dt, periods, method):
    spp = spectra.DEFAULT_STEPS_PER_PERIOD[method]
    return int(np.sum(substep_counts(periods, dt, spp))) * (ag.size - 1)


def mark(ok):
    return "PASS" if ok else "MISS"


def main():
    numba = load_numba()
    numba.set_num_threads(1)
    print(f"CPU cores visible: {os.cpu_count()}; numba threads: {numba.get_num_threads()}")
    ag, dt = make_record()
    periods = spectra.default_periods(500, 0.01, 10.0)
    zeta = 0.05
    n_osc = periods.size
    record_steps = n_osc * (ag.size - 1)
    print(f"record: {ag.size} samples, dt = {dt} s; {n_osc} periods 0.01-10 s, zeta = {zeta}")

    # Warm up the JIT (and the disk cache) before timing.
    spectra.response_spectrum(ag[:200], dt, periods[:8], zeta)
    for m in spectra.SPECTRUM_METHODS:
        spectra.response_spectrum(ag[:200], dt, periods[:8], zeta, method=m)

    results = {}
    cpu = {}
    for method in spectra.SPECTRUM_METHODS:
        elapsed, _ = best_of(lambda m=method: spectra.response_spectrum(ag, dt, periods, zeta,
                                                                      method=m), repeat=REPEAT)
        results[method] = (elapsed, executed_steps(ag, dt, periods, method))
        cpu[method] = CPU_BEST[-1]

    # Exact kernel without sub-steps: the kernel alone, and how much pass 2 re-runs.
    coef = exact_coefficients(periods, zeta, dt)
    wn = 2.0 * np.pi / periods
    args = (ag, 0, dt, coef, 2.0 * zeta * wn, wn * wn, np.zeros(n_osc), np.zeros(n_osc),
            np.empty((3, n_osc)))
    rerun = _recurrence_peaks(*args)
    bare, _ = best_of(lambda: _recurrence_peaks(*args), repeat=REPEAT)
    bare_cpu = CPU_BEST[-1]

    t_numpy, _ = best_of(lambda: numpy_loop(ag, dt, periods, zeta), repeat=1)
    subset = periods[:: max(1, n_osc // 20)]
    t_lsim_sub, _ = best_of(lambda: [lsim_one(ag, dt, p, zeta) for p in subset], repeat=1)
    t_lsim = t_lsim_sub * n_osc / subset.size

    print()
    print("figure                                              value        goal      ")
    for method, (elapsed, steps) in results.items():
        rec_rate = record_steps / elapsed
        exe_rate = steps / elapsed
        print(f"{method:16s} spectrum time                     {elapsed * 1e3:9.1f} ms")
        print(f"{method:16s} record   oscillator-steps/s       {rec_rate / 1e6:9.0f} M")
        goal = "" if method != "exact" else (
            f"  >= {GOAL_EXACT / 1e6:.0f} M  {mark(exe_rate >= GOAL_EXACT)}")
        if method != "exact":
            goal = f"  (Newmark, {spectra.DEFAULT_STEPS_PER_PERIOD[method]:.0f} steps/period)"
        print(f"{method:16s} executed oscillator-steps/s       {exe_rate / 1e6:9.0f} M{goal}")
        print(f"{method:16s} executed, per CPU second          {steps / cpu[method] / 1e6:9.0f} M"
              "  (thread CPU time; information only)")
        print(f"{method:16s} sub-steps: executed/record steps  {steps / record_steps:9.2f}")
    print(f"exact kernel alone, no sub-steps                {record_steps / bare / 1e6:9.0f} M"
          f" oscillator-steps/s ({100.0 * rerun / record_steps:.2f} % re-run in pass 2;"
          f" {record_steps / bare_cpu / 1e6:.0f} M per CPU second)")
    exact_time, exact_steps = results["exact"]
    numpy_rate = record_steps / t_numpy
    lsim_rate = record_steps / t_lsim
    exe = exact_steps / exact_time
    print(f"numpy loop over time (exact recurrence)           {numpy_rate / 1e6:9.1f} M/s")
    print(f"scipy.signal.lsim per period (scaled from {subset.size})     "
          f"{lsim_rate / 1e6:9.1f} M/s")
    print(f"exact kernel (executed) / numpy loop              {exe / numpy_rate:9.1f} x"
          f"   >= {GOAL_RATIO_NUMPY:.0f} x  {mark(exe / numpy_rate >= GOAL_RATIO_NUMPY)}")
    print(f"exact kernel (executed) / lsim                    {exe / lsim_rate:9.1f} x")
    for method in ("newmark-average", "newmark-linear"):
        m_time, m_steps = results[method]
        print(f"{method:16s} (executed) / numpy loop       {m_steps / m_time / numpy_rate:9.1f} x")
    print(f"exact spectrum wall time / numpy loop wall time   {exact_time / t_numpy:9.3f}")
    print(f"exact spectrum wall time / lsim wall time         {exact_time / t_lsim:9.4f}")
    print("goal judged on: executed oscillator-steps/s of the exact kernel with default "
          "settings (sub-steps and peak refinement on).")


if __name__ == "__main__":
    main()
