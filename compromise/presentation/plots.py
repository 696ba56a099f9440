"""Figures of the trade-off tools: fronts, design-space maps, weight sensitivity.

Matplotlib is imported inside the functions (Agg canvas, no pyplot state), so importing this
module is cheap. Every figure function returns a :class:`matplotlib.figure.Figure` whose footer
carries the case's provenance and the caution; :func:`save_figure`
(:mod:`compromise.presentation.figures`) writes it as PNG and SVG, byte-for-byte reproducible,
with the same provenance in the files' metadata.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np

from compromise.presentation.figures import add_footer, new_figure, save_figure, short_label
from compromise.presentation.front_plot import front_figure
from compromise.presentation.map_lines import split_at_other_limits
from compromise.presentation.sensitivity_plot import sensitivity_figure

__all__ = ["front_figure", "map_figure", "save_figure", "sensitivity_figure", "short_label"]
from compromise.presentation.tables import fmt
from compromise.units import format_ratio

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

    from compromise.explore.designmap import DesignMap

LINE_STYLES = ("-", "--", "-.", ":")


# --------------------------------------------------------------------------------------------
# the design-space map


def _nice_ratios(lo: float, hi: float) -> list[float]:
    out = []
    for e in range(-6, 4):
        for m in (1, 2, 3, 5):
            r = 1.0 / (m * 10.0**e)
            if lo * (1 - 1e-9) <= r <= hi * (1 + 1e-9):
                out.append(r)
    return sorted(out)


def _round_ratios(lo: float, hi: float) -> list[float]:
    """Ratios 1:n with n a multiple of a round step, four to eight of them in [lo, hi]."""
    d_lo, d_hi = 1.0 / hi, 1.0 / lo
    for e in range(-3, 6):
        for m in (1, 2, 5):
            step = m * 10.0**e
            n = np.arange(np.ceil(d_lo / step), np.floor(d_hi / step) + 1) * step
            if len(n) <= 8:
                return sorted(1.0 / n[n > 0]) if len(n) >= 3 else []
    return []


def _ratio_axis(ax: Axes, which: str, lo: float, hi: float) -> None:
    from matplotlib.ticker import FixedLocator, FuncFormatter, NullLocator

    axis = ax.xaxis if which == "x" else ax.yaxis
    (ax.set_xscale if which == "x" else ax.set_yscale)("log")
    ticks = _nice_ratios(lo, hi)
    if len(ticks) < 4:  # a zoomed axis: round denominators at a step giving a few ticks
        ticks = _round_ratios(lo, hi) or sorted({lo, hi, *ticks})
    axis.set_major_locator(FixedLocator(ticks))
    axis.set_minor_locator(NullLocator())
    axis.set_major_formatter(FuncFormatter(lambda v, _: format_ratio(v)))


def _distortion_axis(ax: Axes, which: str, lo: float, hi: float) -> None:
    from matplotlib.ticker import FixedLocator, FuncFormatter, NullLocator

    axis = ax.xaxis if which == "x" else ax.yaxis
    (ax.set_xscale if which == "x" else ax.set_yscale)("log")
    steps = (0.1, 0.2, 0.3, 0.5, 0.7, 1, 1.5, 2, 3, 4, 5, 7, 10, 15, 20, 30, 50, 70, 100, 150, 200)
    ticks = [t for t in steps if lo - 1e-9 <= t <= hi + 1e-9]
    axis.set_major_locator(FixedLocator(ticks or [lo, hi]))
    axis.set_minor_locator(NullLocator())
    axis.set_major_formatter(FuncFormatter(lambda v, _: f"{v:g}"))


def _grain_axis(ax: Axes, which: str, lo: float, hi: float) -> None:
    from matplotlib.ticker import FixedLocator, FuncFormatter, NullLocator

    axis = ax.xaxis if which == "x" else ax.yaxis
    (ax.set_xscale if which == "x" else ax.set_yscale)("log")
    steps = (0.05, 0.1, 0.2, 0.5, 1, 2, 5, 10, 20, 50, 100, 200, 500)
    ticks = [t for t in steps if lo - 1e-9 <= t <= hi + 1e-9]
    axis.set_major_locator(FixedLocator(ticks if len(ticks) >= 2 else [lo, hi]))
    axis.set_minor_locator(NullLocator())
    axis.set_major_formatter(FuncFormatter(lambda v, _: f"{v:g}"))


#: nice pressures for the ticks of a pressure axis in US units [psi]
PSI_STEPS = (1, 2, 5, 10, 15, 20, 30, 50, 70, 100, 150, 200, 300, 500, 700, 1000, 1500, 2000)


def _fahrenheit_axis(ax: Axes, which: str, lo: float, hi: float) -> None:
    """A temperature axis drawn in degC (the map's data) ticked at round degF values."""
    from matplotlib.ticker import FixedFormatter, FixedLocator, MaxNLocator, NullLocator

    from compromise.presentation.display import celsius_to
    from compromise.presentation.explore_display import fahrenheit_to_celsius

    axis = ax.xaxis if which == "x" else ax.yaxis
    f_lo, f_hi = celsius_to(lo, "us")[0], celsius_to(hi, "us")[0]
    ticks = MaxNLocator(nbins=6, steps=[1, 2, 2.5, 5, 10]).tick_values(f_lo, f_hi)
    eps = 1e-9 * max(1.0, abs(f_lo), abs(f_hi))
    ticks = [float(t) for t in ticks if f_lo - eps <= t <= f_hi + eps]
    axis.set_major_locator(FixedLocator([fahrenheit_to_celsius(t) for t in ticks]))
    axis.set_major_formatter(FixedFormatter([f"{t:g}" for t in ticks]))
    axis.set_minor_locator(NullLocator())


def _psi_axis(ax: Axes, which: str, lo: float, hi: float) -> None:
    """A pressure axis drawn in bar (the map's data) on a log scale, ticked at round psi."""
    from matplotlib.ticker import FixedFormatter, FixedLocator, NullLocator

    from compromise.presentation.display import US
    from compromise.presentation.explore_display import BAR

    axis = ax.xaxis if which == "x" else ax.yaxis
    (ax.set_xscale if which == "x" else ax.set_yscale)("log")
    per_bar = BAR * US["Pa"][1]  # psi in one bar
    p_lo, p_hi = lo * per_bar, hi * per_bar
    ticks: list[float] = [t for t in PSI_STEPS if p_lo * (1 - 1e-9) <= t <= p_hi * (1 + 1e-9)]
    labels = [f"{t:g}" for t in ticks]
    if len(ticks) < 2:
        ticks, labels = [p_lo, p_hi], [fmt(p_lo), fmt(p_hi)]
    axis.set_major_locator(FixedLocator([t / per_bar for t in ticks]))
    axis.set_major_formatter(FixedFormatter(labels))
    axis.set_minor_locator(NullLocator())


def _unit_coords(dmap: DesignMap, x: np.ndarray, y: np.ndarray) -> np.ndarray:
    """Points of the map in [0, 1]^2 (log axes for ratios), for placing labels."""
    out = []
    for which, v in ((0, x), (1, y)):
        g = dmap.grid(which)
        if dmap.axes[which] == "temperature":
            out.append((v - g[0]) / (g[-1] - g[0]))
        else:
            out.append(np.log(v / g[0]) / np.log(g[-1] / g[0]))
    return np.column_stack(out)


def _fill_nan(a: np.ndarray, passes: int = 4) -> np.ndarray:
    """``a`` with nan cells next to finite ones filled by their neighbours' mean (so a filled
    contour reaches the window's smooth edge before it is clipped)."""
    a = a.copy()
    for _ in range(passes):
        nan = ~np.isfinite(a)
        if not nan.any():
            break
        p = np.pad(a, 1, constant_values=np.nan)
        nb = np.stack([p[:-2, 1:-1], p[2:, 1:-1], p[1:-1, :-2], p[1:-1, 2:]])
        cnt = np.sum(np.isfinite(nb), axis=0)
        mean = np.nansum(np.where(np.isfinite(nb), nb, 0.0), axis=0) / np.maximum(cnt, 1)
        a = np.where(nan & (cnt > 0), mean, a)
    return a


def map_figure(dmap: DesignMap, system: str = "si") -> Figure:
    """The feasible window (each boundary labelled with its limit, ticks on the infeasible side),
    filled contours of the weighted mismatch, the optimum and the preferred ratios. In US units
    (``system="us"``) the limits on quantities, a temperature axis (degF ticks on the degC data)
    and a pressure axis (psi ticks on the bar data) are shown in US customary units."""
    from matplotlib import patheffects
    from matplotlib.colors import LogNorm
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch, PathPatch, Rectangle
    from matplotlib.path import Path as MPath
    from matplotlib.ticker import FuncFormatter

    from compromise.presentation.explore_display import boundary_label, map_axis

    fig = new_figure(9.4, 7.4)
    ax = fig.subplots()
    X, Y = dmap.grid(0), dmap.grid(1)
    gx, gy = np.meshgrid(X, Y)
    for which, axis_name, g in (("x", dmap.axes[0], X), ("y", dmap.axes[1], Y)):
        if axis_name in ("horizontal_ratio", "vertical_ratio", "velocity_ratio"):
            _ratio_axis(ax, which, float(g[0]), float(g[-1]))
        elif axis_name == "pressure" and system == "us":
            _psi_axis(ax, which, float(g[0]), float(g[-1]))
        elif axis_name in ("distortion", "pressure"):
            _distortion_axis(ax, which, float(g[0]), float(g[-1]))
        elif axis_name == "temperature" and system == "us":
            _fahrenheit_axis(ax, which, float(g[0]), float(g[-1]))
        elif axis_name == "grain_size":  # millimetres, on a log axis
            _grain_axis(ax, which, float(g[0]), float(g[-1]))
    ax.set_xlim(X[0], X[-1])
    ax.set_ylim(Y[0], Y[-1])
    ax.add_patch(
        Rectangle(
            (0, 0),
            1,
            1,
            transform=ax.transAxes,
            facecolor="0.96",
            edgecolor="0.78",
            hatch="///",
            lw=0,
            zorder=0,
        )
    )
    obj = dmap.objective
    feasible = np.isfinite(obj)
    handles: list[Any] = []
    if feasible.any():
        # the window with smooth edges: every limit's least violation, and the cells the
        # full subproblem found infeasible
        fields = [np.where(np.isfinite(b.violation), b.violation, 1e3) for b in dmap.boundaries]
        worst = np.max(fields, axis=0) if fields else np.full(obj.shape, -1.0)
        worst = np.where(feasible, worst, np.maximum(worst, 1e-3))
        edge = ax.contourf(gx, gy, worst, levels=[-1e9, 0.0], colors="none")
        paths = [p for p in edge.get_paths() if len(p.vertices)]
        clip = (
            PathPatch(
                MPath.make_compound_path(*paths),
                transform=ax.transData,
                facecolor="none",
                edgecolor="none",
            )
            if paths
            else None
        )
        edge.remove()
        lo, hi = float(np.min(obj[feasible])), float(np.max(obj[feasible]))
        filled = _fill_nan(obj)
        if hi - lo <= 1e-9 * max(1.0, abs(hi)):  # the same mismatch everywhere in the window
            lo, hi = lo - 0.5, lo + 0.5
            levels = np.array([lo, hi])
            cf = ax.contourf(gx, gy, filled, levels=levels, colors=["#7fc97f"], zorder=1)
        elif hi > 0 and hi / max(lo, 1e-300) > 10:
            lo = max(lo, 1e-4 * hi)  # below this, a mismatch is nil for the eye (and noise)
            levels = np.geomspace(lo, hi * (1 + 1e-9), 14)
            cf = ax.contourf(
                gx,
                gy,
                filled,
                levels=levels,
                norm=LogNorm(lo, hi),
                cmap="viridis",
                extend="both",
                zorder=1,
            )
        else:
            levels = np.linspace(lo, hi + max(1e-12, 1e-9 * abs(hi)), 14)
            cf = ax.contourf(gx, gy, filled, levels=levels, cmap="viridis", extend="both", zorder=1)
        if clip is not None:
            ax.add_patch(clip)
            cf.set_clip_path(clip)
        if len(levels) > 2:
            cb = fig.colorbar(cf, ax=ax, shrink=0.9)
            cb.set_label("weighted mismatch [-] (best design in each cell)")
            cb.ax.yaxis.set_major_formatter(FuncFormatter(lambda v, _: fmt(v, 3)))
        else:
            handles.append(
                Patch(
                    facecolor="#7fc97f",
                    edgecolor="none",
                    label=f"feasible; weighted mismatch {fmt(lo + 0.5)} everywhere",
                )
            )
    placed: list[np.ndarray] = []
    if dmap.optimum is not None:
        c = _unit_coords(dmap, *(np.array([v]) for v in dmap.coordinates(dmap.optimum)))[0]
        placed.append(np.array([c[0] - 0.03, c[0] + 0.03, c[1] - 0.04, c[1] + 0.04]))
    window = _unit_coords(dmap, gx[feasible], gy[feasible]) if feasible.any() else None
    colours = (
        "#d62728",
        "#1f77b4",
        "#9467bd",
        "#8c564b",
        "#e377c2",
        "#ff7f0e",
        "#17becf",
        "#000000",
        "#bcbd22",
        "#7f7f7f",
    )
    placed.extend(_model_bounds(ax, dmap, feasible, list(placed), system))
    # one colour per limit; the same limit in a looser condition (key "...@condition") is a
    # thin dotted line of the same colour, without ticks or an on-line label. A boundary that
    # runs on top of one already drawn is dashed, so that the one beneath shows in its gaps.
    # A limit's line is drawn only where that limit closes the window: where another limit
    # already excludes the cells, its line is left out (map_lines.split_at_other_limits).
    base_keys = list(dict.fromkeys(b.key.split("@")[0] for b in dmap.boundaries))
    fields = {b.key: np.where(np.isfinite(b.violation), b.violation, 1e3) for b in dmap.boundaries}
    drawn: list[tuple[str, np.ndarray]] = []
    entries: dict[str, dict[str, Any]] = {}
    for b in dmap.boundaries:
        shown = boundary_label(b, system)
        g = b.violation
        # cells where the [model] bounds alone leave nothing (inf) are no part of the limit's
        # boundary: its line is the zero level of its finite values only
        if not (np.any(np.isfinite(g) & (g > 0)) and np.any(g <= 0)):
            continue
        base = b.key.split("@")[0]
        n = base_keys.index(base)
        colour = colours[n % len(colours)]
        looser = "@" in b.key
        style: Any = ":" if looser else LINE_STYLES[(n // len(colours)) % len(LINE_STYLES)]
        if looser:
            if not entries.get(base, {}).get("closes", True):
                continue  # behind its own tighter condition, itself behind other limits
            ax.contour(
                gx,
                gy,
                fields[b.key],
                levels=[0.0],
                colors=[colour],
                linewidths=1.0,
                linestyles=[style],
                alpha=0.7,
                zorder=3,
            )
        else:
            probe = ax.contour(gx, gy, np.where(np.isfinite(g), g, np.nan), levels=[0.0])
            segs = [sg for sg in probe.allsegs[0] if len(sg) > 1]
            probe.remove()
            others = [f for k, f in fields.items() if k.split("@")[0] != base]
            active, _ = split_at_other_limits(dmap, segs, others) if feasible.any() else (segs, [])
            on_top = None
            if active:
                mine = _unit_coords(dmap, *np.vstack(active).T)
                on_top = _coincides(mine, drawn)
                drawn.append((_base_label(shown), mine))
            if on_top is not None:
                style = (0, (6, 6))
            for piece in active:
                ax.plot(
                    piece[:, 0],
                    piece[:, 1],
                    color=colour,
                    lw=2.2 if b.binding else 1.5,
                    ls=style,
                    zorder=3,
                    gid=f"boundary:{b.key}",
                    path_effects=[patheffects.withTickedStroke(angle=135, spacing=8, length=0.7)],
                )
            if active:
                text = shown + ("  (binds)" if b.binding else "")
                if on_top is not None:
                    text += f"  (on {on_top})"
                placed.append(
                    _label_line(ax, dmap, np.vstack(active), window, placed, text, colour)
                )
        entry = entries.setdefault(
            base,
            {
                "colour": colour,
                "style": style,
                "label": _base_label(shown),
                "conds": [],
                "closes": False,
            },
        )
        if not looser:
            entry["style"] = style
            entry["closes"] = entry["closes"] or bool(active)
        entry["conds"].append((_condition(shown), looser, b.binding))
    handles.extend(_limit_entry(e) for e in entries.values() if e["closes"])
    hidden = [
        e["label"]
        + (f" ({c})" if (c := _tight(e)) else "")
        + (", binds at the optimum inside the window" if any(b for *_, b in e["conds"]) else "")
        for e in entries.values()
        if not e["closes"]
    ]
    if hidden:  # one entry for the limits that other limits keep off the window's edge
        handles.append(
            Line2D(
                [],
                [],
                ls="",
                label=_wrap("not drawn, other limits bind first: " + "; ".join(hidden)),
            )
        )
    if dmap.optimum is not None:
        ox, oy = dmap.coordinates(dmap.optimum)
        ax.scatter(
            [ox], [oy], marker="*", s=340, color="#ffd400", edgecolors="black", lw=1.0, zorder=6
        )
        handles.append(
            Line2D(
                [],
                [],
                marker="*",
                ms=15,
                color="#ffd400",
                mec="black",
                lw=0,
                label=f"optimum: {short_label(dmap.optimum, system)}, "
                f"mismatch {fmt(_denoise(dmap.optimum_objective))}",
            )
        )
    if dmap.axes[0] == "horizontal_ratio" and dmap.preferred:
        for label, d, _ in dmap.preferred:
            num, den = (float(v) for v in label.split(":"))
            r = num / den
            if not X[0] * (1 - 1e-9) <= r <= X[-1] * (1 + 1e-9):
                continue
            ax.axvline(r, color="0.25", lw=0.8, ls=(0, (2, 3)), zorder=2)
            ax.text(
                r,
                1.01,
                label,
                transform=ax.get_xaxis_transform(),
                ha="center",
                va="bottom",
                fontsize=8.5,
                color="0.2",
            )
            if d is not None:
                ax.scatter(
                    [r],
                    [dmap.coordinates(d)[1]],
                    s=50,
                    color="white",
                    edgecolors="black",
                    lw=1.0,
                    zorder=5,  # under the optimum's star where they meet
                )
        handles.append(
            Line2D(
                [],
                [],
                marker="o",
                ms=7,
                color="0.25",
                mfc="white",
                mec="black",
                lw=0.8,
                ls=(0, (2, 3)),
                label="preferred ratio, and the best design there",
            )
        )
    ax.set_xlabel(f"{dmap.labels[0]} [{map_axis(dmap, 0, system)[0]}]")
    ax.set_ylabel(f"{dmap.labels[1]} [{map_axis(dmap, 1, system)[0]}]")
    handles.append(
        Patch(
            facecolor="0.96",
            edgecolor="0.7",
            hatch="///",
            label="outside the feasible window (ticks mark the infeasible side)",
        )
    )
    legend = fig.legend(
        handles=handles, loc="outside lower center", ncol=2, fontsize=8.3, frameon=False
    )
    zoom = [dmap.labels[i].split(" (")[0] for i in (0, 1) if any(dmap.zoomed) and dmap.zoomed[i]]
    note = (
        f"\nzoomed onto the feasible window along the {' and '.join(zoom)} "
        "(--full-range: the whole range)"
        if zoom
        else ""
    )
    fig.suptitle(
        f"{dmap.case.title}\ndesign-space map, model fluid {dmap.fluid} (the other "
        f"choices at their optimum in each cell){note}",
        fontsize=11,
    )
    add_footer(fig, dmap.case, legend)
    return fig


def _base_label(label: str) -> str:
    """``depth >= 0.03 m`` of ``depth >= 0.03 m (low)``."""
    return label.rsplit(" (", 1)[0] if label.endswith(")") else label


def _condition(label: str) -> str:
    """``low`` of ``depth >= 0.03 m (low)``; empty without a condition."""
    return label.rsplit(" (", 1)[1][:-1] if label.endswith(")") and " (" in label else ""


def _limit_entry(entry: dict[str, Any]) -> Any:
    """One legend entry per limit, its conditions named inside: ``depth >= 0.03 m: low
    (solid); mean, flood (dotted)``, and where it binds at the optimum."""
    from matplotlib.lines import Line2D

    tight = [c for c, looser, _ in entry["conds"] if not looser and c]
    loose = [c for c, looser, _ in entry["conds"] if looser and c]
    binds = [c for c, _, b in entry["conds"] if b]
    label = entry["label"]
    if tight and loose:
        label += f": {', '.join(tight)} (line); {', '.join(loose)} (dotted)"
    elif tight:
        label += f" ({', '.join(tight)})"
    if binds:
        label += "  (binds at the optimum)"
    return Line2D([], [], color=entry["colour"], lw=2, ls=entry["style"], label=_wrap(label))


def _tight(entry: dict[str, Any]) -> str:
    """The conditions in which a limit's line is the solid one."""
    return ", ".join(c for c, looser, _ in entry["conds"] if not looser and c)


def _wrap(label: str, width: int = 66) -> str:
    """A legend label on lines of at most ``width`` characters, so that two columns fit."""
    import textwrap

    return textwrap.fill(label, width, subsequent_indent="    ")


def _coincides(mine: np.ndarray, drawn: list[tuple[str, np.ndarray]]) -> str | None:
    """The label of a boundary already drawn that this one (points in unit coordinates) runs
    on: most of its points within 0.8 % of the frame of that one's."""
    for label, other in drawn:
        d = np.min(np.sum((mine[::3, None, :] - other[None, ::3, :]) ** 2, axis=2), axis=1)
        if np.mean(np.sqrt(d) < 0.008) > 0.6:
            return label
    return None


def _model_bounds(
    ax: Axes,
    dmap: DesignMap,
    feasible: np.ndarray,
    avoid: list[np.ndarray],
    system: str = "si",
) -> list[np.ndarray]:
    """Label each ``[model]`` bound at the frame's edge where it closes the feasible window,
    centred on the window's stretch of that edge; return the labels' boxes in unit
    coordinates (for the other labels to keep clear of). Temperatures in degF and pressures
    in psi in US units."""
    from compromise.presentation.display import celsius_to
    from compromise.presentation.explore_display import BAR, pascal_to

    if not feasible.any():
        return []
    m = dmap.case.model
    bounds = {
        "horizontal_ratio": m.horizontal_ratio,
        "distortion": m.distortion,
        "temperature": (m.temperature[0] - 273.15, m.temperature[1] - 273.15),
        "pressure": (m.pressure[0] / 1e5, m.pressure[1] / 1e5),
        "velocity_ratio": m.velocity_ratio,
        "vertical_ratio": (
            m.horizontal_ratio[0] * m.distortion[0],
            m.horizontal_ratio[1] * m.distortion[1],
        ),
    }
    names = {"horizontal_ratio": "X", "vertical_ratio": "Y", "velocity_ratio": "V"}
    unit = _unit_coords(dmap, dmap.grid(0), dmap.grid(1))  # each axis's grid in [0, 1]
    boxes = []
    style = {"boxstyle": "round,pad=0.15", "fc": "white", "ec": "black", "alpha": 0.9}
    for which in (0, 1):
        axis = dmap.axes[which]
        b = bounds.get(axis)
        if b is None:
            continue
        g = dmap.grid(which)
        for end, value, op in ((0, b[0], ">="), (-1, b[1], "<=")):
            on_edge = feasible[:, end] if which == 0 else feasible[end, :]
            if not on_edge.any() or abs(g[end] - value) > 1e-9 * max(1.0, abs(value)):
                continue
            if axis == "temperature" and system == "us":
                shown = "temperature {} {:g} {}".format(op, *celsius_to(value, system))
            elif axis == "pressure" and system == "us":
                shown = "pressure {} {:.4g} {}".format(op, *pascal_to(value * BAR, system))
            elif axis == "temperature":
                shown = f"temperature {op} {value:g} degC"
            elif axis == "pressure":
                shown = f"pressure {op} {value:g} bar"
            elif axis in names:
                shown = f"{names[axis]} {op} {format_ratio(value)}"
            else:
                shown = f"{axis} {op} {value:g}"
            text = f"{shown} [model]"
            pos = 0.0 if end == 0 else 1.0
            w, h = 0.0098 * len(text) + 0.01, 0.045
            along = _clear_spot(
                float(np.mean(unit[on_edge, 1 - which])), w, h, which, pos, [*avoid, *boxes]
            )
            if which == 0:
                ax.text(
                    pos + (0.006 if end == 0 else -0.006),
                    along,
                    text,
                    transform=ax.transAxes,
                    rotation=90,
                    ha="left" if end == 0 else "right",
                    va="center",
                    fontsize=8.5,
                    fontweight="bold",
                    zorder=9,
                    bbox=style,
                )
                x0 = pos if end == 0 else pos - h
                boxes.append(np.array([x0, x0 + h, along - w / 2, along + w / 2]))
            else:
                ax.text(
                    along,
                    pos + (0.008 if end == 0 else -0.008),
                    text,
                    transform=ax.transAxes,
                    ha="center",
                    va="bottom" if end == 0 else "top",
                    fontsize=8.5,
                    fontweight="bold",
                    zorder=9,
                    bbox=style,
                )
                y0 = pos if end == 0 else pos - h
                boxes.append(np.array([along - w / 2, along + w / 2, y0, y0 + h]))
    return boxes


def _clear_spot(
    centre: float, w: float, h: float, which: int, pos: float, avoid: list[np.ndarray]
) -> float:
    """Where along a frame edge (unit coordinates) a label ``w`` long and ``h`` deep goes:
    at ``centre`` if that is clear of the boxes ``avoid``, else the nearest clear spot."""
    lo, hi = w / 2 + 0.01, 1 - w / 2 - 0.01
    if hi < lo:
        return 0.5
    d0 = pos if pos == 0.0 else pos - h
    for along in sorted(np.linspace(lo, hi, 41), key=lambda a: (abs(a - centre), a)):
        box = (
            np.array([d0, d0 + h, along - w / 2, along + w / 2])
            if which == 0
            else np.array([along - w / 2, along + w / 2, d0, d0 + h])
        )
        if not any(
            min(box[1], q[1]) > max(box[0], q[0]) and min(box[3], q[3]) > max(box[2], q[2])
            for q in avoid
        ):
            return float(along)
    return float(min(max(centre, lo), hi))


def _label_line(
    ax: Axes,
    dmap: DesignMap,
    pts: np.ndarray,
    window: np.ndarray | None,
    placed: list[np.ndarray],
    text: str,
    colour: str,
) -> np.ndarray:
    """Write ``text`` on a boundary: near the feasible window, on the side away from it, inside
    the frame and clear of the labels already placed. Returns the label's box
    ``(x0, x1, y0, y1)`` in unit coordinates."""
    u0 = _unit_coords(dmap, pts[:, 0], pts[:, 1])
    centre = window.mean(axis=0) if window is not None and window.size else np.full(2, 0.5)
    away_x = np.where(u0[:, 0] >= centre[0], 1.0, -1.0)
    away_y = np.where(u0[:, 1] >= centre[1], 1.0, -1.0)
    # four placements per point; the one facing away from the window is preferred
    u = np.tile(u0, (4, 1))
    pts = np.tile(pts, (4, 1))
    sx = np.concatenate([away_x, -away_x, away_x, -away_x])
    sy = np.concatenate([away_y, away_y, -away_y, -away_y])
    side = np.repeat([0.0, 0.4, 0.4, 0.6], len(u0))
    w, h = 0.0098 * len(text) + 0.01, 0.045
    x0 = np.where(sx > 0, u[:, 0] + 0.005, u[:, 0] - 0.005 - w)
    y0 = np.where(sy > 0, u[:, 1] + 0.005, u[:, 1] - 0.005 - h)
    boxes = np.column_stack([x0, x0 + w, y0, y0 + h])
    score = side.copy()
    if window is not None and window.size:
        d2 = np.min(np.sum((u0[:, None, :] - window[None, ::7, :]) ** 2, axis=2), axis=1)
        score += np.tile(np.sqrt(d2), 4)
    out = np.maximum.reduce([-boxes[:, 0], boxes[:, 1] - 1.0, -boxes[:, 2], boxes[:, 3] - 1.0])
    score += np.where(out > 0, 5.0 + out, 0.0)
    for q in placed:
        ox = np.minimum(boxes[:, 1], q[1]) - np.maximum(boxes[:, 0], q[0])
        oy = np.minimum(boxes[:, 3], q[3]) - np.maximum(boxes[:, 2], q[2])
        score += np.where((ox > 0) & (oy > 0), 3.0 + 10.0 * ox * oy, 0.0)
    i = int(np.argmin(score))
    ax.annotate(
        text,
        (pts[i, 0], pts[i, 1]),
        xytext=(4 * sx[i], 4 * sy[i]),
        textcoords="offset points",
        ha="left" if sx[i] > 0 else "right",
        va="bottom" if sy[i] > 0 else "top",
        fontsize=8.5,
        color=colour,
        fontweight="bold",
        zorder=8,
        bbox={"boxstyle": "round,pad=0.15", "fc": "white", "ec": colour, "alpha": 0.9},
    )
    return boxes[i]


def _denoise(v: float) -> float:
    from compromise.solving.result import denoise

    return denoise(v)
