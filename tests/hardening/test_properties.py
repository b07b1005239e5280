"""Property-based checks of the integrators and of the two input readers.

Integrators: a linear oscillator at rest is a linear, time-invariant system, so its
peaks scale with the excitation and do not change when the record is delayed by zeros.
Readers: any bytes or TOML-like text gives a Record/Project or the user error, never
another exception.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from sdofreport.core.spectra import SPECTRUM_METHODS, oscillator_histories, oscillator_peaks
from sdofreport.errors import ProjectError, RecordError
from sdofreport.project import load_project
from sdofreport.project.model import Project
from sdofreport.project.schema import SECTIONS, TOP_LEVEL
from sdofreport.records import RECORD_FORMATS, Record, read_record
from tests.conftest import write_test_records

FAST = settings(max_examples=40, deadline=None,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])

# ------------------------------------------------------------------ integrators

_amplitudes = st.floats(-5.0, 5.0, allow_nan=False, allow_infinity=False)
records = st.lists(_amplitudes, min_size=4, max_size=120).map(np.array)
time_steps = st.sampled_from([0.005, 0.01, 0.02])
periods = st.lists(st.sampled_from([0.0, 0.05, 0.2, 0.5, 1.0, 3.0]), min_size=1, max_size=3,
                   unique=True)
dampings = st.sampled_from([0.0, 0.02, 0.05, 0.2])
methods = st.sampled_from(SPECTRUM_METHODS)


def _peak_rows(peaks):
    return np.array([peaks.displacement_m, peaks.velocity_m_s,
                     peaks.total_acceleration_m_s2])


@FAST
@given(acc=records, dt=time_steps, periods_s=periods, zeta=dampings, method=methods,
       factor=st.floats(-50.0, 50.0).filter(lambda c: abs(c) > 1e-3))
def test_peaks_scale_with_the_record(acc, dt, periods_s, zeta, method, factor):
    base = _peak_rows(oscillator_peaks(acc, dt, periods_s, zeta, method))
    scaled = _peak_rows(oscillator_peaks(factor * acc, dt, periods_s, zeta, method))
    # Closed form: the equation of motion is linear with zero initial conditions, so the
    # response to c·a is c times the response to a and every |peak| scales by |c|
    # (homogeneity). Tolerance: round-off of a few thousand operations, relative to the
    # largest peak of the row.
    scale = np.max(np.abs(base), axis=1, keepdims=True) + 1e-300
    np.testing.assert_allclose(scaled / scale, abs(factor) * base / scale, rtol=1e-9,
                               atol=1e-9 * abs(factor))


@FAST
@given(a=records, seed=st.integers(0, 2 ** 16), dt=time_steps, periods_s=periods,
       zeta=dampings, method=methods)
def test_histories_superpose(a, seed, dt, periods_s, zeta, method):
    b = np.random.default_rng(seed).normal(size=a.size)
    ha = oscillator_histories(a, dt, periods_s, zeta, method)
    hb = oscillator_histories(b, dt, periods_s, zeta, method)
    hab = oscillator_histories(a + b, dt, periods_s, zeta, method)
    # Closed form: superposition, response(a + b) = response(a) + response(b) for a
    # linear system at rest. Tolerance: round-off relative to the largest sample.
    for name in ("displacement_m", "velocity_m_s", "total_acceleration_m_s2"):
        left, right = getattr(hab, name), getattr(ha, name) + getattr(hb, name)
        size = np.max(np.abs(right)) + np.max(np.abs(left)) + 1e-300
        assert np.max(np.abs(left - right)) <= 1e-9 * size, name


@FAST
@given(acc=records, pad=st.integers(1, 200), dt=time_steps, periods_s=periods,
       zeta=dampings, method=methods)
def test_leading_zeros_do_not_change_peaks(acc, pad, dt, periods_s, zeta, method):
    # The excitation is linear between samples, so the delayed record equals the
    # original only if the original starts from rest: a[0] = 0 (otherwise the padded
    # record ramps up to a[0] over one step where the original jumps to it).
    acc = np.concatenate([[0.0], acc])
    padded = np.concatenate([np.zeros(pad), acc])
    base = _peak_rows(oscillator_peaks(acc, dt, periods_s, zeta, method))
    delayed = _peak_rows(oscillator_peaks(padded, dt, periods_s, zeta, method))
    # Closed form: time invariance — an oscillator at rest under zero excitation stays
    # exactly at rest, so a delay by whole steps only shifts the response. Tolerance:
    # round-off only (the same recurrence runs on the same numbers).
    np.testing.assert_allclose(delayed, base, rtol=1e-12, atol=1e-300)


# ------------------------------------------------------------------ record reader

_PIECES = st.sampled_from([
    "0.01", "-0.0125", "0.0250", "1.5E-02", "1.0D-02", "1e400", "-1e308", "nan", "Inf",
    "NPTS=", "DT=", "NPTS", "DT", " 20", " 0.01", "SEC", ",", ";", " ", "\t", "\n", "\r\n",
    "\r", "#", "time_s,accel_g", "abc", "\x00", "é", "\ufeff", "-", "+", ".", "E",
])


def _mostly_two_column(draw_rows, corrupt):
    """Text of a two-column file with some rows replaced by faulty ones."""
    lines = [f"{k * 0.01:.4f},{v:.4f}" for k, v in enumerate(draw_rows)]
    for index, bad in corrupt:
        if lines:
            lines[index % len(lines)] = bad
    return "\n".join(lines) + "\n"


def _check_read(folder, data: bytes, file_format: str, units, dt_s) -> None:
    path = folder / "fuzz-record.txt"
    path.write_bytes(data)
    try:
        record = read_record(path, file_format=file_format, units=units, dt_s=dt_s)
    except RecordError as exc:
        # Project rule: a record problem names the file.
        assert exc.exit_code == 2 and str(path) in exc.format_message()
        assert "{" not in exc.format_message().split(str(path))[0]  # no unfilled fields
    else:
        assert isinstance(record, Record)
        assert record.npts >= 16 and record.dt_s > 0
        assert np.all(np.isfinite(record.acceleration_m_s2))


@pytest.fixture(scope="module")
def scratch(tmp_path_factory):
    return tmp_path_factory.mktemp("properties")


@settings(max_examples=120, deadline=None, suppress_health_check=list(HealthCheck))
@given(data=st.one_of(st.binary(max_size=600),
                      st.lists(_PIECES, max_size=150).map(lambda p: "".join(p).encode())),
       file_format=st.sampled_from(RECORD_FORMATS),
       units=st.sampled_from([None, "g", "cm/s2", "ft/s2", "furlongs"]),
       dt_s=st.sampled_from([None, 0.01, 0.0, -1.0, float("nan"), 1e-300, 1e300]))
def test_read_record_arbitrary_bytes(scratch, data, file_format, units, dt_s):
    _check_read(scratch, data, file_format, units, dt_s)


@settings(max_examples=80, deadline=None, suppress_health_check=list(HealthCheck))
@given(rows=st.lists(st.floats(-2, 2, allow_nan=False).map(lambda v: round(v, 4)),
                     min_size=10, max_size=60),
       corrupt=st.lists(st.tuples(st.integers(0, 10 ** 6), st.sampled_from(
           ["", "0.5,", "0,01;0,02", "1,2,3", "x,y", "0.0100,nan", "0.0000,0.1",
            "NPTS= 20, DT= 0.01", "9.0,1e400"])), max_size=4),
       file_format=st.sampled_from(RECORD_FORMATS))
def test_read_record_damaged_two_column(scratch, rows, corrupt, file_format):
    text = _mostly_two_column(rows, corrupt)
    _check_read(scratch, text.encode(), file_format, None, None)


# ------------------------------------------------------------------ project loader

_QUANTITIES = ["100 t", "5 furlongs", "3000 kg", "0 s", "-0.5 s", "1e400 kg", "0.35 g", "g",
               "4.2 MN/m", "nan s", "1/0 s", "kg**kg", "", " ", "26 kip/in", "18 ft",
               "1e-300 s", "10 ** 400 m", "mass", "%", "0.5"]
_FILES = ["records/r1.csv", "records/r2.txt", "records", "nope.csv", "../outside.csv",
          "", "sdofreport.toml", "/dev/null", "records/r1.csv/x"]

_scalars = st.one_of(
    st.integers(-10 ** 6, 10 ** 6), st.integers(-2 ** 63, 2 ** 63 - 1),
    st.floats(allow_nan=True, allow_infinity=True), st.booleans(),
    st.text(st.characters(min_codepoint=32, max_codepoint=0x2FF,
                          blacklist_characters='"\\\x7f'), max_size=12),
    st.sampled_from(_QUANTITIES + _FILES),
)
_values = st.recursive(_scalars, lambda inner: st.one_of(
    st.lists(inner, max_size=4),
    st.dictionaries(st.sampled_from(["k", "series", "parallel", "min", "max", "count",
                                     "x"]), inner, max_size=3)), max_leaves=5)


def _table(section: str):
    keys = list(SECTIONS[section]) + ["unknown_key"]
    return st.dictionaries(st.sampled_from(keys), _values, max_size=len(keys))


def _entry(section: str):
    extra = {"file": st.sampled_from(_FILES), "id": st.sampled_from(["r1", "r2", "s1", "",
                                                                      "bad id", "r1"])}
    return _table(section).flatmap(lambda table: st.fixed_dictionaries(
        {k: v for k, v in extra.items() if k in SECTIONS[section]}).map(
        lambda fixed: {**fixed, **table}))


def _systems():
    limits = _table("systems[].limits")
    return _entry("systems[]").flatmap(
        lambda table: st.one_of(st.just(table), limits.map(
            lambda lim: {**table, "limits": lim})))


documents = st.fixed_dictionaries({}, optional={
    **{name: _table(name) for name in TOP_LEVEL if name in SECTIONS},
    "records": st.lists(_entry("records[]"), max_size=3),
    "systems": st.lists(_systems(), max_size=3),
    "unknown_section": _values,
})


def _toml_value(value) -> str:
    """Inline TOML for one value (a small writer: tomllib only reads)."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if math.isnan(value):
            return "nan"
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
        return repr(value)
    if isinstance(value, str):
        return json.dumps(value, ensure_ascii=False)
    if isinstance(value, list):
        return "[" + ", ".join(_toml_value(v) for v in value) + "]"
    return "{" + ", ".join(f"{json.dumps(k)} = {_toml_value(v)}" for k, v in
                           value.items()) + "}"


