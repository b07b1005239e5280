"""A small, commented starter project that builds as it is (``sdofreport new``).

The scenario is invented: the Millbrook Yard pump house of a fictional operator, with
two single-oscillator systems and three short synthetic ground motions. The records are
Kanai–Tajimi filtered white noise with a Saragoni–Hart envelope [1]_, [2]_, [3]_ drawn
with fixed seeds by :func:`sdofreport.core.stochastic.kanai_tajimi_accelerogram`, so the
same call always writes the same bytes. None of them is a recorded earthquake motion.

Everything is gathered in memory first and written only when every file is ready, so a
failure never leaves a half-written project behind.

References
----------
.. [1] K. Kanai, "Semi-empirical formula for the seismic characteristics of the
   ground," Bull. Earthquake Res. Inst., Univ. Tokyo, vol. 35, pp. 309-325, 1957.
.. [2] H. Tajimi, "A statistical method of determining the maximum response of a
   building structure during an earthquake," in Proc. 2nd World Conf. Earthquake Eng.,
   Tokyo, 1960, pp. 781-797.
.. [3] G. R. Saragoni and G. C. Hart, "Simulation of artificial earthquakes,"
   Earthquake Eng. Struct. Dyn., vol. 2, no. 3, pp. 249-267, 1974,
   doi:10.1002/eqe.4290020305.
"""

from __future__ import annotations

import os
import tempfile
from dataclasses import dataclass
from pathlib import Path

from sdofreport.errors import SdofreportError, naming_path

#: Name of the project file the starter writes.
PROJECT_FILE = "sdofreport.toml"


@dataclass(frozen=True)
class StarterMotion:
    """Parameters of one synthetic starter record (invented; fixed seed)."""

    id: str
    seed: int
    duration_s: float  # [s]
    dt_s: float  # [s]
    ground_frequency_hz: float  # Kanai–Tajimi ground frequency [Hz]
    ground_damping: float  # Kanai–Tajimi ground damping ratio [-]
    pga_g: float  # peak ground acceleration after scaling [g]


#: The three starter records: 10-15 s long, stiff-soil-like filter parameters chosen by
#: hand (common practice for demonstration data, no source).
STARTER_MOTIONS: tuple[StarterMotion, ...] = (
    StarterMotion("mby01", 4101, 12.0, 0.01, 2.8, 0.60, 0.30),
    StarterMotion("mby02", 4102, 15.0, 0.01, 1.9, 0.50, 0.25),
    StarterMotion("mby03", 4103, 10.0, 0.01, 3.6, 0.65, 0.35),
)

#: Clough–Penzien high-pass corner of every starter record [Hz]; below the starter
#: systems' frequencies, enough to keep the ground displacement small.
HIGH_PASS_HZ = 0.2

