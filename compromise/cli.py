"""The ``compromise`` command: parses, calls the library, prints. No physics here.

Exit status: 0 answered, 1 infeasible (an answer with its diagnosis), 2 bad input.
"""

from __future__ import annotations

import json
import math
import sys
from pathlib import Path
from typing import Annotated, Any

import typer
from typer.core import TyperCommand, TyperGroup


def _as_flags(params: list[Any]) -> list[Any]:
    """Boolean flags (``--json``, ``--help``) shown as flags in the help, without a type."""
    for p in params:
        if getattr(p, "is_flag", False) and not getattr(p, "count", False):
            p.metavar = ""
    return params


class _Command(TyperCommand):
    """A command whose help shows boolean flags as flags (not ``--json <bool>``)."""

    def get_params(self, ctx: Any) -> list[Any]:
        return _as_flags(super().get_params(ctx))


class _Group(TyperGroup):
    """The command group, with the same help for flags as :class:`_Command`."""

    def get_params(self, ctx: Any) -> list[Any]:
        return _as_flags(super().get_params(ctx))


app = typer.Typer(
    cls=_Group,
    name="compromise",
    help="Choose the length ratio, distortion, model fluid and temperature of a physical flow "
    "model inside a laboratory's limits, and defend the choice.",
    context_settings={"help_option_names": ["-h", "--help"]},
    add_completion=False,
    no_args_is_help=True,
    pretty_exceptions_enable=False,
)

CaseArg = Annotated[Path, typer.Argument(help="The case file (TOML).", show_default=False)]
JsonOpt = Annotated[bool, typer.Option("--json", help="Print one JSON object (SI units, degC).")]


def _version(value: bool) -> None:
    if value:
        from compromise import __version__

        typer.echo(f"compromise {__version__}")
        raise typer.Exit()


@app.callback()
def _main(
    version: Annotated[
        bool,
        typer.Option("--version", callback=_version, is_eager=True, help="Print the version."),
    ] = False,
) -> None:
    """Choose the scales of a physical flow model within a laboratory's limits."""


def _clean(obj: Any) -> Any:
    """JSON-safe copy: non-finite floats become null."""
    if isinstance(obj, float):
        return obj if math.isfinite(obj) else None
    if isinstance(obj, dict):
        return {str(k): _clean(v) for k, v in obj.items()}
    if isinstance(obj, list | tuple):
        return [_clean(v) for v in obj]
    return obj


def _print_json(data: Any) -> None:
    typer.echo(json.dumps(_clean(data), indent=2, allow_nan=False))


def _fail(lines: list[str]) -> None:
    for line in lines:
        typer.echo(f"error: {line}", err=True)
    raise typer.Exit(2)


def _guard(fn: Any) -> Any:
    """Run a command body; turn compromise's errors into one line each and exit status 2."""
    from compromise.errors import CaseError, CaseErrors, CompromiseError

    try:
        return fn()
    except CaseErrors as exc:
        _fail([e.line() for e in exc.errors])
    except CaseError as exc:
        _fail([exc.line()])
    except CompromiseError as exc:
        _fail([str(exc)])
    return None


def _load(path: Path) -> Any:
    from compromise.casefile.load import load_case

    return load_case(path)


def _temperature(text: str, option: str) -> float:
    from compromise.errors import CaseError
    from compromise.units import parse_quantity

    try:
        value, dim, _ = parse_quantity(text)
    except ValueError as exc:
        raise CaseError(str(exc), key=option) from None
    if dim != (0, 0, 0, 1):
        raise CaseError(f"expected a temperature such as '20 degC', got {text!r}", key=option)
    return value


