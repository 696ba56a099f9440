"""Text tables and CSV files of the trade-off tools, and the files each command writes.

Presentation only: everything here comes from the results of :mod:`compromise.explore.tradeoffs`,
:mod:`compromise.explore.designmap` and :mod:`compromise.explore.sensitivity`. CSV numbers are
written with
``repr`` (shortest exact form), so the files are byte-for-byte reproducible; the figures come
from :mod:`compromise.presentation.plots`.
"""

from __future__ import annotations

import csv
import math
import textwrap
from pathlib import Path
from typing import TYPE_CHECKING, Any

from compromise.outfiles import atomic_output, check_output_folder
from compromise.presentation.tables import fmt, table
from compromise.review.wording import CAUTION
from compromise.units import format_ratio

if TYPE_CHECKING:
    from compromise.explore.designmap import DesignMap
    from compromise.explore.sensitivity import Sensitivity
    from compromise.explore.tradeoffs import Front
    from compromise.solving.design import Design


def _save(figure: str, result: Any, stem: Path) -> list[Path]:
    from compromise.presentation import plots

    return plots.save_figure(getattr(plots, figure)(result), stem, result.case)


def _short(design: Any, system: str = "si") -> str:
    from compromise.presentation.plots import short_label

    return short_label(design, system)


def _celsius(kelvin: float, system: str) -> float:
    """A design's temperature [K] in degC, or in degF in US units."""
    from compromise.presentation.display import celsius_to

    return celsius_to(kelvin - 273.15, system)[0]


def _temperature_unit(system: str) -> str:
    return "degF" if system == "us" else "degC"


def write_front(
    front: Front,
    folder: str | Path,
    mismatch: str = "percent",
    system: str = "si",
    csv_system: str = "si",
) -> list[Path]:
    """``tradeoff_A_B.csv``, ``.png`` and ``.svg`` in ``folder``; return the paths. The CSV
    keeps the axes' own units (a group's ``|ln(model/prototype)|``); the figure shows a group's
    mismatch in % unless ``mismatch`` is ``"value"`` (its model value) or ``"log"``. The figure
    is in ``system`` units, the CSV in ``csv_system`` units (``"si"`` or ``"us"``)."""
    from compromise.presentation.explore_display import pascal_to, shown_front

    folder = Path(folder)
    check_output_folder(folder)
    stem = folder / ("tradeoff_" + "_".join(front.names))
    path = stem.with_suffix(".csv")
    table_front = shown_front(front, csv_system)
    cols = [f"{a.name} [{a.unit}]" for a in table_front.axes]
    head = [
        "role",
        *cols,
        "fluid",
        f"temperature [{_temperature_unit(csv_system)}]",
        f"pressure [{pascal_to(1.0, csv_system)[1]}]",
        "horizontal_ratio",
        "vertical_ratio",
        "velocity_ratio",
        "distortion",
    ]
    with atomic_output(path) as fh:
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(head)
        knee = front.knee if front.has_knee else -1
        rows = [("knee" if i == knee else "front", pt) for i, pt in enumerate(table_front.points)]
        if table_front.chosen is not None:
            rows.append(("chosen", table_front.chosen))
        for role, pt in rows:
            d = pt.design
            w.writerow(
                [
                    role,
                    *(repr(x) for x in pt.values),
                    d.fluid,
                    repr(_celsius(d.temperature, csv_system)),
                    repr(pascal_to(d.pressure, csv_system)[0]),
                    repr(d.horizontal_ratio),
                    repr(d.vertical_ratio),
                    repr(d.velocity_ratio),
                    repr(d.distortion),
                ]
            )
    from compromise.presentation import plots

    figure = plots.front_figure(front, mismatch, system)
    return [path, *plots.save_figure(figure, stem, front.case)]


def _shown(front: Front, values: Any) -> list[Any]:
    """A point's axis values for the table: a dimensionless (mismatch) value below the noise
    is 0."""
    return [
        _mismatch(float(v)) if a.unit == "-" else v for a, v in zip(front.axes, values, strict=True)
    ]


