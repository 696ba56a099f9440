"""Commands on one case or the catalogue: check, solve, scales, fluids, groups, tolerance."""

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


@app.command(cls=_Command)
def check(case: CaseArg, json_out: JsonOpt = False) -> None:
    """Validate a case file and print what it says: quantities, groups, choices, limits."""

    def body() -> None:
        from compromise.presentation.tables import format_check
        from compromise.review.phenomena_hint import phenomena_hint
        from compromise.solving.problem import prototype_group_values

        c = _load(case)
        summary = c.summary()
        values = prototype_group_values(c)
        summary["group_values"] = {k: float(v[0]) for k, v in values.items()}
        hint = phenomena_hint(c)
        if hint is not None:
            summary["phenomena_hint"] = hint.to_dict()
        if json_out:
            _print_json(summary)
        else:
            typer.echo(format_check(summary, str(case)))

    _guard(body)


@app.command(cls=_Command)
def solve(
    case: CaseArg,
    json_out: JsonOpt = False,
    csv: Annotated[
        Path | None,
        typer.Option(
            "--csv", help="Also write the tables as CSV files into this folder.", show_default=False
        ),
    ] = None,
    enforce_thresholds: Annotated[
        bool,
        typer.Option(
            "--enforce-thresholds",
            help="Turn the scale-effect thresholds of the "
            "case's phenomena into bounds the design must satisfy.",
        ),
    ] = False,
    units: UnitsOpt = None,
) -> None:
    """Find the design with the least weighted mismatch within every limit."""

    def body() -> int:
        from compromise.presentation.display import to_display
        from compromise.presentation.tables import format_solution
        from compromise.review.answer import solve as run

        if csv is not None:
            from compromise.outfiles import check_output_folder

            check_output_folder(csv, key="--csv")
        c = _load(case)
        system, explicit = _units(units, c)
        sol = run(c, enforce_thresholds=enforce_thresholds)
        data = sol.to_dict()
        if csv is not None:
            from compromise.presentation.csv_tables import write_csv

            write_csv(to_display(data, system) if explicit else data, csv)
        if json_out:
            _print_json(data)
        else:
            typer.echo(format_solution(to_display(data, system)))
        return 0 if sol.feasible else 1

    code = _guard(body)
    raise typer.Exit(code or 0)


@app.command(cls=_Command)
def scales(
    case: CaseArg,
    ratio: Annotated[str, typer.Option("--ratio", help="Horizontal length ratio, e.g. 1:25.")],
    vertical: Annotated[
        str | None,
        typer.Option(
            "--vertical",
            help="Vertical length ratio for a distorted model, e.g. 1:5.",
            show_default=False,
        ),
    ] = None,
    velocity: Annotated[
        str | None,
        typer.Option(
            "--velocity",
            help="How velocity scales: 'froude', 'reynolds', another "
            "group of the case kept exactly, or the velocity ratio itself (default: the "
            "case's exact group).",
            show_default=False,
        ),
    ] = None,
    fluid: Annotated[
        str | None,
        typer.Option(
            "--fluid",
            help="Model fluid (default: the case's first model fluid).",
            show_default=False,
        ),
    ] = None,
    temperature: Annotated[
        str | None,
        typer.Option(
            "--temperature",
            help="Model fluid temperature, e.g. '20 degC' (default: the prototype's, brought "
            "inside the case's model range).",
            show_default=False,
        ),
    ] = None,
    pressure: Annotated[
        str | None,
        typer.Option(
            "--pressure",
            help="Model fluid pressure for a gas, or a liquid facility's ambient pressure, "
            "e.g. '5 bar'.",
            show_default=False,
        ),
    ] = None,
    condition: Annotated[
        str | None,
        typer.Option(
            "--condition",
            help="The condition whose quantities and groups are shown (default: the first).",
            show_default=False,
        ),
    ] = None,
    units: UnitsOpt = None,
    json_out: JsonOpt = False,
) -> None:
    """Print the scale ratio of every kind of quantity, and the case's quantities and groups."""

    def body() -> None:
        from compromise.errors import CaseError
        from compromise.presentation.tables import format_scales
        from compromise.review.wording import caution_line
        from compromise.solving.scales import scale_table
        from compromise.units import parse_ratio

        c = _load(case)
        try:
            r = parse_ratio(ratio)
        except ValueError as exc:
            raise CaseError(str(exc), key="--ratio") from None
        try:
            vr = parse_ratio(vertical) if vertical is not None else None
        except ValueError as exc:
            raise CaseError(str(exc), key="--vertical") from None
        vel: str | float | None = velocity
        if (
            velocity is not None
            and velocity.lower() not in c.groups
            and velocity.lower() not in ("froude", "reynolds")
        ):
            try:
                vel = parse_ratio(velocity)
            except ValueError:
                raise CaseError(
                    f"expected 'froude', 'reynolds', a group of the case or a "
                    f"ratio, got {velocity!r}",
                    key="--velocity",
                ) from None
        f = None
        if fluid is not None:
            from compromise.errors import UnknownFluidError
            from compromise.physics.fluids import get_fluid

            try:
                f = get_fluid(fluid).name
            except UnknownFluidError as exc:
                raise CaseError(str(exc), key="--fluid") from None
        t = _temperature(temperature, "--temperature") if temperature else None
        p = _pressure(pressure, "--pressure") if pressure else None
        from compromise.errors import FluidRangeError

        try:
            tab = scale_table(
                c,
                r,
                vertical=vr,
                velocity=vel,
                fluid=f,
                temperature=t,
                pressure=p,
                condition=condition if condition is not None else 0,
            )
        except FluidRangeError as exc:
            raise CaseError(str(exc), key="--temperature") from None
        data = {"title": c.title, "caution": caution_line(), **tab.to_dict()}
        if json_out:
            _print_json(data)
        else:
            from compromise.presentation.display import to_display

            typer.echo(format_scales(to_display(data, _units(units, c)[0])))

    _guard(body)


