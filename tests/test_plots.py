"""Tests of the trade-off figures (compromise.presentation.plots) and the files the commands write
(compromise.presentation.explore_tables).

The figures are checked as matplotlib objects, not only as files: axis labels carry their units
in brackets (the project's style notes, "Units"), every fluid and marker has a legend entry, the
number of points drawn equals the number of points of the front, each limit's boundary carries
its label. The files must be byte-for-byte reproducible (DEVELOPERS.md, "Conventions"). The
expected values come from the results themselves (regression of the presentation layer, which
computes nothing new); the results are validated in tests/test_tradeoffs.py.
"""

from __future__ import annotations

import csv
from pathlib import Path
from typing import Any

import numpy as np
import pytest

from compromise.casefile.load import load_case
from compromise.casefile.model import Case
from compromise.errors import CaseError
from compromise.explore.designmap import DesignMap, design_map
from compromise.explore.sensitivity import Sensitivity, weight_sensitivity
from compromise.explore.tradeoffs import Front, trace_front
from compromise.presentation.explore_tables import (
    format_front,
    format_map,
    format_sensitivity,
    write_front,
    write_map,
    write_sensitivity,
)
from compromise.presentation.plots import front_figure, map_figure, save_figure, sensitivity_figure

ROOT = Path(__file__).resolve().parent.parent


@pytest.fixture(scope="module")
def river() -> Case:
    return load_case(ROOT / "cases" / "river_bend.toml")


@pytest.fixture(scope="module")
def front(river: Case) -> Front:
    return trace_front(river, ["total", "discharge"], points=50)


@pytest.fixture(scope="module")
def dmap(river: Case) -> DesignMap:
    return design_map(river, resolution=31)


@pytest.fixture(scope="module")
def sens(river: Case) -> Sensitivity:
    return weight_sensitivity(river, samples=100, seed=1)


def _texts(ax: Any) -> list[str]:
    return [t.get_text() for t in ax.texts]


def _legend(ax_or_fig: Any) -> list[str]:
    leg = ax_or_fig.get_legend() if hasattr(ax_or_fig, "get_legend") else None
    if leg is None:
        leg = ax_or_fig.legends[0]
    return [t.get_text().replace("\n    ", " ") for t in leg.get_texts()]  # unwrapped


def test_front_figure_axes_legend_and_points(front: Front) -> None:
    fig = front_figure(front)
    ax = fig.axes[0]
    assert ax.get_xlabel() == "weighted mismatch [-]"
    assert ax.get_ylabel() == "model discharge (flood) [m^3/s]"
    entries = _legend(fig)
    n = len(front.points)
    assert f"water ({n} points)" in entries
    assert {"knee", "solver's design", "case limit: discharge <= 0.15 m^3/s"} <= set(entries)
    water = next(c for c in ax.collections if c.get_label() == f"water ({n} points)")
    assert len(water.get_offsets()) == n
    np.testing.assert_allclose(np.asarray(water.get_offsets()), front.values, rtol=1e-12)
    labels = _texts(ax)
    assert any(t.startswith("knee: water") for t in labels)
    assert any(t.startswith("chosen: water") for t in labels)
    assert "case limit: discharge <= 0.15 m^3/s (lifted)" in labels  # on the line itself
    assert "Pareto front: total vs discharge" in fig.get_suptitle()
    assert "may lie off this front" in ax.get_title(loc="left").replace("\n", " ")


def _callout_boxes(fig: Any) -> dict[str, Any]:
    fig.canvas.draw()
    r = fig.canvas.get_renderer()
    return {
        t.get_text().split(":")[0]: t.get_bbox_patch().get_window_extent(r)
        for t in fig.axes[0].texts
        if t.get_text().startswith(("knee:", "chosen:"))
    }


