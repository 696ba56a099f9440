"""Commands of the trade-off explorer: tradeoff, map, sensitivity."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

from compromise.cli.common import (
    CaseArg,
    JsonOpt,
    OutOpt,
    UnitsOpt,
    _Command,
    _guard,
    _load,
    _print_json,
    _units,
    app,
)


def _axes_list(first: str | None, more: list[str] | None) -> list[str]:
    """Axis names given as ``--opt A B [C]`` (the rest arrive as arguments) or ``A,B``."""
    names = [n.strip() for n in (first or "").split(",") if n.strip()]
    for item in more or []:
        names.extend(n.strip() for n in item.split(",") if n.strip())
    return names


def _written(paths: list[Path]) -> str:
    return "Wrote: " + ", ".join(str(p) for p in paths)


@app.command(cls=_Command)
def tradeoff(
    case: CaseArg,
    between: Annotated[
        str,
        typer.Option(
            "--between",
            help="The axes, two or three, each a thing to keep small: a "
            "group's name (its absolute log-mismatch), 'total' (the weighted mismatch),"
            " a quantity's name (its model value), 'plan_area' or 'distortion'. Write "
            "them after the option: --between total discharge.",
            show_default=False,
        ),
    ],
    more: Annotated[
        list[str] | None,
        typer.Argument(
            help="The second (and third) axis of --between.", show_default=False, metavar="AXIS..."
        ),
    ] = None,
    points: Annotated[
        int,
        typer.Option(
            "--points",
            min=2,
            max=10000,
            help="Epsilon values of the final sweep (points "
            "on the front, before duplicates are dropped).",
        ),
    ] = 100,
    keep_limits: Annotated[
        bool,
        typer.Option(
            "--keep-limits",
            help="Keep the case's maxima on the axes' own "
            "quantities; by default they are lifted, so the front shows what "
            "relaxing them buys.",
        ),
    ] = False,
    mismatch: Annotated[
        str,
        typer.Option(
            "--mismatch",
            help="How the figure shows a group: 'percent' (how far the model's value is off "
            "the prototype's), 'value' (the group's model value on a log axis, the prototype's "
            "value drawn as a line) or 'log' (|ln(model/prototype)|). The CSV and JSON keep "
            "|ln|.",
            show_default=True,
        ),
    ] = "percent",
    out: OutOpt = None,
    units: UnitsOpt = None,
    json_out: JsonOpt = False,
) -> None:
    """Trace the exact Pareto front between mismatches and model quantities (CSV, PNG, SVG)."""

    def body() -> int:
        from compromise.errors import CaseError
        from compromise.explore.tradeoffs import trace_front
        from compromise.outfiles import check_output_folder
        from compromise.presentation.explore_tables import format_front, write_front
        from compromise.review.provenance import stamped

        if mismatch not in ("percent", "value", "log"):
            raise CaseError(
                f"--mismatch must be 'percent', 'value' or 'log', not '{mismatch}'",
                key="--mismatch",
            )
        check_output_folder(out or Path("out") / case.stem)
        c = _load(case)
        system, explicit = _units(units, c)
        front = trace_front(c, _axes_list(between, more), points=points, lift=not keep_limits)
        folder = out or Path("out") / case.stem
        paths = write_front(front, folder, mismatch, system, system if explicit else "si")
        if json_out:
            _print_json(stamped(front.to_dict(), front.case))
        else:
            typer.echo(format_front(front, system=system))
            typer.echo("\n" + _written(paths))
        return 0 if front.points else 1

    code = _guard(body)
    raise typer.Exit(code or 0)


@app.command("map", cls=_Command)
def map_(
    case: CaseArg,
    axes: Annotated[
        str | None,
        typer.Option(
            "--axes",
            help="Two decision variables among horizontal_ratio, "
            "vertical_ratio, distortion, velocity_ratio, temperature and pressure: --axes "
            "horizontal_ratio distortion (default: those two when the case allows "
            "distortion, else horizontal_ratio and pressure when a gas's pressure may vary, "
            "else horizontal_ratio and temperature). A case with [sediment] maps grain_size "
            "against a ratio (default horizontal_ratio grain_size).",
            show_default=False,
        ),
    ] = None,
    more: Annotated[
        list[str] | None,
        typer.Argument(help="The second axis of --axes.", show_default=False, metavar="AXIS"),
    ] = None,
    fluid: Annotated[
        str | None,
        typer.Option(
            "--fluid",
            help="Model fluid of the map (default: the solver's choice).",
            show_default=False,
        ),
    ] = None,
    resolution: Annotated[
        int, typer.Option("--resolution", min=11, max=401, help="Grid points per axis.")
    ] = 81,
    full_range: Annotated[
        bool,
        typer.Option(
            "--full-range",
            help="Draw each axis over its whole range; by default an axis on which the "
            "feasible window is a thin sliver (under a fifth of the range) is zoomed onto it.",
        ),
    ] = False,
    out: OutOpt = None,
    units: UnitsOpt = None,
    json_out: JsonOpt = False,
) -> None:
    """Draw the feasible window over two decision variables, with the mismatch inside it."""

    def body() -> int:
        from compromise.explore.designmap import design_map
        from compromise.outfiles import check_output_folder
        from compromise.presentation.explore_tables import format_map, write_map
        from compromise.review.provenance import stamped

        check_output_folder(out or Path("out") / case.stem)
        names = _axes_list(axes, more)
        c = _load(case)
        system, explicit = _units(units, c)
        dmap = design_map(
            c, names or None, fluid=fluid, resolution=resolution, full_range=full_range
        )
        paths = write_map(
            dmap, out or Path("out") / case.stem, system, system if explicit else "si"
        )
        if json_out:
            _print_json(stamped(dmap.to_dict(), dmap.case))
        else:
            typer.echo(format_map(dmap, system))
            typer.echo("\n" + _written(paths))
        return 0 if dmap.feasible_share > 0 else 1

    code = _guard(body)
    raise typer.Exit(code or 0)


@app.command(cls=_Command)
def sensitivity(
    case: CaseArg,
    spread: Annotated[
        float,
        typer.Option(
            "--spread",
            min=1.0,
            max=1e6,
            help="Each weight is multiplied by a factor drawn "
            "log-uniformly between 1/SPREAD and SPREAD (1 to 1e6).",
        ),
    ] = 10.0,
    samples: Annotated[
        int, typer.Option("--samples", min=1, max=1_000_000, help="Number of weight samples.")
    ] = 2000,
    seed: Annotated[
        int,
        typer.Option(
            "--seed",
            min=0,
            max=2**63 - 1,
            help="Seed of the random generator (same seed, same answer).",
        ),
    ] = 0,
    out: OutOpt = None,
    units: UnitsOpt = None,
    json_out: JsonOpt = False,
) -> None:
    """How often each candidate design (fluid x preferred ratio) is best when weights vary."""

    def body() -> int:
        from compromise.explore.sensitivity import weight_sensitivity
        from compromise.outfiles import check_output_folder
        from compromise.presentation.explore_tables import format_sensitivity, write_sensitivity
        from compromise.review.provenance import stamped

        check_output_folder(out or Path("out") / case.stem)
        c = _load(case)
        system, explicit = _units(units, c)
        sens = weight_sensitivity(c, spread=spread, samples=samples, seed=seed)
        folder = out or Path("out") / case.stem
        paths = write_sensitivity(sens, folder, system, system if explicit else "si")
        if json_out:
            _print_json(stamped(sens.to_dict(), sens.case))
        else:
            typer.echo(format_sensitivity(sens, system))
            typer.echo("\n" + _written(paths))
        return 0 if sens.nominal >= 0 else 1

    code = _guard(body)
    raise typer.Exit(code or 0)