@app.command(cls=_Command)
def fluids(
    temperature: Annotated[
        str, typer.Option("--temperature", help="Temperature, e.g. '20 degC'.")
    ] = "20 degC",
    pressure: Annotated[
        str, typer.Option("--pressure", help="Pressure, e.g. '101325 Pa' or '1 atm'.")
    ] = "101325 Pa",
    json_out: JsonOpt = False,
) -> None:
    """List the fluid catalogue with its properties at one temperature and pressure."""

    def body() -> None:
        from compromise.physics.fluids import catalogue
        from compromise.presentation.tables import format_fluids
        from compromise.units import to_celsius

        t = _temperature(temperature, "--temperature")
        p = _pressure(pressure, "--pressure")
        cat = catalogue(t, p)
        data = {}
        for name, props in cat.items():
            if props is None:
                data[name] = None
                continue
            d = props.to_dict()
            data[name] = {
                k: d[k]
                for k in (
                    "density",
                    "dynamic_viscosity",
                    "kinematic_viscosity",
                    "surface_tension",
                    "speed_of_sound",
                    "vapour_pressure",
                    "estimated",
                )
            }
        if json_out:
            _print_json(data)
        else:
            typer.echo(format_fluids(data, to_celsius(t)))

    _guard(body)


@app.command(cls=_Command)
def groups(
    derive: Annotated[
        bool,
        typer.Option(
            "--derive",
            help="Derive a complete set of groups (Buckingham pi) "
            "from variables given with --var or from a case.",
        ),
    ] = False,
    var: Annotated[
        list[str] | None,
        typer.Option(
            "--var",
            help="A variable and its units, e.g. 'dp=Pa' or 'rho=kg/m^3' (repeat the option).",
            show_default=False,
        ),
    ] = None,
    repeating: Annotated[
        str | None,
        typer.Option(
            "--repeating",
            help="Comma-separated repeating variables, e.g. 'rho,V,D'.",
            show_default=False,
        ),
    ] = None,
    case: Annotated[
        Path | None,
        typer.Option(
            "--case",
            help="Take the variables from a case's quantities and fluid properties.",
            show_default=False,
        ),
    ] = None,
    json_out: JsonOpt = False,
) -> None:
    """List the built-in dimensionless groups, or derive a set with the Buckingham pi theorem."""

    def body() -> None:
        from compromise.errors import CaseError
        from compromise.physics.groups import BUILTIN_GROUPS, derive_groups
        from compromise.presentation.tables import table

        if not derive:
            if json_out:
                _print_json(
                    {
                        n: {
                            "symbol": g.symbol,
                            "expression": g.expression,
                            "forces": g.forces,
                            "meaning": g.meaning,
                            "references": list(g.references),
                        }
                        for n, g in BUILTIN_GROUPS.items()
                    }
                )
            else:
                rows = [[n, g.symbol, g.expression, g.forces] for n, g in BUILTIN_GROUPS.items()]
                typer.echo(
                    table(
                        ["group", "symbol", "expression (L: characteristic length)", "ratio of"],
                        rows,
                    )
                )
            return
        variables: dict[str, tuple[int, ...]] = {}
        if case is not None:
            from compromise.expressions import PROPERTY_DIMENSIONS

            c = _load(case)
            variables.update({n: q.dimension for n, q in c.quantities.items()})
            variables.update({n: tuple(int(x) for x in d) for n, d in PROPERTY_DIMENSIONS.items()})
        for item in var or []:
            from compromise.units import parse_quantity

            name, sep, unit = item.partition("=")
            if not sep or not name.strip().isidentifier():
                raise CaseError(f"expected NAME=UNITS such as 'dp=Pa', got {item!r}", key="--var")
            try:
                _, dim, _ = parse_quantity(f"1 {unit.strip()}" if unit.strip() else "1")
            except ValueError as exc:
                raise CaseError(str(exc), key="--var") from None
            variables[name.strip()] = dim
        if len(variables) < 2:
            raise CaseError(
                "expected at least two variables (--var NAME=UNITS or --case)", key="--var"
            )
        rep = [r.strip() for r in repeating.split(",")] if repeating else None
        try:
            derived = derive_groups(variables, rep)
        except ValueError as exc:
            raise CaseError(str(exc), key="--repeating") from None
        if json_out:
            _print_json([d.to_dict() for d in derived])
        elif not derived:
            typer.echo(
                f"No dimensionless group: the {len(variables)} variables are "
                "dimensionally independent."
            )
        else:
            for i, d in enumerate(derived, 1):
                typer.echo(f"Pi_{i} = {d.to_text()}")

    _guard(body)


