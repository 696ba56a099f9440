"""Commands for a design review: evaluate one proposed design, compare several."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated, Any

import typer

from compromise.cli.common import (
    CaseArg,
    JsonOpt,
    UnitsOpt,
    _Command,
    _guard,
    _load,
    _pressure,
    _print_json,
    _temperature,
    _units,
    app,
)


def _velocity(text: str | None) -> str | float | None:
    """A velocity law (a group name) or a velocity ratio ("1:3", 0.3)."""
    if text is None:
        return None
    from compromise.units import parse_ratio

    try:
        return parse_ratio(text)
    except ValueError:
        return text.strip()


@app.command(cls=_Command)
def evaluate(
    case: CaseArg,
    ratio: Annotated[
        str, typer.Option("--ratio", help="Horizontal length ratio of the proposal, e.g. 1:40.")
    ],
    vertical: Annotated[
        str | None,
        typer.Option("--vertical", help="Vertical length ratio, e.g. 1:10.", show_default=False),
    ] = None,
    distortion: Annotated[
        float | None,
        typer.Option(
            "--distortion",
            help="Vertical ratio over horizontal ratio (instead of --vertical).",
            show_default=False,
        ),
    ] = None,
    fluid: Annotated[
        str | None,
        typer.Option(
            "--fluid", help="Model fluid (default: the case's first).", show_default=False
        ),
    ] = None,
    temperature: Annotated[
        str | None,
        typer.Option(
            "--temperature",
            help="Model fluid temperature, e.g. '25 degC' (default: the lowest the case allows).",
            show_default=False,
        ),
    ] = None,
    pressure: Annotated[
        str | None,
        typer.Option(
            "--pressure",
            help="Model fluid pressure for a gas, or a liquid facility's ambient pressure.",
            show_default=False,
        ),
    ] = None,
    velocity: Annotated[
        str | None,
        typer.Option(
            "--velocity",
            help="How velocity scales: a group of the case kept exactly ('froude', "
            "'reynolds', ...) or the velocity ratio (default: the case's exact group).",
            show_default=False,
        ),
    ] = None,
    units: UnitsOpt = None,
    json_out: JsonOpt = False,
) -> None:
    """Review a proposed design: the account solve gives, what it breaks (with amounts) and
    how far it is from the optimum. Exit 0 when every limit holds, 1 when any is broken."""

    def body() -> int:
        from compromise.casefile.designs import DesignSpec
        from compromise.errors import CaseError
        from compromise.presentation.display import to_display
        from compromise.presentation.review_tables import format_review
        from compromise.review.proposal import design_from_spec
        from compromise.review.proposal import evaluate as run
        from compromise.units import parse_ratio

        c = _load(case)
        system, _ = _units(units, c)

        def ratio_of(text: str, option: str) -> float:
            try:
                return parse_ratio(text)
            except ValueError as exc:
                raise CaseError(str(exc), key=option) from None

        if distortion is not None and not (distortion > 0 and 1e-12 <= distortion <= 1e12):
            raise CaseError(
                f"expected a positive distortion between 1e-12 and 1e12, got {distortion:.3g}",
                key="--distortion",
            )
        spec = DesignSpec(
            ratio=ratio_of(ratio, "--ratio"),
            vertical=ratio_of(vertical, "--vertical") if vertical else None,
            distortion=distortion,
            fluid=fluid,
            temperature=_temperature(temperature, "--temperature") if temperature else None,
            pressure=_pressure(pressure, "--pressure") if pressure else None,
            velocity=_velocity(velocity),
            label=ratio + (f"/{vertical}" if vertical else ""),
        )
        design, notes = design_from_spec(c, spec)
        review = run(c, design, notes=notes, label=spec.label)
        data = review.to_dict()
        if json_out:
            _print_json(data)
        else:
            typer.echo(format_review(to_display(data, system)))
        return 0 if review.holds else 1

    code = _guard(body)
    raise typer.Exit(code or 0)


@app.command(cls=_Command)
def compare(
    case: CaseArg,
    designs: Annotated[
        list[str],
        typer.Argument(
            help="Designs to compare: saved answers (solve --json or evaluate --json output) "
            "or inline specs: a ratio, optionally /vertical ratio and @fluid,temperature,"
            "pressure, e.g. 1:40/1:10@water,25degC.",
            show_default=False,
        ),
    ],
    csv: Annotated[
        Path | None,
        typer.Option(
            "--csv", help="Also write comparison.csv into this folder.", show_default=False
        ),
    ] = None,
    units: UnitsOpt = None,
    json_out: JsonOpt = False,
) -> None:
    """Put designs side by side: ratios, fluid, model quantities, mismatches, limit margins,
    threshold verdicts and the objective, the best value of each row marked."""

    def body() -> int:
        from compromise.casefile.designs import load_design_file, parse_design_spec
        from compromise.presentation.display import to_display
        from compromise.presentation.review_tables import format_comparison, write_comparison_csv
        from compromise.review.comparison import compare as run
        from compromise.review.proposal import design_from_spec, evaluate
        from compromise.solving.optimum import find_optimum

        if csv is not None:
            from compromise.outfiles import check_output_folder

            check_output_folder(csv, key="--csv")
        c = _load(case)
        system, explicit = _units(units, c)
        specs: list[Any] = []
        for i, text in enumerate(designs):
            path = Path(text)
            if text.lower().endswith(".json") or path.is_file():
                specs.append(load_design_file(path))
            else:
                specs.append(parse_design_spec(text, key=f"DESIGN {i + 1}"))
        optimum = find_optimum(c, alternatives=False)
        reviews = []
        for spec in specs:
            design, notes = design_from_spec(c, spec)
            reviews.append(evaluate(c, design, notes=notes, label=spec.label, optimum=optimum))
        data = run(c, reviews).to_dict()
        if csv is not None:
            paths = write_comparison_csv(to_display(data, system) if explicit else data, csv)
            if not json_out:
                typer.echo("wrote " + ", ".join(paths))
        if json_out:
            _print_json(data)
        else:
            typer.echo(format_comparison(to_display(data, system)))
        return 0

    code = _guard(body)
    raise typer.Exit(code or 0)