@pytest.mark.parametrize(
    ("case", "axes"),
    [("river_bend", ["total", "discharge"]), ("towing_tank", ["reynolds", "length"])],
)
def test_front_callouts_never_overlap_each_other_nor_the_points(case: str, axes: list[str]) -> None:
    """The knee's and the chosen design's callout boxes, from the artists' window extents:
    disjoint, inside the axes, and covering no point of the front."""
    f = trace_front(load_case(ROOT / "cases" / f"{case}.toml"), axes, points=40)
    fig = front_figure(f)
    boxes = _callout_boxes(fig)
    assert set(boxes) == {"knee", "chosen"}
    assert not boxes["knee"].overlaps(boxes["chosen"])
    ax = fig.axes[0]
    frame = ax.get_window_extent()
    pts = ax.transData.transform(np.asarray(ax.collections[0].get_offsets()))
    for box in boxes.values():
        assert frame.x0 <= box.x0 and box.x1 <= frame.x1 and frame.y0 <= box.y0 <= frame.y1
        assert not any(box.contains(x, y) for x, y in pts)


def test_front_group_axes_in_percent_or_log(river: Case) -> None:
    """A group's mismatch is shown as % off, 100 (exp|r| - 1); --mismatch log keeps |r|
    (the definition of a log-ratio, common practice)."""
    f = trace_front(river, ["reynolds", "discharge"], points=20)
    fig = front_figure(f)
    ax = fig.axes[0]
    assert ax.get_xlabel() == "reynolds: model off the prototype by [%]"
    shown = np.asarray(ax.collections[0].get_offsets())[:, 0]
    np.testing.assert_allclose(shown, 100 * (np.exp(f.values[:, 0]) - 1), rtol=1e-12)
    log = front_figure(f, "log").axes[0]
    assert log.get_xlabel() == "reynolds mismatch |ln(model/prototype)| [-]"
    np.testing.assert_allclose(np.asarray(log.collections[0].get_offsets())[:, 0], f.values[:, 0])


def test_knee_only_where_the_front_bends() -> None:
    """The knee (Das 1999: farthest from the line through the extremes) is marked only when it
    stands 5 % of that line away; the spillway's total vs discharge front is nearly straight."""
    f = trace_front(load_case(ROOT / "cases" / "spillway.toml"), ["total", "discharge"], points=30)
    assert f.knee_depth < 0.05 and not f.has_knee
    fig = front_figure(f)
    assert "knee" not in _legend(fig)
    assert not any(t.startswith("knee:") for t in _texts(fig.axes[0]))
    assert "nearly straight" in fig.axes[0].get_title(loc="left")
    assert "nearly straight" in format_front(f)


def test_front_figure_three_axes_is_one_scatter_coloured_by_the_third(river: Case) -> None:
    front3 = trace_front(river, ["total", "reach", "discharge"], points=50)
    fig = front_figure(front3)
    ax, cbar = fig.axes
    assert (ax.get_xlabel(), ax.get_ylabel()) == ("weighted mismatch [-]", "model reach [m]")
    assert cbar.get_ylabel() == "model discharge (flood) [m^3/s]"
    pts = [c for c in ax.collections if "points" in c.get_label()]
    assert sum(len(c.get_offsets()) for c in pts) == len(front3.points)
    np.testing.assert_allclose(pts[0].get_array(), front3.values[:, 2], rtol=1e-12)
    assert len(fig.legends) == 1 and ax.get_legend() is None  # one legend
    entries = _legend(fig)
    assert "case limit: reach <= 40 m" in entries
    assert "case limit: discharge <= 0.15 m^3/s (on the colour bar)" in entries
    assert "case limit: reach <= 40 m (lifted)" in _texts(ax)
    assert "case limit 0.15 m^3/s" in [t.get_text() for t in cbar.texts]


