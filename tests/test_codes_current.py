"""ASCE/SEI 7-22 and EN 1998-1-1:2024: spectra, the 7-22 edition, bad inputs.

Every clause, coefficient and interpolation rule of these editions was written down
from memory (see sdofreport/core/spectra_current.py); each expected value below is
computed by hand from the formula the comment states, not copied from our output.
"""

from __future__ import annotations

import numpy as np
import pytest

from sdofreport import codes
from sdofreport.core.design_spectra import design_spectrum
from sdofreport.core.spectra_current import asce7_22_spectrum, en1998_1_1_spectrum
from sdofreport.errors import ProjectError
from sdofreport.project import load_project
from sdofreport.outputs.results_json import results_document
from sdofreport.site.context import SiteContext
from tests.conftest import ONE_SYSTEM, PROJECT_HEAD
from tests.test_codes import _pairs, _run

MULTI = """\
[design_spectrum]
kind = "asce7-22"
site_class = "CD"
periods = [0.0, 0.1, 0.2, 0.5, 1.0, 2.0, 3.0]
sa = [0.5, 0.9, 1.2, 1.1, 0.7, 0.35, 0.22]
tl = "8 s"
"""

TWO = """\
[design_spectrum]
kind = "asce7-22"
site_class = "BC"
sds = 1.0
sd1 = 0.6
tl = "8 s"
"""

EN24 = """\
[design_spectrum]
kind = "en1998-1-1"
s_alpha_rp = 0.6
s_beta_rp = 0.2
site_category = "C"
"""


# ---------------------------------------------------------------- ASCE/SEI 7-22
def test_two_period_form_follows_its_equations():
    # Published formula (from memory): ASCE/SEI 7-22 §11.4.5.2 Eqs. (11.4-5)-(11.4-8) with
    # T_0 = 0.2 S_D1/S_DS = 0.12 s, T_S = 0.6 s; MCE_R = 1.5 × design (§11.4.6).
    sds, sd1, tl = 1.0, 0.6, 8.0
    periods = np.array([0.0, 0.06, 0.12, 0.3, 0.6, 1.0, 4.0, 8.0, 10.0])
    design = np.array([0.4 * sds, sds * (0.4 + 0.6 * 0.06 / 0.12), sds, sds, sds,
                       sd1 / 1.0, sd1 / 4.0, sd1 / 8.0, sd1 * tl / 100.0])
    mce = asce7_22_spectrum(periods, "BC", "mce_r", sds_g=sds, sd1_g=sd1, tl_s=tl)
    np.testing.assert_allclose(mce, 1.5 * design, rtol=1e-12)
    # Design level: 2/3 of MCE_R, i.e. the design spectrum itself.
    low = asce7_22_spectrum(periods, "BC", "design", sds_g=sds, sd1_g=sd1, tl_s=tl)
    np.testing.assert_allclose(low, design, rtol=1e-12)


def test_multi_period_interpolates_linearly_and_decays_beyond():
    tp = [0.0, 0.1, 0.2, 0.5, 1.0, 2.0, 3.0]
    sa = [0.5, 0.9, 1.2, 1.1, 0.7, 0.35, 0.22]
    # At the ordinates the spectrum is the ordinates (as given).
    np.testing.assert_allclose(asce7_22_spectrum(tp, "CD", mp_periods_s=tp, mp_sa_g=sa),
                               sa, rtol=1e-12)
    # Linear in T between ordinates (ASCE/SEI 7-22 §11.4.5.1, from memory): by hand,
    # T = 0.35 s lies half-way between 0.2 s (1.2 g) and 0.5 s (1.1 g).
    mid = asce7_22_spectrum(0.35, "CD", mp_periods_s=tp, mp_sa_g=sa, tl_s=8.0)
    assert float(mid) == pytest.approx(1.15, rel=1e-12)
    # Beyond the last ordinate (3 s, 0.22 g): 0.22·3/T up to T_L = 8 s, 0.22·3·8/T²
    # beyond (the two-period long-period branches, from memory).
    beyond = asce7_22_spectrum([6.0, 10.0], "CD", mp_periods_s=tp, mp_sa_g=sa, tl_s=8.0)
    np.testing.assert_allclose(beyond, [0.22 * 3 / 6, 0.22 * 3 * 8 / 100], rtol=1e-12)
    # Design level: 2/3 of the MCE_R ordinates (§11.4.5, from memory).
    design = asce7_22_spectrum(0.35, "CD", "design", mp_periods_s=tp, mp_sa_g=sa)
    assert float(design) == pytest.approx(1.15 * 2 / 3, rel=1e-12)


