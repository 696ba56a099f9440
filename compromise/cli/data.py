"""Commands that carry data between model and prototype: convert, resolution."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated, Any

import typer

from compromise.cli.common import CaseArg, JsonOpt, _Command, _guard, _load, _print_json, app

DesignOpt = Annotated[
    Path | None,
    typer.Option(
        "--design",
        help="A saved answer (solve --json or evaluate --json output) whose design to use "
        "(default: solve the case).",
        show_default=False,
    ),
]


def _design(c: Any, design: Path | None) -> tuple[Any, str]:
    from compromise.review.convert import design_for

    d, source = design_for(c, None if design is None else str(design))
    if d is None:
        typer.echo(f"compromise: {source}", err=True)
        raise typer.Exit(1)
    return d, source


@app.command(cls=_Command)
def convert(
    case: CaseArg,
    input_file: Annotated[
        Path,
        typer.Option(
            "--input",
            help="CSV table with units in brackets in its headers, e.g. 'time \\[h]', "
            "'discharge \\[m^3/s]'.",
            show_default=False,
        ),
    ],
    to: Annotated[
        str,
        typer.Option(
            "--to", help="Carry the table to the 'prototype' or to the 'model'.", show_default=False
        ),
    ],
    design: DesignOpt = None,
    out: Annotated[
        Path | None,
        typer.Option("-o", "--out", help="Write the converted CSV here.", show_default=False),
    ] = None,
    sheet_out: Annotated[
        Path | None,
        typer.Option(
            "--sheet",
            help="With --to model: also write the run sheet (model minutes, L/s, pump setting) "
            "as CSV here.",
            show_default=False,
        ),
    ] = None,
    force: Annotated[
        bool, typer.Option("--force", help="Replace the -o or --sheet file if it exists.")
    ] = False,
    units: Annotated[
        str | None,
        typer.Option(
            "--units",
            help="Units of the converted columns: 'si' or 'us' (default: each column's own).",
            show_default=False,
        ),
    ] = None,
    column: Annotated[
        list[str] | None,
        typer.Option(
            "--column",
            help="Declare a column's kind, NAME=KIND: a case quantity, a kind such as "
            "vertical_length, discharge, time, pressure, or 'keep' (copied as it is). Repeatable.",
            show_default=False,
        ),
    ] = None,
    json_out: JsonOpt = False,
) -> None:
    """Carry a table of measurements or a test programme between model and prototype: each
    column by the law of its kind (case quantity, kind of the scale laws, or --column), the
    model and prototype fluids at their temperatures. --to model also prints the run sheet."""

    def body() -> int:
        from compromise.errors import CaseError
        from compromise.outfiles import check_output_file, write_text
        from compromise.presentation.convert_tables import (
            conversion_csv,
            format_conversion,
            run_sheet_csv,
            us_unit,
        )
        from compromise.review.columns import parse_column_option
        from compromise.review.convert import convert_table, read_table
        from compromise.review.programme import run_sheet

        if out is not None:
            check_output_file(out, force=force, key="-o")
        if to not in ("prototype", "model"):
            raise CaseError(f"expected 'prototype' or 'model', got {to!r}", key="--to")
        if sheet_out is not None:
            if to != "model":
                raise CaseError(
                    "a run sheet comes from a series carried to the model", key="--sheet"
                )
            check_output_file(sheet_out, force=force, key="--sheet")
            if out is not None and sheet_out.resolve() == out.resolve():
                raise CaseError(
                    "the run sheet and the converted table need two files", key="--sheet"
                )
        system = None if units is None else units.strip().lower()
        if system not in (None, "si", "us"):
            raise CaseError(f"expected 'si' or 'us', got {units!r}", key="--units")
        declared = dict(parse_column_option(t) for t in column or [])
        c = _load(case)
        frame = read_table(input_file)
        d, source = _design(c, design)
        conv = convert_table(
            c, d, frame, to=to, columns=declared, units=us_unit if system == "us" else system
        )
        sheet = run_sheet(c, conv, frame).to_dict() if to == "model" else None
        if out is not None:
            write_text(out, conversion_csv(conv, c, source))
        if sheet_out is not None and sheet is not None:
            write_text(sheet_out, run_sheet_csv(sheet, c))
        if json_out:
            from compromise.review.provenance import stamped

            data = conv.to_dict()
            data["design_source"] = source
            if sheet is not None:
                data["run_sheet"] = sheet
            _print_json(stamped(data, c))
        else:
            typer.echo(format_conversion(conv.to_dict(), source, sheet))
            if sheet_out is not None:
                typer.echo(f"wrote {sheet_out}")
            if out is not None:
                typer.echo(f"wrote {out}")
            else:
                typer.echo("")
                typer.echo(conversion_csv(conv, c, source), nl=False)
        return 0

    code = _guard(body)
    raise typer.Exit(code or 0)


@app.command(cls=_Command)
def resolution(
    case: CaseArg,
    design: DesignOpt = None,
    instrument: Annotated[
        list[str] | None,
        typer.Option(
            "--instrument",
            help="An instrument and its model-scale resolution, NAME=RESOLUTION[ on QUANTITY], "
            "e.g. 'point gauge=0.1 mm', 'flow meter=0.5 %' (added to the case's [instruments]). "
            "Repeatable.",
            show_default=False,
        ),
    ] = None,
    share: Annotated[
        float,
        typer.Option(
            "--share",
            help="Flag an instrument coarser than this percentage of the smallest prototype "
            "value it must resolve.",
        ),
    ] = 5.0,
    json_out: JsonOpt = False,
) -> None:
    """Each instrument's resolution in prototype terms per condition; flags an instrument too
    coarse for the smallest value it must resolve. Exit 0 when none is flagged, 1 otherwise."""

    def body() -> int:
        from compromise.casefile.instruments import parse_instrument
        from compromise.errors import CaseError
        from compromise.presentation.convert_tables import format_resolution
        from compromise.review.resolution import resolution as run

        if not 0 < share < 100:
            raise CaseError(
                f"expected a percentage between 0 and 100, got {share:g}", key="--share"
            )
        given = [parse_instrument(t) for t in instrument or []]
        c = _load(case)
        instruments = [*c.instruments, *given]
        if not instruments:
            raise CaseError(
                "no instruments: give --instrument 'point gauge=0.1 mm' or an [instruments] "
                "table in the case",
                key="--instrument",
            )
        d, source = _design(c, design)
        report = run(c, d, instruments, share=share / 100, design_source=source)
        data = report.to_dict()
        if json_out:
            from compromise.review.provenance import stamped

            _print_json(stamped(data, c))
        else:
            typer.echo(format_resolution(data, c.display_units))
        return 1 if report.flagged else 0

    code = _guard(body)
    raise typer.Exit(code or 0)
