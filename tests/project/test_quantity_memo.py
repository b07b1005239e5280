"""The memo of unit strings already converted by pint (sdofreport.project.quantities).

Source of expected values: pint itself (the units library the loader uses) converting
the same strings afresh; unit definitions per NIST SP 811, Appendix B (1 t = 1000 kg,
1 kip = 4448.2216152605 N, 1 in = 0.0254 m) and ISO 80000-3 (g = 9.80665 m/s²).
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import textwrap

import pytest

from sdofreport.project import quantities

CASES = [("120 t", "mass"), ("26 kip/in", "stiffness"), ("18 ft", "length"),
         ("0.35 g", "acceleration"), ("4.2 MN/m", "stiffness"), ("300 mm", "length"),
         ("2 Hz", "frequency"), ("8.5e-5 m**4", "second_moment")]


@pytest.fixture
def fresh_memo(tmp_path, monkeypatch):
    """An empty memo in a private file."""
    path = tmp_path / "memo.json"
    monkeypatch.setattr(quantities, "_memo_path", lambda: str(path))
    monkeypatch.setattr(quantities, "_MEMO", None)
    monkeypatch.setattr(quantities, "_MEMO_NEW", {})
    return path


def test_remembered_values_equal_pints_own(fresh_memo):
    ureg = quantities._registry()
    first = [quantities.parse_quantity(text, dimension) for text, dimension in CASES]
    quantities.save_memo()
    stored = json.loads(fresh_memo.read_text("utf-8"))["entries"]
    assert len(stored) == len(CASES)
    quantities._MEMO = None  # read back from the file
    second = [quantities.parse_quantity(text, dimension) for text, dimension in CASES]
    for (text, dimension), a, b in zip(CASES, first, second):
        # Reference: pint converting the string afresh, bit for bit.
        unit_text = text.replace(" g", " g_0") if dimension == "acceleration" else text
        expected = float(ureg.Quantity(unit_text).to_base_units().magnitude)
        assert a == b == expected, (text, a, b, expected)
    # NIST SP 811 App. B: 1 kip/in = 4448.2216152605 N / 0.0254 m.
    assert second[1] == pytest.approx(26 * 4448.2216152605 / 0.0254, rel=1e-12)


def test_a_damaged_memo_is_ignored(fresh_memo):
    fresh_memo.write_text('{"mass|120 t": "not a number", "length|1 m": 5.0', "utf-8")
    assert quantities.parse_quantity("120 t", "mass") == pytest.approx(120_000.0)
    fresh_memo.write_text('{"mass|120 t": "not a number"}', "utf-8")
    quantities._MEMO = None
    assert quantities.parse_quantity("120 t", "mass") == pytest.approx(120_000.0)


def test_saving_keeps_what_another_process_stored(fresh_memo):
    assert quantities.parse_quantity("18 ft", "length") == pytest.approx(18 * 0.3048)
    # Another process stored an entry after this one read the (empty) memo.
    _write_memo(fresh_memo, {"mass|120 t": 120000.0})
    quantities.save_memo()
    stored = json.loads(fresh_memo.read_text("utf-8"))["entries"]
    assert set(stored) == {"mass|120 t", "length|18 ft"}


def _write_memo(path, entries: dict) -> None:
    """A memo file in the current layout, its checksum right."""
    path.write_text(json.dumps({"format": quantities.MEMO_FORMAT, "entries": entries,
                                "sha256": quantities._entries_digest(entries)}), "utf-8")


def test_a_flipped_digit_in_the_memo_is_discarded(fresh_memo, caplog):
    # Reproduction: a damaged memo turned "100 t" into 900 t.
    assert quantities.parse_quantity("100 t", "mass") == 100_000.0
    quantities.save_memo()
    text = fresh_memo.read_text("utf-8")
    assert "100000.0" in text
    fresh_memo.write_text(text.replace("100000.0", "900000.0"), "utf-8")
    quantities._MEMO = None
    with caplog.at_level("WARNING", logger="sdofreport.project"):
        # Definition (NIST SP 811 App. B): 1 t = 1000 kg.
        assert quantities.parse_quantity("100 t", "mass") == 100_000.0
    assert "checksum mismatch" in caplog.text and not fresh_memo.exists()


def test_without_memo_converts_afresh_and_stores_nothing(fresh_memo):
    # Reproduction: --no-cache still used the memo. Here the memo lies with a valid
    # checksum; a build without a cache must not even read it.
    _write_memo(fresh_memo, {"mass|100 t": 900_000.0})
    quantities._MEMO = None
    with quantities.without_memo():
        # Definition (NIST SP 811 App. B): 1 t = 1000 kg.
        assert quantities.parse_quantity("100 t", "mass") == 100_000.0
        assert quantities.parse_quantity("18 ft", "length") == pytest.approx(18 * 0.3048)
        quantities.save_memo()
    assert json.loads(fresh_memo.read_text("utf-8"))["entries"] == {"mass|100 t": 900_000.0}


def test_bad_strings_are_not_remembered(fresh_memo):
    with pytest.raises(quantities.QuantityError):
        quantities.parse_quantity("12 kg", "length")
    quantities.save_memo()
    assert not fresh_memo.exists()
    with pytest.raises(quantities.QuantityError, match="which is a"):
        quantities.parse_quantity("12 kg", "length")


def test_second_read_of_a_project_does_not_import_pint(tmp_path, project_factory,
                                                       valid_project_text):
    project = project_factory(valid_project_text)
    script = textwrap.dedent(f"""
        import sys
        from sdofreport.project import load_project
        system = load_project({str(project)!r}).systems[0]
        print(system.mass_kg, system.limits.displacement_m, "pint" in sys.modules)
    """)
    env = {**os.environ, "XDG_CACHE_HOME": str(tmp_path / "cache")}
    runs = [subprocess.run([sys.executable, "-c", script], capture_output=True, text=True,
                           env=env, check=True).stdout.split() for _ in range(2)]
    assert runs[0][2] == "True" and runs[1][2] == "False"
    assert runs[0][:2] == runs[1][:2]  # the same values either way
    # Definition: 1 t = 1000 kg (the valid project's mass is 100 t).
    assert float(runs[1][0]) == 100_000.0
