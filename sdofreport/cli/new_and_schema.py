"""Click commands for getting started and for the published formats: ``new`` and ``schema``.

Each command parses its arguments, calls one function and reports. User errors are
:class:`~sdofreport.errors.SdofreportError` (exit status 2).
"""

from __future__ import annotations

import click

from sdofreport.schemas import SCHEMA_NAMES


@click.command("new")
@click.argument("folder", type=click.Path(path_type=str))
def new_command(folder):
    """Write a small, commented starter project into FOLDER (new or empty).

    The starter has a project file, notes and three short synthetic records (fixed
    seeds, so every run writes the same bytes) for two invented systems with limits.
    It builds as it is. A folder that is not empty is refused (exit status 2).

    \b
    Example:
      sdofreport new pump_house && sdofreport build pump_house/sdofreport.toml -o _site
    """
    from sdofreport.authoring.starter import PROJECT_FILE, write_starter

    written = write_starter(folder)
    click.echo(f"Wrote {len(written)} files into {folder}. Next:\n"
               f"  sdofreport build {click.format_filename(folder)}/{PROJECT_FILE} "
               f"-o _site\n"
               f"then open _site/index.html. The records are synthetic and the systems "
               f"invented; replace them with your own.", err=True)


@click.command("schema")
@click.argument("name", type=click.Choice(SCHEMA_NAMES), required=False)
def schema_command(name):
    """Print a published JSON Schema (draft 2020-12): results (data/results.json),
    manifest (manifest.json) or comparison (compare --format json). Without NAME, list
    them.

    \b
    Example:
      sdofreport schema results > results.schema.json
    """
    from sdofreport.schemas import load_schema, schema_text

    if name is None:
        for each in SCHEMA_NAMES:
            click.echo(f"{each}: {load_schema(each).get('title', '')}")
        return
    click.echo(schema_text(name), nl=False)


COMMANDS = (new_command, schema_command)


def register(group: click.Group) -> None:
    """Add the ``new`` and ``schema`` commands to a click group."""
    for command in COMMANDS:
        group.add_command(command)
