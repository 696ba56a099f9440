"""Text and CSV of data carried between model and prototype, run sheets and instrument
resolution (presentation only: every number comes from the review layer)."""

from __future__ import annotations

import csv
import io
import math
from typing import Any

from compromise.presentation.display import US
from compromise.presentation.text import design_lines, fmt, table
from compromise.review.columns import FRICTION_KINDS
from compromise.review.wording import CAUTION, TAG_LEGEND
from compromise.units import format_ratio

#: digits of the numbers in a converted CSV: enough for a round trip, none of the float noise
CSV_DIGITS = 12


def us_unit(si: str) -> str:
    """The US customary unit shown for an SI unit (the same table as the text answers).

    Examples
    --------
    >>> us_unit("m^3/s"), us_unit("Pa"), us_unit("s")
    ('cfs', 'psi', 's')
    """
    return US[si][0] if si in US else si


def _number(v: Any) -> str:
    if v is None or (isinstance(v, float) and math.isnan(v)):
        return ""
    if isinstance(v, float | int) and not isinstance(v, bool):
        text = f"{float(v):.{CSV_DIGITS}g}"
        return "0" if text == "-0" else text
    return str(v)


def conversion_csv(conversion: Any, case: Any, design_source: str) -> str:
    """The converted table as CSV, after ``#`` lines with the caution, the case and the design
    (``compromise convert`` reads such lines as comments)."""
    from compromise.review.provenance import provenance_line

    d = conversion.chain.design
    buf = io.StringIO()
    for line in CAUTION.splitlines():
        buf.write(f"# {line}\n")
    buf.write(f"# {provenance_line(case)}\n")
    buf.write(f"# carried to the {conversion.to} with {d.label()}; {design_source}\n")
    w = csv.writer(buf, lineterminator="\n")
    frame = conversion.frame
    w.writerow([str(c) for c in frame.columns])
    for row in frame.itertuples(index=False):
        w.writerow([_number(v) for v in row])
    return buf.getvalue()


def _chain_lines(chain: dict[str, Any]) -> list[str]:
    rows = []
    for side in ("prototype", "model"):
        s = chain[side]
        rows.append([side, s["fluid"], f"{s['temperature']:.1f}", s["rho"], s["mu"], s["nu"]])
    out = table(
        ["side", "fluid", "temperature [degC]", "rho [kg/m^3]", "mu [Pa s]", "nu [m^2/s]"], rows
    )
    return out.splitlines()


def format_conversion(data: dict[str, Any], design_source: str, sheet: dict | None = None) -> str:
    """The text account of a conversion: the design, both fluids, each column's law and ratio,
    and the run sheet of a test programme."""
    chain = data["chain"]
    lines = [f"Data carried to the {data['to']} ({design_source})", ""]
    lines += design_lines(chain["design"])
    lines += ["", "Fluids at their temperatures (the property ratios every law uses):"]
    lines += ["  " + x for x in _chain_lines(chain)]
    friction = any(c["kind"] in FRICTION_KINDS for c in data["columns"])
    if friction and chain.get("friction_law"):
        lines.append(f"  friction law kept: {chain['friction_law']}")
    lines += ["", "Columns (ratio = model / prototype):"]
    rows = [
        [
            c["header"],
            c["kind"],
            c["recognised_by"],
            c["law"],
            format_ratio(c["ratio"]) if c["kind"] != "keep" and c["ratio"] is not None else "-",
            c["out_header"],
        ]
        for c in data["columns"]
    ]
    lines += [
        "  " + x
        for x in table(
            ["column", "kind", "recognised by", "law", "ratio", "written as"], rows
        ).splitlines()
    ]
    for e in data.get("extrapolations", []):
        lines += ["", *format_extrapolation(e)]
    for note in data.get("notes", []):
        lines += ["", f"Note: {note}"]
    if sheet is not None:
        lines += ["", *format_run_sheet(sheet).splitlines()]
    lines += ["", CAUTION]
    return "\n".join(lines)


def format_extrapolation(e: dict[str, Any]) -> list[str]:
    """The ITTC-1978 extrapolation of a towed hull's resistance: inputs and each row's steps."""
    lines = [f"Ship resistance from {e['column']} by the ITTC-1978 method:"]
    lines.append(
        f"  model: L = {fmt(e['model_length'])} m, S = {fmt(e['model_wetted_surface'])} m^2; "
        f"ship: L = {fmt(e['ship_length'])} m, S = {fmt(e['ship_wetted_surface'])} m^2"
    )
    if e["form_factor_source"] == "case":
        lines.append(f"  form factor 1 + k = {1 + e['form_factor_k']:.4f} (from the case)")
    else:
        p = e["prohaska"]
        lines.append(
            f"  form factor 1 + k = {p['one_plus_k']:.4f} (Prohaska fit of rows "
            f"{', '.join(map(str, p['rows']))}, Fn <= {fmt(p['max_froude'])}: "
            f"C_TM/C_FM = (1 + k) + {fmt(p['slope'])} Fn^4/C_FM, rms residual "
            f"{fmt(p['rms_residual'])})"
        )
    air = "" if e["air_area"] is None else f", air area {fmt(e['air_area'])} m^2"
    lines.append(
        f"  roughness allowance {e['roughness_allowance']}; correlation allowance C_A = "
        f"{e['correlation_allowance']:g}{air}"
    )
    lines.append("  C_R = C_TM - (1 + k) C_FM;  C_TS = (1 + k) C_FS + dC_F + C_A + C_R + C_AAS")
    steps = e["steps"]
    names = [n for n in steps if n not in ("k", "C_A")]
    rows = []
    for i in range(len(steps["R_TS"])):
        row: list[Any] = [i + 1]
        for n in names:
            v = steps[n][i]
            row.append(None if v is None else (v / 1000 if n == "R_TS" else v))
        rows.append(row)
    head = ["row", *[("R_TS [kN]" if n == "R_TS" else n) for n in names]]
    lines += ["  " + x for x in table(head, rows).splitlines()]
    return lines


