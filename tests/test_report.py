"""The decision document (``compromise report``): its sections, its bytes, its files, and how it
looks in a real browser.

Behaviour a user relies on: the eleven sections of issue 12 in order in the HTML and in the
Markdown twin; the same input and SOURCE_DATE_EPOCH give the same bytes (the
reproducible-builds.org convention); nothing is fetched from the network; an existing report is
replaced only with --force; a bad output path is one line and exit 2 before any work. The
browser tests open the HTML in headless Chromium (the Debian ``chromium`` package) and print the
PDF; they are skipped only off CI when the browser is absent (``.ci/run`` installs it).
"""

from __future__ import annotations

import hashlib
import json
import os
import re
import shutil
import subprocess
from pathlib import Path

import numpy as np
import pytest
from typer.testing import CliRunner

from compromise.cli import app
from compromise.presentation.report import SECTIONS

ROOT = Path(__file__).resolve().parents[1]
RIVER = ROOT / "cases" / "river_bend.toml"
EPOCH = "1700000000"  # 2023-11-14 22:13:20 UTC (date -u -d @1700000000)
runner = CliRunner()

CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")
browser = pytest.mark.skipif(
    CHROMIUM is None and not os.environ.get("CI"),
    reason="headless Chromium not installed (CI installs it: .ci/run)",
)


def _report(folder: Path, *args: str, epoch: str | None = EPOCH) -> object:
    env = {"SOURCE_DATE_EPOCH": epoch} if epoch is not None else {}
    return runner.invoke(app, ["report", str(RIVER), "-o", str(folder), *args], env=env)


@pytest.fixture(scope="module")
def river(tmp_path_factory: pytest.TempPathFactory) -> Path:
    folder = tmp_path_factory.mktemp("river")
    res = _report(folder)
    assert res.exit_code == 0, res.output
    return folder


@pytest.fixture(autouse=True)
def _coarse(monkeypatch: pytest.MonkeyPatch) -> None:
    """Coarse trade-offs in the tests that only check files and options (the module's
    ``river`` report, set up first, keeps the defaults)."""
    import compromise.review.report_data as rd

    monkeypatch.setattr(rd, "MAP_RESOLUTION", 15)
    monkeypatch.setattr(rd, "FRONT_POINTS", 8)
    monkeypatch.setattr(rd, "SENSITIVITY_SAMPLES", 20)


def test_every_section_in_order_in_html_and_markdown(river: Path) -> None:
    html = (river / "report.html").read_text(encoding="utf-8")
    md = (river / "report.md").read_text(encoding="utf-8")
    assert len(SECTIONS) == 11  # the eleven sections of issue 12
    html_at = [html.index(f'<section id="{ident}"') for ident, _ in SECTIONS]
    md_at = [md.index(f"## {i}. {title}\n") for i, (_, title) in enumerate(SECTIONS, 1)]
    assert html_at == sorted(html_at)
    assert md_at == sorted(md_at)


def test_reviewer_facts_in_the_summary(river: Path) -> None:
    """The summary names the binding limit, the failing threshold and the largest mismatch of
    the river case's answer (the same facts as ``solve --json``)."""
    md = (river / "report.md").read_text(encoding="utf-8")
    summary = md[md.index("## 1. Summary") : md.index("## 2. The case")]
    answer = json.loads((ROOT / "tests/data/regression/solve_river_bend.json").read_text())
    binding = [k for k, v in answer["limits"].items() if v["binding"]]
    assert binding and all(k in summary for k in binding)
    failing = [t for t in answer["effects"]["thresholds"] if t["verdict"] == "fail"]
    assert failing and failing[0]["label"] in summary
    assert "Largest mismatch: weber" in summary  # weber: -99.8 %, the largest |log factor|


def test_same_input_same_bytes(tmp_path: Path) -> None:
    a, b = tmp_path / "a", tmp_path / "b"
    for folder in (a, b):
        res = _report(tmp_path / "out", "--force")
        assert res.exit_code == 0, res.output
        shutil.copytree(tmp_path / "out", folder)
    for name in ("report.html", "report.md", "figure-map.svg"):
        assert (a / name).read_bytes() == (b / name).read_bytes(), name
    html = (a / "report.html").read_text(encoding="utf-8")
    assert "2023-11-14 22:13 UTC" in html  # SOURCE_DATE_EPOCH, not the clock


def test_provenance_is_the_case_files_sha256_and_the_version(river: Path) -> None:
    from compromise import __version__

    digest = hashlib.sha256(RIVER.read_bytes()).hexdigest()  # hashlib, outside the project
    for name in ("report.html", "report.md"):
        text = (river / name).read_text(encoding="utf-8")
        assert digest in text
        assert f"compromise {__version__}" in text
        assert f"compromise report {RIVER} -o " in text


def test_nothing_to_fetch(river: Path) -> None:
    """No http(s) address anywhere in the HTML: no stylesheet, script, font or picture to load
    (figures are data URIs, the stylesheet is inline)."""
    html = (river / "report.html").read_text(encoding="utf-8")
    assert not re.search(r"https?:|//[a-z0-9.-]+\.[a-z]{2,}/", html, re.IGNORECASE)
    assert "<script" not in html and "<link" not in html
    srcs = re.findall(r'src="([^"]*)"', html)
    assert len(srcs) == 3 and all(s.startswith("data:image/svg+xml;base64,") for s in srcs)


