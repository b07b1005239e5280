"""``sdofreport build --pdf [FILE]``: the site, then its review packet, from the CLI.

Sources of expected values: page counts and text read back with an independent reference
library (pypdf); option behaviour is our own interface.
"""

from __future__ import annotations

import pytest
from click.testing import CliRunner

from sdofreport.cli import build_command, cli
from sdofreport.site.pdf import pdf_page_count
from tests.browser.conftest import require_browser

pytestmark = pytest.mark.skipif(
    "pdf_file" not in {param.name for param in build_command.params},
    reason="sdofreport build has no --pdf option yet")


def test_build_with_pdf_writes_the_packet_beside_the_site(project_factory, tmp_path,
                                                         valid_project_text):
    require_browser()
    project = project_factory(valid_project_text)
    site = tmp_path / "_site"
    result = CliRunner().invoke(cli, ["build", str(project), "-o", str(site), "--pdf",
                                      "--quiet", "--cache-dir", str(tmp_path / "cache")])
    assert result.exit_code == 0, result.output
    packet = tmp_path / "_site-review-packet.pdf"
    # Summary, suite, two records and one system: at least five pages.
    assert pdf_page_count(packet.read_bytes()) >= 5
    assert (site / "manifest.json").is_file() and not (site / packet.name).exists()


def test_pdf_given_the_project_file_is_refused_before_building(project_factory, tmp_path,
                                                               valid_project_text):
    project = project_factory(valid_project_text)
    result = CliRunner().invoke(cli, ["build", "--pdf", str(project), "-o",
                                      str(tmp_path / "_site")])
    assert result.exit_code == 2
    assert "--pdf: expected a file name ending in .pdf" in result.output
    assert not (tmp_path / "_site").exists()
