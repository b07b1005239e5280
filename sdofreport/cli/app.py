"""Command-line interface: each command parses its options, calls one function, reports.

Errors caused by the input are :class:`~sdofreport.errors.SdofreportError` and end the
program with a one-paragraph message and exit status 2; ``-v`` adds the debug log and,
for unexpected failures, the traceback.
"""

from __future__ import annotations

import csv
import io
import json
import logging
import sys

import click

from sdofreport import __version__
from sdofreport.cli.options import deprecated, emit, output_option, resolve_format
from sdofreport.core.spectra import SPECTRUM_METHODS
from sdofreport.errors import SdofreportError
from sdofreport.runtime import configure

log = logging.getLogger("sdofreport")

SPECTRUM_FORMATS = ("json", "csv")


def _version_text() -> str:
    import numba
    import numpy
    import scipy

    return (f"sdofreport {__version__} (numpy {numpy.__version__}, "
            f"scipy {scipy.__version__}, numba {numba.__version__})")


def _print_version(ctx: click.Context, _param: click.Parameter, value: bool) -> None:
    if not value or ctx.resilient_parsing:
        return
    click.echo(_version_text())
    ctx.exit(0)


def _float_list(text: str | None, option: str) -> list[float] | None:
    """Parse ``"0.1,0.2, 0.5"`` into floats, or raise a user error naming the option."""
    if text is None:
        return None
    values = []
    for token in text.replace(";", ",").split(","):
        token = token.strip()
        if not token:
            continue
        try:
            values.append(float(token))
        except ValueError:
            raise SdofreportError(
                f"{option}: expected numbers separated by commas, found {token!r}."
            ) from None
    if not values:
        raise SdofreportError(f"{option}: expected at least one number, found {text!r}.")
    return values


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.option("--version", is_flag=True, expose_value=False, is_eager=True,
              callback=_print_version, help="Print the version and the versions of numpy, "
              "scipy and numba, then exit.")
@click.option("-v", "--verbose", is_flag=True, help="Debug log and tracebacks.")
@click.pass_context
def cli(ctx: click.Context, verbose: bool) -> None:
    """Earthquake response of single-oscillator structures, as a review site.

    \b
    Example:
      sdofreport build site_examples/harbourview_cold_store/sdofreport.toml -o _site
    """
    ctx.ensure_object(dict)
    ctx.obj["verbose"] = verbose
    logging.basicConfig(
        level=logging.DEBUG if verbose else logging.WARNING,
        format="%(levelname)s: %(message)s",
        stream=sys.stderr,
    )
    _quiet_warnings(verbose)
    configure()  # numba's cache folder and vector width (sdofreport.runtime)


def _quiet_warnings(verbose: bool) -> None:
    """
    Python and numpy warnings (overflow, invalid value...) go to the debug log, never to
    the terminal: a user sees our messages only, and ``-v`` shows the warnings too.
    Worker processes forked later inherit this.
    """
    logging.captureWarnings(True)
    logging.getLogger("py.warnings").setLevel(logging.DEBUG if verbose else logging.ERROR)


def _record_options(func):
    from sdofreport.core.units import acceleration_unit_names
    from sdofreport.records import RECORD_FORMATS

    func = click.option("--dt", "dt_s", type=float, default=None,
                        help="Time step [s], for files that do not state it.")(func)
    func = click.option("--units", type=click.Choice(acceleration_unit_names(),
                        case_sensitive=False), default=None,
                        help="Units of the acceleration values in the file (default g).")(func)
    func = click.option("--layout", "file_format", type=click.Choice(RECORD_FORMATS),
                        default=None,
                        help="Record file layout (default auto: detected, and said "
                             "which).")(func)
    return func


@cli.command("spectrum")
@click.argument("file", type=click.Path(dir_okay=False, path_type=str))
@_record_options
@click.option("--damping", "damping", type=float, multiple=True,
              help="Damping ratio (repeatable), e.g. 0.05. Default 0.05.")
@click.option("--periods", "periods_text", default=None,
              help="Comma-separated periods [s]. Default 200 log-spaced, 0.01-10 s.")
