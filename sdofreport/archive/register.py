"""``sdofreport register``: a landing site over many archived runs.

Every packed zip and site folder found under a folder (as CI leaves them) becomes one row:
project, reference, revision, date, number of checks, worst demand / limit, verdicts,
fingerprint and a link to the run, copied into ``runs/<name>/`` so links work offline.
A run holding a page or figure that could run script is listed and marked, never copied
(:mod:`sdofreport.archive._activecontent`).
Each run is verified while the register is built; a run that fails is marked, never
hidden. Rows are ordered by reference, revision and fingerprint; nothing depends on the
time, so rebuilding after adding a run changes only what the new run adds.
"""

from __future__ import annotations

import hashlib
import json
import os
from dataclasses import asdict, dataclass
from pathlib import Path

from sdofreport import __version__
from sdofreport.archive._activecontent import unsafe_content
from sdofreport.archive._pages import common_context, render, stylesheet
from sdofreport.archive._sitefiles import (
    RESULTS_PATH,
    ArchiveError,
    RunFiles,
    parse_results,
    read_run,
    run_name,
    safe_name,
)
from sdofreport.archive.verify import verify_files
from sdofreport.project.model import natural_key
from sdofreport.outputs.serialize import json_text
from sdofreport.site.render import MANIFEST_NAME
from sdofreport.site.tree import write_tree

REGISTER_SCHEMA = "sdofreport/register@1"
#: Marker (and machine-readable table) of a register folder we built.
REGISTER_MARKER = "register.json"


@dataclass
class RegisterRow:
    """One archived run as the register lists it."""

    name: str                  # folder under runs/
    source: str                # path relative to the scanned folder (POSIX)
    title: str
    reference: str
    revision: str
    date: str | None
    fingerprint: str
    checks: int | None
    worst_ratio: float | None
    within: int | None
    exceeding: int | None
    verified: bool
    verification: str          # "verified: …" or "FAILED verification: …"
    link: str | None           # relative link from the register's index.html


@dataclass
class RegisterOutcome:
    output: Path
    rows: list[RegisterRow]

    @property
    def failed(self) -> list[RegisterRow]:
        return [row for row in self.rows if not row.verified]


def is_register(folder: Path) -> bool:
    """True when ``folder`` holds a register this tool built (its marker file says so)."""
    try:
        marker = json.loads((folder / REGISTER_MARKER).read_text("utf-8"))
    except (OSError, ValueError):
        return False
    return isinstance(marker, dict) and marker.get("schema") == REGISTER_SCHEMA


def find_runs(folder: Path, exclude: Path | None = None) -> list[Path]:
    """Site folders (holding manifest.json) and zip files under ``folder``, sorted.

    Hidden entries, ``exclude`` and registers (which hold copies of runs) are skipped."""
    if (folder / MANIFEST_NAME).is_file():
        return [folder]
    found = []
    excluded = exclude.resolve() if exclude is not None else None
    for current, folders, files in os.walk(folder):
        here = Path(current)
        folders[:] = sorted(name for name in folders if not name.startswith(".")
                            and (here / name).resolve() != excluded
                            and not is_register(here / name))
        if MANIFEST_NAME in files:
            found.append(here)
            folders[:] = []
            continue
        found += [here / name for name in sorted(files)
                  if name.lower().endswith(".zip") and not name.startswith(".")]
    return sorted(found)


def _results_summary(files: dict[str, bytes]) -> dict:
    try:
        document = parse_results(files[RESULTS_PATH], RESULTS_PATH)
        checks = [check for system in document.get("systems") or []
                  for check in system.get("checks") or []]
        ratios = [c["ratio"] for c in checks if isinstance(c.get("ratio"), (int, float))]
        return {"checks": len(checks), "worst_ratio": max(ratios) if ratios else None,
                "within": sum(c.get("verdict") == "within limit" for c in checks),
                # Anything but "within limit" (exceeding, unstable, unknown) is counted
                # as not within: a register never reads safer than its runs.
                "exceeding": sum(c.get("verdict") != "within limit" for c in checks)}
    except (KeyError, AttributeError, TypeError, ArchiveError):
        return {"checks": None, "worst_ratio": None, "within": None, "exceeding": None}


