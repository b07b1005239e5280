"""Writing a site: the staged tree (modes, swap, clean failure) and the figure writer
(same files and digests from this process and from worker processes, cache reuse).

Sources of expected values: SHA-256 digests recomputed with the standard library's
hashlib, modes per POSIX (0o755 folders, 0o644 files, as the site promises whatever the
umask), and the files drawn by this process as the reference for the workers' files.
"""

from __future__ import annotations

import hashlib
import os
import stat

import numpy as np
import pytest

from sdofreport.engine import ResultCache
from sdofreport.site import drawing
from sdofreport.site.context import FigureSpec
from sdofreport.site.tree import StagedTree, write_tree


def _tree(folder):
    return {p.relative_to(folder).as_posix(): (p.read_bytes() if p.is_file() else None,
                                               stat.S_IMODE(p.stat().st_mode))
            for p in sorted(folder.rglob("*"))}


def test_modes_are_fixed_whatever_the_umask(tmp_path):
    old = os.umask(0o077)
    try:
        out = write_tree({"a.html": b"a", "data/deep/b.csv": b"b"}, tmp_path / "site")
    finally:
        os.umask(old)
    assert stat.S_IMODE(out.stat().st_mode) == 0o755
    modes = {path: mode for path, (_, mode) in _tree(out).items()}
    assert modes == {"a.html": 0o644, "data": 0o755, "data/deep": 0o755,
                     "data/deep/b.csv": 0o644}


def test_commit_replaces_and_failure_leaves_the_old_tree(tmp_path):
    site = write_tree({"old.txt": b"old"}, tmp_path / "site")
    with pytest.raises(RuntimeError):
        with StagedTree(site) as tree:
            tree.write("new.txt", b"new")
            raise RuntimeError("stop")
    assert _tree(site) == {"old.txt": (b"old", 0o644)}
    assert sorted(p.name for p in tmp_path.iterdir()) == ["site"]  # no staging left
    with StagedTree(site) as tree:
        digest = tree.write("new.txt", b"new")
        tree.commit()
    assert digest == hashlib.sha256(b"new").hexdigest()
    assert _tree(site) == {"new.txt": (b"new", 0o644)}
    assert sorted(p.name for p in tmp_path.iterdir()) == ["site"]


def _specs(count: int) -> list[FigureSpec]:
    rng = np.random.default_rng(20261202)
    periods = np.geomspace(0.05, 4.0, 40)
    specs = []
    for i in range(count):
        function = "histories_figure" if i % 3 else "spectra_figure"
        if function == "spectra_figure":
            kwargs = {"periods_s": periods, "ylabel": "PSA [g]",
                      "curves": [{"label": f"r{i}", "values": rng.random(40) + 0.1,
                                  "style": "record"}]}
        else:
            time_s = np.arange(300) * 0.01
            kwargs = {"time_s": time_s, "panels": [
                ("ground", rng.standard_normal(300), "Acceleration [g]")]}
        specs.append(FigureSpec(f"figures/f{i:03d}.svg", function, kwargs))
    return specs


def test_workers_write_the_same_files_as_this_process(tmp_path):
    specs = _specs(5 * drawing.FIGURE_CHUNK)
    results = {}
    for jobs in (1, 2):
        with StagedTree(tmp_path / f"site{jobs}") as tree:
            with drawing.FigureWriter(specs, tree.folder, jobs=jobs) as writer:
                digests = writer.result()
            site = tree.commit()
        files = _tree(site)
        results[jobs] = files
        assert list(digests) == [spec.path for spec in specs]
        for path, digest in digests.items():
            assert hashlib.sha256(files[path][0]).hexdigest() == digest
        assert files["figures/f000.svg"][0].startswith(b"<svg") or \
            files["figures/f000.svg"][0].startswith(b"<?xml")
    assert results[1] == results[2]


def test_cached_figures_are_not_drawn_again(tmp_path, monkeypatch):
    specs = _specs(4)
    cache = ResultCache(tmp_path / "cache")
    with StagedTree(tmp_path / "a") as tree:
        first = drawing.FigureWriter(specs, tree.folder, cache=cache).result()
        tree.commit()

    def refuse(spec):
        raise AssertionError(f"{spec.path} drawn although cached")

    monkeypatch.setattr(drawing, "draw_figure", refuse)
    with StagedTree(tmp_path / "b") as tree:
        second = drawing.FigureWriter(specs, tree.folder, cache=cache).result()
        tree.commit()
    assert first == second
    assert _tree(tmp_path / "a") == _tree(tmp_path / "b")


def test_a_failing_figure_stops_the_workers_and_is_reported(tmp_path):
    specs = _specs(6 * drawing.FIGURE_CHUNK)
    # histories_figure refuses an empty panel list (its documented ValueError).
    specs[3] = FigureSpec("figures/bad.svg", "histories_figure",
                          {"time_s": np.arange(10) * 0.01, "panels": []})
    with pytest.raises(ValueError, match="panels"):
        with StagedTree(tmp_path / "site") as tree:
            with drawing.FigureWriter(specs, tree.folder, jobs=2) as writer:
                writer.result()
    assert not (tmp_path / "site").exists()
    assert list(tmp_path.iterdir()) == []  # the staging folder is gone too
    assert writer._pool is None  # the workers were stopped
