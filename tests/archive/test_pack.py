"""sdofreport pack: deterministic archives named after reference, revision, fingerprint.

Expectations come from the zip format itself, read back with the standard library's
zipfile (entry order, timestamps, permission bits, extra fields) and from the site's
own bytes, compared with hashlib.
"""

from __future__ import annotations

import hashlib
import json
import re
import zipfile
from pathlib import Path

from click.testing import CliRunner

from sdofreport.archive.pack import archive_name
from tests.archive.conftest import build, flip_byte, project_text


def _pack(group, *args):
    return CliRunner().invoke(group, ["pack", *map(str, args)])


def _site_files(site: Path) -> dict[str, bytes]:
    return {p.relative_to(site).as_posix(): p.read_bytes() for p in site.rglob("*")
            if p.is_file()}


def test_zip_entries_are_the_site_with_fixed_metadata(group, sites, tmp_path):
    result = _pack(group, sites["rev0"], "-o", tmp_path / "run.zip")
    assert result.exit_code == 0, result.output
    files = _site_files(sites["rev0"])
    with zipfile.ZipFile(tmp_path / "run.zip") as archive:
        infos = archive.infolist()
        names = [info.filename for info in infos]
        # Sorted entries, one per file of the site, no folder entries.
        assert names == sorted(files)
        for info in infos:
            # Fixed time (the zip epoch), permissions rw-r--r--, no extra fields.
            assert info.date_time == (1980, 1, 1, 0, 0, 0)
            assert info.external_attr >> 16 == 0o100644
            assert info.extra == b""
            assert info.compress_type == zipfile.ZIP_DEFLATED
            assert archive.read(info) == files[info.filename]
        assert archive.comment == b""


def test_builds_in_two_folders_at_two_times_pack_to_identical_bytes(group, tmp_path,
                                                                    monkeypatch):
    # [project] date is fixed, so SOURCE_DATE_EPOCH (different here) must not matter.
    zips = []
    for name, epoch in (("first", "1600000000"), ("second", "1800000000")):
        monkeypatch.setenv("SOURCE_DATE_EPOCH", epoch)
        site = build(tmp_path / name / "deeper", project_text("3"), tmp_path / name / "c")
        out = tmp_path / name / "out"
        out.mkdir()
        result = _pack(group, site, "-o", out)
        assert result.exit_code == 0, result.output
        zips.append(Path(result.output.strip()))
    assert zips[0].name == zips[1].name
    digests = {hashlib.sha256(path.read_bytes()).hexdigest() for path in zips}
    assert len(digests) == 1


def test_name_carries_reference_revision_and_fingerprint(group, sites, tmp_path):
    result = _pack(group, sites["rev1"], "-o", tmp_path)
    assert result.exit_code == 0, result.output
    manifest = json.loads((sites["rev1"] / "manifest.json").read_text("utf-8"))
    written = Path(result.output.strip())
    assert written.parent == tmp_path
    assert written.name == f"T-1_rev1_{manifest['fingerprint']}.zip"
    assert written.is_file()


def test_default_output_is_the_current_folder(group, sites, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    result = _pack(group, sites["rev0"])
    assert result.exit_code == 0, result.output
    assert Path(result.output.strip()).parent.resolve() == tmp_path.resolve()


def test_unsafe_characters_are_replaced():
    manifest = {"project": {"reference": "KBL/22 91:\\x", "revision": "A<1>"},
                "fingerprint": "0123456789abcdef"}
    name = archive_name(manifest)
    assert re.fullmatch(r"[A-Za-z0-9._-]+\.zip", name), name
    assert name.endswith("_0123456789abcdef.zip") and "KBL" in name


def test_pack_refuses_a_tampered_site(group, sites, copy_site, tmp_path):
    site = copy_site(sites["rev0"])
    flip_byte(site / "figures" / "suite-psa.svg")
    target = tmp_path / "never.zip"
    result = _pack(group, site, "-o", target)
    assert result.exit_code == 4
    assert "FAILED verification: 1 file changed" in result.output
    assert not target.exists()
    assert not any(p.name.startswith(".never.zip") for p in tmp_path.iterdir())


def test_pack_refuses_to_replace_a_file_that_is_not_a_zip(group, sites, tmp_path):
    target = tmp_path / "precious.zip"
    target.write_text("not an archive", "utf-8")
    result = _pack(group, sites["rev0"], "-o", target)
    assert result.exit_code == 2
    assert "is not a zip archive; refusing to replace it" in result.output
    assert target.read_text("utf-8") == "not an archive"


def test_zip_with_escaping_member_is_refused(group, tmp_path):
    path = tmp_path / "escape.zip"
    with zipfile.ZipFile(path, "w") as archive:
        archive.writestr("../manifest.json", "{}")
    result = CliRunner().invoke(group, ["verify", str(path)])
    assert result.exit_code == 4  # a name pack never writes: tampered
    assert "points outside the archive" in result.output
