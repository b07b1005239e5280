"""Gather every page and figure, then write the site into a fresh folder and swap it in.

Nothing is written to the output until everything has been rendered in memory and
written to a temporary sibling folder; a failure leaves any previous site untouched.
"""

from __future__ import annotations

import functools
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


#: Figure functions that write SVG directly (milliseconds each, not tenths of a second).
DIRECT_SVG_FIGURES = frozenset({"histories_figure", "spectra_figure", "fourier_figure"})
#: Figures per task sent to a worker: small enough to balance the load, large enough
#: that sending tasks costs little beside drawing them.
FIGURE_CHUNK = 8


def draw_figure(spec: FigureSpec) -> str:
    """SVG text of one figure (a top-level function so it can run in a worker)."""
    from sdofreport.site import figures

    return getattr(figures, spec.function)(**spec.kwargs)


def _draw_chunk(specs: list[FigureSpec]) -> list[str]:
    """SVG texts of a few figures, in order (one task for a worker)."""
    return [draw_figure(spec) for spec in specs]


# The figure list a forked worker inherits from the build process, so that only index
# ranges travel to it, not the histories behind each figure. Set only while drawing.
_INHERITED: list[FigureSpec] = []


def _draw_inherited(bounds: tuple[int, int]) -> list[str]:
    """SVG texts of figures ``bounds[0]:bounds[1]`` of the inherited list."""
    return _draw_chunk(_INHERITED[bounds[0]:bounds[1]])


def _draw_in_workers(todo: list[FigureSpec], jobs: int) -> list[str]:
    """
    SVG texts of ``todo`` (in its order), drawn by ``jobs`` worker processes.

    Matplotlib figures (tenths of a second each) go first, then the direct-SVG ones
    (milliseconds), in chunks small enough that the workers finish together. Where
    processes are forked, workers read the figures from the memory they inherit and only
    index ranges are sent; elsewhere the figures themselves are sent. This process only
    feeds the workers: drawing here too would hold the interpreter lock the executor's
    feeder thread needs, and starve them (measured). Who draws a figure does not change
    its bytes.
    """
    import multiprocessing
    from concurrent.futures import ProcessPoolExecutor

    order = sorted(range(len(todo)), key=lambda i: todo[i].function in DIRECT_SVG_FIGURES)
    ordered = [todo[i] for i in order]
    bounds = [(i, min(i + FIGURE_CHUNK, len(ordered)))
              for i in range(0, len(ordered), FIGURE_CHUNK)]
    fork = os.name == "posix" and "fork" in multiprocessing.get_all_start_methods()
    context = multiprocessing.get_context("fork" if fork else None)
    global _INHERITED
    try:
        if fork:
            _INHERITED = ordered
        with ProcessPoolExecutor(max_workers=jobs, mp_context=context) as pool:
            if fork:
                parts = pool.map(_draw_inherited, bounds)
            else:
                parts = pool.map(_draw_chunk, [ordered[a:b] for a, b in bounds])
            texts = [text for part in parts for text in part]
    finally:
        _INHERITED = []
    drawn = [""] * len(todo)
    for position, index in enumerate(order):
        drawn[index] = texts[position]
    return drawn


def _feed(digest, value) -> None:
    """Feed a figure argument into a hash: arrays by dtype, shape and bytes."""
    if isinstance(value, np.ndarray):
        array = np.ascontiguousarray(value)
        digest.update(f"a{array.dtype.str}{array.shape}".encode())
        digest.update(array.tobytes())
    elif isinstance(value, dict):
        digest.update(b"{")
        for key in sorted(value):
            digest.update(repr(key).encode())
            _feed(digest, value[key])
        digest.update(b"}")
    elif isinstance(value, (list, tuple)):
        digest.update(b"[")
        for item in value:
            _feed(digest, item)
        digest.update(b"]")
    else:
        digest.update(repr(value).encode())


@functools.lru_cache(maxsize=1)
def _matplotlib_version() -> str:
    """Installed matplotlib version, read from its metadata (importing it costs ~0.4 s,
    which a build whose figures all come from the cache need not pay)."""
    from importlib.metadata import version

    return version("matplotlib")


def figure_key(spec: FigureSpec) -> str:
    """Content hash of a figure: function, arguments and the versions that draw it."""
    digest = hashlib.sha256(f"figure|{__version__}|{_matplotlib_version()}|"
                            f"{spec.function}".encode())
    _feed(digest, spec.kwargs)
    return digest.hexdigest()


def draw_figures(specs: list[FigureSpec], jobs: int = 1, cache=None) -> dict[str, str]:
    """
    Every figure's SVG text by site path, drawn in ``jobs`` processes.

    With a ``cache`` (:class:`sdofreport.engine.ResultCache`), figures whose inputs did
    not change are taken from it instead of being drawn again.
    """
    texts: dict[str, str] = {}
    keys = {spec.path: figure_key(spec) for spec in specs} if cache is not None else {}
    todo = []
    for spec in specs:
        cached = cache.get(keys[spec.path]) if cache is not None else None
        if isinstance(cached, str):
            texts[spec.path] = cached
        else:
            todo.append(spec)
    if jobs <= 1 or len(todo) < 2 * FIGURE_CHUNK:
        drawn = [draw_figure(spec) for spec in todo]
    else:
        drawn = _draw_in_workers(todo, jobs)
    for spec, text in zip(todo, drawn):
        texts[spec.path] = text
        if cache is not None:
            cache.put(keys[spec.path], text)
    return {spec.path: texts[spec.path] for spec in specs}


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


