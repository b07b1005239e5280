"""Rendering the archive pages (comparison, revision, register) in the site's look.

The templates extend the site's ``base.html``, so every page carries the same cautions.
Pages that stand outside a site (a comparison on standard output, the register) need
to replace base.html's masthead, site navigation, stylesheet link and provenance line.
base.html is read through a loader that wraps those parts in named blocks (``masthead``,
``nav``, ``stylesheet``, ``provenance``) whose default content is the original text, so
pages inside a site render exactly as base.html has them.
"""

from __future__ import annotations

import re

import jinja2
import markupsafe

from sdofreport import __version__
from sdofreport.errors import BuildError
from sdofreport.site.context import CAUTION_FULL, CAUTION_SHORT
from sdofreport.site.render import template_dir

_BLOCKS = (
    ("masthead", re.compile(r'<div class="masthead-id">.*?</div>', re.S)),
    ("nav", re.compile(r'<nav class="pages">.*?</nav>', re.S)),
    ("stylesheet", re.compile(r'<link rel="stylesheet"[^>]*>')),
    ("provenance", re.compile(r'<p class="provenance-line">.*?</p>', re.S)),
)


class _BlockedBaseLoader(jinja2.FileSystemLoader):
    """FileSystemLoader that wraps parts of base.html in named blocks when it lacks them."""

    def get_source(self, environment, template):
        source, filename, uptodate = super().get_source(environment, template)
        if template == "base.html":
            for name, pattern in _BLOCKS:
                if f"{{% block {name} %}}" in source:
                    continue
                source = pattern.sub(lambda m, n=name: f"{{% block {n} %}}{m.group(0)}"
                                     f"{{% endblock %}}", source, count=1)
        return source, filename, uptodate


def environment() -> jinja2.Environment:
    """A jinja2 environment over the templates folder, autoescaping all user text."""
    return jinja2.Environment(
        loader=_BlockedBaseLoader(str(template_dir())),
        autoescape=True, undefined=jinja2.StrictUndefined,
        trim_blocks=False, lstrip_blocks=False, keep_trailing_newline=True)


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
