"""Tests for sdofreport.records.writers, parsing the output independently with numpy."""

from __future__ import annotations

import io
import os

import numpy as np
import pytest

from sdofreport.records.writers import write_headed, write_two_column


def _signal(n, seed=5):
    rng = np.random.default_rng(seed)
    # Values spanning several decades and both signs, plus exact zeros.
    x = rng.standard_normal(n) * 10.0 ** rng.uniform(-6, 1, n)
    x[::17] = 0.0
    return x


# --------------------------------------------------------------------------- two-column


def test_two_column_layout_and_round_trip(tmp_path):
    path = tmp_path / "rec.csv"
    acc = _signal(1234)
    write_two_column(path, 0.005, acc, units="g",
                     header_lines=["Synthetic test record", "# already a comment"])
    raw = path.read_bytes()
    # Common practice (no source): Unix line endings only, ASCII text, final newline.
    assert b"\r" not in raw and raw.endswith(b"\n")
    lines = raw.decode("ascii").split("\n")
    # Format definition (ours, in the brief): header lines, units line, header row.
    assert lines[:4] == [
        "# Synthetic test record",
        "# already a comment",
        "# acceleration units: g",
        "time_s,accel_g",
    ]
    assert lines[4] == "0.0000,0.00000000e+00"
    table = np.loadtxt(io.StringIO("\n".join(lines[4:])), delimiter=",")
    # Closed form: t_i = i dt; printed with 4 decimals, exact for dt = 0.005 s.
    np.testing.assert_allclose(table[:, 0], np.arange(acc.size) * 0.005, rtol=0, atol=5e-5)
    # Tolerance: "%.8e" keeps 9 significant digits, relative round-off <= 5e-9.
    np.testing.assert_allclose(table[:, 1], acc, rtol=5.1e-9, atol=0)


def test_two_column_other_units_and_fine_step(tmp_path):
    path = tmp_path / "rec.csv"
    acc = np.array([0.0, 1.5, -2.25, 3.125])
    write_two_column(path, 0.00025, acc, units="cm/s^2")
    lines = path.read_text(encoding="ascii").splitlines()
    # Format definition (ours): canonical unit spelling in the units line and header row.
    assert lines[0] == "# acceleration units: cm/s2"
    assert lines[1] == "time_s,accel_cm/s2"
    # Closed form: t_3 = 3 × 0.00025 s = 0.00075 s needs 5 decimals to print exactly.
    assert lines[-1] == "0.00075,3.12500000e+00"


def test_two_column_deterministic_and_atomic(tmp_path):
    acc = _signal(300, seed=9)
    a, b = tmp_path / "a.csv", tmp_path / "b.csv"
    write_two_column(a, 0.01, acc)
    write_two_column(b, 0.01, acc)
    # Common practice (no source): a deterministic writer gives identical bytes.
    assert a.read_bytes() == b.read_bytes()
    # Replacing an existing file leaves only the target behind (no temporary files).
    write_two_column(a, 0.01, acc[:10])
    assert sorted(os.listdir(tmp_path)) == ["a.csv", "b.csv"]
    assert len(a.read_text(encoding="ascii").splitlines()) == 2 + 10


def test_failed_write_leaves_no_file_and_no_temporary(tmp_path):
    path = tmp_path / "bad.csv"
    with pytest.raises(ValueError, match=r"acceleration must hold finite values \[g\]; "
                                         r"got nan at index 2"):
        write_two_column(path, 0.01, [0.0, 1.0, float("nan")])
    assert os.listdir(tmp_path) == []


@pytest.mark.parametrize(
    "kwargs, match",
    [
        ({"time_step_s": 0.0}, r"time_step_s must be a finite number > 0 \[s\]; got 0.0"),
        ({"units": "furlong/s2"}, r"units must be one of g, m/s2, .* \[-\]; got 'furlong/s2'"),
        ({"acceleration": []}, r"acceleration must hold at least one value \[g\]; got none"),
        ({"acceleration": [[1.0, 2.0]]},
         r"acceleration must be one-dimensional \[g\]; got shape \(1, 2\)"),
        ({"header_lines": ["two\nlines"]},
         r"header_lines\[0\] must not contain a line break; got 'two\\nlines'"),
        ({"header_lines": "one string"},
         r"header_lines must be a sequence of strings, not one string; got 'one string'"),
    ],
)
def test_two_column_rejects_bad_arguments(tmp_path, kwargs, match):
    args = {"time_step_s": 0.01, "acceleration": [0.0, 1.0]}
    args.update(kwargs)
    with pytest.raises(ValueError, match=match):
        write_two_column(tmp_path / "x.csv", args.pop("time_step_s"), args.pop("acceleration"),
                         **args)
    assert os.listdir(tmp_path) == []


