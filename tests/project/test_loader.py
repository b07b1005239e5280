"""Project-file loader: conversions to SI, and every bad-input message.

Expected unit conversions are by definition of the units (NIST SP 811, Appendix B):
1 in = 0.0254 m, 1 ft = 0.3048 m, 1 lbf = 4.4482216152605 N, 1 t = 1000 kg,
g = 9.80665 m/s² (ISO 80000-3).
"""

from __future__ import annotations

import math

import pytest

from sdofreport.errors import ProjectError
from sdofreport.project import load_project
from tests.conftest import ONE_SYSTEM, PROJECT_HEAD, TWO_RECORDS


def test_valid_project_loads_in_si(project_factory, valid_project_text):
    project = load_project(project_factory(valid_project_text))
    system = project.systems[0]
    # Definition: 1 t = 1000 kg.
    assert system.mass_kg == pytest.approx(100_000.0)
    # Closed form: k = m (2π/T)² for T = 0.5 s.
    assert system.stiffness_n_m == pytest.approx(100_000.0 * (2 * math.pi / 0.5) ** 2)
    assert system.limits.displacement_m == pytest.approx(0.050)
    assert system.height_m == pytest.approx(4.0)
    assert [r.id for r in project.records] == ["r1", "r2"]
    # From memory: EN 1998-1:2004 §4.3.3.4.3(3) (used when no rule names a standard):
    # fewer than 7 motions -> the maximum is used.
    assert project.statistic_used == "max"
    assert len(project.analysis.periods_s) == 200


@pytest.mark.parametrize("text, dimension_key, expected", [
    # Definition: 1 kip = 4448.2216152605 N, 1 in = 0.0254 m.
    ('stiffness = "26 kip/in"', "stiffness_n_m", 26 * 4448.2216152605 / 0.0254),
    # Definition: 1 MN = 1e6 N.
    ('stiffness = "4.2 MN/m"', "stiffness_n_m", 4.2e6),
])
def test_units_strings(project_factory, text, dimension_key, expected):
    system = ONE_SYSTEM.replace('period = "0.5 s"', text)
    project = load_project(project_factory(PROJECT_HEAD + TWO_RECORDS + system))
    assert getattr(project.systems[0], dimension_key) == pytest.approx(expected, rel=1e-12)


def test_acceleration_in_g_is_standard_gravity_not_gram(project_factory):
    system = ONE_SYSTEM.replace('displacement = "50 mm"', 'total_accel = "0.35 g"')
    project = load_project(project_factory(PROJECT_HEAD + TWO_RECORDS + system))
    # ISO 80000-3: standard gravity 9.80665 m/s² (a bare 'g' is read as gravity here).
    assert project.systems[0].limits.total_accel_m_s2 == pytest.approx(0.35 * 9.80665)


def test_height_in_feet(project_factory):
    system = ONE_SYSTEM.replace('height = "4 m"', 'height = "18 ft"')
    project = load_project(project_factory(PROJECT_HEAD + TWO_RECORDS + system))
    # Definition: 1 ft = 0.3048 m.
    assert project.systems[0].height_m == pytest.approx(18 * 0.3048)


def test_statistic_auto_uses_mean_from_seven_records(project_factory):
    records = "".join(f'[[records]]\nid = "x{i}"\nfile = "records/r1.csv"\n\n'
                      for i in range(7))
    project = load_project(project_factory(PROJECT_HEAD + records + ONE_SYSTEM))
    # From memory: EN 1998-1:2004 §4.3.3.4.3(3) (used when no rule names a standard):
    # the mean with 7 or more motions (unpaired records count one each).
    assert project.statistic_used == "mean"