def test_map_figure_labels_every_boundary(dmap: DesignMap) -> None:
    fig = map_figure(dmap)
    ax = fig.axes[0]
    assert ax.get_xlabel() == "horizontal ratio X (model / prototype) [-]"
    assert ax.get_ylabel() == "distortion Y / X [-]"
    texts = _texts(ax)
    crossing = [b for b in dmap.boundaries if np.any(b.violation > 0) and np.any(b.violation <= 0)]
    assert len(crossing) >= 4
    entries = _legend(fig)
    hidden = " ".join(e for e in entries if e.startswith("not drawn, other limits bind first"))
    for b in crossing:
        if "@" not in b.key:  # a looser condition's line is named in its limit's entry
            # labelled on its line, or named among those other limits keep off the window
            assert b.label + ("  (binds)" if b.binding else "") in texts or (b.label in hidden)
    # one legend entry per limit, its conditions named inside
    assert "reynolds >= 4000: low (line); mean, flood (dotted)" in entries
    # the depth and velocity floors lie behind the Reynolds floor and the pump's ceiling
    assert "depth >= 0.03 m (low)" in hidden and "velocity >= 0.05 m/s (low)" in hidden
    assert len(entries) <= 10
    # every condition's boundary of a limit is drawn (the river's depth floor in three flows)
    assert {"depth >= 0.03 m (low)", "depth >= 0.03 m (mean)", "depth >= 0.03 m (flood)"} <= {
        b.label for b in dmap.boundaries
    }
    cbar = fig.axes[1]
    assert cbar.get_ylabel().startswith("weighted mismatch [-]")
    entries = _legend(fig)
    assert any(e.startswith("optimum: water") for e in entries)
    assert "outside the feasible window (ticks mark the infeasible side)" in entries
    assert "discharge <= 0.15 m^3/s: flood (line); mean (dotted)  (binds at the optimum)" in entries
    assert "distortion <= 5 [model]" in texts  # the [model] bound closing the window
    assert {"1:50", "1:75", "1:100", "1:150", "1:200"} <= set(texts)  # preferred ratios
    assert ax.get_xscale() == "log" and ax.get_xticklabels()[0].get_text().startswith("1:")


def test_map_figure_with_the_same_mismatch_everywhere() -> None:
    pipe = design_map(load_case(ROOT / "cases" / "pipe_rig.toml"), resolution=21)
    fig = map_figure(pipe)
    assert len(fig.axes) == 1  # no colour bar for a constant
    assert "feasible; weighted mismatch 0 everywhere" in _legend(fig)
    assert fig.axes[0].get_ylabel() == "model fluid temperature [degC]"


def test_sensitivity_figure_has_one_bar_per_candidate(sens: Sensitivity) -> None:
    fig = sensitivity_figure(sens)
    ax = fig.axes[0]
    bars = ax.containers[0]
    assert len(bars) == len(sens.candidates)
    widths = [b.get_width() for b in bars]
    np.testing.assert_allclose(widths, [100 * c.share for c in sens.candidates], rtol=1e-12)
    labels = [t.get_text() for t in ax.get_yticklabels()]
    assert labels == [c.label for c in sens.candidates]  # listed top to bottom
    assert list(ax.get_yticks()) == list(range(len(labels)))[::-1]
    assert ax.get_xlabel() == "share of the samples in which it is the best design [%]"
    assert any("best at the case's weights" in t for t in _texts(ax))
    assert _legend(fig) == ["water"]


def test_a_sliver_window_is_zoomed_and_full_range_keeps_the_frame() -> None:
    """The spillway's window spans 2.5 % of the horizontal-ratio range: zoomed by default onto
    it, the full range on request; the [model] temperature bounds close it at both ends."""
    case = load_case(ROOT / "cases" / "spillway.toml")
    zoomed = design_map(case, resolution=31)
    full = design_map(case, resolution=31, full_range=True)
    assert zoomed.zoomed == (True, False) and full.zoomed == (False, False)
    x_full = np.log(full.x[-1] / full.x[0])
    x_zoom = np.log(zoomed.x[-1] / zoomed.x[0])
    assert x_zoom < 0.25 * x_full
    assert full.feasible_share < 0.1 and zoomed.feasible_share > 0.15
    fig = map_figure(zoomed)
    assert "zoomed onto the feasible window" in fig.get_suptitle()
    assert "thin sliver of the horizontal_ratio range (1:100 to 1:10)" in format_map(zoomed)
    assert "sliver" not in format_map(full)
    lo, hi = fig.axes[0].get_xlim()
    assert lo == pytest.approx(zoomed.x[0]) and hi == pytest.approx(zoomed.x[-1])
    texts = _texts(fig.axes[0])
    assert {"temperature <= 25 degC [model]", "temperature >= 10 degC [model]"} <= set(texts)
    # both maps place the optimum at the same design
    assert zoomed.coordinates(zoomed.optimum) == full.coordinates(full.optimum)


