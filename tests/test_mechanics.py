"""P-Δ, hysteresis models and dampers through the project file, the engine and the pages."""

from __future__ import annotations

import json
import math

import pytest
from click.testing import CliRunner

from sdofreport.cli import cli
from sdofreport.engine import VERDICT_UNSTABLE, run_project
from sdofreport.errors import ProjectError
from sdofreport.outputs.results_json import results_document
from sdofreport.site.context import SiteContext
from tests.conftest import PROJECT_HEAD, TWO_RECORDS
from tests.docs.test_schemas import _validator

G = 9.80665  # ISO 80000-3 standard gravity [m/s²]


def _system(body: str) -> str:
    return f'[[systems]]\nid = "s"\nname = "system"\ndamping = 0.05\n{body}\n'


def _text(body: str) -> str:
    return PROJECT_HEAD + TWO_RECORDS + _system(body)


def _load(project_factory, body: str):
    from sdofreport.project import load_project

    return load_project(project_factory(_text(body)))


def test_p_delta_defaults_and_stability_coefficient(project_factory):
    system = _load(project_factory, 'mass = "60 t"\nperiod = "1.6 s"\nheight = "9 m"'
                   ).systems[0]
    # Closed form (Chopra 2017 §7.11): θ = W/(k h), W = m g, k = 4π² m/T².
    k = 4 * math.pi ** 2 * 60e3 / 1.6 ** 2
    theta = 60e3 * G / (k * 9.0)
    assert system.p_delta["stability_coefficient"] == pytest.approx(theta, rel=1e-12)
    assert system.p_delta["period_s"] == pytest.approx(1.6 / math.sqrt(1 - theta))
    off = _load(project_factory, 'mass = "60 t"\nperiod = "1.6 s"\nheight = "9 m"\n'
                'p_delta = false').systems[0]
    assert off.p_delta is None
    no_height = _load(project_factory, 'mass = "60 t"\nperiod = "1.6 s"').systems[0]
    assert no_height.p_delta is None
    given = _load(project_factory, 'mass = "60 t"\nperiod = "1.6 s"\nheight = "9 m"\n'
                  'gravity_load = "900 kN"').systems[0]
    assert given.p_delta["gravity_stiffness_n_m"] == pytest.approx(900e3 / 9.0)


def test_gravity_load_at_or_above_stiffness_is_refused_exit_2(project_factory):
    # Chopra 2017 §7.11: with W/h >= k the elastic stiffness k − W/h is not positive.
    path = project_factory(_text('mass = "60 t"\nstiffness = "100 kN/m"\nheight = "9 m"\n'
                                 'gravity_load = "1 MN"'))
    result = CliRunner().invoke(cli, ["build", str(path), "-q", "--no-cache"])
    assert result.exit_code == 2
    for fragment in ("systems[s]", "gravity load cannot be carried", "gravity_load",
                     "height", "p_delta = false"):
        assert fragment in result.output, result.output
    assert "Traceback" not in result.output


