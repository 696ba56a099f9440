"""Readable text for the command line: tables of a solution, a case summary, scale tables.

Presentation only: everything printed here comes from the results' ``to_dict()`` or fields; no
physics is computed in this module.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Any

from compromise.review.wording import CAUTION
from compromise.units import format_ratio


def fmt(value: Any, digits: int = 4) -> str:
    """A number in a short, stable form (``-`` for None)."""
    if value is None:
        return "-"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, str):
        return value
    v = float(value)
    if math.isnan(v):
        return "nan"
    if math.isinf(v):
        return "inf" if v > 0 else "-inf"
    if v == 0:
        return "0"
    a = abs(v)
    if 1e-3 <= a < 1e5:
        return f"{v:.{digits}g}"
    return f"{v:.{digits - 1}e}"


def table(headers: Sequence[str], rows: Sequence[Sequence[Any]]) -> str:
    """A plain text table with left-aligned first column and right-aligned numbers."""
    cells = [[fmt(c) for c in r] for r in rows]
    widths = [len(h) for h in headers]
    for r in cells:
        for i, c in enumerate(r):
            widths[i] = max(widths[i], len(c))
    lines = [
        "  ".join(
            h.ljust(w) if i == 0 else h.rjust(w)
            for i, (h, w) in enumerate(zip(headers, widths, strict=True))
        )
    ]
    lines.append("  ".join("-" * w for w in widths))
    for r in cells:
        lines.append(
            "  ".join(
                c.ljust(w) if i == 0 else c.rjust(w)
                for i, (c, w) in enumerate(zip(r, widths, strict=True))
            )
        )
    return "\n".join(lines)


def _pct(mismatch: float) -> str:
    if mismatch is None or not math.isfinite(mismatch):
        return "-"
    return _margin(math.exp(mismatch) - 1)


def design_lines(d: dict[str, Any]) -> list[str]:
    """The design as a few labelled lines."""
    lines = [
        f"  model fluid        {d['fluid']} at {d['temperature']:.1f} degC"
        + (f", {fmt(d['pressure'])} Pa" if abs(d["pressure"] - 101325.0) > 1 else ""),
        f"  horizontal ratio   {format_ratio(d['horizontal_ratio'])}",
        f"  vertical ratio     {format_ratio(d['vertical_ratio'])}",
        f"  distortion         {fmt(d['distortion'])}",
        f"  velocity ratio     {format_ratio(d['velocity_ratio'])}  ({fmt(d['velocity_ratio'])})",
    ]
    return lines


def groups_table(groups: dict[str, Any]) -> str:
    """Groups: prototype, model, factor, mismatch in %, weight."""
    rows = [
        [n, g["prototype"], g["model"], g["factor"], _pct(g["mismatch"]), g["weight"]]
        for n, g in groups.items()
    ]
    return table(["group", "prototype", "model", "factor [-]", "mismatch", "weight"], rows)


def quantities_table(quantities: dict[str, Any]) -> str:
    """Quantities: prototype, model, ratio, unit."""
    rows = [
        [n, q["prototype"], q["model"], format_ratio(q["ratio"]), q["unit"]]
        for n, q in quantities.items()
    ]
    return table(["quantity", "prototype", "model", "ratio", "unit [SI]"], rows)


def _margin(margin: float) -> str:
    """A fractional margin in %, without a negative zero for a binding limit."""
    pct = margin * 100
    return f"{0.0 if abs(pct) < 0.05 else pct:+.1f} %"


def limits_table(limits: dict[str, Any]) -> str:
    """Limits: kind, bound, model, margin, binding, condition."""
    rows = [
        [
            n,
            lim["kind"],
            lim["bound"],
            lim["model"],
            _margin(lim["margin"]),
            "BINDS" if lim["binding"] else ("VIOLATED" if lim["margin"] < 0 else ""),
            lim.get("condition", ""),
        ]
        for n, lim in limits.items()
    ]
    return table(["limit", "kind", "bound", "model", "margin", "", "condition"], rows)


def format_solution(sol: dict[str, Any]) -> str:
    """The readable answer of ``compromise solve``."""
    out = [sol.get("title", ""), ""]
    if sol["status"] != "optimal":
        out.append("No design satisfies every limit. These cannot hold together:")
        for key in sol.get("conflict", []):
            cond = sol.get("conditions", {}).get(key)
            relax = sol.get("relaxation", {}).get(key)
            where = f" (in condition '{cond}')" if cond else ""
            unit = sol.get("units", {}).get(key, "")
            if relax is None and (key.endswith(".exact") or key.count(".") == 1):
                out.append(f"  - {key}{where}: held exactly by the case")
                continue
            if relax is None:
                out.append(f"  - {key}{where}: cannot be moved far enough on its own")
                continue
            value = format_ratio(relax) if unit == "ratio" else fmt(relax)
            value += f" {unit}" if unit not in ("", "-", "ratio") else ""
            verb = "raised" if key.endswith(".max") else "lowered"
            out.append(f"  - {key}{where}: feasible if {verb} to {value}")
        out.append("Each move given makes the case feasible on its own.")
        out += ["", CAUTION]
        return "\n".join(out)
    out.append(f"Best design (weighted mismatch {fmt(sol['objective'], 6)}):")
    out += design_lines(sol["design"])
    conds = sol.get("conditions")
    if conds:
        for name, c in conds.items():
            out += [
                "",
                f"Groups in condition '{name}' (weight {fmt(c['weight'])}):",
                groups_table(c["groups"]),
            ]
    else:
        out += ["", "Groups:", groups_table(sol["groups"])]
    out += ["", "Limits (worst condition):", limits_table(sol["limits"])]
    if sol.get("binding"):
        out += ["", "What each binding limit costs (relaxed by 10 %):"]
        rows = [
            [
                k,
                b["relaxed_bound"],
                b["multiplier"],
                b["estimate"],
                b["drop"],
                b.get("condition") or "",
            ]
            for k, b in sol["binding"].items()
        ]
        out.append(
            table(
                [
                    "binding",
                    "relaxed bound",
                    "multiplier",
                    "estimate",
                    "re-solved drop",
                    "condition",
                ],
                rows,
            )
        )
    if conds:
        for name, c in conds.items():
            out += ["", f"Quantities in condition '{name}':", quantities_table(c["quantities"])]
    else:
        out += ["", "Quantities:", quantities_table(sol["quantities"])]
    if sol.get("effects"):
        out += ["", *effects_lines(sol["effects"])]
    if sol.get("alternatives"):
        out += ["", "Alternatives (best design per fluid and per preferred ratio):"]
        rows = []
        for a in sol["alternatives"]:
            d = a["design"]
            if d is None:
                rows.append([a["kind"], a["label"], "-", "-", "-", None, a["separator"]])
                continue
            rows.append(
                [
                    a["kind"],
                    a["label"],
                    d["fluid"],
                    f"{d['temperature']:.1f}",
                    f"{format_ratio(d['horizontal_ratio'])} / {format_ratio(d['vertical_ratio'])}",
                    a["objective"],
                    a["separator"],
                ]
            )
        out.append(
            table(["by", "choice", "fluid", "T [degC]", "X / Y", "mismatch", "separated by"], rows)
        )
    out += ["", CAUTION]
    return "\n".join(out)


def effects_lines(eff: dict[str, Any]) -> list[str]:
    """Scale effects: risks first, then regimes, thresholds and consequences."""
    out = ["Scale effects:"]
    if eff["risks"]:
        out.append("  Main risks:")
        out += [f"  ! {r}" for r in eff["risks"]]
    else:
        out.append("  No regime change between prototype and model; no threshold fails.")
    if eff["regimes"]:
        rows = [
            [
                r["group"],
                r["condition"],
                r["prototype"],
                r["model"],
                "CHANGED" if r["changed"] else "",
            ]
            for r in eff["regimes"]
        ]
        out += ["", table(["regime of", "condition", "prototype", "model", ""], rows)]
    if eff["thresholds"]:
        rows = [
            [
                f"{t['phenomenon']}.{t['name']}",
                t["condition"],
                t["model"],
                f"{'>=' if t['kind'] == 'min' else '<='} {fmt(t['passing'])}",
                t["verdict"].upper(),
                t["status"],
            ]
            for t in eff["thresholds"]
        ]
        out += ["", table(["threshold", "condition", "model", "needs", "verdict", "source"], rows)]
        sources = sorted(
            {f"{t['phenomenon']}.{t['name']}: {t['source']}" for t in eff["thresholds"]}
        )
        out += ["  Sources:"] + [f"    {s}" for s in sources]
    if eff["consequences"]:
        out += ["", "  Consequences in prototype terms:"]
        out += [f"  - [{c['condition']}] {c['message']}" for c in eff["consequences"]]
    return out


def format_check(summary: dict[str, Any], path: str) -> str:
    """The summary printed by ``compromise check``."""
    p = summary["prototype"]
    out = [
        f"{path}: OK",
        summary["title"],
        "",
        f"Prototype: {p['fluid']} at {p['temperature']:.2f} degC, {fmt(p['pressure'])} Pa",
        "",
    ]
    rows = [
        [n, q["value"], q["unit"], q["kind"], q["scales_as"]]
        for n, q in summary["quantities"].items()
    ]
    out += [
        "Quantities (ratio: X horizontal, Y vertical, V velocity):",
        table(["quantity", "value", "unit [SI]", "kind", "ratio"], rows),
        "",
    ]
    if len(summary["conditions"]) > 1:
        rows = [
            [n, c["weight"], ", ".join(f"{k} = {fmt(v)}" for k, v in c["values"].items())]
            for n, c in summary["conditions"].items()
        ]
        out += ["Conditions:", table(["condition", "weight", "overrides [SI]"], rows), ""]
    gv = summary.get("group_values", {})
    first = next(iter(summary["conditions"]))
    rows = [
        [n, g["expression"], g["weight"], g["exact"], g["min"], g["max"], gv.get(n)]
        for n, g in summary["groups"].items()
    ]
    where = f" ({first})" if len(summary["conditions"]) > 1 else ""
    head = ["group", "expression", "weight", "exact", "min", "max", f"prototype{where}"]
    out += ["Groups:", table(head, rows), ""]
    m = summary["model"]
    out += [
        "Model choices:",
        f"  horizontal ratio  {m['horizontal_ratio'][0]} .. {m['horizontal_ratio'][1]}",
        f"  distortion        {fmt(m['distortion'][0])} .. {fmt(m['distortion'][1])}",
        f"  fluids            {', '.join(m['fluids'])}",
        f"  temperature       {m['temperature'][0]:.1f} .. {m['temperature'][1]:.1f} degC",
    ]
    if m["preferred_ratios"]:
        out.append(f"  preferred ratios  {', '.join(m['preferred_ratios'])}")
    if summary["limits"]:
        rows = [[lim["quantity"], lim["kind"], lim["bound"]] for lim in summary["limits"]]
        out += ["", "Limits (model values):", table(["quantity", "kind", "bound [SI]"], rows)]
    if summary.get("phenomena"):
        out += ["", "Scale effects checked (phenomena):"]
        for name, aliases in summary["phenomena"].items():
            mapped = ", ".join(f"{k} = {v}" for k, v in aliases.items() if k != v)
            out.append(f"  {name}" + (f" ({mapped})" if mapped else ""))
    return "\n".join(out)


def format_scales(t: dict[str, Any]) -> str:
    """The scale table printed by ``compromise scales``."""
    out = ["Design:"]
    out += design_lines(t["design"])
    rows = [[k, format_ratio(v), v] for k, v in t["ratios"].items()]
    out += ["", "Scale ratios (model / prototype):", table(["kind", "ratio", "value"], rows)]
    out += ["", "Quantities:", quantities_table(t["quantities"])]
    out += ["", "Groups:", groups_table(t["groups"])]
    return "\n".join(out)


def format_fluids(data: dict[str, Any], temperature: float) -> str:
    """The fluid catalogue printed by ``compromise fluids``."""
    rows = []
    for name, p in data.items():
        if p is None:
            rows.append([name, "out of range", None, None, None, None])
            continue
        rows.append(
            [
                name,
                p["density"],
                p["dynamic_viscosity"],
                p["kinematic_viscosity"],
                p["surface_tension"],
                p["speed_of_sound"],
            ]
        )
    return f"Fluids at {temperature:.2f} degC:\n" + table(
        ["fluid", "density [kg/m^3]", "mu [Pa s]", "nu [m^2/s]", "sigma [N/m]", "c [m/s]"], rows
    )


def write_csv(sol: dict[str, Any], folder: Any) -> list[str]:
    """Write the tables of a solution (``to_dict()`` form) as CSV files into ``folder``.

    Files: ``design.csv``, ``groups.csv``, ``limits.csv``, ``quantities.csv``,
    ``alternatives.csv`` (and ``conflict.csv`` when infeasible). Each file is written to a
    temporary name first and then renamed, so an interrupted run leaves no half-written file.
    """
    import csv
    import io
    import os
    from pathlib import Path

    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    tables: dict[str, tuple[list[str], list[list[Any]]]] = {}
    if sol["status"] == "optimal":
        d = sol["design"]
        tables["design"] = (list(d), [list(d.values())])
        conds = sol.get("conditions") or {
            "design": {"groups": sol["groups"], "quantities": sol["quantities"]}
        }
        rows = []
        for cname, c in conds.items():
            for n, g in c["groups"].items():
                rows.append(
                    [cname, n, g["prototype"], g["model"], g["mismatch"], g["factor"], g["weight"]]
                )
        tables["groups"] = (
            ["condition", "group", "prototype", "model", "mismatch", "factor", "weight"],
            rows,
        )
        rows = [
            [
                n,
                lim["kind"],
                lim["bound"],
                lim["model"],
                lim["margin"],
                lim["binding"],
                lim.get("condition"),
            ]
            for n, lim in sol["limits"].items()
        ]
        tables["limits"] = (
            ["limit", "kind", "bound", "model", "margin", "binding", "condition"],
            rows,
        )
        rows = []
        for cname, c in conds.items():
            for n, q in c["quantities"].items():
                rows.append([cname, n, q["prototype"], q["model"], q["ratio"], q["unit"]])
        tables["quantities"] = (
            ["condition", "quantity", "prototype", "model", "ratio", "unit"],
            rows,
        )
    else:
        rows = [
            [k, sol["relaxation"].get(k), sol.get("conditions", {}).get(k)]
            for k in sol.get("conflict", [])
        ]
        tables["conflict"] = (["key", "relaxed_bound", "condition"], rows)
    rows = []
    for a in sol.get("alternatives", []):
        d = a["design"] or {}
        rows.append(
            [
                a["kind"],
                a["label"],
                a["feasible"],
                a["objective"],
                d.get("fluid"),
                d.get("temperature"),
                d.get("horizontal_ratio"),
                d.get("vertical_ratio"),
                d.get("velocity_ratio"),
                a["separator"],
            ]
        )
    tables["alternatives"] = (
        [
            "kind",
            "label",
            "feasible",
            "objective",
            "fluid",
            "temperature",
            "horizontal_ratio",
            "vertical_ratio",
            "velocity_ratio",
            "separator",
        ],
        rows,
    )
    written = []
    for name, (head, rows) in tables.items():
        buf = io.StringIO()
        w = csv.writer(buf, lineterminator="\n")
        w.writerow(head)
        for r in rows:
            w.writerow(["" if v is None else (repr(v) if isinstance(v, float) else v) for v in r])
        target = folder / f"{name}.csv"
        tmp = folder / f".{name}.csv.tmp"
        tmp.write_text(buf.getvalue(), encoding="utf-8")
        os.replace(tmp, target)
        written.append(str(target))
    return written


def format_tolerance(t: dict[str, Any]) -> str:
    """The answer of ``compromise tolerance``."""
    return "\n".join(
        [
            f"{t['quantity']} within {t['within']:.1%} (condition '{t['condition']}'):",
            f"  prototype Reynolds number      {fmt(t['reynolds_prototype'])}",
            f"  smallest model Reynolds number {fmt(t['reynolds_min'])}"
            f"  (a reduction of {t['reynolds_prototype'] / t['reynolds_min']:.4g} times at most)",
            f"  basis: {t['basis']}",
        ]
    )
