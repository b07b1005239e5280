"""The one rule for writing a number as text: plain decimals, nothing below 0.0001.

A value whose magnitude lies in ``[TINY, HUGE)`` is written with a given number of
significant figures in plain decimal notation, never with an ``e`` exponent; a magnitude
below :data:`TINY` (0.0001 in whatever unit the value is shown) is not written as a
number at all. Every writer of numbers for people reads these: the pages
(``sdofreport.site.display.number``), the derivation lines of the system builders
(``sdofreport.core.builders``) and the record readers' processing history
(``sdofreport.records.readers``). The thresholds are a choice of presentation (common
practice, no source).
"""

from __future__ import annotations

import math

#: The smallest magnitude written as a number [in the unit shown].
TINY = 1e-4

#: Plain decimals below this magnitude [in the unit shown]; above it each writer has
#: its own form (thousands separators on the pages, ``m × 10ⁿ`` in derivations).
HUGE = 1e6


def plain_decimal(value: float, digits: int) -> str:
    """
    ``value`` to ``digits`` significant figures in plain decimal notation, trailing
    zeros kept (``0.001230`` for 0.00123 to 4 figures).

    Parameters
    ----------
    value : float
        A finite, non-zero number; meant for ``TINY <= |value| < HUGE``. [-]
    digits : int
        Significant figures, >= 1. [-]

    Returns
    -------
    str
        The text, without an exponent. [-]
    """
    decimals = max(0, digits - 1 - math.floor(math.log10(abs(value))))
    return f"{value:.{decimals}f}"


def below_tiny(value: float) -> str:
    """
    What is written for a magnitude below :data:`TINY`: ``"< 0.0001"``, or
    ``"> −0.0001"`` when ``value`` is negative. [-]
    """
    return f"> −{TINY:.4f}" if value < 0 else f"< {TINY:.4f}"
