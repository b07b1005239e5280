"""Every file of the bad-input corpus, through the CLI: exit 2, a message naming the file
and the line or key and the problem, no traceback, nothing half-written, cache intact.

The corpus is hand-made (tests/data/bad/README.md); each row below names the file, the
CLI arguments and the message fragments. The expected fragments are the contract of
DEVELOPERS.md ("A user error is an SdofreportError (exit status 2) naming file, line or
key, what was expected and what was found. Never a traceback; nothing half-written"); the
line numbers were counted in the corpus files by hand (see make_corpus.py comments).
"""

from __future__ import annotations

import os
import resource
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from sdofreport.records.readers import MAX_FILE_BYTES
from tests.hardening.conftest import (
    CORPUS,
    GOOD_PROJECT,
    assert_user_error,
    invoke,
    listing,
    make_project_folder,
    snapshot,
    staging_leftovers,
)
from tests.conftest import ONE_SYSTEM, PROJECT_HEAD

# (file in records/, extra spectrum options, extra [[records]] keys, fragments)
RECORD_CASES = [
    ("truncated_row.csv", [], {}, ["line 22", "expected two numbers", "found 1 item "]),
    ("truncated_headed.txt", [], {}, ["line 3", "states NPTS=40 but 24 values"]),
    ("truncated_exponent.txt", [], {}, ["line 9", "'1.2E-' is not a number"]),
    ("utf16_bom.csv", [], {}, ["line 1", "UTF-16", "save it as UTF-8"]),
    ("utf16_be_bom.txt", [], {}, ["line 1", "UTF-16 byte-order mark (0xfe 0xff)"]),
    ("latin1_header.txt", [], {}, ["line 2", "(0xe9) is not valid UTF-8"]),
    ("binary_junk.bin", [], {}, ["line 2", "byte 128 (0x80) is not valid UTF-8"]),
    ("gzipped_record.csv.gz", [], {}, ["line 1", "gzip-compressed", "decompress"]),
    ("nul_bytes.txt", ["--dt", "0.01"], {"dt": "0.01 s"}, ["line 5", "is not a number"]),
    ("huge_exponent.csv", [], {}, ["line 8", "'1e400' is too large to be a finite number"]),
    ("huge_exponent_fortran.txt", [], {}, ["line 5", "'1.0D+999' is too large"]),
    ("nan_value.csv", [], {}, ["line 6", "'nan' is not a finite number"]),
    ("inf_value.txt", [], {}, ["line 6", "'-Infinity' is not a finite number"]),
    ("overflow_on_conversion.txt", ["--dt", "0.01"], {"dt": "0.01 s"},
     ["line 4", "1e+308 becomes infinite when converted from g to m/s2"]),
    ("mixed_delimiters.csv", [], {}, ["line 4", "found 3 items in '0.0200,0.0125;0.05'"]),
    ("decimal_commas.csv", [], {}, ["line 2", "decimal commas are not supported"]),
    ("empty.txt", [], {}, ["is empty"]),
    ("blank_lines.txt", [], {}, ["is empty"]),
    ("header_only.csv", ["--layout", "two-column"], {"format": "two-column"},
     ["has no data lines"]),
    ("too_few_points.csv", [], {}, ["has 10 acceleration values; at least 16"]),
    ("time_goes_back.csv", [], {}, ["line 9", "is not greater than the time 0.06 s on line 8"]),
    ("uneven_step.csv", [], {}, ["line 12", "differs from the typical step 0.01 s"]),
    ("npts_fraction.txt", [], {}, ["line 2", "NPTS must be a whole number > 0; found '12.5'"]),
    ("dt_zero.txt", [], {}, ["line 2", "zero or negative time step"]),
    ("dt_negative.txt", [], {}, ["line 2", "zero or negative time step: DT is '-0.01'"]),
    ("header_no_values.txt", [], {}, ["line 2", "no acceleration values follow"]),
    ("header_unreadable.txt", [], {}, ["line 2", "values could not be read"]),
    ("npts_huge.txt", [], {}, ["line 2", "states NPTS=999999999999 but 20 values"]),
    ("words_in_values.txt", ["--dt", "0.01"], {"dt": "0.01 s"}, ["line 3", "'abc' is not a number"]),
    ("values_without_dt.txt", ["--layout", "values"], {"format": "values"},
     ["no time step", "dt"]),
    # Issue 15 part 7: absurd amplitude, a byte-order mark alone, numbers in quotes.
    ("absurd_1e200g.csv", [], {}, ["line 7", "1e+200 g is beyond any ground motion"]),
    ("bom_only.csv", [], {}, ["line 1", "holds only a UTF-8 byte-order mark"]),
    ("quoted_numbers.csv", [], {}, ["line 2", "the numbers are in quotes (\"0.0000\")"]),
    ("good_two_column.csv", ["--dt", "0.02"], {"dt": "0.02 s"},
     ["dt_s=0.02 s disagrees with the time column (0.01 s)"]),
]

