"""Record readers: every format and header variant, auto detection, every bad-input case."""

from pathlib import Path

import numpy as np
import pytest

from sdofreport.errors import RecordError
from sdofreport.records import RECORD_FORMATS, read_record
from sdofreport.records.readers import read_headed, read_two_column, read_values

DATA = Path(__file__).resolve().parents[1] / "data" / "records"
G = 9.80665  # standard gravity [m/s²], ISO 80000-3

# Closed form: the hand-made files hold a_k = ((k mod 9) − 4)·0.0125 g, k = 0…19
# (tests/data/SOURCES.md), converted with standard gravity.
EXPECTED_M_S2 = np.array([((k % 9) - 4) * 0.0125 for k in range(20)]) * G


def _write(tmp_path, text, name="rec.txt"):
    path = tmp_path / name
    path.write_bytes(text.encode("utf-8") if isinstance(text, str) else text)
    return path


def _two_column_text(n=20, dt=0.01, sep=","):
    return "".join(f"{k * dt:.4f}{sep}{0.01 * (k % 5):.3f}\n" for k in range(n))


# ------------------------------------------------------------------ good files


@pytest.mark.parametrize(
    ("name", "dt_s"),
    [
        ("headed_npts_first.txt", 0.01),      # NPTS=    20, DT=   .0100 SEC
        ("headed_dt_first.txt", 0.005),       # DT= 0.005 SEC, NPTS= 20
        ("headed_values_first.txt", 0.01),    # 20    0.0100    NPTS, DT
        ("headed_spaces.txt", 0.01),          # NPTS = 20 , DT = 0.01
    ],
)
@pytest.mark.parametrize("file_format", ["headed", "auto"])
def test_headed_variants(name, dt_s, file_format):
    record = read_record(DATA / name, file_format=file_format)
    # Closed form: values and DT written into the hand-made file.
    np.testing.assert_allclose(record.acceleration_m_s2, EXPECTED_M_S2, rtol=1e-12, atol=1e-15)
    assert record.dt_s == pytest.approx(dt_s, rel=1e-12)
    assert record.file_format == "headed"
    assert record.units == "g"
    assert record.id == Path(name).stem
    assert any("units: none declared; values taken as g" in line for line in record.history)


@pytest.mark.parametrize(
    ("name", "dt_s"),
    [
        ("two_column_comma.csv", 0.01),
        ("two_column_semicolon.txt", 0.02),
        ("two_column_tab.tsv", 0.01),
        ("two_column_spaces.txt", 0.01),
    ],
)
@pytest.mark.parametrize("file_format", ["two-column", "auto"])
def test_two_column_delimiters(name, dt_s, file_format):
    record = read_record(DATA / name, file_format=file_format)
    # Closed form: values and time column written into the hand-made file.
    np.testing.assert_allclose(record.acceleration_m_s2, EXPECTED_M_S2, rtol=1e-12, atol=1e-15)
    assert record.dt_s == pytest.approx(dt_s, rel=1e-9)
    assert record.file_format == "two-column"


@pytest.mark.parametrize("file_format", ["values", "auto"])
def test_values_only(file_format):
    record = read_record(DATA / "values_only.txt", file_format=file_format, dt_s=0.02)
    # Closed form: values written into the hand-made file; dt as given.
    np.testing.assert_allclose(record.acceleration_m_s2, EXPECTED_M_S2, rtol=1e-12, atol=1e-15)
    assert record.dt_s == 0.02 and record.file_format == "values"


def test_auto_detection_is_recorded_in_history():
    headed = read_record(DATA / "headed_npts_first.txt")
    two = read_record(DATA / "two_column_tab.tsv")
    values = read_record(DATA / "values_only.txt", dt_s=0.01)
    assert "format: detected headed (line 3 states NPTS and DT)" in headed.history
    assert any(line.startswith("format: detected two-column") for line in two.history)
    assert any(line.startswith("format: detected values") for line in values.history)
    explicit = read_record(DATA / "values_only.txt", file_format="values", dt_s=0.01)
    assert not any(line.startswith("format: detected") for line in explicit.history)


def test_named_readers_match_read_record():
    assert read_headed(DATA / "headed_spaces.txt").file_format == "headed"
    assert read_two_column(DATA / "two_column_comma.csv").file_format == "two-column"
    assert read_values(DATA / "values_only.txt", dt_s=0.01).file_format == "values"


def test_declared_units_are_converted_once(tmp_path):
    path = _write(tmp_path, "\n".join(["100.0"] * 20) + "\n")
    record = read_record(path, units="cm/s^2", dt_s=0.01)
    # Closed form: 100 cm/s² = 1 m/s².
    np.testing.assert_allclose(record.acceleration_m_s2, 1.0, rtol=1e-15)
    assert record.units == "cm/s2" and record.warnings == ()


