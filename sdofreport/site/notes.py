"""Markdown notes rendered safely: raw HTML is shown as text, the result is sanitised.

Markdown turns the notes into HTML with raw HTML escaped and images reduced to their alt
text (a page never loads anything from elsewhere). That HTML then goes through
:func:`sdofreport.site.safehtml.clean_html` (nh3) on an allow-list of the tags Markdown
writes: only ``http:``, ``https:``, ``mailto:`` and same-site relative links keep their
``href``; any other scheme however it is spelt (``javascript&colon;``, ``&#106;avascript:``,
a tab inside the word, ``data:``), ``//host`` and ``/\\host`` lose it and the link text
stays, struck through by the stylesheet. No attribute that can carry script survives.
"""

from __future__ import annotations

import xml.etree.ElementTree as etree

import markdown
from markdown.extensions import Extension
from markdown.extensions.tables import TableExtension
from markdown.treeprocessors import Treeprocessor

from sdofreport.site.safehtml import clean_html

#: What Markdown (with the tables and sane_lists extensions) writes, and nothing else.
NOTES_TAGS = frozenset({
    "p", "h1", "h2", "h3", "h4", "h5", "h6", "ul", "ol", "li", "a", "em", "strong",
    "code", "pre", "blockquote", "hr", "br", "table", "thead", "tbody", "tr", "th", "td",
    "span"})
NOTES_ATTRIBUTES = {"a": {"href", "title"}, "th": {"align"}, "td": {"align"},
                    "ol": {"start"}}


class _ImagesAsText(Treeprocessor):
    def run(self, root: etree.Element) -> None:
        for parent in root.iter():
            for index, child in enumerate(list(parent)):
                if child.tag == "img":
                    span = etree.Element("span")
                    span.text = f"[image: {child.get('alt', '')}]"
                    span.tail = child.tail
                    parent.remove(child)
                    parent.insert(index, span)


class _SafeExtension(Extension):
    def extendMarkdown(self, md: markdown.Markdown) -> None:  # noqa: N802 (API name)
        md.preprocessors.deregister("html_block")
        md.inlinePatterns.deregister("html")
        md.treeprocessors.register(_ImagesAsText(md), "sdofreport_images", 0)


def render_notes(text: str) -> str:
    """HTML for Markdown ``text``: raw HTML escaped, then sanitised on an allow-list."""
    md = markdown.Markdown(extensions=[_SafeExtension(), "sane_lists",
                                       TableExtension(use_align_attribute=True)],
                           output_format="html")
    return clean_html(md.convert(text), tags=NOTES_TAGS, attributes=NOTES_ATTRIBUTES)
