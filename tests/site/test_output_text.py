"""The site's JSON and CSV text: the array and row builders against value-by-value rules.

Sources of expected values:

* JSON: the Python standard library's ``json.dumps(document, indent=1,
  ensure_ascii=False, allow_nan=False)`` (what ``sdofreport.outputs.serialize.json_text``
  writes) and ``json.loads``.
* CSV: the Python standard library's ``csv.writer(..., lineterminator="\\n")`` over rows
  built value by value in this file (each ``array[i, j] * scale`` as a numpy scalar,
  then ``float``), and ``csv.reader`` to read the text back.
* Lists: the same value-by-value rule (``float``, NaN and infinities to ``None``).
"""

from __future__ import annotations

import csv
import io
import json
import math
from types import SimpleNamespace

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from sdofreport.core.spectra import ResponseSpectrum
from sdofreport.core.units import G
from sdofreport.outputs.results_json import results_document, spectra_csv
from sdofreport.outputs.serialize import (
    SPECTRUM_CSV_COLUMNS,
    array_to_list,
    json_text,
    spectrum_csv_header,
    spectrum_csv_rows,
)
from tests.conftest import EXAMPLE

#: Fixed examples, so every run checks the same documents.
PROPERTY = settings(max_examples=300, deadline=None, derandomize=True,
                    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])


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
def example_results(built_example):
    """The example's results, from the result cache of the session's shared build."""
    from sdofreport.engine import run_project
    from sdofreport.project import load_project

    return run_project(load_project(EXAMPLE / "sdofreport.toml"), jobs=1,
                       cache_dir=built_example.cache)


def test_example_results_document_reads_back_with_stdlib_json(example_results):
    # Reference: stdlib json.loads reads the text back to the same document (every
    # float bitwise, as array_to_list gave it); NaN and infinity were refused on writing.
    document = results_document(example_results)
    assert json.loads(json_text(document)) == document


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
