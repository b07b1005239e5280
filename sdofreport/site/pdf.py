"""Print a built site into one review-packet PDF through headless Chromium.

The packet is assembled from the same page data the site's pages are rendered from
(:meth:`sdofreport.site.context.SiteContext.pages` of the build's results), never by
reading the written HTML back: the content block of the summary, the suite, every
record page and every system page (in that order) is rendered from its page's context
into ``templates/print.html``, figures are loaded from the site folder by relative path,
and Chromium prints the document with the DevTools command ``Page.printToPDF``. Every PDF
page carries the project in its header and the caution with "page X of Y" in its
footer.

Chromium and its chromedriver are system programs; ``selenium`` and ``pypdf`` are
optional dependencies (extra ``pdf``: ``pip install 'selenium>=4.16' 'pypdf>=4.0'``); when
one is missing, :func:`write_pdf` raises :class:`~sdofreport.errors.BuildError` saying how
to install it. The browser loads only ``file:`` URLs from the site and a temporary folder; it is started with
background networking, component updates, sync and extensions turned off.

Determinism: Chromium writes the print time into the PDF's ``/CreationDate`` and
``/ModDate``; they are replaced by ``SOURCE_DATE_EPOCH`` when set, else by the
project's ``[project] date``. With neither, the two dates (and so the bytes) vary from
print to print. The structure-element IDs of the tagged PDF carry the browser's DOM
node numbers, which shift between prints; they are replaced by their ranks. Everything
else depends only on the site and the Chromium version.
"""

from __future__ import annotations

import base64
import html
import json
import logging
import os
import posixpath
import re
import shutil
import tempfile
import time
from contextlib import contextmanager
from dataclasses import dataclass
from datetime import datetime, timezone
from pathlib import Path
from urllib.parse import urlsplit

from markupsafe import Markup

from sdofreport.errors import BuildError
from sdofreport.fsio import write_atomically
from sdofreport.site.context import CAUTION_FULL, CAUTION_SHORT

log = logging.getLogger("sdofreport.site.pdf")

#: Flags for every headless Chromium we start: no sandbox (containers), and nothing
#: that talks to the network on its own (updates, sync, safe-browsing lists, extensions).
BROWSER_FLAGS = (
    "--headless=new", "--no-sandbox", "--disable-gpu", "--disable-dev-shm-usage",
    "--disable-background-networking", "--disable-component-update", "--disable-sync",
    "--no-first-run", "--disable-default-apps", "--disable-extensions",
)

#: Program names tried, in order, when no Chromium path is given.
CHROMIUM_NAMES = ("chromium", "chromium-browser", "google-chrome", "google-chrome-stable")

INSTALL_HINT = ("Install Chromium and its driver (Debian/Ubuntu: apt-get install chromium "
                "chromium-driver) and the Python packages selenium and pypdf (pip install "
                "'selenium>=4.16' 'pypdf>=4.0'), then run the command again.")

#: A4 [in] and margins [in]; the bottom margin holds the three-line caution footer.
PAPER_IN = (8.27, 11.69)
MARGINS_IN = {"marginTop": 0.65, "marginBottom": 0.95, "marginLeft": 0.55,
              "marginRight": 0.55}

_ATTRIBUTE = re.compile(r'(\s)(href|src)="([^"]*)"')
_LAZY = re.compile(r'\sloading="lazy"')
_PDF_DATE = re.compile(rb"/(CreationDate|ModDate) \((D:\d{14}[^)]*)\)")
_NODE_ID = re.compile(rb"\(node(\d{8})\)")