def _toml(document: dict) -> str:
    return "".join(f"{key} = {_toml_value(value)}\n" for key, value in document.items())


def _good_document() -> dict:
    """The valid project of tests/conftest.py as a dict (mutated below)."""
    return {
        "project": {"title": "Test project", "reference": "T-1", "revision": "0",
                    "prepared_by": "tester"},
        "records": [{"id": "r1", "file": "records/r1.csv"},
                    {"id": "r2", "file": "records/r2.txt"}],
        "systems": [{"id": "s1", "name": "System one", "damping": 0.05, "mass": "100 t",
                     "period": "0.5 s", "height": "4 m",
                     "limits": {"displacement": "50 mm"}}],
    }


# Where a mutation lands: (place in the document, schema section of its keys).
_PLACES = [("project", "project"), ("analysis", "analysis"), ("processing", "processing"),
           ("records.0", "records[]"), ("records.1", "records[]"), ("systems.0", "systems[]"),
           ("systems.0.limits", "systems[].limits")] + [
    (name, name) for name in ("design_spectrum", "scaling", "inelastic_spectra")
    if name in SECTIONS]
_PLAUSIBLE = st.sampled_from(["0.5 s", "2 s", "100 t", "4.2 MN/m", "50 mm", "0.3 g", 0.05,
                              0.5, 2, 5000, "H1", "H2", "p1", "springs", "columns",
                              "hanging", "sliding-pendulum", "static-deflection", "fixed",
                              "asce7-16", "en1998-1", "table", [0.1, 1.0], [1, 2, 3],
                              {"series": [{"k": "1 MN/m"}, {"k": "2 MN/m"}]},
                              {"parallel": []}, {"k": "3000 kg"}, "200 GPa"])


