"""(Re)create the synthetic records of the fictional Harbourview Cold Store example.

Run from anywhere:

    python site_examples/harbourview_cold_store/make_records.py

Writes twenty-two horizontal accelerograms (eleven pairs) into ``records/`` next to this
script (twelve in the two-column format, ten in the headed format) and
``records/README.md`` describing them.
Every record is Kanai–Tajimi filtered white noise with a fixed seed, so running the
script again gives the same bytes. The scenario, site, owner and motions are invented;
none of these records is a recorded earthquake motion.
"""

from __future__ import annotations

import os
import sys
from dataclasses import dataclass
from pathlib import Path

HERE = Path(__file__).resolve().parent

try:
    import sdofreport  # noqa: F401
except ImportError:  # running from a checkout without an installed package
    sys.path.insert(0, str(HERE.parents[1]))

from sdofreport.core.stochastic import kanai_tajimi_accelerogram  # noqa: E402
from sdofreport.core.units import G  # noqa: E402
from sdofreport.records.writers import write_headed, write_two_column  # noqa: E402

RECORDS_DIR = HERE / "records"

#: Clough–Penzien high-pass corner used for every record [Hz]: well below the lowest
#: system frequency of interest (1 / 1.6 s ≈ 0.63 Hz) yet enough to tame the drift.
HIGH_PASS_HZ = 0.15


@dataclass(frozen=True)
class Motion:
    id: str
    seed: int
    duration_s: float
    dt_s: float
    ground_frequency_hz: float
    ground_damping: float
    pga_g: float
    envelope: str
    file_format: str  # "two-column" or "headed"

    @property
    def filename(self) -> str:
        return f"{self.id}.csv" if self.file_format == "two-column" else f"{self.id}.txt"


# Parameters chosen by hand to look like a stiff-soil design suite: ground frequencies
# 1.5-5 Hz, ground damping 0.4-0.7, PGA 0.2-0.45 g, 20-40 s long.
MOTIONS: tuple[Motion, ...] = (
    Motion("hcs01", 7301, 30.0, 0.01, 2.4, 0.60, 0.32, "saragoni-hart", "two-column"),
    Motion("hcs02", 7302, 25.0, 0.005, 3.8, 0.55, 0.41, "saragoni-hart", "headed"),
    Motion("hcs03", 7303, 40.0, 0.01, 1.6, 0.65, 0.24, "saragoni-hart", "two-column"),
    Motion("hcs04", 7304, 20.0, 0.005, 4.8, 0.45, 0.37, "trapezoidal", "headed"),
    Motion("hcs05", 7305, 35.0, 0.01, 2.0, 0.70, 0.28, "saragoni-hart", "headed"),
    Motion("hcs06", 7306, 28.0, 0.005, 3.1, 0.50, 0.44, "saragoni-hart", "two-column"),
    Motion("hcs07", 7307, 32.0, 0.01, 2.8, 0.40, 0.35, "saragoni-hart", "headed"),
    Motion("hcs08", 7308, 22.0, 0.005, 4.2, 0.60, 0.30, "saragoni-hart", "two-column"),
    Motion("hcs09", 7309, 38.0, 0.01, 1.8, 0.55, 0.22, "trapezoidal", "two-column"),
    Motion("hcs10", 7310, 26.0, 0.005, 3.5, 0.65, 0.39, "saragoni-hart", "headed"),
    Motion("hcs11", 7311, 34.0, 0.01, 2.2, 0.50, 0.26, "saragoni-hart", "two-column"),
    Motion("hcs12", 7312, 24.0, 0.005, 4.5, 0.45, 0.42, "saragoni-hart", "headed"),
    # Five more pairs (P7-P11), so the suite has the eleven motions ASCE/SEI 7-16
    # Chapter 16 asks for; same ranges of parameters, fixed seeds.
    Motion("hcs13", 7313, 30.0, 0.01, 2.6, 0.55, 0.30, "saragoni-hart", "two-column"),
    Motion("hcs14", 7314, 30.0, 0.01, 2.9, 0.50, 0.27, "saragoni-hart", "two-column"),
    Motion("hcs15", 7315, 24.0, 0.005, 3.6, 0.60, 0.38, "trapezoidal", "headed"),
    Motion("hcs16", 7316, 24.0, 0.005, 3.3, 0.65, 0.34, "trapezoidal", "headed"),
    Motion("hcs17", 7317, 36.0, 0.01, 1.7, 0.60, 0.23, "saragoni-hart", "two-column"),
    Motion("hcs18", 7318, 36.0, 0.01, 1.9, 0.45, 0.25, "saragoni-hart", "two-column"),
    Motion("hcs19", 7319, 22.0, 0.005, 4.6, 0.50, 0.40, "saragoni-hart", "headed"),
    Motion("hcs20", 7320, 22.0, 0.005, 4.0, 0.55, 0.43, "saragoni-hart", "headed"),
    Motion("hcs21", 7321, 32.0, 0.01, 2.3, 0.70, 0.29, "trapezoidal", "two-column"),
    Motion("hcs22", 7322, 32.0, 0.01, 2.1, 0.65, 0.31, "trapezoidal", "two-column"),
)

SCENARIO = "Harbourview Cold Store (fictional demonstration; not a recorded motion)"