def test_pressure_is_a_map_axis_for_the_pressurised_tunnel() -> None:
    """The wind tunnel lets the air's pressure vary from 1 to 8 bar: the default map is over
    the horizontal ratio and the pressure. At 1:4 and 12 degC, Reynolds is matched when the
    pressure makes nu_model = nu_air / 4 (ideal gas: nu ~ 1/p, common practice), about 4 bar,
    where the solver's optimum sits."""
    dm = design_map(load_case(ROOT / "cases" / "wind_tunnel.toml"), resolution=31)
    assert dm.axes == ("horizontal_ratio", "pressure") and dm.units[1] == "bar"
    x, p = dm.coordinates(dm.optimum)
    assert x == pytest.approx(0.25) and p == pytest.approx(4.0, rel=0.02)
    assert dm.grid(1)[0] == pytest.approx(1.0) and dm.grid(1)[-1] == pytest.approx(8.0)
    fig = map_figure(dm)
    assert fig.axes[0].get_ylabel() == "model fluid pressure [bar]"
    assert {"pressure <= 8 bar [model]", "pressure >= 1 bar [model]"} <= set(_texts(fig.axes[0]))
    with pytest.raises(CaseError, match="pressure"):
        design_map(load_case(ROOT / "cases" / "river_bend.toml"), ["horizontal_ratio", "pressure"])


def test_coincident_boundaries_stay_visible() -> None:
    """The wind tunnel's chord and span limits fall on the same horizontal ratio (0.4 m and
    0.6 m at the same 1:4): the second is dashed over the first and says so."""
    dm = design_map(load_case(ROOT / "cases" / "wind_tunnel.toml"), resolution=31)
    fig = map_figure(dm)
    texts = _texts(fig.axes[0])
    assert any(t.startswith("span <= 0.6 m") and "(on chord <= 0.4 m)" in t for t in texts)
    styles = {h.get_label(): h.get_linestyle() for h in fig.legends[0].legend_handles}
    span = next(k for k in styles if k.startswith("span"))
    assert styles[span] != styles[next(k for k in styles if k.startswith("chord"))]


def _svg_text(fig: Any, tmp_path: Path, case: Case) -> str:
    return save_figure(fig, tmp_path / "f", case)[1].read_text(encoding="utf-8")


def test_svg_text_has_every_limit_label_and_the_footer(
    front: Front, dmap: DesignMap, sens: Sensitivity, river: Case, tmp_path: Path
) -> None:
    """Figures as data: the SVG (text kept as text) names every limit drawn and carries the
    footer (title, version, short hash, caution)."""
    from compromise.review.provenance import provenance_line

    for fig in (front_figure(front), map_figure(dmap), sensitivity_figure(sens)):
        svg = _svg_text(fig, tmp_path, river)
        assert provenance_line(river).replace("^", "^") in svg.replace("&amp;", "&")
        assert "licensed engineer" in svg
    svg = _svg_text(map_figure(dmap), tmp_path, river).replace("&gt;", ">").replace("&lt;", "<")
    for b in dmap.boundaries:
        if np.any(b.violation > 0) and np.any(b.violation <= 0):
            assert b.label.rsplit(" (", 1)[0] in svg, b.label
    svg = _svg_text(front_figure(front), tmp_path, river).replace("&lt;", "<")
    assert "case limit: discharge <= 0.15 m^3/s (lifted)" in svg


def test_sensitivity_labels_stay_inside_the_figure() -> None:
    """The pipe rig's long candidate names and tied labels end inside the image."""
    sv = weight_sensitivity(load_case(ROOT / "cases" / "pipe_rig.toml"), samples=50, seed=0)
    fig = sensitivity_figure(sv)
    fig.canvas.draw()
    r = fig.canvas.get_renderer()
    page = fig.bbox
    ax = fig.axes[0]
    for t in [*ax.texts, *ax.get_yticklabels(), *fig.legends[0].get_texts()]:
        e = t.get_window_extent(r)
        assert page.x0 <= e.x0 and e.x1 <= page.x1, t.get_text()
    frame = ax.get_window_extent(r)
    assert all(t.get_window_extent(r).x1 <= frame.x1 for t in ax.texts)
    assert "every candidate is tied" in fig.get_suptitle()
    assert all(t.get_text() == "tied 100.0 %" for t in ax.texts)


