"""What every command shares: the typer app, option types, JSON printing, error handling."""

from __future__ import annotations

import json
import math
import re
import sys
from pathlib import Path
from typing import Annotated, Any

import typer
from typer.core import TyperCommand, TyperGroup


def _click_errors(name: str) -> tuple[type[BaseException], ...]:
    """The exception class ``name`` of click and of the copy of click typer carries.

    Recent typer carries its own click (and does not install click); older typer uses click
    itself. Either, or both, may be present.
    """
    found: list[type[BaseException]] = []
    for module in ("typer._click.exceptions", "click.exceptions"):
        try:
            import importlib

            cls = getattr(importlib.import_module(module), name, None)
        except ImportError:
            continue
        if cls is not None and cls not in found:
            found.append(cls)
    return tuple(found)


_NO_ARGS = _click_errors("NoArgsIsHelpError")
_USAGE = _click_errors("UsageError")
_CLICK = _click_errors("ClickException")
_ABORT = (*_click_errors("Abort"), typer.Abort)


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
    """The command group, with the same help for flags as :class:`_Command`.

    It is also the last line of defence: a usage error (unknown option, bad option value) is
    one ``error:`` line and exit status 2, and any exception no command turned into an error
    message is one ``internal error`` line and exit status 3 (``--debug`` shows the
    traceback), so a crash is never read as an answer (0) or as "infeasible" (1).
    """

    def get_params(self, ctx: Any) -> list[Any]:
        return _as_flags(super().get_params(ctx))

    def main(  # type: ignore[override]
        self,
        args: Any = None,
        prog_name: str | None = None,
        complete_var: str | None = None,
        standalone_mode: bool = True,
        **extra: Any,
    ) -> Any:
        if not standalone_mode:
            return super().main(args, prog_name, complete_var, standalone_mode, **extra)
        _STATE["debug"] = False
        try:
            rv = super().main(args, prog_name, complete_var, False, **extra)
        except _NO_ARGS as exc:
            exc.show()
            sys.exit(exc.exit_code)
        except _USAGE as exc:
            hint = ""
            if exc.ctx is not None:
                hint = f" (see '{exc.ctx.command_path} --help')"
            typer.echo(f"error: {one_line(exc.format_message())}{hint}", err=True)
            sys.exit(2)
        except _CLICK as exc:
            typer.echo(f"error: {one_line(exc.format_message())}", err=True)
            sys.exit(exc.exit_code)
        except _ABORT:
            typer.echo("error: aborted", err=True)
            sys.exit(130)
        except Exception as exc:  # the last line of defence: see the class docstring
            _internal(exc)
        sys.exit(rv if isinstance(rv, int) else 0)


#: Set by ``--debug`` for the command being run.
_STATE: dict[str, bool] = {"debug": False}


def _internal(exc: BaseException) -> None:
    """Report an unexpected exception in one line (the traceback with ``--debug``); exit 3."""
    if _STATE["debug"]:
        import traceback

        traceback.print_exception(exc, file=sys.stderr)
    text = str(exc) or type(exc).__name__
    typer.echo(
        f"error: internal error: {type(exc).__name__}: {one_line(text)}; rerun with --debug "
        "for the traceback and report it with the case file",
        err=True,
    )
    sys.exit(3)


_CONTROL = re.compile(r"[\x00-\x1f\x7f-\x9f\u2028\u2029]")
_LONG_DIGITS = re.compile(r"(?<![\w.])([-+]?)(\d{16,})(?:\.\d*)?(?![\w.])")


def _escape(match: re.Match[str]) -> str:
    ch = match.group(0)
    return {"\n": "\\n", "\r": "\\r", "\t": "\\t"}.get(
        ch, f"\\x{ord(ch):02x}" if ord(ch) < 256 else f"\\u{ord(ch):04x}"
    )


def _short_digits(match: re.Match[str]) -> str:
    sign, digits = match.group(1), match.group(2)
    return f"{sign}{digits[0]}.{digits[1:3]}e+{len(digits) - 1}"


def one_line(text: str) -> str:
    r"""Text made safe for one terminal line: control characters (escape sequences, newlines)
    escaped, integers of 16 digits or more in short scientific form.

    Examples
    --------
    >>> one_line("key a" + chr(27) + "[31mb" + chr(10) + "c") == r"key a\x1b[31mb\nc"
    True
    >>> one_line("got 1" + "0" * 400)
    'got 1.00e+400'
    """
    return _LONG_DIGITS.sub(_short_digits, _CONTROL.sub(_escape, text))


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
    debug: Annotated[
        bool,
        typer.Option("--debug", help="Show the traceback of an internal error (exit status 3)."),
    ] = False,
) -> None:
    """Choose the scales of a physical flow model within a laboratory's limits."""
    _STATE["debug"] = debug


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
        typer.echo(f"error: {one_line(line)}", err=True)
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
        help="Units of the text output and figures: 'si' or 'us' (feet, cfs, psi, degF, lbf). "
        "Default: the case's display_units, else si. JSON stays SI; CSV files only follow an "
        "explicit --units.",
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