def test_tables_and_figures_numbered_with_units(river: Path) -> None:
    html = (river / "report.html").read_text(encoding="utf-8")
    tables = re.findall(r"<table>(.*?)</table>", html, re.S)
    numbers = [int(n) for n in re.findall(r'<span class="label">Table (\d+)\.</span>', html)]
    assert numbers == list(range(1, len(tables) + 1))
    figures = [int(n) for n in re.findall(r'<span class="label">Figure (\d+)\.</span>', html)]
    assert figures == [1, 2, 3]
    for t in tables:  # a numeric column's header carries its unit, or the table a unit column
        heads = re.findall(r"<th( class=\"n\")?>(.*?)</th>", t)
        has_unit_column = any(h == "unit" for _, h in heads)
        for numeric, h in heads:
            if numeric and not has_unit_column:
                assert re.search(r"\[[^\]]+\]", h), h


def test_existing_report_needs_force(tmp_path: Path) -> None:
    assert _report(tmp_path).exit_code == 0
    before = (tmp_path / "report.html").read_bytes()
    res = _report(tmp_path, epoch="0")
    assert res.exit_code == 2
    assert res.output.count("\n") == 1 and "use --force" in res.output
    assert "Traceback" not in res.output
    assert (tmp_path / "report.html").read_bytes() == before
    res = _report(tmp_path, "--force", epoch="0")
    assert res.exit_code == 0, res.output
    assert "1970-01-01 00:00 UTC" in (tmp_path / "report.html").read_text(encoding="utf-8")


def test_output_path_that_is_a_file_is_one_line_exit_2(tmp_path: Path) -> None:
    target = tmp_path / "report.html"
    target.write_text("not a folder")
    for bad in (target, target / "sub"):
        res = _report(bad)
        assert res.exit_code == 2
        assert res.output.startswith("error: ") and res.output.count("\n") == 1
        assert "is a file" in res.output
    assert sorted(p.name for p in tmp_path.iterdir()) == ["report.html"]


def test_proposed_design_beside_the_optimum(tmp_path: Path) -> None:
    saved = tmp_path / "proposal.json"
    res = runner.invoke(app, ["evaluate", str(RIVER), "--ratio", "1:100", "--json"])
    assert res.exit_code in (0, 1), res.output  # 1: the proposal breaks a limit
    saved.write_text(res.output)
    res = _report(tmp_path / "out", "--design", str(saved))
    assert res.exit_code == 0, res.output
    md = (tmp_path / "out" / "report.md").read_text(encoding="utf-8")
    alternatives = md[md.index("## 7.") : md.index("## 8.")]
    assert "Proposed design proposal.json beside the optimum" in alternatives
    assert "horizontal ratio 1:100 (undistorted)" in alternatives
    assert "horizontal ratio 1:93.92" in alternatives  # the optimum (solve)
    summary = md[: md.index("## 2.")]
    assert "Broken limits: depth.min, reynolds.min" in summary  # as evaluate reports them


def test_us_units_in_the_tables(tmp_path: Path) -> None:
    """--units us: the case's 3 km reach is 9843 ft (1 ft = 0.3048 m exactly, NIST SP 811)."""
    res = _report(tmp_path, "--units", "us")
    assert res.exit_code == 0, res.output
    md = (tmp_path / "report.md").read_text(encoding="utf-8")
    assert "| reach | ft | 9843 | 9843 | 9843 |" in md


def test_us_units_in_the_figures(tmp_path: Path) -> None:
    """A case with display_units = "us": the front's lifted pump limit reads the case file's own
    3 ft^3/s, the map's temperature axis is in degF (cases/culvert_us.toml)."""
    case = ROOT / "cases" / "culvert_us.toml"
    res = runner.invoke(
        app, ["report", str(case), "-o", str(tmp_path)], env={"SOURCE_DATE_EPOCH": EPOCH}
    )
    assert res.exit_code == 0, res.output
    front = (tmp_path / "figure-front.svg").read_text(encoding="utf-8").replace("&lt;", "<")
    assert "case limit: discharge <= 3 cfs" in front and "m^3/s" not in front
    figure_map = (tmp_path / "figure-map.svg").read_text(encoding="utf-8")
    assert "model fluid temperature [degF]" in figure_map and "degC" not in figure_map
    assert "The figures show SI units" not in (tmp_path / "report.md").read_text(encoding="utf-8")


def test_infeasible_case_is_reported_exit_1(tmp_path: Path) -> None:
    text = RIVER.read_text().replace(
        'discharge = { max = "0.15 m^3/s" }', 'discharge = { max = "0.0001 m^3/s" }'
    )
    case = tmp_path / "tight.toml"
    case.write_text(text)
    res = runner.invoke(app, ["report", str(case), "-o", str(tmp_path / "out")])
    assert res.exit_code == 1, res.output
    md = (tmp_path / "out" / "report.md").read_text(encoding="utf-8")
    assert "Decision: none. No design satisfies every limit" in md
    assert all(f"## {i}. {t}" in md for i, (_, t) in enumerate(SECTIONS, 1))


