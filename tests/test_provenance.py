"""Every result that feeds a design carries the caution and its provenance (issue 10, part 4).

Behaviour a user relies on: the JSON of ``tradeoff``, ``map`` and ``sensitivity`` carries the
caution and the case's title, the tool's version and the SHA-256 of the case file (checked
against ``hashlib`` on the file's bytes); their text ends with the caution; every figure has a
footer with the same and its PNG and SVG metadata carry it, and the files stay byte-for-byte
reproducible.
"""

from __future__ import annotations

import hashlib
import json
import tomllib
from pathlib import Path

import pytest
from PIL import Image
from typer.testing import CliRunner

from compromise import __version__
from compromise.casefile.load import case_from_dict, load_case
from compromise.cli import app
from compromise.explore.sensitivity import weight_sensitivity
from compromise.explore.tradeoffs import trace_front
from compromise.presentation.figures import save_figure
from compromise.presentation.plots import front_figure, sensitivity_figure
from compromise.review.wording import caution_line

ROOT = Path(__file__).resolve().parent.parent
RIVER = ROOT / "cases" / "river_bend.toml"
RIVER_SHA = hashlib.sha256(RIVER.read_bytes()).hexdigest()


@pytest.fixture(scope="module")
def runner() -> CliRunner:
    return CliRunner()


def test_case_carries_the_sha256_of_its_file() -> None:
    assert load_case(RIVER).source_sha256 == RIVER_SHA


def test_case_from_a_dictionary_hashes_its_canonical_json() -> None:
    data = tomllib.loads(RIVER.read_text(encoding="utf-8"))
    want = hashlib.sha256(
        json.dumps(data, sort_keys=True, separators=(",", ":"), ensure_ascii=False).encode()
    ).hexdigest()
    a = case_from_dict(data)
    b = case_from_dict(dict(reversed(list(data.items()))))  # key order does not matter
    assert a.source_sha256 == b.source_sha256 == want
    data["title"] = "another title"
    assert case_from_dict(data).source_sha256 != want


@pytest.mark.parametrize(
    "args",
    [
        ["tradeoff", str(RIVER), "--between", "total", "discharge", "--points", "6"],
        ["map", str(RIVER), "--resolution", "11"],
        ["sensitivity", str(RIVER), "--samples", "10"],
    ],
)
def test_explore_commands_carry_caution_and_provenance(
    runner: CliRunner, tmp_path: Path, args: list[str]
) -> None:
    res = runner.invoke(app, [*args, "-o", str(tmp_path), "--json"])
    assert res.exit_code == 0, res.output
    out = json.loads(res.output)
    assert out["caution"] == caution_line()
    assert out["provenance"] == {
        "case": "Alder River at Millbrook: fixed-bed flood model",
        "tool": f"compromise {__version__}",
        "case_sha256": RIVER_SHA,
    }
    assert list(out)[:3] == ["title", "caution", "provenance"]
    text = runner.invoke(app, [*args, "-o", str(tmp_path)])
    assert text.exit_code == 0 and "Traceback" not in text.output
    body = text.output.split("\nWrote: ")[0]
    assert " ".join(body.split()).endswith(caution_line())
    for png in tmp_path.glob("*.png"):
        info = Image.open(png).info
        assert info["Source"] == f"case file SHA-256 {RIVER_SHA}", png
        assert info["Disclaimer"] == caution_line()
        assert info["Software"] == f"compromise {__version__}"
    for svg in tmp_path.glob("*.svg"):
        content = svg.read_text(encoding="utf-8")
        assert f"<dc:source>case file SHA-256 {RIVER_SHA}</dc:source>" in content
        assert "<dc:date>" not in content and "Matplotlib" not in content
        assert RIVER_SHA[:12] in content  # the footer, kept as text


def test_figure_footer_says_where_it_came_from() -> None:
    river = load_case(RIVER)
    for fig in (
        front_figure(trace_front(river, ["total", "discharge"], points=6)),
        sensitivity_figure(weight_sensitivity(river, samples=10)),
    ):
        footer = fig.texts[-1].get_text()
        assert footer.splitlines()[0] == (
            f"{river.title} | compromise {__version__} | case sha256 {RIVER_SHA[:12]}"
        )
        assert " ".join(footer.splitlines()[1:]) == caution_line()


def test_saved_figures_are_reproducible_with_their_metadata(tmp_path: Path) -> None:
    river = load_case(RIVER)
    front = trace_front(river, ["total", "discharge"], points=6)
    a = save_figure(front_figure(front), tmp_path / "a", river)
    b = save_figure(front_figure(front), tmp_path / "b", river)
    for pa, pb in zip(a, b, strict=True):
        assert pa.read_bytes() == pb.read_bytes()
    info = Image.open(a[0]).info
    assert info["Title"] == river.title
    assert RIVER_SHA[:12] in info["Description"]
