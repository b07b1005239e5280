"""Rendering the archive pages (comparison, revision, register) in the site's look.

The templates extend the site's ``base.html``, so every page carries the same cautions,
header and column. Pages that stand outside a site (a comparison on standard output,
the register) replace base.html's named blocks ``masthead_id``, ``nav``, ``stylesheet``
and ``provenance``.
"""

from __future__ import annotations

import re

import jinja2
import markupsafe

from sdofreport import __version__
from sdofreport.errors import BuildError
from sdofreport.site.context import CAUTION_FULL, CAUTION_SHORT
from sdofreport.site.render import template_dir
from sdofreport.site.symbols import html_symbols

#: Characters after which a long file name may wrap: folder separators first, then
#: the separators of its words.
_BREAK_AFTER = re.compile(r"([/\\_.\-])")


def breakable(text) -> markupsafe.Markup:
    """``text`` escaped, with a line-break opportunity (``<wbr>``) after each ``/``,
    ``\\``, ``_``, ``.`` and ``-``, so long file names wrap at sensible points."""
    escaped = str(markupsafe.escape(str(text)))
    return markupsafe.Markup(_BREAK_AFTER.sub(r"\1<wbr>", escaped))


def environment() -> jinja2.Environment:
    """A jinja2 environment over the templates folder, autoescaping all user text."""
    env = jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(template_dir())),
        autoescape=True, undefined=jinja2.StrictUndefined,
        trim_blocks=False, lstrip_blocks=False, keep_trailing_newline=True)
    env.filters["breakable"] = breakable
    env.filters["symbols"] = html_symbols
    return env


def stylesheet() -> markupsafe.Markup:
    """The site's stylesheet text, marked safe (our own file) for inlining in <style>."""
    return markupsafe.Markup((template_dir() / "static" / "style.css").read_text("utf-8"))


def render(template: str, context: dict) -> bytes:
    """Render one page to UTF-8 bytes; a template failure is a :class:`BuildError`."""
    try:
        return environment().get_template(template).render(**context).encode("utf-8")
    except jinja2.TemplateError as exc:
        raise BuildError(f"page template {template} could not be rendered: {exc}") from None


def common_context(*, root: str, page_title: str, page_kind: str, project: dict | None = None,
                   nav_systems: list | None = None, fingerprint: str = "") -> dict:
    """What base.html expects, with harmless defaults for pages that are not of one run."""
    project = dict(project or {})
    sha256 = str(project.get("sha256") or "")
    merged = {"title": "", "reference": "", "revision": "", "date": None, "file": "",
              "sha256": sha256, "sha256_short": sha256[:12]}
    merged.update(project)
    merged["sha256_short"] = sha256[:12]
    return {"root": root, "page_title": page_title, "page_kind": page_kind,
            "current_id": "", "version": __version__, "project": merged,
            "nav_systems": list(nav_systems or []),
            "cautions": {"short": CAUTION_SHORT, "full": CAUTION_FULL},
            "fingerprint": fingerprint}
