"""Reading a built run into memory: a site folder or a zip made by ``sdofreport pack``.

Everything here returns plain ``{site path: bytes}`` mappings, so verification,
comparison and the register work the same on a folder and on an archive.
"""

from __future__ import annotations

import json
import re
import zipfile
from dataclasses import dataclass
from pathlib import Path

from sdofreport.errors import SdofreportError
from sdofreport.site.render import MANIFEST_NAME, MANIFEST_SCHEMA

RESULTS_PATH = "data/results.json"


class ArchiveError(SdofreportError):
    """A site, archive or results file given to verify, compare, pack or register is unusable."""


@dataclass
class RunFiles:
    """Every file of one run, read into memory."""

    label: str                 # what the user named (path as given)
    kind: str                  # "folder" or "zip"
    files: dict[str, bytes]    # site path (POSIX, relative) → bytes

    def manifest(self) -> dict:
        """The parsed manifest.json; :class:`ArchiveError` when absent or not ours."""
        return parse_manifest(self.files, self.label)


#: Bounds on what one run may hold once read (our choice, common practice (no source)):
#: a built site is a few MB (the example site packs into about 2 MB), so these leave room
#: while a hostile archive cannot make verify, pack or register use unbounded memory.
MAX_MEMBERS = 20_000
MAX_FILE_BYTES = 256 * 2**20
MAX_TOTAL_BYTES = 512 * 2**20


class TamperedArchive(ArchiveError):
    """An archive whose structure sdofreport pack never writes: duplicate or escaping
    names, links, a local header that disagrees with the central directory (exit 4)."""

    exit_code = 4


def size_problem(label: str, what: str, size: int, limit: int) -> ArchiveError:
    """The error for a file, member or whole run beyond a size bound (exit 2)."""
    return ArchiveError(f"{label}: {what} would take {size} bytes, more than the "
                        f"{limit} bytes allowed; expected a site as sdofreport build writes "
                        f"it (a few MB). Nothing was extracted.")


def read_bounded(path: Path) -> bytes:
    """The bytes of one file, refused (exit 2) beyond :data:`MAX_FILE_BYTES`."""
    size = path.stat().st_size
    if size > MAX_FILE_BYTES:
        raise size_problem(str(path), "the file", size, MAX_FILE_BYTES)
    return path.read_bytes()


def read_folder(folder: Path) -> dict[str, bytes]:
    """Every regular file under ``folder`` by POSIX relative path (symlinks are refused;
    sizes are bounded as for archives)."""
    files = {}
    total = 0
    for path in sorted(folder.rglob("*")):
        relative = path.relative_to(folder)
        if path.is_symlink():
            raise ArchiveError(f"{folder}: '{relative.as_posix()}' is a symbolic link; "
                               f"expected a site of plain files as sdofreport build writes "
                               f"it. Replace the link with the file or rebuild the site.")
        if path.is_file():
            size = path.stat().st_size
            total += size
            if size > MAX_FILE_BYTES:
                raise size_problem(str(folder), f"'{relative.as_posix()}'", size,
                                   MAX_FILE_BYTES)
            if total > MAX_TOTAL_BYTES or len(files) >= MAX_MEMBERS:
                raise size_problem(str(folder), f"the site's {len(files) + 1} files",
                                   total, MAX_TOTAL_BYTES)
            files[relative.as_posix()] = path.read_bytes()
    return files


def read_run(path: str | Path) -> RunFiles:
    """
    Read a site folder or a packed zip into memory.

    Raises :class:`ArchiveError` when ``path`` is neither, or holds no manifest.json.
    """
    from sdofreport.archive._zipfiles import read_zip

    path = Path(path)
    try:
        if path.is_dir():
            if not (path / MANIFEST_NAME).is_file():  # refuse before reading a whole tree
                parse_manifest({}, str(path))
            run = RunFiles(str(path), "folder", read_folder(path))
        elif path.is_file() and zipfile.is_zipfile(path):
            run = RunFiles(str(path), "zip", read_zip(path))
        elif path.exists():
            raise ArchiveError(f"{path}: expected a site folder or a zip made by "
                               f"sdofreport pack, found a file that is not a zip archive.")
        else:
            raise ArchiveError(f"{path}: not found; expected a site folder or a zip made "
                               f"by sdofreport pack.")
    except OSError as exc:
        raise ArchiveError(f"{path}: cannot be read ({exc.strerror or exc}); expected a "
                           f"readable site folder or zip made by sdofreport pack.") from None
    run.manifest()  # refuse early when there is no manifest of ours
    return run


