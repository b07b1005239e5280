"""The site's JSON and CSV text: the fast writers against the standard library's.

Sources of expected values:

* JSON: the Python standard library's ``json.dumps(document, indent=1,
  ensure_ascii=False, allow_nan=False)`` (what ``sdofreport.jsontext.json_text`` must
  reproduce byte for byte, exceptions included) and ``json.loads``.
* CSV: the Python standard library's ``csv.writer(..., lineterminator="\\n")`` over rows
  built value by value in this file (each ``array[i, j] * scale`` as a numpy scalar,
  then ``float``), and ``csv.reader`` to read the text back.
* Lists: the same value-by-value rule (``float``, NaN and infinities to ``None``).
"""

from __future__ import annotations

import csv
import enum
import io
import json
import math
import sys
from collections import OrderedDict
from types import SimpleNamespace

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from sdofreport import jsontext
from sdofreport.core.spectra import ResponseSpectrum
from sdofreport.core.units import G
from sdofreport.jsontext import json_text
from sdofreport.results_json import results_document, spectra_csv
from sdofreport.serialize import (
    SPECTRUM_CSV_COLUMNS,
    array_to_list,
    spectrum_csv_header,
    spectrum_csv_rows,
)
from tests.conftest import EXAMPLE

#: Fixed examples, so every run checks the same documents.
PROPERTY = settings(max_examples=300, deadline=None, derandomize=True,
                    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])


def stdlib_json(document) -> str:
    """Reference: the standard library's encoder with the site's arguments."""
    return json.dumps(document, indent=1, ensure_ascii=False, allow_nan=False) + "\n"


def outcome(function, document):
    """The text, or the type and message of the exception, of ``function(document)``."""
    try:
        return function(document)
    except Exception as exc:  # noqa: BLE001 - compared with the reference's exception
        return type(exc), str(exc)


# ------------------------------------------------------------------------------ JSON

AWKWARD_FLOATS = [0.0, -0.0, 5e-324, -5e-324, 2.2250738585072014e-308, 1.7976931348623157e308,
                  -1.7976931348623157e308, 1e16, 1e-5, 1e-4, 123456789012345680.0, 0.1, 1 / 3,
                  1.0, -2.5, 1e22, 9007199254740993.0]
AWKWARD_STRINGS = ["", "plain", "quote \" and backslash \\", "tab\tnew\nline\rcr",
                   "\x00\x01\x1f\x7f", "ünïcødé — Ω ≤ 5 mm²", "emoji \U0001F600",
                   "\u2028\u2029", "lone \ud800 surrogate", "nan", "inf", "-Infinity", "null",
                   "</script>"]

json_floats = (st.floats(allow_nan=False, allow_infinity=False)
               | st.sampled_from(AWKWARD_FLOATS))
json_ints = st.integers() | st.sampled_from([0, -1, 2**63, -(2**64) - 1, 10**40])
json_text_values = st.text() | st.sampled_from(AWKWARD_STRINGS)
json_scalars = st.none() | st.booleans() | json_ints | json_floats | json_text_values
json_documents = st.recursive(
    json_scalars,
    lambda children: (st.lists(children, max_size=6)
                      | st.lists(children, max_size=4).map(tuple)
                      | st.dictionaries(json_text_values, children, max_size=6)
                      | st.lists(json_floats | st.none() | json_ints | st.booleans(),
                                 max_size=30)),
    max_leaves=60)


@PROPERTY
@given(json_documents)
def test_json_text_matches_stdlib_json(document):
    # Reference: stdlib json.dumps(indent=1, ensure_ascii=False, allow_nan=False).
    assert json_text(document) == stdlib_json(document)


@PROPERTY
@given(st.lists(json_floats, min_size=1, max_size=50),
       st.lists(json_floats, min_size=1, max_size=5))
def test_json_text_float_lists_match_stdlib_json(flat, short):
    # Reference: stdlib json.dumps; the lists the results document is made of.
    document = {"flat": flat, "nested": [flat, short, []], "mixed": [*short, None, 1, True]}
    assert json_text(document) == stdlib_json(document)
    # ...and stdlib json.loads reads back the same floats (bitwise, so -0.0 stays -0.0).
    back = json.loads(json_text(document))["flat"]
    assert [math.copysign(1.0, v) for v in back] == [math.copysign(1.0, v) for v in flat]
    assert back == flat


