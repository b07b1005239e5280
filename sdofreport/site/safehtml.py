"""HTML sanitising on an allow-list, through nh3 (the Python binding of ammonia).

Why nh3: it wraps ammonia, a maintained Rust sanitiser that parses with html5ever (the
HTML5 parser of the Servo browser engine), so the markup it keeps is read the way a
browser reads it: character references (``&#106;``, ``&colon;``), tabs or newlines
inside a scheme and odd nesting are decoded *before* the allow-list is applied, which a
regular expression over the source text cannot promise. bleach, the older choice, is
deprecated by its maintainers.

The one thing ammonia leaves to the caller is the shape of relative URLs: ``//host``
and ``/\\host`` have no scheme but lead to another site. :func:`safe_url` refuses
those (and any URL with a backslash, which browsers read as ``/``) after applying the
WHATWG URL parser's own clean-up (leading and trailing C0 controls and spaces are
dropped, tabs and newlines anywhere are removed).
"""

from __future__ import annotations

import re

import nh3

#: Schemes a link may use; anything else (javascript:, data:, vbscript:, file:...) is dropped.
LINK_SCHEMES = frozenset({"http", "https", "mailto"})
#: Attributes that carry a URL; each goes through :func:`safe_url`.
URL_ATTRIBUTES = frozenset({"href", "src", "action", "formaction", "xlink:href", "cite",
                            "poster", "background", "srcset", "data"})

# WHATWG URL Standard, "basic URL parser": strip leading/trailing C0 control or space,
# remove all ASCII tab or newline; a scheme is ALPHA *( ALPHA / DIGIT / "+" / "-" / "." ).
_EDGES = re.compile(r"^[\x00-\x20]+|[\x00-\x20]+$")
_TAB_NEWLINE = re.compile(r"[\t\n\r]")
_SCHEME = re.compile(r"^([A-Za-z][A-Za-z0-9+.\-]*):")


def safe_url(url: str | None, *, schemes=LINK_SCHEMES, relative: bool = True) -> bool:
    """
    True when ``url`` (as a browser decodes it: character references already resolved)
    is an ``http``/``https``/``mailto`` link or a same-site relative link.

    Refused: any other scheme, protocol-relative ``//host``, anything holding a
    backslash (``/\\host`` is ``//host`` to a browser), other control characters, and
    a colon before the first ``/``, ``?`` or ``#`` that is not an allowed scheme.
    """
    if url is None:
        return False
    cleaned = _TAB_NEWLINE.sub("", _EDGES.sub("", url))
    if "\\" in cleaned or re.search(r"[\x00-\x1f\x7f]", cleaned):
        return False
    match = _SCHEME.match(cleaned)
    if match is not None:
        return match.group(1).lower() in schemes
    if not relative or cleaned.startswith("//"):
        return False
    head = re.split(r"[/?#]", cleaned, maxsplit=1)[0]
    return ":" not in head


def _filter(schemes, relative):
    def attribute_filter(tag: str, attribute: str, value: str) -> str | None:
        if attribute in URL_ATTRIBUTES and not safe_url(value, schemes=schemes,
                                                       relative=relative):
            return None
        return value
    return attribute_filter


def clean_html(html: str, *, tags: set[str], attributes: dict[str, set[str]],
               schemes=LINK_SCHEMES, relative: bool = True,
               link_rel: str | None = "nofollow noopener noreferrer") -> str:
    """
    ``html`` with only ``tags`` and ``attributes`` kept (nh3 allow-list), every URL
    attribute checked by :func:`safe_url`, and ``<script>``, ``<style>`` and other
    content-carrying tags removed with their content.
    """
    return nh3.clean(
        html, tags=set(tags), attributes={k: set(v) for k, v in attributes.items()},
        clean_content_tags={"script", "style", "template", "iframe", "object", "embed",
                            "noscript", "noembed", "noframes", "xmp", "title",
                            "textarea", "select", "svg", "math"} - set(tags),
        attribute_filter=_filter(schemes, relative), strip_comments=True,
        link_rel=link_rel, url_schemes=set(schemes))
