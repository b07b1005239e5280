"""The ``sdofreport synthesize`` click command; parse the options, call the job, report."""

from __future__ import annotations

import click

from sdofreport.core.stochastic import COMPATIBLE_ENVELOPES
from sdofreport.errors import SdofreportError

__all__ = ["register", "synthesize_command"]


def _range(text: str | None) -> tuple[float, float] | None:
    if text is None:
        return None
    parts = text.split(",")
    try:
        lo, hi = (float(p) for p in parts)
    except ValueError:
        raise SdofreportError(f"--range {text!r}: expected two periods in seconds, "
                              f"like 0.05,4.") from None
    return lo, hi


@click.command("synthesize")
@click.option("--target", required=True, metavar="TARGET",
              help="Project file with [design_spectrum], a period [s] / Sa [g] table, or "
                   "inline like asce7-16:sds=1.0,sd1=0.6,tl=8.")
@click.option("--count", type=click.IntRange(1, 99), default=1, show_default=True,
              help="Number of records (seeds SEED, SEED+1, ...).")
@click.option("--duration", "duration_s", type=float, default=25.0, show_default=True,
              help="Record length [s].")
@click.option("--dt", "dt_s", type=float, default=0.01, show_default=True,
              help="Time step [s].")
@click.option("--seed", type=click.IntRange(min=0), default=1, show_default=True,
              help="Seed of the first record's random phases.")
@click.option("--envelope", type=click.Choice(COMPATIBLE_ENVELOPES),
              default=COMPATIBLE_ENVELOPES[0], show_default=True,
              help="Amplitude envelope.")
@click.option("--range", "range_text", default=None, metavar="T1,T2",
              help="Periods to match [s] (default: 1.25/f_max to duration/4).")
@click.option("--damping", type=float, default=None,
              help="Damping ratio of the matched spectrum (default 0.05, or the EN 1998-1 "
                   "spectrum's damping).")
@click.option("-o", "--output", "folder", required=True,
              type=click.Path(file_okay=False, path_type=str), help="Output folder.")
@click.option("--force", is_flag=True, help="Replace existing syn*.csv / synthesis.json.")
def synthesize_command(target, count, duration_s, dt_s, seed, envelope, range_text,
                       damping, folder, force):
    """Write synthetic records whose 5 % spectrum matches a target spectrum.

    Random-phase sinusoids (Gasparini & Vanmarcke 1976) under a Saragoni-Hart or
    trapezoidal envelope, corrected in frequency and then by local wavelets, with
    baseline correction, until every period of the range is within 5 % where
    possible. Prints the match of each record (max and mean deviation over the
    range). EN 1998-1 3.2.3.1.2 conditions apply to artificial records as to
    recorded ones.

    \b
    Example:
      sdofreport synthesize --target asce7-16:sds=1.0,sd1=0.6,tl=8 --count 3 -o syn
    """
    from sdofreport.authoring.synthesize import EUROCODE_NOTE, parse_target, synthesize

    parsed = parse_target(target)
    period_range = _range(range_text)
    summaries = synthesize(parsed, folder, count=count, duration_s=duration_s, dt_s=dt_s,
                           seed=seed, envelope=envelope, period_range_s=period_range,
                           damping=damping, force=force)
    for s in summaries:
        click.echo(f"{s['file']}: seed {s['seed']}, max deviation "
                   f"{100 * s['max_deviation']:.1f} %, mean {100 * s['mean_deviation']:+.1f} %,"
                   f" PGA {s['pga_g']:.3f} g")
    click.echo(EUROCODE_NOTE)


def register(group: click.Group) -> None:
    """Add the ``synthesize`` command to ``group``."""
    group.add_command(synthesize_command)
