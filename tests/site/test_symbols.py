"""Symbols with subscripts and legend labels that wrap instead of being cut.

Sources: the symbols are those of ASCE/SEI 7-16 §11.4 (S_DS, S_D1, T_L), EN 1998-1:2004
§3.2.2 (T_B, T_C, T_D, a_g) and common notation for yield quantities (F_y, u_y); the
rendering rules are our own interface.
"""

from __future__ import annotations

import re
import xml.etree.ElementTree as ET

from sdofreport.site.symbols import html_symbols, split_symbols, wrap_label
from sdofreport.site.svg_panels import AxesSpec, LegendEntry, PanelLayout, axes_svg

LONG = "ASCE/SEI 7-16 MCE_R spectrum (S_DS 0.8 g, S_D1 0.42 g, T_L 8 s)"


def test_listed_symbols_become_subscripts_and_ids_do_not():
    assert str(html_symbols("S_DS = 0.8 g; T_L 8 s; F_y = k u_y")) == (
        "S<sub>DS</sub> = 0.8 g; T<sub>L</sub> 8 s; F<sub>y</sub> = k u<sub>y</sub>")
    # Identifiers with underscores are not symbols: left as written.
    for text in ("rec_01", "hcs_S_DS", "S_DSX", "figures/T_L.svg", "my_F_y"):
        assert split_symbols(text) == [(text, False)], text
    assert str(html_symbols("<b>S_D1</b>")) == "&lt;b&gt;S<sub>D1</sub>&lt;/b&gt;"


def test_legend_label_wraps_whole_instead_of_being_cut():
    wrapped = wrap_label(LONG, 40)
    assert "\u2026" not in wrapped and len(wrapped.split("\n")) == 2
    assert " ".join(wrapped.split("\n")) == LONG
    assert all(len(line) <= 40 for line in wrapped.split("\n"))


def test_svg_legend_shows_every_word_of_a_long_label_with_subscripts():
    spec = AxesSpec(xlim=(0.1, 1.0), ylim=(0.0, 1.0), curves=(),
                    legend=(LegendEntry(wrap_label(LONG, 40), "#cc5500"),
                            LegendEntry("records", "#999999")))
    layout = PanelLayout(width_in=7.0, height_in=4.0, hspace_in=0.0, left_in=0.8,
                         right_in=0.0, bottom_in=0.6, top_in=0.2)
    svg = axes_svg(spec, layout, _style(), text_width=_width(), legend_width_in=3.0)
    root = ET.fromstring(svg.split("?>", 1)[1])
    legend = next(g for g in root.iter("{http://www.w3.org/2000/svg}g")
                  if g.get("class") == "legend")
    texts = ["".join(t.itertext()) for t in legend.iter("{http://www.w3.org/2000/svg}text")]
    # Subscripts removed by itertext's join: "MCE" + "R" -> "MCER"; the label is whole.
    joined = " ".join(texts)
    for word in ("ASCE/SEI", "MCER", "SDS", "SD1", "TL", "8", "records"):
        assert re.search(rf"(^|\s|\(){re.escape(word)}", joined), word
    subs = [t.text for t in legend.iter("{http://www.w3.org/2000/svg}tspan")
            if t.get("baseline-shift") == "sub"]
    assert subs == ["R", "DS", "D1", "L"]


def _style():
    from sdofreport.site.figures import _PANEL_STYLE

    return _PANEL_STYLE


def _width():
    from sdofreport.site.figures import _figure_text_width_pt

    return _figure_text_width_pt