def _pressure(text: str, option: str) -> float:
    from compromise.errors import CaseError
    from compromise.units import parse_quantity

    try:
        value, dim, _ = parse_quantity(text)
    except ValueError as exc:
        raise CaseError(str(exc), key=option) from None
    if dim != (1, -1, -2, 0) or value <= 0:
        raise CaseError(
            f"expected a positive pressure such as '101325 Pa', got {text!r}", key=option
        )
    return value


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
) -> None:
    """Find the design with the least weighted mismatch within every limit."""

    def body() -> int:
        from compromise.presentation.tables import format_solution
        from compromise.review.answer import solve as run

        sol = run(_load(case), enforce_thresholds=enforce_thresholds)
        data = sol.to_dict()
        if csv is not None:
            from compromise.presentation.tables import write_csv

            write_csv(data, csv)
        if json_out:
            _print_json(data)
        else:
            typer.echo(format_solution(data))
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
            "--pressure", help="Model fluid pressure for a gas, e.g. '5 bar'.", show_default=False
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
            typer.echo(format_scales(data))

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


OutOpt = Annotated[
    Path | None,
    typer.Option(
        "-o",
        "--out",
        help="Folder for the CSV, PNG and SVG files (default: out/<case name>/).",
        show_default=False,
    ),
]


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
    out: OutOpt = None,
    json_out: JsonOpt = False,
) -> None:
    """Trace the exact Pareto front between mismatches and model quantities (CSV, PNG, SVG)."""

    def body() -> int:
        from compromise.explore.tradeoffs import trace_front
        from compromise.presentation.explore_tables import format_front, write_front
        from compromise.review.provenance import stamped

        front = trace_front(
            _load(case), _axes_list(between, more), points=points, lift=not keep_limits
        )
        paths = write_front(front, out or Path("out") / case.stem)
        if json_out:
            _print_json(stamped(front.to_dict(), front.case))
        else:
            typer.echo(format_front(front))
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
            "vertical_ratio, distortion, velocity_ratio and temperature: --axes "
            "horizontal_ratio distortion (default: those two when the case allows "
            "distortion, else horizontal_ratio and temperature).",
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
    out: OutOpt = None,
    json_out: JsonOpt = False,
) -> None:
    """Draw the feasible window over two decision variables, with the mismatch inside it."""

    def body() -> int:
        from compromise.explore.designmap import design_map
        from compromise.presentation.explore_tables import format_map, write_map
        from compromise.review.provenance import stamped

        names = _axes_list(axes, more)
        dmap = design_map(_load(case), names or None, fluid=fluid, resolution=resolution)
        paths = write_map(dmap, out or Path("out") / case.stem)
        if json_out:
            _print_json(stamped(dmap.to_dict(), dmap.case))
        else:
            typer.echo(format_map(dmap))
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
            help="Each weight is multiplied by a factor drawn "
            "log-uniformly between 1/SPREAD and SPREAD.",
        ),
    ] = 10.0,
    samples: Annotated[
        int, typer.Option("--samples", min=1, help="Number of weight samples.")
    ] = 2000,
    seed: Annotated[
        int, typer.Option("--seed", help="Seed of the random generator (same seed, same answer).")
    ] = 0,
    out: OutOpt = None,
    json_out: JsonOpt = False,
) -> None:
    """How often each candidate design (fluid x preferred ratio) is best when weights vary."""

    def body() -> int:
        from compromise.explore.sensitivity import weight_sensitivity
        from compromise.presentation.explore_tables import format_sensitivity, write_sensitivity
        from compromise.review.provenance import stamped

        sens = weight_sensitivity(_load(case), spread=spread, samples=samples, seed=seed)
        paths = write_sensitivity(sens, out or Path("out") / case.stem)
        if json_out:
            _print_json(stamped(sens.to_dict(), sens.case))
        else:
            typer.echo(format_sensitivity(sens))
            typer.echo("\n" + _written(paths))
        return 0 if sens.nominal >= 0 else 1

    code = _guard(body)
    raise typer.Exit(code or 0)


def main() -> None:
    """Entry point of the ``compromise`` command."""
    try:
        app()
    except KeyboardInterrupt:  # pragma: no cover
        sys.exit(130)