# (file in projects/, fragments, pytest marks)
_LOADER = "sdofreport/project/loader.py"
PROJECT_CASES = [
    ("truncated.toml", ["not valid TOML", "Unterminated string"], []),
    ("truncated.toml", ["line 5"], []),
    ("utf16_bom.toml", ["line 1", "not UTF-8 text (byte 0)"], []),
    ("latin1.toml", ["line 2", "not UTF-8 text"], []),
    ("binary.toml", ["line 2", "not UTF-8 text (byte 128)"], []),
    ("duplicate_key.toml", ["line 4", "Cannot overwrite a value"], []),
    ("duplicate_record_ids.toml", ["records[2].id", "duplicate id 'r1'"], []),
    ("duplicate_system_ids.toml", ["systems[2].id", "duplicate id 's1'"], []),
    ("missing_notes.toml", ["project.notes", "'notes/missing.md' not found"], []),
    ("notes_is_folder.toml", ["project.notes", "'records'"], []),
    ("notes_is_folder.toml", ["project.notes", "is a folder"], []),
    ("missing_record_file.toml", ["line 13, records[r2].file", "'records/r9.csv' not found"], []),
    ("record_is_folder.toml", ["records[r1].file", "'records'"], []),
    ("record_is_folder.toml", ["records[r1].file", "is a folder"], []),
    ("record_is_project.toml", ["records[r1]", "record_is_project.toml", "line 1",
                                "'[project]' is not a number"], []),
    ("pair_missing_partner.toml", ["records pair 'p1'", "expected one H1 and one H2",
                                   "r1 (H1)"], []),
    ("pair_without_component.toml", ["line 7, records[r1]", "needs both pair and component"], []),
    ("pair_without_component.toml", ["r1 (no component)"], []),
    ("pair_two_h1.toml", ["records pair 'p1'", "r1 (H1), r2 (H1)"], []),
    ("mass_furlongs.toml", ["systems[s1].mass", "'5 furlongs'", "[length]"], []),
    ("mass_percent.toml", ["systems[s1].mass", "'5 %'"], []),
    ("stiffness_kg.toml", ["systems[s1].stiffness", "'3000 kg'", "[mass]"], []),
    ("zero_mass.toml", ["systems[s1].mass", "must be greater than 0", "'0 t'"], []),
    ("negative_damping.toml", ["systems[s1].damping", "expected a ratio", "-0.02"], []),
    ("damping_one.toml", ["systems[s1].damping", "(not including) 1, found 1.0"], []),
    ("damping_percent.toml", ["systems[s1].damping", "a percentage? use 0.05"], []),
    ("analysis_damping_ge1.toml", ["analysis.damping[2]", "found 1.5"], []),
    ("period_zero.toml", ["systems[s1].period", "greater than 0", "'0 s'"], []),
    ("period_negative.toml", ["systems[s1].period", "'-0.5 s'"], []),
    ("analysis_periods_zero.toml", ["analysis.periods", "greater than 0 s"], []),
    ("periods_min_max.toml", ["analysis.periods", "0 < min < max", "min 2 s, max 1 s"], []),
    ("mass_1e400.toml", ["systems[s1].mass", "expected a finite mass, found inf"], []),
    ("damping_nan.toml", ["systems[s1].damping", "found nan"], []),
    ("unknown_key.toml", ["line 18, systems[s1].dampnig", "did you mean 'damping'"], []),
    ("unknown_section.toml", ["sytems", "did you mean 'systems'"], []),
    ("empty.toml", ["missing section [project]", "records", "systems"], []),
    ("record_dt_negative.toml", ["records[r1].dt", "greater than 0", "-0.01 s"], []),
    ("record_units_furlongs.toml", ["records[r1].units", "'furlong/s2'"], []),
    ("limit_in_kg.toml", ["systems[s1].limits.displacement", "'50 kg'", "[mass]"], []),
    ("drift_without_height.toml", ["systems[s1].limits.drift_ratio", "height"], []),
    ("scale_zero.toml", ["records[r1].scale", "greater than 0"], []),
    ("bad_record_nan.toml", ["records[r1]", "nan_value.csv", "line 6", "'nan'"], []),
    ("bad_record_utf16.toml", ["records[r1]", "utf16_bom.csv", "line 1", "UTF-16"], []),
    ("bad_record_truncated.toml", ["records[r3]", "truncated_headed.txt", "line 3",
                                   "states NPTS=40 but 24 values"], []),
    # STYLE.md shows record problems under the project file's name with the key
    # (records[3] "rec03" file ... line 212); the build names neither today.
    ("bad_record_nan.toml", ["bad_record_nan.toml", "records[r1]"], []),
    ("several_problems.toml", ["has 3 problems", "records[2].id", "systems[s1].damping",
                               "systems[s1].mass"], []),
    # Issue 15 part 2: every id that reaches a file name, with its key and line.
    ("pair_escapes_site.toml", ["line 10", ".pair", "'x/../../victim/evil'",
                                "line 16", ".pair", "letters, digits"], []),
    ("system_id_traversal.toml", ["line 16", ".id", "'../s1'"], []),
    ("record_ids_case_twins.toml", ["line 12", ".id", "'R1' differs only in case "
                                    "from 'r1' (records[1].id)"], []),
    ("system_id_reserved.toml", ["line 16", ".id", "'NUL' is a name the site or "
                                 "Windows reserves"], []),
    ("record_id_separator.toml", ["line 8", ".id", "'a~b'"], []),
    # Issue 15 part 7: absurd inputs are refused with the key and line.
    ("scale_1e300.toml", ["line 10", ".scale", "at most 1000, found 1e+300"], []),
    ("network_40_deep.toml", ["line 21", ".network",
                              "nested more than 32 levels deep"], []),
    ("network_400_deep.toml", ["line 21", "nested", "at most 32 levels"], []),
    # 0.4 S_DS at T = 0 (ASCE/SEI 7-16 Eq. 11.4-5), times 1.5 when the level is MCE_R.
    ("design_sds_1e200.toml", ["design_spectrum: the spectrum reaches ", "e+199 g",
                               "sds = 1e+200", "at most 100 g"], []),
    ("synthetic_1e9_s.toml", ["synthetic_records.duration", "1e+11 samples per record",
                              "at most 1,000,000"], []),
    ("synthetic_count_1e8.toml", ["synthetic_records.count", "found 100000000"], []),
    ("periods_max_1e300.toml", ["analysis.periods", "at most 1000 s, found 1e+300 s"], []),
    ("periods_min_1e-300.toml", ["analysis.periods: the shortest spectrum period 1e-300 s "
                                 "is too short for the time step 0.01 s"], []),
    ("suite_factor_1e300.toml", ["scaling.suite_factor", "at most 1000, found 1e+300"], []),
    ("period_too_short.toml", ["systems[1] (id 's1') period", "1e-06 s is too short for "
                               "the time step 0.01 s of record 'r1'"], []),
    # Not checked today: a record far shorter than a system's period gives a peak that
    # depends on when the record stops, not on the motion. Expected message proposed to
    # the lead; the test flips to passing once the check exists.
    ("short_record.toml", ["records[short]", "short_record.csv", "0.19 s",
                           "shorter than", "5 s"], []),
]


