"""Importing sdofreport has no side effects; set-up is one explicit call
(sdofreport.runtime.configure).

Sources of expected values: the process environment (``os.environ``) and the file
system as Python sees them (``os.walk``) before and after; numba's cache files
(``*.nbi`` index, ``*.nbc`` data, numba documentation "Cache sharing"); the displacement
of a damped oscillator under a sine from ``scipy.signal.lsim`` (state-space solution of
u'' + 2ζωu' + ω²u = −a_g). Each check runs in a fresh interpreter with an empty HOME
and cache root, since this test process has loaded and configured numba already.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import numpy as np
from scipy import signal

ROOT = Path(__file__).resolve().parents[1]

_PROBE = r"""
import importlib, json, os, pkgutil, sys
before_env = dict(os.environ)
before_modules = set(sys.modules)
import sdofreport
failed = {}
names = sorted(info.name for info in pkgutil.walk_packages(sdofreport.__path__,
                                                           "sdofreport."))
for name in names:
    try:
        importlib.import_module(name)
    except ImportError as exc:  # an optional dependency that is not installed
        failed[name] = str(exc)
imported_env = dict(os.environ)
result = {"modules": names, "failed": failed,
          "env_after_import": {k: v for k, v in imported_env.items()
                               if before_env.get(k) != v},
          "numba_imported": "numba" in sys.modules}
if sys.argv[1] == "kernel":
    import numpy as np
    from sdofreport.core import spectra
    kernel = spectra._recurrence_peaks
    t = np.arange(2000) * 0.01
    ag = np.sin(2.0 * np.pi * 1.3 * t)
    sd = spectra.response_spectrum(ag, 0.01, np.array([1.0]), np.array([0.05])).sd_m
    result["sd_m"] = float(sd[0, 0])
    result["same_object"] = spectra._recurrence_peaks is kernel
    result["env_after_kernel"] = {k: v for k, v in os.environ.items()
                                  if before_env.get(k) != v}
elif sys.argv[1] == "configure":
    from sdofreport.runtime import configure
    from sdofreport.core import spectra
    configure()
    import numpy as np
    spectra.response_spectrum(np.sin(np.arange(300) * 0.1), 0.01, np.array([0.5]),
                              np.array([0.05]))
    result["env_after_configure"] = {k: v for k, v in os.environ.items()
                                     if before_env.get(k) != v}
print(json.dumps(result))
"""


def _fresh(tmp_path, mode: str) -> tuple[dict, list[str]]:
    """Run the probe in ``mode`` in a new interpreter whose HOME, cache root and working
    folder are empty folders under ``tmp_path``; its report and every path it left."""
    home, caches, work = (tmp_path / n for n in ("home", "caches", "work"))
    for folder in (home, caches, work):
        folder.mkdir()
    env = {k: v for k, v in os.environ.items()
           if not k.startswith(("NUMBA_", "SDOFREPORT_"))}
    env.update(HOME=str(home), XDG_CACHE_HOME=str(caches), PYTHONDONTWRITEBYTECODE="1",
               PYTHONPATH=str(ROOT), TMPDIR=str(work))
    result = subprocess.run([sys.executable, "-c", _PROBE, mode], cwd=work, env=env,
                            capture_output=True, text=True, check=True)
    left = sorted(str(Path(d, f).relative_to(tmp_path)) for base in (home, caches, work)
                  for d, dirs, files in os.walk(base) for f in [*dirs, *files])
    return json.loads(result.stdout.strip().splitlines()[-1]), left


def test_importing_every_module_sets_nothing_and_creates_nothing(tmp_path):
    seen, left = _fresh(tmp_path, "import")
    assert len(seen["modules"]) > 50 and "sdofreport.core.spectra" in seen["modules"]
    assert seen["failed"] == {}
    assert seen["env_after_import"] == {}
    assert left == []
    assert seen["numba_imported"] is False  # kernels load numba when one first runs


def test_a_kernel_without_configure_is_right_and_leaves_no_trace(tmp_path):
    seen, left = _fresh(tmp_path, "kernel")
    # No environment variable (NUMBA_CACHE_DIR, NUMBA_CPU_FEATURES), no cache folder,
    # no module attribute replaced.
    assert seen["env_after_kernel"] == {}
    assert left == []
    assert seen["same_object"] is True
    # The number itself: peak |u| of the oscillator (T = 1 s, ζ = 0.05) under the sine,
    # by scipy.signal.lsim on the state-space form (independent of our kernels).
    wn, zeta = 2.0 * np.pi, 0.05
    t = np.arange(2000) * 0.01
    system = signal.StateSpace([[0.0, 1.0], [-wn * wn, -2.0 * zeta * wn]], [[0.0], [-1.0]],
                               [[1.0, 0.0]], [[0.0]])
    _, u, _ = signal.lsim(system, np.sin(2.0 * np.pi * 1.3 * t), t)
    # lsim holds the input linear between samples, as the exact method does; the
    # kernel also finds the peak between samples, so it may only be larger, slightly.
    assert np.max(np.abs(u)) <= seen["sd_m"] <= np.max(np.abs(u)) * 1.001


def test_configure_chooses_a_private_cache_folder_that_the_kernels_use(tmp_path):
    seen, left = _fresh(tmp_path, "configure")
    folder = seen["env_after_configure"]["NUMBA_CACHE_DIR"]
    assert folder == os.path.realpath(tmp_path / "caches" / "sdofreport" / "numba")
    assert os.stat(folder).st_mode & 0o077 == 0  # only its owner may enter it
    # numba's index (.nbi) and machine code (.nbc) of the kernels that ran
    assert any(name.endswith(".nbi") for name in left)
    assert any(name.endswith(".nbc") for name in left)
    assert all(name.startswith("caches") for name in left)