def find_browser(chromium: str | os.PathLike | None = None,
                 chromedriver: str | os.PathLike | None = None) -> tuple[str, str]:
    """
    Paths of the Chromium program and of chromedriver.

    Given paths must name executable files; otherwise the first of ``CHROMIUM_NAMES``
    and ``chromedriver`` found on ``PATH`` are used. Raises ``BuildError`` with the
    install hint when either is missing.
    """
    found = []
    for given, names, label in ((chromium, CHROMIUM_NAMES, "Chromium"),
                                (chromedriver, ("chromedriver",), "chromedriver")):
        if given is not None:
            path = str(given)
            if not (os.path.isfile(path) and os.access(path, os.X_OK)):
                raise BuildError(f"PDF: {label} '{path}' is not an executable file. "
                                 f"{INSTALL_HINT}")
        else:
            path = next((hit for hit in map(shutil.which, names) if hit), None)
            if path is None:
                raise BuildError(f"PDF: {label} was not found on PATH (looked for "
                                 f"{', '.join(names)}); printing the site needs it. "
                                 f"{INSTALL_HINT}")
        found.append(path)
    return found[0], found[1]


def check_printing(chromium: str | os.PathLike | None = None,
                   chromedriver: str | os.PathLike | None = None) -> None:
    """Raise ``BuildError`` (with the install hint) unless :func:`write_pdf` can run."""
    find_browser(chromium, chromedriver)
    _selenium()
    _pypdf()


def _pypdf():
    try:
        import pypdf
    except ImportError:
        raise BuildError(f"PDF: the Python package pypdf is not installed; the packet's "
                         f"contents read their page numbers through it. "
                         f"{INSTALL_HINT}") from None
    return pypdf


def _selenium():
    try:
        from selenium import webdriver
        from selenium.common.exceptions import WebDriverException
        from selenium.webdriver.chrome.service import Service
    except ImportError:
        raise BuildError(f"PDF: the Python package selenium is not installed; printing "
                         f"the site drives Chromium through it. {INSTALL_HINT}") from None
    return webdriver, Service, WebDriverException


@contextmanager
def headless_chrome(chromium: str | os.PathLike | None = None,
                    chromedriver: str | os.PathLike | None = None, *,
                    browser_log: bool = False, window_size: tuple[int, int] = (1280, 1000)):
    """
    A selenium Chrome driver on headless Chromium with a fresh, temporary profile.

    ``chromedriver`` is given to selenium explicitly and ``SE_OFFLINE`` is set while the
    driver starts, so selenium never downloads a driver. ``browser_log`` records the
    console (``driver.get_log("browser")``). The profile is deleted on exit.
    """
    chromium_path, driver_path = find_browser(chromium, chromedriver)
    webdriver, Service, WebDriverException = _selenium()
    with tempfile.TemporaryDirectory(prefix="sdofreport-chromium-") as profile:
        options = webdriver.ChromeOptions()
        options.binary_location = chromium_path
        for flag in BROWSER_FLAGS:
            options.add_argument(flag)
        options.add_argument(f"--user-data-dir={profile}")
        options.add_argument(f"--window-size={window_size[0]},{window_size[1]}")
        # A followed link to a data file downloads into the temporary profile, no further.
        options.add_experimental_option("prefs", {
            "download.default_directory": profile, "download.prompt_for_download": False})
        if browser_log:
            options.set_capability("goog:loggingPrefs", {"browser": "ALL"})
        previous = os.environ.get("SE_OFFLINE")
        os.environ["SE_OFFLINE"] = "true"
        try:
            driver = webdriver.Chrome(service=Service(executable_path=driver_path),
                                      options=options)
        except WebDriverException as exc:
            first = (exc.msg or str(exc) or type(exc).__name__).strip().splitlines()[0]
            raise BuildError(f"PDF: Chromium ({chromium_path}) could not be started "
                             f"through {driver_path}: {first}. The two must be the same "
                             f"version. {INSTALL_HINT}") from None
        finally:
            if previous is None:
                os.environ.pop("SE_OFFLINE", None)
            else:
                os.environ["SE_OFFLINE"] = previous
        try:
            yield driver
        finally:
            driver.quit()


