"""End to end: build the bundled example and check the site's structure and promises."""

from __future__ import annotations

import hashlib
import json
import math
import re
from html.parser import HTMLParser
from pathlib import Path
from urllib.parse import urldefrag

import pytest
from click.testing import CliRunner

from sdofreport.cli import cli
from sdofreport.site.context import CAUTION_SHORT
from tests.conftest import EXAMPLE


class _Links(HTMLParser):
    def __init__(self):
        super().__init__()
        self.targets: list[str] = []
        self.text: list[str] = []

    def handle_starttag(self, tag, attrs):
        for name, value in attrs:
            if name in ("href", "src") and value:
                self.targets.append(value)

    def handle_data(self, data):
        self.text.append(data)


def _parse(path: Path) -> _Links:
    parser = _Links()
    parser.feed(path.read_text("utf-8"))
    return parser


@pytest.fixture(scope="module")
def built(built_example, tmp_path_factory):
    """The shared build of the example, and a second build of it into another folder
    from the same result cache."""
    out = tmp_path_factory.mktemp("example-again") / "site"
    result = CliRunner().invoke(cli, ["build", str(EXAMPLE / "sdofreport.toml"), "-o",
                                      str(out), "--quiet", "--cache-dir",
                                      str(built_example.cache)])
    assert result.exit_code == 0, result.output
    return [built_example.site, out]


def _files(site: Path) -> dict[str, bytes]:
    return {p.relative_to(site).as_posix(): p.read_bytes() for p in site.rglob("*")
            if p.is_file()}


def test_pages_present(built):
    site = built[0]
    example = json.loads((site / "data" / "results.json").read_text())
    assert (site / "index.html").is_file() and (site / "suite.html").is_file()
    for record in example["records"]:
        assert (site / "records" / f"{record['id']}.html").is_file()
    for system in example["systems"]:
        assert (site / "systems" / f"{system['id']}.html").is_file()
    assert len(example["records"]) >= 11 and len(example["systems"]) >= 4


def test_second_build_in_another_folder_is_byte_identical(built):
    assert _files(built[0]) == _files(built[1])


def test_every_internal_link_resolves_and_no_external_loads(built):
    site = built[0]
    for page in site.rglob("*.html"):
        for target in _parse(page).targets:
            if target.startswith(("http://", "https://", "mailto:")):
                continue
            # The only inline resource: the empty icon (so browsers ask for no favicon).
            assert not target.startswith("data:") or target == "data:,", target
            if target == "data:,":
                continue
            path, _ = urldefrag(target)
            assert (page.parent / path).resolve().is_file(), f"{page}: {target}"


def test_cautions_on_every_page(built):
    for page in built[0].rglob("*.html"):
        text = " ".join(_parse(page).text)
        assert CAUTION_SHORT in text, page
        assert "not an approval" in text and "licensed" in text


def test_manifest_hashes_are_true(built):
    site = built[0]
    manifest = json.loads((site / "manifest.json").read_text())
    assert manifest["schema"] == "sdofreport/manifest@1"
    listed = set(manifest["files"])
    present = {p.relative_to(site).as_posix() for p in site.rglob("*") if p.is_file()}
    assert listed == present - {"manifest.json"}
    for path, digest in manifest["files"].items():
        # Independent reference: hashlib's SHA-256 of the file bytes.
        assert hashlib.sha256((site / path).read_bytes()).hexdigest() == digest
    # The inputs are all there, byte for byte.
    assert (site / "inputs" / "sdofreport.toml").read_bytes() == \
        (EXAMPLE / "sdofreport.toml").read_bytes()
    for record in (EXAMPLE / "records").glob("hcs*"):
        assert (site / "inputs" / "records" / record.name).read_bytes() == \
            record.read_bytes()


def test_results_json_interface(built):
    doc = json.loads((built[0] / "data" / "results.json").read_text())
    assert doc["schema"] == "sdofreport/results@1"
    record = doc["records"][0]
    for key in ("id", "file", "sha256", "dt_s", "npts", "scale", "pga_g", "pgv_m_s",
                "pgd_m", "arias_m_s", "d5_95_s", "d5_75_s", "cav_m_s", "mean_period_s"):
        assert key in record
    spectra = doc["spectra"]
    assert len(spectra["periods_s"]) == 200
    for key in ("sd_m", "psa_g", "sa_g", "sv_m_s"):
        assert len(spectra[record["id"]][key]) == len(spectra["damping"])
    system = doc["systems"][0]
    for key in ("id", "name", "mass_kg", "stiffness_n_m", "period_s", "frequency_hz",
                "damping", "height_m", "responses", "checks"):
        assert key in system
    assert set(system["responses"][0]) == {"record", "peak_displacement_m",
                                           "peak_drift_ratio", "peak_base_shear_n",
                                           "peak_total_accel_g"}
    verdicts = [c["verdict"] for s in doc["systems"] for c in s["checks"]]
    assert "exceeds limit" in verdicts and "within limit" in verdicts
    for s in doc["systems"]:
        for c in s["checks"]:
            assert c["ratio"] == pytest.approx(c["demand"] / c["limit"])


