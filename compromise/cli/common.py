"""What every command shares: the typer app, option types, JSON printing, error handling."""

from __future__ import annotations

import json
import math
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


OutOpt = Annotated[
    Path | None,
    typer.Option(
        "-o",
        "--out",
        help="Folder for the CSV, PNG and SVG files (default: out/<case name>/).",
        show_default=False,
    ),
]


UnitsOpt = Annotated[
    str | None,
    typer.Option(
        "--units",
        help="Units of the text output: 'si' or 'us' (feet, cfs, psi, degF, lbf). Default: the "
        "case's display_units, else si. JSON stays SI; CSV files only follow an explicit --units.",
        show_default=False,
    ),
]


def _units(value: str | None, case: Any) -> tuple[str, bool]:
    """The unit system to show (``--units``, else the case's ``display_units``) and whether it
    was asked for on the command line (CSV files follow only an explicit choice)."""
    from compromise.errors import CaseError

    if value is None:
        return getattr(case, "display_units", "si"), False
    system = value.strip().lower()
    if system not in ("si", "us"):
        raise CaseError(f"expected 'si' or 'us', got {value!r}", key="--units")
    return system, True