@pytest.mark.parametrize(
    "name",
    sorted(p.stem for p in (ROOT / "cases").glob("*.toml")),
)
def test_report_of_every_bundled_case(name: str) -> None:
    """Every bundled case gives a complete document (coarse trade-offs to keep this quick)."""
    from compromise.casefile.load import load_case
    from compromise.presentation.report import build_document, render_html, render_markdown
    from compromise.review.report_data import report_data

    data = report_data(
        load_case(ROOT / "cases" / f"{name}.toml"), resolution=15, points=8, samples=20
    )
    doc = build_document(data)
    html, md = render_html(doc), render_markdown(doc)
    assert [s["id"] for s in doc["sections"]] == [ident for ident, _ in SECTIONS]
    assert all(f'<section id="{ident}"' in html for ident, _ in SECTIONS)
    assert "Caution" in md and data.case.source_sha256 in md


# --------------------------------------------------------------------------------------------
# in the browser


def _chromium(*args: str, profile: Path) -> subprocess.CompletedProcess:
    assert CHROMIUM is not None, "chromium is not installed; .ci/run installs it"
    cmd = [
        CHROMIUM,
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        f"--user-data-dir={profile}",
        "--proxy-server=127.0.0.1:9",  # a closed port: any fetch would fail
        *args,
    ]
    return subprocess.run(cmd, capture_output=True, text=True, timeout=120, check=False)


def _page_requests(netlog: Path) -> set[str]:
    """Addresses the page itself asked for (the browser's own background requests, updater and
    the like, carry no file:// origin and are left out)."""
    events = json.loads(netlog.read_text())["events"]
    urls = set()
    for e in events:
        p = e.get("params", {})
        if "url" in p and str(p.get("network_isolation_key", "")).startswith("file://"):
            urls.add(p["url"])
    return {u for u in urls if not u.startswith(("file:", "data:"))}


def _blank(png: Path) -> bool:
    import matplotlib.image as mpimg

    img = np.asarray(mpimg.imread(png))[..., :3]
    ink = np.any(img < 0.9, axis=-1).mean()  # share of pixels that are not near-white
    return bool(ink < 0.01 or img.std() < 0.02)


@browser
def test_browser_renders_every_section_without_network(river: Path, tmp_path: Path) -> None:
    url = (river / "report.html").as_uri()
    netlog = tmp_path / "net.json"
    res = _chromium(f"--log-net-log={netlog}", "--dump-dom", url, profile=tmp_path / "p")
    dom = res.stdout
    for ident, title in SECTIONS:
        assert f'<section id="{ident}"' in dom and title in dom
    assert dom.count("<img ") == 3 and "Figure 3." in dom
    assert _page_requests(netlog) == set()
    # the check can fail: a page with one remote picture is caught
    probe = tmp_path / "probe.html"
    probe.write_text(
        (river / "report.html")
        .read_text(encoding="utf-8")
        .replace("<body>", '<body><img src="http://example.invalid/probe.png">'),
        encoding="utf-8",
    )
    netlog2 = tmp_path / "net2.json"
    _chromium(f"--log-net-log={netlog2}", "--dump-dom", probe.as_uri(), profile=tmp_path / "q")
    assert _page_requests(netlog2) == {"http://example.invalid/probe.png"}


@browser
def test_browser_screenshot_is_not_blank(river: Path, tmp_path: Path) -> None:
    shot = tmp_path / "shot.png"
    _chromium(
        "--window-size=900,1400",
        f"--screenshot={shot}",
        (river / "report.html").as_uri(),
        profile=tmp_path / "p",
    )
    assert shot.is_file()
    assert not _blank(shot)
    blank = tmp_path / "blank.png"  # the check can fail: an empty page is blank
    empty = tmp_path / "empty.html"
    empty.write_text("<!DOCTYPE html><html><body></body></html>")
    _chromium(
        "--window-size=900,1400", f"--screenshot={blank}", empty.as_uri(), profile=tmp_path / "q"
    )
    assert _blank(blank)


@browser
def test_pdf_first_page_is_not_blank(tmp_path: Path) -> None:
    res = _report(tmp_path, "--pdf")
    assert res.exit_code == 0, res.output
    pdf = tmp_path / "report.pdf"
    assert pdf.read_bytes().startswith(b"%PDF-")
    subprocess.run(
        ["pdftoppm", "-png", "-r", "50", "-f", "1", "-l", "1", str(pdf), str(tmp_path / "page")],
        check=True,
        timeout=60,
    )
    (page,) = tmp_path.glob("page*.png")
    assert not _blank(page)


def test_pdf_without_chromium_says_how_to_install(tmp_path: Path, monkeypatch) -> None:
    monkeypatch.setenv("PATH", str(tmp_path / "empty"))
    res = _report(tmp_path / "out", "--pdf")
    assert res.exit_code == 2
    assert "apt-get install chromium" in res.output and res.output.count("\n") == 1
    assert not (tmp_path / "out" / "report.html").exists()
