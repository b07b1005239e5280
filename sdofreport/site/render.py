"""Render every page, table and figure of the site into a staged tree, manifest last.

The tree is a temporary sibling of the output folder (:mod:`sdofreport.site.tree`),
swapped in only once complete; nothing is written into the output itself, so a failure
leaves any previous site untouched.
"""

from __future__ import annotations

import hashlib
import json
import logging
import os
import platform
import shutil
import tempfile
from pathlib import Path

import jinja2
import numpy as np

from sdofreport import __version__
from sdofreport.engine import Results
from sdofreport.errors import BuildError
from sdofreport.fsio import move_into_place
from sdofreport.outputs.results_json import checks_csv, peaks_csv, results_document, spectra_csv
from sdofreport.outputs.serialize import json_text as _json_text
from sdofreport.site.context import SiteContext, dependency_versions, record_figures
from sdofreport.site.drawing import FigureWriter
from sdofreport.site.spreadsheet import results_workbook
from sdofreport.site.symbols import html_symbols
from sdofreport.site.tree import RETIRED_PREFIX, STAGING_PREFIX, StagedTree

log = logging.getLogger("sdofreport.site")

MANIFEST_SCHEMA = "sdofreport/manifest@1"
MANIFEST_NAME = "manifest.json"
#: Where a build with ``--compare-to`` keeps the earlier run's results.json: an input of
#: the revision page, covered by the fingerprint, so ``verify --rerun`` rebuilds it.
COMPARE_TO_INPUT = "inputs/_compare-to/results.json"
#: The earlier run's fingerprint, kept beside its results.
COMPARE_TO_FINGERPRINT = COMPARE_TO_INPUT.rsplit("/", 1)[0] + "/fingerprint.txt"


def template_dir() -> Path:
    """The templates folder: inside the installed package, else the checkout's root."""
    packaged = Path(__file__).resolve().parent.parent / "templates"
    if (packaged / "base.html").is_file():
        return packaged
    checkout = Path(__file__).resolve().parents[2] / "templates"
    if (checkout / "base.html").is_file():
        return checkout
    raise BuildError(f"templates not found (looked in {packaged} and {checkout}); the "
                     f"installation is incomplete.")


def _environment() -> jinja2.Environment:
    env = jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(template_dir())),
        autoescape=True, undefined=jinja2.StrictUndefined,
        trim_blocks=False, lstrip_blocks=False, keep_trailing_newline=True)
    env.filters["symbols"] = html_symbols
    return env


def _input_files(results: Results) -> dict[str, Path]:
    """Site path (under inputs/) → source file, for the project file, notes and records."""
    project = results.project
    root = project.root
    files = {f"inputs/{project.path.name}": project.path}
    sources = []
    if project.info.notes_path is not None:
        sources.append(project.info.notes_path)
    sources += [spec.path for spec in project.records if spec.path is not None]
    for index, source in enumerate(sources, start=1):
        try:
            relative = source.resolve().relative_to(root).as_posix()
            files[f"inputs/{relative}"] = source
        except ValueError:  # outside the project folder (allowed only on request)
            files[f"inputs/_outside/{index:03d}-{source.name}"] = source
    return files


def _synthetic_files(results: Results) -> dict[str, bytes]:
    """Synthetic records (made at build time) as two-column files under data/synthetic/."""
    from sdofreport.core.units import G
    from sdofreport.records.writers import write_two_column

    files = {}
    with tempfile.TemporaryDirectory() as tmp:
        for item in results.records:
            if item.spec.path is not None:
                continue
            target = Path(tmp) / f"{item.record.id}.csv"
            write_two_column(target, item.record.dt_s,
                             np.asarray(item.record.acceleration_m_s2) / G, units="g",
                             header_lines=(f"{item.record.id}: {item.record.history[0]}",
                                           "as used in this run (after any scaling)"))
            files[f"data/synthetic/{item.record.id}.csv"] = target.read_bytes()
    return files


