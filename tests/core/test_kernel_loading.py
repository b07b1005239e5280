"""Compiled kernels load numba only when one first runs (sdofreport.core._jit).

Sources of expected values: Python's own record of imported modules (``sys.modules``)
and numba's dispatcher type (``numba.core.registry.CPUDispatcher``); the numbers a
kernel returns are checked against closed forms and scipy by the other core tests.
Each check runs in a fresh interpreter, since this test process has loaded numba.
"""

from __future__ import annotations

import json
import subprocess
import sys


def _run(code: str, *args: str) -> dict:
    result = subprocess.run([sys.executable, "-c", code, *args], capture_output=True,
                            text=True, check=True)
    return json.loads(result.stdout.strip().splitlines()[-1])


_STAND_INS = """
import json, sys
import numpy as np
import sdofreport.core.inelastic_spectra, sdofreport.core.nonlinear
import sdofreport.core.spectra as spectra
from sdofreport.core import _jit

def stand_ins():
    return {f"{name}.{attribute}": id(value) for name, module in list(sys.modules.items())
            if name.startswith("sdofreport")
            for attribute, value in vars(module).items()
            if isinstance(value, _jit._Kernel)}

before = {"numba": "numba" in sys.modules, "stand_ins": stand_ins(),
          "loaded": [k.dispatcher is not None for k in _jit._PENDING]}
t = np.arange(300) * 0.01
spectra.response_spectrum(np.sin(2 * np.pi * t), 0.01, np.array([0.5, 1.0]),
                          np.array([0.05]))
import numba
dispatchers = [name for name in ("_recurrence_peaks", "_recurrence_samples")
               if isinstance(getattr(spectra, name).dispatcher,
                             numba.core.registry.CPUDispatcher)]
print(json.dumps({"before": before, "after": stand_ins(), "dispatchers": dispatchers}))
"""


def test_numba_loads_at_the_first_kernel_call_and_no_module_is_changed():
    seen = _run(_STAND_INS)
    assert seen["before"]["numba"] is False
    assert not any(seen["before"]["loaded"])
    # Kernels of several modules, including names imported from another module
    # (inelastic_spectra uses nonlinear's kernels), wait as stand-ins ...
    assert any(n.startswith("sdofreport.core.inelastic_spectra.") for n in
               seen["before"]["stand_ins"])
    # ... and after the first call the very same objects are there (no module attribute
    # is rewritten), each now forwarding to its numba dispatcher.
    assert seen["after"] == seen["before"]["stand_ins"]
    assert seen["dispatchers"] == ["_recurrence_peaks", "_recurrence_samples"]


_WARM_BUILD = """
import json, sys
from sdofreport.build import build_site
outcome = build_site(sys.argv[1], sys.argv[2], cache_dir=sys.argv[3], jobs=2)
print(json.dumps({"computed": outcome.results.cache_misses,
                  "numba": "numba" in sys.modules}))
"""


def test_a_build_with_nothing_to_compute_never_imports_numba(project_factory,
                                                              valid_project_text,
                                                              tmp_path):
    project = str(project_factory(valid_project_text))
    cache = str(tmp_path / "cache")
    cold = _run(_WARM_BUILD, project, str(tmp_path / "a"), cache)
    warm = _run(_WARM_BUILD, project, str(tmp_path / "b"), cache)
    assert cold["computed"] > 0 and cold["numba"] is True
    assert warm["computed"] == 0 and warm["numba"] is False
