"""Engineering symbols with subscripts, written the same way on pages and in figures.

The project's text writes a symbol's subscript after an underscore (``S_DS``, ``T_L``,
``F_y``, ``MCE_R``), as the standards' own plain-text summaries do. Only the symbols
listed here are set as subscripts, so that an identifier such as a record id
``rec_01`` is never changed.
"""

from __future__ import annotations

import re
import textwrap

import markupsafe

#: Symbols whose subscript is set lowered and smaller: spectral parameters (ASCE/SEI
#: 7-16 §11.4, EN 1998-1:2004 §3.2.2, ASCE/SEI 7-22, EN 1998-1-1:2024), corner
#: periods, yield quantities, levels.
SYMBOLS = ("S_DS", "S_D1", "S_MS", "S_M1", "S_S", "S_1", "S_a", "S_d", "S_v", "S_e",
           "T_L", "T_B", "T_C", "T_D", "T_0", "T_S", "T_n", "T_eff", "F_y", "u_y",
           "k_y", "k_eff", "MCE_R", "a_g", "a_gR", "v_s30", "V_s30", "β_eff", "ζ_eff",
           "μ_fast", "μ_slow",
           # ASCE/SEI 7-22 and EN 1998-1-1:2024 (spectrum_current.py)
           "S_α,RP", "S_β,RP", "S_α", "S_β", "F_α", "F_β", "F_A", "T_β", "T_lower",
           "T_upper", "S_a,MCE_R", "M_w")

_PATTERN = re.compile(r"(?<![\w/])(" + "|".join(
    re.escape(symbol) for symbol in sorted(SYMBOLS, key=len, reverse=True)) + r")(?![\w])")


def split_symbols(text: str) -> list[tuple[str, bool]]:
    """``text`` as ``(piece, is_subscript)`` runs: ``"S_DS 0.8"`` →
    ``[("S", False), ("DS", True), (" 0.8", False)]``."""
    runs: list[tuple[str, bool]] = []
    last = 0
    for match in _PATTERN.finditer(text):
        main, sub = match.group(1).split("_", 1)
        runs.append((text[last:match.start()] + main, False))
        runs.append((sub, True))
        last = match.end()
    runs.append((text[last:], False))
    return [(piece, sub) for piece, sub in runs if piece]


def html_symbols(text) -> markupsafe.Markup:
    """``text`` escaped for HTML, with the listed symbols' subscripts in ``<sub>``."""
    return markupsafe.Markup("".join(
        f"<sub>{markupsafe.escape(piece)}</sub>" if sub else str(markupsafe.escape(piece))
        for piece, sub in split_symbols(str(text))))


def plain_symbols(text: str) -> str:
    """``text`` with the listed symbols' underscores removed (for tooltips and alt)."""
    return "".join(piece for piece, _ in split_symbols(str(text)))


def wrap_label(text: str, width: int = 40, lines: int = 3) -> str:
    """A legend label broken at spaces into at most ``lines`` lines of about ``width``
    characters (joined by newlines); only a label longer than that is shortened, with
    an ellipsis at the end of its last line."""
    parts = textwrap.wrap(str(text), width=width, break_long_words=True,
                          break_on_hyphens=False) or [""]
    if len(parts) > lines:
        parts = parts[:lines]
        parts[-1] = parts[-1][: width - 1].rstrip() + "\u2026"
    return "\n".join(parts)
