"""The one way a single output file is written: whole, or not at all.

The bytes go to a temporary sibling (same folder, so the rename cannot cross file
systems), are flushed to disk (``fsync``), and the sibling is renamed over the target
(``os.replace``, atomic on POSIX). A failure removes the sibling and leaves any earlier
file untouched; an ``OSError`` (a full disk, say) names the target.
"""

from __future__ import annotations

import contextlib
import os
import tempfile
from pathlib import Path

from sdofreport.errors import naming_path


def write_atomically(target: str | os.PathLike, data: bytes, *, mode: int = 0o644) -> Path:
    """
    Write ``data`` to ``target`` through a temporary sibling and a rename.

    Parameters
    ----------
    target : str or os.PathLike
        File to create or replace; its folder is created if needed. [-]
    data : bytes
        The whole content. [-]
    mode : int
        Permission bits of the written file. [-]

    Returns
    -------
    pathlib.Path
        ``target``.
    """
    target = Path(target)
    with naming_path(target):
        target.parent.mkdir(parents=True, exist_ok=True)
        handle, temporary = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".partial",
                                             dir=target.parent)
        try:
            with os.fdopen(handle, "wb") as stream:
                stream.write(data)
                stream.flush()
                os.fsync(stream.fileno())
            os.chmod(temporary, mode)
            os.replace(temporary, target)
        except BaseException:
            with contextlib.suppress(OSError):
                os.unlink(temporary)
            raise
    return target
