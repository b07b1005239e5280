"""The review-packet PDF: printed by headless Chromium from the built example site."""

from __future__ import annotations

import os
import sys

import pytest

from sdofreport.errors import BuildError
from sdofreport.site.context import CAUTION_SHORT
from sdofreport.site.pdf import packet_html, packet_pages, write_pdf
from tests.browser.conftest import build_project


def _words(text: str) -> str:
    return " ".join(text.split())


@pytest.fixture(scope="module")
def packet(example_site, tmp_path_factory):
    """The example's PDF, printed once with SOURCE_DATE_EPOCH unset."""
    pypdf = pytest.importorskip("pypdf", reason="pypdf is not installed "
                                "(pip install 'sdofreport[test]')")
    output = tmp_path_factory.mktemp("pdf") / "packet.pdf"
    saved = os.environ.pop("SOURCE_DATE_EPOCH", None)
    try:
        count = write_pdf(example_site, output)
    finally:
        if saved is not None:
            os.environ["SOURCE_DATE_EPOCH"] = saved
    return count, output, pypdf.PdfReader(str(output))


def test_pdf_has_every_page_the_title_the_systems_and_the_caution(example_site, packet,
                                                                   artifacts):
    count, output, reader = packet
    site_pages = packet_pages(example_site)
    assert count == len(reader.pages)
    assert count >= len(site_pages)
    texts = [_words(page.extract_text()) for page in reader.pages]
    everything = " ".join(texts)
    manifest = (example_site / "manifest.json").read_text("utf-8")
    title = "Harbourview Cold Store - seismic response checks"
    assert title in manifest  # the example's own title, as stated in its project file
    assert title in everything
    for system in ("frame", "skid", "tank", "platform", "pier"):
        assert f"{system} —" in everything or f"{system} -" in everything, system
        assert f"Site page systems/{system}.html" in everything, system
    missing = [number for number, text in enumerate(texts, start=1)
               if _words(CAUTION_SHORT) not in text
               or f"Page {number} of {count}" not in text
               or "KBL-2291 · revision A" not in text]
    assert not missing, f"pages without header, caution or page number: {missing}"
    # The project's [project] date stands in for the print time (no SOURCE_DATE_EPOCH).
    assert reader.metadata["/CreationDate"].startswith("D:20261130000000")
    copy = artifacts / "review-packet.pdf"
    copy.write_bytes(output.read_bytes())
    print(f"review packet: {copy} ({count} pages)")


def test_pdf_packet_order_is_summary_suite_records_systems(example_site):
    pages = packet_pages(example_site)
    assert pages[:2] == ["index.html", "suite.html"]
    kinds = [page.split("/")[0] for page in pages[2:]]
    assert kinds == sorted(kinds, key=["records", "systems"].index)
    assert [p for p in pages if p.startswith("systems/")] == [
        f"systems/{name}.html" for name in ("frame", "skid", "tank", "platform", "pier")]


def test_packet_links_stay_inside_the_document(example_site):
    document = packet_html(example_site)
    assert 'href="../' not in document and 'src="../' not in document
    assert 'loading="lazy"' not in document
    assert 'href="#packet-015"' in document  # systems/frame.html, the 15th page
    assert "<script" not in document.lower()


def test_same_site_prints_the_same_bytes(example_site, packet, tmp_path, monkeypatch):
    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1700000000")
    first, second = tmp_path / "a.pdf", tmp_path / "b.pdf"
    write_pdf(example_site, first)
    write_pdf(example_site, second)
    assert first.read_bytes() == second.read_bytes()
    # 1700000000 s after 1970-01-01 UTC is 2023-11-14 22:13:20 UTC.
    assert b"/CreationDate (D:20231114221320+00'00')" in first.read_bytes()


def test_missing_chromium_is_a_build_error_with_install_hint(tmp_path):
    with pytest.raises(BuildError, match=r"apt-get install chromium chromium-driver.*"
                       r"pip install 'sdofreport\[pdf\]'") as caught:
        write_pdf(tmp_path, tmp_path / "x.pdf", chromium=tmp_path / "no-chromium",
                  chromedriver=tmp_path / "no-driver")
    assert "is not an executable file" in caught.value.message


def test_missing_selenium_is_a_build_error_with_install_hint(tmp_path, monkeypatch):
    fake = tmp_path / "chromium"
    fake.write_text("#!/bin/sh\nexit 1\n")
    fake.chmod(0o755)
    monkeypatch.setitem(sys.modules, "selenium", None)  # import selenium → ImportError
    with pytest.raises(BuildError, match=r"selenium is not installed.*pip install "
                       r"'sdofreport\[pdf\]'"):
        write_pdf(tmp_path, tmp_path / "x.pdf", chromium=fake, chromedriver=fake)
    assert not (tmp_path / "x.pdf").exists()


def test_a_folder_that_is_not_a_site_is_refused(tmp_path):
    (tmp_path / "index.html").write_text("<main></main>")
    with pytest.raises(BuildError, match=r"is not a site built by sdofreport"):
        packet_html(tmp_path)


def test_pdf_of_a_small_project_has_its_system(project_factory, tmp_path, valid_project_text):
    pypdf = pytest.importorskip("pypdf")
    from tests.browser.conftest import require_browser

    require_browser()
    site = build_project(project_factory(valid_project_text), tmp_path / "site",
                         tmp_path / "cache")
    count = write_pdf(site, tmp_path / "out" / "small.pdf")
    reader = pypdf.PdfReader(str(tmp_path / "out" / "small.pdf"))
    assert count == len(reader.pages) >= len(packet_pages(site))
    text = _words(" ".join(page.extract_text() for page in reader.pages))
    assert "s1 — System one" in text and "Test project" in text