def gather_site(results: Results, *, jobs: int = 1, figure_cache=None,
                extra_pages=None) -> dict[str, bytes]:
    """
    Every file of the site (path → bytes), manifest included, computed in memory.

    ``extra_pages(results_document, fingerprint) -> dict[path, bytes]`` may add pages
    (the revision page of ``--compare-to``); they are linked from the summary page's
    navigation when one of them is ``revision.html``.
    """
    files: dict[str, bytes] = {}
    document = results_document(results)
    files["data/results.json"] = _json_text(document).encode("utf-8")
    for site_path, source in _input_files(results).items():
        files[site_path] = source.read_bytes()
    run_fingerprint = manifest_document(results, files)["fingerprint"]
    extra = extra_pages(document, run_fingerprint) if extra_pages else {}
    context = SiteContext(results, fingerprint=run_fingerprint,
                          revision="revision.html" in extra)
    pages = context.pages()
    env = _environment()
    for page in pages:
        try:
            html = env.get_template(page.template).render(**page.context)
        except jinja2.TemplateError as exc:
            raise BuildError(f"page {page.path} could not be rendered: {exc}") from None
        files[page.path] = html.encode("utf-8")
    for path, svg in draw_figures(context.figures, jobs, figure_cache).items():
        files[path] = svg.encode("utf-8")
    files["static/style.css"] = (template_dir() / "static" / "style.css").read_bytes()
    files.update(extra)
    files.update(_synthetic_files(results))
    files["data/spectra.csv"] = spectra_csv(results).encode("utf-8")
    files["data/peaks.csv"] = peaks_csv(results).encode("utf-8")
    files[MANIFEST_NAME] = _json_text(manifest_document(results, files)).encode("utf-8")
    return files


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


def manifest_document(results: Results, files: dict[str, bytes]) -> dict:
    """The manifest: versions, platform, settings and the SHA-256 of every site file."""
    hashes = {path: hashlib.sha256(data).hexdigest() for path, data in sorted(files.items())
              if path != MANIFEST_NAME}
    inputs = sorted(path for path in files if path.startswith("inputs/"))
    document = {
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
    document["fingerprint"] = fingerprint(document)
    return document


def _exchange(a: Path, b: Path) -> bool:
    """Atomically swap two paths (Linux renameat2 RENAME_EXCHANGE); False if unsupported."""
    if os.name != "posix":
        return False
    try:
        import ctypes
        import ctypes.util

        libc = ctypes.CDLL(ctypes.util.find_library("c") or None, use_errno=True)
        renameat2 = libc.renameat2
    except (OSError, AttributeError):
        return False
    at_fdcwd, rename_exchange = -100, 2
    result = renameat2(at_fdcwd, os.fsencode(str(a)), at_fdcwd, os.fsencode(str(b)),
                       rename_exchange)
    return result == 0


def recover_site(output: str | os.PathLike) -> None:
    """Put back a previous site left aside by a build killed between two renames."""
    output = Path(output)
    if output.exists():
        return
    parent = output.resolve().parent
    for candidate in sorted(parent.glob(f".{output.name}.previous-*/site")):
        if is_site(candidate):
            os.replace(candidate, output)
            log.warning("restored the previous site from %s (an earlier build was "
                        "interrupted)", candidate.parent)
            return


def _tidy(output: Path) -> None:
    """Remove staging and retired folders that interrupted builds left beside the site."""
    parent = output.resolve().parent
    for pattern in (f".{output.name}.building-*", f".{output.name}.previous-*"):
        for folder in parent.glob(pattern):
            shutil.rmtree(folder, ignore_errors=True)


def write_site(files: dict[str, bytes], output: str | os.PathLike) -> Path:
    """
    Write ``files`` into ``output`` through a temporary sibling folder and a swap.

    Refuses to replace an existing non-empty folder that is not a site built by this
    tool. The swap is atomic where the system allows (Linux ``renameat2`` exchange), so a
    build killed at any moment leaves either the previous site or the new one in place;
    elsewhere a previous site left aside is restored by the next build.
    """
    output = Path(output)
    recover_site(output)
    if output.exists() and not output.is_dir():
        raise BuildError(f"{output}: exists and is not a folder; choose another -o.")
    if output.is_dir() and any(output.iterdir()) and not is_site(output):
        raise BuildError(f"{output}: the folder is not empty and is not a site built by "
                         f"sdofreport (no {MANIFEST_NAME} of ours); refusing to replace "
                         f"it. Choose an empty or new folder with -o.")
    _tidy(output)
    return write_tree(files, output)


def write_tree(files: dict[str, bytes], output: str | os.PathLike) -> Path:
    """
    Write ``files`` (relative path → bytes) into a temporary sibling of ``output`` and
    swap it in: atomically where the system allows (Linux ``renameat2`` exchange), else
    by two renames with the previous tree kept aside until the new one is in place.
    """
    output = Path(output)
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
            if _exchange(staging, output):
                shutil.rmtree(staging, ignore_errors=True)  # now holds the old site
            else:
                retired = Path(tempfile.mkdtemp(prefix=f".{output.name}.previous-",
                                                dir=parent))
                os.replace(output, retired / "site")
                os.replace(staging, output)
                shutil.rmtree(retired, ignore_errors=True)
        else:
            os.replace(staging, output)
    except BaseException:
        shutil.rmtree(staging, ignore_errors=True)
        raise
    return output
