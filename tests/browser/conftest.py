"""Fixtures for the real-browser tests: a headless Chromium, a local server, built sites.

Everything stays on this machine: sites are served by ``http.server`` on 127.0.0.1 at a
free port, and Chromium runs with background networking, updates and sync turned off
(``sdofreport.site.pdf.BROWSER_FLAGS``). Tests skip, with the reason, when Chromium,
chromedriver or selenium is missing.

Sources of expected values: none here (fixtures only).
"""

from __future__ import annotations

import functools
import http.server
import os
import threading
from contextlib import contextmanager
from pathlib import Path

import pytest
from click.testing import CliRunner

from sdofreport.cli import cli
from sdofreport.errors import BuildError
from tests.conftest import EXAMPLE


def require_browser() -> None:
    """Skip the calling test when selenium, Chromium or chromedriver is missing."""
    pytest.importorskip("selenium", reason="selenium is not installed "
                        "(pip install -e '.[test]')")
    from sdofreport.site.pdf import find_browser

    try:
        find_browser()
    except BuildError as exc:
        pytest.skip(f"no headless browser: {exc.message}")


def build_project(project_file: Path, output: Path, cache_dir: Path) -> Path:
    """Build a site through the CLI, as a user would; fail with its output otherwise."""
    result = CliRunner().invoke(cli, ["build", str(project_file), "-o", str(output),
                                      "--quiet", "--cache-dir", str(cache_dir)])
    assert result.exit_code == 0, result.output
    return output


@pytest.fixture(scope="session")
def example_site(request) -> Path:
    """The bundled example, the session's one shared build (read-only)."""
    require_browser()  # before the build, so a machine without a browser skips at once
    return request.getfixturevalue("built_example").site


@pytest.fixture(scope="session")
def example_build(request, example_site):
    """The shared example build's folder (``output``) and its results (``results``, read
    back through the build's own result cache), the page data the packet is printed from."""
    from types import SimpleNamespace

    from sdofreport.engine import run_project
    from sdofreport.project import load_project

    built = request.getfixturevalue("built_example")
    results = run_project(load_project(EXAMPLE / "sdofreport.toml"), cache_dir=built.cache)
    return SimpleNamespace(output=example_site, results=results)


@pytest.fixture(scope="session")
def browser():
    """One headless Chromium for the session, recording its console."""
    require_browser()
    from sdofreport.site.pdf import headless_chrome

    with headless_chrome(browser_log=True) as driver:
        driver.set_page_load_timeout(60)
        yield driver


class _Handler(http.server.SimpleHTTPRequestHandler):
    """Serves one folder; records (path, status) of every response; logs nothing.

    Chromium asks every server for /favicon.ico on its own; the site has none and no
    page links one, so that request gets "204 No Content" rather than a 404.
    """

    def do_GET(self):  # noqa: N802 (base-class name)
        if self.path == "/favicon.ico":
            self.send_response(204)
            self.end_headers()
            return
        super().do_GET()

    def log_request(self, code="-", size="-"):
        self.server.responses.append((self.path, int(code)))

    def log_message(self, format, *args):  # noqa: A002 (base-class signature)
        pass


@contextmanager
def serve(folder: Path):
    """Serve ``folder`` on 127.0.0.1 at a free port; yield (base URL, responses)."""
    handler = functools.partial(_Handler, directory=str(folder))
    server = http.server.ThreadingHTTPServer(("127.0.0.1", 0), handler)
    server.responses = []
    thread = threading.Thread(target=server.serve_forever, daemon=True)
    thread.start()
    try:
        yield f"http://127.0.0.1:{server.server_address[1]}/", server.responses
    finally:
        server.shutdown()
        server.server_close()
        thread.join(timeout=10)


@pytest.fixture
def artifacts(tmp_path) -> Path:
    """Folder for screenshots and PDFs: $SDOFREPORT_ARTIFACTS, else tmp_path/artifacts."""
    folder = Path(os.environ.get("SDOFREPORT_ARTIFACTS") or tmp_path / "artifacts")
    folder.mkdir(parents=True, exist_ok=True)
    return folder


def pytest_collection_modifyitems(config, items):
    """Every test in this folder carries the ``browser`` marker (``-m "not browser"``)."""
    here = Path(__file__).parent
    for item in items:
        if here in Path(str(item.fspath)).parents:
            item.add_marker(pytest.mark.browser)