PROJECT_TEXT = """\
# sdofreport starter project: Millbrook Yard pump house (an invented example).
#
# Build the review site with
#     sdofreport build sdofreport.toml -o _site
# then open _site/index.html in a browser. Replace the records and systems with your
# own; every key is described in docs/project-file.md of the sdofreport sources.
#
# Every dimensional value may be a plain SI number (m, kg, s, N) or text with units,
# such as "12 t", "2.4 MN/m", "30 mm" or "0.5 g".

[project]
title = "Millbrook Yard pump house - seismic response checks"
reference = "MBY-0001"
revision = "A"
prepared_by = "Your Name"
# checked_by = "A. Checker"
date = "2026-01-15"        # printed on the pages; remove to use SOURCE_DATE_EPOCH
notes = "notes.md"         # Markdown shown on the summary page
display_units = "SI"       # or "US"; data/results.json always stays SI

[analysis]
method = "exact"           # exact | newmark-average | newmark-linear
damping = [0.05]           # spectrum damping ratios (fractions of critical)
periods = { min = 0.02, max = 5.0, count = 100 }   # log-spaced spectrum periods [s]
statistic = "auto"         # 3 records: the maximum over the suite is used

[processing]               # applied to every record; each step is off when omitted
baseline_order = 1         # remove a least-squares linear baseline

# Optional target spectrum, drawn on the spectra and used by [scaling]: the ASCE/SEI
# 7-22 MCE_R spectrum (the Chapter 16 target), here in its two-period form from the
# design values S_DS and S_D1 (MCE_R = 1.5 x design). For the multi-period spectrum,
# replace sds, sd1 with the ordinates copied from the official source for your site:
#     periods = [0.0, 0.01, 0.02, ...]    # s, from 0, increasing
#     sa = [...]                          # g, MCE_R
# Other kinds: "asce7-16", "en1998-1" (EN 1998-1:2004), "en1998-1-1" (EN 1998-1-1:2024)
# and "table". Clause numbers and coefficients are from memory: see docs/methods.md.
[design_spectrum]
kind = "asce7-22"
site_class = "CD"          # A, B, BC, C, CD, D, DE, E or "default"
sds = 0.70                 # g
sd1 = 0.35                 # g
tl = "6 s"

# Optional suite scaling. "none" keeps each record's own amplitude; "fit" scales each
# record to the target by log least squares; "asce7-22" follows ASCE/SEI 7-22 Chapter 16
# (at least 11 motions, each a horizontal pair). See docs/methods.md.
[scaling]
rule = "none"

# Three synthetic records (two-column files: time in s, acceleration in g).
[[records]]
id = "mby01"
file = "records/mby01.csv"
format = "two-column"
units = "g"

[[records]]
id = "mby02"
file = "records/mby02.csv"
format = "two-column"
units = "g"

[[records]]
id = "mby03"
file = "records/mby03.csv"
format = "two-column"
units = "g"

# System 1: a pump skid on spring mounts, given by its mass and lateral stiffness.
[[systems]]
id = "skid"
name = "Fire-pump skid on spring mounts"
mass = "6 t"
stiffness = "2.4 MN/m"
damping = 0.03
[systems.limits]
displacement = "30 mm"     # clearance to the pipe flex connectors
base_shear = "60 kN"       # anchor capacity

# System 2: the pump-house frame, four steel columns fixed at both ends (12EI/h^3 each).
[[systems]]
id = "frame"
name = "Pump-house steel frame"
kind = "columns"
count = 4
elastic_modulus = "200 GPa"
second_moment = "8e-5 m**4"
height = "4.5 m"
end_condition = "fixed-fixed"
mass = "40 t"
damping = 0.05
[systems.limits]
drift_ratio = 0.01
total_accel = "1.2 g"
"""

NOTES_TEXT = """\
# Millbrook Yard pump house — notes

> **Invented example.** The Millbrook Yard pump house, its operator and its site are
> fictional, and the three records are synthetic (Kanai–Tajimi filtered white noise
> with fixed seeds), not recorded earthquake motions. Nothing here is design advice.

## What is checked

1. **Fire-pump skid** on four spring mounts: the relative displacement against the
   clearance to the flexible pipe connectors, and the base shear against the anchor
   capacity.
2. **Pump-house frame**, four steel columns fixed against rotation at both ends: the
   drift ratio and the total acceleration of the roof mass.

## Before you rely on a result

- Replace the synthetic records with a suite selected and scaled for your site, as the
  governing code requires (for example ASCE/SEI 7-16 §16.2 asks for at least 11
  motions; EN 1998-1 §3.2.3.1.2 for at least 3).
- Verdicts are checks of the stated limits, not an approval. Results support but never
  replace a licensed engineer's judgement; the governing code and authority prevail.
"""

RECORDS_README_TEXT = """\
# Starter records

Three synthetic horizontal accelerograms written by `sdofreport new`. Each is
Kanai–Tajimi filtered white noise (Kanai 1957; Tajimi 1960) under a Saragoni–Hart (1974)
envelope, high-passed at {high_pass} Hz, drawn with a fixed seed, so every run writes
the same bytes. They are not recorded earthquake motions and stand for no real site.

| id | seed | duration [s] | dt [s] | ground frequency [Hz] | ground damping [-] | PGA [g] |
| --- | --- | --- | --- | --- | --- | --- |
{rows}
"""