# Each row: a change to the valid project, then fragments the message must contain.
BAD_CASES = [
    ("analysis", '[analysis]\ndamping = [5]\n',
     ["analysis.damping[1]", "expected ratios from 0 up to (not including) 1", "found 5",
      "a percentage? use 0.05"]),
    ("unknown key", '[analysis]\nmethdo = "exact"\n',
     ["analysis.methdo", "unknown key", "did you mean 'method'"]),
    ("unknown section", '[analysys]\nmethod = "exact"\n',
     ["analysys", "unknown section", "did you mean 'analysis'"]),
    ("bad method", '[analysis]\nmethod = "rk4"\n',
     ["analysis.method", "expected one of exact, newmark-average, newmark-linear",
      "found 'rk4'"]),
    ("bad periods", '[analysis]\nperiods = { min = 2.0, max = 1.0, count = 10 }\n',
     ["analysis.periods", "expected 0 < min < max"]),
    ("bad statistic", '[analysis]\nstatistic = "median"\n',
     ["analysis.statistic", "expected one of auto, mean, max"]),
    ("fragility without levels", '[fragility]\nmeasure = "sa"\n',
     ["fragility.levels: missing; expected a list of at least 2 levels in g"]),
    ("fragility level zero", '[fragility]\nlevels = [0.0, 0.2]\n',
     ["fragility.levels: expected a list of numbers > 0, found [0.0, 0.2]"]),
    ("fragility one level", '[fragility]\nlevels = [0.2]\n',
     ["fragility.levels: expected 2 to 50 different levels, found 1"]),
    ("fragility unknown system", '[fragility]\nlevels = [0.1, 0.2]\nsystems = ["s9"]\n',
     ["fragility.systems: no system has id 's9'; the ids are s1"]),
    ("fragility measure", '[fragility]\nlevels = [0.1, 0.2]\nmeasure = "pgv"\n',
     ["fragility.measure: expected one of sa, pga, found 'pgv'"]),
]


@pytest.mark.parametrize("name, extra, fragments", BAD_CASES, ids=[c[0] for c in BAD_CASES])
def test_bad_analysis_sections(project_factory, valid_project_text, name, extra, fragments):
    path = project_factory(valid_project_text + "\n" + extra)
    with pytest.raises(ProjectError) as info:
        load_project(path)
    message = info.value.message
    assert str(path.name) in message
    for fragment in fragments:
        assert fragment in message
    assert info.value.exit_code == 2


SYSTEM_CASES = [
    ("zero mass", ('mass = "100 t"', 'mass = "0 t"'),
     ["systems[s1].mass", "mass must be greater than 0"]),
    ("negative damping", ("damping = 0.05", "damping = -0.01"),
     ["systems[s1].damping", "expected a ratio from 0 up to (not including) 1"]),
    ("damping one", ("damping = 0.05", "damping = 1.0"),
     ["systems[s1].damping", "found 1.0"]),
    ("period negative", ('period = "0.5 s"', 'period = "-0.5 s"'),
     ["systems[s1].period", "greater than 0"]),
    ("wrong dimension", ('mass = "100 t"', 'mass = "100 m"'),
     ["systems[s1].mass", "expected a mass", "'100 m'"]),
    ("unreadable units", ('mass = "100 t"', 'mass = "100 tonnez"'),
     ["systems[s1].mass", "cannot read '100 tonnez' as a mass"]),
    ("limit typo", ('displacement = "50 mm"', 'displacment = "50 mm"'),
     ["systems[s1].limits.displacment", "did you mean 'displacement'"]),
    ("drift without height", ('height = "4 m"\n', ''),
     ["systems[s1].limits.drift_ratio", "needs the system's height"]),
    ("stiffness and period", ('period = "0.5 s"', 'period = "0.5 s"\nstiffness = \"1 MN/m\"'),
     ["systems[s1]", "expected mass + stiffness, mass + period, or period alone"]),
]


@pytest.mark.parametrize("name, change, fragments", SYSTEM_CASES,
                         ids=[c[0] for c in SYSTEM_CASES])
def test_bad_systems(project_factory, name, change, fragments):
    system = ONE_SYSTEM.replace(*change)
    if name == "drift without height":
        system = system.replace('displacement = "50 mm"', "drift_ratio = 0.01")
    path = project_factory(PROJECT_HEAD + TWO_RECORDS + system)
    with pytest.raises(ProjectError) as info:
        load_project(path)
    for fragment in fragments:
        assert fragment in info.value.message


