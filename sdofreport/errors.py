"""User-facing errors: one paragraph, no traceback, exit status 2 (see the CLI)."""

from __future__ import annotations

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