def is_site(folder: Path) -> bool:
    """True when ``folder`` holds a site this tool built (its manifest says so)."""
    try:
        manifest = json.loads((folder / MANIFEST_NAME).read_text("utf-8"))
    except (OSError, ValueError):
        return False
    return isinstance(manifest, dict) and manifest.get("schema") == MANIFEST_SCHEMA


def start_record_figures(project, records, tree: StagedTree, *, jobs: int = 1,
                         figure_cache=None) -> FigureWriter:
    """
    Start drawing the record pages' figures into ``tree`` (by ``jobs`` workers when
    worth it) as soon as the records' results exist, while the engine computes the
    responses; hand the writer to :func:`gather_site` as ``early``.
    """
    return FigureWriter(record_figures(project, records), tree.folder, jobs=jobs,
                        cache=figure_cache)


def gather_site(results: Results, tree: StagedTree, *, jobs: int = 1, figure_cache=None,
                extra_pages=None, extra_inputs: dict[str, bytes] | None = None,
                early: FigureWriter | None = None) -> int:
    """
    Write every file of the site into ``tree``, the manifest last; the number of files.

    Figures are drawn (by ``jobs`` worker processes when worth it) while this process
    renders the pages and tables, and each goes straight into the tree. With a
    ``figure_cache`` (:class:`sdofreport.engine.ResultCache`), figures whose inputs did not
    change are taken from it. ``extra_pages(results_document, fingerprint) -> dict[path,
    bytes]`` may add pages (the revision page of ``--compare-to``); they are linked from
    the summary page's navigation when one of them is ``revision.html``; ``extra_inputs``
    (site path under ``inputs/`` → bytes) are kept as inputs, covered by the
    fingerprint. Figures an
    ``early`` writer (:func:`start_record_figures`) already handles are not drawn again.
    """
    hashes: dict[str, str] = {}

    def put(path: str, data: bytes) -> None:
        hashes[path] = tree.write(path, data)

    context = SiteContext(results)
    pages = context.pages()
    handled = early.paths if early is not None else set()
    rest = [spec for spec in context.figures if spec.path not in handled]
    with FigureWriter(rest, tree.folder, jobs=jobs, cache=figure_cache) as figures:
        document = results_document(results)
        put("data/results.json", _json_text(document).encode("utf-8"))
        for site_path, source in _input_files(results).items():
            put(site_path, source.read_bytes())
        for site_path, data in (extra_inputs or {}).items():
            put(site_path, data)
        # The fingerprint covers the inputs and results.json; every page shows it.
        run_fingerprint = manifest_document(results, hashes)["fingerprint"]
        extra = extra_pages(document, run_fingerprint) if extra_pages else {}
        stamp = {"fingerprint": run_fingerprint, "has_revision": "revision.html" in extra}
        env = _environment()
        for page in pages:
            try:
                html = env.get_template(page.template).render(**page.context, **stamp)
            except jinja2.TemplateError as exc:
                raise BuildError(f"page {page.path} could not be rendered: {exc}") from None
            put(page.path, html.encode("utf-8"))
        put("static/style.css", (template_dir() / "static" / "style.css").read_bytes())
        for path, data in {**extra, **_synthetic_files(results)}.items():
            put(path, data)
        put("data/spectra.csv", spectra_csv(results).encode("utf-8"))
        put("data/peaks.csv", peaks_csv(results).encode("utf-8"))
        put("data/checks.csv", checks_csv(results).encode("utf-8"))
        put("data/results.xlsx", results_workbook(document))
        if early is not None:
            hashes.update(early.result())
        hashes.update(figures.result())
    tree.write(MANIFEST_NAME, _json_text(manifest_document(results, hashes)).encode("utf-8"))
    return len(hashes) + 1


#: Manifest fields the fingerprint covers (besides the hashes of inputs and results).
FINGERPRINT_FIELDS = ("package", "dependencies", "platform", "settings")