@pytest.mark.parametrize("document", [
    {}, [], (), "", 0, -0.0, 1.5, True, False, None, "text ü", {"a": {}}, {"a": []},
    [[], {}, [[]], [{}]], {"": None}, [None, None], [True, False, 0, 1], (1.0, (2.0,)),
    {"k": AWKWARD_FLOATS}, {s: s for s in AWKWARD_STRINGS}, [AWKWARD_STRINGS, AWKWARD_FLOATS],
])
def test_json_text_matches_stdlib_json_on_edge_documents(document):
    # Reference: stdlib json.dumps(indent=1, ensure_ascii=False, allow_nan=False).
    assert json_text(document) == stdlib_json(document)


@pytest.mark.parametrize("bad", [math.nan, math.inf, -math.inf])
@pytest.mark.parametrize("where", [
    lambda x: x,
    lambda x: [x],
    lambda x: [1.0, 2.0, x, 3.0],
    lambda x: {"a": [None, 1, x]},
    lambda x: {"a": {"b": [[0.5], [x]]}},
    lambda x: ["text", x],
])
def test_json_text_refuses_nan_and_infinity_like_stdlib_json(bad, where):
    # Reference: stdlib json.dumps(allow_nan=False) raises ValueError; same message.
    document = where(bad)
    with pytest.raises(ValueError):
        stdlib_json(document)
    assert outcome(json_text, document) == outcome(stdlib_json, document)


class Level(enum.IntEnum):
    LOW = 1


class Ratio(float):
    def __repr__(self):
        return "Ratio()"


class Label(str):
    pass


def _circular_list():
    items = [1.0]
    items.append(items)
    return items


def _circular_dict():
    mapping = {"a": 1.0}
    mapping["self"] = mapping
    return mapping


def _deep(depth):
    document = []
    for _ in range(depth):
        document = [document]
    return document


@pytest.mark.parametrize("document", [
    np.float64(1.25), [np.float64(0.1), 2.0], {"a": np.float32(0.5)}, [np.int64(3)],
    {1: "int key"}, {1.5: "float key"}, {True: "bool key"}, {None: "none key"},
    {(1, 2): "tuple key"}, [Level.LOW], {"r": Ratio(0.5)}, [Label("x")], {Label("k"): 1},
    OrderedDict(a=1.0), {"a": OrderedDict(b=[1.0])}, [{1, 2}], [b"bytes"], [object()],
    _circular_list(), _circular_dict(), [float("nan"), np.float64(1.0)],
    _deep(sys.getrecursionlimit() + 10), _deep(100),
], ids=lambda d: type(d).__name__)
def test_json_text_hands_unexpected_documents_to_stdlib_json(document):
    # Reference: stdlib json.dumps with the same arguments (result or exception).
    assert outcome(json_text, document) == outcome(stdlib_json, document)