@st.composite
def mutated_documents(draw):
    """The good document with one to three keys set to odd or plausible values."""
    document = _good_document()
    for _ in range(draw(st.integers(1, 3))):
        place, section = draw(st.sampled_from(_PLACES))
        key = draw(st.sampled_from(list(SECTIONS[section])))
        value = draw(st.one_of(_PLAUSIBLE, _values))
        node = document
        for part in place.split("."):
            if isinstance(node, list) and part.isdigit() and int(part) < len(node):
                node = node[int(part)]
            elif isinstance(node, dict):
                node = node.setdefault(part, {})
            else:  # an earlier mutation replaced this table by a value: nothing to set
                node = None
                break
        if isinstance(node, dict):
            node[key] = value
    return document


_TOML_PIECES = st.sampled_from([
    "[project]\n", "[analysis]\n", "[[records]]\n", "[[systems]]\n", "[systems.limits]\n",
    'title = "t"\n', 'reference = "r"\n', 'revision = "0"\n', 'prepared_by = "p"\n',
    'id = "r1"\n', 'id = "s1"\n', 'file = "records/r1.csv"\n', 'name = "n"\n',
    "damping = 0.05\n", 'mass = "100 t"\n', 'period = "0.5 s"\n', 'mass = "5 furlongs"\n',
    "damping = nan\n", "mass = 1e400\n", "periods = [0.1, 0]\n", "= ", '"', "'", "[", "]",
    "{", "}", ",", "\n", "#", "é", "\x00", '"""', "kind = \"springs\"\n",
    "network = 5\n", "network = { series = [] }\n", 'stiffness = "3000 kg"\n',
])


@pytest.fixture(scope="module")
def project_folder(tmp_path_factory):
    folder = tmp_path_factory.mktemp("properties-project")
    write_test_records(folder)
    return folder


def _check_load(folder, data: bytes) -> None:
    path = folder / "fuzz.toml"
    path.write_bytes(data)
    try:
        project = load_project(path)
    except ProjectError as exc:
        # Project rule: one message that names the project file.
        assert exc.exit_code == 2 and "fuzz.toml" in exc.format_message()
    else:
        assert isinstance(project, Project)


# Fewer examples: drawing these nested documents costs more than loading them.
@settings(max_examples=50, deadline=None, suppress_health_check=list(HealthCheck))
@given(document=documents)
def test_load_project_structured_documents(project_folder, document):
    _check_load(project_folder, _toml(document).encode("utf-8"))


@settings(max_examples=150, deadline=None, suppress_health_check=list(HealthCheck))
@given(document=mutated_documents())
def test_load_project_mutated_good_document(project_folder, document):
    _check_load(project_folder, _toml(document).encode("utf-8"))


@settings(max_examples=100, deadline=None, suppress_health_check=list(HealthCheck))
@given(data=st.one_of(st.lists(_TOML_PIECES, max_size=60).map(
    lambda pieces: "".join(pieces).encode("utf-8")), st.binary(max_size=300)))
def test_load_project_toml_like_text(project_folder, data):
    _check_load(project_folder, data)
