"""Hostile archives given to verify, pack and register: exit 4 or 2 with a message.

Every archive is crafted with Python's zipfile and, where zipfile would not write the
flaw, patched at byte level following the zip format's published layout (PKWARE
APPNOTE.TXT 6.3: local file header 4.3.7, central directory header 4.3.12, general
purpose flags 4.4.4, compression methods 4.4.5, external attributes 4.4.15 with the
Unix mode in the high 16 bits as in POSIX <sys/stat.h>). Expected: a name, link or
header that ``sdofreport pack`` never writes is tampered (exit 4); what cannot be read
(encryption, other methods, corrupt streams, sizes beyond the bounds) is exit 2. Never
a traceback.
"""

from __future__ import annotations

import io
import json
import shutil
import struct
import tracemalloc
import warnings
import zipfile
from pathlib import Path

import pytest
from click.testing import CliRunner

from sdofreport.archive import _sitefiles, _zipfiles
from sdofreport.archive._sitefiles import read_run
from sdofreport.archive.pack import zip_bytes

CENTRAL = struct.Struct("<4s4B4HL2L5H2L")   # APPNOTE 4.3.12, 46 bytes
LOCAL = struct.Struct("<4s2B4HL2L2H")       # APPNOTE 4.3.7, 30 bytes


@pytest.fixture(scope="module")
def good(sites) -> dict[str, bytes]:
    """The files of a clean built site (revision 0)."""
    return read_run(sites["rev0"]).files


def _zip(members: list[tuple[str | zipfile.ZipInfo, bytes]],
         method: int = zipfile.ZIP_DEFLATED) -> bytes:
    buffer = io.BytesIO()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # zipfile warns on a duplicate name; we want one
        with zipfile.ZipFile(buffer, "w", compression=method) as archive:
            for name, data in members:
                archive.writestr(name, data)
    return buffer.getvalue()


def _patch(data: bytes, name: str, *, local: dict | None = None,
           central: dict | None = None) -> bytes:
    """Set fields of the named member's local and/or central header (by field index of
    LOCAL / CENTRAL: 3 flags, 4 method, 7 CRC, 8 compressed size, 9 size)."""
    out = bytearray(data)
    with zipfile.ZipFile(io.BytesIO(data)) as archive:
        info = archive.getinfo(name)
        start = archive.start_dir
    if local:
        fields = list(LOCAL.unpack_from(out, info.header_offset))
        for index, value in local.items():
            fields[index] = value
        LOCAL.pack_into(out, info.header_offset, *fields)
    if central:
        offset = start
        while out[offset:offset + 4] == b"PK\x01\x02":
            fields = list(CENTRAL.unpack_from(out, offset))
            length, extra, comment = fields[12], fields[13], fields[14]
            found = out[offset + 46:offset + 46 + length].decode("cp437") == name
            if found:
                for index, value in central.items():
                    fields[index + 2] = value  # the central header has 2 more bytes first
                CENTRAL.pack_into(out, offset, *fields)
            offset += 46 + length + extra + comment
    return bytes(out)


def _run(group, *args):
    result = CliRunner().invoke(group, [*map(str, args)])
    assert "Traceback" not in result.output
    assert result.exception is None or isinstance(result.exception, SystemExit), \
        repr(result.exception)
    return result


def _write(tmp_path: Path, data: bytes, name: str = "hostile.zip") -> Path:
    path = tmp_path / name
    path.write_bytes(data)
    return path


def _members(good: dict[str, bytes]) -> list[tuple[str, bytes]]:
    return sorted(good.items())


class _Unseekable:
    """A write-only stream: zipfile then writes data descriptors (APPNOTE 4.3.9)."""

    def __init__(self, stream):
        self.stream = stream

    def write(self, data):
        return self.stream.write(data)

    def flush(self):
        self.stream.flush()


def test_archives_of_the_site_from_other_writers_still_verify(group, sites, tmp_path):
    # No false alarms: folder entries and a top folder (shutil.make_archive) and data
    # descriptors after each member (zipfile writing to a stream it cannot seek).
    made = shutil.make_archive(str(tmp_path / "shutil"), "zip", sites["rev0"].parent, "site")
    streamed = tmp_path / "streamed.zip"
    with open(streamed, "wb") as raw, \
            zipfile.ZipFile(_Unseekable(raw), "w", zipfile.ZIP_DEFLATED) as archive:
        for path in sorted(sites["rev0"].rglob("*")):
            if path.is_file():
                archive.write(path, path.relative_to(sites["rev0"]).as_posix())
    for path in (made, streamed):
        result = _run(group, "verify", path)
        assert result.exit_code == 0, result.output


