"""``sdofreport build``: project file → results → site (staged beside the output, swapped in)."""

from __future__ import annotations

import contextlib
import logging
import os
import time
from contextlib import ExitStack
from dataclasses import dataclass
from pathlib import Path

from sdofreport.engine import Progress, ResultCache, Results, default_cache_dir, run_project
from sdofreport.errors import ProjectError
from sdofreport.project import load_project
from sdofreport.project.quantities import without_memo
from sdofreport.outputs.serialize import json_text
from sdofreport.site.render import (COMPARE_TO_FINGERPRINT, COMPARE_TO_INPUT, gather_site,
                                    prepare_output, recover_site, start_record_figures)
from sdofreport.site.tree import OutputLock, StagedTree, output_folder

log = logging.getLogger("sdofreport.build")

#: The earlier run's fingerprint, kept beside its results (COMPARE_TO_INPUT).
_KEPT_FINGERPRINT = COMPARE_TO_FINGERPRINT


def _old_fingerprint(old_run, compare_to) -> str:
    """The earlier run's fingerprint: from its manifest, or, for kept results being
    rebuilt, from the fingerprint file beside them; empty when neither exists."""
    fingerprint = (old_run.manifest or {}).get("fingerprint")
    if isinstance(fingerprint, str) and fingerprint:
        return fingerprint
    beside = Path(compare_to).parent / _KEPT_FINGERPRINT.rsplit("/", 1)[1]
    if Path(compare_to).name == "results.json" and beside.is_file():
        text = beside.read_text(encoding="ascii", errors="replace").strip()
        return text if text.isalnum() and len(text) <= 64 else ""
    return ""


@dataclass(frozen=True)
class BuildOutcome:
    output: Path
    results: Results
    file_count: int
    seconds: float


def _check_inside(project, allow_outside: bool) -> None:
    if allow_outside:
        return
    root = project.root
    outside = []
    paths = [("project.notes", project.info.notes_path)] + [
        (f"records id {spec.id!r} file", spec.path) for spec in project.records]
    for label, path in paths:
        if path is None:  # a synthetic record has no file
            continue
        try:
            path.resolve().relative_to(root)
        except ValueError:
            outside.append(f"  {label}: '{path}' is outside the project folder {root}")
    if outside:
        raise ProjectError(f"{project.path}: {len(outside)} input file(s) lie outside the "
                           f"project folder, so the site could not be archived with them "
                           f"in place:\n" + "\n".join(outside) +
                           "\n  Move them into the project folder, or pass --allow-outside.")


def build_site(project_file: str | os.PathLike, output: str | os.PathLike, *,
               jobs: int | None = None, cache_dir: str | os.PathLike | None = None,
               use_cache: bool = True, allow_outside: bool = False,
               progress: Progress | None = None, scheduler: str | None = None,
               dask_local: int | None = None,
               compare_to: str | os.PathLike | None = None) -> BuildOutcome:
    """
    Validate the project, compute every result, render every page into a staged tree,
    then swap it in for ``output``.

    With ``compare_to``, the earlier run's results are kept as an input
    (:data:`~sdofreport.site.render.COMPARE_TO_INPUT`), so ``verify --rerun`` can rebuild
    the revision page too.

    Raises :class:`~sdofreport.errors.SdofreportError` subclasses for bad input; in that
    case nothing is written and any previous site at ``output`` is left intact. Only one
    build at a time writes into one folder (:class:`~sdofreport.site.tree.OutputLock`);
    another one meanwhile is refused.
    """
    started = time.perf_counter()
    output = output_folder(output)  # not a symbolic link, not the current folder
    with OutputLock(output):
        return _build_locked(project_file, output, started, jobs=jobs, cache_dir=cache_dir,
                             use_cache=use_cache, allow_outside=allow_outside,
                             progress=progress, scheduler=scheduler,
                             dask_local=dask_local, compare_to=compare_to)


def _build_locked(project_file, output: Path, started: float, *, jobs, cache_dir,
                  use_cache, allow_outside, progress, scheduler, dask_local,
                  compare_to) -> BuildOutcome:
    """:func:`build_site` once the output folder is locked."""
    recover_site(output)  # a previous build killed mid-swap: put its site back first
    old = None
    if compare_to is not None:  # read it first: a bad OLD fails before any work
        from sdofreport.archive.compare import load_run

        old_run = load_run(compare_to)
        old = old_run.results
    with contextlib.nullcontext() if use_cache else without_memo():
        project = load_project(project_file)  # --no-cache: no remembered unit strings
    _check_inside(project, allow_outside)
    prepare_output(output)  # a folder that cannot take the site fails before any work
    figure_cache = None
    if use_cache:  # a folder another user could write is not used (and reported)
        folder = ResultCache(cache_dir or default_cache_dir()).folder
        use_cache = folder is not None
        if use_cache:
            cache_dir, figure_cache = folder, ResultCache(folder / "figures")
    extra = None
    kept_inputs = {}
    if old is not None:
        from sdofreport.archive.compare import revision_page

        kept_inputs[COMPARE_TO_INPUT] = json_text(old).encode("utf-8")
        old_fingerprint = _old_fingerprint(old_run, compare_to)
        if old_fingerprint:  # kept beside the results, so a rerun shows it too
            kept_inputs[_KEPT_FINGERPRINT] = old_fingerprint.encode("ascii")

        def extra(document, fingerprint):
            return revision_page(old, document, fingerprint=fingerprint,
                                 old_fingerprint=old_fingerprint)
    workers = jobs or os.cpu_count() or 1
    with ExitStack() as stack:  # on leaving: stop any figure workers, then the tree
        staged: list[StagedTree] = []
        early: list = []

        def tree() -> StagedTree:
            if not staged:
                staged.append(stack.enter_context(StagedTree(output)))
            return staged[0]

        def records_ready(records) -> None:
            # Record figures need no response: workers draw them meanwhile.
            early.append(stack.enter_context(start_record_figures(
                project, records, tree(), jobs=workers, figure_cache=figure_cache)))

        results = run_project(project, jobs=jobs, cache_dir=cache_dir, use_cache=use_cache,
                              progress=progress, scheduler=scheduler, dask_local=dask_local,
                              records_ready=records_ready if workers > 1 else None)
        render_started = time.perf_counter()
        count = gather_site(results, tree(), jobs=workers, figure_cache=figure_cache,
                            extra_pages=extra, extra_inputs=kept_inputs,
                            early=early[0] if early else None)
        write_started = time.perf_counter()
        path = tree().commit()
    finished = time.perf_counter()
    # Pages, tables and figures are written as they are rendered; "write" is the swap.
    results.timings_s.update({"render_s": write_started - render_started,
                              "write_s": finished - write_started,
                              "total_s": finished - started})
    log.info("built %d files in %.2f s", count, finished - started)
    return BuildOutcome(path, results, count, finished - started)
