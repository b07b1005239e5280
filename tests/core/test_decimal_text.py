"""The one rule for numbers written for people (sdofreport.core.decimal_text) and the
three writers that read it: the pages (site.display.number), the derivation lines of the
system builders (core.builders._decimal) and the record reader's step deviation.

Sources: rounding to significant figures is checked against numpy's independent
formatter (numpy.format_float_positional, Dragon4); the 0.0001 threshold and its text are
our own presentation rule (common practice for report tables, no source).
"""

from __future__ import annotations

import numpy as np
import pytest

from sdofreport.core.builders import _decimal
from sdofreport.core.decimal_text import HUGE, TINY, below_tiny, plain_decimal
from sdofreport.records import read_record
from sdofreport.site.display import number

VALUES = [float(v) * sign for v in np.geomspace(1.01e-4, 0.99e6, 61) for sign in (1, -1)]


@pytest.mark.parametrize("digits", [2, 4, 6])
def test_plain_decimal_rounds_to_significant_figures_without_an_exponent(digits):
    for value in VALUES:
        text = plain_decimal(value, digits)
        assert "e" not in text.lower(), text
        if abs(value) < 10.0 ** (digits - 1):
            # Reference: numpy's positional formatter to the same significant figures.
            reference = np.format_float_positional(value, precision=digits, unique=False,
                                                   fractional=False)
            assert float(text) == float(reference), (value, text, reference)
        else:
            # From 10^(digits-1) up, whole numbers (numpy.rint rounds half to even, as
            # Python's formatting of the exact binary value does).
            assert float(text) == float(np.rint(value)), (value, text)


def test_the_three_writers_share_the_rule():
    for value in VALUES:
        # The pages: the plain decimal, trailing zeros kept.
        assert number(value) == plain_decimal(value, 4)
        # The derivations: the same figures, trailing zeros after the point dropped.
        text = plain_decimal(value, 4)
        assert _decimal(value, 4) == (text.rstrip("0").rstrip(".") if "." in text
                                      else text)
    for value in (4.753e-6, 0.99 * TINY, -3e-9):
        # The pages write nothing below 0.0001; the derivations write m × 10ⁿ.
        assert number(value) == below_tiny(value)
        assert "× 10⁻" in _decimal(value, 4)
    assert below_tiny(3e-9) == "< 0.0001" and below_tiny(-3e-9) == "> −0.0001"
    assert number(TINY) == "0.0001000" and _decimal(TINY, 4) == "0.0001"
    # From HUGE up the pages group thousands; the derivations write m × 10ⁿ.
    assert number(HUGE) == "1\u2009000\u2009000" and _decimal(HUGE, 4) == "1 × 10⁶"


def _two_column(path, times):
    path.write_text("".join(f"{t!r}, {0.01 * (i % 3)!r}\n" for i, t in enumerate(times)),
                    encoding="utf-8")
    return read_record(path, file_format="two-column", units="g")


def test_record_reader_writes_the_step_deviation_by_the_rule(tmp_path):
    # Closed form: times k * 0.01 s written with repr are even to round-off, far below
    # 0.0001 %.
    record = _two_column(tmp_path / "even.csv", [k * 0.01 for k in range(40)])
    assert any("largest step deviation < 0.0001 %" in h for h in record.history)
    # Closed form: one step of 0.010001 s against the typical 0.01 s deviates by
    # 0.0001 / 0.01 = 0.01 %, above the threshold, so written as a number (2 figures).
    times = [k * 0.01 for k in range(20)] + [0.19 + 0.010001 + k * 0.01 for k in range(20)]
    record = _two_column(tmp_path / "uneven.csv", times)
    assert any("largest step deviation 0.01 %" in h for h in record.history)
