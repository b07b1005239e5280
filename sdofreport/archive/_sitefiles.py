"""Reading a built run into memory: a site folder or a zip made by ``sdofreport pack``.

Everything here returns plain ``{site path: bytes}`` mappings, so verification,
comparison and the register work the same on a folder and on an archive.
"""

from __future__ import annotations

import json
import re
import stat
import struct
import unicodedata
import zipfile
import zlib
from dataclasses import dataclass
from pathlib import Path, PurePosixPath

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
#: a built site is a few MB (the example site is under 1 MB), so these leave ample room
#: while a hostile archive cannot make verify, pack or register use unbounded memory.
MAX_MEMBERS = 20_000
MAX_FILE_BYTES = 256 * 2**20
MAX_TOTAL_BYTES = 512 * 2**20
#: Largest uncompressed / compressed size of a member over :data:`RATIO_FLOOR_BYTES`.
#: Deflate of text, HTML, CSV and SVG is typically 3:1 to 20:1; zlib's ceiling is about
#: 1032:1 (zlib technical details, "maximum compression factor"), reached only by
#: repetitive filler as in a zip bomb.
MAX_RATIO = 200
RATIO_FLOOR_BYTES = 2**20
#: Bytes read from a member at a time.
CHUNK_BYTES = 2**20
#: Compression methods read (APPNOTE.TXT 4.4.5): 0 stored, 8 deflated (what pack writes).
METHODS = {zipfile.ZIP_STORED: "stored", zipfile.ZIP_DEFLATED: "deflated"}
#: General purpose flag bits (APPNOTE.TXT 4.4.4): 0 encrypted, 6 strong encryption.
_ENCRYPTED = 0x1 | 0x40
#: Local file header (APPNOTE.TXT 4.3.7): signature, versions, flags, method, time, date,
#: CRC-32, sizes, name and extra lengths.
_LOCAL_HEADER = struct.Struct("<4s2B4HL2L2H")


class TamperedArchive(ArchiveError):
    """An archive whose structure sdofreport pack never writes: duplicate or escaping
    names, links, a local header that disagrees with the central directory (exit 4)."""

    exit_code = 4


def _limit_problem(label: str, what: str, size: int, limit: int) -> ArchiveError:
    return ArchiveError(f"{label}: {what} would take {size} bytes, more than the "
                        f"{limit} bytes allowed; expected a site as sdofreport build writes "
                        f"it (a few MB). Nothing was extracted.")


def read_bounded(path: Path) -> bytes:
    """The bytes of one file, refused (exit 2) beyond :data:`MAX_FILE_BYTES`."""
    size = path.stat().st_size
    if size > MAX_FILE_BYTES:
        raise _limit_problem(str(path), "the file", size, MAX_FILE_BYTES)
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
                raise _limit_problem(str(folder), f"'{relative.as_posix()}'", size,
                                     MAX_FILE_BYTES)
            if total > MAX_TOTAL_BYTES or len(files) >= MAX_MEMBERS:
                raise _limit_problem(str(folder), f"the site's {len(files) + 1} files",
                                     total, MAX_TOTAL_BYTES)
            files[relative.as_posix()] = path.read_bytes()
    return files


def _shown(name: str) -> str:
    """A member name safe to print: control characters escaped, at most 120 characters."""
    text = repr(name)[1:-1]
    return text if len(text) <= 120 else text[:117] + "..."


def _member_name(info: zipfile.ZipInfo, label: str) -> str | None:
    """The member's relative POSIX path, None for a folder entry; refuse escaping names,
    control characters, links and other special files."""
    name = info.filename
    shown = _shown(name)

    def tampered(what: str) -> TamperedArchive:
        return TamperedArchive(f"{label}: archive member '{shown}' {what}; expected plain "
                               f"files at relative paths as sdofreport pack writes them. "
                               f"The archive was not extracted.")

    if any(ord(c) < 0x20 or ord(c) == 0x7F for c in name):
        raise tampered("has control characters in its name")
    posix = PurePosixPath(name.replace("\\", "/"))
    if posix.is_absolute() or ".." in posix.parts or re.match(r"^[A-Za-z]:", name):
        raise tampered("points outside the archive (absolute path or '..')")
    mode = info.external_attr >> 16
    kind = stat.S_IFMT(mode)
    if stat.S_ISLNK(mode) or info.external_attr & 0x400:  # 0x400: Windows reparse point
        raise tampered("is a link")
    if kind and not (stat.S_ISREG(mode) or stat.S_ISDIR(mode)):
        raise tampered("is a special file (device, pipe or socket)")
    if name.endswith(("/", "\\")) or stat.S_ISDIR(mode) or info.external_attr & 0x10:
        if info.file_size:
            raise tampered("is a folder entry that carries data")
        return None
    if not posix.parts or posix.as_posix() in ("", "."):
        raise tampered("has an empty name")
    return posix.as_posix()