def _records_readme() -> str:
    rows = "\n".join(
        f"| {m.id} | {m.seed} | {m.duration_s:g} | {m.dt_s:g} | {m.ground_frequency_hz:g} "
        f"| {m.ground_damping:g} | {m.pga_g:g} |" for m in STARTER_MOTIONS)
    return RECORDS_README_TEXT.format(high_pass=f"{HIGH_PASS_HZ:g}", rows=rows)


def _record_bytes(motion: StarterMotion, scratch: Path) -> bytes:
    """The two-column file of one starter record, in g, as bytes."""
    from sdofreport.core.stochastic import kanai_tajimi_accelerogram
    from sdofreport.core.units import G
    from sdofreport.records.writers import write_two_column

    acceleration = kanai_tajimi_accelerogram(
        motion.duration_s, motion.dt_s, seed=motion.seed,
        ground_frequency_hz=motion.ground_frequency_hz,
        ground_damping=motion.ground_damping, target_pga_m_s2=motion.pga_g * G,
        high_pass_hz=HIGH_PASS_HZ)
    path = scratch / f"{motion.id}.csv"
    write_two_column(path, motion.dt_s, acceleration / G, units="g", header_lines=(
        f"synthetic record {motion.id} written by 'sdofreport new' (not a recorded motion)",
        f"Kanai-Tajimi noise, seed {motion.seed}, Saragoni-Hart envelope"))
    return path.read_bytes()


#: Keeps what a build writes beside the project out of version control: the site
#: (``build`` writes ``_site/`` beside the project file by default) and the review packet
#: (``build --pdf`` writes ``<site>-review-packet.pdf`` beside the site by default).
GITIGNORE_TEXT = """\
# Written by 'sdofreport build' (rebuild them from this folder; archive them with
# 'sdofreport pack' rather than committing them).
_site/
*-review-packet.pdf
"""


def starter_files() -> dict[str, bytes]:
    """
    Every file of the starter project, keyed by its path relative to the project folder.

    Returns
    -------
    dict of str to bytes
        ``sdofreport.toml``, ``.gitignore``, ``notes.md``, ``records/README.md`` and the three
        ``records/<id>.csv`` files; the same bytes on every call. [-]
    """
    files = {PROJECT_FILE: PROJECT_TEXT.encode("utf-8"),
             ".gitignore": GITIGNORE_TEXT.encode("utf-8"),
             "notes.md": NOTES_TEXT.encode("utf-8"),
             "records/README.md": _records_readme().encode("utf-8")}
    with tempfile.TemporaryDirectory(prefix="sdofreport-new-") as scratch:
        for motion in STARTER_MOTIONS:
            files[f"records/{motion.id}.csv"] = _record_bytes(motion, Path(scratch))
    return dict(sorted(files.items()))


def _check_target(folder: Path) -> None:
    if folder.exists() and not folder.is_dir():
        raise SdofreportError(f"{folder}: exists and is not a folder; 'sdofreport new' "
                              f"writes a starter project into a new or empty folder.")
    if folder.is_dir() and any(folder.iterdir()):
        raise SdofreportError(f"{folder}: the folder is not empty; 'sdofreport new' "
                              f"writes only into a new or empty folder so that nothing "
                              f"of yours is overwritten. Choose another folder.")


def write_starter(folder: str | os.PathLike) -> list[Path]:
    """
    Write the starter project into ``folder`` (created if needed; must be empty).

    Parameters
    ----------
    folder : str or os.PathLike
        Target folder: new, or existing and empty. [-]

    Returns
    -------
    list of pathlib.Path
        The files written, in sorted order. [-]

    Raises
    ------
    SdofreportError
        If ``folder`` is a file or a non-empty folder (nothing is written).
    """
    folder = Path(folder)
    _check_target(folder)
    files = starter_files()  # gather everything before writing anything
    folder.mkdir(parents=True, exist_ok=True)
    written = []
    for relative, data in files.items():
        target = folder / relative
        target.parent.mkdir(parents=True, exist_ok=True)
        with naming_path(target):
            target.write_bytes(data)
        written.append(target)
    return written
