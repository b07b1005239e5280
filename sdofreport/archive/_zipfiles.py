"""Reading a zip archive as hostile: every member checked before anything is unpacked.

A zip is refused when it holds what ``sdofreport pack`` never writes (duplicate,
escaping or control-character names, links and special files, local headers that
disagree with the central directory: :class:`TamperedArchive`, exit 4) or what cannot be
read safely (encryption, compression other than stored and deflate, corrupt streams,
sizes and ratios beyond the bounds: :class:`ArchiveError`, exit 2). Members are read in
chunks and never beyond their declared size. Format references: PKWARE APPNOTE.TXT
6.3 (local header 4.3.7, central directory 4.3.12, flags 4.4.4, methods 4.4.5, external
attributes 4.4.15).
"""

from __future__ import annotations

import re
import stat
import struct
import unicodedata
import zipfile
import zlib
from pathlib import Path, PurePosixPath

from sdofreport.archive._sitefiles import (
    MAX_FILE_BYTES,
    MAX_MEMBERS,
    MAX_TOTAL_BYTES,
    ArchiveError,
    TamperedArchive,
    size_problem,
)
from sdofreport.site.render import MANIFEST_NAME

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


def _check_local_header(stream, info: zipfile.ZipInfo, label: str) -> int:
    """The member's local header must agree with its central directory entry: unzip
    tools read one, Python the other, so a difference would verify one file and extract
    another (APPNOTE.TXT 4.3.7 and 4.3.12). Returns the offset where the member's data
    (and any data descriptor) ends."""
    stream.seek(info.header_offset)
    raw = stream.read(_LOCAL_HEADER.size)
    if len(raw) != _LOCAL_HEADER.size:
        raise ArchiveError(f"{label}: archive member '{_shown(info.filename)}' is cut "
                           f"short (no local header); the archive is damaged.")
    (signature, _, _, flags, method, _, _, crc, compressed, size, name_length,
     extra_length) = _LOCAL_HEADER.unpack(raw)
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
    return (info.header_offset + _LOCAL_HEADER.size + name_length + extra_length
            + info.compress_size)


#: Sizes a data descriptor may take after a member's data (APPNOTE.TXT 4.3.9): CRC-32
#: and two sizes of 4 or 8 bytes, with or without the optional 4-byte signature.
_DESCRIPTOR_SIZES = (0, 12, 16, 20, 24)


def _check_layout(stream, archive: zipfile.ZipFile, label: str) -> None:
    """Every member's local header agrees with the directory, and the members fill the
    space before the central directory with nothing between them: hidden bytes there
    (a prefix, or a local entry the directory does not list) are what tools that read
    local headers in order would extract instead."""
    expected = 0
    for info in sorted(archive.infolist(), key=lambda item: item.header_offset):
        gap = info.header_offset - expected
        if gap not in _DESCRIPTOR_SIZES or (gap and expected == 0):
            where = ("before the first member" if expected == 0 else
                     f"before member '{_shown(info.filename)}'")
            raise TamperedArchive(f"{label}: the archive holds {gap} bytes {where} that no "
                                  f"directory entry covers (hidden or overlapping data); "
                                  f"expected members one after another as sdofreport pack "
                                  f"writes them. The archive was not extracted.")
        expected = _check_local_header(stream, info, label)
    gap = archive.start_dir - expected
    if gap not in _DESCRIPTOR_SIZES:
        raise TamperedArchive(f"{label}: the archive holds {gap} bytes before its central "
                              f"directory that no directory entry covers (hidden or "
                              f"overlapping data); expected members one after another as "
                              f"sdofreport pack writes them. The archive was not extracted.")


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
            raise size_problem(label, f"archive member '{shown}'", info.file_size,
                               MAX_FILE_BYTES)
        if (info.file_size > RATIO_FLOOR_BYTES
                and info.file_size > MAX_RATIO * max(info.compress_size, 1)):
            raise ArchiveError(f"{label}: archive member '{shown}' would unpack "
                               f"{info.compress_size} bytes into {info.file_size}, a ratio "
                               f"above {MAX_RATIO}:1 (a zip bomb); expected a site as "
                               f"sdofreport pack writes it. Nothing was extracted.")
        total += info.file_size
        if total > MAX_TOTAL_BYTES:
            raise size_problem(label, f"the archive's {len(plan) + 1} members", total,
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
            _check_layout(raw, archive, label)
            files = {}
            for info, name in plan:
                member = info.filename
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


