"""Amplitudes that cannot be right stop the build (issue 14 part 3).

Before the fix, a cm/s² file declared as g built with exit 0 and a PGA of about 300 g
on its page. Expected PGAs come from the definition of the units (1 cm/s² = 0.01 m/s²,
g = 9.80665 m/s², ISO 80000-3) applied to the values written, never from a build.
"""

from __future__ import annotations

import numpy as np
import pytest
from click.testing import CliRunner

from sdofreport.cli import cli
from sdofreport.core.units import G
from sdofreport.records.writers import write_two_column
from tests.conftest import ONE_SYSTEM, PROJECT_HEAD, synthetic_acceleration


def _values_file(path, values) -> None:
    """A ``values`` file (no header, so no stated unit): 5 values a line."""
    rows = [" ".join(f"{v:.8e}" for v in values[i:i + 5]) for i in range(0, len(values), 5)]
    path.write_text("\n".join(rows) + "\n", encoding="utf-8")


def _project(folder, entry: str):
    path = folder / "sdofreport.toml"
    path.write_text(PROJECT_HEAD + "\n[[records]]\n" + entry + "\n" + ONE_SYSTEM,
                    encoding="utf-8")
    return path


def _build(project, out):
    return CliRunner().invoke(cli, ["build", str(project), "-o", str(out), "--quiet",
                                    "--jobs", "1", "--no-cache"])


@pytest.fixture
def motion_cm_s2():
    """A seeded 0.3 g synthetic motion written as numbers in cm/s² (input, not a result)."""
    return synthetic_acceleration(21) * 100.0  # m/s² -> cm/s²


def _assert_refused(result, out, *fragments):
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    for fragment in fragments:
        assert fragment in result.output, result.output
    assert not out.exists()  # nothing half-written


def test_header_in_cm_s2_declared_as_g_is_refused(tmp_path, motion_cm_s2):
    write_two_column(tmp_path / "rec.csv", 0.01, motion_cm_s2, units="cm/s2")
    project = _project(tmp_path, 'id = "north"\nfile = "rec.csv"\nunits = "g"')
    out = tmp_path / "site"
    _assert_refused(_build(project, out), out, "records[north]", "'rec.csv' line 1",
                    "states the values are in cm/s2", 'declares units = "g"',
                    'write units = "cm/s2"', "amplitude_ok = true")


def test_pga_above_4_g_is_refused_with_the_likely_unit(tmp_path, motion_cm_s2):
    _values_file(tmp_path / "rec.txt", motion_cm_s2)
    project = _project(tmp_path, 'id = "north"\nfile = "rec.txt"\nformat = "values"\n'
                                 'dt = "0.01 s"\nunits = "g"')
    out = tmp_path / "site"
    # Read as g, the numbers' peak is the PGA in g; in cm/s² it is peak / 100 / G g.
    peak = float(np.max(np.abs(np.round(motion_cm_s2, 8))))
    _assert_refused(_build(project, out), out, "records[north]",
                    f"the PGA after scaling is {peak:.4g} g, above 4 g",
                    f"in cm/s2 it would be {peak / 100 / G:.3g} g", "amplitude_ok = true")


def test_pga_below_0_001_g_after_scale_is_refused(tmp_path):
    project = _project(tmp_path, 'id = "weak"\nfile = "rec.txt"\nformat = "values"\n'
                                 'dt = "0.01 s"\nscale = 0.001')
    _values_file(tmp_path / "rec.txt", synthetic_acceleration(22) / G)  # 0.3 g, in g
    out = tmp_path / "site"
    _assert_refused(_build(project, out), out, "records[weak]", "below 0.001 g",
                    "scale 0.001")


def test_amplitude_ok_acknowledges_and_builds(tmp_path, motion_cm_s2):
    write_two_column(tmp_path / "rec.csv", 0.01, motion_cm_s2 / 100.0 / G * 5.0,
                     units="g")  # a 1.5 g motion (from a 0.3 g one), header in g
    project = _project(tmp_path, 'id = "strong"\nfile = "rec.csv"\nscale = 3.0\n'
                                 "amplitude_ok = true")  # 4.5 g after the scale
    out = tmp_path / "site"
    result = _build(project, out)
    assert result.exit_code in (0, 3), result.output
    assert (out / "index.html").is_file()


def test_overflowed_values_never_reach_a_page(tmp_path):
    # 1e200 g is finite, but its square (Arias intensity) would overflow a double
    # (IEEE 754): the build refuses the record, names it and writes no site.
    _values_file(tmp_path / "rec.txt", np.full(800, 1e200))
    project = _project(tmp_path, 'id = "huge"\nfile = "rec.txt"\nformat = "values"\n'
                                 'dt = "0.01 s"\namplitude_ok = true')
    out = tmp_path / "site"
    _assert_refused(_build(project, out), out, "records[huge]", "1e+200 g")


def test_a_non_finite_intensity_measure_is_a_problem():
    """The last guard (sdofreport.engine.amplitude.record_problems): any non-finite value of a
    record as used is a problem naming the record, whatever amplitude_ok says (IEEE 754:
    an overflowed square is inf)."""
    import dataclasses
    from types import SimpleNamespace

    from sdofreport.engine.amplitude import record_problems
    from sdofreport.core.intensity import intensity_measures
    from sdofreport.core.spectra import response_spectrum

    acc = np.sin(np.linspace(0.0, 20.0, 500))
    spectrum = response_spectrum(acc, 0.01, [0.5, 1.0], [0.05])
    good = intensity_measures(acc, 0.01)
    spec = SimpleNamespace(id="huge", file="rec.txt", units="m/s2", scale=1.0,
                           amplitude_ok=True)
    arrays = {"velocity_m_s": acc, "displacement_m": acc, "fourier_amplitude_m_s": acc}
    ok = SimpleNamespace(spec=spec, intensity=good, spectrum=spectrum, scale_factor=1.0,
                         **arrays)
    assert record_problems(ok) == []
    bad = SimpleNamespace(**{**vars(ok), "intensity": dataclasses.replace(
        good, arias_m_s=float("inf"))})
    (problem,) = record_problems(bad)
    assert "records[huge]" in problem and "arias_m_s" in problem
    assert "are not finite numbers" in problem