def test_svg_and_png_are_byte_for_byte_reproducible(front: Front, tmp_path: Path) -> None:
    a = save_figure(front_figure(front), tmp_path / "a")
    b = save_figure(front_figure(front), tmp_path / "b")
    for pa, pb in zip(a, b, strict=True):
        assert pa.read_bytes() == pb.read_bytes()
    svg = a[1].read_text(encoding="utf-8")
    assert "<dc:date>" not in svg and "model discharge" in svg  # text kept as text


def test_written_files_and_tables(
    front: Front, dmap: DesignMap, sens: Sensitivity, tmp_path: Path
) -> None:
    paths = write_front(front, tmp_path)
    assert [p.suffix for p in paths] == [".csv", ".png", ".svg"]
    with paths[0].open(encoding="utf-8") as fh:
        rows = list(csv.reader(fh))
    assert rows[0][:3] == ["role", "total [-]", "discharge [m^3/s]"]
    assert len(rows) == 1 + len(front.points) + 1
    assert [r[0] for r in rows[1:]].count("knee") == 1 and rows[-1][0] == "chosen"
    assert all(p.stat().st_size > 1000 for p in paths[1:])
    assert len(write_map(dmap, tmp_path)) == 3
    assert len(write_sensitivity(sens, tmp_path)) == 4
    assert "knee" in format_front(front)
    assert "limits.discharge.max" in format_map(dmap)
    assert "water 1:100" in format_sensitivity(sens)


def test_caption_says_when_the_solver_design_is_on_the_front() -> None:
    """The pipe rig's Euler and roughness can both be matched (a single-point front at 0 %, the
    solver's design): the caption says it lies on the front, and why it need not."""
    f = trace_front(load_case(ROOT / "cases" / "pipe_rig.toml"), ["euler", "group:roughness"])
    assert len(f.points) == 1
    title = front_figure(f).axes[0].get_title(loc="left").replace("\n", " ")
    assert "lies on this front here; it need not" in title
    assert "single point" in title
    assert "lies on this front here" in format_front(f).replace("\n", " ")


def _nu_water(t_kelvin: float) -> float:
    """Kinematic viscosity of liquid water at 1 atm [m^2/s], IAPWS-95 through the iapws
    library (Wagner & Pruss 2002; IAPWS 2008 viscosity formulation), the oracle."""
    from iapws import IAPWS95

    w = IAPWS95(T=t_kelvin, P=0.101325)
    return float(w.mu / w.rho)


def test_front_group_axis_as_model_value_on_a_log_axis(river: Case, tmp_path: Path) -> None:
    """``--mismatch value``: the x axis is the model's Reynolds number V h / nu (Reynolds
    1883, its usual definition) on a log axis, in the river's low flow (where its floor
    applies), with the prototype's value as a line labelled "prototype" and the case's floor
    as a dashed line. The plotted values are recomputed from each design's ratios with water's
    viscosity from IAPWS-95 (iapws library); the prototype's low flow is V = 0.6 m/s,
    h = 1.1 m at 10 degC (cases/river_bend.toml)."""
    f = trace_front(river, ["reynolds", "discharge"], points=20)
    fig = front_figure(f, "value")
    ax = fig.axes[0]
    assert ax.get_xscale() == "log"
    assert ax.get_xlabel() == "reynolds in the model (low) [-]"
    shown = np.asarray(ax.collections[0].get_offsets())[:, 0]
    oracle = [
        0.6
        * pt.design.velocity_ratio
        * 1.1
        * pt.design.vertical_ratio
        / _nu_water(pt.design.temperature)
        for pt in f.points
    ]
    np.testing.assert_allclose(shown, oracle, rtol=2e-3)
    proto = 0.6 * 1.1 / _nu_water(283.15)
    # |ln(model/prototype)| of the plotted values is the front's own axis value (linear form)
    np.testing.assert_allclose(np.abs(np.log(shown / proto)), f.values[:, 0], atol=2e-3)
    refs = {t.get_gid(): t for t in ax.texts if (t.get_gid() or "").startswith("reference:")}
    assert set(refs) == {
        "reference:reynolds:prototype",
        "reference:reynolds:case limit: reynolds >= 4000",
    }
    lines = {round(float(ln.get_xdata()[0]), 6): ln.get_linestyle() for ln in ax.lines}
    assert any(abs(x / proto - 1) < 2e-3 and ls == "-." for x, ls in lines.items())
    assert lines.get(4000.0) == "--"
    lo, hi = ax.get_xlim()
    assert lo < 4000 and proto < hi  # the floor and the prototype's value are in view
    svg = _svg_text(fig, tmp_path, river).replace("&gt;", ">")  # the SVG keeps the words
    assert "prototype" in svg and "reynolds in the model (low)" in svg
    assert "case limit: reynolds >= 4000" in svg


