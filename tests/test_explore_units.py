"""The trade-off explorer's commands (tradeoff, map, sensitivity) in the display unit system.

Independent sources: the case files themselves (``cases/culvert_us.toml`` writes its limits in
feet, cfs and inches, ``cases/culvert_si.toml`` is the same case converted exactly to SI), the
definitions of the units (1 ft = 0.3048 m, 1 in = 0.0254 m, 1 lbf/in^2 from the avoirdupois
pound and standard gravity, NIST SP 811 appendix B; pint's registry as a second source) and of
the Fahrenheit scale (F = C x 9/5 + 32). Behaviour users rely on: ``--json`` stays SI, CSV
files follow only an explicit ``--units``, SI output is what it was.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pint
import pytest
from numpy.testing import assert_allclose
from typer.testing import CliRunner

from compromise.casefile.load import load_case
from compromise.cli import app
from compromise.explore.designmap import design_map
from compromise.explore.tradeoffs import trace_front
from compromise.presentation.explore_display import boundary_label, shown_front
from compromise.presentation.explore_tables import format_front
from compromise.presentation.plots import map_figure

ROOT = Path(__file__).resolve().parents[1]
CASES = ROOT / "cases"
CULVERT_US = str(CASES / "culvert_us.toml")  # display_units = "us"
CULVERT_SI = str(CASES / "culvert_si.toml")
runner = CliRunner()
FT = 0.3048  # [m] by definition


def run(*args: str) -> str:
    result = runner.invoke(app, list(args))
    assert "Traceback" not in result.output
    assert result.exit_code == 0, result.output
    return result.stdout


def _limit_rows(text: str) -> dict[str, str]:
    """``{key: label}`` of the limit table of ``map``'s text output."""
    table = text.split("limit ")[1].split("\n\n")[0].splitlines()[2:]
    rows = {}
    for line in table:
        label, key = line.split("  ")[0].strip(), line.split()[-3 if line.endswith("yes") else -2]
        rows[key] = label
    return rows


@pytest.fixture(scope="module")
def culvert_map(tmp_path_factory: pytest.TempPathFactory) -> dict[str, str]:
    out = tmp_path_factory.mktemp("map")
    return {
        units: run("map", CULVERT_US, "--resolution", "21", "-o", str(out / units), *flag)
        for units, flag in (("us", []), ("si", ["--units", "si"]))
    }


def test_map_limit_labels_read_the_us_case_files_numbers(culvert_map: dict[str, str]) -> None:
    """cases/culvert_us.toml: barrel width 2 ft, apron 12 ft, pump 3 ft^3/s, depth 1.5 in."""
    rows = _limit_rows(culvert_map["us"])
    assert rows["limits.barrel_width.max"] == "barrel_width <= 2 ft"
    assert rows["limits.apron_length.max"] == "apron_length <= 12 ft"
    assert rows["limits.discharge.max"] == "discharge <= 3 cfs (design)"
    assert rows["limits.discharge.max@frequent"] == "discharge <= 3 cfs (frequent)"
    assert rows["limits.depth.min"] == "depth >= 1.5 in (frequent)"
    assert rows["groups.reynolds.min"] == "reynolds >= 2e+04 (frequent)"  # dimensionless
    assert "degC" not in culvert_map["us"] and "77.0 degF" in culvert_map["us"]


def test_map_limit_labels_in_si_read_the_si_twins_numbers(culvert_map: dict[str, str]) -> None:
    """cases/culvert_si.toml: the same limits, 0.6096 m, 3.658 m (3.6576), 0.08495 m^3/s."""
    rows = _limit_rows(culvert_map["si"])
    assert rows["limits.barrel_width.max"] == "barrel_width <= 0.6096 m"
    assert rows["limits.apron_length.max"] == "apron_length <= 3.658 m"
    assert rows["limits.discharge.max"] == "discharge <= 0.08495 m^3/s (design)"
    assert rows["limits.depth.min"] == "depth >= 0.0381 m (frequent)"
    assert "25.0 degC" in culvert_map["si"] and "degF" not in culvert_map["si"]


