"""The built site in a real browser: links, figures, console, cautions and injected markup.

The example is served on 127.0.0.1 and opened in headless Chromium. Every page must load,
every internal link must reach a file that exists (and its #fragment an element), every
figure must decode, the console must stay free of errors, and the caution must be shown.
A second, small project carries script payloads in its title, people, system name and
notes; none of them may run on any page, before or after any link is clicked.
"""

from __future__ import annotations

import base64
import urllib.request
from pathlib import Path
from urllib.parse import urldefrag, urlsplit

import pytest

from sdofreport.site.context import CAUTION_SHORT
from tests.browser.conftest import build_project, require_browser, serve
from tests.conftest import ONE_SYSTEM, PROJECT_HEAD, TWO_RECORDS
from tests.site.hostile_notes import HOSTILE_LINKS

PAYLOAD_SCRIPT = "<script>window.__pwned=1</script>"
PAYLOAD_IMG = '<img src=x onerror="window.__pwned=2">'
PAYLOAD_MD_LINK = "[click](javascript:window.__pwned=3)"
PAYLOAD_A = '<a href="javascript:window.__pwned=4">x</a>'
PAYLOADS = (PAYLOAD_SCRIPT, PAYLOAD_IMG, PAYLOAD_MD_LINK, PAYLOAD_A)

_PWNED = "return typeof window.__pwned === 'undefined' ? null : String(window.__pwned);"
_LINKS = ("return Array.from(document.querySelectorAll('a')).map(a => "
          "[a.getAttribute('href'), a.href]);")


def _pages(site: Path) -> list[str]:
    return sorted(p.relative_to(site).as_posix() for p in site.rglob("*.html")
                  if not p.relative_to(site).as_posix().startswith("inputs/"))


def _external(url: str, base: str) -> bool:
    """Links that leave the local server (other hosts, mail); never followed."""
    parts = urlsplit(url)
    return parts.scheme == "mailto" or (parts.scheme in ("http", "https")
                                        and parts.netloc != urlsplit(base).netloc)


def _open(driver, url: str) -> dict:
    """Load ``url``; load every figure (lazy ones too); report what the page holds."""
    from selenium.webdriver.support.ui import WebDriverWait

    driver.get(url)
    driver.execute_script(
        "document.querySelectorAll('img[loading=lazy]').forEach(i => i.loading = 'eager');")
    WebDriverWait(driver, 60).until(lambda d: d.execute_script(
        "return document.readyState === 'complete' && "
        "Array.from(document.images).every(i => i.complete);"))
    return driver.execute_script("""
        const caution = document.querySelector('aside.caution');
        return {
          title: document.title,
          images: document.images.length,
          broken: Array.from(document.images).filter(i => i.naturalWidth === 0)
                       .map(i => i.getAttribute('src')),
          ids: Array.from(document.querySelectorAll('[id]')).map(e => e.id),
          caution: caution && caution.offsetParent !== null ? caution.innerText : '',
          text: document.body ? document.body.innerText : '',
        };""")


def _severe(driver) -> list[str]:
    return [entry["message"] for entry in driver.get_log("browser")
            if entry["level"] == "SEVERE"]


def _caution_shown(info: dict) -> bool:
    return " ".join(CAUTION_SHORT.split()) in " ".join(info["caution"].split())


def test_every_page_link_figure_and_console(example_site, browser):
    problems: list[str] = []
    with serve(example_site) as (base, responses):
        browser.get_log("browser")  # start with an empty console
        opened: dict[str, dict] = {}
        pages = _pages(example_site)
        targets: dict[str, set[str]] = {}  # internal URL → pages linking it
        fragments: list[tuple[str, str, str]] = []
        for page in pages:
            url = base + page
            info = opened[url] = _open(browser, url)
            problems += [f"{page}: figure {src} did not load" for src in info["broken"]]
            problems += [f"{page}: console: {m}" for m in _severe(browser)]
            if not _caution_shown(info):
                problems.append(f"{page}: the caution is not shown")
            for raw, absolute in browser.execute_script(_LINKS):
                if raw is None or _external(absolute, base):
                    continue
                if urlsplit(absolute).scheme not in ("http", "https"):
                    problems.append(f"{page}: link {raw!r} is neither a page nor external")
                    continue
                target, fragment = urldefrag(absolute)
                targets.setdefault(target, set()).add(page)
                if fragment:
                    fragments.append((page, target, fragment))
        for target, sources in sorted(targets.items()):
            if target.endswith(".html") or target.endswith("/"):
                if target not in opened:
                    opened[target] = _open(browser, target)
                    problems += [f"{target}: console: {m}" for m in _severe(browser)]
                if opened[target]["title"].startswith("Error response"):
                    problems.append(f"{target} (linked from {sorted(sources)}) is missing")
            else:  # a data file: fetched from the same local server, not displayed
                try:
                    with urllib.request.urlopen(target, timeout=30) as reply:
                        reply.read()
                except OSError as exc:
                    problems.append(f"{target} (linked from {sorted(sources)}): {exc}")
        for page, target, fragment in fragments:
            if target in opened and fragment not in opened[target]["ids"]:
                problems.append(f"{page}: link to {target}#{fragment}: no such element")
        failed = sorted({(path, status) for path, status in responses if status >= 400})
    assert not failed, f"the server answered with errors: {failed}"
    assert not problems, "\n".join(problems)
    # The crawl did reach the whole example: every page, its links and its figures.
    assert set(pages) <= {urlsplit(url).path.lstrip("/") for url in opened}
    assert len(targets) >= len(pages)
    assert sum(info["images"] for info in opened.values()) >= len(pages)