def _check_local_header(stream, info: zipfile.ZipInfo, label: str) -> None:
    """The member's local header must agree with its central directory entry: unzip
    tools read one, Python the other, so a difference would verify one file and extract
    another (APPNOTE.TXT 4.3.7 and 4.3.12)."""
    stream.seek(info.header_offset)
    raw = stream.read(_LOCAL_HEADER.size)
    if len(raw) != _LOCAL_HEADER.size:
        raise ArchiveError(f"{label}: archive member '{_shown(info.filename)}' is cut "
                           f"short (no local header); the archive is damaged.")
    (signature, _, _, flags, method, _, _, crc, compressed, size, name_length,
     _) = _LOCAL_HEADER.unpack(raw)
    name = stream.read(name_length)
    found = []
    if signature != b"PK\x03\x04":
        found.append("no local header signature")
    if method != info.compress_type:
        found.append(f"compression method {method} in the local header, "
                     f"{info.compress_type} in the central directory")
    if (flags ^ info.flag_bits) & _ENCRYPTED:
        found.append("encryption flags that differ between local header and directory")
    if not flags & 0x8 and (crc, compressed, size) != (info.CRC, info.compress_size,
                                                       info.file_size) \
            and 0xFFFFFFFF not in (compressed, size):
        found.append("CRC-32 or sizes that differ between local header and directory")
    central = info.orig_filename.encode("utf-8" if info.flag_bits & 0x800 else "cp437",
                                        errors="replace")
    if b"\0" in name:
        found.append("a NUL character in its local header name")
    elif name != central:
        found.append(f"local header name {_shown(name.decode('latin-1'))!r}")
    if found:
        raise TamperedArchive(f"{label}: archive member '{_shown(info.filename)}' has "
                              f"{'; '.join(found)}; expected one consistent entry per file "
                              f"as sdofreport pack writes it. The archive was not "
                              f"extracted.")


def _plan_zip(archive: zipfile.ZipFile, label: str) -> list[tuple[zipfile.ZipInfo, str]]:
    """Every file member to read with its site path, after checking names, kinds,
    methods, encryption and declared sizes; nothing is decompressed here."""
    infos = archive.infolist()
    if len(infos) > MAX_MEMBERS:
        raise ArchiveError(f"{label}: the archive lists {len(infos)} members, more than the "
                           f"{MAX_MEMBERS} allowed; expected a site as sdofreport pack "
                           f"writes it. Nothing was extracted.")
    plan = []
    seen: dict[str, str] = {}
    folders: set[str] = set()
    total = 0
    for info in infos:
        name = _member_name(info, label)
        shown = _shown(info.filename)
        if info.flag_bits & _ENCRYPTED:
            raise ArchiveError(f"{label}: archive member '{shown}' is encrypted; expected "
                               f"an archive as sdofreport pack writes it (no encryption).")
        if info.compress_type not in METHODS:
            raise ArchiveError(f"{label}: archive member '{shown}' uses compression method "
                               f"{info.compress_type}; expected stored (0) or deflated (8) "
                               f"as sdofreport pack writes it.")
        if name is None:
            continue
        key = unicodedata.normalize("NFC", name).casefold()
        if key in seen:
            same = "" if seen[key] == info.filename else f" (as '{_shown(seen[key])}')"
            raise TamperedArchive(f"{label}: the archive holds member '{shown}' twice"
                                  f"{same}; unzip tools extract one copy, so what is "
                                  f"verified could differ from what a reader opens. "
                                  f"Expected each file once, as sdofreport pack writes it.")
        seen[key] = info.filename
        parts = key.split("/")
        folders.update("/".join(parts[:depth]) for depth in range(1, len(parts)))
        if info.file_size > MAX_FILE_BYTES:
            raise _limit_problem(label, f"archive member '{shown}'", info.file_size,
                                 MAX_FILE_BYTES)
        if (info.file_size > RATIO_FLOOR_BYTES
                and info.file_size > MAX_RATIO * max(info.compress_size, 1)):
            raise ArchiveError(f"{label}: archive member '{shown}' would unpack "
                               f"{info.compress_size} bytes into {info.file_size}, a ratio "
                               f"above {MAX_RATIO}:1 (a zip bomb); expected a site as "
                               f"sdofreport pack writes it. Nothing was extracted.")
        total += info.file_size
        if total > MAX_TOTAL_BYTES:
            raise _limit_problem(label, f"the archive's {len(plan) + 1} members", total,
                                 MAX_TOTAL_BYTES)
        plan.append((info, name))
    clash = sorted(key for key in seen if key in folders)
    if clash:
        raise TamperedArchive(f"{label}: archive member '{_shown(seen[clash[0]])}' is both "
                              f"a file and a folder of other members; expected a site as "
                              f"sdofreport pack writes it. The archive was not extracted.")
    return plan