def _row(run: RunFiles | None, source: str, problem: str = "") -> RegisterRow:
    if run is None:  # unreadable: listed, marked, nothing to link to
        return RegisterRow(safe_name(Path(source).stem), source, "", "", "", None, "", None,
                           None, None, None, False, f"FAILED verification: {problem}", None)
    manifest = run.manifest()
    report = verify_files(run)
    project = manifest.get("project") or {}
    return RegisterRow(
        name=run_name(manifest), source=source, title=str(project.get("title") or ""),
        reference=str(project.get("reference") or ""),
        revision=str(project.get("revision") or ""), date=project.get("date"),
        fingerprint=str(manifest.get("fingerprint") or ""), **_results_summary(run.files),
        verified=report.ok, verification=report.summary(), link=None)


def _unique_names(rows: list[RegisterRow]) -> None:
    """Rows sharing a name get a suffix from their source path, so both stay listed."""
    counts: dict[str, int] = {}
    for row in rows:
        counts[row.name] = counts.get(row.name, 0) + 1
    for row in rows:
        if counts[row.name] > 1:
            row.name += "-" + hashlib.sha256(row.source.encode("utf-8")).hexdigest()[:8]


def gather_register(folder: str | os.PathLike,
                    exclude: str | os.PathLike | None = None) -> tuple[dict[str, bytes],
                                                                      list[RegisterRow]]:
    """Every file of the register (path → bytes) and its rows, computed in memory."""
    folder = Path(folder)
    if not folder.is_dir():
        raise ArchiveError(f"{folder}: expected a folder holding packed runs (.zip) or site "
                           f"folders, found {'a file' if folder.exists() else 'nothing'}.")
    entries = []
    for path in find_runs(folder, Path(exclude) if exclude is not None else None):
        source = path.relative_to(folder).as_posix() or "."
        try:
            run = read_run(path)
        except ArchiveError as exc:
            # The message names the path relative to ``folder``: no absolute paths in output.
            message = " ".join(exc.message.replace(str(path), source).split())
            entries.append((_row(None, source, message), None))
            continue
        row = _row(run, source)
        unsafe = unsafe_content(run.files)
        if unsafe is not None:  # listed, marked, never copied where a click could run it
            row.verified = False
            row.verification = (f"NOT COPIED: {unsafe}, which could run script or leave "
                                f"the site when opened ({row.verification})")
            run = None
        entries.append((row, run))
    entries.sort(key=lambda e: (natural_key(e[0].reference or ""),
                                natural_key(e[0].revision or ""),
                                e[0].fingerprint or "", e[0].source))
    rows = [row for row, _ in entries]
    _unique_names(rows)
    files: dict[str, bytes] = {}
    for row, run in entries:
        if run is None:
            continue
        for path, data in run.files.items():
            files[f"runs/{row.name}/{path}"] = data
        start = "index.html" if "index.html" in run.files else MANIFEST_NAME
        row.link = f"runs/{row.name}/{start}"
    document = {"schema": REGISTER_SCHEMA, "generator": f"sdofreport {__version__}",
                "runs": [asdict(row) for row in rows]}
    files[REGISTER_MARKER] = json_text(document).encode("utf-8")
    files["static/style.css"] = str(stylesheet()).encode("utf-8")
    context = {**common_context(root="", page_title="Register", page_kind="register",
                                project={"title": "Register of archived runs"}),
               "rows": rows, "failed": sum(not row.verified for row in rows)}
    files["index.html"] = render("register.html", context)
    return dict(sorted(files.items())), rows


def _write_tree(files: dict[str, bytes], output: Path) -> None:
    """Write ``files`` into a temporary sibling of ``output``, then swap it in."""
    write_tree(files, output)


def build_register(folder: str | os.PathLike, output: str | os.PathLike) -> RegisterOutcome:
    """
    Build (or rebuild) the register of every run under ``folder`` into ``output``.

    Raises
    ------
    ArchiveError
        ``folder`` is not a folder, or ``output`` exists and is not a register built
        by this tool (no ``register.json`` of ours) and is not empty.
    """
    output = Path(output)
    if output.exists() and not output.is_dir():
        raise ArchiveError(f"{output}: exists and is not a folder; choose another -o for "
                           f"the register.")
    if output.is_dir() and any(output.iterdir()) and not is_register(output):
        raise ArchiveError(f"{output}: the folder is not empty and is not a register built "
                           f"by sdofreport (no {REGISTER_MARKER} of ours); refusing to "
                           f"replace it. Choose an empty or new folder with -o.")
    files, rows = gather_register(folder, exclude=output)
    _write_tree(files, output)
    return RegisterOutcome(output, rows)
