"""The figure of a trade-off front (presentation only; the front comes from
:func:`compromise.explore.tradeoffs.trace_front`).

Axes are shown in the units people present: a group's mismatch as how far the model's value is
off the prototype's, in % (``100 (exp|ln(model/prototype)| - 1)``), or, as options, the group's
model value on a log axis with the prototype's value drawn as a reference line (``value``), or
the log-ratio itself (``log``); a model quantity as its value (a log axis when it spans more
than a decade).
The knee is marked only when the front bends (:attr:`Front.has_knee`); the callouts of the knee
and of the solver's design are placed from the data, clear of the points, of each other and of
the limit labels. Three axes are drawn as one scatter of the first two coloured by the third.
"""

from __future__ import annotations

import textwrap
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from compromise.presentation.figures import add_footer, fluid_colours, new_figure, short_label
from compromise.presentation.tables import fmt

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

    from compromise.explore.tradeoffs import Axis, Front

MISMATCH_UNITS = ("percent", "value", "log")
MARKERS = ("o", "s", "^", "D", "v", "P")


def shown_values(axis: Axis, values: np.ndarray, mismatch: str = "percent") -> np.ndarray:
    """An axis's values as the figure shows them: a group's ``|ln(model/prototype)|`` as % off
    (``100 (e^|r| - 1)``) unless ``mismatch`` is ``"log"``; everything else unchanged.

    Examples
    --------
    >>> from types import SimpleNamespace
    >>> shown_values(SimpleNamespace(kind="group"), np.array([0.0, np.log(1.5)])).round(9)
    array([ 0., 50.])
    """
    from compromise.solving.result import NOISE

    v = np.asarray(values, dtype=float)
    if axis.kind in ("group", "total"):  # numerical noise is shown as 0
        v = np.where(np.abs(v) < NOISE, 0.0, v)
    if axis.kind == "group" and mismatch == "percent":
        return 100.0 * np.expm1(v)
    return v


def axis_label(axis: Axis, mismatch: str = "percent", condition: str = "") -> str:
    """The axis title with its unit in brackets (``condition``: where a group's model value is
    taken, named when the case's conditions give the group different values)."""
    if axis.kind == "group":
        if mismatch == "value":
            return f"{axis.name} in the model" + (f" ({condition})" if condition else "") + " [-]"
        if mismatch == "percent":
            return f"{axis.name}: model off the prototype by [%]"
        return f"{axis.name} mismatch |ln(model/prototype)| [-]"
    return f"{axis.label} [{axis.unit}]"


@dataclass(frozen=True)
class GroupValues:
    """A group axis shown as the group's model value (``--mismatch value``).

    Attributes
    ----------
    points : numpy.ndarray
        The group's model value at every point of the front [-].
    chosen : float or None
        At the solver's design.
    prototype : float
        The prototype's value, drawn as a reference line [-].
    condition : str
        The condition whose values are shown (the one where the group's floor, else its
        ceiling, applies; the largest prototype value without either), "" when every
        condition gives the group the same value.
    limits : tuple of (str, float)
        The case's ``min`` / ``max`` on the group that apply in that condition.
    sign : float
        +1 or -1 when every point has the model value on one side of the prototype's (the
        sign of ``ln(model/prototype)``), else 0.
    """

    points: np.ndarray
    chosen: float | None
    prototype: float
    condition: str
    limits: tuple[tuple[str, float], ...]
    sign: float


def group_values(front: Front, axis: Axis) -> GroupValues:
    """The model values of a group along a front, from the designs evaluated with the fluids'
    source property models (:func:`compromise.solving.design.evaluate_design`)."""
    from compromise.solving.design import evaluate_design

    case = front.case
    g = case.groups[axis.name]
    designs = [pt.design for pt in front.points]
    if front.chosen is not None:
        designs.append(front.chosen.design)
    evals = [evaluate_design(case, d) for d in designs]
    protos = np.array(
        [c.groups[axis.name].prototype for c in evals[0].conditions] if evals else [1.0]
    )
    i = int(np.argmin(protos)) if g.min is not None else int(np.argmax(protos))
    same = bool(np.all(np.abs(protos - protos[0]) <= 1e-12 * abs(protos[0])))
    condition = "" if same else case.conditions[i].name
    limits: list[tuple[str, float]] = []
    if g.min is not None:
        limits.append((">=", g.min))
    if g.max is not None and (same or i == int(np.argmax(protos))):
        limits.append(("<=", g.max))
    model = np.array([ev.conditions[i].groups[axis.name].model for ev in evals])
    chosen = None
    if front.chosen is not None:
        chosen, model = float(model[-1]), model[:-1]
    proto = float(protos[i])
    r = np.log(np.append(model, [] if chosen is None else [chosen]) / proto)
    r = np.where(np.abs(r) < 1e-9, 0.0, r)
    sign = 1.0 if np.all(r >= 0) else (-1.0 if np.all(r <= 0) else 0.0)
    return GroupValues(model, chosen, proto, condition, tuple(limits), sign)


