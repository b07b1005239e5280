"""Write the hand-made bad-input corpus (records/ and projects/) beside this script.

Run ``python tests/data/bad/make_corpus.py`` to regenerate it; the files are committed,
so the tests never run this. Everything here is invented for sdofreport's tests: no
real earthquake record, published data set or other program's file is used. Binary
and wrongly encoded files are made here because an editor would "fix" them.

The 200 MB record of the hardening tests is NOT part of the corpus: the test writes it
into its temporary folder.
"""

from __future__ import annotations

import gzip
from pathlib import Path

HERE = Path(__file__).resolve().parent
RECORDS = HERE / "records"
PROJECTS = HERE / "projects"


def accel(k: int) -> float:
    """The same arithmetic pattern as tests/data/SOURCES.md: ((k mod 9) - 4) x 0.0125 g."""
    return ((k % 9) - 4) * 0.0125


def two_column_rows(count: int, dt: float = 0.01, start: int = 0) -> list[str]:
    return [f"{k * dt:.4f},{accel(k):.4f}" for k in range(start, start + count)]


def value_lines(count: int, per_line: int = 5) -> list[str]:
    values = [f"{accel(k):9.4f}" for k in range(count)]
    return ["".join(values[i:i + per_line]) for i in range(0, count, per_line)]


def text(*lines: str) -> str:
    return "\n".join(lines) + "\n"


GOOD_TWO_COLUMN = text("time_s,accel_g", *two_column_rows(40))

RECORD_FILES: dict[str, bytes | str] = {
    # line 1 header, lines 2-21 rows, line 22 a row cut after its delimiter
    "truncated_row.csv": text("time_s,accel_g", *two_column_rows(20), "0.2000,"),
    # header says 40 values, the file stops after 24 (lines 4-8, the last line short)
    "truncated_headed.txt": text("INVENTED TEST RECORD, NOT A REAL EARTHQUAKE",
                                 "ACCELERATION IN G",
                                 "NPTS=    40, DT=   .0100 SEC",
                                 *value_lines(24)),
    # the last number is cut inside its exponent (line 8)
    "truncated_exponent.txt": text("INVENTED TEST RECORD", "units g",
                                   "NPTS= 30, DT= 0.01 SEC", *value_lines(25),
                                   "  0.0125  -0.0125 0.0250  0.0125  1.2E-"),
    "utf16_bom.csv": GOOD_TWO_COLUMN.encode("utf-16"),          # little-endian with BOM
    "utf16_be_bom.txt": b"\xfe\xff" + GOOD_TWO_COLUMN.encode("utf-16-be"),
    # 'é' (0xe9) in Latin-1 on line 2 of a headed file
    "latin1_header.txt": text("INVENTED TEST RECORD", "Station: Café de la Gare (invented)",
                              "NPTS= 20, DT= 0.01 SEC", *value_lines(20)).encode("latin-1"),
    # bytes 0..255 repeated: 0x0a at byte 10 ends line 1; 0x80 (byte 128) is on line 2
    "binary_junk.bin": bytes(range(256)) * 16,
    # a compressed record given where a text file is expected (gzip magic 1f 8b)
    "gzipped_record.csv.gz": gzip.compress(GOOD_TWO_COLUMN.encode(), mtime=0),
    # a NUL byte inside a value on line 5
    "nul_bytes.txt": text("# invented values file", *value_lines(15)[:3],
                          "0.0100\x000.0200 0.0300", *value_lines(20)[3:]),
    # 1e400 overflows a double: line 8
    "huge_exponent.csv": text("time_s,accel_g", *two_column_rows(6), "0.0600,1e400",
                              *two_column_rows(20, start=7)),
    # Fortran exponent that overflows: line 5
    "huge_exponent_fortran.txt": text("INVENTED TEST RECORD", "units g",
                                      "NPTS= 20, DT= 0.01 SEC", *value_lines(5),
                                      "  0.0125  1.0D+999  0.0125  0.0125  0.0125",
                                      *value_lines(10)),
    # 'nan' on line 6
    "nan_value.csv": text("time_s,accel_g", *two_column_rows(4), "0.0400,nan",
                          *two_column_rows(20, start=5)),
    # '-Infinity' on line 6 of a headed file
    "inf_value.txt": text("INVENTED TEST RECORD", "units g", "NPTS= 20, DT= 0.01 SEC",
                          *value_lines(10), "0.0 -Infinity 0.0 0.0 0.0", *value_lines(5)),
    # finite in the file, infinite once converted from g to m/s2: line 4
    "overflow_on_conversion.txt": text("# invented values file, units g", *value_lines(10),
                                       "1.0e308 1.0e308", *value_lines(10)),
    # three items on line 4: a comma and a semicolon in one row
    "mixed_delimiters.csv": text("time_s,accel_g", *two_column_rows(2), "0.0200,0.0125;0.05",
                                 *two_column_rows(20, start=3)),
    # decimal commas with a semicolon delimiter: line 2
    "decimal_commas.csv": text("time_s;accel_g",
                               *[r.replace(",", ";").replace(".", ",")
                                 for r in two_column_rows(20)]),
    "empty.txt": b"",
    "blank_lines.txt": " \n\t\n\r\n   \n",
    "header_only.csv": text("time_s,accel_g"),
    "too_few_points.csv": text("time_s,accel_g", *two_column_rows(10)),
    # line 9 repeats the time of line 8
    "time_goes_back.csv": text("time_s,accel_g", *two_column_rows(7), "0.0600,0.0125",
                               *two_column_rows(20, start=7)),
    # line 12 jumps by 0.05 s instead of 0.01 s
    "uneven_step.csv": text("time_s,accel_g", *two_column_rows(10),
                            *two_column_rows(20, start=14)),
    "npts_fraction.txt": text("INVENTED TEST RECORD", "NPTS= 12.5, DT= 0.01 SEC",
                              *value_lines(20)),
    "dt_zero.txt": text("INVENTED TEST RECORD", "NPTS= 20, DT= 0.000 SEC", *value_lines(20)),
    "dt_negative.txt": text("INVENTED TEST RECORD", "NPTS= 20, DT= -0.01 SEC",
                            *value_lines(20)),
    "header_no_values.txt": text("INVENTED TEST RECORD", "NPTS= 20, DT= 0.01 SEC",
                                 "end of file (the values are missing)"),
    "header_unreadable.txt": text("INVENTED TEST RECORD", "NPTS and DT are given below",
                                  *value_lines(20)),
    # a huge stated count with few values must not allocate anything
    "npts_huge.txt": text("INVENTED TEST RECORD", "NPTS= 999999999999, DT= 0.01 SEC",
                          *value_lines(20)),
    # a word on line 3
    "words_in_values.txt": text("# invented values file", *value_lines(5)[:1],
                                "0.0100 0.0200 abc", *value_lines(20)[1:]),
    "values_without_dt.txt": text(*value_lines(40)),
    "good_two_column.csv": GOOD_TWO_COLUMN,   # valid; used with a wrong --dt
    # issue 15 part 7: a value of 1e200 g on line 7; a UTF-8 byte-order mark and nothing
    # else; every number in quotes (from line 2, after a quoted header)
    "absurd_1e200g.csv": text("time_s,accel_g", *two_column_rows(5), "0.0500,1e200",
                              *two_column_rows(30, start=6)),
    "bom_only.csv": b"\xef\xbb\xbf",
    "quoted_numbers.csv": text('"time_s","accel_g"',
                               *(",".join(f'"{v}"' for v in row.split(","))
                                 for row in two_column_rows(40))),
    # valid but only 0.19 s long: far shorter than a 5 s system period
    "short_record.csv": text("time_s,accel_g", *two_column_rows(20)),
}