def test_every_problem_reported_at_once(project_factory):
    system = ONE_SYSTEM.replace("damping = 0.05", "damping = 5").replace(
        'mass = "100 t"', 'mass = "-3 t"')
    records = TWO_RECORDS.replace('records/r2.txt', 'records/missing.txt')
    path = project_factory(PROJECT_HEAD + records + system)
    with pytest.raises(ProjectError) as info:
        load_project(path)
    message = info.value.message
    assert "has 3 problems:" in message
    assert "line 12, records[r2].file: file 'records/missing.txt' not found" in message
    assert "systems[s1].damping" in message and "systems[s1].mass" in message


def test_duplicate_ids(project_factory):
    records = TWO_RECORDS.replace('id = "r2"', 'id = "r1"')
    with pytest.raises(ProjectError, match=r"line \d+, records\[2\]\.id: duplicate id 'r1' "
                                           r"\(also records\[1\]\)"):
        load_project(project_factory(PROJECT_HEAD + records + ONE_SYSTEM))


def test_toml_syntax_error_names_the_line(project_factory, valid_project_text):
    broken = valid_project_text.replace('reference = "T-1"', 'reference = "T-1')
    with pytest.raises(ProjectError, match=r"sdofreport\.toml line 3, column \d+: not "
                                           r"valid TOML"):
        load_project(project_factory(broken))


def test_missing_project_file(tmp_path):
    with pytest.raises(ProjectError, match="project file not found"):
        load_project(tmp_path / "nope.toml")


def test_not_utf8(project_factory, valid_project_text):
    path = project_factory(valid_project_text)
    path.write_bytes(path.read_bytes() + b"\n# caf\xe9\n")
    with pytest.raises(ProjectError, match=r"line \d+: not UTF-8 text"):
        load_project(path)


def test_missing_required_keys(project_factory):
    head = PROJECT_HEAD.replace('prepared_by = "tester"\n', "")
    with pytest.raises(ProjectError, match=r"line 1, project\.prepared_by: missing"):
        load_project(project_factory(head + TWO_RECORDS + ONE_SYSTEM))


def test_base_shear_needs_mass(project_factory):
    system = ONE_SYSTEM.replace('mass = "100 t"\n', "").replace(
        'displacement = "50 mm"', 'base_shear = "100 kN"')
    with pytest.raises(ProjectError, match=r"line \d+, systems\[s1\]\.limits\.base_shear: a "
                                           r"base-shear limit needs the system's mass"):
        load_project(project_factory(PROJECT_HEAD + TWO_RECORDS + system))


# Issue 14 part 3: a bare number for a dimensional key. Before the fix ``mass = 6``
# (meant as tonnes) was read as 6 kg, so the period came out 0.0099 s and the build
# passed; now it is refused unless the project states plain_numbers = "SI".
SKID = """\
[[systems]]
id = "skid"
name = "Pump skid"
damping = 0.05
mass = 6
stiffness = "2 MN/m"
"""


def test_bare_mass_is_refused_naming_key_id_line_and_fix(project_factory):
    path = project_factory(PROJECT_HEAD + TWO_RECORDS + "\n" + SKID)
    with pytest.raises(ProjectError) as info:
        load_project(path)
    message = info.value.message
    assert info.value.exit_code == 2
    # The file, the item by id, the key and its line (PROJECT_HEAD has 5 lines,
    # TWO_RECORDS 7, a blank line, then mass is the 5th line of SKID: 5 + 7 + 1 + 5).
    assert path.name in message
    assert "line 18, systems[skid].mass: found the bare number 6" in message
    assert 'mass = "6 t"' in message and 'plain_numbers = "SI"' in message


@pytest.mark.parametrize("change, location", [
    (('stiffness = "2 MN/m"', 'stiffness = "2000000"'), "systems[skid].stiffness"),
    (('mass = 6', 'mass = "6 t"\nheight = 3'), "systems[skid].height"),
    (('stiffness = "2 MN/m"', 'stiffness = "2 MN/m"\nlimits = { displacement = 40 }'),
     "systems[skid].limits.displacement"),
    (('stiffness = "2 MN/m"', 'kind = "springs"\nnetwork = { series = [{ k = 2e6 }] }'),
     "systems[skid].network"),
    (('stiffness = "2 MN/m"', 'stiffness = "2 MN/m"\n'
                              'damper = { coefficient = 5000, exponent = 1 }'),
     "systems[skid].damper.coefficient"),
])
def test_every_dimensional_key_refuses_bare_numbers(project_factory, change, location):
    system = SKID.replace('mass = 6', 'mass = "6 t"') if change[0] != 'mass = 6' else SKID
    system = system.replace(*change)
    with pytest.raises(ProjectError) as info:
        load_project(project_factory(PROJECT_HEAD + TWO_RECORDS + "\n" + system))
    assert location in info.value.message and "bare number" in info.value.message