# -- names: duplicates, escaping, links ----------------------------------------------------

@pytest.mark.parametrize("second", ["index.html", "INDEX.html", "./index.html",
                                    ".//index.html"])
def test_duplicate_member_is_tampered(group, good, tmp_path, second):
    # unzip extracts the first copy: put a tampered page there, the genuine one later.
    tampered = good["index.html"].replace(b"within limit", b"exceeds limit", 1)
    members = [(second, tampered)] + _members(good)
    result = _run(group, "verify", _write(tmp_path, _zip(members)))
    assert result.exit_code == 4, result.output
    assert "twice" in result.output


def test_duplicate_through_a_backslash_is_tampered(group, good, tmp_path):
    members = _members(good) + [("data\\results.json", b"{}")]
    result = _run(group, "verify", _write(tmp_path, _zip(members)))
    assert result.exit_code == 4
    assert "twice" in result.output


@pytest.mark.parametrize("name", ["../manifest.json", "/etc/sdofreport-test", "C:/x.html",
                                  "a/../../x.html", "..\\x.html", "ok\x1b[2Jname.html"])
def test_escaping_or_control_names_are_tampered(group, good, tmp_path, name):
    result = _run(group, "verify", _write(tmp_path, _zip(_members(good) + [(name, b"x")])))
    assert result.exit_code == 4, result.output
    assert ("points outside the archive" in result.output
            or "control characters" in result.output)
    assert "\x1b" not in result.output  # the hostile name is shown escaped


@pytest.mark.parametrize("mode, expected", [
    (0o120777, "is a link"),                 # S_IFLNK
    (0o010644, "is a special file"),         # S_IFIFO
    (0o020644, "is a special file"),         # S_IFCHR
])
def test_links_and_special_files_are_tampered(group, good, tmp_path, mode, expected):
    info = zipfile.ZipInfo("figures/extra.svg")
    info.create_system = 3
    info.external_attr = mode << 16
    result = _run(group, "verify",
                  _write(tmp_path, _zip(_members(good) + [(info, b"../../etc/passwd")])))
    assert result.exit_code == 4
    assert expected in result.output


def test_file_that_is_also_a_folder_is_tampered(group, good, tmp_path):
    result = _run(group, "verify", _write(tmp_path, _zip(_members(good) + [("data", b"x")])))
    assert result.exit_code == 4
    assert "both a file and a folder" in result.output


@pytest.mark.parametrize("local, expected", [
    ({3: 0, 4: 0}, "compression method 0 in the local header"),   # stored vs deflated
    ({7: 0}, "CRC-32 or sizes"),
])
def test_local_header_disagreeing_with_the_directory_is_tampered(group, good, tmp_path,
                                                                 local, expected):
    data = _patch(_zip(_members(good)), "index.html", local=local)
    result = _run(group, "verify", _write(tmp_path, data))
    assert result.exit_code == 4, result.output
    assert expected in result.output


def test_local_header_with_another_name_is_tampered(group, good, tmp_path):
    data = bytearray(_zip(_members(good)))
    with zipfile.ZipFile(io.BytesIO(bytes(data))) as archive:
        offset = archive.getinfo("suite.html").header_offset
    assert data[offset + 30:offset + 40] == b"suite.html"
    data[offset + 30:offset + 40] = b"suitf.html"
    result = _run(group, "verify", _write(tmp_path, bytes(data)))
    assert result.exit_code == 4
    assert "suite.html" in result.output


def _drop_from_directory(data: bytes, name: str) -> bytes:
    """The archive with the first central directory entry of ``name`` removed (its local
    entry and data stay in place) and the end record (APPNOTE 4.3.16) updated to match."""
    with zipfile.ZipFile(io.BytesIO(data)) as archive:
        start = archive.start_dir
    entries, offset, dropped = [], start, False
    while data[offset:offset + 4] == b"PK\x01\x02":
        fields = CENTRAL.unpack_from(data, offset)
        end = offset + 46 + fields[12] + fields[13] + fields[14]
        if dropped or data[offset + 46:offset + 46 + fields[12]].decode("cp437") != name:
            entries.append(data[offset:end])
        else:
            dropped = True
        offset = end
    directory = b"".join(entries)
    record = struct.pack("<4s4H2LH", b"PK\x05\x06", 0, 0, len(entries), len(entries),
                         len(directory), start, 0)
    return data[:start] + directory + record