def front_caption(front: Front) -> str:
    """Why the solver's design may lie off the front (figure and text output alike)."""
    lifted = [a.name for a in front.axes if a.lifted and a.case_bound is not None]
    primary = next((a for a in front.axes if a.name == front.primary), None)
    what = f"the {primary.label}" if primary is not None else front.primary
    if primary is not None and primary.kind == "group":
        what = f"the {front.primary} mismatch"
    why = (
        "the solver balances every weighted group of the case within all its limits, while "
        f"each point of the front minimises {what} alone for given values of the other axes."
    )
    if _chosen_on_front(front):
        text = "The solver's design (star) lies on this front here; it need not: " + why
    else:
        text = "Why the solver's design (star) may lie off this front: " + why
    if len(lifted) == 1:
        text += f" The case's limit on {lifted[0]} is lifted here (dashed line)."
    elif lifted:
        text += f" The case's limits on {' and '.join(lifted)} are lifted here (dashed lines)."
    return text


def _chosen_on_front(front: Front) -> bool:
    """Whether the solver's design has the values of a point of the front (within 1e-6; of
    the computed front, whatever the units shown)."""
    front = getattr(front, "source", None) or front
    if front.chosen is None or not front.points:
        return False
    c = np.asarray(front.chosen.values, dtype=float)
    d = np.abs(front.values - c) <= 1e-6 * (1.0 + np.abs(c))
    return bool(np.any(np.all(d, axis=1)))