def test_json_text_writes_deep_documents_stdlib_json_can_write():
    # Reference: stdlib json.dumps, which writes this nesting (deeper than the fast path
    # can go within the recursion limit) as text.
    document = _deep(sys.getrecursionlimit() * 3 // 4)
    expected = stdlib_json(document)
    assert json_text(document) == expected


def test_json_text_plain_documents_do_not_need_stdlib_json(monkeypatch):
    # The fast path alone must write a plain document (floats, ints, None, bools, str and
    # strings that merely spell nan/inf): compare with stdlib json.dumps taken beforehand.
    document = {"spectra": [[0.1, 2e-7, -0.0, 5e-324], [1.0, None, 3, True]],
                "words": ["nan", "inf", "Infinity", "null"], "empty": [[], {}], "n": 1}
    expected = stdlib_json(document)

    def refuse(*args, **kwargs):
        raise AssertionError("json.dumps should not be needed")

    monkeypatch.setattr(jsontext.json, "dumps", refuse)
    assert json_text(document) == expected


# ------------------------------------------------------------------------------ lists

def reference_array_to_list(values, scale=1.0):
    """Value by value: ``float`` of each element times ``scale``; non-finite to None."""
    arr = np.asarray(values, dtype=float) * scale
    if arr.ndim == 1:
        return [float(v) if math.isfinite(float(v)) else None for v in arr]
    return [reference_array_to_list(row) for row in arr]


def _bitwise(nested):
    """Floats as (type, hex) so that -0.0 and 0.0 differ; None stays None."""
    if isinstance(nested, list):
        return [_bitwise(v) for v in nested]
    return nested if nested is None else (type(nested), float.hex(nested))


SPECIAL = np.array([0.0, -0.0, 5e-324, -1e-310, 1e308, -1e308, np.nan, np.inf, -np.inf, 0.1])


@pytest.mark.parametrize("values", [
    SPECIAL, SPECIAL.reshape(2, 5), SPECIAL.reshape(5, 1, 2), np.array([]), np.zeros((0, 3)),
    np.zeros((3, 0)), [1, 2, 3], [[1.5, np.nan], [np.inf, 2.0]], np.arange(12, dtype=np.float32),
    np.geomspace(1e-3, 1e3, 40),
], ids=lambda v: str(np.shape(v)))
@pytest.mark.parametrize("scale", [1.0, 1.0 / G, -2.5, 1e308])
def test_array_to_list_matches_value_by_value(values, scale):
    # Reference: the value-by-value rule above (float(), NaN/inf -> None).
    with np.errstate(over="ignore", invalid="ignore"):
        expected = reference_array_to_list(values, scale)
        assert _bitwise(array_to_list(values, scale)) == _bitwise(expected)


# ------------------------------------------------------------------------------ CSV

def reference_rows(spectrum, prefix=()):
    """Value by value: one row per (damping, period), ``float(array[i, j] * scale)``."""
    rows = []
    for i, zeta in enumerate(spectrum.damping):
        for j, period in enumerate(spectrum.periods_s):
            rows.append([*prefix, float(zeta), float(period),
                         *(float(getattr(spectrum, attr)[i, j] * scale)
                           for _, attr, scale in SPECTRUM_CSV_COLUMNS)])
    return rows


def stdlib_csv(rows) -> str:
    """Reference: the standard library's ``csv.writer`` with ``\\n`` line ends."""
    buffer = io.StringIO()
    csv.writer(buffer, lineterminator="\n").writerows(rows)
    return buffer.getvalue()


def make_spectrum(seed, n_damping=3, n_periods=7, special=True, dtype=np.float64):
    rng = np.random.default_rng(seed)
    arrays = [rng.lognormal(0.0, 3.0, (n_damping, n_periods)).astype(dtype) for _ in range(5)]
    if special and n_damping * n_periods >= len(SPECIAL):
        for k, values in enumerate(arrays):
            flat = values.reshape(-1)
            with np.errstate(over="ignore"):  # +-1e308 become +-inf in float32
                flat[:len(SPECIAL)] = np.roll(SPECIAL, k).astype(dtype)
    return ResponseSpectrum(
        periods_s=np.concatenate(([0.0], np.geomspace(0.01, 10.0, n_periods - 1)))
        .astype(dtype) if n_periods else np.zeros(0, dtype),
        damping=np.linspace(0.0, 0.2, n_damping).astype(dtype),
        sd_m=arrays[0], sv_m_s=arrays[1], psv_m_s=arrays[2], psa_m_s2=arrays[3],
        sa_m_s2=arrays[4], method="exact", pga_m_s2=1.0)


def _row_bits(rows):
    return [[v if isinstance(v, str) else (type(v), float.hex(v)) for v in row] for row in rows]


@pytest.mark.parametrize("shape", [(3, 7), (1, 1), (1, 12), (4, 3), (0, 5), (2, 0)])
@pytest.mark.parametrize("prefix", [(), ("rec-1",)])
def test_spectrum_csv_rows_match_value_by_value(shape, prefix):
    # Reference: rows built value by value (above), compared bitwise and as stdlib csv text.
    spectrum = make_spectrum(sum(shape), *shape)
    with np.errstate(over="ignore", invalid="ignore"):
        expected = reference_rows(spectrum, prefix)
        rows = spectrum_csv_rows(spectrum, prefix)
    assert _row_bits(rows) == _row_bits(expected)
    assert stdlib_csv(rows) == stdlib_csv(expected)


@pytest.mark.parametrize("variant", ["float32", "lists", "wrong shape"])
def test_spectrum_csv_rows_other_inputs_match_value_by_value(variant):
    # Reference: rows built value by value; these inputs take the element-wise path.
    spectrum = make_spectrum(5, dtype=np.float32 if variant == "float32" else np.float64)
    if variant == "lists":
        spectrum = SimpleNamespace(**{**vars(spectrum), "damping": [0.02, 0.05, 0.1],
                                      "periods_s": spectrum.periods_s.tolist()})
    if variant == "wrong shape":
        spectrum = SimpleNamespace(**{**vars(spectrum), "periods_s": spectrum.periods_s[:4]})
    with np.errstate(over="ignore", invalid="ignore"):
        assert _row_bits(spectrum_csv_rows(spectrum)) == _row_bits(reference_rows(spectrum))


AWKWARD_IDS = ["plain", "with,comma", 'with "quote"', "line\nbreak", "cr\rhere", " lead",
               "ünï — Ω", "", "'single'", "tab\there"]


def _results(spectra, ids):
    return SimpleNamespace(records=[SimpleNamespace(spectrum=s, record=SimpleNamespace(id=i))
                                    for s, i in zip(spectra, ids)])


def reference_spectra_csv(results) -> str:
    rows = [spectrum_csv_header(("record",))]
    for item in results.records:
        rows.extend(reference_rows(item.spectrum, (item.record.id,)))
    return stdlib_csv(rows)


def test_spectra_csv_matches_stdlib_csv_writer():
    # Reference: stdlib csv.writer over value-by-value rows; awkward ids need quoting.
    spectra = [make_spectrum(seed, *shape) for seed, shape in enumerate(
        [(3, 7), (1, 1), (2, 5), (0, 4), (3, 0), (4, 6), (1, 12), (2, 2), (3, 3), (5, 2)])]
    spectra[7] = make_spectrum(99, 2, 2, dtype=np.float32)
    results = _results(spectra, AWKWARD_IDS)
    with np.errstate(over="ignore", invalid="ignore"):
        text = spectra_csv(results)
        assert text == reference_spectra_csv(results)
    # ...and stdlib csv.reader gives the ids back with one row per (record, damping, period).
    read = list(csv.reader(io.StringIO(text)))
    assert read[0] == ["record", "damping", "period_s", "sd_m", "sv_m_s", "psv_m_s", "psa_g",
                       "sa_g"]
    expected_ids = [i for s, i in zip(spectra, AWKWARD_IDS)
                    for _ in range(s.damping.size * s.periods_s.size)]
    assert [row[0] for row in read[1:]] == expected_ids


@PROPERTY
@given(st.lists(st.floats(allow_nan=True, allow_infinity=True), min_size=10, max_size=10),
       st.text(max_size=8))
def test_spectra_csv_matches_stdlib_csv_writer_on_any_floats(values, record_id):
    # Reference: stdlib csv.writer over value-by-value rows.
    arrays = [np.array(values[k:] + values[:k]).reshape(2, 5) for k in range(5)]
    spectrum = ResponseSpectrum(periods_s=np.array(values[:5]), damping=np.array(values[5:7]),
                                sd_m=arrays[0], sv_m_s=arrays[1], psv_m_s=arrays[2],
                                psa_m_s2=arrays[3], sa_m_s2=arrays[4], method="exact",
                                pga_m_s2=1.0)
    results = _results([spectrum], [record_id])
    with np.errstate(over="ignore", invalid="ignore"):
        assert spectra_csv(results) == reference_spectra_csv(results)


# ------------------------------------------------------------------------------ example

@pytest.fixture(scope="module")
def example_results():
    from sdofreport.engine import run_project
    from sdofreport.project import load_project

    return run_project(load_project(EXAMPLE / "sdofreport.toml"), jobs=1, use_cache=False)


def test_example_results_document_text_matches_stdlib_json(example_results):
    # Reference: stdlib json.dumps(indent=1, ensure_ascii=False, allow_nan=False).
    document = results_document(example_results)
    assert json_text(document) == stdlib_json(document)


def test_example_spectra_csv_matches_stdlib_csv_writer(example_results):
    # Reference: stdlib csv.writer over value-by-value rows.
    assert spectra_csv(example_results) == reference_spectra_csv(example_results)


def test_one_number_style_with_a_stated_rule_for_tiny_values():
    """sdofreport.site.display.number: plain decimals to 4 significant figures, never
    an exponent; the stated rule for magnitudes below 0.0001 (our own rule, common
    practice for report tables, no source)."""
    import numpy as np

    from sdofreport.site.display import TINY, number

    assert number(21.74) == "21.74"
    assert number(4.753e-06) == "< 0.0001"
    assert number(-4.753e-06) == "> −0.0001"
    assert number(TINY) == "0.0001000"
    assert number(0.0) == "0"
    assert number(1234567.8) == "1\u2009234\u2009568"
    for value in np.geomspace(1e-12, 1e12, 97):
        for signed in (value, -value):
            text = number(float(signed))
            assert "e" not in text.lower(), text
            if abs(signed) >= TINY:
                # Read back, the text is the value to 4 significant figures.
                back = float(text.replace("\u2009", ""))
                assert back == pytest.approx(signed, rel=5e-4), text