@dataclass(frozen=True)
class PacketSection:
    """One page of the site as the packet prints it."""

    #: the page's path in the site (``index.html``, ``systems/frame.html``...)
    path: str
    #: the page's title (plain text)
    title: str
    #: the page's content block, rendered from its context (HTML, links relative to
    #: the page's own folder)
    main: str


@dataclass(frozen=True)
class Packet:
    """What the review packet prints, all from the page data of one build."""

    #: the sections, in packet order
    sections: list[PacketSection]
    #: the pages' project block: title, reference, revision, date, file...
    project: dict[str, str | None]
    #: ``signoff`` and ``revisions`` as the summary page shows them
    signoff: dict[str, dict[str, str | None] | None]
    revisions: list[dict[str, str | None]]
    #: the run fingerprint (manifest.json) and the version that built the pages
    fingerprint: str
    version: str


def _revision_page(results, fingerprint: str, site_dir: Path | None):
    """The revision page's data (a :class:`~sdofreport.site.context.Page`) when the site
    was built with ``--compare-to``: from the earlier results it keeps as an input and
    this build's results, as the build made it; else None."""
    from sdofreport.archive.compare import REVISION_TEMPLATE, revision_context
    from sdofreport.outputs.results_json import results_document
    from sdofreport.site.context import Page
    from sdofreport.site.render import COMPARE_TO_FINGERPRINT, COMPARE_TO_INPUT

    if site_dir is None or not (site_dir / COMPARE_TO_INPUT).is_file():
        return None
    try:
        old = json.loads((site_dir / COMPARE_TO_INPUT).read_text("utf-8"))
        kept = site_dir / COMPARE_TO_FINGERPRINT
        old_fingerprint = kept.read_text("ascii").strip() if kept.is_file() else ""
    except (OSError, ValueError) as exc:
        raise BuildError(f"PDF: the earlier results kept in {site_dir} cannot be read "
                         f"({exc}); rebuild the site.") from None
    context, _ = revision_context(old, results_document(results), fingerprint=fingerprint,
                                  old_fingerprint=old_fingerprint)
    return Page("revision.html", REVISION_TEMPLATE, context)


def review_packet(results, fingerprint: str = "", site_dir: str | os.PathLike | None = None
                  ) -> Packet:
    """
    The packet of a build's ``results``: its sections in order — summary, suite,
    records, systems, as :meth:`~sdofreport.site.context.SiteContext.pages` lists them
    (the project file's order), then the revision page of a site ``site_dir`` built
    with ``--compare-to`` — each the content block of its page's template rendered from
    the page's context, with the run ``fingerprint`` the summary shows.
    """
    import jinja2

    from sdofreport.site.context import SiteContext
    from sdofreport.site.render import _environment

    env = _environment()
    pages = SiteContext(results).pages()
    revision = _revision_page(results, fingerprint,
                              None if site_dir is None else Path(site_dir))
    sections = []
    for page in pages + ([revision] if revision is not None else []):
        template = env.get_template(page.template)
        try:
            context = template.new_context({**page.context, "fingerprint": fingerprint,
                                            "has_revision": False})
            main = "".join(template.blocks["content"](context))
        except (jinja2.TemplateError, KeyError) as exc:
            raise BuildError(f"PDF: page {page.path} could not be rendered: {exc}") \
                from None
        sections.append(PacketSection(page.path, str(page.context["page_title"]),
                                      f"\n{main}\n"))
    summary = pages[0].context
    return Packet(sections, summary["project"], summary["signoff"], summary["revisions"],
                  fingerprint, summary["version"])


def packet_pages(packet: Packet) -> list[str]:
    """Site paths of the packet's sections, in packet order."""
    return [section.path for section in packet.sections]