def fingerprint(manifest: dict) -> str:
    """
    Short fingerprint of a run: SHA-256 over the versions, platform, settings and the
    hashes of every input and of ``data/results.json``, in canonical JSON; 16 hex digits.

    Pages are left out so the summary page can show it; ``verify`` recomputes it.
    """
    files = manifest.get("files", {})
    covered = {name: manifest.get(name) for name in FINGERPRINT_FIELDS}
    covered["files"] = {path: digest for path, digest in sorted(files.items())
                        if path.startswith("inputs/") or path == "data/results.json"}
    text = json.dumps(covered, sort_keys=True, separators=(",", ":"), ensure_ascii=True)
    return hashlib.sha256(text.encode("ascii")).hexdigest()[:16]


def manifest_versions() -> dict:
    """The manifest's ``package``, ``dependencies`` and ``platform`` fields for the
    installed versions (``verify --rerun`` names those that differ from a site's)."""
    return {"package": {"name": "sdofreport", "version": __version__},
            "dependencies": dict(dependency_versions()),
            "platform": {"system": platform.system(), "machine": platform.machine(),
                         "python_implementation": platform.python_implementation()}}


def manifest_document(results: Results, hashes: dict[str, str]) -> dict:
    """The manifest: versions, platform, settings and the SHA-256 of every site file
    (``hashes``: site path → hex digest)."""
    hashes = {path: digest for path, digest in sorted(hashes.items())
              if path != MANIFEST_NAME}
    inputs = sorted(path for path in hashes if path.startswith("inputs/"))
    document = {
        "schema": MANIFEST_SCHEMA,
        **manifest_versions(),
        "project": {"file": f"inputs/{results.project.path.name}",
                    "title": results.project.info.title,
                    "reference": results.project.info.reference,
                    "revision": results.project.info.revision,
                    "date": results.project.info.date},
        "settings": {"analysis": results.project.analysis.as_dict(),
                     "processing": results.project.processing.as_dict(),
                     "statistic_used": results.statistic},
        "inputs": inputs,
        "files": hashes,
    }
    document["fingerprint"] = fingerprint(document)
    return document


def recover_site(output: str | os.PathLike) -> None:
    """Put back a previous site left aside by a build killed between two renames."""
    output = Path(output)
    if output.exists():
        return
    parent = output.resolve().parent
    uid = os.getuid() if hasattr(os, "getuid") else None
    for candidate in sorted(parent.glob(f".{output.name}{RETIRED_PREFIX}*/site")):
        # Only what this user's own build left aside: in a folder others may write, a
        # planted "previous site" must not become the site.
        if candidate.is_symlink() or (uid is not None and (
                candidate.lstat().st_uid != uid or candidate.parent.lstat().st_uid != uid)):
            continue
        if is_site(candidate):
            move_into_place(candidate, output)
            log.warning("restored the previous site from %s (an earlier build was "
                        "interrupted)", candidate.parent)
            return


def _tidy(output: Path) -> None:
    """Remove staging and retired folders that interrupted builds left beside the site."""
    parent = output.resolve().parent
    for pattern in (f".{output.name}{STAGING_PREFIX}*", f".{output.name}{RETIRED_PREFIX}*"):
        for folder in parent.glob(pattern):
            shutil.rmtree(folder, ignore_errors=True)


def prepare_output(output: str | os.PathLike) -> Path:
    """
    Check that ``output`` may receive a site, before any work is done: put back a
    previous site an interrupted build left aside, refuse an existing non-empty folder
    that is not a site built by this tool, and remove leftover staging folders.
    """
    output = Path(output)
    recover_site(output)
    if output.exists() and not output.is_dir():
        raise BuildError(f"{output}: exists and is not a folder; choose another -o.")
    owner = output.stat().st_uid if output.exists() and hasattr(os, "getuid") else None
    if owner is not None and owner != os.getuid() and os.getuid() != 0:
        raise BuildError(f"{output}: the folder belongs to another user (uid {owner}); a "
                         f"build replaces the whole folder, which only its owner may do. "
                         f"Ask them to remove it, or choose another -o.")
    if output.is_dir() and any(output.iterdir()) and not is_site(output):
        raise BuildError(f"{output}: the folder is not empty and is not a site built by "
                         f"sdofreport (no {MANIFEST_NAME} of ours); refusing to replace "
                         f"it. Choose an empty or new folder with -o.")
    _tidy(output)
    return output