_BAD = [
    ('mass = "1 t"\nperiod = "0.5 s"\nyield_strength = "1 kN"\nunloading_exponent = 0.4',
     "systems[s].unloading_exponent: applies only to hysteresis = 'takeda'"),
    ('mass = "1 t"\nperiod = "0.5 s"\nyield_strength = "1 kN"\nhysteresis = "takeda"\n'
     "unloading_exponent = 3", "systems[s].unloading_exponent"),
    ('mass = "1 t"\nperiod = "0.5 s"\nyield_strength = "1 kN"\nhysteresis = "flag-shaped"\n'
     "dissipation_ratio = 1.5", "systems[s].dissipation_ratio"),
    ('mass = "1 t"\nperiod = "0.5 s"\nyield_strength = "1 kN"\nhysteresis = "bouc-wen"\n'
     "bouc_wen_beta = 0.1", "systems[s].bouc_wen_beta"),
    ('mass = "1 t"\nperiod = "0.5 s"\nhysteresis = "clough"',
     "systems[s].hysteresis: applies only with yield_strength"),
    ('mass = "1 t"\nperiod = "0.5 s"\nyield_strength = "1 kN"\nhysteresis = "elasto"',
     "systems[s].hysteresis"),
    ('mass = "1 t"\nperiod = "0.5 s"\np_delta = true', "systems[s].p_delta: P-Δ needs"),
    ('mass = "1 t"\nperiod = "0.5 s"\nheight = "3 m"\np_delta = "yes"',
     "systems[s].p_delta: expected true or false"),
    ('mass = "1 t"\nperiod = "0.5 s"\nheight = "3 m"\np_delta = false\n'
     'gravity_load = "10 kN"', "systems[s].gravity_load: applies only with P-Δ"),
    ('mass = "1 t"\nperiod = "0.5 s"\n[systems.damper]\ncoefficient = "1 kN*s/m"\n'
     "exponent = 0", "systems[s].damper.exponent"),
    ('mass = "1 t"\nperiod = "0.5 s"\n[systems.damper]\ncoefficient = "1 kN*s"\n'
     "exponent = 1", "systems[s].damper.coefficient"),
    ('mass = "1 t"\nperiod = "0.5 s"\n[systems.damper]\nexponent = 1',
     "systems[s].damper.coefficient: missing"),
    ('kind = "hanging"\nmass = "200 kg"\npivot_inertia = "500 kg*m**2"\n'
     'pivot_to_centre = "1.5 m"\np_delta = true', "does not apply to kind 'hanging'"),
    ('mass = "1 t"\nperiod = "0.5 s"\nyield_strength = "1 kN"\ndeterioration_capacity = 50',
     "systems[s].deterioration_capacity: applies only to hysteresis = 'clough' or "
     "'takeda'"),
    ('mass = "1 t"\nperiod = "0.5 s"\nyield_strength = "1 kN"\nhysteresis = "takeda"\n'
     "deterioration_capacity = 0",
     "systems[s].deterioration_capacity: must be greater than 0"),
    ('mass = "1 t"\nperiod = "0.5 s"\nyield_strength = "1 kN"\nhysteresis = "clough"\n'
     "deterioration_exponent = 2",
     "systems[s].deterioration_exponent: applies only with deterioration_capacity"),
]


@pytest.mark.parametrize("body, fragment", _BAD)
def test_bad_mechanics_keys_name_the_key(project_factory, body, fragment):
    with pytest.raises(ProjectError) as info:
        _load(project_factory, body)
    assert fragment in info.value.message, info.value.message


@pytest.mark.parametrize("text, exponent, expected", [
    # Definitions: 1 kN = 1000 N; (s/m)^α in SI.
    ('"120 kN*s/m"', 1, 120e3),
    ('"40 kN*(s/m)**0.5"', 0.5, 40e3),
    # 1 kip = 4448.2216152605 N, 1 in = 0.0254 m (NIST SP 811): kip·s/in = 175126.8 N·s/m
    ('"2 kip*s/in"', 1, 2 * 4448.2216152605 / 0.0254),
])
def test_damper_coefficient_units(project_factory, text, exponent, expected):
    system = _load(project_factory, f'mass = "1 t"\nperiod = "0.5 s"\n[systems.damper]\n'
                   f'coefficient = {text}\nexponent = {exponent}').systems[0]
    assert system.model["damper"]["coefficient"] == pytest.approx(expected, rel=1e-12)
    assert system.model_name == "elastic"


def test_linear_damper_system_matches_viscous_damping(project_factory):
    # Definition (Chopra 2017 §2.2): a linear dashpot C is damping of ratio C/(2mω); here
    # ζ = 0.05 as given plus C = 2·0.05·m·ω gives the linear system with ζ = 0.10.
    m, period = 10e3, 0.5
    c = 2 * 0.05 * m * 2 * math.pi / period
    damped = _load(project_factory, f'mass = "10 t"\nperiod = "0.5 s"\n[systems.damper]\n'
                   f'coefficient = "{c!r} N*s/m"\nexponent = 1')
    viscous = _load(project_factory, 'mass = "10 t"\nperiod = "0.5 s"').systems[0]
    viscous = damped.__class__(**{**damped.__dict__, "systems": (
        viscous.__class__(**{**viscous.__dict__, "damping": 0.10}),)})
    a = run_project(damped, jobs=1, use_cache=False)
    b = run_project(viscous, jobs=1, use_cache=False)
    for spec in damped.records:
        # Newmark average acceleration at T/100 against the exact recurrence (Nigam &
        # Jennings 1969): period error (ωh)²/12 ≈ 3e-4, so 0.5 %.
        assert a.response("s", spec.id).peak_displacement_m == pytest.approx(
            b.response("s", spec.id).peak_displacement_m, rel=5e-3)


