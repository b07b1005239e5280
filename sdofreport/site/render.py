"""Gather every page and figure, then write the site into a fresh folder and swap it in.

Nothing is written to the output until everything has been rendered in memory and
written to a temporary sibling folder; a failure leaves any previous site untouched.
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

from sdofreport import __version__
from sdofreport.engine import Results
from sdofreport.errors import BuildError
from sdofreport.results_json import peaks_csv, results_document, spectra_csv
from sdofreport.site.context import FigureSpec, SiteContext, dependency_versions

log = logging.getLogger("sdofreport.site")

MANIFEST_SCHEMA = "sdofreport/manifest@1"
MANIFEST_NAME = "manifest.json"


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
    return jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(template_dir())),
        autoescape=True, undefined=jinja2.StrictUndefined,
        trim_blocks=False, lstrip_blocks=False, keep_trailing_newline=True)


def draw_figure(spec: FigureSpec) -> str:
    """SVG text of one figure (a top-level function so it can run in a worker)."""
    from sdofreport.site import figures

    return getattr(figures, spec.function)(**spec.kwargs)


def draw_figures(specs: list[FigureSpec], jobs: int = 1) -> dict[str, str]:
    """Every figure's SVG text by site path, drawn in ``jobs`` processes."""
    if jobs <= 1 or len(specs) < 4:
        return {spec.path: draw_figure(spec) for spec in specs}
    import multiprocessing
    from concurrent.futures import ProcessPoolExecutor

    context = multiprocessing.get_context("fork" if os.name == "posix" else None)
    with ProcessPoolExecutor(max_workers=jobs, mp_context=context) as pool:
        texts = list(pool.map(draw_figure, specs, chunksize=max(1, len(specs) // (4 * jobs))))
    return {spec.path: text for spec, text in zip(specs, texts)}


def _json_text(document: dict) -> str:
    return json.dumps(document, indent=1, ensure_ascii=False, allow_nan=False) + "\n"


def _input_files(results: Results) -> dict[str, Path]:
    """Site path (under inputs/) → source file, for the project file, notes and records."""
    project = results.project
    root = project.root
    files = {f"inputs/{project.path.name}": project.path}
    sources = []
    if project.info.notes_path is not None:
        sources.append(project.info.notes_path)
    sources += [spec.path for spec in project.records]
    for index, source in enumerate(sources, start=1):
        try:
            relative = source.resolve().relative_to(root).as_posix()
            files[f"inputs/{relative}"] = source
        except ValueError:  # outside the project folder (allowed only on request)
            files[f"inputs/_outside/{index:03d}-{source.name}"] = source
    return files


def is_site(folder: Path) -> bool:
    """True when ``folder`` holds a site this tool built (its manifest says so)."""
    try:
        manifest = json.loads((folder / MANIFEST_NAME).read_text("utf-8"))
    except (OSError, ValueError):
        return False
    return isinstance(manifest, dict) and manifest.get("schema") == MANIFEST_SCHEMA


def gather_site(results: Results, *, jobs: int = 1) -> dict[str, bytes]:
    """Every file of the site (path → bytes), manifest included, computed in memory."""
    context = SiteContext(results)
    pages = context.pages()
    env = _environment()
    files: dict[str, bytes] = {}
    for page in pages:
        try:
            html = env.get_template(page.template).render(**page.context)
        except jinja2.TemplateError as exc:
            raise BuildError(f"page {page.path} could not be rendered: {exc}") from None
        files[page.path] = html.encode("utf-8")
    for path, svg in draw_figures(context.figures, jobs).items():
        files[path] = svg.encode("utf-8")
    files["static/style.css"] = (template_dir() / "static" / "style.css").read_bytes()
    files["data/results.json"] = _json_text(results_document(results)).encode("utf-8")
    files["data/spectra.csv"] = spectra_csv(results).encode("utf-8")
    files["data/peaks.csv"] = peaks_csv(results).encode("utf-8")
    for site_path, source in _input_files(results).items():
        files[site_path] = source.read_bytes()
    files[MANIFEST_NAME] = _json_text(manifest_document(results, files)).encode("utf-8")
    return files


def manifest_document(results: Results, files: dict[str, bytes]) -> dict:
    hashes = {path: hashlib.sha256(data).hexdigest() for path, data in sorted(files.items())
              if path != MANIFEST_NAME}
    inputs = sorted(path for path in files if path.startswith("inputs/"))
    return {
        "schema": MANIFEST_SCHEMA,
        "package": {"name": "sdofreport", "version": __version__},
        "dependencies": dict(dependency_versions()),
        "platform": {"system": platform.system(), "machine": platform.machine(),
                     "python_implementation": platform.python_implementation()},
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


def write_site(files: dict[str, bytes], output: str | os.PathLike) -> Path:
    """
    Write ``files`` into ``output`` through a temporary sibling folder and a swap.

    Refuses to replace an existing non-empty folder that is not a site built by this
    tool. A failure at any point leaves the previous site (if any) intact.
    """
    output = Path(output)
    if output.exists() and not output.is_dir():
        raise BuildError(f"{output}: exists and is not a folder; choose another -o.")
    if output.is_dir() and any(output.iterdir()) and not is_site(output):
        raise BuildError(f"{output}: the folder is not empty and is not a site built by "
                         f"sdofreport (no {MANIFEST_NAME} of ours); refusing to replace "
                         f"it. Choose an empty or new folder with -o.")
    parent = output.resolve().parent
    parent.mkdir(parents=True, exist_ok=True)
    staging = Path(tempfile.mkdtemp(prefix=f".{output.name}.building-", dir=parent))
    try:
        for path, data in sorted(files.items()):
            target = staging / path
            target.parent.mkdir(parents=True, exist_ok=True)
            target.write_bytes(data)
        for folder in [staging, *(p for p in staging.rglob("*") if p.is_dir())]:
            folder.chmod(0o755)
        for file in staging.rglob("*"):
            if file.is_file():
                file.chmod(0o644)
        if output.exists():
            retired = Path(tempfile.mkdtemp(prefix=f".{output.name}.previous-", dir=parent))
            os.replace(output, retired / "site")
            os.replace(staging, output)
            shutil.rmtree(retired, ignore_errors=True)
        else:
            os.replace(staging, output)
    except BaseException:
        shutil.rmtree(staging, ignore_errors=True)
        raise
    return output
