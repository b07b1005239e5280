"""Notes links: every class of script-carrying or off-site link loses its target.

The oracle is Python's ``html.parser`` (standard library), which resolves character
references in attribute values as the HTML Living Standard says, and the WHATWG URL
Standard's rules for what a browser strips before reading a scheme: after both, no
``href`` may name a scheme other than http, https or mailto, nor another host through
``//`` or ``\\``. The real-browser counterpart clicks the same links
(tests/browser/test_site_in_browser.py).
"""

from __future__ import annotations

import re
from html.parser import HTMLParser

import pytest

from sdofreport.site.notes import render_notes
from tests.site.hostile_notes import BENIGN_LINKS, HOSTILE_LINKS


class _Attributes(HTMLParser):
    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.found: list[tuple[str, str, str | None]] = []

    def handle_starttag(self, tag, attrs):
        self.found += [(tag, name, value) for name, value in attrs]


def _attributes(html: str):
    parser = _Attributes()
    parser.feed(html)
    parser.close()
    return parser.found


def _as_browser_reads(url: str) -> str:
    # WHATWG URL Standard, basic URL parser: strip leading/trailing C0 controls and
    # spaces, remove every ASCII tab and newline.
    return re.sub(r"[\t\n\r]", "", url.strip("".join(map(chr, range(33)))))


@pytest.mark.parametrize("name", sorted(HOSTILE_LINKS))
def test_hostile_link_loses_its_target(name):
    html = render_notes(HOSTILE_LINKS[name] + "\n")
    attributes = _attributes(html)
    hrefs = [value for tag, attr, value in attributes if attr in ("href", "src")]
    for href in hrefs:
        url = _as_browser_reads(href or "")
        # Published rule (WHATWG URL Standard): the scheme is what precedes the first ':'
        # when it starts with a letter; '\' counts as '/' in special URLs.
        assert "\\" not in url and not url.startswith("//"), (name, html)
        scheme = re.match(r"^([A-Za-z][A-Za-z0-9+.\-]*):", url)
        assert scheme is None or scheme.group(1).lower() in ("http", "https", "mailto"), \
            (name, html)
    # No event-handler or style attribute anywhere (HTML: on* attributes run script).
    assert not [a for _, a, _ in attributes if a.startswith("on") or a == "style"], html
    assert "<script" not in html.lower() and "<img" not in html.lower(), html


def test_hostile_links_keep_their_text():
    # The reader still sees what was written: the link text stays, only the target goes.
    html = render_notes("\n\n".join(HOSTILE_LINKS.values()) + "\n")
    for number in range(1, 20):
        assert f">e{number}<" in html


@pytest.mark.parametrize("markdown_text, href", sorted(BENIGN_LINKS.items()))
def test_safe_links_are_kept(markdown_text, href):
    html = render_notes(markdown_text + "\n")
    hrefs = [value for tag, attr, value in _attributes(html) if attr == "href"]
    assert hrefs == [href], html


def test_tables_and_lists_survive_sanitising():
    html = render_notes("| a | b |\n| :-- | --: |\n| 1 | 2 |\n\n1. one\n2. two\n")
    assert "<table>" in html and '<td align="right">2</td>' in html
    assert "<ol>" in html and "<li>two</li>" in html
