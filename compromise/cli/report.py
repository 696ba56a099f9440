"""Commands that make documents: report (the decision document), init (a starting case)."""

from __future__ import annotations

import shlex
from pathlib import Path
from typing import Annotated

import typer

from compromise.cli.common import CaseArg, UnitsOpt, _Command, _guard, _load, _units, app


def _command_line(
    case: Path, design: Path | None, out: Path | None, pdf: bool, units: str | None, force: bool
) -> str:
    """The command as the user could type it again (built from the options, so that the same
    options give the same bytes whatever the shell or test runner)."""
    parts = ["compromise", "report", str(case)]
    if design is not None:
        parts += ["--design", str(design)]
    if out is not None:
        parts += ["-o", str(out)]
    if units is not None:
        parts += ["--units", units]
    if pdf:
        parts.append("--pdf")
    if force:
        parts.append("--force")
    return shlex.join(parts)


@app.command(cls=_Command)
def report(
    case: CaseArg,
    design: Annotated[
        Path | None,
        typer.Option(
            "--design",
            help="A proposed design to report beside the optimum: a saved answer (solve --json "
            "or evaluate --json output).",
            show_default=False,
        ),
    ] = None,
    out: Annotated[
        Path | None,
        typer.Option(
            "-o",
            "--out",
            help="Folder for report.html, report.md, their figures and report.pdf (default: "
            "out/<case name>/).",
            show_default=False,
        ),
    ] = None,
    pdf: Annotated[
        bool,
        typer.Option("--pdf", help="Also print report.pdf with headless Chromium."),
    ] = False,
    units: UnitsOpt = None,
    force: Annotated[
        bool, typer.Option("--force", help="Replace an existing report in the folder.")
    ] = False,
) -> None:
    """Write the decision document: one self-contained HTML file (and its Markdown twin) with
    the case, the design, similitude, limits, scale effects, alternatives, trade-offs, sources,
    the caution and what makes it reproducible. Exit 1 when the case is infeasible."""

    def body() -> int:
        from compromise.errors import CaseError
        from compromise.outfiles import check_output_folder
        from compromise.presentation.report import (
            INSTALL_HINT,
            find_chromium,
            report_files,
            write_report,
        )
        from compromise.review.report_data import report_data

        folder = out if out is not None else Path("out") / case.stem
        check_output_folder(folder, key="-o")
        if not force:
            for p in report_files(folder, pdf)[: 3 if pdf else 2]:
                if p.exists():
                    raise CaseError(f"{p} exists; use --force to replace it", key="-o")
        if pdf and find_chromium() is None:
            raise CaseError(INSTALL_HINT, key="--pdf")
        spec = None
        if design is not None:
            from compromise.casefile.designs import load_design_file

            spec = load_design_file(design)
        c = _load(case)
        system, _ = _units(units, c)
        data = report_data(
            c, design=spec, command=_command_line(case, design, out, pdf, units, force)
        )
        try:
            paths = write_report(data, folder, system=system, pdf=pdf)
        except RuntimeError as exc:
            raise CaseError(str(exc), key="--pdf") from None
        typer.echo("Wrote: " + ", ".join(str(p) for p in paths))
        return 0 if data.answer.get("status") == "optimal" else 1

    code = _guard(body)
    raise typer.Exit(code or 0)


@app.command(cls=_Command)
def init(
    template: Annotated[
        str,
        typer.Argument(help="The bundled scenario to start from (see --list).", show_default=True),
    ] = "river_bend",
    out: Annotated[
        Path | None,
        typer.Option(
            "-o",
            "--out",
            help="The case file to write (default: TEMPLATE.toml here); never overwritten.",
            show_default=False,
        ),
    ] = None,
    list_: Annotated[
        bool, typer.Option("--list", help="Name the bundled scenarios, one line each.")
    ] = False,
) -> None:
    """Write a commented starting case from one of the bundled scenarios."""

    def body() -> None:
        from compromise.casefile.scenarios import scenario_names, scenario_summary, starting_case
        from compromise.outfiles import check_output_file, write_text

        if list_:
            names = scenario_names()
            width = max(len(n) for n in names)
            for n in names:
                typer.echo(f"{n.ljust(width)}  {scenario_summary(n)}")
            return
        text = starting_case(template)
        target = out if out is not None else Path(f"{template}.toml")
        check_output_file(target, key="-o")
        write_text(target, text)
        typer.echo(f"Wrote: {target} (check it with: compromise check {target})")

    _guard(body)
