"""Draw the site's figures into a staged tree: in this process or in worker processes.

Each figure is looked up in the figure cache by a content hash of its function, its
arguments and the versions that draw it; a miss is drawn and stored. Whoever handles a
figure writes its SVG file straight into the staging folder and sends back only the
file's SHA-256, so the build process neither draws nor moves figure text. Who draws a
figure does not change its bytes.

This module only schedules: it calls the ``*_figure`` functions of
:mod:`sdofreport.site.figures` by name and never draws or imports a back-end
(matplotlib or :mod:`sdofreport.site.svg_panels`) itself.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path


from sdofreport import __version__
from sdofreport.engine.executors import local_pool, process_context, worker_state
from sdofreport.site.context import FigureSpec
from sdofreport.site.tree import write_file

#: Figure functions that write SVG directly (milliseconds each, not tenths of a second).
DIRECT_SVG_FIGURES = frozenset({"histories_figure", "spectra_figure", "fourier_figure",
                                "fragility_figure"})
#: Figures per task sent to a worker: small enough to balance the load, large enough
#: that sending tasks costs little beside drawing them.
FIGURE_CHUNK = 8


def draw_figure(spec: FigureSpec) -> str:
    """SVG text of one figure (a top-level function so it can run in a worker)."""
    from sdofreport.site import figures

    return getattr(figures, spec.function)(**spec.kwargs)


def figure_key(spec: FigureSpec) -> str:
    """Cache key of a figure (:func:`sdofreport.engine.cache.cache_key`): its function, its
    arguments (arrays by digest) and the versions that draw it."""
    from sdofreport.engine.cache import cache_key
    from sdofreport.site.figures import matplotlib_version

    return cache_key({"version": __version__, "job": "figure",
                      "matplotlib": matplotlib_version(), "function": spec.function,
                      "kwargs": spec.kwargs})


def _figure_svg(spec: FigureSpec, cache) -> str:
    """A figure's SVG text from the cache, else drawn (and then stored in the cache)."""
    if cache is None:
        return draw_figure(spec)
    key = figure_key(spec)
    text = cache.get(key)
    if not isinstance(text, str):
        text = draw_figure(spec)
        cache.put(key, text)
    return text


def _write_figures(specs: list[FigureSpec], folder: str, cache, made: set[str]) \
        -> list[str]:
    """Draw (or take from the cache) and write ``specs`` into ``folder``; their SHA-256.
    ``made`` holds the folders of the tree this process has created (see
    :func:`sdofreport.site.tree.write_file`)."""
    return [write_file(Path(folder), spec.path, _figure_svg(spec, cache).encode("utf-8"),
                       made) for spec in specs]


@dataclass
class _Drawing:
    """What the workers of one :class:`FigureWriter` are started with (the ``state`` of
    :func:`sdofreport.engine.executors.local_pool`): the figures in drawing order, the tree
    folder, the figure cache and the shared counter of the next figure to claim."""

    specs: list[FigureSpec]
    folder: str
    cache: object
    counter: object
    made: set[str] = field(default_factory=set)


def _write_claimed(_worker: int) -> list[tuple[int, str]]:
    """
    Claim chunks of this worker's figure list (:class:`_Drawing`) from its shared
    counter and write them, until none is left: (position, SHA-256) of each figure this
    worker wrote. Workers that serve themselves never wait for the build process to hand
    out work.
    """
    drawing: _Drawing = worker_state()
    specs, counter = drawing.specs, drawing.counter
    written: list[tuple[int, str]] = []
    while True:
        with counter.get_lock():
            start = counter.value
            counter.value = start + FIGURE_CHUNK
        if start >= len(specs):
            return written
        stop = min(start + FIGURE_CHUNK, len(specs))
        written.extend(zip(range(start, stop), _write_figures(
            list(specs[start:stop]), drawing.folder, drawing.cache, drawing.made)))


class FigureWriter:
    """
    Writes every figure of a site into a staged tree, started before and collected
    after the build process's own work, so that the two overlap.

    With ``jobs`` > 1 and enough figures, ``jobs`` worker processes draw them:
    matplotlib figures (tenths of a second each) first, then the direct-SVG ones
    (milliseconds), in chunks small enough that the workers finish together. Each worker
    is started with the figure list (inherited under fork, pickled once per worker
    otherwise) and claims chunks from a shared counter, so the workers keep drawing
    however busy this process is. Otherwise :meth:`result` draws them here. Use as a
    context manager: leaving it stops the workers after their current chunk.
    """

    def __init__(self, specs: list[FigureSpec], folder: Path, *, jobs: int = 1,
                 cache=None) -> None:
        self.specs, self.folder, self.cache = list(specs), str(folder), cache
        self._pool = None
        self._parts = None
        self._counter = None
        self._order: list[int] = []
        if jobs > 1 and len(self.specs) >= 2 * FIGURE_CHUNK:
            self._start(jobs)

    def _start(self, jobs: int) -> None:
        from sdofreport.site import figures  # noqa: F401  (imported once, inherited)

        specs = self.specs
        self._order = sorted(range(len(specs)),
                             key=lambda i: specs[i].function in DIRECT_SVG_FIGURES)
        ordered = [specs[i] for i in self._order]
        self._counter = process_context().Value("q", 0)
        self._pool = local_pool(jobs, state=_Drawing(ordered, self.folder, self.cache,
                                                     self._counter),
                                purpose="drawing figures")
        self._parts = self._pool.map(_write_claimed, range(jobs))

    @property
    def paths(self) -> set[str]:
        """Site paths of the figures this writer writes."""
        return {spec.path for spec in self.specs}

    def result(self) -> dict[str, str]:
        """Site path → SHA-256 of every figure file, once all are written."""
        if self._pool is None:
            digests = _write_figures(self.specs, self.folder, self.cache, set())
        else:
            drawn = dict(pair for part in self._parts for pair in part)
            digests = [""] * len(self.specs)
            for position, index in enumerate(self._order):
                digests[index] = drawn[position]
            self.close()
        return {spec.path: digest for spec, digest in zip(self.specs, digests)}

    def close(self) -> None:
        """Stop the workers (cancelling figures not yet started)."""
        if self._counter is not None:  # workers stop after the chunk they are drawing
            with self._counter.get_lock():
                self._counter.value = len(self.specs)
        if self._pool is not None:
            self._pool.shutdown(wait=True, cancel_futures=True)
            self._pool = None

    def __enter__(self) -> FigureWriter:
        return self

    def __exit__(self, kind, value, traceback) -> None:
        self.close()