@click.option("--method", type=click.Choice(SPECTRUM_METHODS), default="exact",
              show_default=True, help="Integration method.")
@click.option("--format", "output_format", default=None, metavar="[json|csv]",
              help="Format written: json (spectra and intensity measures) or csv (the "
                   "same as tables; default json).")
@output_option("Write to this file instead of standard output.")
def spectrum_command(file, file_format, units, dt_s, damping, periods_text, method,
                     output_format, output):
    """Response spectra and intensity measures of one record, to standard output.

    The detected (or given) file layout, the point count and the time step are said on
    standard error.

    \b
    Example:
      sdofreport spectrum record.txt --units g --damping 0.02 --damping 0.05 --format csv
    """
    from sdofreport.cli.spectrum_report import spectrum_report
    from sdofreport.records import RECORD_FORMATS

    if output_format in RECORD_FORMATS and file_format is None:
        deprecated(f"'--format {output_format}' names a record layout; use "
                   f"'--layout {output_format}' ('--format' is now the output format).")
        file_format, output_format = output_format, None
    if output_format is not None and output_format not in SPECTRUM_FORMATS:
        raise click.BadParameter(f"expected one of {', '.join(SPECTRUM_FORMATS)}, found "
                                 f"{output_format!r}.", param_hint="'--format'")
    output_format, output = resolve_format(SPECTRUM_FORMATS, "json", output_format, output)
    periods = _float_list(periods_text, "--periods")
    report = spectrum_report(file, file_format=file_format or "auto", units=units,
                             dt_s=dt_s, damping=list(damping) or [0.05], periods=periods,
                             method=method)
    click.echo(report["read"], err=True)
    for warning in report["warnings"]:
        click.echo(f"Warning: {warning}", err=True)
    for note in report["notes"]:
        log.info(note)
    if output_format == "json":
        text = json.dumps(report["json"], indent=1) + "\n"
    else:
        buffer = io.StringIO()
        writer = csv.writer(buffer, lineterminator="\n")
        writer.writerows(report["csv"])
        text = buffer.getvalue()
    emit(text, output)


@cli.command("build")
@click.argument("project_file", metavar="PROJECT",
                type=click.Path(path_type=str), default="sdofreport.toml")
@click.option("-o", "--output", default=None, type=click.Path(path_type=str),
              help="Site folder to write (default: _site beside the project file).")
@click.option("--jobs", "-j", type=click.IntRange(min=1), default=None,
              help="Worker processes (default: the number of cores).")
@click.option("--quiet", "-q", is_flag=True, help="No progress bar or summary line.")
@click.option("--strict", is_flag=True,
              help="Exit with status 3 when any check exceeds its limit or the record "
                   "suite does not comply with its standard's scaling criteria.")
@click.option("--cache-dir", type=click.Path(file_okay=False, path_type=str), default=None,
              help="Result cache folder (default: a per-user cache folder).")
@click.option("--no-cache", is_flag=True, help="Recompute everything; store nothing.")
@click.option("--allow-outside", is_flag=True,
              help="Accept input files outside the project folder.")
@click.option("--scheduler", default=None, metavar="tcp://HOST:PORT",
              help="Send the jobs to a running Dask scheduler (needs sdofreport[dask]).")
@click.option("--dask-local", type=click.IntRange(min=1), default=None, metavar="N",
              help="Start a local Dask cluster of N worker processes for the jobs.")
@click.option("--compare-to", "compare_to", default=None, metavar="OLD",
              type=click.Path(exists=True, path_type=str),
              help="An earlier run (site folder, packed zip or results.json): add a "
                   "revision page listing what changed.")
@click.option("--pdf", "pdf_file", is_flag=False, flag_value="", default=None,
              metavar="[FILE]", type=click.Path(dir_okay=False, path_type=str),
              help="Also print the whole site into one review-packet PDF via headless "
                   "Chromium (needs sdofreport[pdf], chromium, chromium-driver); "
                   "default FILE: <site>-review-packet.pdf beside the site.")