def test_front_value_axes_within_two_decades_read_as_plain_numbers() -> None:
    """Both groups of the heron reach front shown as model values: each axis spans a few
    percent, so its log-axis ticks read as plain numbers (0.61, not 6.1 x 10^-1), and the two
    "prototype" labels, whose lines meet near a corner, do not overlap (window extents)."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    case = load_case(ROOT / "cases" / "heron_reach.toml")
    f = trace_front(case, ["shields", "particle_reynolds"], points=20)
    fig = front_figure(f, "value")
    FigureCanvasAgg(fig).draw()
    ax = fig.axes[0]
    assert ax.get_xscale() == "log" and ax.get_yscale() == "log"
    labels = [t.get_text() for t in ax.get_xticklabels(minor=True) + ax.get_yticklabels()]
    labels = [t for t in labels if t]
    assert labels and not any("times" in t or "^" in t for t in labels)
    refs = [t for t in ax.texts if (t.get_gid() or "").endswith(":prototype")]
    assert len(refs) == 2
    r = fig.canvas.get_renderer()
    a, b = (t.get_window_extent(r) for t in refs)
    assert not a.overlaps(b)


def _boundary_lines(fig: Any) -> dict[str, np.ndarray]:
    """The vertices of every drawn boundary (artists tagged ``boundary:KEY``), per limit."""
    out: dict[str, list[np.ndarray]] = {}
    for ln in fig.axes[0].lines:
        gid = ln.get_gid() or ""
        if gid.startswith("boundary:"):
            out.setdefault(gid.split(":", 1)[1], []).append(np.asarray(ln.get_xydata()))
    return {k: np.vstack(v) for k, v in out.items()}


def test_temperature_axis_draws_each_limit_where_it_binds() -> None:
    """The culvert's map over the ratio and the water temperature. Every vertex of every
    drawn boundary is re-evaluated as a design (a Froude model with no distortion: at ratio X,
    Y = X and V = sqrt(X), Froude 1880s similitude, common practice), with the fluids' source
    property models: there that limit holds with (almost) no slack and no other limit is
    violated. The Reynolds floor binds in cold water along a curve (the viscosity falls as the
    water warms, so a smaller model suffices) and stops where the Weber floor takes over: it is
    not drawn in warm water, where it would run through cells the Weber floor excludes."""
    from compromise.solving.design import Design, evaluate_design

    case = load_case(ROOT / "cases" / "culvert_si.toml")
    dm = design_map(case, ["horizontal_ratio", "temperature"], resolution=31)
    fig = map_figure(dm)
    lines = _boundary_lines(fig)
    assert {"groups.reynolds.min", "groups.weber.min", "limits.discharge.max"} <= set(lines)
    for key, pts in lines.items():
        name, kind = key.split(".")[1:3]
        for x, t in pts[:: max(1, len(pts) // 12)]:
            ev = evaluate_design(case, Design("water", t + 273.15, 101325.0, x, x, x**0.5))
            worst = ev.worst_limits()
            assert abs(worst[f"{name}.{kind}"][1].margin) < 0.01, (key, x, t)
            assert min(v.margin for _, v in worst.values()) > -0.01, (key, x, t)
    re = lines["groups.reynolds.min"]
    assert np.ptp(np.log(re[:, 0])) > 0.02  # a curve in X, not a vertical line
    assert re[:, 1].min() <= 10.0 + 1e-6 and re[:, 1].max() < 15.0  # cold water only
    full = dm.boundaries[[b.key for b in dm.boundaries].index("groups.reynolds.min")]
    assert np.any(full.violation[-1] > 0) and np.any(full.violation[-1] <= 0)  # crosses at 25 C
    # the depth floor lies behind the Weber floor everywhere: named, not drawn
    assert "limits.depth.min" not in lines
    assert any(e.startswith("not drawn, other limits bind first: depth") for e in _legend(fig))


def _rho_water(t_kelvin: float) -> float:
    """Density of liquid water at 1 atm [kg/m^3], IAPWS-95 (iapws library), the oracle."""
    from iapws import IAPWS95

    return float(IAPWS95(T=t_kelvin, P=0.101325).rho)


def test_granular_map_draws_the_armour_reynolds_floor_along_its_curve() -> None:
    """The breakwater's map over the ratio and the basin water's temperature draws each
    limit's boundary (it drew none). In an undistorted Froude model with the stability number
    H / (Delta D) kept exactly (Hudson 1959, from memory), the model wave height is 5 m x X
    and the armour size D = H / (Delta Ns), so the armour Reynolds number sqrt(g H) D / nu is
    proportional to X^1.5 / (nu Delta) with Delta = rho_s / rho - 1: along the floor
    Re = 3e4 the product X^1.5 / (nu(T) Delta(T)) is constant, with water's nu and rho from
    IAPWS-95 (iapws library) and the model stone's 2650 kg/m^3 (crushed granite of the
    material catalogue). The line is therefore slanted, not vertical."""
    from compromise.physics.materials import get_material

    dm = design_map(load_case(ROOT / "cases" / "breakwater.toml"), resolution=41)
    assert dm.axes == ("horizontal_ratio", "temperature")
    assert dm.optimum is not None and dm.optimum.material is not None
    rho_s = get_material(dm.optimum.material).density
    lines = _boundary_lines(map_figure(dm))
    assert {"groups.armour_reynolds.min", "limits.wave_height.max"} <= set(lines)
    re = lines["groups.armour_reynolds.min"]
    assert re[:, 1].min() <= 15.0 + 1e-6 and re[:, 1].max() >= 22.0 - 1e-6  # binds throughout
    k = [x**1.5 / (_nu_water(t + 273.15) * (rho_s / _rho_water(t + 273.15) - 1.0)) for x, t in re]
    assert np.ptp(np.log(k)) < 0.01
    assert np.ptp(np.log(re[:, 0])) > 0.05  # a warmer basin allows a smaller model


def test_granular_sliver_window_is_zoomed_between_its_two_limits() -> None:
    """The heron reach's window over the ratio is the sliver between the depth floor and the
    hall's length: depth 3 m x X x distortion >= 7 cm with the distortion at most 5 gives
    X >= 0.07 / 15 = 1:214.3, and the 6 km reach x X <= 30 m gives X <= 1:200
    (cases/heron_reach.toml, arithmetic). The map zooms onto it, and the two limits' lines
    sit at those ratios."""
    dm = design_map(load_case(ROOT / "cases" / "heron_reach.toml"), resolution=41)
    assert dm.zoomed == (True, False) and dm.feasible_share > 0.2
    assert dm.x[0] < 1 / 214.3 and 1 / 200 < dm.x[-1] and dm.x[-1] / dm.x[0] < 1.5
    lines = _boundary_lines(map_figure(dm))
    np.testing.assert_allclose(lines["limits.depth.min"][:, 0], 0.07 / 15, rtol=1e-3)
    np.testing.assert_allclose(lines["limits.reach_length.max"][:, 0], 1 / 200, rtol=1e-3)
    assert "the map is zoomed onto it" in format_map(dm)
