"""Does an archived run hold anything that could run script once copied and opened?

``register`` copies runs byte for byte (so each copy still verifies against its own
manifest); a run made by an older sdofreport, or forged with matching hashes, could carry
a page whose notes hold a ``javascript:`` link, an inline ``<script>`` or a figure with an
``onload``. Such a run is listed but not copied.

HTML pages are judged by nh3 (ammonia, see :mod:`sdofreport.site.safehtml`): the page is
sanitised on the allow-list of what sdofreport's templates write, and every start tag and
attribute of the original (as Python's ``html.parser`` reads it, character references
resolved) must survive unchanged. Anything the sanitiser removed or altered (a script,
an event handler, a URL with another scheme or host) makes the page unsafe; so does any
difference between the two readings. The document head, which a fragment sanitiser does
not keep, is checked against the few elements base.html writes. SVG figures are read as
XML (no entity declarations) and refused when they hold an element or attribute that can
run script or navigate.
"""

from __future__ import annotations

import re
import xml.etree.ElementTree as etree
from html.parser import HTMLParser
from pathlib import PurePosixPath

from sdofreport.site.safehtml import LINK_SCHEMES, clean_html, safe_url

#: Tags sdofreport's templates write inside <body>.
PAGE_TAGS = frozenset({
    "a", "abbr", "aside", "b", "blockquote", "br", "caption", "code", "col", "colgroup",
    "dd", "del", "details", "div", "dl", "dt", "em", "figcaption", "figure", "footer",
    "h1", "h2", "h3", "h4", "h5", "h6", "header", "hr", "i", "img", "li", "main", "nav",
    "ol", "p", "pre", "s", "section", "small", "span", "strong", "sub", "summary", "sup",
    "table", "tbody", "td", "tfoot", "th", "thead", "tr", "ul"})
PAGE_ATTRIBUTES = {
    "*": {"class", "id", "role", "aria-current", "aria-label", "aria-hidden", "title",
          "lang"},
    "a": {"href", "rel"}, "img": {"src", "alt", "width", "height", "loading"},
    "th": {"scope", "colspan", "rowspan", "align"}, "td": {"colspan", "rowspan", "align"},
    "ol": {"start"}, "col": {"span"}, "details": {"open"}}
_HEAD_TAGS = {"html", "head", "body", "title", "meta", "link"}
#: File kinds a browser renders as an active document; only HTML and SVG are inspected.
_ACTIVE_SUFFIXES = {".xhtml", ".xht", ".xml", ".xsl", ".xslt", ".shtml", ".mht",
                    ".mhtml", ".svgz", ".htm", ".html", ".svg"}
_SVG_ACTIVE = {"script", "foreignobject", "iframe", "embed", "object", "handler",
               "listener", "set", "animate", "animatemotion", "animatetransform",
               "discard"}


class _Tags(HTMLParser):
    """Start tags with their (decoded) attributes, in document order."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.tags: list[tuple[str, tuple]] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, tuple(sorted((k, v or "") for k, v in attrs))))

    handle_startendtag = handle_starttag


def _tags(html: str) -> list[tuple[str, tuple]]:
    parser = _Tags()
    parser.feed(html)
    parser.close()
    # An HTML parser inserts a bare <tbody> where a table holds rows directly.
    return [item for item in parser.tags if item != ("tbody", ())]


def _head_problem(tag: str, attrs: tuple) -> str | None:
    values = dict(attrs)
    if tag == "meta":
        if set(values) <= {"charset", "name", "content"}:
            return None
        if (set(values) == {"http-equiv", "content"}
                and values["http-equiv"].lower() == "content-security-policy"):
            return None
    elif tag == "link":
        if (set(values) == {"rel", "href"} and values["rel"] in ("icon", "stylesheet")
                and (values["href"] == "data:," or safe_url(values["href"], schemes=()))):
            return None
    elif tag in ("html", "head", "body", "title") and set(values) <= {"lang"}:
        return None
    return f"<{tag}> with {', '.join(k for k, _ in attrs) or 'no attributes'}"


def html_problem(text: str) -> str | None:
    """What in HTML page ``text`` could run script or leave the site; None when clean."""
    original = _tags(text)
    for tag, attrs in original:
        if tag in _HEAD_TAGS and (problem := _head_problem(tag, attrs)):
            return problem
    body = [item for item in original if item[0] not in _HEAD_TAGS]
    # nh3 adds rel to links only when asked (link_rel=None keeps the page's own).
    cleaned = _tags(clean_html(text, tags=PAGE_TAGS, attributes=PAGE_ATTRIBUTES,
                               schemes=LINK_SCHEMES, link_rel=None))
    for before, after in zip(body, cleaned):
        if before != after:
            removed = sorted(set(before[1]) - set(after[1]))
            what = (f"attribute {removed[0][0]}={removed[0][1][:60]!r}" if removed
                    and before[0] == after[0] else f"<{before[0]}>")
            return f"{what} on <{before[0]}>" if removed and before[0] == after[0] else what
    if len(body) != len(cleaned):
        extra = body[len(cleaned)] if len(body) > len(cleaned) else cleaned[len(body)]
        return f"<{extra[0]}>"
    return None


def svg_problem(data: bytes) -> str | None:
    """What in SVG figure ``data`` could run script or navigate; None when clean."""
    # matplotlib writes the SVG 1.1 public DOCTYPE; an internal subset or an entity
    # declaration (which could expand without bound) is refused before parsing.
    if re.search(rb"<!ENTITY|<!DOCTYPE[^>]*\[", data, re.I):
        return "an entity declaration"
    try:
        root = etree.fromstring(data)
    except etree.ParseError as exc:
        return f"not well-formed XML ({exc})"
    for element in root.iter():
        name = str(element.tag).rsplit("}", 1)[-1].lower()
        if name in _SVG_ACTIVE:
            return f"<{name}>"
        for key, value in element.attrib.items():
            attribute = key.rsplit("}", 1)[-1].lower()
            if attribute.startswith("on"):
                return f"attribute {attribute} on <{name}>"
            if attribute == "href" and not value.strip().startswith("#"):
                return f"link {value[:60]!r} on <{name}>"
    return None


def unsafe_content(files: dict[str, bytes]) -> str | None:
    """The first file (sorted) of a run that could run script, and why; None when all clean."""
    for path, data in sorted(files.items()):
        suffix = PurePosixPath(path).suffix.lower()
        if suffix not in _ACTIVE_SUFFIXES:
            continue
        if suffix in (".html", ".htm"):
            try:
                problem = html_problem(data.decode("utf-8"))
            except UnicodeDecodeError:
                problem = "text that is not UTF-8"
        elif suffix == ".svg":
            problem = svg_problem(data)
        else:
            problem = "a kind of file a browser opens as an active document"
        if problem:
            return f"'{path}' holds {problem}"
    return None
