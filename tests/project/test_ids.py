"""Ids that become file names: one safe pattern at load (key and line), reserved names,
case-only twins; figure names that never collide; a writer that never leaves its tree.

Sources of expected values: the file-name rules are POSIX (``/`` separates, ``..`` is
the parent) and Microsoft's "Naming Files, Paths, and Namespaces" (device names CON,
PRN, AUX, NUL, COM0-9 and LPT0-9 are reserved in any case and with any extension; a
trailing dot is dropped; names are compared without regard to case) — from memory.
Line numbers are counted in the project text each test writes.
"""

from __future__ import annotations

import os
import stat

import pytest
from hypothesis import given
from hypothesis import strategies as st

from sdofreport.errors import BuildError, ProjectError
from sdofreport.project.ids import SAFE_ID, id_problem
from sdofreport.project.loader import load_project
from sdofreport.site.context import FIGURE_KINDS, FIGURE_SEPARATOR, figure_path
from sdofreport.site.tree import StagedTree
from tests.conftest import ONE_SYSTEM, PROJECT_HEAD, TWO_RECORDS

HOSTILE_IDS = ["x/../../victim/evil", "../s1", "a/b", "a\\b", "/abs", "a~b", ".hidden",
               "a.", "", " a", "a b", "a\x00b", "é", "a" * 65, "con", "NUL", "com1",
               "Lpt9.txt", "aux.html", "index", "Figures", "-a", "a:b"]


@pytest.mark.parametrize("value", HOSTILE_IDS)
def test_hostile_ids_are_refused(value):
    assert id_problem(value) is not None


@pytest.mark.parametrize("value", ["r1", "hcs01", "P1", "a-b", "b_c", "v1.2", "A", "9"])
def test_ordinary_ids_are_kept(value):
    assert id_problem(value) is None


def _paired(pair: str) -> str:
    return (TWO_RECORDS.replace('file = "records/r1.csv"\n',
                                f'file = "records/r1.csv"\npair = "{pair}"\n'
                                f'component = "H1"\n')
            .replace('file = "records/r2.txt"\n',
                     f'file = "records/r2.txt"\npair = "{pair}"\ncomponent = "H2"\n'))


def test_pair_name_that_climbs_out_is_refused_with_key_and_line(project_factory):
    # The reproduction of the issue: this pair name wrote outside the site.
    path = project_factory(PROJECT_HEAD + _paired("x/../../victim/evil") + ONE_SYSTEM)
    with pytest.raises(ProjectError) as info:
        load_project(path)
    message = info.value.message
    # PROJECT_HEAD is 5 lines; [[records]] 6, id 7, file 8, pair 9; the second table
    # starts on line 12 (blank 11), so its pair is on line 15.
    assert "line 9, records[r1].pair: expected letters, digits" in message
    assert "line 15, records[r2].pair" in message and "'x/../../victim/evil'" in message


@pytest.mark.parametrize("key", ["record", "system", "pair"])
@pytest.mark.parametrize("value", ["../up", "a~b", "NUL", "a."])
def test_every_id_kind_is_checked(project_factory, key, value):
    records, system = TWO_RECORDS, ONE_SYSTEM
    if key == "record":
        records = records.replace('id = "r2"', f'id = "{value}"')
    elif key == "system":
        system = system.replace('id = "s1"', f'id = "{value}"')
    else:
        records = _paired(value)
    with pytest.raises(ProjectError, match=r"line \d+, "):
        load_project(project_factory(PROJECT_HEAD + records + system))


@pytest.mark.parametrize("section", ["records", "systems", "pairs"])
def test_ids_differing_only_in_case_are_refused(project_factory, section):
    records, system = TWO_RECORDS, ONE_SYSTEM
    if section == "records":
        records = records.replace('id = "r2"', 'id = "R1"')
    elif section == "systems":
        system = system + "\n" + system.replace('id = "s1"', 'id = "S1"')
    else:
        records = _paired("p1") + "\n" + _paired("P1").replace('"r1"', '"r3"').replace(
            '"r2"', '"r4"')
    with pytest.raises(ProjectError, match="differs only in case"):
        load_project(project_factory(PROJECT_HEAD + records + system))


_ids = st.from_regex(SAFE_ID, fullmatch=True)


@given(kind=st.sampled_from(sorted(FIGURE_KINDS)), ids=st.lists(_ids, min_size=2,
                                                                   max_size=2))
def test_figure_names_decode_to_their_parts(kind, ids):
    # Injective by construction: the name splits back into exactly (kind, ids), so two
    # distinct (kind, system, record) can never share a file.
    ids = ids[:FIGURE_KINDS[kind]]
    path = figure_path(kind, *ids)
    assert path.startswith("figures/") and path.endswith(".svg")
    assert path[len("figures/"):-len(".svg")].split(FIGURE_SEPARATOR) == [kind, *ids]


def test_the_issue_collisions_are_gone():
    # Systems a and a-b with records b-c and c, and a record named spectra (the issue).
    names = {figure_path("system-response", "a", "b-c"),
             figure_path("system-response", "a-b", "c"),
             figure_path("system-spectra", "a"), figure_path("system-response", "a",
                                                              "spectra")}
    assert len(names) == 4


def test_figure_path_refuses_an_unsafe_id():
    with pytest.raises(BuildError, match="cannot name a file"):
        figure_path("pair", "x/../../victim/evil")


@pytest.mark.parametrize("relative", ["../victim/evil.svg", "figures/../../x.svg",
                                      "/tmp/x.svg", "figures\\..\\x.svg", "a//b.svg",
                                      "./x.svg", "x\x00.svg"])
def test_writer_refuses_paths_outside_its_tree(tmp_path, relative):
    victim = tmp_path / "victim"
    victim.mkdir()
    os.chmod(victim, 0o700)
    with StagedTree(tmp_path / "out" / "site") as tree:
        with pytest.raises(BuildError, match="resolves outside the site folder"):
            tree.write(relative, b"evil")
        assert [p for p in tree.folder.rglob("*")] == []
    assert list(victim.iterdir()) == [] and stat.S_IMODE(victim.stat().st_mode) == 0o700


def test_writer_refuses_to_follow_a_planted_link(tmp_path):
    victim = tmp_path / "victim"
    victim.mkdir()
    (victim / "keep.txt").write_bytes(b"keep")
    os.chmod(victim, 0o700)
    with StagedTree(tmp_path / "site") as tree:
        os.symlink(victim, tree.folder / "figures")
        os.symlink(victim / "keep.txt", tree.folder / "page.html")
        for relative in ("figures/keep.txt", "figures/new.svg", "page.html"):
            with pytest.raises(BuildError, match="resolves outside"):
                tree.write(relative, b"evil")
    assert (victim / "keep.txt").read_bytes() == b"keep"
    assert sorted(p.name for p in victim.iterdir()) == ["keep.txt"]
    assert stat.S_IMODE(victim.stat().st_mode) == 0o700
