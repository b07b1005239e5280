"""A few numbers printed on the example's pages, recomputed here from outside sources.

Each check reads the number as the page prints it (4 significant figures) and compares
it with a value computed in this file from the example's inputs (its project file and
record files, read with numpy), to within half a unit in the last printed digit. The
source of every formula is named beside it. The example is the session's one shared
build (``built_example`` in tests/conftest.py).
"""

from __future__ import annotations

import html
import math
import re
import tomllib

import numpy as np
import pytest
from scipy.integrate import cumulative_trapezoid

from tests.conftest import EXAMPLE

#: Standard acceleration of gravity [m/s²] (3rd CGPM 1901; ISO 80000-3).
G = 9.80665

_NUMBER = r"(-?[0-9][0-9\u2009]*(?:\.[0-9]+)?)"


def _page_text(site, page: str) -> str:
    """The visible text of a page: no figures, scripts or tags, one space between words."""
    text = (site / page).read_text("utf-8")
    text = re.sub(r"<(svg|script|style)\b.*?</\1>", " ", text, flags=re.DOTALL)
    text = html.unescape(re.sub(r"<[^>]+>", " ", text)).replace("\u2212", "-")
    return re.sub(r"[ \t\r\n]+", " ", text)  # thin spaces inside numbers are kept


def _printed(text: str, before: str, after: str = "") -> str:
    """The one number printed between ``before`` and ``after`` in ``text``."""
    found = re.findall(re.escape(before) + r"\s*" + _NUMBER + r"\s*" + re.escape(after),
                       text)
    assert len(found) == 1, (before, found)
    return found[0]


def _assert_prints(printed: str, expected: float) -> None:
    """``printed`` is ``expected`` rounded to the digits shown (half a unit of the last
    printed digit, plus round-off)."""
    digits = printed.replace("\u2009", "")
    decimals = len(digits.split(".")[1]) if "." in digits else 0
    assert abs(float(digits) - expected) <= 0.5 * 10.0 ** -decimals * (1 + 1e-9), \
        (printed, expected)


@pytest.fixture(scope="module")
def project() -> dict:
    with open(EXAMPLE / "sdofreport.toml", "rb") as handle:
        return tomllib.load(handle)


def _system(project: dict, system_id: str) -> dict:
    (system,) = [s for s in project["systems"] if s["id"] == system_id]
    return system


def _si(text: str, unit: str, factor: float) -> float:
    """A value given as ``"<number> <unit>"`` in the project file, in SI."""
    number, given = text.split()
    assert given == unit, text
    return float(number) * factor


# ----------------------------------------------------------- design spectrum


def asce7_16_design_sa_g(period_s: float, sds: float, sd1: float, tl_s: float) -> float:
    """Design response spectrum of ASCE/SEI 7-16 §11.4.6, [g] (equation numbers from
    memory): S_DS (0.4 + 0.6 T/T0) below T0 = 0.2 S_D1/S_DS, S_DS up to Ts = S_D1/S_DS,
    S_D1/T up to T_L, S_D1 T_L/T² beyond."""
    t0, ts = 0.2 * sd1 / sds, sd1 / sds
    if period_s < t0:
        return sds * (0.4 + 0.6 * period_s / t0)  # Eq. 11.4-5
    if period_s <= ts:
        return sds
    if period_s <= tl_s:
        return sd1 / period_s  # Eq. 11.4-6
    return sd1 * tl_s / period_s**2  # Eq. 11.4-7


#: MCE_R over design: ASCE/SEI 7-16 §11.4.5 sets S_DS = 2/3 S_MS and S_D1 = 2/3 S_M1.
MCE_R_OVER_DESIGN = 1.5


def test_target_spectrum_in_results_follows_asce7_16_11_4_6(built_example, project):
    import json

    spectrum = project["design_spectrum"]
    sds, sd1 = spectrum["sds"], spectrum["sd1"]
    tl = _si(spectrum["tl"], "s", 1.0)
    assert spectrum["level"] == "mce_r"
    written = json.loads((built_example.site / "data" / "results.json").read_text())
    periods = written["design_spectrum"]["periods_s"]
    expected = [MCE_R_OVER_DESIGN * asce7_16_design_sa_g(t, sds, sd1, tl) for t in periods]
    # Every branch of §11.4.6 is on the grid (0.01-10 s against T0 0.105 s, Ts 0.525 s,
    # TL 8 s), so each formula is checked.
    assert min(periods) < 0.2 * sd1 / sds and max(periods) > tl
    assert written["design_spectrum"]["sa_g"] == pytest.approx(expected, rel=1e-12)


def test_design_level_on_the_pier_page_is_the_asce7_16_mce_r_ordinate(built_example,
                                                                       project):
    spectrum = project["design_spectrum"]
    pier = _system(project, "pier")
    period = _si(pier["period"], "s", 1.0)
    text = _page_text(built_example.site, "systems/pier.html")
    printed = _printed(text, "at the design level", "g")
    # ASCE/SEI 7-16 §11.4.6 Eq. 11.4-6 (Ts < T <= TL) times 1.5 for MCE_R (§11.4.5).
    expected = MCE_R_OVER_DESIGN * asce7_16_design_sa_g(
        period, spectrum["sds"], spectrum["sd1"], _si(spectrum["tl"], "s", 1.0))
    _assert_prints(printed, expected)


# ------------------------------------------------------------------- periods


def test_tank_period_is_two_pi_root_m_over_k(built_example, project):
    tank = _system(project, "tank")
    mass = _si(tank["mass"], "t", 1000.0)
    stiffness = _si(tank["stiffness"], "MN/m", 1e6)
    # Closed form of the undamped linear oscillator: T = 2π √(m/k) (Chopra, Dynamics of
    # Structures, 5th ed., §2.1; section number from memory).
    expected = 2.0 * math.pi * math.sqrt(mass / stiffness)
    text = _page_text(built_example.site, "systems/tank.html")
    _assert_prints(_printed(text, "Natural period T", "s"), expected)