def format_front(front: Front, rows: int = 12, system: str = "si") -> str:
    """A readable summary: every few points of the front, the knee and the solver's design
    (quantity axes and temperatures in ``system`` units, ``"si"`` or ``"us"``)."""
    from compromise.presentation.explore_display import shown_front

    front = shown_front(front, system)
    out = [front.case.title, ""]
    names = " vs ".join(f"{a.label} [{a.unit}]" for a in front.axes)
    if not front.points:
        return "\n".join([*out, f"Pareto front of {names}: no feasible design.", "", CAUTION])
    plural = "s" if len(front.points) != 1 else ""
    out.append(
        f"Pareto front of {names}: {len(front.points)} point{plural} (exact, epsilon-constraint;"
        f" {front.primary} minimised)."
    )
    for a in front.axes:
        if a.lifted and a.case_bound is not None:
            out.append(
                f"The case's limit {a.name} <= {fmt(a.case_bound)} {a.unit} is lifted: "
                "the front shows what relaxing it buys."
            )
    out.append("")
    n = len(front.points)
    step = max(1, math.ceil(n / rows))
    knee = front.knee if front.has_knee else -1
    show = sorted({*range(0, n, step), n - 1, *([knee] if knee >= 0 else [])})
    granular = front.points[0].design.material is not None

    def grain(d: Design) -> list[Any]:
        return [d.material, fmt(float(d.grain_size or 0.0) * 1e3)] if granular else []

    head = [
        "#",
        *(f"{a.name} [{a.unit}]" for a in front.axes),
        "fluid",
        f"T [{_temperature_unit(system)}]",
        "X",
        "distortion",
        "V",
        *(["material", "d [mm]"] if granular else []),
        "",
    ]
    body = []
    for i in show:
        pt = front.points[i]
        d = pt.design
        body.append(
            [
                str(i),
                *_shown(front, pt.values),
                d.fluid,
                f"{_celsius(d.temperature, system):.1f}",
                format_ratio(d.horizontal_ratio),
                d.distortion,
                format_ratio(d.velocity_ratio),
                *grain(d),
                "knee" if i == knee else "",
            ]
        )
    if front.chosen is not None:
        d = front.chosen.design
        body.append(
            [
                "solver",
                *_shown(front, front.chosen.values),
                d.fluid,
                f"{_celsius(d.temperature, system):.1f}",
                format_ratio(d.horizontal_ratio),
                d.distortion,
                format_ratio(d.velocity_ratio),
                *grain(d),
                "chosen",
            ]
        )
    out.append(table(head, body))
    from compromise.presentation.front_plot import front_caption

    if n == 1:
        out.append("\nThe front is a single point: one design is best on every axis.")
    elif n >= 3 and knee < 0:
        out.append(
            f"\nThe front is nearly straight (its bend is {100 * front.knee_depth:.1f} % of the "
            "line through its ends): it has no knee."
        )
    if front.chosen is not None:
        out += ["", *textwrap.wrap(front_caption(front), 96)]
    out += ["", CAUTION]
    return "\n".join(out)


def write_map(
    dmap: DesignMap, folder: str | Path, system: str = "si", csv_system: str = "si"
) -> list[Path]:
    """``map_A_B.csv``, ``.png`` and ``.svg`` in ``folder``; return the paths. The figure is
    in ``system`` units, the CSV in ``csv_system`` units (``"si"`` or ``"us"``)."""
    from compromise.presentation.explore_display import map_axis

    folder = Path(folder)
    check_output_folder(folder)
    stem = folder / f"map_{dmap.axes[0]}_{dmap.axes[1]}"
    path = stem.with_suffix(".csv")
    (x_unit, X), (y_unit, Y) = map_axis(dmap, 0, csv_system), map_axis(dmap, 1, csv_system)
    with atomic_output(path) as fh:
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(
            [
                f"{dmap.axes[0]} [{x_unit}]",
                f"{dmap.axes[1]} [{y_unit}]",
                "objective [-]",
                f"temperature [{_temperature_unit(csv_system)}]",
                *(f"{b.key} log-violation [-]" for b in dmap.boundaries),
            ]
        )
        for r in range(len(Y)):
            for c in range(len(X)):
                o = dmap.objective[r, c]
                w.writerow(
                    [
                        repr(float(X[c])),
                        repr(float(Y[r])),
                        repr(float(o)) if math.isfinite(o) else "",
                        repr(float(_celsius(dmap.temperature[r, c], csv_system))),
                        *(repr(float(b.violation[r, c])) for b in dmap.boundaries),
                    ]
                )
    from compromise.presentation import plots

    return [path, *plots.save_figure(plots.map_figure(dmap, system), stem, dmap.case)]