def test_local_entry_hidden_from_the_directory_is_tampered(group, good, tmp_path):
    # A tool that reads local headers in order would extract the hidden page first.
    hidden = good["index.html"].replace(b"within limit", b"exceeds limit", 1)
    data = _drop_from_directory(_zip([("index.html", hidden)] + _members(good)),
                                "index.html")
    with zipfile.ZipFile(io.BytesIO(data)) as archive:  # zipfile itself sees one copy
        assert archive.namelist().count("index.html") == 1
    result = _run(group, "verify", _write(tmp_path, data))
    assert result.exit_code == 4, result.output
    assert "that no directory entry covers" in result.output


def test_prefix_before_the_first_member_is_tampered(group, good, tmp_path):
    fake = _zip([("index.html", b"<p>Approved.</p>")])
    prefix = fake[:fake.index(b"PK\x01\x02")]  # a whole local entry, no directory
    result = _run(group, "verify", _write(tmp_path, prefix + _zip(_members(good))))
    assert result.exit_code == 4, result.output
    assert "before the first member" in result.output


# -- what cannot be read: encryption, methods, corrupt streams, sizes ----------------------

def test_encrypted_member_is_unreadable(group, good, tmp_path):
    data = _patch(_zip(_members(good)), "index.html", local={3: 1}, central={3: 1})
    result = _run(group, "verify", _write(tmp_path, data))
    assert result.exit_code == 2
    assert "'index.html' is encrypted" in result.output


@pytest.mark.parametrize("method", [12, 14, 99])  # bzip2, LZMA, AES (APPNOTE 4.4.5)
def test_unsupported_compression_is_unreadable(group, good, tmp_path, method):
    data = _patch(_zip(_members(good)), "index.html", local={4: method},
                  central={4: method})
    result = _run(group, "verify", _write(tmp_path, data))
    assert result.exit_code == 2
    assert f"uses compression method {method}" in result.output


@pytest.mark.parametrize("member", ["index.html", "data/results.json"])
def test_corrupt_deflate_stream_is_unreadable(group, good, tmp_path, member):
    data = bytearray(_zip(_members(good)))
    with zipfile.ZipFile(io.BytesIO(bytes(data))) as archive:
        info = archive.getinfo(member)
    start = info.header_offset + 30 + len(member)
    for offset in range(start + 10, start + info.compress_size - 10, 7):
        data[offset] ^= 0x55
    result = _run(group, "verify", _write(tmp_path, bytes(data)))
    assert result.exit_code == 2, result.output
    assert f"archive member '{member}' cannot be read" in result.output


def test_zip_bomb_is_refused_before_it_is_unpacked(group, good, tmp_path):
    # 64 MiB of zeros deflate to about 64 KiB: a ratio near zlib's 1032:1 ceiling.
    bomb = _zip(_members(good) + [("data/filler.bin", bytes(64 * 2**20))])
    tracemalloc.start()
    result = _run(group, "verify", _write(tmp_path, bomb))
    peak = tracemalloc.get_traced_memory()[1]
    tracemalloc.stop()
    assert result.exit_code == 2
    assert "a ratio above 200:1" in result.output
    assert peak < 32 * 2**20  # far below the 64 MiB the member would take


def test_member_larger_than_declared_is_cut_at_its_size(group, good, tmp_path):
    # The directory says 1000 bytes; the stream inflates to 8 MiB: reading stops at the
    # declared size, where the CRC-32 does not match (corrupt, not a memory blow-up).
    members = _members(good) + [("data/filler.bin", bytes(8 * 2**20))]
    data = _patch(_zip(members), "data/filler.bin", local={9: 1000}, central={9: 1000})
    tracemalloc.start()
    result = _run(group, "verify", _write(tmp_path, data))
    peak = tracemalloc.get_traced_memory()[1]
    tracemalloc.stop()
    assert result.exit_code == 2, result.output
    assert "cannot be read" in result.output
    assert peak < 16 * 2**20


