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

import itertools
from pathlib import Path


from sdofreport import __version__
from sdofreport.executors import fork_context, local_pool
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
    """Cache key of a figure (:func:`sdofreport.cache.cache_key`): its function, its
    arguments (arrays by digest) and the versions that draw it."""
    from sdofreport.cache import cache_key
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


# Folders this process created in the tree (see sdofreport.site.tree.write_file).
_MADE: dict[str, set[str]] = {}


def _write_figures(specs: list[FigureSpec], folder: str, cache) -> list[str]:
    """Draw (or take from the cache) and write ``specs`` into ``folder``; their SHA-256."""
    made = _MADE.setdefault(folder, set())
    return [write_file(Path(folder), spec.path, _figure_svg(spec, cache).encode("utf-8"),
                       made) for spec in specs]


# What forked workers inherit from the build process, so that nothing but the digests
# travels between them, per writer (two may be drawing at once): writer number ->
# (figures, folder, cache, shared counter of the next figure).
_INHERITED: dict[int, tuple] = {}
_WRITERS = itertools.count()


def _write_claimed(_worker: int, writer: int) -> list[tuple[int, str]]:
    """
    Claim chunks of the inherited figure list of ``writer`` from its shared counter and
    write them, until none is left: (position, SHA-256) of each figure this worker
    wrote. Workers that serve themselves never wait for the build process to hand out
    work.
    """
    specs, folder, cache, counter = _INHERITED[writer]
    written: list[tuple[int, str]] = []
    while True:
        with counter.get_lock():
            start = counter.value
            counter.value = start + FIGURE_CHUNK
        if start >= len(specs):
            return written
        stop = min(start + FIGURE_CHUNK, len(specs))
        written.extend(zip(range(start, stop),
                           _write_figures(list(specs[start:stop]), folder, cache)))


class FigureWriter:
    """
    Writes every figure of a site into a staged tree, started before and collected
    after the build process's own work, so that the two overlap.

    With ``jobs`` > 1 and enough figures, ``jobs`` worker processes draw them:
    matplotlib figures (tenths of a second each) first, then the direct-SVG ones
    (milliseconds), in chunks small enough that the workers finish together. Where
    processes are forked, workers read the figures from the memory they inherit and
    claim chunks from a shared counter, so they keep drawing however busy this process
    is; elsewhere the chunks themselves are sent. Otherwise :meth:`result` draws them
    here. Use as a context manager: leaving it stops the workers after their current
    chunk.
    """

    def __init__(self, specs: list[FigureSpec], folder: Path, *, jobs: int = 1,
                 cache=None) -> None:
        self.specs, self.folder, self.cache = list(specs), str(folder), cache
        self._number = next(_WRITERS)
        self._pool = None
        self._parts = None
        self._counter = None
        self._order: list[int] = []
        if jobs > 1 and len(self.specs) >= 2 * FIGURE_CHUNK:
            self._start(jobs)

    def _start(self, jobs: int) -> None:
        import multiprocessing

        from sdofreport.site import figures  # noqa: F401  (imported once, inherited)

        specs = self.specs
        self._order = sorted(range(len(specs)),
                             key=lambda i: specs[i].function in DIRECT_SVG_FIGURES)
        ordered = [specs[i] for i in self._order]
        fork = fork_context()
        context = fork or multiprocessing.get_context()
        self._pool = local_pool(jobs, context)
        if fork is not None:
            self._counter = context.Value("q", 0)
            _INHERITED[self._number] = (ordered, self.folder, self.cache, self._counter)
            self._parts = self._pool.map(_write_claimed, range(jobs),
                                         [self._number] * jobs)
        else:  # no shared memory to inherit: send the chunks themselves
            chunks = [ordered[i:i + FIGURE_CHUNK] for i in range(0, len(ordered), FIGURE_CHUNK)]
            self._parts = self._pool.map(_write_figures, chunks, [self.folder] * len(chunks),
                                         [self.cache] * len(chunks))

    @property
    def paths(self) -> set[str]:
        """Site paths of the figures this writer writes."""
        return {spec.path for spec in self.specs}

    def result(self) -> dict[str, str]:
        """Site path → SHA-256 of every figure file, once all are written."""
        if self._pool is None:
            digests = _write_figures(self.specs, self.folder, self.cache)
        else:
            if self._counter is not None:
                drawn = dict(pair for part in self._parts for pair in part)
            else:
                drawn = dict(enumerate(digest for part in self._parts for digest in part))
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
        _INHERITED.pop(self._number, None)

    def __enter__(self) -> FigureWriter:
        return self

    def __exit__(self, kind, value, traceback) -> None:
        self.close()