BASE_HEAD = """\
[project]
title = "Invented bad-input case"
reference = "BAD-1"
revision = "0"
prepared_by = "sdofreport tests"
"""

RECORDS_TWO = """\
[[records]]
id = "r1"
file = "records/r1.csv"

[[records]]
id = "r2"
file = "records/r2.txt"
"""

SYSTEM = """\
[[systems]]
id = "s1"
name = "Invented system"
damping = 0.05
mass = "100 t"
period = "0.5 s"
height = "4 m"
[systems.limits]
displacement = "50 mm"
"""


def project(*, head=BASE_HEAD, records=RECORDS_TWO, system=SYSTEM, extra="") -> str:
    return "\n".join(part for part in (head, extra, records, system) if part)


def one_record(file: str, record_id: str = "r1", more: str = "") -> str:
    return f'[[records]]\nid = "{record_id}"\nfile = "{file}"\n{more}'


def sys_with(old: str, new: str) -> str:
    assert old in SYSTEM
    return SYSTEM.replace(old, new)


def springs(levels: int) -> str:
    """A system on a spring network nested ``levels`` series groups deep."""
    node = '{ k = "1 MN/m" }'
    for _ in range(levels):
        node = f'{{ series = [{node}, {{ k = "2 MN/m" }}] }}'
    return ('[[systems]]\nid = "s1"\nname = "Invented springs"\nkind = "springs"\n'
            f'damping = 0.05\nmass = "10 t"\nnetwork = {node}\n')


GOOD = project()
_cut = GOOD.index('prepared_by = "sdofreport') + len('prepared_by = "sdofr')