def make_motion(motion: Motion):
    """Acceleration of one motion [m/s²]."""
    return kanai_tajimi_accelerogram(
        motion.duration_s,
        motion.dt_s,
        seed=motion.seed,
        ground_frequency_hz=motion.ground_frequency_hz,
        ground_damping=motion.ground_damping,
        target_pga_m_s2=motion.pga_g * G,
        envelope=motion.envelope,
        high_pass_hz=HIGH_PASS_HZ,
    )


def describe(motion: Motion) -> str:
    return (
        f"Kanai-Tajimi filtered white noise, seed {motion.seed}, "
        f"f_g {motion.ground_frequency_hz:.1f} Hz, zeta_g {motion.ground_damping:.2f}, "
        f"{motion.envelope} envelope, high-pass {HIGH_PASS_HZ:.2f} Hz, "
        f"PGA {motion.pga_g:.2f} g"
    )


def write_motion(motion: Motion) -> None:
    acc_g = make_motion(motion) / G
    path = RECORDS_DIR / motion.filename
    if motion.file_format == "two-column":
        write_two_column(
            path, motion.dt_s, acc_g, units="g",
            header_lines=[f"{motion.id}: {SCENARIO}", describe(motion)],
        )
    else:
        write_headed(
            path, motion.dt_s, acc_g,
            title_lines=[f"{motion.id}: {SCENARIO}", describe(motion)],
        )


README_HEAD = """\
# Harbourview Cold Store: synthetic records

**These are synthetic records for a fictional scenario, not recorded earthquake motions.**
The Harbourview Cold Store, its owner Kestrel Bay Logistics Ltd and its site are invented
for the sdofreport demonstration. The files are generated by `../make_records.py`;
do not edit them by hand, run the script again instead (the output is the same bytes
on every run).

## Method

Each record is stationary white Gaussian noise (`numpy.random.default_rng(seed)`)
filtered in the frequency domain by the Kanai–Tajimi soil filter [1], [2], multiplied by
an amplitude envelope (Saragoni–Hart [3] in the parameterisation of Boore [4] with
eps = 0.2, eta = 0.05 and the window equal to the record length, or trapezoidal with
rise, strong phase and decay of 10 %, 40 % and 50 % of the length), high-passed by a
Clough–Penzien second-order factor [5] (corner {hp:.2f} Hz, damping equal to the ground
damping) applied to the zero-padded record [6], corrected by a linear velocity baseline
so that the record ends at rest, and scaled to the listed peak ground acceleration. See
`sdofreport/core/stochastic.py`.

The parameters were chosen by hand so that the twenty-two records (eleven horizontal
pairs) look like a plausible
horizontal design suite for a stiff-soil site. They have not been matched to any design
spectrum; amplitude scaling to a target is left to the project file.

## Files

Two-column files (`.csv`): comment lines starting with `#`, a header row
`time_s,accel_g`, then `time,acceleration` rows in g. Headed files (`.txt`), in sdofreport's
own layout: a first line naming the file, two `title:` lines, `unit: g`, the line
`samples: N, step: DT s`, then the values in g, eight per line.

| id | file | format | seed | duration [s] | dt [s] | f_g [Hz] | zeta_g [-] | envelope | PGA [g] |
|----|------|--------|------|--------------|--------|----------|------------|----------|---------|
"""

README_TAIL = """
## References

[1] K. Kanai, "Semi-empirical formula for the seismic characteristics of the ground,"
Bull. Earthq. Res. Inst. Univ. Tokyo, vol. 35, pp. 309-325, 1957.

[2] H. Tajimi, "A statistical method of determining the maximum response of a building
structure during an earthquake," in Proc. 2nd World Conf. Earthq. Eng., Tokyo, 1960,
vol. 2, pp. 781-797.

[3] G. R. Saragoni and G. C. Hart, "Simulation of artificial earthquakes," Earthquake
Eng. Struct. Dyn., vol. 2, no. 3, pp. 249-267, 1974, doi: 10.1002/eqe.4290020305.

[4] D. M. Boore, "Simulation of ground motion using the stochastic method," Pure Appl.
Geophys., vol. 160, no. 3-4, pp. 635-676, 2003, doi: 10.1007/PL00012553.

[5] R. W. Clough and J. Penzien, *Dynamics of Structures*. New York, NY, USA:
McGraw-Hill, 1975.

[6] D. M. Boore, "On pads and filters: Processing strong-motion data," Bull. Seismol.
Soc. Am., vol. 95, no. 2, pp. 745-750, 2005, doi: 10.1785/0120040160.
"""


def readme_text() -> str:
    rows = [
        f"| {m.id} | {m.filename} | {m.file_format} | {m.seed} | {m.duration_s:.0f} | "
        f"{m.dt_s:.3f} | {m.ground_frequency_hz:.1f} | {m.ground_damping:.2f} | "
        f"{m.envelope} | {m.pga_g:.2f} |"
        for m in MOTIONS
    ]
    return README_HEAD.format(hp=HIGH_PASS_HZ) + "\n".join(rows) + "\n" + README_TAIL


def main() -> None:
    RECORDS_DIR.mkdir(exist_ok=True)
    for motion in MOTIONS:
        write_motion(motion)
    with open(RECORDS_DIR / "README.md", "w", encoding="utf-8", newline="\n") as handle:
        handle.write(readme_text())
    total = sum(os.path.getsize(RECORDS_DIR / m.filename) for m in MOTIONS)
    print(f"wrote {len(MOTIONS)} records ({total / 1e6:.2f} MB) to {RECORDS_DIR}")


if __name__ == "__main__":
    main()