def test_unstable_system_verdict_page_and_json(project_factory):
    # Chopra 2017 §7.11: with θ = 0.25 > α the post-yield stiffness is negative; a weak
    # system (F_y = 0.02 m g) under a 0.3 g record runs away past (1−α)F_y/(W/h − αk).
    project = _load(project_factory, 'mass = "10 t"\nperiod = "1.0 s"\nheight = "3 m"\n'
                    'yield_strength = "1.96 kN"\npost_yield_ratio = 0.0\n'
                    'gravity_load = "295.8 kN"\n[systems.limits]\ndisplacement = "1 m"')
    system = project.systems[0]
    assert system.p_delta["stability_coefficient"] == pytest.approx(
        295.8e3 / (4 * math.pi ** 2 * 10e3 * 3.0), rel=1e-9)
    results = run_project(project, jobs=1, use_cache=False)
    responses = [results.response("s", r.id) for r in project.records]
    assert any(r.unstable for r in responses)
    (check,) = results.checks
    assert check.verdict == VERDICT_UNSTABLE and results.exceeds
    bound = 1.96e3 / (295.8e3 / 3.0)
    for r in responses:
        if r.unstable:
            assert r.instability_limit_m == pytest.approx(bound, rel=1e-9)
            assert r.peak_displacement_m >= bound
    document = json.loads(json.dumps(results_document(results)))
    _validator("results").validate(document)
    assert document["systems"][0]["checks"][0]["verdict"] == "unstable"
    page = SiteContext(results).system_page(system)
    notes = " ".join(page.context["mechanics_notes"])
    assert "θ = W/(k h)" in notes and "exceeds 0.1" in notes
    assert "Dynamic instability" in notes


def test_strict_build_exits_3_on_an_unstable_check(project_factory, tmp_path):
    """An unstable verdict is never "within limit": `build --strict` exits 3 and the
    summary line counts it (the same system as above, Chopra 2017 §7.11: negative
    post-yield stiffness under P-Δ). Before, only "exceeds limit" was counted: exit 0."""
    path = project_factory(_text('mass = "10 t"\nperiod = "1.0 s"\nheight = "3 m"\n'
                                 'yield_strength = "1.96 kN"\npost_yield_ratio = 0.0\n'
                                 'gravity_load = "295.8 kN"\n[systems.limits]\n'
                                 'displacement = "1 m"'))
    result = CliRunner().invoke(cli, ["build", str(path), "-o", str(tmp_path / "site"),
                                      "--strict", "--no-cache"])
    assert result.exit_code == 3, result.output
    assert "1 exceeding the stated limit or unstable" in result.output
    assert "exceed the stated limit or are unstable" in result.output


@pytest.mark.parametrize("model, extra", [
    ("clough", ""), ("takeda", "unloading_exponent = 0.5\n"),
    ("takeda", "deterioration_capacity = 200\ndeterioration_exponent = 1.2\n"),
    ("bouc-wen", "bouc_wen_exponent = 3\nbouc_wen_beta = 0.6\n"),
    ("flag-shaped", "dissipation_ratio = 0.7\n"),
])
def test_each_model_runs_through_the_engine(project_factory, model, extra):
    # Uang & Bertero (1990) energy balance within 2 % (issue requirement) per record.
    project = _load(project_factory, f'mass = "20 t"\nperiod = "0.6 s"\nheight = "5 m"\n'
                    f'yield_displacement = "5 mm"\npost_yield_ratio = 0.05\n'
                    f'hysteresis = "{model}"\n{extra}[systems.damper]\n'
                    f'coefficient = "20 kN*(s/m)**0.5"\nexponent = 0.5')
    results = run_project(project, jobs=1, use_cache=False)
    document = results_document(results)
    _validator("results").validate(json.loads(json.dumps(document)))
    system = document["systems"][0]
    assert system["model"] == model
    assert system["hysteresis_parameters"]["yield_strength_n"] > 0
    for response in system["responses"]:
        assert response["energy"]["imbalance"] < 0.02
        assert response["energy"]["damper_j"] > 0
        assert response["unstable"] is False