PROJECT_FILES: dict[str, bytes | str] = {
    "truncated.toml": GOOD[:_cut],                      # string left open on line 5
    "utf16_bom.toml": GOOD.encode("utf-16"),
    "latin1.toml": GOOD.replace("Invented bad-input case",
                                "Kühlhaus (invented)").encode("latin-1"),   # line 2
    "binary.toml": bytes(range(256)) * 4,
    "duplicate_key.toml": GOOD.replace('reference = "BAD-1"\n',
                                       'reference = "BAD-1"\ntitle = "again"\n'),
    "duplicate_record_ids.toml": project(records=RECORDS_TWO.replace('"r2"', '"r1"')),
    "duplicate_system_ids.toml": project(system=SYSTEM + "\n" + SYSTEM),
    "missing_notes.toml": project(head=BASE_HEAD + 'notes = "notes/missing.md"\n'),
    "notes_is_folder.toml": project(head=BASE_HEAD + 'notes = "records"\n'),
    "missing_record_file.toml": project(records=RECORDS_TWO.replace("records/r2.txt",
                                                                    "records/r9.csv")),
    "record_is_folder.toml": project(records=one_record("records")),
    # the record entry names the project file itself
    "record_is_project.toml": project(records=one_record("record_is_project.toml",
                                                         more="dt = \"0.01 s\"\n")),
    "pair_missing_partner.toml": project(records=RECORDS_TWO.replace(
        'file = "records/r1.csv"', 'file = "records/r1.csv"\npair = "p1"\ncomponent = "H1"')),
    "pair_without_component.toml": project(records=RECORDS_TWO.replace(
        'file = "records/r1.csv"', 'file = "records/r1.csv"\npair = "p1"')),
    "pair_two_h1.toml": project(records=RECORDS_TWO.replace(
        'file = "records/r1.csv"', 'file = "records/r1.csv"\npair = "p1"\ncomponent = "H1"'
    ).replace('file = "records/r2.txt"', 'file = "records/r2.txt"\npair = "p1"\n'
              'component = "H1"')),
    "mass_furlongs.toml": project(system=sys_with('mass = "100 t"', 'mass = "5 furlongs"')),
    # pint reads '%' as a dimensionless 0.01: a mass must not come out as 0.05 kg
    "mass_percent.toml": project(system=sys_with('mass = "100 t"', 'mass = "5 %"')),
    "stiffness_kg.toml": project(system=sys_with('period = "0.5 s"',
                                                 'stiffness = "3000 kg"')),
    "zero_mass.toml": project(system=sys_with('mass = "100 t"', 'mass = "0 t"')),
    "negative_damping.toml": project(system=sys_with("damping = 0.05", "damping = -0.02")),
    "damping_one.toml": project(system=sys_with("damping = 0.05", "damping = 1.0")),
    "damping_percent.toml": project(system=sys_with("damping = 0.05", "damping = 5")),
    "analysis_damping_ge1.toml": project(extra="[analysis]\ndamping = [0.05, 1.5]\n"),
    "period_zero.toml": project(system=sys_with('mass = "100 t"\nperiod = "0.5 s"',
                                                'period = "0 s"')),
    "period_negative.toml": project(system=sys_with('period = "0.5 s"', 'period = "-0.5 s"')),
    "analysis_periods_zero.toml": project(extra="[analysis]\nperiods = [0.0, 0.5, 1.0]\n"),
    "periods_min_max.toml": project(extra='[analysis]\nperiods = { min = "2 s", '
                                          'max = "1 s", count = 10 }\n'),
    "mass_1e400.toml": project(system=sys_with('mass = "100 t"', "mass = 1e400")),
    "damping_nan.toml": project(system=sys_with("damping = 0.05", "damping = nan")),
    "unknown_key.toml": project(system=sys_with("damping = 0.05", "dampnig = 0.05")),
    "unknown_section.toml": GOOD + "\n[sytems]\nid = \"s2\"\n",
    "empty.toml": "",
    "record_dt_negative.toml": project(records=one_record("records/r1.csv",
                                                          more="dt = \"-0.01 s\"\n")),
    "record_units_furlongs.toml": project(records=one_record(
        "records/r1.csv", more='units = "furlong/s2"\n')),
    "limit_in_kg.toml": project(system=sys_with('displacement = "50 mm"',
                                                'displacement = "50 kg"')),
    "drift_without_height.toml": project(system=sys_with(
        'height = "4 m"\n', "").replace('displacement = "50 mm"', "drift_ratio = 0.01")),
    "scale_zero.toml": project(records=one_record("records/r1.csv", more="scale = 0\n")),
    "bad_record_nan.toml": project(records=one_record("bad/nan_value.csv")),
    "bad_record_utf16.toml": project(records=one_record("bad/utf16_bom.csv")),
    "bad_record_truncated.toml": project(records=RECORDS_TWO + "\n" + one_record(
        "bad/truncated_headed.txt", record_id="r3")),
    # P-Δ off: 100 t at 5 s on a 4 m height could not carry its weight (θ = W/(k h) > 1)
    "short_record.toml": project(records=one_record("bad/short_record.csv", "short"),
                                 system=sys_with('period = "0.5 s"',
                                                 'period = "5 s"\np_delta = false')),
    # ids that reach file names (issue 15, part 2): a pair name climbing out of the site
    # (line 10), a system id with '..' (line 16), ids differing only in case (line 12),
    # a name Windows reserves (line 16), the figure-name separator '~' (line 8)
    "pair_escapes_site.toml": project(records=RECORDS_TWO.replace(
        'file = "records/r1.csv"\n', 'file = "records/r1.csv"\npair = "x/../../victim/evil"\n'
        'component = "H1"\n').replace('file = "records/r2.txt"\n',
                                       'file = "records/r2.txt"\npair = "x/../../victim/evil"\n'
                                       'component = "H2"\n')),
    "system_id_traversal.toml": project(system=sys_with('id = "s1"', 'id = "../s1"')),
    "record_ids_case_twins.toml": project(records=RECORDS_TWO.replace('"r2"', '"R1"')),
    "system_id_reserved.toml": project(system=sys_with('id = "s1"', 'id = "NUL"')),
    "record_id_separator.toml": project(records=RECORDS_TWO.replace('"r1"', '"a~b"')),
    # absurd inputs (issue 15, part 7): scale 1e300 (line 10), a spring network nested 40
    # levels (line 20), one nested 400 levels (beyond the TOML reader, line 20), a period
    # of 1e-6 s with a 0.01 s record, and a byte-order mark before a valid project
    "scale_1e300.toml": project(records=RECORDS_TWO.replace(
        'file = "records/r1.csv"\n', 'file = "records/r1.csv"\nscale = 1e300\n')),
    "network_40_deep.toml": project(system=springs(40)),
    "network_400_deep.toml": project(system=springs(400)),
    "period_too_short.toml": project(system=sys_with('period = "0.5 s"',
                                                     'period = "0.000001 s"')),
    "bom_project.toml": b"\xef\xbb\xbf" + GOOD.encode("utf-8"),
    "design_sds_1e200.toml": project(extra='[design_spectrum]\nkind = "asce7-16"\n'
                                           'sds = 1e200\nsd1 = 0.5\ntl = "8 s"\n'),
    "synthetic_1e9_s.toml": project(records="", extra='[design_spectrum]\n'
                                    'kind = "asce7-16"\nsds = 1.0\nsd1 = 0.5\ntl = "8 s"\n\n'
                                    '[synthetic_records]\ncount = 3\nduration = "1e9 s"\n'),
    "synthetic_count_1e8.toml": project(records="", extra='[design_spectrum]\n'
                                        'kind = "asce7-16"\nsds = 1.0\nsd1 = 0.5\n'
                                        'tl = "8 s"\n\n[synthetic_records]\n'
                                        'count = 100000000\n'),
    "periods_max_1e300.toml": project(extra='[analysis]\nperiods = { min = "0.1 s", '
                                            'max = "1e300 s", count = 20 }\n'),
    "periods_min_1e-300.toml": project(extra='[analysis]\nperiods = { min = "1e-300 s", '
                                             'max = "2 s", count = 20 }\n'),
    "suite_factor_1e300.toml": project(extra='[design_spectrum]\nkind = "asce7-16"\n'
                                             'sds = 1.0\nsd1 = 0.5\ntl = "8 s"\n\n'
                                             '[scaling]\nrule = "fit"\n'
                                             'suite_factor = 1e300\n'),
    # three problems at once: every one must be reported
    "several_problems.toml": project(records=RECORDS_TWO.replace('"r2"', '"r1"'),
                                     system=sys_with("damping = 0.05", "damping = 7")
                                     .replace('mass = "100 t"', 'mass = "5 furlongs"')),
}


def main() -> None:
    for folder, files in ((RECORDS, RECORD_FILES), (PROJECTS, PROJECT_FILES)):
        folder.mkdir(exist_ok=True)
        for name, content in files.items():
            data = content.encode("utf-8") if isinstance(content, str) else content
            (folder / name).write_bytes(data)
    print(f"wrote {len(RECORD_FILES)} record files and {len(PROJECT_FILES)} project files")


if __name__ == "__main__":
    main()