def test_record_dt_refuses_a_bare_number(project_factory):
    records = TWO_RECORDS.replace('file = "records/r2.txt"',
                                  'file = "records/r2.txt"\ndt = 0.005')
    with pytest.raises(ProjectError, match=r"line 13, records\[r2\]\.dt: found the "
                                           r"bare number 0\.005.*dt = \"0\.005 s\""):
        load_project(project_factory(PROJECT_HEAD + records + ONE_SYSTEM))


def test_plain_numbers_si_reads_bare_numbers_as_si(project_factory):
    head = PROJECT_HEAD + 'plain_numbers = "SI"\n'
    project = load_project(project_factory(head + TWO_RECORDS + "\n" + SKID))
    system = project.systems[0]
    assert project.info.plain_numbers == "SI"
    # Definition of the SI base unit: a bare 6 is 6 kg; closed form T = 2π √(m/k).
    assert system.mass_kg == pytest.approx(6.0)
    assert system.period_s == pytest.approx(2 * math.pi * math.sqrt(6.0 / 2e6))


def test_plain_numbers_accepts_only_si(project_factory):
    head = PROJECT_HEAD + 'plain_numbers = "US"\n'
    with pytest.raises(ProjectError, match=r"line 6, project\.plain_numbers: expected "
                                           r"one of SI, found 'US'"):
        load_project(project_factory(head + TWO_RECORDS + ONE_SYSTEM))


def test_ratios_and_g_keys_stay_plain_numbers(project_factory):
    # damping, drift_ratio, ductility, sds/sd1 (in g by ASCE/SEI 7-16 §11.4.5), scale:
    # ratios or defined in g, so a plain number is what they take.
    system = ONE_SYSTEM.replace('displacement = "50 mm"', 'drift_ratio = 0.01')
    text = (PROJECT_HEAD + TWO_RECORDS.replace('file = "records/r1.csv"',
                                               'file = "records/r1.csv"\nscale = 1.5')
            + system + '[design_spectrum]\nkind = "asce7-16"\nsds = 1.0\nsd1 = 0.6\n'
            'tl = "8 s"\n')
    project = load_project(project_factory(text))
    assert project.records[0].scale == 1.5
    assert project.systems[0].limits.drift_ratio == 0.01


def test_unknown_key_names_item_by_id_and_line(project_factory):
    system = SKID.replace("damping = 0.05", "dampng = 0.05").replace("mass = 6",
                                                                     'mass = "6 t"')
    with pytest.raises(ProjectError) as info:
        load_project(project_factory(PROJECT_HEAD + TWO_RECORDS + "\n" + system))
    assert "line 17, systems[skid].dampng: unknown key; did you mean 'damping'?" in \
        info.value.message


def test_signoff_and_revisions_are_read(project_factory):
    """[project] sign-off keys and [[project.revisions]] tables reach the model in
    the order written (our own interface; dates by ISO 8601 calendar-date form)."""
    head = PROJECT_HEAD + ('prepared_date = "2026-01-05"\nchecked_by = "C"\n'
                           'checked_date = "2026-01-06"\napproved_by = "D"\n'
                           'approved_date = "2026-01-07"\n')
    revisions = ('\n[[project.revisions]]\nrevision = "A"\ndate = "2026-01-02"\n'
                 'description = "first"\nby = "E"\n\n[[project.revisions]]\n'
                 'revision = "B"\n')
    info = load_project(project_factory(head + revisions + "\n" + TWO_RECORDS + "\n"
                                        + ONE_SYSTEM)).info
    assert (info.prepared_date, info.checked_date) == ("2026-01-05", "2026-01-06")
    assert (info.approved_by, info.approved_date) == ("D", "2026-01-07")
    assert [(r.revision, r.date, r.description, r.by) for r in info.revisions] == [
        ("A", "2026-01-02", "first", "E"), ("B", None, None, None)]