def _rebase(fragment: str, page: str, anchors: dict[str, str]) -> str:
    """
    Rewrite the URLs of one page's HTML for the packet, whose base is the site root.

    Images get site-root paths; links to pages in the packet become links to their
    section; other links inside the site (data files) lose their target, because a
    file path means nothing in a PDF; external links are kept. Lazy loading is turned
    off so every figure is loaded before printing.
    """
    folder = posixpath.dirname(page)

    def replace(match: re.Match) -> str:
        space, name, value = match.groups()
        url = html.unescape(value)
        parts = urlsplit(url)
        if parts.scheme or parts.netloc:
            return match.group(0)
        if not parts.path:  # same-page fragment
            return f'{space}{name}="#{anchors[page]}"' if name == "href" else ""
        target = posixpath.normpath(posixpath.join(folder, parts.path))
        if name == "src":
            return f'{space}src="{html.escape(target)}"'
        if target in anchors:
            return f'{space}href="#{anchors[target]}"'
        return f'{space}data-site-file="{html.escape(target)}"'

    return _LAZY.sub("", _ATTRIBUTE.sub(replace, fragment))


def _project(site_dir: Path) -> dict:
    from sdofreport.site.render import MANIFEST_NAME, is_site

    if not is_site(site_dir):
        raise BuildError(f"PDF: {site_dir} is not a site built by sdofreport (no "
                         f"{MANIFEST_NAME} of ours); build it first.")
    return json.loads((site_dir / MANIFEST_NAME).read_text("utf-8"))


#: Shown in the contents' page column on the first print, which only measures where each
#: section starts; as wide as any real page number up to 999 in tabular figures.
PAGE_PLACEHOLDER = "888"


def packet_html(site_dir: str | os.PathLike, packet: Packet,
                page_numbers: dict[str, int] | None = None) -> str:
    """
    The printable HTML document of ``packet`` (:func:`review_packet`); its ``<base>``
    is the site folder, where the figures are.

    ``page_numbers`` (site path → PDF page where its section starts) fills the
    contents' page column; without it the column holds :data:`PAGE_PLACEHOLDER`.
    """
    import jinja2

    from sdofreport.site.render import template_dir

    site_dir = Path(site_dir).resolve()
    anchors = {section.path: f"packet-{index:03d}"
               for index, section in enumerate(packet.sections, start=1)}
    rows = [{"path": section.path, "anchor": anchors[section.path],
             "page": PAGE_PLACEHOLDER if page_numbers is None
             else page_numbers[section.path], "title": section.title,
             "main": Markup(_rebase(section.main, section.path, anchors))}
            for section in packet.sections]
    info = packet.project
    env = jinja2.Environment(loader=jinja2.FileSystemLoader(str(template_dir())),
                             autoescape=True, undefined=jinja2.StrictUndefined)
    return env.get_template("print.html").render(
        version=packet.version, root="", base_href=site_dir.as_uri() + "/",
        page_title="Review packet", page_kind="print", current_id="", nav_systems=[],
        project={"title": info.get("title", ""), "reference": info.get("reference", ""),
                 "revision": info.get("revision", ""), "date": info.get("date"),
                 # the project file as the site keeps it (manifest.json names it so)
                 "file": f"inputs/{info.get('file', '')}"},
        cautions={"short": CAUTION_SHORT, "full": CAUTION_FULL},
        fingerprint=packet.fingerprint, sections=rows, signoff=packet.signoff,
        revisions=packet.revisions)


def section_pages(pdf: bytes, packet: Packet) -> dict[str, int]:
    """
    Site path → page (from 1) on which its packet section starts, read from the named
    destinations Chromium writes for the anchors the contents links to.
    """
    import io

    pypdf = _pypdf()
    reader = pypdf.PdfReader(io.BytesIO(pdf))
    destinations = reader.named_destinations
    pages = packet_pages(packet)
    found = {}
    for index, page in enumerate(pages, start=1):
        destination = destinations.get(f"/packet-{index:03d}")
        if destination is None:
            raise BuildError(f"PDF: the printed packet has no destination for {page}; "
                             f"the contents cannot be numbered.")
        found[page] = reader.get_destination_page_number(destination) + 1
    return found


