"""Figure names in a built site: ids that used to collide each get their own figure.

The reproduction of issue 15 (part 2): systems ``a`` and ``a-b`` with records ``b-c``
and ``c`` mapped two responses to one file, so system ``a``'s page showed the other
system's response; a record named ``spectra`` replaced a system's spectra figure.
Expected values: counting (2 systems x 3 records response figures, one spectra figure
per system) and SHA-256 (standard library) to tell files apart; the two systems have
different periods, so their responses to one record differ (closed form: the SDOF
response depends on the period).
"""

from __future__ import annotations

import json
import re

import pytest

from sdofreport.build import build_site
from tests.conftest import PROJECT_HEAD, TWO_RECORDS, write_test_records

SYSTEM = """\
[[systems]]
id = "{id}"
name = "System {id}"
damping = 0.05
mass = "100 t"
period = "{period}"
"""

RECORDS = (TWO_RECORDS.replace('id = "r1"', 'id = "b-c"').replace('id = "r2"', 'id = "c"')
           + '\n[[records]]\nid = "spectra"\nfile = "records/r1.csv"\nscale = 0.5\n')


@pytest.fixture(scope="module")
def site(tmp_path_factory):
    folder = tmp_path_factory.mktemp("figure-names")
    write_test_records(folder)
    text = "\n".join([PROJECT_HEAD, RECORDS, SYSTEM.format(id="a", period="0.3 s"),
                      SYSTEM.format(id="a-b", period="1.5 s")])
    (folder / "sdofreport.toml").write_text(text, encoding="utf-8")
    return build_site(folder / "sdofreport.toml", folder / "site", jobs=1,
                      cache_dir=folder / "cache").output


def _figures(page: str) -> list[str]:
    return [src[len("../"):] for src in re.findall(r'<img src="([^"]+)"', page)]


def test_each_system_page_shows_its_own_figures(site):
    manifest = json.loads((site / "manifest.json").read_text("utf-8"))["files"]
    pages = {sid: _figures((site / "systems" / f"{sid}.html").read_text("utf-8"))
             for sid in ("a", "a-b")}
    # 3 response figures and 1 spectra figure per system (no hysteresis: linear).
    assert all(len(figures) == 4 for figures in pages.values()), pages
    every = pages["a"] + pages["a-b"]
    assert len(set(every)) == 8, every
    assert all(path in manifest for path in every)
    # Different systems, different responses: no two response figures are one file.
    digests = {manifest[path] for path in every}
    assert len(digests) == 8