def format_map(dmap: DesignMap, system: str = "si") -> str:
    """The window's extent, the limits that bound it and the preferred ratios (limits on
    quantities, temperatures and pressures in ``system`` units, ``"si"`` or ``"us"``)."""
    from compromise.presentation.explore_display import boundary_label, pascal_to

    out = [
        dmap.case.title,
        "",
        f"Design-space map over {dmap.axes[0]} and {dmap.axes[1]}, model fluid {dmap.fluid}:"
        f" {100 * dmap.feasible_share:.1f} % of the map is feasible.",
    ]
    for i in (0, 1):
        if dmap.zoomed and dmap.zoomed[i]:
            lo, hi = dmap.full_ranges[i]
            scale = {"pressure": 1e-5, "grain_size": 1e3}.get(dmap.axes[i])  # to bar, mm
            if dmap.axes[i] == "temperature":
                shown = f"{lo - 273.15:g} to {hi - 273.15:g} degC"
            elif scale is not None:
                shown = f"{fmt(lo * scale)} to {fmt(hi * scale)} {dmap.units[i]}"
            else:
                shown = f"{format_ratio(lo)} to {format_ratio(hi)}"
            if system == "us" and dmap.axes[i] == "temperature":
                t = _temperature_unit(system)
                shown = f"{_celsius(lo, system):g} to {_celsius(hi, system):g} {t}"
            elif system == "us" and dmap.axes[i] == "pressure":
                p = [pascal_to(v, system)[0] for v in (lo, hi)]  # [Pa]
                shown = f"{fmt(p[0])} to {fmt(p[1])} {pascal_to(1.0, system)[1]}"
            out.append(
                f"The feasible window is a thin sliver of the {dmap.axes[i]} range ({shown}): "
                "the map is zoomed onto it (--full-range for the whole range)."
            )
    if dmap.optimum is not None:
        out.append(
            f"Optimum: {_short(dmap.optimum, system)} (weighted mismatch "
            f"{fmt(_mismatch(dmap.optimum_objective))})."
        )
    out.append("")
    rows = [
        [boundary_label(b, system), b.key, f"{100 * b.excluded:.1f}", "yes" if b.binding else ""]
        for b in dmap.boundaries
    ]
    out.append(table(["limit", "key", "excludes [% of map]", "binds"], rows))
    if dmap.preferred:
        out.append("")
        rows = [
            [
                r,
                _short(d, system) if d else "infeasible",
                _mismatch(o) if math.isfinite(o) else None,
            ]
            for r, d, o in dmap.preferred
        ]
        out.append(table(["preferred ratio", "best design there", "mismatch [-]"], rows))
    out += ["", CAUTION]
    return "\n".join(out)


def write_sensitivity(
    sens: Sensitivity, folder: str | Path, system: str = "si", csv_system: str = "si"
) -> list[Path]:
    """``sensitivity.csv`` (candidates), ``sensitivity_samples.csv`` and the bar chart. The
    samples' optimum temperature and pressure are in ``csv_system`` units (``"si"`` or
    ``"us"``); the chart has no dimensional value, so ``system`` does not change it."""
    from compromise.presentation.explore_display import shown_range

    folder = Path(folder)
    check_output_folder(folder)
    stem = folder / "sensitivity"
    path = stem.with_suffix(".csv")
    with atomic_output(path) as fh:
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(
            [
                "candidate",
                "fluid",
                "ratio",
                "wins",
                "share",
                "ties",
                "tie_share",
                "nominal_objective",
            ]
        )
        for c in sens.candidates:
            w.writerow(
                [
                    c.label,
                    c.fluid,
                    "" if c.ratio is None else repr(c.ratio),
                    c.wins,
                    repr(c.share),
                    c.ties,
                    repr(c.tie_share),
                    repr(_mismatch(c.nominal_objective)),
                ]
            )
    samples = folder / "sensitivity_samples.csv"
    with atomic_output(samples) as fh:
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(
            [
                "sample",
                *(f"factor {g}" for g in sens.groups),
                "best candidate",
                *(f"optimum {r.name} [{shown_range(r, csv_system).unit}]" for r in sens.ranges),
            ]
        )
        columns = [_sample_column(r.name, csv_system) for r in sens.ranges]
        for i in range(sens.samples):
            w.writerow(
                [
                    i,
                    *(repr(float(x)) for x in sens.factors[i]),
                    _best_of(sens, i),
                    *(repr(f(float(x))) for f, x in zip(columns, sens.optima[i], strict=True)),
                ]
            )
    return [path, samples, *_save("sensitivity_figure", sens, stem)]