def _screenshot(driver, url: str, path: Path) -> Path:
    """A full-page PNG of ``url`` (every figure loaded first)."""
    _open(driver, url)
    width, height = driver.execute_script(
        "return [document.documentElement.scrollWidth, document.documentElement.scrollHeight];")
    shot = driver.execute_cdp_cmd("Page.captureScreenshot", {
        "format": "png", "captureBeyondViewport": True,
        "clip": {"x": 0, "y": 0, "width": width, "height": height, "scale": 1}})
    path.write_bytes(base64.b64decode(shot["data"]))
    return path


def test_screenshots_of_summary_and_a_system(example_site, browser, artifacts):
    with serve(example_site) as (base, _):
        browser.get(base + "index.html")
        system = browser.execute_script(
            "const a = document.querySelector(\"nav.pages a[href^='systems/']\");"
            "return a ? a.getAttribute('href') : null;")
        assert system, "the summary page links no system page"
        shots = [_screenshot(browser, base + "index.html", artifacts / "summary.png"),
                 _screenshot(browser, base + system,
                             artifacts / f"system-{Path(system).stem}.png")]
    for shot in shots:
        print(f"screenshot: {shot}")
        data = shot.read_bytes()
        assert data[:8] == b"\x89PNG\r\n\x1a\n"
        # A page of text and figures, not a blank frame: far more than a few kB.
        assert len(data) > 20_000, shot


def _payload_project(project_factory, folder: Path) -> Path:
    both = f"{PAYLOAD_SCRIPT} {PAYLOAD_IMG}"
    head = PROJECT_HEAD.replace('title = "Test project"', f"title = '{both}'")
    head = head.replace('prepared_by = "tester"',
                        f"prepared_by = '{PAYLOAD_IMG} {PAYLOAD_A}'")
    head += f"checked_by = '{PAYLOAD_SCRIPT} {PAYLOAD_MD_LINK}'\nnotes = \"notes.md\"\n"
    system = ONE_SYSTEM.replace('name = "System one"',
                                f"name = '{' '.join(PAYLOADS)}'")
    assert "title = '" in head and "prepared_by = '" in head and "name = '" in system
    notes = "\n\n".join([
        f"# Notes {PAYLOAD_SCRIPT}", *PAYLOADS, f"- {PAYLOAD_IMG}\n- {PAYLOAD_MD_LINK}",
        f"| a | b |\n| --- | --- |\n| {PAYLOAD_MD_LINK} | {PAYLOAD_A} |",
        "[click](  JaVaScRiPt:window.__pwned=5)", "<div>\n" + PAYLOAD_SCRIPT + "\n</div>",
        f"![x](javascript:window.__pwned=6) {PAYLOAD_MD_LINK}",
        *HOSTILE_LINKS.values()]) + "\n"
    (folder / "notes.md").write_text(notes, encoding="utf-8")
    return project_factory(head + "\n" + TWO_RECORDS + "\n" + system)


def _click_everything(driver, url: str, base: str) -> list[str]:
    """Click each non-external link of ``url`` in turn; report where a payload ran."""
    from selenium.common.exceptions import WebDriverException

    ran = []
    count = len(driver.execute_script(_LINKS))
    for index in range(count):
        _open(driver, url)
        link = driver.find_elements("tag name", "a")[index]
        href = link.get_attribute("href")
        if href and _external(href, base):
            continue
        driver.execute_script("arguments[0].scrollIntoView({block: 'center'});", link)
        try:
            link.click()
        except WebDriverException:  # covered or hidden: click it as a script would
            driver.execute_script("arguments[0].click();", link)
        value = driver.execute_script(_PWNED)
        if value is not None:
            ran.append(f"{url}: clicking link {index} ({href!r}) set __pwned={value}")
    return ran


