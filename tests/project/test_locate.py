"""Line numbers of keys in a project file (counted by hand in the text below)."""

from __future__ import annotations

import tomllib

from sdofreport.project.locate import describe, entry_ids, key_lines

TEXT = '''\
[project]
title = """two
lines [ of { text"""
reference = "R"   # comment [
[analysis]
damping = [
  0.02,
  0.05,
]
[[systems]]
id = "a"
limits = { displacement = "1 mm" }
[[systems]]
id = "b"
"mass" = "1 t"
[systems.limits]
drift_ratio = 0.01
[[systems]]
id = "b"
'''


def test_key_lines_follow_tables_arrays_and_multiline_values():
    tomllib.loads(TEXT)  # the scanner only ever sees valid TOML
    lines = key_lines(TEXT)
    assert lines["project.title"] == 2
    assert lines["project.reference"] == 4  # after a three-line string
    assert lines["analysis.damping"] == 6
    assert lines["systems[1]"] == 10 and lines["systems[1].limits"] == 12
    assert lines["systems[2].mass"] == 15  # quoted key
    assert lines["systems[2].limits.drift_ratio"] == 17
    assert lines["systems[3].id"] == 19
    assert "systems[1].id" in lines and lines["systems[1].id"] == 11


def test_describe_names_unique_ids_and_the_nearest_line():
    lines, names = key_lines(TEXT), entry_ids(tomllib.loads(TEXT))
    # Inside an inline table: the line of the key that opens it.
    assert describe("systems[1].limits.displacement", lines, names) == \
        "line 12, systems[a].limits.displacement"
    # A duplicated id ("b" twice) keeps the position, which is unambiguous.
    assert describe("systems[3].id", lines, names) == "line 19, systems[3].id"
    assert describe("analysis.damping[2]", lines, names) == "line 6, analysis.damping[2]"
    assert describe("records pair 'p1'", lines, names) == "records pair 'p1'"
