"""The figure of the weight sensitivity: how often each candidate design is the best.

Presentation only; the bars come from :class:`compromise.explore.sensitivity.Sensitivity`.
A candidate best alone in a sample wins it; candidates tied for best share it (drawn hatched),
so a tie never reads as a win.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any

import numpy as np

from compromise.presentation.figures import add_footer, fluid_colours, new_figure

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

    from compromise.explore.sensitivity import Sensitivity


def sensitivity_figure(sens: Sensitivity) -> Figure:
    """Share of the samples in which each candidate design is the best, one bar each."""
    n = len(sens.candidates)
    fig = new_figure(7.8, 2.3 + 0.42 * n)
    ax = fig.subplots()
    colours = fluid_colours(sens.case.model.fluids)
    ypos = np.arange(n)[::-1]
    shares = [100 * c.share for c in sens.candidates]
    bars = ax.barh(
        ypos,
        shares,
        color=[colours[c.fluid] for c in sens.candidates],
        edgecolor="black",
        lw=0.6,
        height=0.66,
    )
    ties = [100 * c.tie_share for c in sens.candidates]
    if any(ties):  # samples where it is best together with others: no win, a tie
        ax.barh(
            ypos,
            ties,
            left=shares,
            color=[colours[c.fluid] for c in sens.candidates],
            alpha=0.35,
            hatch="//",
            edgecolor="black",
            lw=0.6,
            height=0.66,
        )
    if sens.nominal >= 0 and shares[sens.nominal] > 0:  # (an empty bar would be a sliver)
        bars[sens.nominal].set_linewidth(2.2)
        bars[sens.nominal].set_hatch("..")
    tied_nominal = len(sens.nominal_tied) > 1
    all_tied = tied_nominal and len(sens.nominal_tied) == n
    labels = []
    for i, (y, c, s, t) in enumerate(zip(ypos, sens.candidates, shares, ties, strict=True)):
        text = (
            f"{s:.1f} %"
            if not t
            else (f"tied {t:.1f} %" if not s else f"{s:.1f} %, tied {t:.1f} %")
        )
        if not math.isfinite(c.nominal_objective):
            text += "  (infeasible)"
        if all_tied:
            pass  # said once, in the title
        elif tied_nominal and i in sens.nominal_tied:
            text += "  <- tied best at the case's weights"
        elif i == sens.nominal:
            text += "  <- best at the case's weights"
        labels.append(ax.text(s + t + 1.0, y, text, va="center", fontsize=8.5))
    ax.set_yticks(ypos, [c.label for c in sens.candidates])
    ax.set_xticks(range(0, 101, 20))
    ax.set_xlabel("share of the samples in which it is the best design [%]")
    ax.grid(True, axis="x", color="0.9", lw=0.6)
    ax.set_axisbelow(True)
    from matplotlib.patches import Patch

    handles = [
        Patch(facecolor=colours[f], edgecolor="black", label=f) for f in sens.case.model.fluids
    ]
    if any(ties):
        handles.append(
            Patch(facecolor="white", hatch="//", edgecolor="black", label="tied for best")
        )
    legend = fig.legend(
        handles=handles,
        loc="outside lower center",
        ncol=min(len(handles), 4),
        fontsize=8.5,
        title="model fluid",
        title_fontsize=8.5,
        frameon=False,
    )
    title = (
        f"{sens.case.title}\nweights of {', '.join(sens.groups) or 'no group'} each x/÷ up to "
        f"{sens.spread:g} (log-uniform), {sens.samples} samples, seed {sens.seed}"
    )
    if sens.note:
        title += "\n" + sens.note.split(":")[0] + ": the weights cannot change the answer"
    if all_tied:
        title += "\nevery candidate is tied for best at the case's weights"
    fig.suptitle(title, fontsize=10.5)
    add_footer(fig, sens.case, legend)
    _fit_labels(fig, ax, labels)
    return fig


def _fit_labels(fig: Figure, ax: Axes, labels: list[Any]) -> None:
    """Widen the x range so that every bar's label ends inside the axes."""
    ax.set_xlim(0, 130)
    fig.draw_without_rendering()
    width = ax.get_window_extent().width
    need = 130.0
    for t in labels:
        w = t.get_window_extent().width + 6.0  # [px], with a margin
        x = t.get_position()[0]
        if w < width:
            need = max(need, x * width / (width - w))
    ax.set_xlim(0, need)