def front_figure(front: Front, mismatch: str = "percent", system: str = "si") -> Figure:
    """The Pareto front in presentation units, the knee (where the front has one) and the
    solver's design called out, the case's lifted limits drawn and labelled; three axes as a
    scatter of the first two coloured by the third. ``system``: ``"si"`` or ``"us"`` (the
    quantity axes, and the callouts' temperatures, in US customary units)."""
    from compromise.presentation.explore_display import shown_front

    front = shown_front(front, system)
    k = len(front.axes)
    fig = new_figure(8.4 if k == 3 else 7.6, 6.4)
    ax = fig.subplots()
    colours = fluid_colours(front.case.model.fluids)
    v = front.values
    shown = np.column_stack(
        [shown_values(a, v[:, j], mismatch) for j, a in enumerate(front.axes)]
    ).reshape(v.shape)
    fluids = [pt.design.fluid for pt in front.points]
    knee = front.knee if front.has_knee else -1
    chosen = None
    if front.chosen is not None:
        chosen = np.array(
            [
                shown_values(a, np.array([x]), mismatch)[0]
                for a, x in zip(front.axes, front.chosen.values, strict=True)
            ]
        )
    gvals: dict[int, GroupValues] = {}
    if mismatch == "value":  # a group's model value, from the designs themselves
        for j, a in enumerate(front.axes):
            if a.kind == "group" and front.points:
                gvals[j] = group_values(front, a)
                shown[:, j] = gvals[j].points
                if chosen is not None and gvals[j].chosen is not None:
                    chosen[j] = gvals[j].chosen
    norm = None
    if k == 3 and len(shown):
        from matplotlib.colors import LogNorm, Normalize

        c = shown[:, 2] if chosen is None else np.append(shown[:, 2], chosen[2])
        lo, hi = float(np.min(c)), float(np.max(c))
        if hi <= lo:
            lo, hi = lo - 0.5 * max(abs(lo), 1e-3), hi + 0.5 * max(abs(hi), 1e-3)
        if 2 in gvals:
            lo, hi = min(lo, gvals[2].prototype), max(hi, gvals[2].prototype)
        log_c = lo > 0 and (hi / lo > 20 or 2 in gvals)
        norm = LogNorm(lo, hi) if log_c else Normalize(lo, hi)
    if k == 2 and len(front.fluid_fronts) > 1:
        for f, fv in front.fluid_fronts.items():
            if len(fv) < 2:
                continue
            if any(gv.sign == 0.0 for gv in gvals.values()):
                continue  # the side of the prototype's value is not known for these points
            fs = np.column_stack(
                [
                    gvals[j].prototype * np.exp(gvals[j].sign * fv[:, j])
                    if j in gvals
                    else shown_values(a, fv[:, j], mismatch)
                    for j, a in enumerate(front.axes)
                ]
            )
            o = np.argsort(fs[:, 0])
            ax.plot(
                fs[o, 0],
                fs[o, 1],
                color=colours[f],
                lw=0.9,
                alpha=0.45,
                zorder=1,
                label=f"{f}: its own front",
            )
    if k == 2 and shown.shape[0] > 1:
        ax.plot(shown[:, 0], shown[:, 1], color="0.55", lw=1.0, zorder=2)
    scatter = None
    for n, f in enumerate(front.case.model.fluids):
        mine = np.array([x == f for x in fluids], dtype=bool)
        if not mine.any():
            continue
        label = f"{f} ({int(mine.sum())} point{'s' if mine.sum() != 1 else ''})"
        if k == 3:
            scatter = ax.scatter(
                shown[mine, 0],
                shown[mine, 1],
                c=shown[mine, 2],
                norm=norm,
                cmap="viridis",
                s=26,
                marker=MARKERS[n % len(MARKERS)],
                edgecolors="0.2",
                linewidths=0.4,
                zorder=3,
                label=label,
            )
        else:
            ax.scatter(
                shown[mine, 0], shown[mine, 1], s=16, color=colours[f], zorder=3, label=label
            )
    if knee >= 0:
        ax.scatter(
            [shown[knee, 0]],
            [shown[knee, 1]],
            s=170,
            facecolors="none",
            edgecolors="black",
            lw=1.6,
            zorder=4,
            label="knee",
        )
    if chosen is not None:
        ax.scatter(
            [chosen[0]],
            [chosen[1]],
            marker="*",
            s=260,
            color="#ffd400",
            edgecolors="black",
            lw=0.9,
            zorder=5,
            label="solver's design",
        )
    _scales(ax, front, shown, chosen, gvals)
    limit_labels = _limit_lines(ax, front, mismatch)
    marks = shown[:, :2] if chosen is None else np.vstack([shown[:, :2], chosen[None, :2]])
    limit_labels += _prototype_lines(ax, front, gvals, marks)

    def label(j: int) -> str:
        return axis_label(front.axes[j], mismatch, gvals[j].condition if j in gvals else "")

    ax.set_xlabel(label(0))
    ax.set_ylabel(label(1))
    ax.grid(True, color="0.9", lw=0.6)
    ax.set_axisbelow(True)
    if k == 3 and scatter is not None:
        cb = fig.colorbar(scatter, ax=ax, shrink=0.92)
        cb.set_label(label(2))
        if norm is not None and norm.__class__.__name__ == "LogNorm":
            from matplotlib.ticker import FuncFormatter, LogLocator

            # plain numbers at 1, 2 and 5 times the powers of ten (0.1, 0.2, 0.5, 1), not 10^-1
            cb.ax.yaxis.set_major_locator(LogLocator(subs=(1.0, 2.0, 5.0)))
            cb.ax.yaxis.set_major_formatter(FuncFormatter(lambda v, _: fmt(v, 3)))
            cb.ax.yaxis.set_minor_formatter(FuncFormatter(lambda v, _: ""))
        a = front.axes[2]
        if 2 in gvals and norm is not None and norm.vmin <= gvals[2].prototype <= norm.vmax:
            cb.ax.axhline(gvals[2].prototype, color="black", ls="-.", lw=1.4)
            cb.ax.text(
                -0.15,
                gvals[2].prototype,
                "prototype",
                transform=cb.ax.get_yaxis_transform(),
                ha="right",
                va="center",
                fontsize=8,
                rotation=90,
            )
        if (
            a.lifted
            and a.case_bound is not None
            and norm is not None
            and norm.vmin <= a.case_bound <= norm.vmax
        ):
            cb.ax.axhline(a.case_bound, color="black", ls="--", lw=1.4)
            cb.ax.text(
                -0.15,
                a.case_bound,
                f"case limit {fmt(a.case_bound)} {a.unit}",
                transform=cb.ax.get_yaxis_transform(),
                ha="right",
                va="center",
                fontsize=8,
                rotation=90,
            )
    caption = ""
    if len(front.points) == 1:
        caption = "The front is a single point: one design is best on every axis. "
    elif front.points and len(front.points) >= 3 and knee < 0:
        caption = (
            f"The front is nearly straight (its bend is {100 * front.knee_depth:.1f} % of the "
            "line through its ends): no knee is marked. "
        )
    elif not front.points:
        ax.text(0.5, 0.5, "no feasible design", transform=ax.transAxes, ha="center")
    if chosen is not None:
        caption += front_caption(front)
    if caption:
        ax.set_title(
            textwrap.fill(caption, 112 if k == 2 else 120), fontsize=8.2, color="0.25", loc="left"
        )
    handles, labels = ax.get_legend_handles_labels()
    if k == 3:  # the fluids' entries in a neutral colour (the colour is the third axis)
        from matplotlib.lines import Line2D

        handles = [
            Line2D(
                [],
                [],
                ls="",
                marker=MARKERS[front.case.model.fluids.index(lab.split(" (")[0]) % len(MARKERS)],
                mfc="0.6",
                mec="0.2",
            )
            if lab.endswith((" points)", " point)"))
            else h
            for h, lab in zip(handles, labels, strict=True)
        ]
        a = front.axes[2]
        if a.lifted and a.case_bound is not None:
            handles.append(Line2D([], [], color="black", ls="--", lw=1.4))
            labels.append(
                f"case limit: {a.name} <= {fmt(a.case_bound)} {a.unit} (on the colour bar)"
            )
    legend = None
    if handles:
        legend = fig.legend(
            handles, labels, loc="outside lower center", ncol=3, fontsize=8.5, frameon=False
        )
    names = " vs ".join(a.name for a in front.axes)
    shape = f"{len(front.points)} point{'s' if len(front.points) != 1 else ''}"
    third = f", colour: {front.axes[2].name}" if k == 3 else ""
    fig.suptitle(f"{front.case.title}\nPareto front: {names} ({shape}{third})", fontsize=11)
    add_footer(fig, front.case, legend)
    if legend is None:
        fig.draw_without_rendering()
        fig.set_layout_engine("none")
    callouts = []
    if knee >= 0:
        callouts.append(
            (
                "knee: " + short_label(front.points[knee].design, system),
                (shown[knee, 0], shown[knee, 1]),
                "white",
            )
        )
    if chosen is not None:
        callouts.append(
            (
                "chosen: " + short_label(front.chosen.design, system),
                (chosen[0], chosen[1]),
                "#fff7cc",
            )
        )
    _place_callouts(fig, ax, callouts, shown[:, :2], limit_labels)
    return fig