def test_frame_period_from_fixed_fixed_column_stiffness(built_example, project):
    frame = _system(project, "frame")
    assert frame["end_condition"] == "fixed-fixed"
    count = frame["count"]
    modulus = _si(frame["elastic_modulus"], "GPa", 1e9)
    inertia = _si(frame["second_moment"], "m**4", 1.0)
    height = _si(frame["height"], "m", 1.0)
    # Sway stiffness of a column fixed against rotation at both ends, 12 EI / h³ (the
    # slope-deflection result, e.g. Chopra, Dynamics of Structures, 5th ed., §1.3,
    # section number from memory);
    # columns side by side add their stiffnesses; T = 2π √(m/k).
    stiffness = count * 12.0 * modulus * inertia / height**3
    expected = 2.0 * math.pi * math.sqrt(_si(frame["mass"], "t", 1000.0) / stiffness)
    text = _page_text(built_example.site, "systems/frame.html")
    _assert_prints(_printed(text, "Lateral stiffness k", "kN/m"), stiffness / 1000.0)
    _assert_prints(_printed(text, "Natural period T", "s"), expected)


def test_skid_period_from_springs_in_series_and_parallel(built_example, project):
    skid = _system(project, "skid")
    roof, mounts = skid["network"]["series"]
    k_roof = _si(roof["k"], "MN/m", 1e6)
    # Springs in parallel add; in series their flexibilities add (elementary mechanics).
    k_mounts = sum(_si(each["k"], "MN/m", 1e6) for each in mounts["parallel"])
    stiffness = 1.0 / (1.0 / k_roof + 1.0 / k_mounts)
    expected = 2.0 * math.pi * math.sqrt(_si(skid["mass"], "t", 1000.0) / stiffness)
    text = _page_text(built_example.site, "systems/skid.html")
    _assert_prints(_printed(text, "Natural period T", "s"), expected)


# --------------------------------------------------------------------- P-Delta


def test_pier_stability_coefficient_and_period_with_p_delta(built_example, project):
    pier = _system(project, "pier")
    assert pier["p_delta"] is True
    mass = _si(pier["mass"], "t", 1000.0)
    period = _si(pier["period"], "s", 1.0)
    height = _si(pier["height"], "m", 1.0)
    stiffness = 4.0 * math.pi**2 * mass / period**2  # from T = 2π √(m/k)
    weight = mass * G
    # Stability coefficient θ = P Δ / (V h) (ASCE/SEI 7-16 §12.8.7, Eq. 12.8-16 with
    # I_e = C_d = 1; equation number from memory), with the elastic shear V = k Δ:
    # θ = P / (k h).
    theta = weight / (stiffness * height)
    # The gravity load's geometric stiffness −P/h lowers the lateral stiffness to
    # k (1 − θ), so the period grows to T/√(1 − θ) (Wilson, Three-Dimensional Static
    # and Dynamic Analysis of Structures, ch. on P-Delta effects, from memory).
    period_with_p_delta = 2.0 * math.pi * math.sqrt(mass / (stiffness - weight / height))
    text = _page_text(built_example.site, "systems/pier.html")
    _assert_prints(_printed(text, "Stability coefficient θ"), theta)
    _assert_prints(_printed(text, "Geometric stiffness W/h", "kN/m"), weight / height / 1e3)
    _assert_prints(_printed(text, "Elastic period with P-Δ", "s"), period_with_p_delta)


# ------------------------------------------------------------------------- PGA


def _baseline_corrected(time_s: np.ndarray, acceleration: np.ndarray) -> np.ndarray:
    """``acceleration`` less the straight line c0 + c1 t whose velocity c0 t + c1 t²/2
    fits the record's velocity (trapezoid rule, from rest) by least squares: the
    order-1 baseline correction fitted in velocity of Boore & Bommer (2005), Soil Dyn.
    Earthq. Eng. 25(2), §4, as the record page states it was done."""
    velocity = cumulative_trapezoid(acceleration, time_s, initial=0.0)
    t = time_s - time_s[0]
    basis = np.column_stack([t, t**2 / 2.0])
    (c0, c1), *_ = np.linalg.lstsq(basis, velocity, rcond=None)
    return acceleration - (c0 + c1 * t)


@pytest.mark.parametrize("record_id", ["hcs06", "hcs08", "hcs14"])
def test_record_page_pga_from_the_record_file(built_example, project, record_id):
    (record,) = [r for r in project["records"] if r["id"] == record_id]
    assert record["units"] == "g" and project["processing"]["baseline_order"] == 1
    # The file read with numpy: '#' comment lines, one header row, time and value in g.
    lines = (EXAMPLE / record["file"]).read_text("utf-8").splitlines()
    rows = [line for line in lines if not line.startswith("#")]
    assert rows[0] == "time_s,accel_g"
    table = np.loadtxt(rows[1:], delimiter=",")
    time_s, acceleration_g = table[:, 0], table[:, 1]
    text = _page_text(built_example.site, f"records/{record_id}.html")
    assert "baseline: order-1 polynomial removed" in text
    # PGA = max |a| (the definition), of the record as processed, before scaling.
    expected = float(np.max(np.abs(_baseline_corrected(time_s, acceleration_g))))
    printed = _printed(text, "PGA unscaled", "g")
    _assert_prints(printed, expected)
    # The check can tell: the uncorrected peak would print differently for these records.
    assert abs(float(printed) - np.max(np.abs(acceleration_g))) > 0.5e-4