def test_injected_markup_never_runs(project_factory, tmp_path, browser):
    require_browser()
    project = _payload_project(project_factory, tmp_path)
    site = build_project(project, tmp_path / "site", tmp_path / "cache")

    # Positive control: the same payloads, unescaped, do run in this browser.
    control = tmp_path / "control"
    control.mkdir()
    (control / "index.html").write_text(
        f"<!DOCTYPE html><title>control</title><p>{PAYLOAD_SCRIPT}{PAYLOAD_IMG}</p>",
        encoding="utf-8")
    with serve(control) as (base, _):
        browser.get(base + "index.html")
        assert browser.execute_script(_PWNED) in ("1", "2")

    ran: list[str] = []
    with serve(site) as (base, responses):
        pages = _pages(site)
        assert {"index.html", "suite.html", "systems/s1.html"} <= set(pages)
        for page in pages:
            info = _open(browser, base + page)
            value = browser.execute_script(_PWNED)
            if value is not None:
                ran.append(f"{page}: __pwned={value} on load")
            # The payloads arrive, as text: the title heads every page.
            assert PAYLOAD_SCRIPT in info["text"], page
            assert _caution_shown(info), page
            ran += _click_everything(browser, base + page, base)
        summary = _open(browser, base + "index.html")["text"]
        notes_links = browser.execute_script(
            "return Array.from(document.querySelectorAll('#notes a'))"
            ".map(a => a.getAttribute('href'));")
        failed = sorted({(path, status) for path, status in responses if status >= 400})
    for payload in (PAYLOAD_IMG, PAYLOAD_A):
        assert payload in summary
    # Every hostile notes link is still shown (as text), and none kept a target: a
    # data:, file: or off-site ('//host', '/\\host') link runs nothing on a click but
    # still leaves the site, so its href must be gone. (e21 tries to break out of a
    # link title into an onclick; its https target is legitimate and stays.)
    assert all(f"e{n}" in summary for n in range(1, 21))
    assert [href for href in notes_links if href is not None] == ["https://ok.example"]
    assert not ran, "\n".join(ran)
    # An <img src=x> that became markup would have requested /x (and got a 404).
    assert not failed, f"the server answered with errors: {failed}"


@pytest.mark.parametrize("url", ["mailto:a@example.org", "https://example.org/x",
                                 "http://10.0.0.1:8000/index.html"])
def test_external_links_are_recognised(url):
    assert _external(url, "http://127.0.0.1:8123/")


@pytest.mark.parametrize("url", ["http://127.0.0.1:8123/records/r1.html",
                                 "javascript:void(0)"])
def test_local_links_are_followed(url):
    assert not _external(url, "http://127.0.0.1:8123/")


_NARROW = """
const width = window.innerWidth;
const page = document.documentElement.scrollWidth;
const verdicts = Array.from(document.querySelectorAll('td.verdict')).map(cell => {
  const box = cell.getBoundingClientRect();
  return box.width > 0 && box.left >= -1 && box.right <= width + 1;
});
return {width: width, page: page, verdicts: verdicts};
"""


def test_no_page_scrolls_sideways_at_400_px(example_site, browser, artifacts):
    """At 400 CSS px wide, no page is wider than the window (wide tables scroll inside
    their own box) and every verdict cell stays in view; screenshots of the summary and
    a system page at that width are kept as artifacts. Criterion: the issue's 400 px
    reviewer check (common practice for a phone-width layout, no source)."""
    size = browser.get_window_size()
    browser.set_window_size(400, 900)
    try:
        with serve(example_site) as (base, _):
            kinds = {}
            for page in _pages(example_site):
                info = _open(browser, base + page)
                assert info["title"]
                measured = browser.execute_script(_NARROW)
                assert measured["page"] <= measured["width"], (page, measured)
                assert all(measured["verdicts"]), (page, measured)
                kinds.setdefault(page.split("/")[0] if "/" in page else page, page)
            # Every page kind was measured: summary, suite, a record and a system page.
            assert {"index.html", "suite.html", "records", "systems"} <= set(kinds)
            for name, page in (("narrow-summary.png", "index.html"),
                               ("narrow-system.png", kinds["systems"])):
                shot = _screenshot(browser, base + page, artifacts / name)
                assert shot.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    finally:
        browser.set_window_size(size["width"], size["height"])