@app.command(cls=_Command)
def tolerance(
    case: CaseArg,
    quantity: Annotated[
        str,
        typer.Option(
            "--quantity",
            help="Friction-controlled quantity: head_loss, slope, "
            "pressure_drop, friction or depth.",
        ),
    ],
    within: Annotated[
        str, typer.Option("--within", help="Admissible bias, e.g. '5%' or 0.05.")
    ] = "5%",
    apply: Annotated[
        bool,
        typer.Option(
            "--apply",
            help="Add the answer to the solver as a Reynolds floor and solve the case with it.",
        ),
    ] = False,
    json_out: JsonOpt = False,
) -> None:
    """The smallest model Reynolds number that keeps a quantity's bias within a tolerance."""

    def body() -> int:
        from compromise.errors import CaseError
        from compromise.presentation.tables import format_tolerance
        from compromise.review.tolerance import apply_tolerance, reynolds_tolerance
        from compromise.review.wording import caution_line

        c = _load(case)
        text = within.strip()
        try:
            tol = float(text[:-1]) / 100 if text.endswith("%") else float(text)
            if tol < 1e-6 and tol == tol and tol > -1e-6:
                raise ValueError  # below 1 ppm: no friction factor is known that well
        except ValueError:
            raise CaseError(
                f"expected a tolerance such as '5%', got {within!r}", key="--within"
            ) from None
        res = reynolds_tolerance(c, quantity, tol)
        data: dict[str, Any] = {
            "title": c.title,
            "caution": caution_line(),
            "tolerance": res.to_dict(),
        }
        sol = None
        if apply:
            from compromise.review.answer import solve as run

            floor = apply_tolerance(c, res)
            sol = run(floor.case)
            data["floor"] = floor.to_dict() | {"outcome": floor.outcome(sol.evaluation)}
            data["solution"] = sol.to_dict()
        if json_out:
            _print_json(data)
        else:
            typer.echo(format_tolerance(data))
        return 0 if sol is None or sol.feasible else 1

    code = _guard(body)
    raise typer.Exit(code or 0)