def _scales(
    ax: Axes,
    front: Front,
    shown: np.ndarray,
    chosen: np.ndarray | None,
    gvals: dict[int, GroupValues] | None = None,
) -> None:
    """A log scale for an axis spanning more than a decade of positive values, and for a
    group's model value (its prototype value and limits kept in view); no offset notation; a
    visible range around a single point."""
    gvals = gvals or {}
    for j, (set_scale, set_lim) in enumerate(
        ((ax.set_xscale, ax.set_xlim), (ax.set_yscale, ax.set_ylim))
    ):
        vals = shown[:, j] if chosen is None else np.append(shown[:, j], chosen[j])
        vals = vals[np.isfinite(vals)]
        if not len(vals):
            continue
        a = front.axes[j]
        if a.lifted and a.case_bound is not None:
            vals = np.append(vals, a.case_bound)
        if j in gvals:
            gv = gvals[j]
            vals = np.append(vals, [gv.prototype, *(b for _, b in gv.limits)])
        lo, hi = float(np.min(vals)), float(np.max(vals))
        if lo > 0 and (hi / lo > 10 or j in gvals):
            set_scale("log")
            if j in gvals:  # a margin of a twentieth of the span (in log) either side
                pad = (hi / lo) ** 0.05 if hi > lo * (1 + 1e-9) else 1.5
                set_lim(lo / pad, hi * pad)
        elif hi - lo <= 1e-6 * max(abs(hi), 1e-12):
            if hi == 0.0:  # a mismatch of nil: the axis starts at 0, as a mismatch does
                set_lim(-0.05, 1.0)
            else:
                pad = 0.1 * abs(hi)
                set_lim(lo - pad, hi + pad)
    for axis, get_scale, get_lim in (
        (ax.xaxis, ax.get_xscale, ax.get_xlim),
        (ax.yaxis, ax.get_yscale, ax.get_ylim),
    ):
        fmtter = axis.get_major_formatter()
        if hasattr(fmtter, "set_useOffset"):
            fmtter.set_useOffset(False)
        lo, hi = get_lim()
        if get_scale() == "log" and lo > 0 and hi / lo < 100:
            # a log axis within two decades: plain numbers (41.5, not 4.15 x 10^1)
            from matplotlib.ticker import FuncFormatter

            plain = FuncFormatter(lambda v, _pos: f"{v:.3g}")
            axis.set_major_formatter(plain)
            axis.set_minor_formatter(plain)


