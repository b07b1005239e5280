"""User-facing errors: one paragraph, no traceback, exit status 2 (see the CLI)."""

from __future__ import annotations

from contextlib import contextmanager

import click


class SdofreportError(click.ClickException):
    """Base of every error caused by the user's input; click prints it and exits 2."""

    exit_code = 2

    def format_message(self) -> str:
        return self.message


class RecordError(SdofreportError):
    """A ground-motion record file cannot be read or is not valid."""


class ProjectError(SdofreportError):
    """The project file or something it names is not valid."""


class BuildError(SdofreportError):
    """The site could not be built or written."""


@contextmanager
def naming_path(path):
    """Turn an ``OSError`` while writing ``path`` (a full disk says only "No space left on
    device", naming no file) into a :class:`BuildError` that names ``path``."""
    try:
        yield
    except OSError as exc:
        raise BuildError(f"{path}: could not be written: {exc.strerror or exc}. Free some "
                         f"space, or choose another output folder; nothing half-written "
                         f"was kept.") from None