def test_boundary_label_in_si_is_the_maps_own_label() -> None:
    dmap = design_map(load_case(CULVERT_SI), resolution=15)
    assert dmap.boundaries
    for b in dmap.boundaries:
        assert boundary_label(b, "si") is b.label


def test_temperature_ticks_in_degf_sit_at_their_degc_positions() -> None:
    """F = C x 9/5 + 32: each degF tick label at the degC data coordinate it stands for."""
    dmap = design_map(load_case(CULVERT_US), resolution=15)
    assert dmap.axes[1] == "temperature"
    ax = map_figure(dmap, "us").axes[0]
    assert ax.get_ylabel() == "model fluid temperature [degF]"
    ticks = ax.yaxis.get_majorticklocs()
    labels = [t.get_text() for t in ax.yaxis.get_majorticklabels()]
    assert len(ticks) >= 3
    assert_allclose([float(x) for x in labels], np.asarray(ticks) * 9 / 5 + 32, atol=1e-9)
    lo, hi = ax.get_ylim()  # the case's model range, 50 to 77 degF
    assert_allclose([lo * 9 / 5 + 32, hi * 9 / 5 + 32], [50.0, 77.0], atol=1e-9)
    frame = [t.get_text() for t in ax.texts if "[model]" in t.get_text()]
    assert "temperature <= 77 degF [model]" in frame


def test_pressure_ticks_in_psi_sit_at_their_bar_positions() -> None:
    """A gas at pressure: psi ticks on the bar axis; 1 bar = 14.50377 psi (pint)."""
    psi_per_bar = pint.UnitRegistry().Quantity(1, "bar").to("psi").magnitude
    dmap = design_map(load_case(CASES / "wind_tunnel.toml"), resolution=13)
    assert dmap.axes[1] == "pressure"
    ax = map_figure(dmap, "us").axes[0]
    assert ax.get_ylabel() == "model fluid pressure [psi]"
    labels = [float(t.get_text()) for t in ax.yaxis.get_majorticklabels()]
    assert_allclose(labels, np.asarray(ax.yaxis.get_majorticklocs()) * psi_per_bar, rtol=1e-9)


@pytest.fixture(scope="module")
def culvert_front():  # type: ignore[no-untyped-def]
    return trace_front(load_case(CULVERT_US), ["total", "discharge"], points=8)


def test_front_quantity_axis_is_si_times_the_exact_factor(culvert_front) -> None:  # type: ignore[no-untyped-def]
    """1 ft^3 = 0.3048^3 m^3 by definition; the total mismatch and the designs untouched."""
    us = shown_front(culvert_front, "us")
    assert [a.unit for a in us.axes] == ["-", "cfs"]
    assert_allclose(us.values[:, 1], culvert_front.values[:, 1] / FT**3, rtol=1e-14)
    assert np.array_equal(us.values[:, 0], culvert_front.values[:, 0])
    assert [p.design for p in us.points] == [p.design for p in culvert_front.points]
    assert us.knee == culvert_front.knee and us.has_knee == culvert_front.has_knee
    assert us.axes[1].case_bound == pytest.approx(3.0, rel=1e-12)  # the case file's 3 ft^3/s
    assert shown_front(culvert_front, "si") is culvert_front
    text = format_front(culvert_front, system="us")
    assert "discharge [cfs]" in text and "T [degF]" in text
    assert "The case's limit discharge <= 3 cfs is lifted" in text
    assert "m^3/s" not in text and "degC" not in text


def test_front_small_values_in_inches() -> None:
    """A model depth under a foot is shown in inches (1 in = 0.0254 m), as solve's tables do."""
    front = trace_front(load_case(CULVERT_US), ["total", "depth"], points=6)
    us = shown_front(front, "us")
    assert float(np.max(front.values[:, 1])) < FT  # every model depth under a foot
    assert us.axes[1].unit == "in"
    assert_allclose(us.values[:, 1], front.values[:, 1] / 0.0254, rtol=1e-14)