@pytest.fixture(scope="module")
def workspace(good_build, tmp_path_factory):
    """A project folder with the corpus, the shared cache and a copy of the good site."""
    folder = tmp_path_factory.mktemp("corpus")
    make_project_folder(folder)
    shutil.copytree(CORPUS / "projects", folder, dirs_exist_ok=True)
    return folder


def _build_must_fail(good_build, workspace: Path, project: Path, fragments) -> None:
    """Build ``project`` twice (new -o, then over the good site); both must fail cleanly."""
    cache = good_build["cache"]
    cache_before = listing(cache)
    fresh = workspace / f"out-{project.stem}"
    result = invoke("build", project, "-o", fresh, "--cache-dir", cache, "--jobs", "1", "-q")
    assert_user_error(result, *fragments)
    # Nothing half-written: no site and no staging folder.
    assert not fresh.exists()
    assert staging_leftovers(fresh) == []
    existing = workspace / f"site-{project.stem}"
    shutil.rmtree(existing, ignore_errors=True)  # a file may appear in several rows
    shutil.copytree(good_build["site"], existing)
    result = invoke("build", project, "-o", existing, "--cache-dir", cache, "--jobs", "1",
                    "-q")
    assert_user_error(result, *fragments)
    # The previous site is left byte for byte.
    assert snapshot(existing) == good_build["snapshot"]
    assert staging_leftovers(existing) == []
    # The cache is untouched by a failed build (so still usable; the last test proves it).
    assert listing(cache) == cache_before