#: Deepest nesting of JSON arrays and objects read from a run (our choice, common practice
#: (no source)): manifest.json and results.json nest a few levels; a hostile document
#: nested thousands deep would exhaust Python's recursion limit in json and in the
#: comparisons.
MAX_JSON_DEPTH = 64


def _json_document(data: bytes, what: str) -> object:
    """Parse JSON; :class:`ArchiveError` when it is not UTF-8 JSON or nests too deep."""
    try:
        document = json.loads(data.decode("utf-8"))
    except RecursionError:
        document = None
        depth = MAX_JSON_DEPTH + 1
    except (UnicodeDecodeError, ValueError) as exc:
        raise ArchiveError(f"{what} is not valid JSON ({exc}); expected it as "
                           f"sdofreport build writes it.") from None
    else:
        depth, level = 0, [(document, 1)]
        while level and depth <= MAX_JSON_DEPTH:
            value, depth_here = level.pop()
            depth = max(depth, depth_here)
            children = (value.values() if isinstance(value, dict) else
                        value if isinstance(value, list) else ())
            level += [(child, depth_here + 1) for child in children
                      if isinstance(child, (dict, list))]
    if depth > MAX_JSON_DEPTH:
        raise ArchiveError(f"{what} nests arrays or objects more than {MAX_JSON_DEPTH} "
                           f"deep; expected it as sdofreport build writes it (a few "
                           f"levels).")
    return document


def parse_manifest(files: dict[str, bytes], label: str) -> dict:
    """manifest.json of a run, checked for the fields verification relies on."""
    if MANIFEST_NAME not in files:
        raise ArchiveError(f"{label}: no {MANIFEST_NAME} found; expected a site folder "
                           f"built by sdofreport build (or a zip made by sdofreport pack), "
                           f"which always carries one.")
    manifest = _json_document(files[MANIFEST_NAME], f"{label}: {MANIFEST_NAME}")
    if not isinstance(manifest, dict) or manifest.get("schema") != MANIFEST_SCHEMA:
        found = manifest.get("schema") if isinstance(manifest, dict) else type(manifest)
        raise ArchiveError(f"{label}: {MANIFEST_NAME} has schema {found!r}; expected "
                           f"{MANIFEST_SCHEMA!r} as written by sdofreport build.")
    hashes = manifest.get("files")
    if not isinstance(hashes, dict) or not all(
            isinstance(k, str) and isinstance(v, str) for k, v in hashes.items()):
        raise ArchiveError(f"{label}: {MANIFEST_NAME} key 'files': expected a table of site "
                           f"path → SHA-256 text, found {type(hashes).__name__}.")
    if not isinstance(manifest.get("inputs"), list):
        raise ArchiveError(f"{label}: {MANIFEST_NAME} key 'inputs': expected a list of "
                           f"paths under inputs/, found "
                           f"{type(manifest.get('inputs')).__name__}.")
    if not isinstance(manifest.get("project"), dict):
        raise ArchiveError(f"{label}: {MANIFEST_NAME} key 'project': expected a table with "
                           f"file, title, reference, revision and date.")
    return manifest


def parse_results(data: bytes, label: str) -> dict:
    """A results.json document, checked only for being our schema."""
    document = _json_document(data, label)
    schema = document.get("schema") if isinstance(document, dict) else None
    if not isinstance(schema, str) or not schema.startswith("sdofreport/results@"):
        raise ArchiveError(f"{label}: schema {schema!r}; expected 'sdofreport/results@1' "
                           f"(data/results.json as written by sdofreport build).")
    return document


def safe_name(text: str, fallback: str = "unnamed") -> str:
    """``text`` with every character outside ``A-Z a-z 0-9 . _ -`` replaced by '-'."""
    cleaned = re.sub(r"[^A-Za-z0-9._-]+", "-", str(text)).strip("-.")
    return cleaned or fallback


def run_name(manifest: dict) -> str:
    """``<reference>_rev<revision>_<fingerprint>``, safe as a file or folder name."""
    project = manifest.get("project") or {}
    return (f"{safe_name(project.get('reference') or '', 'noref')}_rev"
            f"{safe_name(project.get('revision') or '', 'none')}_"
            f"{safe_name(manifest.get('fingerprint') or '', 'nofingerprint')}")