def build_command(project_file, output, jobs, quiet, strict, cache_dir, no_cache,
                  allow_outside, scheduler, dask_local, compare_to, pdf_file):
    """Build the review site of a project.

    \b
    Example:
      sdofreport build site_examples/harbourview_cold_store/sdofreport.toml -o _site
    """
    from pathlib import Path

    from sdofreport.build import build_site

    if output is None:
        project_path = Path(project_file)
        folder = project_path if project_path.is_dir() else project_path.parent
        output = str(folder / "_site")
    pdf_target_path = None
    if pdf_file is not None:  # fail fast, before a long build
        from sdofreport.site.pdf import check_printing, pdf_target

        pdf_target_path = pdf_target(pdf_file, output)
        check_printing()
    show_bar = not quiet and sys.stderr.isatty()
    bar = None

    def progress(done, total, label):
        nonlocal bar
        if not show_bar:
            return
        if bar is None:
            bar = click.progressbar(length=total, label="Computing", file=sys.stderr,
                                    show_pos=True)
            bar.__enter__()
        bar.update(done - bar.pos)
        if done >= total:
            bar.__exit__(None, None, None)

    outcome = build_site(project_file, output, jobs=jobs, cache_dir=cache_dir,
                         use_cache=not no_cache, allow_outside=allow_outside,
                         progress=progress, scheduler=scheduler, dask_local=dask_local,
                         compare_to=compare_to)
    results = outcome.results
    if pdf_target_path is not None:
        from sdofreport.site.pdf import write_pdf

        pages = write_pdf(outcome.output, pdf_target_path, results)
        if not quiet:
            click.echo(f"Printed {pdf_target_path} ({pages} pages).", err=True)
    # Unstable checks count with the exceeding ones: a runaway is never "within".
    exceeding = len(results.not_within)
    if not quiet:
        click.echo(f"Built {outcome.output} ({outcome.file_count} files) in "
                   f"{outcome.seconds:.1f} s: {len(results.records)} records, "
                   f"{len(results.project.systems)} systems, {len(results.checks)} checks, "
                   f"{exceeding} exceeding the stated limit or unstable; "
                   f"{results.cache_hits} cached, {results.cache_misses} computed.",
                   err=True)
        click.echo("Verdicts are checks of the stated limits, not an approval; results "
                   "support but never replace a licensed engineer's judgement.", err=True)
    scaling = results.scaling
    noncompliant = scaling is not None and scaling.complies is False
    if noncompliant and not quiet:
        click.echo(f"The record suite does not comply with {scaling.standard or 'its rule'}"
                   f": " + "; ".join(f"{c.name} {c.achieved:g}, required {c.comparison} "
                                     f"{c.required:g}" for c in scaling.failed) + ".",
                   err=True)
    if strict and (exceeding or noncompliant):
        if not quiet:
            reasons = []
            if exceeding:
                reasons.append(f"{exceeding} check(s) exceed the stated limit or are "
                               f"unstable")
            if noncompliant:
                reasons.append("the record suite does not comply")
            click.echo(f"--strict: {'; '.join(reasons)}.", err=True)
        sys.exit(3)


from sdofreport.cli.archive import register_commands  # noqa: E402
from sdofreport.cli.new_and_schema import register as register_docs_commands  # noqa: E402
from sdofreport.cli.synthesize import register as _register_synthesize  # noqa: E402

register_commands(cli)
register_docs_commands(cli)
_register_synthesize(cli)


def main(argv: list[str] | None = None) -> None:
    """Console-script entry point."""
    try:
        cli.main(args=argv, prog_name="sdofreport", standalone_mode=False)
    except click.exceptions.Exit as exc:
        sys.exit(exc.exit_code)
    except click.ClickException as exc:
        exc.show()
        sys.exit(exc.exit_code)
    except click.exceptions.Abort:
        click.echo("Aborted.", err=True)
        sys.exit(130)
    except OSError as exc:
        if "-v" in (argv or sys.argv) or "--verbose" in (argv or sys.argv):
            raise
        where = f"{exc.filename}: " if exc.filename else ""
        click.echo(f"Error: {where}{exc.strerror or exc} (no file named by the system; "
                   f"run with -v for details)" if not where else
                   f"Error: {where}{exc.strerror or exc}", err=True)
        sys.exit(2)


if __name__ == "__main__":  # pragma: no cover
    main()