@pytest.mark.parametrize("name, options, keys, fragments",
                         [pytest.param(*case, id=case[0]) for case in RECORD_CASES])
def test_bad_record_spectrum(workspace, name, options, keys, fragments):
    path = workspace / "bad" / name
    result = invoke("spectrum", path, "--periods", "0.5", *options)
    assert_user_error(result, name, *fragments)


@pytest.mark.parametrize("name, options, keys, fragments",
                         [pytest.param(*case, id=case[0]) for case in RECORD_CASES])
def test_bad_record_build(good_build, workspace, name, options, keys, fragments):
    extra = "".join(f"{key} = {value!r}\n".replace("'", '"') for key, value in keys.items())
    project = workspace / f"record-{Path(name).stem}.toml"
    project.write_text(f'{PROJECT_HEAD}\n[[records]]\nid = "r1"\nfile = "bad/{name}"\n'
                       f"{extra}\n{ONE_SYSTEM}", encoding="utf-8")
    _build_must_fail(good_build, workspace, project, ["records[r1]", name, *fragments])


@pytest.mark.parametrize("name, fragments", [
    pytest.param(name, fragments, marks=marks, id=f"{name}-{i}")
    for i, (name, fragments, marks) in enumerate(PROJECT_CASES)])
def test_bad_project_build(good_build, workspace, name, fragments):
    # Problems found by the loader name the project file; problems inside a record file
    # name that file, and the project file's name and key (records[n]).
    named = [] if name.startswith(("bad_record", "short_record")) else [name]
    _build_must_fail(good_build, workspace, workspace / name, [*named, *fragments])


@pytest.fixture
def symlink_loop(workspace):
    loop = workspace / "records" / "loop.csv"
    if not loop.is_symlink():
        loop.symlink_to(loop)
    return loop


def test_record_symlink_loop_build(good_build, workspace, symlink_loop):
    project = workspace / "symlink_loop.toml"
    project.write_text(GOOD_PROJECT.replace("records/r2.txt", "records/loop.csv"))
    _build_must_fail(good_build, workspace, project,
                     ["symlink_loop.toml", "records[r2].file", "'records/loop.csv'"])


