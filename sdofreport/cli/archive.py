"""Click commands for archival and revisions: verify, compare, pack and register.

Each command parses its options, calls one function and reports. Exit status: 0 clean,
4 when something differs from its manifest (or a re-run differs), 2 for bad input
(an :class:`~sdofreport.errors.SdofreportError`).
"""

from __future__ import annotations

import json
import sys

import click

from sdofreport.cli.options import (
    emit,
    format_option,
    old_output_file_option,
    output_option,
    resolve_format,
)

#: Exit status when a file, manifest entry or re-run result differs.
EXIT_DIFFERS = 4

VERIFY_FORMATS = ("text", "json")
COMPARE_FORMATS = ("text", "json", "html")


@click.command("verify")
@click.argument("site", type=click.Path(path_type=str))
@click.option("--rerun", is_flag=True,
              help="Also rebuild the site from its inputs/ with the installed versions: "
                   "compare every number in data/results.json and every other file "
                   "byte for byte; versions that differ from the recorded ones are "
                   "named first.")
@click.option("--rtol", type=click.FloatRange(min=0.0), default=None,
              help="Relative tolerance of --rerun for numbers (default 1e-9 when the site "
                   "was built with other versions; exact with the same versions unless "
                   "given).")
@click.option("--jobs", "-j", type=click.IntRange(min=1), default=None,
              help="Worker processes for --rerun (default: the number of cores).")
@format_option(VERIFY_FORMATS, "text")
@output_option("Write the report to this file instead of standard output.")
def verify_command(site, rerun, rtol, jobs, output_format, output):
    """Check a site folder or packed zip against its manifest.json.

    Re-hashes every file (SHA-256) and lists any file added, missing or changed; checks
    that the manifest lists every input and the project file, that its fingerprint
    recomputes and that every page shows it. A zip is read as hostile: duplicate or
    escaping names, links and inconsistent headers count as tampering. Exit status 0
    when everything matches, 4 when anything differs, 2 when SITE is not a readable site
    or archive.

    \b
    Example:
      sdofreport verify _site --rerun
    """
    from sdofreport.archive.verify import verify_site

    output_format, output = resolve_format(VERIFY_FORMATS, "text", output_format, output)
    report = verify_site(site, rerun=rerun, rtol=rtol, jobs=jobs)
    if output_format == "json":
        text = json.dumps(report.as_dict(), indent=1, ensure_ascii=False) + "\n"
    else:
        text = "".join(f"{line}\n" for line in report.lines())
    emit(text, output)
    if not report.ok:
        sys.exit(EXIT_DIFFERS)


@click.command("compare")
@click.argument("old", type=click.Path(path_type=str))
@click.argument("new", type=click.Path(path_type=str))
@format_option(COMPARE_FORMATS, "text")
@output_option("Write to this file instead of standard output.")
@old_output_file_option()
def compare_command(old, new, output_format, output, output_file):
    """Compare two runs: checks, systems, records and settings that changed.

    OLD and NEW are each a site folder, a zip made by 'sdofreport pack' or a
    results.json file. Every check whose demand, limit, ratio or verdict changed is
    listed with its relative change (new - old) / |old|.

    \b
    Example:
      sdofreport compare old_site new_site --format html -o revision.html
    """
    from sdofreport.archive.compare import (
        compare_paths,
        comparison_html,
        comparison_json,
        comparison_text,
    )

    output_format, output = resolve_format(COMPARE_FORMATS, "text", output_format, output,
                                           output_file)
    document, old_run, new_run = compare_paths(old, new)
    if output_format == "json":
        text = comparison_json(document)
    elif output_format == "html":
        text = comparison_html(document, old_run.results, new_run.results)
    else:
        text = comparison_text(document)
    emit(text, output)


@click.command("pack")
@click.argument("site", type=click.Path(path_type=str))
@click.option("-o", "--output", default=None, type=click.Path(path_type=str),
              help="Zip file to write, or a folder to put "
                   "<reference>_rev<revision>_<fingerprint>.zip in (default: the current "
                   "folder).")
def pack_command(site, output):
    """Pack a verified site into a deterministic zip archive.

    The same site always gives the same bytes (sorted entries, fixed timestamps and
    permissions). A site that does not match its manifest is refused (exit status 4).

    \b
    Example:
      sdofreport pack _site -o archive/
    """
    from sdofreport.archive.pack import pack_site

    click.echo(str(pack_site(site, output)))


@click.command("register")
@click.argument("folder", type=click.Path(path_type=str))
@click.option("-o", "--output", required=True, type=click.Path(path_type=str),
              help="Register folder to write (a new or empty folder, or a register built "
                   "before).")
def register_command(folder, output):
    """Build a landing site over every archived run found under FOLDER.

    Packed zips and site folders become one row each, copied into the register so
    links work offline. Each run is verified; a run that fails verification is marked,
    never hidden, and the exit status is then 4.

    \b
    Example:
      sdofreport register ci-artifacts/ -o register_site
    """
    from sdofreport.archive.register import build_register

    outcome = build_register(folder, output)
    click.echo(f"Register of {len(outcome.rows)} run(s) written to {outcome.output}.")
    for row in outcome.failed:
        click.echo(f"  {row.source}: {row.verification}")
    if outcome.failed:
        sys.exit(EXIT_DIFFERS)


COMMANDS = (verify_command, compare_command, pack_command, register_command)


def register_commands(group: click.Group) -> None:
    """Add the verify, compare, pack and register commands to a click group."""
    for command in COMMANDS:
        group.add_command(command)