def test_record_id_sha256_and_source(tmp_path):
    import hashlib

    text = _two_column_text()
    path = _write(tmp_path, text, "my_motion.csv")
    record = read_record(path, record_id="EQ-1")
    assert record.id == "EQ-1"
    assert record.source_path == str(path)
    # Independent reference: hashlib over the bytes written.
    assert record.sha256 == hashlib.sha256(text.encode()).hexdigest()
    assert not record.acceleration_m_s2.flags.writeable


def test_time_column_not_starting_at_zero_is_noted(tmp_path):
    text = "".join(f"{1.5 + k * 0.01:.2f} 0.1\n" for k in range(20))
    record = read_record(_write(tmp_path, text))
    # Closed form: steps of 0.01 s written above.
    assert record.dt_s == pytest.approx(0.01, rel=1e-9)
    assert any("starts at 1.5 s" in line for line in record.history)


def test_fortran_exponent_and_run_together_values(tmp_path):
    text = "NPTS=16, DT=0.01\n" + "1.0D-01-2.0D-01 3.0E-01-4.0E-01\n" * 4
    record = read_record(_write(tmp_path, text))
    # Closed form: the 16 values written above, in g.
    np.testing.assert_allclose(record.acceleration_m_s2, np.tile([0.1, -0.2, 0.3, -0.4], 4) * G)


def test_header_in_milliseconds(tmp_path):
    text = "NPTS= 16, DT= 5 MS\n" + "0.1 " * 16 + "\n"
    # Closed form: 5 ms = 0.005 s.
    assert read_record(_write(tmp_path, text)).dt_s == pytest.approx(0.005)


def test_given_dt_must_agree_with_file(tmp_path):
    path = _write(tmp_path, _two_column_text(dt=0.01))
    assert read_record(path, dt_s=0.01).dt_s == pytest.approx(0.01)
    with pytest.raises(RecordError, match="disagrees with the time column"):
        read_record(path, dt_s=0.02)


# ------------------------------------------------------------------ amplitude warnings


def test_implausibly_large_peak_warns_and_suggests_units(tmp_path):
    path = _write(tmp_path, "\n".join(["0.0", "981", "-500"] + ["1.0"] * 17) + "\n")
    record = read_record(path, dt_s=0.01)
    # Closed form: 981 cm/s² = 9.81 m/s² = 1.0 g.
    assert len(record.warnings) == 1
    assert record.warnings[0].startswith("peak 981 g is implausible")
    assert "if the file is in cm/s2 (or gal) the peak would be 1.0 g" in record.warnings[0]


def test_implausibly_small_peak_warns(tmp_path):
    path = _write(tmp_path, "\n".join(["1e-7"] * 20) + "\n")
    record = read_record(path, dt_s=0.01)
    assert record.warnings and "implausible" in record.warnings[0]


def test_all_zero_record_warns(tmp_path):
    record = read_record(_write(tmp_path, "0 " * 20), dt_s=0.01)
    assert record.warnings == ("peak 0 g: every acceleration value is zero",)


# ------------------------------------------------------------------ bad input


def _error(path, **kwargs) -> str:
    with pytest.raises(RecordError) as info:
        read_record(path, **kwargs)
    # RecordError is a click exception with exit status 2 and no traceback text.
    assert info.value.exit_code == 2
    message = info.value.format_message()
    assert str(path) in message and "Traceback" not in message
    return message


def test_missing_file(tmp_path):
    message = _error(tmp_path / "nope.txt")
    assert message == f"record file '{tmp_path / 'nope.txt'}': not found; check the path " \
        "(relative paths start from the project folder or the current folder)"


def test_folder_instead_of_file(tmp_path):
    assert "is a folder" in _error(tmp_path)


@pytest.mark.parametrize("content", [b"", b"   \n\n  \t\n"])
def test_empty_file(tmp_path, content):
    assert "is empty" in _error(_write(tmp_path, content))


def test_comment_only_file(tmp_path):
    assert "has no data lines" in _error(_write(tmp_path, "# nothing\n"), dt_s=0.01)


def test_undecodable_bytes_name_offset_and_line(tmp_path):
    content = b"0.1\n0.2\n0.\xff3\n"
    message = _error(_write(tmp_path, content), dt_s=0.01)
    assert "line 3: byte 10 (0xff) is not valid UTF-8 or ASCII text" in message


def test_non_numeric_token_is_quoted(tmp_path):
    text = _two_column_text().replace("0.0500,0.000", "0.0500,abc")
    message = _error(_write(tmp_path, text))
    assert "line 6: 'abc' is not a number" in message


@pytest.mark.parametrize("token", ["nan", "NaN", "inf", "-Infinity"])
def test_nan_and_infinity(tmp_path, token):
    text = "\n".join(["0.1"] * 7 + [token] + ["0.1"] * 12)
    message = _error(_write(tmp_path, text), dt_s=0.01)
    assert f"line 8: '{token}' is not a finite number" in message