@pytest.mark.parametrize("kwargs, match", [
    (dict(mp_periods_s=[0.0, 0.5, 0.2], mp_sa_g=[0.5, 1.0, 0.8]), "increase strictly"),
    (dict(mp_periods_s=[0.1, 0.5], mp_sa_g=[0.5, 1.0]), "start at T = 0"),
    (dict(mp_periods_s=[0.0, 0.5, 1.0], mp_sa_g=[0.5, 1.0]), "same length"),
    (dict(sds_g=1.0, sd1_g=0.6), "missing tl_s"),
    (dict(sds_g=1.0, sd1_g=0.6, tl_s=8.0, mp_periods_s=[0, 1], mp_sa_g=[1, 1]),
     "not both"),
])
def test_asce7_22_bad_values_are_refused(kwargs, match):
    with pytest.raises(ValueError, match=match):
        design_spectrum("asce7-22", site_class="C", **kwargs)


def test_site_classes_of_the_edition_are_accepted_and_shown(project_factory):
    # From memory: ASCE/SEI 7-22 §20.2 adds the intermediate classes BC, CD and DE.
    for site_class in ("BC", "CD", "DE", "default"):
        asce7_22_spectrum(1.0, site_class, sds_g=1.0, sd1_g=0.6, tl_s=8.0)
    # Accepted as text in any case, shown as the standard writes it.
    lower = load_project(project_factory(PROJECT_HEAD + TWO.replace('"BC"', '" bc"') +
                                         _pairs(1) + ONE_SYSTEM, "lower.toml"))
    assert lower.design_spectrum.values["site_class"] == "BC"
    text = PROJECT_HEAD + MULTI + '[scaling]\nrule = "asce7-22"\nperiod = "0.5 s"\n' + \
        _pairs(2) + ONE_SYSTEM
    results = _run(project_factory, text)
    block = SiteContext(results)._design_block()
    assert "site class CD" in block["label"]
    assert dict(block["values"])["site class (ASCE/SEI 7-22)"] == "CD"
    assert any("linear in T" in line and "from memory" in line
               for line in block["formula"])


def test_asce7_22_edition_scales_to_mce_r_and_counts_eleven(project_factory):
    # From memory: ASCE/SEI 7-22 §16.2.1 MCE_R target, §16.2.2 at least 11 motions,
    # §16.2.3.2 suite mean RotD100 >= 90 % of the target over 0.2 T to 2 T.
    edition = codes.EDITIONS["asce7-22"]
    assert (edition.minimum_motions, edition.target_levels[0], edition.required_ratio,
            edition.target_damping) == (11, "mce_r", 0.9, 0.05)
    assert "from memory" in edition.memory_note
    text = PROJECT_HEAD + TWO + '[scaling]\nrule = "asce7-22"\nperiod = "0.5 s"\n' + \
        _pairs(3) + ONE_SYSTEM
    results = _run(project_factory, text)
    periods = results.records[0].spectrum.periods_s
    expected = asce7_22_spectrum(periods, "BC", "mce_r", sds_g=1.0, sd1_g=0.6, tl_s=8.0)
    np.testing.assert_allclose(results.scaling.target_sa_g, expected, rtol=1e-12)
    scaling = results_document(results)["scaling"]
    assert scaling["standard"] == "ASCE/SEI 7-22 Chapter 16"
    assert scaling["complies"] is False  # 3 < 11 motions
    by_name = {c["name"]: c for c in scaling["criteria"]}
    count = by_name["number of ground motions (a horizontal pair counts as one)"]
    assert (count["required"], count["achieved"]) == (11, 3)
    assert "7-22" in count["source"] and "from memory" in count["source"]
    ratio = by_name["suite mean RotD100 / target, minimum over the period range"]
    # The scaling touches 90 % exactly (one suite factor, §16.2.3.2).
    assert ratio["achieved"] == pytest.approx(0.9, rel=1e-9)


# ------------------------------------------------------------ EN 1998-1-1:2024
def test_en2024_spectrum_at_its_corner_periods():
    # Formula from memory (EN 1998-1-1:2024): F_α = 1.6 (1 − 0.2 S_α,RP/g) and
    # F_β = 2.3 (1 − 0.3 S_β,RP/g) for site category C; T_C = S_β T_β / S_α,
    # T_B = χ T_C (χ = 0.25), T_D = 2 s, F_A = 2.5; computed by hand below.
    sa_rp, sb_rp = 0.6, 0.2
    s_alpha = 1.6 * (1 - 0.2 * sa_rp) * sa_rp
    s_beta = 2.3 * (1 - 0.3 * sb_rp) * sb_rp
    tc = s_beta * 1.0 / s_alpha
    tb, td = 0.25 * tc, 2.0
    values = en1998_1_1_spectrum([0.0, tb, tc, td, 4.0], sa_rp, sb_rp, "C")
    np.testing.assert_allclose(values, [s_alpha / 2.5, s_alpha, s_alpha,
                                        s_beta / td, s_beta * td / 16.0], rtol=1e-12)
    # The plateau meets the 1/T branch at T_C (continuity).
    just = en1998_1_1_spectrum([tc * (1 + 1e-9)], sa_rp, sb_rp, "C")
    assert float(just[0]) == pytest.approx(s_alpha, rel=1e-8)
    # 10 % damping: η = √(10/15) on the plateau, S_e(0) unchanged.
    damped = en1998_1_1_spectrum([0.0, tc], sa_rp, sb_rp, "C", damping=0.10)
    np.testing.assert_allclose(damped, [s_alpha / 2.5, np.sqrt(10 / 15) * s_alpha],
                               rtol=1e-12)


