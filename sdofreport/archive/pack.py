"""``sdofreport pack``: a verified site as one deterministic zip archive.

The same site gives the same bytes: entries sorted by path, no folder entries, every
timestamp 1980-01-01 00:00 (the earliest the zip format stores), permissions 0644,
no extra fields or comment, deflate at level 9. Entries sit at the archive's root, so the
bytes do not depend on the archive's file name.
"""

from __future__ import annotations

import io
import os
import zipfile
from pathlib import Path

from sdofreport.archive._sitefiles import ArchiveError, RunFiles, read_run, run_name
from sdofreport.archive.verify import verify_files
from sdofreport.fsio import write_atomically

#: Fixed entry time (the zip format's epoch; APPNOTE.TXT 4.4.6, MS-DOS date and time).
ZIP_TIMESTAMP = (1980, 1, 1, 0, 0, 0)
#: Fixed deflate level (zlib's maximum); the bytes still depend on the zlib version.
DEFLATE_LEVEL = 9
#: Regular file, rw-r--r--, in the high 16 bits of the external attributes (Unix host).
FILE_MODE = 0o100644


class PackRefused(ArchiveError):
    """The site does not match its manifest, so it is not archived (exit status 4)."""

    exit_code = 4


def zip_bytes(files: dict[str, bytes]) -> bytes:
    """The deterministic zip archive of ``files`` (site path → bytes)."""
    buffer = io.BytesIO()
    with zipfile.ZipFile(buffer, "w", compression=zipfile.ZIP_DEFLATED,
                         compresslevel=DEFLATE_LEVEL) as archive:
        for path in sorted(files):
            info = zipfile.ZipInfo(path, date_time=ZIP_TIMESTAMP)
            info.compress_type = zipfile.ZIP_DEFLATED
            info.create_system = 3  # Unix, so the permission bits below are meaningful
            info.external_attr = FILE_MODE << 16
            info.extra = b""
            info.comment = b""
            archive.writestr(info, files[path], compresslevel=DEFLATE_LEVEL)
        archive.comment = b""
    return buffer.getvalue()


def archive_name(manifest: dict) -> str:
    """``<reference>_rev<revision>_<fingerprint>.zip`` with unsafe characters replaced."""
    return run_name(manifest) + ".zip"


def _target(output: str | os.PathLike | None, manifest: dict) -> Path:
    if output is None:
        return Path.cwd() / archive_name(manifest)
    text = os.fspath(output)
    path = Path(text)
    if path.is_dir() or text.endswith(("/", os.sep)):
        return path / archive_name(manifest)
    return path


def _write_atomically(data: bytes, target: Path) -> None:
    if target.exists() and (target.is_dir() or not zipfile.is_zipfile(target)):
        raise ArchiveError(f"{target}: exists and is not a zip archive; refusing to replace "
                           f"it. Choose another -o (a new .zip file or a folder).")
    write_atomically(target, data)


def pack_run(run: RunFiles, output: str | os.PathLike | None = None) -> Path:
    """Verify ``run`` and write its deterministic archive; return the archive's path."""
    report = verify_files(run)
    if not report.ok:
        raise PackRefused(f"{run.label}: {report.summary()}; not packed, because an archive "
                          f"must match its manifest. Run 'sdofreport verify {run.label}' "
                          f"for the details and rebuild the site.")
    target = _target(output, run.manifest())
    _write_atomically(zip_bytes(run.files), target)
    return target


def pack_site(site: str | os.PathLike, output: str | os.PathLike | None = None) -> Path:
    """
    Pack a site folder (or re-pack an archive) into a deterministic zip.

    Parameters
    ----------
    site : path
        Site folder built by ``sdofreport build``, or a zip made by ``sdofreport pack``.
    output : path, optional
        The zip file to write, or a folder in which to name it
        ``<reference>_rev<revision>_<fingerprint>.zip``; default the current folder.

    Raises
    ------
    ArchiveError
        ``site`` is not a site of ours, or ``output`` is an existing non-zip file.
    PackRefused
        The site does not match its manifest (exit status 4).
    """
    return pack_run(read_run(site), output)
