"""The figure canvas, its provenance footer and the PNG and SVG files (presentation only).

Every figure carries, in a footer, the case's title, the tool's version, the case file's short
SHA-256 and the caution, so a picture on a slide still says where it came from and what it is
not; :func:`save_figure` writes the same into the files' metadata. The files are byte-for-byte
reproducible: a fixed hash salt for SVG element ids, text kept as text, no date and no
matplotlib version in the metadata.
"""

from __future__ import annotations

import textwrap
from pathlib import Path
from typing import TYPE_CHECKING

from compromise.review.provenance import provenance_line, tool_version
from compromise.review.wording import caution_line
from compromise.units import format_ratio

if TYPE_CHECKING:
    from matplotlib.figure import Figure
    from matplotlib.legend import Legend

    from compromise.casefile.model import Case
    from compromise.solving.design import Design

COLOURS = (
    "#1f77b4",
    "#d62728",
    "#2ca02c",
    "#9467bd",
    "#ff7f0e",
    "#8c564b",
    "#e377c2",
    "#17becf",
    "#7f7f7f",
    "#bcbd22",
)  # matplotlib's tab10, reordered for contrast

FOOTER_SIZE = 6.5  # [pt]
FOOTER_COLOUR = "0.35"
LINE_SPACING = 1.3  # [-] of the font size


def short_label(design: Design, system: str = "si") -> str:
    """``water 30.0 degC, 1:94, distortion 4.38`` (and ``, polystyrene 2.11 mm`` where the
    design has a granular material); in US units (``system="us"``) the temperature in degF
    and a pressure in psi."""
    ratios = format_ratio(design.horizontal_ratio)
    if abs(design.distortion - 1.0) > 1e-6:
        ratios += f", distortion {design.distortion:.2f}"
    pressurised = abs(design.pressure / 101325.0 - 1.0) > 0.01  # or evacuated
    if system == "us":
        from compromise.presentation.display import celsius_to
        from compromise.presentation.explore_display import pascal_to

        t, t_unit = celsius_to(design.temperature - 273.15, system)
        state = f"{t:.1f} {t_unit}"
        if pressurised:
            p, p_unit = pascal_to(design.pressure, system)
            state += f" {p:.3g} {p_unit}"
    else:
        state = f"{design.temperature - 273.15:.1f} degC"
        if pressurised:
            state += f" {design.pressure / 1e5:.3g} bar"
    if design.material is not None and design.grain_size is not None:  # a [sediment] case
        ratios += f", {design.material} {design.grain_size * 1e3:.3g} mm"
    return f"{design.fluid} {state}, {ratios}"


def fluid_colours(fluids: tuple[str, ...] | list[str]) -> dict[str, str]:
    """One colour of :data:`COLOURS` per model fluid, in the case's order."""
    return {f: COLOURS[i % len(COLOURS)] for i, f in enumerate(fluids)}


def new_figure(width: float, height: float) -> Figure:
    """A figure of ``width`` x ``height`` inches on an Agg canvas, constrained layout."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=(width, height), layout="constrained")
    FigureCanvasAgg(fig)
    return fig


def footer_text(case: Case, width: float) -> str:
    """The footer: provenance on the first line, the caution wrapped to the figure's width."""
    chars = max(60, int(width * 72 / (0.55 * FOOTER_SIZE)))  # ~0.55 em per character
    return "\n".join([provenance_line(case), *textwrap.wrap(caution_line(), chars)])


def add_footer(fig: Figure, case: Case, legend: Legend | None = None) -> None:
    """Write the provenance and the caution in a strip under everything else in ``fig``.

    The constrained layout is given the rest of the figure (its ``rect``), so the axes and
    their labels stay clear of the footer. A figure legend placed ``outside lower`` gets its
    room from the layout but is drawn against the figure's edge; given as ``legend``, the
    layout is run once, the legend is moved above the strip and the layout is frozen (the
    figure's size is fixed, so nothing moves after).
    """
    text = footer_text(case, float(fig.get_figwidth()))
    lines = text.count("\n") + 1
    strip = (lines * FOOTER_SIZE * LINE_SPACING + 8.0) / 72.0 / float(fig.get_figheight())
    fig.get_layout_engine().set(rect=(0.0, strip, 1.0, 1.0 - strip))
    fig.text(
        0.005,
        0.004,
        text,
        ha="left",
        va="bottom",
        fontsize=FOOTER_SIZE,
        color=FOOTER_COLOUR,
        linespacing=LINE_SPACING,
    )
    if legend is not None:
        fig.draw_without_rendering()
        legend.set_bbox_to_anchor((0.0, strip, 1.0, 1.0 - strip), transform=fig.transFigure)
        fig.set_layout_engine("none")


def figure_metadata(case: Case | None) -> tuple[dict[str, str | None], dict[str, str | None]]:
    """The PNG and SVG metadata of a figure of ``case``: title, provenance, caution; no date,
    no software version other than the tool's."""
    png: dict[str, str | None] = {"Software": None}
    svg: dict[str, str | None] = {"Date": None, "Creator": None}
    if case is not None:
        line = provenance_line(case)
        png.update(
            {
                "Title": case.title,
                "Description": line,
                "Source": f"case file SHA-256 {case.source_sha256}",
                "Software": tool_version(),
                "Disclaimer": caution_line(),
            }
        )
        svg.update(
            {
                "Title": case.title,
                "Description": f"{line}. {caution_line()}",
                "Source": f"case file SHA-256 {case.source_sha256}",
                "Creator": tool_version(),
            }
        )
    return png, svg


def save_figure(fig: Figure, stem: str | Path, case: Case | None = None) -> list[Path]:
    """Write ``stem.png`` (150 dpi) and ``stem.svg``; return the paths.

    With ``case``, both files' metadata carry its title, the tool's version, the case file's
    SHA-256 and the caution.
    """
    import matplotlib

    from compromise.outfiles import atomic_output, check_output_folder

    stem = Path(stem)
    check_output_folder(stem.parent)
    out = [stem.with_suffix(".png"), stem.with_suffix(".svg")]
    png, svg = figure_metadata(case)
    # each file is written beside its target and renamed into place (compromise.outfiles)
    with matplotlib.rc_context({"svg.hashsalt": "compromise", "svg.fonttype": "none"}):
        with atomic_output(out[0], binary=True) as fh:
            fig.savefig(fh, format="png", dpi=150, metadata=png)
        with atomic_output(out[1], binary=True) as fh:
            fig.savefig(fh, format="svg", metadata=svg)
    return out