def test_json_stays_si_and_csv_follows_only_explicit_units(tmp_path: Path) -> None:
    args = ["tradeoff", CULVERT_US, "--between", "total", "discharge", "--points", "8"]
    default = run(*args, "--json", "-o", str(tmp_path / "a"))
    assert default == run(*args, "--json", "--units", "us", "-o", str(tmp_path / "b"))
    assert json.loads(default)["units"] == ["-", "m^3/s"]
    run(*args, "-o", str(tmp_path / "default"))  # the case's display_units: text in US
    run(*args, "-o", str(tmp_path / "si"), "--units", "si")
    run(*args, "-o", str(tmp_path / "us"), "--units", "us")
    name = "tradeoff_total_discharge.csv"
    default_csv = (tmp_path / "default" / name).read_text()
    assert default_csv == (tmp_path / "si" / name).read_text()
    us_csv = (tmp_path / "us" / name).read_text().splitlines()
    si_csv = default_csv.splitlines()
    assert us_csv[0].startswith("role,total [-],discharge [cfs],fluid,temperature [degF],")
    si_row, us_row = si_csv[1].split(","), us_csv[1].split(",")
    assert_allclose(float(us_row[2]), float(si_row[2]) / FT**3, rtol=1e-14)
    assert_allclose(float(us_row[4]), float(si_row[4]) * 9 / 5 + 32, rtol=1e-14)


def test_map_and_sensitivity_json_and_csv(tmp_path: Path) -> None:
    for cmd, extra, csv_name in (
        ("map", ["--resolution", "15"], "map_horizontal_ratio_temperature.csv"),
        ("sensitivity", ["--samples", "20"], "sensitivity_samples.csv"),
    ):
        a = run(cmd, CULVERT_US, *extra, "--json", "-o", str(tmp_path / cmd / "a"))
        b = run(cmd, CULVERT_US, *extra, "--json", "--units", "us", "-o", str(tmp_path / cmd))
        assert a == b
        run(cmd, CULVERT_US, *extra, "-o", str(tmp_path / cmd / "default"))
        run(cmd, CULVERT_US, *extra, "-o", str(tmp_path / cmd / "us"), "--units", "us")
        default = (tmp_path / cmd / "default" / csv_name).read_text()
        assert default == (tmp_path / cmd / "a" / csv_name).read_text()
        assert "degF" not in default
        assert "temperature [degF]" in (tmp_path / cmd / "us" / csv_name).read_text()


def test_sensitivity_ranges_in_degf(tmp_path: Path) -> None:
    """The optimum sits at the case's warmest model water, 77 degF (cases/culvert_us.toml)."""
    text = run("sensitivity", CULVERT_US, "--samples", "20", "-o", str(tmp_path))
    row = next(x for x in text.splitlines() if x.startswith("temperature"))
    assert row.split()[:3] == ["temperature", "[degF]", "77"]


def test_a_zoomed_pressure_axis_is_named_in_bar_and_psi() -> None:
    """The sentence about a zoomed axis gives the pressure range in the map's unit (bar; psi
    in US units), not as a scale ratio: 2e5 Pa = 2 bar, 8e5 Pa = 8 bar (1 bar = 1e5 Pa by
    definition) = 29.01 and 116 psi (1 psi = 6894.757 Pa, NIST SP 811, from memory)."""
    import dataclasses

    from compromise.presentation.explore_tables import format_map

    dmap = design_map(load_case(ROOT / "cases" / "wind_tunnel.toml"), resolution=11)
    assert dmap.axes[1] == "pressure"
    zoomed = dataclasses.replace(
        dmap, zoomed=(False, True), full_ranges=(dmap.full_ranges[0], (2e5, 8e5))
    )
    assert "pressure range (2 to 8 bar)" in format_map(zoomed)
    assert "pressure range (29.01 to 116 psi)" in format_map(zoomed, "us")
