"""Rebuilding a site from the inputs it keeps, for ``verify --rerun``.

The inputs under ``inputs/`` are written into a temporary project folder and built as
``sdofreport build`` builds them (no cache, the stored date restored), so every file can
be compared with the stored site; versions that differ from the manifest's are named.
"""

from __future__ import annotations

import contextlib
import csv
import io
import os
import tempfile
from datetime import datetime, timezone
from pathlib import Path

from sdofreport.archive._sitefiles import read_folder
from sdofreport.errors import SdofreportError
from sdofreport.site.render import COMPARE_TO_INPUT, manifest_versions

ABSENT = "(absent)"


@contextlib.contextmanager
def _source_date(date: str | None):
    """Set SOURCE_DATE_EPOCH so a project file without a date gets the stored date back."""
    saved = os.environ.get("SOURCE_DATE_EPOCH")
    try:
        stamp = None
        if isinstance(date, str):
            with contextlib.suppress(ValueError):
                parsed = datetime.strptime(date, "%Y-%m-%d").replace(tzinfo=timezone.utc)
                stamp = str(int(parsed.timestamp()))
        if stamp is None:
            os.environ.pop("SOURCE_DATE_EPOCH", None)
        else:
            os.environ["SOURCE_DATE_EPOCH"] = stamp
        yield
    finally:
        if saved is None:
            os.environ.pop("SOURCE_DATE_EPOCH", None)
        else:
            os.environ["SOURCE_DATE_EPOCH"] = saved


def rebuild_site(files: dict[str, bytes], manifest: dict, stored_date: str | None,
                 *, jobs: int | None = 1) -> dict[str, bytes]:
    """
    Every file of the site rebuilt from the run's ``inputs/`` with the installed version.

    The inputs are written to a temporary folder at their paths relative to the project
    file and built there without any cache (results or figures), as ``sdofreport build``
    does; a site built with ``--compare-to`` is rebuilt against the earlier results it
    keeps (:data:`~sdofreport.site.render.COMPARE_TO_INPUT`). Raises
    :class:`SdofreportError` when the project cannot be loaded or built or an input lay
    outside the project folder.
    """
    from sdofreport.build import build_site

    inputs = {path: data for path, data in files.items() if path.startswith("inputs/")}
    outside = sorted(path for path in inputs if path.startswith("inputs/_outside/"))
    if outside:
        raise SdofreportError(f"input outside project folder ({', '.join(outside)})")
    project_file = manifest["project"].get("file")
    if not isinstance(project_file, str) or project_file not in inputs:
        raise SdofreportError(f"project file {project_file!r} is not in the site")
    with tempfile.TemporaryDirectory(prefix="sdofreport-rerun-") as folder:
        for path, data in inputs.items():
            target = Path(folder, "project", *path.split("/")[1:])
            target.parent.mkdir(parents=True, exist_ok=True)
            target.write_bytes(data)
        with _source_date(stored_date):
            compare_to = None
            if COMPARE_TO_INPUT in inputs:
                compare_to = Path(folder, "project", *COMPARE_TO_INPUT.split("/")[1:])
            outcome = build_site(Path(folder, "project", *project_file.split("/")[1:]),
                                 Path(folder, "site"), jobs=jobs, use_cache=False,
                                 compare_to=compare_to)
        return read_folder(outcome.output)


def version_differences(manifest: dict) -> list[str]:
    """Recorded versions (package, dependencies, platform) the installed ones differ from,
    one ``"<name>: site <recorded>, installed <installed>"`` line each."""
    installed = manifest_versions()
    package = manifest.get("package") if isinstance(manifest.get("package"), dict) else {}
    recorded = {"sdofreport": package.get("version", ABSENT)}
    now = {"sdofreport": installed["package"]["version"]}
    for key in ("dependencies", "platform"):
        stored = manifest.get(key) if isinstance(manifest.get(key), dict) else {}
        prefix = "" if key == "dependencies" else "platform "
        for name in sorted(set(stored) | set(installed[key])):
            recorded[prefix + name] = stored.get(name, ABSENT)
            now[prefix + name] = installed[key].get(name, ABSENT)
    return [f"{name}: site {recorded[name]}, installed {now[name]}"
            for name in recorded if str(recorded[name]) != str(now[name])]


def csv_differs(stored: bytes, rebuilt: bytes, tolerance: float) -> bool:
    """True unless both tables hold the same text and numbers within ``tolerance``."""
    try:
        a = list(csv.reader(io.StringIO(stored.decode("utf-8"))))
        b = list(csv.reader(io.StringIO(rebuilt.decode("utf-8"))))
    except (UnicodeDecodeError, csv.Error):
        return True
    if [len(row) for row in a] != [len(row) for row in b]:
        return True
    for x, y in zip((c for row in a for c in row), (c for row in b for c in row)):
        if x == y:
            continue
        try:
            u, v = float(x), float(y)
        except ValueError:
            return True
        scale = max(abs(u), abs(v))
        if not (scale and abs(u - v) / scale <= tolerance):
            return True
    return False
