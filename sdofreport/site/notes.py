"""Markdown notes rendered safely: raw HTML is shown as text, links are restricted.

Only ``http:``, ``https:``, ``mailto:`` and relative links survive; any other scheme
(``javascript:``, ``data:``, ``vbscript:``...) is dropped and the link text kept.
Images are reduced to their alt text so a page never loads anything from elsewhere.
"""

from __future__ import annotations

import re
import xml.etree.ElementTree as etree

import markdown
from markdown.extensions import Extension
from markdown.treeprocessors import Treeprocessor

_ALLOWED_SCHEMES = ("http", "https", "mailto")
_SCHEME = re.compile(r"^\s*([A-Za-z][A-Za-z0-9+.\-]*)\s*:")
_CONTROL = re.compile(r"[\x00-\x20\x7f]+")


def safe_link(url: str) -> bool:
    """True for http(s), mailto and relative links (no scheme at all)."""
    cleaned = _CONTROL.sub("", url or "")
    match = _SCHEME.match(cleaned)
    if match is None:
        return not cleaned.startswith("//")  # protocol-relative URLs go elsewhere
    return match.group(1).lower() in _ALLOWED_SCHEMES


class _LinkFilter(Treeprocessor):
    def run(self, root: etree.Element) -> None:
        for parent in root.iter():
            for index, child in enumerate(list(parent)):
                if child.tag == "a":
                    if not safe_link(child.get("href", "")):
                        child.attrib.pop("href", None)
                        child.set("class", "removed-link")
                    child.set("rel", "nofollow noopener")
                elif child.tag == "img":
                    span = etree.Element("span")
                    span.text = f"[image: {child.get('alt', '')}]"
                    span.tail = child.tail
                    parent.remove(child)
                    parent.insert(index, span)


class _SafeExtension(Extension):
    def extendMarkdown(self, md: markdown.Markdown) -> None:  # noqa: N802 (API name)
        md.preprocessors.deregister("html_block")
        md.inlinePatterns.deregister("html")
        md.treeprocessors.register(_LinkFilter(md), "sdofreport_links", 0)


def render_notes(text: str) -> str:
    """HTML for Markdown ``text`` with raw HTML escaped and unsafe links removed."""
    md = markdown.Markdown(extensions=[_SafeExtension(), "tables", "sane_lists"],
                           output_format="html")
    return md.convert(text)