def _sample_column(name: str, system: str) -> Any:
    """How a column of the samples' optima (temperature [degC], pressure [Pa]) is shown."""
    from compromise.presentation.display import celsius_to
    from compromise.presentation.explore_display import pascal_to

    if system == "us" and name == "temperature":
        return lambda v: celsius_to(v, system)[0]
    if system == "us" and name == "pressure":
        return lambda v: pascal_to(v, system)[0]
    return lambda v: v


def _best_of(sens: Sensitivity, sample: int) -> str:
    """The best candidate of a sample, or ``tied: a | b`` when several tie."""
    if sens.best_sets is None:
        win = sens.winners[sample]
        return sens.candidates[win].label if win >= 0 else ""
    labels = [c.label for c, b in zip(sens.candidates, sens.best_sets[sample], strict=True) if b]
    return labels[0] if len(labels) == 1 else ("tied: " + " | ".join(labels) if labels else "")


def _mismatch(v: float) -> Any:
    """A candidate's mismatch at the case's weights; numerical noise is shown as 0."""
    from compromise.solving.result import denoise

    return denoise(v) if math.isfinite(v) else "infeasible"


def format_sensitivity(sens: Sensitivity, system: str = "si") -> str:
    """The candidates' shares and the ranges of the optimum's decision variables (temperature
    and pressure in ``system`` units, ``"si"`` or ``"us"``)."""
    from compromise.explore.sensitivity import TIE_ABS
    from compromise.presentation.explore_display import shown_range

    out = [
        sens.case.title,
        "",
        f"Weights of {', '.join(sens.groups) or 'no group'} each multiplied by a factor "
        f"log-uniform in [1/{sens.spread:g}, {sens.spread:g}]; {sens.samples} samples, "
        f"seed {sens.seed}.",
    ]
    out = out[:2] + textwrap.wrap(out[2], 100)
    if sens.note:
        out += textwrap.wrap(sens.note, 100)
    out.append("")
    tied_nominal = len(sens.nominal_tied) > 1

    def remark(i: int) -> str:
        if tied_nominal and i in sens.nominal_tied:
            return "tied best at the case's weights"
        return "best at the case's weights" if i == sens.nominal else ""

    rows = [
        [
            c.label,
            c.wins,
            f"{100 * c.share:.1f}",
            c.ties,
            f"{100 * c.tie_share:.1f}",
            _mismatch(c.nominal_objective),
            remark(i),
        ]
        for i, c in enumerate(sens.candidates)
    ]
    head = [
        "candidate",
        "best alone",
        "share [%]",
        "tied best",
        "tied [%]",
        "mismatch at case weights [-]",
        "",
    ]
    out.append(table(head, rows))
    if sens.tied_samples:
        out.append("")
        out += textwrap.wrap(
            f"In {sens.tied_samples} of {sens.samples} samples two or more candidates tie for "
            f"the best (mismatches within {TIE_ABS:g}): the weights do not separate them, and "
            "no candidate wins those samples.",
            100,
        )
    out.append("")
    out.append("The unconstrained optimum over the samples:")

    def show(r: Any, v: float) -> str:
        if not math.isfinite(v):
            return "-"
        return (
            format_ratio(v)
            if r.name in ("horizontal_ratio", "vertical_ratio", "velocity_ratio")
            else fmt(v)
        )

    rows = [
        [
            f"{r.name} [{r.unit}]",
            *(show(r, v) for v in (r.nominal, r.minimum, r.p05, r.median, r.p95, r.maximum)),
        ]
        for r in (shown_range(r, system) for r in sens.ranges)
    ]
    out.append(table(["variable", "case weights", "min", "5 %", "median", "95 %", "max"], rows))
    shares = ", ".join(f"{f} {100 * s:.1f} %" for f, s in sens.fluid_shares.items())
    out.append("")
    out += textwrap.wrap(
        f"Model fluid of the optimum: {shares} (among tied fluids, the one the case lists "
        "first, as in solve).",
        100,
    )
    out += ["", CAUTION]
    return "\n".join(out)