def test_example_suite_tells_the_truth(built):
    # From memory: ASCE/SEI 7-16 §16.2.2, at least 11 ground motions, a pair counting
    # once; the example carries eleven pairs, so its suite complies and the summary
    # says so in its first lines (issue 14 part 7: with six pairs it claimed compliance).
    doc = json.loads((built[0] / "data" / "results.json").read_text())
    scaling = doc["scaling"]
    assert (scaling["motions_counted"], scaling["complies"]) == (11, True)
    assert len(doc["records"]) == 22
    assert (scaling["target_level"], scaling["target_damping"]) == ("mce_r", 0.05)
    html = (built[0] / "index.html").read_text()
    assert html.index("meets every scaling criterion of ASCE/SEI 7-16 Chapter 16") < \
        html.index('id="checks"')


def test_summary_sorts_worst_first_and_shows_verdicts(built):
    html = (built[0] / "index.html").read_text()
    ratios = [float(x) for x in re.findall(r'<td class="num">(\d+\.\d{3})</td><td '
                                           r'class="verdict">', html)]
    assert ratios == sorted(ratios, reverse=True) and ratios
    assert "exceeds limit" in html


def test_figures_are_deterministic_svg(built):
    for svg in (built[0] / "figures").glob("*.svg"):
        text = svg.read_text()
        assert text.lstrip().startswith("<?xml") and "<svg" in text
        assert "dc:date" not in text


def test_spreadsheet_matches_results_json(built):
    """data/results.xlsx opens with openpyxl (an independent reader of the format) and
    every check, peak and scale factor in it equals the one in data/results.json, to the
    16 significant digits the workbook keeps (Excel itself keeps 15)."""
    import io

    import openpyxl

    site = built[0]
    document = json.loads((site / "data" / "results.json").read_text("utf-8"))
    data = (site / "data" / "results.xlsx").read_bytes()
    assert data == (built[1] / "data" / "results.xlsx").read_bytes()  # deterministic
    manifest = json.loads((site / "manifest.json").read_text("utf-8"))
    assert manifest["files"]["data/results.xlsx"] == hashlib.sha256(data).hexdigest()
    book = openpyxl.load_workbook(io.BytesIO(data), read_only=True)
    assert book.sheetnames == ["checks", "peaks", "spectra", "scaling"]
    checks = list(book["checks"].iter_rows(values_only=True))
    expected = [(s["id"], c["quantity"], c["demand"], c["limit"], c["verdict"])
                for s in document["systems"] for c in s["checks"]]
    header = checks[0]
    got = [(row[0], row[header.index("quantity")], row[header.index("demand")],
            row[header.index("limit")], row[header.index("verdict")]) for row in checks[1:]]
    assert expected and [g[:2] + g[4:] for g in got] == [e[:2] + e[4:] for e in expected]
    assert [v for g in got for v in g[2:4]] == pytest.approx(
        [v for e in expected for v in e[2:4]], rel=1e-15)
    peaks = list(book["peaks"].iter_rows(values_only=True))
    column = peaks[0].index("peak_displacement_m")
    assert [row[column] for row in peaks[1:]] == pytest.approx([
        r["peak_displacement_m"] for s in document["systems"] for r in s["responses"]],
        rel=1e-15)
    spectra = list(book["spectra"].iter_rows(values_only=True))
    periods = document["spectra"]["periods_s"]
    assert len(spectra) - 1 == (len(document["records"]) * len(periods)
                                * len(document["spectra"]["damping"]))
    first = document["records"][0]["id"]
    assert [row[4] for row in spectra[1:len(periods) + 1]] == pytest.approx(
        document["spectra"][first]["psa_g"][0], rel=1e-15)
    factors = {row[1]: row[2] for row in book["scaling"].iter_rows(values_only=True)
               if row[0] == "record factor"}
    assert factors == pytest.approx(
        {r["id"]: r["factor"] for r in document["scaling"]["records"]}, rel=1e-15)


def test_no_page_writes_a_number_with_an_exponent(built):
    """One number style on every page (sdofreport.site.display.number): no value in
    exponent notation such as 4.753e-06 anywhere in the pages' text."""
    pattern = re.compile(r"\b\d+(?:\.\d+)?[eE][-+]?\d+\b")
    for page in sorted(built[0].rglob("*.html")):
        if "inputs" in page.relative_to(built[0]).parts:
            continue
        text = " ".join(_parse(page).text)
        assert not pattern.findall(text), (page.name, pattern.findall(text)[:5])