def _limit_lines(ax: Axes, front: Front, mismatch: str) -> list[Any]:
    """The case's lifted limits on the two drawn axes: a dashed line each, labelled on the line."""
    texts = []
    for j, line in ((0, ax.axvline), (1, ax.axhline)):
        a = front.axes[j]
        if not (a.lifted and a.case_bound is not None):
            continue
        bound = float(shown_values(a, np.array([a.case_bound]), mismatch)[0])
        label = f"case limit: {a.name} <= {fmt(a.case_bound)} {a.unit}"
        line(bound, color="0.3", ls="--", lw=1.1, zorder=1, label=label)
        if j == 0:
            t = ax.text(
                bound,
                0.98,
                f"{label} (lifted)",
                transform=ax.get_xaxis_transform(),
                rotation=90,
                ha="right",
                va="top",
                fontsize=8,
                color="0.2",
            )
        else:
            t = ax.text(
                0.99,
                bound,
                f"{label} (lifted)",
                transform=ax.get_yaxis_transform(),
                ha="right",
                va="bottom",
                fontsize=8,
                color="0.2",
            )
        t.set_bbox({"boxstyle": "square,pad=0.25", "fc": "white", "ec": "none", "alpha": 0.85})
        texts.append(t)
    return texts


def _prototype_lines(
    ax: Axes, front: Front, gvals: dict[int, GroupValues], points: np.ndarray
) -> list[Any]:
    """A group's prototype value (dash-dot, labelled "prototype") and the case's limits on it
    (dashed) on the axes that show the group's model value."""
    texts = []
    placed: list[tuple[float, float]] = []  # (x, y) in axes fractions of the labels so far
    for j, gv in gvals.items():
        if j > 1:
            continue
        name = front.axes[j].name
        u = (ax.transData + ax.transAxes.inverted()).transform(points)
        lines = [("prototype", gv.prototype, "-.", "0.1")]
        lines += [(f"case limit: {name} {op} {fmt(b)}", b, "--", "0.3") for op, b in gv.limits]
        for text, value, ls, colour in lines:
            # the label where it covers the fewest points (and the solver's design): at the
            # start, the middle or the end of its line, and never on another such label (the
            # prototype lines of both axes meet in a corner when both values are at an end)
            at = (ax.transData + ax.transAxes.inverted()).transform([[value, value]])[0, j]
            near = np.abs(u[:, j] - at) < 0.06
            crowd = [
                np.count_nonzero(near & (np.abs(u[:, 1 - j] - c) < 0.2)) for c in (0.1, 0.9, 0.5)
            ]
            spots = [(0.02, 0.98, 0.5)[k] for k in np.argsort(crowd, kind="stable")]

            def clash(e: float, j: int = j, at: float = at) -> bool:
                xy = (at, e) if j == 0 else (e, at)
                return any(abs(xy[0] - a) < 0.3 and abs(xy[1] - b) < 0.3 for a, b in placed)

            end = next((e for e in spots if not clash(e)), spots[0])
            placed.append((at, end) if j == 0 else (end, at))
            if j == 0:
                ax.axvline(value, color=colour, ls=ls, lw=1.1, zorder=1)
                t = ax.text(
                    value,
                    end,
                    text,
                    transform=ax.get_xaxis_transform(),
                    rotation=90,
                    ha="right",
                    va={0.02: "bottom", 0.98: "top"}.get(end, "center"),
                    fontsize=8,
                    color="0.1",
                    zorder=2.5,  # under the points
                )
            else:
                ax.axhline(value, color=colour, ls=ls, lw=1.1, zorder=1)
                t = ax.text(
                    {0.02: 0.01, 0.98: 0.99}.get(end, 0.5),
                    value,
                    text,
                    transform=ax.get_yaxis_transform(),
                    ha={0.02: "left", 0.98: "right"}.get(end, "center"),
                    va="bottom",
                    fontsize=8,
                    color="0.1",
                    zorder=2.5,  # under the points
                )
            t.set_gid(f"reference:{name}:{text}")
            t.set_bbox({"boxstyle": "square,pad=0.25", "fc": "white", "ec": "none", "alpha": 0.85})
            texts.append(t)
    return texts


