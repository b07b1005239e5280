"""What a site's pages print about the run, checked against its manifest.

Every page a build writes shows the run fingerprint (``<code class="fingerprint">``) and
the first 12 hex digits of the project file's SHA-256 in its provenance line. A reader
trusts those, so ``verify`` checks that they are the manifest's fingerprint and the
SHA-256 of the project file kept under ``inputs/``: results edited together with a
recomputed fingerprint then still fail, because the pages show the old one.
"""

from __future__ import annotations

import hashlib
import re
from html.parser import HTMLParser

#: The provenance line states "(SHA-256 <first 12 hex digits of the project file>)".
_PROJECT_SHA = re.compile(r"SHA-256\s+([0-9A-Fa-f]*)")


class _PrintedIdentity(HTMLParser):
    """Collects the text of every ``code.fingerprint`` and ``p.provenance-line``."""

    _WATCHED = {"code": "fingerprint", "p": "provenance-line"}

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.fingerprints: list[str] = []
        self.provenance: list[str] = []
        self._open: list[tuple[str, list[str]]] = []   # (tag, text parts) being read

    def handle_starttag(self, tag, attrs):
        classes = (dict(attrs).get("class") or "").split()
        if self._WATCHED.get(tag) in classes:
            self._open.append((tag, []))

    def handle_endtag(self, tag):
        if self._open and self._open[-1][0] == tag:
            tag, parts = self._open.pop()
            text = " ".join("".join(parts).split())
            (self.fingerprints if tag == "code" else self.provenance).append(text)
            if self._open:  # a fingerprint inside the provenance line is part of its text
                self._open[-1][1].append(text)

    def handle_data(self, data):
        if self._open:
            self._open[-1][1].append(data)


def printed_identity(html: bytes) -> tuple[list[str], list[str]] | None:
    """The run fingerprints and project-file SHA-256 prefixes a page shows; None when
    the page cannot be parsed to its end (then it may show anything)."""
    parser = _PrintedIdentity()
    try:
        parser.feed(html.decode("utf-8", errors="replace"))
        parser.close()
    except AssertionError:  # _markupbase's answer to some malformed declarations
        return None
    shas = [match.group(1).lower() for line in parser.provenance
            for match in _PROJECT_SHA.finditer(line)]
    return parser.fingerprints, shas


def page_problems(files: dict[str, bytes], manifest: dict) -> list[str]:
    """
    One line per page whose printed fingerprint or project SHA-256 disagrees with the
    manifest (or that prints no fingerprint at all); pages are the ``.html`` files.
    """
    stated = str(manifest.get("fingerprint", ""))
    project_file = (manifest.get("project") or {}).get("file")
    project_sha = (hashlib.sha256(files[project_file]).hexdigest()
                   if isinstance(project_file, str) and project_file in files else None)
    problems = []
    for path in sorted(p for p in files if p.lower().endswith((".html", ".htm"))):
        printed = printed_identity(files[path])
        if printed is None:
            problems.append(f"{path} cannot be parsed as HTML to its end, so what it shows "
                            f"cannot be checked; a built page always can")
            continue
        fingerprints, shas = printed
        if not fingerprints:
            problems.append(f"{path} shows no run fingerprint; expected {stated!r} as "
                            f"every page of a built site shows it")
        for shown in sorted(set(fingerprints) - {stated}):
            problems.append(f"{path} shows run fingerprint {shown!r}, but manifest.json "
                            f"states {stated!r}")
        if project_sha is not None:
            for shown in sorted({sha for sha in shas if not sha or
                                 not project_sha.startswith(sha)}):
                problems.append(f"{path} shows project file SHA-256 {shown!r}, but "
                                f"'{project_file}' has {project_sha[:12]!r}")
    return problems