def format_run_sheet(sheet: dict[str, Any]) -> str:
    """The run sheet: model time in minutes, model discharge in L/s, pump setting."""
    lines = ["Run sheet:"]
    if sheet["pump_limit"] is not None:
        lines.append(
            f"  pump setting = model discharge / {sheet['pump_key']} "
            f"({fmt(sheet['pump_limit'] * 1000)} L/s)"
        )
    rows = []
    for r in sheet["rows"]:
        rows.append(
            [
                r["step"],
                None if r["prototype_time"] is None else r["prototype_time"] / 3600,
                None if r["model_time"] is None else r["model_time"] / 60,
                None if r["model_discharge"] is None else r["model_discharge"] * 1000,
                None if r["pump_share"] is None else r["pump_share"] * 100,
                "; ".join(r["warnings"]) or "",
            ]
        )
    head = [
        "step",
        "prototype time [h]",
        "model time [min]",
        "model discharge [L/s]",
        "pump setting [%]",
        "warning",
    ]
    lines += ["  " + x for x in table(head, rows).splitlines()]
    if sheet["duration"] is not None:
        lines.append(
            f"  run duration: {fmt(sheet['duration'] / 60)} model minutes "
            f"({fmt(sheet['prototype_duration'] / 3600)} prototype hours)"
        )
    lines += sheet["warnings"]
    return "\n".join(lines)


def format_resolution(data: dict[str, Any], system: str = "si") -> str:
    """Each instrument's resolution in prototype terms, per condition, and the flags."""
    from compromise.presentation.display import convert as to_unit

    lines = [f"Instrument resolution in prototype terms ({data['design_source']})", ""]
    lines += design_lines(data["design"])
    lines.append("")
    for inst in data["instruments"]:
        unit = inst["unit"]
        shown = to_unit(1.0, unit, system)[1]

        def val(v: float | None, unit: str = unit) -> float | None:
            return to_unit(v, unit, system)[0]

        kind = inst["kind"]
        what = (
            f"the case's {kind.removeprefix('quantity:')}"
            if kind.startswith("quantity:")
            else kind.replace("_", " ")
        )
        head = f"{inst['name']} ({inst['text']}): measures {what}, law {inst['law']}, "
        head += f"ratio {format_ratio(inst['ratio'])}"
        lines.append(head)
        if inst["prototype_resolution"] is not None:
            lines.append(
                f"  one step of the instrument is {fmt(val(inst['prototype_resolution']))} "
                f"{shown} in the prototype"
            )
        if inst["readings"]:
            rows = [
                [
                    r["condition"],
                    val(r["prototype_value"]),
                    val(r["model_value"]),
                    val(r["prototype_resolution"]),
                    val(r["model_resolution"]),
                    r["share"] * 100,
                ]
                for r in inst["readings"]
            ]
            q = inst["quantity"]
            heads = [
                "condition",
                f"prototype {q} [{shown}]",
                f"model {q} [{shown}]",
                f"resolution, prototype [{shown}]",
                f"resolution, model [{shown}]",
                "share [%]",
            ]
            lines += ["  " + x for x in table(heads, rows).splitlines()]
        verdict = (
            "FLAG: " + inst["note"]
            if inst["flagged"]
            else (inst["note"] or f"fine: within {fmt(data['share'] * 100)} % in every condition")
        )
        lines += [f"  {verdict}", ""]
    flagged = data["flagged"]
    lines.append(
        f"Flagged (coarser than {fmt(data['share'] * 100)} % of the smallest value to resolve, "
        f"common practice): {', '.join(flagged) if flagged else 'none'}"
    )
    lines += ["", TAG_LEGEND, "", CAUTION]
    return "\n".join(lines)


def run_sheet_csv(sheet: dict[str, Any], case: Any) -> str:
    """The run sheet as CSV (model minutes, L/s, pump setting in %), after ``#`` lines with
    the caution, the case and the run's duration."""
    from compromise.review.provenance import provenance_line

    buf = io.StringIO()
    for line in CAUTION.splitlines():
        buf.write(f"# {line}\n")
    buf.write(f"# {provenance_line(case)}\n")
    if sheet["duration"] is not None:
        buf.write(f"# run duration: {_number(sheet['duration'] / 60)} model minutes\n")
    if sheet["pump_key"] is not None:
        buf.write(f"# pump setting: model discharge / {sheet['pump_key']}\n")
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(
        [
            "step",
            "prototype time [h]",
            "model time [min]",
            "model discharge [L/s]",
            "pump setting [%]",
            "warning",
        ]
    )

    def scaled(v: float | None, factor: float) -> str:
        return "" if v is None else _number(v * factor)

    for r in sheet["rows"]:
        w.writerow(
            [
                r["step"],
                scaled(r["prototype_time"], 1 / 3600),
                scaled(r["model_time"], 1 / 60),
                scaled(r["model_discharge"], 1000),
                scaled(r["pump_share"], 100),
                "; ".join(r["warnings"]),
            ]
        )
    return buf.getvalue()