# --------------------------------------------------------------------------- headed


def test_headed_layout_and_round_trip(tmp_path):
    from sdofreport.records import read_record

    path = tmp_path / "rec.txt"
    acc = _signal(4000, seed=21)
    write_headed(path, 0.01, acc, title_lines=["Fictional site, test record", "Component H1"])
    raw = path.read_bytes()
    # Common practice (no source): Unix line endings only, final newline.
    assert b"\r" not in raw and raw.endswith(b"\n")
    lines = raw.decode("ascii").split("\n")[:-1]
    # Format definition (ours): first line, titles, unit, then count and step.
    assert lines[:5] == ["sdofreport record: equally spaced ground acceleration",
                         "title: Fictional site, test record", "title: Component H1",
                         "unit: g", "samples: 4000, step: 0.01 s"]
    body = lines[5:]
    # Closed form: 4000 values at 8 per line fill 500 lines.
    assert len(body) == 500 and all(len(line.split()) == 8 for line in body)
    values = np.array(" ".join(body).split(), dtype=float)
    # Tolerance: "%.7e" keeps 8 significant digits, relative round-off <= 5e-8.
    np.testing.assert_allclose(values, acc, rtol=5.1e-8, atol=0)
    # The reader takes it as headed, with the stated count and step (our interface).
    record = read_record(path, units="g")
    assert record.file_format == "headed" and record.npts == 4000 and record.dt_s == 0.01


def test_headed_short_last_line_and_default_titles(tmp_path):
    path = tmp_path / "rec.txt"
    acc = np.array([0.0, -0.125, 0.5, 1e-3, -2.0e-5, 0.25, 0.0625, 1.0, -3.0])
    write_headed(path, 0.005, acc)
    lines = path.read_text(encoding="ascii").splitlines()
    # Format definition (ours): the title block is filled up to two lines.
    assert lines[1:3] == ["title: untitled record", "title: written by sdofreport"]
    assert lines[4] == "samples: 9, step: 0.005 s"
    # Closed form: 9 values → one full line of 8 and a last line of 1.
    assert lines[5].split() == ["0.0000000e+00", "-1.2500000e-01", "5.0000000e-01",
                                "1.0000000e-03", "-2.0000000e-05", "2.5000000e-01",
                                "6.2500000e-02", "1.0000000e+00"]
    assert lines[6] == "-3.0000000e+00"


def test_headed_deterministic(tmp_path):
    acc = _signal(501, seed=2)
    a, b = tmp_path / "a.txt", tmp_path / "b.txt"
    write_headed(a, 0.02, acc, title_lines=["A", "B", "C"])
    write_headed(b, 0.02, acc, title_lines=["A", "B", "C"])
    # Common practice (no source): a deterministic writer gives identical bytes.
    assert a.read_bytes() == b.read_bytes()
    assert sorted(os.listdir(tmp_path)) == ["a.txt", "b.txt"]


@pytest.mark.parametrize(
    "kwargs, match",
    [
        ({"time_step_s": 0.0123456},
         r"time_step_s must be a whole multiple of 0.00001 s for the headed format \[s\]; "
         r"got 0.0123456"),
        ({"time_step_s": -0.01}, r"time_step_s must be a finite number > 0 \[s\]; got -0.01"),
        ({"acceleration_g": [0.0, float("inf")]},
         r"acceleration_g must hold finite values \[g\]; got inf at index 1"),
        ({"title_lines": ["x", "ACCELERATION IN G, NPTS= 3"]},
         r"title_lines\[1\] must not contain 'NPTS=' or start with 'samples:'; got "
         r"'ACCELERATION IN G, NPTS= 3'"),
        ({"title_lines": ["samples: 3, step: 0.01 s"]},
         r"title_lines\[0\] must not contain 'NPTS=' or start with 'samples:'"),
    ],
)
def test_headed_rejects_bad_arguments(tmp_path, kwargs, match):
    args = {"time_step_s": 0.01, "acceleration_g": [0.0, 1.0]}
    args.update(kwargs)
    with pytest.raises(ValueError, match=match):
        write_headed(tmp_path / "x.txt", args.pop("time_step_s"), args.pop("acceleration_g"),
                     **args)
    assert os.listdir(tmp_path) == []