def test_bad_signoff_and_revisions_are_each_named(project_factory):
    head = PROJECT_HEAD + 'approved_date = "30/11/2026"\n'
    revisions = ('\n[[project.revisions]]\ndate = "2026-13-01"\nauthor = "X"\n'
                 '\n[[project.revisions]]\nrevision = 3\n')
    with pytest.raises(ProjectError) as caught:
        load_project(project_factory(head + revisions + "\n" + TWO_RECORDS + "\n"
                                     + ONE_SYSTEM))
    message = str(caught.value)
    assert "project.approved_date: expected a date written YYYY-MM-DD, found " \
           "'30/11/2026'" in message
    assert "project.revisions[1].revision: missing" in message
    assert "project.revisions[1].date: expected a date written YYYY-MM-DD" in message
    assert "project.revisions[1].author: unknown key; did you mean 'by'?" in message or \
        "project.revisions[1].author: unknown key" in message
    assert "project.revisions[2].revision: expected non-empty text, found 3" in message


def test_ids_are_put_in_natural_order():
    """natural_key orders ids as people read them (digit runs as numbers): the ordering
    rule of ISO 14651-style 'natural sort', common practice (no source)."""
    from sdofreport.project.model import natural_key

    ids = ["P10", "P2", "p1", "P1b", "rec9", "rec10", "rec09x"]
    assert sorted(ids, key=natural_key) == ["p1", "P1b", "P2", "P10", "rec9", "rec09x",
                                            "rec10"]


def test_records_and_pairs_follow_natural_order(project_factory):
    """Records listed as r10, r2, r1 in the file come out r1, r2, r10; pairs P10, P2
    come out P2, P10 (motions and pairs of the suite)."""
    from sdofreport.engine.plan import _pairs
    from sdofreport.engine.suite import motions

    text = PROJECT_HEAD + "\n" + "\n".join(
        f'[[records]]\nid = "{rid}"\nfile = "records/r1.csv"\npair = "{pair}"\n'
        f'component = "{comp}"\n'
        for rid, pair, comp in [("r10", "P10", "H1"), ("r2", "P2", "H1"),
                                ("r1", "P10", "H2"), ("r3", "P2", "H2")]
    ) + "\n" + ONE_SYSTEM
    project = load_project(project_factory(text))
    assert [r.id for r in project.records] == ["r1", "r2", "r3", "r10"]
    assert [name for name, _ in motions(project)] == ["P2", "P10"]
    assert list(_pairs(project)) == ["P2", "P10"]


def test_a_limit_may_state_its_basis(project_factory):
    """`displacement = { value = "50 mm", basis = "..." }`: the value is read as a
    plain limit (1 mm = 0.001 m by definition) and the basis kept beside it."""
    system = ONE_SYSTEM.replace('displacement = "50 mm"',
                                'displacement = { value = "50 mm", basis = "Spec §4" }')
    assert system != ONE_SYSTEM
    limits = load_project(project_factory(PROJECT_HEAD + "\n" + TWO_RECORDS + "\n"
                                          + system)).systems[0].limits
    assert limits.displacement_m == pytest.approx(0.050)
    assert limits.basis_of("displacement") == "Spec §4"
    assert limits.basis_of("drift_ratio") is None


@pytest.mark.parametrize("written, fragment", [
    ('{ basis = "Spec" }', "limits.displacement.value: missing"),
    ('{ value = "50 mm", basis = "" }', "limits.displacement.basis: expected non-empty"),
    ('{ value = "50 mm", source = "Spec" }',
     "limits.displacement.source: unknown key; allowed keys: value, basis"),
])
def test_a_limit_table_names_its_problem(project_factory, written, fragment):
    system = ONE_SYSTEM.replace('displacement = "50 mm"', f"displacement = {written}")
    with pytest.raises(ProjectError) as caught:
        load_project(project_factory(PROJECT_HEAD + "\n" + TWO_RECORDS + "\n" + system))
    assert fragment in str(caught.value)
