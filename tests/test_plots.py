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
    return [t.get_text() for t in leg.get_texts()]


def test_front_figure_axes_legend_and_points(front: Front) -> None:
    fig = front_figure(front)
    ax = fig.axes[0]
    assert ax.get_xlabel() == "weighted mismatch [-]"
    assert ax.get_ylabel() == "model discharge (flood) [m^3/s]"
    entries = _legend(ax)
    n = len(front.points)
    assert f"water ({n} points)" in entries
    assert {"knee", "solver's design", "case limit: discharge <= 0.15 m^3/s"} <= set(entries)
    water = next(c for c in ax.collections if c.get_label() == f"water ({n} points)")
    assert len(water.get_offsets()) == n
    np.testing.assert_allclose(np.asarray(water.get_offsets()), front.values, rtol=1e-12)
    labels = _texts(ax)
    assert any(t.startswith("knee: water") for t in labels)
    assert any(t.startswith("chosen: water") for t in labels)
    assert "Pareto front: total vs discharge" in fig.get_suptitle()


def test_front_figure_three_axes_draws_the_pairwise_projections(river: Case) -> None:
    front3 = trace_front(river, ["total", "reach", "discharge"], points=50)
    fig = front_figure(front3)
    axs = fig.axes
    assert len(axs) == 3
    pairs = [(a.get_xlabel(), a.get_ylabel()) for a in axs]
    assert pairs == [
        ("weighted mismatch [-]", "model reach [m]"),
        ("weighted mismatch [-]", "model discharge (flood) [m^3/s]"),
        ("model reach [m]", "model discharge (flood) [m^3/s]"),
    ]
    for a in axs:
        drawn = sum(len(c.get_offsets()) for c in a.collections if "points" in c.get_label())
        assert drawn == len(front3.points)


def test_map_figure_labels_every_boundary(dmap: DesignMap) -> None:
    fig = map_figure(dmap)
    ax = fig.axes[0]
    assert ax.get_xlabel() == "horizontal ratio X (model / prototype) [-]"
    assert ax.get_ylabel() == "distortion Y / X [-]"
    texts = _texts(ax)
    crossing = [b for b in dmap.boundaries if np.any(b.violation > 0) and np.any(b.violation <= 0)]
    assert len(crossing) >= 4
    entries = _legend(fig)
    for b in crossing:
        if "@" in b.key:  # the same limit in a looser condition: in the legend only
            assert b.label in entries
        else:
            assert b.label + ("  (binds)" if b.binding else "") in texts
    # every condition's boundary of a limit is drawn (the river's depth floor in three flows)
    assert {"depth >= 0.03 m (low)", "depth >= 0.03 m (mean)", "depth >= 0.03 m (flood)"} <= {
        b.label for b in dmap.boundaries
    }
    cbar = fig.axes[1]
    assert cbar.get_ylabel().startswith("weighted mismatch [-]")
    entries = _legend(fig)
    assert any(e.startswith("optimum: water") for e in entries)
    assert "outside the feasible window (ticks mark the infeasible side)" in entries
    assert "discharge <= 0.15 m^3/s (flood)  (binds at the optimum)" in entries
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
    assert _legend(ax) == ["water"]


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
