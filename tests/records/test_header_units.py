"""Units stated in a record file's header lines (issue 14 part 3).

Expected units are read off the header text by hand; unit sizes are by definition
(1 gal = 1 cm/s², ISO 80000-3 and the CGS system).
"""

from __future__ import annotations

import pytest

from sdofreport.records.header_units import disagreement, stated_units


@pytest.mark.parametrize("text, expected", [
    ("STATION X\nUNITS: CM/S/S\nNPTS= 400, DT= .01 SEC\n1 2\n", [("cm/s2", 2)]),
    ("Acceleration (m/s^2)\n1 2\n", [("m/s2", 1)]),
    ("accel in gal; npts 4 dt .01\n1 2 3 4\n", [("gal", 1)]),
    ("time_s,accel_cm/s2\n0,1\n", [("cm/s2", 1)]),
    ("# acceleration units: g\ntime_s,accel_g\n0,1\n", [("g", 1), ("g", 2)]),
    ("title\nACCELERATION IN G, NPTS= 5000, DT= 0.005 SEC\n1 2\n", [("g", 2)]),
    ("values [mm/sec**2]\n1\n", [("mm/s2", 1)]),
    # sdofreport's own headed layout states "unit: <u>" on its own line.
    ("sdofreport record: x\nunit: cm/s2\nsamples: 4, step: 0.01 s\n1 2 3 4\n",
     [("cm/s2", 2)]),
    ("sdofreport record: x\nunit: g\nsamples: 4, step: 0.01 s\n1 2 3 4\n", [("g", 2)]),
    ("in/s2 values\n1\n", [("in/s2", 1)]),
    # Quantities are values, not the file's unit: "0.41 g", "294 cm/s2".
    ("seed 7302, PGA 0.41 g\nPeak 294 cm/s2 at 3 s\nNPTS=4 DT=.01\n1 2 3 4\n", []),
    # Velocity units and words that merely contain the letters are not accelerations.
    ("velocity cm/s, in given order\n1\n", []),
    # Nothing is read past the first line of numbers.
    ("0.1 0.2\nunits: cm/s2\n", []),
])
def test_stated_units(text, expected):
    assert [(unit, line) for unit, line, _ in stated_units(text)] == expected


@pytest.mark.parametrize("declared, text, differs", [
    ("g", "UNITS: CM/S/S\n1\n", "cm/s2"),
    ("cm/s2", "units: gal\n1\n", None),  # 1 gal = 1 cm/s² by definition
    ("gal", "UNITS: CM/S/S\n1\n", None),
    ("g", "title only\n1\n", None),
    ("m/s2", "ACCELERATION IN G\n1\n", "g"),
    ("g", "Acceleration in g (about 980 cm/s2 each)\n1\n", None),  # g agrees
])
def test_disagreement(declared, text, differs):
    found = disagreement(declared, stated_units(text))
    assert (found[0] if found else None) == differs
