"""The public functions of sdofreport.core name the same input the same way.

Source: the naming convention of DEVELOPERS.md ("Names of inputs in the core"), which
follows STYLE.md §3 and the rule "units explicit in names" of the project brief: one
name per input, the SI unit as a suffix. Common practice (no source) beyond that.
"""

from __future__ import annotations

import importlib
import inspect
import pkgutil

import pytest

import sdofreport.core

# Names another public function already spells differently, and the convention's name.
FORBIDDEN = {
    "ground_acceleration": "acceleration_m_s2",
    "acceleration": "acceleration_m_s2",
    "acc": "acceleration_m_s2",
    "ag": "acceleration_m_s2",
    "acc_h1": "acceleration_1_m_s2",
    "acc_h2": "acceleration_2_m_s2",
    "acceleration_1": "acceleration_1_m_s2",
    "acceleration_2": "acceleration_2_m_s2",
    "time_step": "time_step_s",
    "dt": "time_step_s",
    "dt_s": "time_step_s",
    "natural_period": "natural_period_s",
    "period": "natural_period_s",
    "period_s": "natural_period_s",
    "natural_periods": "natural_periods_s",
    "periods": "periods_s",
    "damping": "damping_ratio",
    "zeta": "damping_ratio",
    "alpha": "hardening_ratio",
    "initial_displacement": "initial_displacement_m",
    "initial_velocity": "initial_velocity_m_s",
    "mass": "mass_kg",
    "stiffness": "stiffness_n_m",
}

# Public functions that keep a forbidden name, each with its reason.
EXCEPTIONS = {
    # The design-spectrum functions take the keys of a [design_spectrum] section as
    # keywords (design_spectrum(kind, **parameters), en1998_1_parameters(**parameters));
    # ``damping`` there is the project-file key, written into results.json.
    ("design_spectra", "en1998_1_parameters", "damping"),
    ("design_spectra", "en1998_1_spectrum", "damping"),
    ("spectra_current", "damping_correction", "damping"),
    ("spectra_current", "en1998_1_1_parameters", "damping"),
    ("spectra_current", "en1998_1_1_spectrum", "damping"),
    ("vertical_spectra", "en1998_1_vertical_spectrum", "damping"),
}

# Numba kernels: short names by design (their docstrings map them to the convention).
KERNELS = {("biaxial", "integrate_biaxial"), ("hysteresis", "integrate_model")}


def _public_functions():
    for info in pkgutil.iter_modules(sdofreport.core.__path__):
        module = importlib.import_module(f"sdofreport.core.{info.name}")
        for name, obj in vars(module).items():
            function = getattr(obj, "py_func", obj)
            if (name.startswith("_") or not inspect.isfunction(function)
                    or function.__module__ != module.__name__):
                continue
            yield info.name, name, function


PUBLIC = sorted(_public_functions(), key=lambda item: item[:2])


def test_the_scan_finds_the_core_functions():
    # Sanity check of the scan itself: functions named in DEVELOPERS.md are found.
    names = {(module, name) for module, name, _ in PUBLIC}
    assert {("spectra", "response_spectrum"), ("rotd", "rotd_spectrum"),
            ("exact", "exact_response"), ("intensity", "arias_intensity")} <= names


@pytest.mark.parametrize("module, name, function", PUBLIC,
                         ids=[f"{m}.{n}" for m, n, _ in PUBLIC])
def test_public_parameters_follow_the_convention(module, name, function):
    if (module, name) in KERNELS:
        pytest.skip("numba kernel: short names mapped in its docstring")
    wrong = [
        f"{p} (use {FORBIDDEN[p]})"
        for p in inspect.signature(function).parameters
        if p in FORBIDDEN and (module, name, p) not in EXCEPTIONS
    ]
    assert not wrong, f"sdofreport.core.{module}.{name}: {', '.join(wrong)}"


def test_exceptions_are_still_needed():
    # An exception whose function no longer takes the name must be removed from the list.
    signatures = {(m, n): inspect.signature(f).parameters for m, n, f in PUBLIC}
    stale = [e for e in EXCEPTIONS if e[2] not in signatures.get(e[:2], {})]
    assert not stale


def test_kernel_docstrings_map_short_names():
    # DEVELOPERS.md: kernels keep ``ag``, ``dt``, ... and say what they stand for.
    for module, name in KERNELS:
        function = getattr(importlib.import_module(f"sdofreport.core.{module}"), name)
        doc = getattr(function, "py_func", function).__doc__
        assert "acceleration" in doc and "time_step_s" in doc, f"{module}.{name}"
