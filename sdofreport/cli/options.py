"""The options every command spells the same way: ``-o/--output`` is a path and
``--format`` a format.

Until the next release the earlier spellings still work with a deprecation message:
``--output json`` (a format given to ``--output``) and ``--output-file PATH``.
"""

from __future__ import annotations

from pathlib import Path

import click

from sdofreport.fsio import write_atomically


def deprecated(message: str) -> None:
    """Tell the user, on standard error, that a spelling will go in the next release."""
    click.echo(f"Deprecated: {message} This spelling will be removed in the next "
               f"release.", err=True)


def format_option(formats: tuple[str, ...], default: str):
    """``--format`` as every command spells it: one of ``formats`` (default ``default``)."""
    return click.option("--format", "output_format", default=None,
                        type=click.Choice(formats),
                        help=f"Format written: {', '.join(formats)} (default {default}).")


def output_option(help_text: str):
    """``-o/--output PATH`` as every command spells it: always a path.

    Taken as a list internally, so that the earlier ``--output FORMAT -o PATH`` still
    reads both; :func:`resolve_format` sorts them out.
    """
    return click.option("-o", "--output", "output", multiple=True, metavar="PATH",
                        type=click.Path(path_type=str), help=help_text)


def old_output_file_option():
    """The hidden, deprecated ``--output-file PATH`` of earlier releases."""
    return click.option("--output-file", "output_file", default=None, hidden=True,
                        type=click.Path(dir_okay=False, path_type=str))


def resolve_format(formats: tuple[str, ...], default: str, output_format: str | None,
                   outputs: tuple[str, ...], output_file: str | None = None
                   ) -> tuple[str, str | None]:
    """
    The format and the output path a command was given, old spellings included.

    A value of ``-o/--output`` that names one of ``formats`` while ``--format`` is not
    given is the earlier spelling of ``--format`` and is read as such, with a
    deprecation message; ``--output-file`` is the earlier ``-o/--output``.
    """
    paths = []
    for value in outputs:
        if value in formats and output_format is None:
            deprecated(f"'--output {value}' names a format; use '--format {value}' "
                       f"('-o/--output' is now always a path).")
            output_format = value
        else:
            paths.append(value)
    if len(set(paths)) > 1:
        raise click.UsageError(f"-o/--output given more than once: {', '.join(paths)}.")
    output = paths[0] if paths else None
    if output_file is not None:
        deprecated("'--output-file' is now '-o/--output'.")
        if output is not None and output != output_file:
            raise click.UsageError("give the file once: -o/--output or the deprecated "
                                   "--output-file, not both.")
        output = output_file
    return output_format or default, output


def emit(text: str, output: str | None) -> None:
    """Print ``text`` to standard output, or write it to the file ``output``."""
    if output is None:
        click.echo(text, nl=False)
    else:
        write_atomically(Path(output), text.encode("utf-8"))
        click.echo(f"Wrote {output}", err=True)
