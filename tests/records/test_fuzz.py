"""Arbitrary input gives a Record or a RecordError, never another exception."""

import tempfile
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from sdofreport.errors import RecordError
from sdofreport.records import RECORD_FORMATS, Record, read_record

_FOLDER = Path(tempfile.mkdtemp(prefix="sdofreport-fuzz-"))

# Text made of the pieces real files are made of, so the parsers get past the first line.
_PIECES = st.sampled_from([
    "0.1", "-2.5e-3", "1.0D-02", ".5", "1e999", "nan", "inf", "abc", "NPTS", "DT", "=",
    ",", ";", " ", "\t", "\n", "\r\n", "#", "SEC", "20", "16", "0.01", "0", "-0.01",
    "time_s", "-1-2", "\x00", "é",
])


def _check(data: bytes, file_format: str, dt_s) -> None:
    path = _FOLDER / "fuzz.txt"
    path.write_bytes(data)
    try:
        record = read_record(path, file_format=file_format, dt_s=dt_s)
    except RecordError as exc:
        assert exc.exit_code == 2 and str(path) in exc.format_message()
    else:
        assert isinstance(record, Record) and record.npts >= 16


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.binary(max_size=400), file_format=st.sampled_from(RECORD_FORMATS),
       dt_s=st.one_of(st.none(), st.floats(allow_nan=True, allow_infinity=True)))
def test_arbitrary_bytes(data, file_format, dt_s):
    _check(data, file_format, dt_s)


@settings(max_examples=250, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(pieces=st.lists(_PIECES, max_size=120), file_format=st.sampled_from(RECORD_FORMATS),
       dt_s=st.sampled_from([None, 0.01, 1e-300, 1e300]))
def test_text_like_input(pieces, file_format, dt_s):
    _check("".join(pieces).encode("utf-8"), file_format, dt_s)
