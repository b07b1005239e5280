"""process_record: order of steps, history, errors as RecordError."""

import numpy as np
import pytest

from sdofreport.core.processing import bandpass, baseline_correction, cosine_taper
from sdofreport.errors import RecordError
from sdofreport.records import process_record, record_from_array


def _record():
    t = np.arange(3001) * 0.01
    acc = np.sin(2 * np.pi * 1.0 * t) + 0.05 + 0.002 * t
    return record_from_array(acc, 0.01, units="m/s2", record_id="r1", source_path="r1.txt")


def test_nothing_requested_changes_nothing():
    record = _record()
    out = process_record(record)
    np.testing.assert_array_equal(out.acceleration_m_s2, record.acceleration_m_s2)
    assert out.history == record.history


def test_steps_run_baseline_then_taper_then_bandpass():
    record = _record()
    out = process_record(record, baseline_order=1, taper_s=2.0, bandpass_hz=(0.1, 20.0),
                         filter_order=4)
    # Independent reference: the three core functions applied by hand in the documented order.
    expected = bandpass(cosine_taper(baseline_correction(record.acceleration_m_s2, 0.01, 1),
                                     0.01, 2.0), 0.01, 0.1, 20.0, order=4, keep_pads=True)
    np.testing.assert_allclose(out.acceleration_m_s2, expected, atol=1e-12)
    added = out.history[len(record.history):]
    assert [line.split(":")[0] for line in added] == ["baseline", "taper", "band-pass"]
    assert "order-1 polynomial removed" in added[0]
    assert "half-cosine ramps of 2 s" in added[1]
    # From memory: Boore (2005) total pad 1.5 n / fc = 1.5·4/0.1 = 60 s.
    assert "60 s of zero pads" in added[2] and "filtered pads are kept" in added[2]
    # Boore (2005): the pads are kept after acausal filtering, 30 s (3000 samples) at
    # each end; the record inside them is the one the pads-removed filter returns.
    assert out.npts == record.npts + 2 * 3000 and out.sha256 == record.sha256
    inner = bandpass(cosine_taper(baseline_correction(record.acceleration_m_s2, 0.01, 1),
                                  0.01, 2.0), 0.01, 0.1, 20.0, order=4)
    np.testing.assert_allclose(out.acceleration_m_s2[3000:-3000], inner, atol=1e-12)
    # Usable periods up to 1/(1.25 f_c) = 8 s (NGA-West2 rule, Ancheta et al. 2014, from
    # memory).
    assert "usable periods up to 8 s" in added[2]


def test_highpass_only_history_says_none():
    out = process_record(_record(), bandpass_hz=(0.2, None))
    assert "low-cut 0.2 Hz, high-cut none" in out.history[-1]


@pytest.mark.parametrize(("kwargs", "message"), [
    ({"bandpass_hz": (None, 80.0)}, r"band-pass: high_hz must be below the Nyquist frequency"),
    ({"bandpass_hz": 5.0}, r"band-pass: bandpass_hz must be a pair"),
    ({"baseline_order": 7}, r"baseline: order must be one of"),
    ({"taper_s": 100.0}, r"taper: taper_s must be > 0 and at most half"),
])
def test_bad_parameters_are_record_errors_naming_the_record(kwargs, message):
    with pytest.raises(RecordError, match=message) as info:
        process_record(_record(), **kwargs)
    assert info.value.format_message().startswith("record 'r1' (file 'r1.txt'): ")
    assert info.value.exit_code == 2
