"""The Record type and record_from_array."""

import hashlib

import numpy as np
import pytest

from sdofreport.records import Record, record_from_array

G = 9.80665  # standard gravity [m/s²], ISO 80000-3


def test_record_from_array_converts_units_and_hashes_values():
    values = [0.0, 0.5, -0.25] + [0.0] * 13
    record = record_from_array(values, 0.02, units="g", record_id="synthetic")
    # Closed form: 0.5 g = 0.5 × 9.80665 m/s².
    assert record.acceleration_m_s2[1] == pytest.approx(0.5 * G, rel=1e-15)
    # Independent reference: hashlib over the float64 bytes of the values as given.
    expected = hashlib.sha256(np.array(values, dtype=np.float64).tobytes()).hexdigest()
    assert record.sha256 == expected
    assert record.units == "g" and record.file_format == "array" and record.id == "synthetic"


def test_record_geometry():
    record = record_from_array(np.zeros(101), 0.005)
    # Closed form: 101 samples at 0.005 s span 0.5 s.
    assert record.npts == 101
    assert record.duration_s == pytest.approx(0.5)
    np.testing.assert_allclose(record.time_s, np.arange(101) * 0.005)


def test_record_array_is_read_only_copy():
    source = np.ones(20)
    record = record_from_array(source, 0.01)
    source[0] = 5.0
    assert record.acceleration_m_s2[0] == 1.0
    with pytest.raises(ValueError):
        record.acceleration_m_s2[0] = 2.0


def test_record_refuses_bad_time_step():
    with pytest.raises(ValueError, match=r"dt_s must be a finite number > 0 \[s\]; got 0"):
        Record("x", 0, np.zeros(20), None, "", "g", "array")


@pytest.mark.parametrize(("values", "units", "message"), [
    ([0.0, float("inf")] * 10, "g", r"acceleration must be finite \[g\]; sample 1"),
    ([0.0], "g", r"at least 2 values"),
    ([0.0, 1.0], "parsecs", r"acceleration unit must be one of"),
])
def test_record_from_array_refuses_bad_values(values, units, message):
    with pytest.raises(ValueError, match=message):
        record_from_array(values, 0.01, units=units)