def test_overflowing_number(tmp_path):
    text = "\n".join(["0.1"] * 19 + ["1e999"])
    assert "line 20: '1e999' is too large" in _error(_write(tmp_path, text), dt_s=0.01)


def test_fewer_than_16_points(tmp_path):
    message = _error(_write(tmp_path, _two_column_text(n=15)))
    assert "has 15 acceleration values; at least 16 are needed" in message


def test_time_not_strictly_increasing(tmp_path):
    lines = _two_column_text().splitlines()
    lines[7] = lines[6]  # repeat the time of line 7 on line 8
    message = _error(_write(tmp_path, "\n".join(lines)), file_format="two-column")
    assert "line 8: time 0.06 s is not greater than the time 0.06 s on line 7" in message


def test_time_step_varying_more_than_tolerance(tmp_path):
    times = np.arange(20) * 0.01
    times[10:] += 0.0005  # one step of 0.0105 s, 5 % off
    text = "".join(f"{t:.4f},0.1\n" for t in times)
    message = _error(_write(tmp_path, text))
    assert ("line 11: time step 0.0105 s (from line 10) differs from the typical step 0.01 s "
            "by 5 %") in message
    assert "at most 0.1 % is allowed" in message


def test_stated_count_not_matching(tmp_path):
    text = "header\nNPTS= 20, DT= 0.01\n" + "0.1 0.2\n" * 9
    message = _error(_write(tmp_path, text))
    assert "line 2: states NPTS=20 but 18 values were found (lines 3 to 12)" in message


@pytest.mark.parametrize("header", ["NPTS= 20, DT= 0.0", "NPTS= 20, DT= -0.01"])
def test_zero_or_negative_time_step_in_header(tmp_path, header):
    message = _error(_write(tmp_path, header + "\n" + "0.1 " * 20))
    assert "line 1: zero or negative time step" in message


@pytest.mark.parametrize("dt_s", [0.0, -0.01, float("nan")])
def test_zero_or_negative_time_step_given(tmp_path, dt_s):
    message = _error(_write(tmp_path, "0.1 " * 20), dt_s=dt_s)
    assert "zero or negative time step" in message


def test_missing_time_step_for_values(tmp_path):
    message = _error(_write(tmp_path, "0.1 0.2 0.3\n" * 10))
    assert "no time step" in message and "dt_s" in message
    assert "auto detection" in message


def test_header_line_with_unreadable_values(tmp_path):
    message = _error(_write(tmp_path, "NPTS and DT are below\n" + "0.1 " * 20))
    assert "line 1: names NPTS and DT but their values could not be read" in message


def test_wrong_number_of_columns(tmp_path):
    text = _two_column_text() + "0.2,0.1,0.3\n"
    message = _error(_write(tmp_path, text), file_format="two-column")
    assert "line 21: expected two numbers (time and acceleration), found 3 items" in message


def test_unknown_format_lists_allowed(tmp_path):
    message = _error(_write(tmp_path, "0.1 " * 20), file_format="xml")
    assert "unknown record format 'xml'; allowed formats are " + ", ".join(RECORD_FORMATS) \
        in message


def test_unknown_units_lists_allowed(tmp_path):
    message = _error(_write(tmp_path, "0.1 " * 20), units="furlongs", dt_s=0.01)
    assert "unknown acceleration unit 'furlongs'; allowed units are g, m/s2, cm/s2" in message


@pytest.mark.parametrize("sep, fortran", [(",", False), (";", False), ("\t", False),
                                          ("  ", False), (",", True)])
def test_two_column_values_are_exactly_what_float_reads(tmp_path, sep, fortran):
    # Reference: Python's float(), correctly rounded (IEEE 754), token by token. A file
    # of clean numbers goes through numpy's compiled reader, one with Fortran 'D'
    # exponents through the line-by-line parser; both must give the same bits.
    rng = np.random.default_rng(11)
    values = (rng.standard_normal(500) * 10.0 ** rng.integers(-8, 3, 500)).tolist()
    tokens = [f"{v:.17e}" for v in values]
    if fortran:
        tokens = [t.replace("e", "D") for t in tokens]
    lines = [f"{0.01 * i:.2f}{sep}{t}" for i, t in enumerate(tokens)]
    path = _write(tmp_path, "# units: g\ntime,acc\n" + "\n".join(lines) + "\n")
    record = read_record(path, file_format="two-column", units="m/s2")
    want = np.array([float(t.replace("D", "e")) for t in tokens])
    assert np.array_equal(record.acceleration_m_s2.view(np.int64), want.view(np.int64))
    assert record.dt_s == pytest.approx(0.01, rel=1e-12)