def test_symbols_render_as_subscripts_on_the_pages(built):
    """No listed symbol (sdofreport.site.symbols.SYMBOLS) is left in its raw
    underscore form in any page's text; the suite page writes S_DS as S<sub>DS</sub>."""
    from sdofreport.site.symbols import SYMBOLS

    site = built[0]
    assert "S<sub>DS</sub>" in (site / "suite.html").read_text("utf-8")
    for page in sorted(site.rglob("*.html")):
        if "inputs" in page.relative_to(site).parts:
            continue
        text = " ".join(_parse(page).text)
        raw = [s for s in SYMBOLS if re.search(rf"(?<![\w/]){re.escape(s)}(?!\w)", text)]
        assert not raw, (page.name, raw)


def test_demand_statistics_match_numpy_and_the_csv(built):
    """checks[].statistics of every check equal numpy's statistics of the per-record
    peaks in the same results.json; data/checks.csv carries the same numbers."""
    import csv

    import numpy as np

    doc = json.loads((built[0] / "data" / "results.json").read_text())
    keys = {"displacement": "peak_displacement_m", "drift_ratio": "peak_drift_ratio",
            "base_shear": "peak_base_shear_n", "ductility": "ductility",
            "residual_displacement": "residual_displacement_m",
            "bearing_displacement": "peak_displacement_m"}
    rows = list(csv.DictReader((built[0] / "data" / "checks.csv").open()))
    assert len(rows) == sum(len(s["checks"]) for s in doc["systems"])
    for system in doc["systems"]:
        for check in system["checks"]:
            # a check of a system with bound runs reads its governing run's peaks
            run = check.get("governing_run", "nominal")
            peaks = [r if run == "nominal" else r["bounds"][run]
                     for r in system["responses"]]
            if check["quantity"] == "total_accel":  # results.json peaks are in g
                x = np.array([r["peak_total_accel_g"] for r in peaks]) * 9.80665
            else:
                x = np.abs([r[keys[check["quantity"]]] for r in peaks])
            stats = check["statistics"]
            # numpy: mean, median, 84th percentile, std of ln (ddof 1), min, max.
            assert [stats[k] for k in ("mean", "median", "p84", "beta", "min", "max")] \
                == pytest.approx([np.mean(x), np.median(x), np.percentile(x, 84),
                                  np.std(np.log(x), ddof=1), x.min(), x.max()], rel=1e-9)
            # The governing statistic (the edition's) is the demand the verdict reads.
            assert stats[check["statistic"]] == pytest.approx(check["demand"], rel=1e-15)
            row = next(r for r in rows if (r["system"], r["quantity"]) ==
                       (system["id"], check["quantity"]))
            assert float(row["p84"]) == stats["p84"]
            assert row["governing_statistic"] == check["statistic"]
    html = (built[0] / "systems" / "pier.html").read_text()
    assert 'id="demand-statistics"' in html and 'class="num governing"' in html


def test_example_shows_one_fragility(built):
    """The example's [fragility] (the pier): every pier check carries the stripes and
    its fit; the probability at the design level is Φ(ln(x/θ)/β) (scipy.stats.norm);
    the design level is the target spectrum at the pier's period."""
    from scipy import stats

    doc = json.loads((built[0] / "data" / "results.json").read_text())
    with_fragility = {s["id"] for s in doc["systems"] for c in s["checks"]
                      if "fragility" in c}
    assert with_fragility == {"pier"}
    pier = next(s for s in doc["systems"] if s["id"] == "pier")
    # Published formula: ASCE/SEI 7-16 §11.4.6, Sa = S_D1 / T for T_S < T <= T_L; the
    # MCE_R target is 1.5 × the design spectrum (from memory, see REFERENCES).
    design = 1.5 * 0.42 / pier["period_s"]
    fitted = 0
    for check in pier["checks"]:
        f = check["fragility"]
        assert f["motions"] == [22] * len(f["levels"]) and f["unit"] == "g"
        assert f["design_level"] == pytest.approx(design, rel=1e-12)
        if f["status"] == "fitted":
            fitted += 1
            # scipy.stats: the lognormal CDF at the design level.
            assert f["design_probability"] == pytest.approx(stats.norm.cdf(
                math.log(design / f["median"]) / f["beta"]), rel=1e-9)
    assert fitted >= 1
    html = (built[0] / "systems" / "pier.html").read_text()
    assert 'id="fragility"' in html and "only as good as the suite" in html
    assert (built[0] / "figures" / "system-pier-fragility.svg").is_file()


def test_limit_basis_is_a_column_of_the_checks_tables(built):
    """The example's pier states the basis of two limits (its project file); the
    summary's checks table and results.json carry them, 'not stated' elsewhere."""
    site = built[0]
    document = json.loads((site / "data" / "results.json").read_text("utf-8"))
    pier = next(s for s in document["systems"] if s["id"] == "pier")
    basis = {c["quantity"]: c["basis"] for c in pier["checks"]}
    assert basis["residual_displacement"].endswith("§5.4") and basis["displacement"] is None
    summary = (site / "index.html").read_text("utf-8")
    assert "<th>Basis of the limit</th>" in summary
    assert "owner&#39;s pipe-rack specification (invented) §5.4" in summary
    assert "not stated" in summary