def _place_callouts(
    fig: Figure,
    ax: Axes,
    callouts: list[tuple[str, tuple[float, float], str]],
    points: np.ndarray,
    avoid: list[Any],
) -> None:
    """Boxed labels joined by a line to their points, each placed where it covers no point, no
    limit label and no other callout, with a short leader that crosses no other leader."""
    if not callouts:
        return
    fig.draw_without_rendering()
    renderer = fig.canvas.get_renderer()
    frame = ax.get_window_extent(renderer)
    pts = ax.transData.transform(points) if len(points) else np.zeros((0, 2))
    pts = pts[np.all(np.isfinite(pts), axis=1)]
    blocked = [t.get_window_extent(renderer) for t in avoid]
    boxes: list[np.ndarray] = []
    leaders: list[tuple[np.ndarray, np.ndarray]] = []
    margin = 6.0  # [px]
    for text, xy, face in callouts:
        ann = ax.annotate(
            text,
            xy,
            xytext=(0.5, 0.5),
            textcoords="axes fraction",
            ha="left",
            va="bottom",
            fontsize=8.5,
            arrowprops={"arrowstyle": "-", "color": "0.3", "lw": 0.8},
            bbox={"boxstyle": "round,pad=0.3", "fc": face, "ec": "0.5"},
            zorder=7,
        )
        ann.set_in_layout(False)
        fig.draw_without_rendering()
        patch = ann.get_bbox_patch().get_window_extent(renderer)
        anchor = np.array(ax.transAxes.transform((0.5, 0.5)))
        d0 = np.array([patch.x0, patch.y0]) - anchor
        size = np.array([patch.width, patch.height])
        target = ax.transData.transform(xy)
        best, best_score = (0.5, 0.5), np.inf
        for fx in np.linspace(0.0, 1.0, 21):
            for fy in np.linspace(0.0, 1.0, 21):
                lo = np.array(
                    [
                        frame.x0 + 4 + fx * (frame.width - 8 - size[0]),
                        frame.y0 + 4 + fy * (frame.height - 8 - size[1]),
                    ]
                )
                hi = lo + size
                score = 0.0
                inside = np.all((pts >= lo - margin) & (pts <= hi + margin), axis=1)
                score += 40.0 * float(np.count_nonzero(inside))
                if np.all((target >= lo - 10) & (target <= hi + 10)):
                    score += 400.0
                for b in blocked:
                    if _overlap(lo, hi, np.array([b.x0, b.y0]), np.array([b.x1, b.y1]), margin):
                        score += 300.0
                for q in boxes:
                    if _overlap(lo, hi, q[:2], q[2:], margin):
                        score += 1e6
                centre = np.clip(target, lo, hi)
                for p0, p1 in leaders:
                    if _cross(target, centre, p0, p1):
                        score += 200.0
                score += float(np.hypot(*(centre - target))) / max(frame.width, 1.0) * 60.0
                if score < best_score - 1e-9:
                    best_score, best = score, (lo, hi, centre)
        lo, hi, centre = best
        ann.set_position(tuple(ax.transAxes.inverted().transform(lo - d0)))
        boxes.append(np.concatenate([lo, hi]))
        leaders.append((target, centre))


def _overlap(
    lo: np.ndarray, hi: np.ndarray, qlo: np.ndarray, qhi: np.ndarray, margin: float
) -> bool:
    return bool(np.all(lo - margin < qhi) and np.all(qlo < hi + margin))


def _cross(a: np.ndarray, b: np.ndarray, c: np.ndarray, d: np.ndarray) -> bool:
    """Whether the segments ab and cd cross."""

    def orient(p: np.ndarray, q: np.ndarray, r: np.ndarray) -> float:
        return float((q[0] - p[0]) * (r[1] - p[1]) - (q[1] - p[1]) * (r[0] - p[0]))

    return (orient(a, b, c) * orient(a, b, d) < 0) and (orient(c, d, a) * orient(c, d, b) < 0)