def _header_footer(manifest: dict) -> tuple[str, str]:
    """Chromium header and footer templates (inline styles: they are printed apart)."""
    info = manifest.get("project", {})
    ident = " · ".join(html.escape(str(part)) for part in (
        info.get("title", ""), info.get("reference", ""),
        f"revision {info.get('revision', '')}") if part)
    style = ("font-family: Arial, sans-serif; font-size: 7.5pt; color: #333; width: 100%; "
             "margin: 0 0.55in; -webkit-print-color-adjust: exact;")
    header = (f'<div style="{style} border-bottom: 0.5pt solid #999; padding-bottom: 2pt;">'
              f"{ident}</div>")
    footer = (f'<div style="{style} border-top: 0.5pt solid #999; padding-top: 2pt;">'
              f'<span>{html.escape(CAUTION_SHORT)}</span> <span style="white-space: nowrap;">'
              f'Page <span class="pageNumber"></span> of <span class="totalPages"></span>'
              f"</span></div>")
    return header, footer


def _fixed_date(manifest: dict) -> str | None:
    """The PDF date (``D:YYYYMMDDHHmmSS+00'00'``) to stamp, or None to leave Chromium's."""
    epoch = os.environ.get("SOURCE_DATE_EPOCH", "").strip()
    if epoch.isdigit():
        when = datetime.fromtimestamp(int(epoch), tz=timezone.utc)
    else:
        try:
            when = datetime.strptime(str(manifest.get("project", {}).get("date")),
                                     "%Y-%m-%d").replace(tzinfo=timezone.utc)
        except ValueError:
            return None
    return when.strftime("D:%Y%m%d%H%M%S+00'00'")


def _stamp_dates(pdf: bytes, date: str | None) -> bytes:
    """Replace the creation and modification dates; only same-length, so offsets hold."""
    if date is None:
        return pdf

    def replace(match: re.Match) -> bytes:
        old = match.group(2)
        new = date.encode("ascii")
        return match.group(0) if len(new) != len(old) else match.group(0).replace(old, new)

    return _PDF_DATE.sub(replace, pdf)


def _renumber_node_ids(pdf: bytes) -> bytes:
    """
    Replace the DOM node numbers in the tagged-PDF structure IDs by their ranks.

    Chromium names each structure element ``(nodeNNNNNNNN)`` after the browser's DOM
    node number, which shifts from print to print with nodes the browser made before
    (seen: every number shifted by 4 between two prints of the same site). The rank of
    a number among all of them does not shift, so writing the rank, zero-padded to the
    same eight digits, makes the bytes reproducible while every offset in the
    cross-reference table holds and the ``/IDTree`` keys stay sorted (ISO 32000-1
    §14.7.2 and §7.9.6: structure element IDs live in a name tree with sorted keys).
    """
    numbers = sorted(set(_NODE_ID.findall(pdf)))
    ranks = {number: b"%08d" % rank for rank, number in enumerate(numbers)}
    return _NODE_ID.sub(lambda match: b"(node" + ranks[match.group(1)] + b")", pdf)


def pdf_page_count(pdf: bytes) -> int:
    """Number of page objects (``/Type /Page``) in a PDF written by Chromium's Skia."""
    return len(re.findall(rb"/Type\s*/Page\b", pdf))


def default_pdf_path(site_dir: str | os.PathLike) -> Path:
    """Where ``--pdf`` without a file writes: ``<site>-review-packet.pdf`` beside the site."""
    site_dir = Path(site_dir)
    return site_dir.resolve().parent / f"{site_dir.resolve().name}-review-packet.pdf"


def pdf_target(option: str, site_dir: str | os.PathLike) -> Path:
    """
    The PDF file for ``build --pdf [FILE]``: ``FILE``, or :func:`default_pdf_path`
    when the option is given without one (click passes ``""``).

    A value that does not end in ``.pdf`` is refused: it is most often the project
    file, taken as the option's value in ``sdofreport build --pdf PROJECT``.
    """
    if not option:
        return default_pdf_path(site_dir)
    if not option.lower().endswith(".pdf"):
        raise BuildError(f"--pdf: expected a file name ending in .pdf, got '{option}'. "
                         f"Put --pdf after the project file, or write --pdf=FILE.pdf.")
    return Path(option)