def _read_member(archive: zipfile.ZipFile, info: zipfile.ZipInfo) -> bytes:
    """The member's bytes, read in chunks of :data:`CHUNK_BYTES` and never more than its
    declared size (zipfile checks the CRC-32 at the end)."""
    data = bytearray()
    with archive.open(info) as stream:
        while True:
            chunk = stream.read(CHUNK_BYTES)
            if not chunk:
                break
            data += chunk
            if len(data) > info.file_size:
                raise zipfile.BadZipFile("more data than the declared size")
    return bytes(data)


def read_zip(path: Path) -> dict[str, bytes]:
    """
    Every file in the zip at ``path``; a single top-level folder is stripped.

    Every archive is treated as hostile: duplicate, escaping or control-character names,
    links and special files, and local headers that disagree with the central directory
    raise :class:`TamperedArchive` (exit 4); encryption, compression methods other than
    stored and deflate, corrupt streams and sizes or ratios beyond the bounds above raise
    :class:`ArchiveError` (exit 2). Members are read in bounded chunks.
    """
    label = str(path)
    member = ""
    try:
        with open(path, "rb") as raw, zipfile.ZipFile(raw) as archive:
            plan = _plan_zip(archive, label)
            files = {}
            for info, name in plan:
                member = info.filename
                _check_local_header(raw, info, label)
                files[name] = _read_member(archive, info)
    except ArchiveError:
        raise
    except zipfile.BadZipFile as exc:
        if str(exc).startswith("File name in directory"):
            raise TamperedArchive(f"{label}: archive member '{_shown(member)}' has another "
                                  f"name in its local header ({exc}); expected one "
                                  f"consistent entry per file as sdofreport pack writes "
                                  f"it.") from None
        raise _unreadable(label, member, exc) from None
    except (zipfile.LargeZipFile, zlib.error, EOFError, OSError, ValueError, RuntimeError,
            NotImplementedError, struct.error) as exc:
        raise _unreadable(label, member, exc) from None
    if MANIFEST_NAME not in files:
        tops = {name.split("/", 1)[0] for name in files}
        if len(tops) == 1 and all("/" in name for name in files):
            prefix = tops.pop() + "/"
            files = {name[len(prefix):]: data for name, data in files.items()}
    return dict(sorted(files.items()))


def _unreadable(label: str, member: str, exc: BaseException) -> ArchiveError:
    where = f"archive member '{_shown(member)}'" if member else "the archive"
    return ArchiveError(f"{label}: {where} cannot be read ({type(exc).__name__}: "
                        f"{_shown(str(exc))}); expected a site folder or a zip made by "
                        f"sdofreport pack. Nothing was extracted.")


def read_run(path: str | Path) -> RunFiles:
    """
    Read a site folder or a packed zip into memory.

    Raises :class:`ArchiveError` when ``path`` is neither, or holds no manifest.json.
    """
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


def parse_manifest(files: dict[str, bytes], label: str) -> dict:
    """manifest.json of a run, checked for the fields verification relies on."""
    if MANIFEST_NAME not in files:
        raise ArchiveError(f"{label}: no {MANIFEST_NAME} found; expected a site folder "
                           f"built by sdofreport build (or a zip made by sdofreport pack), "
                           f"which always carries one.")
    try:
        manifest = json.loads(files[MANIFEST_NAME].decode("utf-8"))
    except (UnicodeDecodeError, ValueError) as exc:
        raise ArchiveError(f"{label}: {MANIFEST_NAME} is not valid JSON ({exc}); expected "
                           f"the manifest written by sdofreport build.") from None
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
    try:
        document = json.loads(data.decode("utf-8"))
    except (UnicodeDecodeError, ValueError) as exc:
        raise ArchiveError(f"{label}: not valid JSON ({exc}); expected data/results.json "
                           f"as written by sdofreport build.") from None
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