def test_en2024_national_annex_values_override(project_factory):
    # The formula above with F_α = 1.4, F_β = 2.0, χ = 0.2, T_D = 3 s given.
    values = en1998_1_1_spectrum([0.0, 0.5, 5.0], 0.6, 0.2, "C", f_alpha=1.4,
                                 f_beta=2.0, chi=0.2, td_s=3.0)
    s_alpha, s_beta = 0.84, 0.4
    tc = s_beta / s_alpha
    assert tc < 0.5 < 3.0
    np.testing.assert_allclose(values, [s_alpha / 2.5, s_beta / 0.5, s_beta * 3 / 25],
                               rtol=1e-12)
    text = PROJECT_HEAD + EN24 + 'f_alpha = 1.4\ntd = "3 s"\n[scaling]\nrule = "fit"\n' \
        'period = "0.5 s"\n' + _pairs(1) + ONE_SYSTEM
    block = SiteContext(_run(project_factory, text))._design_block()
    shown = dict(block["values"])
    assert shown["F_α (National Annex / site-specific, as given)"] == 1.4
    assert "χ (recommended, from memory)" in shown
    assert any("T_C = S_β T_β/S_α" in line for line in block["formula"])


# ------------------------------------------------------------------ bad inputs
@pytest.mark.parametrize("section, fragment", [
    (TWO.replace('"BC"', '"X"'), "design_spectrum.site_class: expected one of A, B, BC"),
    (MULTI.replace("[0.0, 0.1, 0.2, 0.5", "[0.0, 0.1, 0.5, 0.2"),
     "design_spectrum: multi-period periods must increase strictly [s]; got 0.5 then 0.2"),
    (MULTI.replace("[0.0, 0.1, 0.2, 0.5, 1.0, 2.0, 3.0]", "[0.0, 0.1, 0.2, 0.5, 1.0]"),
     "design_spectrum: multi-period periods [s] and sa [g] must be lists of the same "
     "length; got 5 periods and 7 values"),
    (TWO.replace("sd1 = 0.6\n", ""), "the two-period form needs sds, sd1 and tl; "
     "missing sd1"),
    (EN24.replace('"C"', '"G"'), "design_spectrum.site_category: expected one of A, B"),
    (EN24 + "chi = 1.5\n", "design_spectrum: td must exceed T_C"),
])
def test_bad_current_edition_inputs_exit_2(project_factory, section, fragment):
    with pytest.raises(ProjectError) as info:
        load_project(project_factory(PROJECT_HEAD + section + _pairs(1) + ONE_SYSTEM))
    assert fragment in info.value.message
    assert info.value.exit_code == 2


# ------------------------------------------------------------ record provenance
PROVENANCE = """\
event = "Invented Valley earthquake"
station = "VLY-03"
magnitude = 6.7
distance_km = 12.5
vs30_m_s = 360
mechanism = "reverse"
source = "Example database, record 0042"
selection_note = "near the deaggregation mode"
"""


def _with_provenance(text: str, extra: str = PROVENANCE) -> str:
    """``extra`` added to the first [[records]] table of ``text``."""
    head, tail = text.split('component = "H1"\n', 1)
    return head + 'component = "H1"\n' + extra + tail


def test_provenance_round_trip_into_results_json_and_pages(project_factory):
    # Round trip: the values written in the project file come back unchanged.
    text = PROJECT_HEAD + TWO + '[scaling]\nrule = "asce7-22"\nperiod = "0.5 s"\n' + \
        _with_provenance(_pairs(2)) + ONE_SYSTEM
    results = _run(project_factory, text)
    doc = results_document(results)
    assert doc["records"][0]["provenance"] == {
        "event": "Invented Valley earthquake", "station": "VLY-03", "magnitude": 6.7,
        "distance_km": 12.5, "vs30_m_s": 360.0, "mechanism": "reverse",
        "source": "Example database, record 0042",
        "selection_note": "near the deaggregation mode"}
    assert doc["records"][1]["provenance"] == {}
    context = SiteContext(results)
    rows = dict(context.record_page(results.records[0]).context["record"]["provenance"])
    assert rows["Magnitude M_w"] == "6.7" and rows["Station"] == "VLY-03"
    table = context.suite_page().context["provenance"]
    summary = dict(table["summary"])
    assert summary["Magnitude M_w"] == "6.7 to 6.7 (1 of 4 records state it)"
    assert summary["Mechanisms"] == "reverse (1); not stated (3)"


