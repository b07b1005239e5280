"""Cache entry format: time to write and read one job output, pickle against the typed
entry (sdofreport.engine.cache), and the time to convert the unit strings of a project with and
without the memo.

Prints figures and ratios; asserts nothing. Run: python benchmarks/cache_format.py
"""

from __future__ import annotations

import pickle
import time

import numpy as np

from sdofreport.engine import cache
from sdofreport.engine.jobs import record_job, responses_job


def _best(function, repeat: int = 20) -> float:
    best = float("inf")
    for _ in range(repeat):
        started = time.perf_counter()
        function()
        best = min(best, time.perf_counter() - started)
    return best


def main() -> None:
    rng = np.random.default_rng(1)
    acceleration = rng.standard_normal(4000) * 0.5
    outputs = {
        "record job (4000 steps, 100 periods x 3 dampings)": record_job(
            acceleration, 0.01, np.geomspace(0.05, 4.0, 100), np.array([0.02, 0.05, 0.1]),
            "exact"),
        "responses job (4000 steps, 20 systems)": responses_job(
            acceleration, 0.01, [{"model": "linear", "period_s": 0.1 + 0.1 * i,
                                  "damping": 0.05} for i in range(20)], "exact"),
    }
    key = "0" * 64
    for name, value in outputs.items():
        data = cache.pack_entry(key, value)
        pickled = pickle.dumps(value, protocol=pickle.HIGHEST_PROTOCOL)
        write_entry = _best(lambda value=value: cache.pack_entry(key, value))
        read_entry = _best(lambda data=data: cache.unpack_entry(bytearray(data), key))
        write_pickle = _best(lambda value=value: pickle.dumps(
            value, protocol=pickle.HIGHEST_PROTOCOL))
        read_pickle = _best(lambda pickled=pickled: pickle.loads(pickled))
        print(f"{name}: {len(data) / 1e3:.0f} kB entry, {len(pickled) / 1e3:.0f} kB pickle")
        print(f"  write {write_entry * 1e3:.2f} ms (pickle {write_pickle * 1e3:.2f} ms, "
              f"ratio {write_entry / write_pickle:.2f})")
        print(f"  read  {read_entry * 1e3:.2f} ms (pickle {read_pickle * 1e3:.2f} ms, "
              f"ratio {read_entry / read_pickle:.2f})")
    started = time.perf_counter()
    cache.code_fingerprint()
    print(f"source fingerprint, once per process: {(time.perf_counter() - started) * 1e3:.1f} ms")


if __name__ == "__main__":
    main()