def test_declared_sizes_beyond_the_bounds_are_unreadable(group, good, tmp_path,
                                                         monkeypatch):
    size = 2**31  # 2 GiB declared in the central directory (and the local header)
    data = _patch(_zip(_members(good)), "index.html", local={9: size}, central={9: size})
    result = _run(group, "verify", _write(tmp_path, data))
    assert result.exit_code == 2
    assert f"'index.html' would take {size} bytes" in result.output
    monkeypatch.setattr(_zipfiles, "MAX_TOTAL_BYTES", 1000)
    result = _run(group, "verify", _write(tmp_path, _zip(_members(good)), "small.zip"))
    assert result.exit_code == 2
    assert "more than the 1000 bytes allowed" in result.output


def test_too_many_members_is_unreadable(group, good, tmp_path, monkeypatch):
    monkeypatch.setattr(_zipfiles, "MAX_MEMBERS", 5)
    result = _run(group, "verify", _write(tmp_path, _zip(_members(good))))
    assert result.exit_code == 2
    assert "more than the 5 allowed" in result.output


@pytest.mark.parametrize("member", ["manifest.json", "data/results.json"])
@pytest.mark.parametrize("depth", [200, 100_000])  # within json's recursion limit, beyond
def test_json_nested_too_deep_is_unreadable(group, good, tmp_path, member, depth):
    members = dict(good)
    members[member] = b"[" * depth + b"]" * depth
    arguments = ["verify", _write(tmp_path, _zip(sorted(members.items())))]
    if member != "manifest.json":
        arguments.append("--rerun")  # results.json is read by the re-run and the register
    result = _run(group, *arguments)
    assert result.exit_code in (2, 4), result.output
    assert "nests arrays or objects more than 64 deep" in result.output


# -- pack and register -----------------------------------------------------------------------

@pytest.mark.parametrize("make, status", [
    (lambda g: _zip(_members(g) + [("index.html", b"<p>other</p>")]), 4),
    (lambda g: _patch(_zip(_members(g)), "suite.html", local={4: 14}, central={4: 14}), 2),
])
def test_pack_refuses_a_hostile_archive_and_writes_nothing(group, good, tmp_path, make,
                                                           status):
    source = _write(tmp_path, make(good))
    target = tmp_path / "out" / "packed.zip"
    result = _run(group, "pack", source, "-o", target)
    assert result.exit_code == status, result.output
    assert not target.exists()


def test_register_lists_good_runs_beside_a_bad_one(group, sites, good, tmp_path):
    folder = tmp_path / "ci"
    folder.mkdir()
    (folder / "a-good.zip").write_bytes(zip_bytes(good))
    (folder / "b-bad.zip").write_bytes(
        _zip(_members(good) + [("data/results.json", b'{"tampered": true}')]))
    (folder / "c-good.zip").write_bytes(zip_bytes(read_run(sites["rev2"]).files))
    (folder / "d-bomb.zip").write_bytes(
        _zip(_members(good) + [("data/filler.bin", bytes(8 * 2**20))]))
    deep = {**good, "manifest.json": b"[" * 100_000 + b"]" * 100_000}
    (folder / "e-deep.zip").write_bytes(zip_bytes(deep))
    output = tmp_path / "register"
    result = _run(group, "register", folder, "-o", output)
    assert result.exit_code == 4, result.output
    rows = {row["source"]: row for row in
            json.loads((output / "register.json").read_text("utf-8"))["runs"]}
    assert sorted(rows) == ["a-good.zip", "b-bad.zip", "c-good.zip", "d-bomb.zip",
                            "e-deep.zip"]
    assert rows["a-good.zip"]["verified"] and rows["c-good.zip"]["verified"]
    assert not rows["b-bad.zip"]["verified"] and "twice" in rows["b-bad.zip"]["verification"]
    assert "ratio above" in rows["d-bomb.zip"]["verification"]
    assert "more than 64 deep" in rows["e-deep.zip"]["verification"]
    assert rows["a-good.zip"]["link"] and rows["b-bad.zip"]["link"] is None
    assert not any("filler" in str(p) for p in output.rglob("*"))


# -- the same bounds for site folders and results files --------------------------------------

def test_oversized_file_in_a_folder_or_given_to_compare_is_unreadable(group, sites,
                                                                      monkeypatch):
    limit = 1000  # lowered so that ordinary files exceed it, as a hostile one would
    monkeypatch.setattr(_sitefiles, "MAX_FILE_BYTES", limit)
    result = _run(group, "verify", sites["rev0"])
    assert result.exit_code == 2
    assert f"more than the {limit} bytes allowed" in result.output
    results = sites["rev0"] / "data" / "results.json"
    result = _run(group, "compare", results, results)
    assert result.exit_code == 2
    assert f"more than the {limit} bytes allowed" in result.output