@pytest.mark.parametrize("extra, fragment", [
    ("magnitude = 11\n", "records[a1].magnitude: expected a number >= 0 and <= 10, "
                         "found 11"),
    ("vs30_m_s = 0\n", "records[a1].vs30_m_s: expected a number > 0"),
    ("station = 3\n", "records[a1].station: expected non-empty text, found 3"),
])
def test_bad_provenance_exits_2(project_factory, extra, fragment):
    text = PROJECT_HEAD + TWO + _with_provenance(_pairs(1), extra) + ONE_SYSTEM
    with pytest.raises(ProjectError) as info:
        load_project(project_factory(text))
    assert fragment in info.value.message and info.value.exit_code == 2


# ------------------------------------------------------- usable period range
def test_usable_period_rule():
    from sdofreport.core.processing import usable_period_max_s

    # Common practice (NGA-West2 database, Ancheta et al. 2014, from memory): the lowest
    # usable frequency is 1.25 × the high-pass corner, so T_max = 1/(1.25 f_c).
    assert usable_period_max_s(0.1) == pytest.approx(8.0, rel=1e-15)
    assert usable_period_max_s(0.5) == pytest.approx(1.6, rel=1e-15)
    with pytest.raises(ValueError, match="low_cut_hz must be a finite number > 0"):
        usable_period_max_s(-1.0)


def test_ordinates_beyond_the_usable_period_are_left_out_of_scaling(project_factory):
    # High-pass at 0.5 Hz: usable up to 1/(1.25·0.5) = 1.6 s; the 7-22 range for
    # T = 1.2 s is 0.24-2.4 s (0.2 T to 2 T, from memory), so it is cut at 1.6 s.
    body = '[scaling]\nrule = "asce7-22"\nperiod = "1.2 s"\n'
    processing = "[processing]\nbandpass_hz = [0.5, 25.0]\n"
    text = PROJECT_HEAD + processing + TWO + body + _pairs(2) + ONE_SYSTEM
    results = _run(project_factory, text)
    assert results.scaling.period_range_s == pytest.approx((0.24, 1.6), rel=1e-12)
    assert any("usable only up to 1.6 s" in c for c in results.scaling.cautions)
    doc = results_document(results)
    assert doc["records"][0]["usable_period_max_s"] == pytest.approx(1.6, rel=1e-12)
    # Boore (2005): the pads are kept, 1.5·4/0.5 = 12 s in total, 6 s at each end.
    assert any("filtered pads are kept" in line for line in doc["records"][0]["processing"])
    # The record page says so, and its spectra are dashed beyond 1.6 s.
    page = SiteContext(results).record_page(results.records[0]).context["record"]
    assert "up to 1.6 s" in page["usable"] and "left out of scaling" in page["usable"]
    assert SiteContext(results).suite_page().context["records"][0]["usable"] == "≤ 1.6 s"
    # The system (T = 0.5 s) lies inside the usable range: no caution on the page.
    assert page["beyond_usable"] == []
    # The project may override: the full range, with a caution.
    again = _run(project_factory, text.replace(body, body + 'beyond_usable = "include"\n'),
                 "include.toml")
    assert again.scaling.period_range_s == pytest.approx((0.24, 2.4), rel=1e-12)
    assert any("includes those ordinates" in c for c in again.scaling.cautions)


def test_record_page_names_systems_beyond_the_usable_period(project_factory):
    # High-pass 0.5 Hz: usable up to 1.6 s (1/(1.25 f_c), from memory); a 2 s system
    # lies beyond it.
    long = ONE_SYSTEM.replace('"0.5 s"', '"2 s"')
    text = PROJECT_HEAD + "[processing]\nbandpass_hz = [0.5, 25.0]\n" + \
        '[[records]]\nid = "r1"\nfile = "records/r1.csv"\n' + long
    results = _run(project_factory, text)
    page = SiteContext(results).record_page(results.records[0]).context["record"]
    assert page["beyond_usable"] == ["System one (s1, T = 2 s)"]


def test_spectrum_beyond_the_usable_period_is_drawn_dashed():
    from sdofreport.site.figures import spectra_figure

    periods = np.geomspace(0.1, 10.0, 30)
    curve = {"label": "r", "values": 1.0 / periods, "style": "emphasis"}
    plain = spectra_figure(periods, [curve], ylabel="PSA [g]")
    dashed = spectra_figure(periods, [{**curve, "usable_max_s": 2.0}], ylabel="PSA [g]")
    assert "beyond the usable period" in dashed and "beyond the usable" not in plain
    assert dashed.count('class="curve"') == plain.count('class="curve"') + 1