def _print_once(driver, source: Path, site_dir: Path, header: str, footer: str) -> bytes:
    """Load the packet document ``source`` and print it through Chromium: PDF bytes."""
    driver.get(source.as_uri())
    broken = driver.execute_script(
        "return Array.from(document.images).filter(i => !(i.complete && "
        "i.naturalWidth > 0)).map(i => i.getAttribute('src'));")
    if broken:
        raise BuildError(f"PDF: {len(broken)} figure(s) of {site_dir} could not be loaded "
                         f"for printing, e.g. {broken[0]}; rebuild the site.")
    printed = driver.execute_cdp_cmd("Page.printToPDF", {
        "landscape": False, "displayHeaderFooter": True, "printBackground": True,
        "headerTemplate": header, "footerTemplate": footer,
        "paperWidth": PAPER_IN[0], "paperHeight": PAPER_IN[1], **MARGINS_IN,
        "preferCSSPageSize": False, "generateDocumentOutline": True})
    return base64.b64decode(printed["data"])


def write_pdf(site_dir: Path, output_pdf: Path, results=None, *, chromium=None,
              chromedriver=None, timeout_s: float = 120.0) -> int:
    """
    Print the site at ``site_dir``, built from ``results``, into one review-packet PDF
    at ``output_pdf``.

    Parameters
    ----------
    site_dir : path
        The site ``sdofreport build`` wrote from ``results`` (its manifest.json is
        checked; the figures are loaded from it).
    output_pdf : path
        The PDF to write; written whole through a temporary sibling, then swapped in.
    results : sdofreport.engine.Results
        The build's results (:attr:`sdofreport.build.BuildOutcome.results`): the pages'
        data the packet is rendered from.
    chromium, chromedriver : path, optional
        The browser and its driver; found on ``PATH`` when not given.
    timeout_s : float
        Longest wait for the figures to load and for printing. [s]

    Returns
    -------
    int
        Number of pages in the PDF.
    """
    started = time.perf_counter()
    check_printing(chromium, chromedriver)  # fail early, with the install hint
    site_dir = Path(site_dir).resolve()
    output_pdf = Path(output_pdf)
    manifest = _project(site_dir)
    if results is None:
        raise BuildError("PDF: the review packet is printed from a build's results "
                         "(sdofreport build --pdf); none were given.")
    packet = review_packet(results, str(manifest.get("fingerprint", "")), site_dir)
    header, footer = _header_footer({"project": packet.project})
    with tempfile.TemporaryDirectory(prefix="sdofreport-print-") as folder:
        source = Path(folder) / "packet.html"
        with headless_chrome(chromium, chromedriver) as driver:
            driver.set_page_load_timeout(timeout_s)
            driver.set_script_timeout(timeout_s)
            # First print with placeholder page numbers to learn where each section
            # starts, then print with those numbers; the placeholder is as wide as
            # the numbers, so the layout (and so the numbers) holds. A further print
            # follows only if they moved all the same.
            numbers = None
            for _ in range(3):
                source.write_text(packet_html(site_dir, packet, numbers),
                                  encoding="utf-8")
                raw = _print_once(driver, source, site_dir, header, footer)
                found = section_pages(raw, packet)
                if found == numbers:
                    break
                numbers = found
            else:
                log.warning("the contents' page numbers of %s did not settle after "
                            "three prints", output_pdf)
    pdf = _renumber_node_ids(_stamp_dates(raw, _fixed_date({"project": packet.project})))
    write_atomically(output_pdf, pdf)
    pages = pdf_page_count(pdf)
    log.info("printed %s into %s: %d pages in %.1f s", site_dir, output_pdf, pages,
             time.perf_counter() - started)
    return pages