def test_record_symlink_loop_spectrum(symlink_loop):
    result = invoke("spectrum", symlink_loop)
    # The reader sees no file behind the loop and says so, naming it.
    assert_user_error(result, "loop.csv", "not found")


@pytest.mark.parametrize("target", ["nope.toml", "empty-folder"])
def test_missing_project_file(good_build, workspace, target):
    (workspace / "empty-folder").mkdir(exist_ok=True)
    _build_must_fail(good_build, workspace, workspace / target,
                     ["project file not found"])


@pytest.mark.skipif(not Path("/dev/zero").exists(), reason="needs /dev/zero")
def test_endless_device_is_refused():
    result = invoke("spectrum", "/dev/zero")
    # The reader reads at most MAX_FILE_BYTES + 1 bytes of a file that states no size.
    assert_user_error(result, "/dev/zero", f"more than {MAX_FILE_BYTES // 2 ** 20} MiB")


def _write_huge_record(path: Path, size_bytes: int) -> None:
    """A well-formed headed record of about ``size_bytes`` (values in g, 9 bytes each)."""
    line = b"  0.0125 -0.0250  0.0375 -0.0125  0.0000  0.0250 -0.0375  0.0125\n"
    block = line * (1024 * 1024 // len(line))
    repeats = size_bytes // len(block) + 1
    count = repeats * (len(block) // len(line)) * 8
    with open(path, "wb") as handle:
        handle.write(f"INVENTED HUGE TEST RECORD\nNPTS= {count}, DT= 0.005 SEC\n".encode())
        for _ in range(repeats):
            handle.write(block)


GIB = 1024 ** 3


def test_200_mb_record_is_refused_with_bounded_memory(good_build, workspace, tmp_path):
    huge = tmp_path / "huge_record.txt"
    _write_huge_record(huge, 200 * 1024 * 1024)
    assert huge.stat().st_size >= 200 * 1024 * 1024
    # The real entry point in a child process, so its peak memory can be measured alone.
    env = dict(os.environ, PYTHONPATH=str(Path(__file__).resolve().parents[2]))
    child = subprocess.run(
        [sys.executable, "-c", "from sdofreport.cli import main; main()", "spectrum",
         str(huge)], capture_output=True, text=True, timeout=300, env=env)
    peak_kib = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss  # KiB on Linux
    assert child.returncode == 2, child.stderr
    assert "Traceback" not in child.stderr
    assert "huge_record.txt" in child.stderr and "MiB" in child.stderr
    assert "the largest record file read is" in child.stderr
    # Bounded memory: the brief's ceiling of about 2 GB for the whole process.
    assert peak_kib * 1024 < 2 * GIB, peak_kib
    # The same file through a build in this process.
    shutil.move(huge, workspace / "bad" / "huge_record.txt")
    try:
        project = workspace / "huge_record.toml"
        project.write_text(f'{PROJECT_HEAD}\n[[records]]\nid = "big"\n'
                           f'file = "bad/huge_record.txt"\n\n{ONE_SYSTEM}')
        _build_must_fail(good_build, workspace, project,
                         ["records[big]", "huge_record.txt", "MiB"])
    finally:
        (workspace / "bad" / "huge_record.txt").unlink()
    assert resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024 < 2 * GIB


def test_cache_still_usable_after_the_bad_builds(good_build, workspace):
    # Runs last in this module (file order): every failed build above shared this cache.
    site = workspace / "after-bad-builds"
    result = invoke("build", good_build["project"], "-o", site, "--cache-dir",
                    good_build["cache"], "--jobs", "1")
    assert result.exit_code == 0, (result.output, result.exception)
    # Regression: same inputs, same bytes (DEVELOPERS.md), and nothing recomputed.
    assert snapshot(site) == good_build["snapshot"]
    assert ", 0 computed." in result.output
