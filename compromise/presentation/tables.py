"""Readable text for the command line: tables of a solution, a case summary, scale tables.

Presentation only: everything printed here comes from the results' ``to_dict()`` or fields; no
physics is computed in this module.
"""

from __future__ import annotations

import textwrap
from typing import Any

from compromise.presentation.text import (
    design_lines,
    fmt,
    groups_table,
    limits_table,
    quantities_table,
    table,
)
from compromise.review.wording import CAUTION, TAG_LEGEND
from compromise.units import format_ratio

__all__ = [
    "design_lines",
    "effects_lines",
    "fmt",
    "format_check",
    "format_fluids",
    "format_scales",
    "format_solution",
    "format_tolerance",
    "groups_table",
    "limits_table",
    "quantities_table",
    "table",
]


def infeasible_lines(sol: dict[str, Any]) -> list[str]:
    """Why no design exists: the conflicting bounds, each with the move that alone would do."""
    out = ["No design satisfies every limit. These bounds cannot hold together:"]
    sides = sol.get("sides", {})
    labels = sol.get("labels", {})
    moved = stuck = 0
    for key in sol.get("conflict", []):
        cond = sol.get("conditions", {}).get(key)
        relax = sol.get("relaxation", {}).get(key)
        side = sides.get(key, "exact")
        where = f" (in condition '{cond}')" if cond else ""
        unit = sol.get("units", {}).get(key, "")
        label = labels.get(key, key)
        if side == "exact":
            out.append(f"  - {label}{where}: held exactly by the case")
            continue
        if relax is None:
            stuck += 1
            out.append(f"  - {label}{where}: moving it alone cannot make the case feasible")
            continue
        moved += 1
        value = format_ratio(relax) if unit == "ratio" else fmt(relax)
        value += f" {unit}" if unit not in ("", "-", "ratio") else ""
        verb = "raised" if side == "max" else "lowered"
        out.append(f"  - {label}{where}: feasible if {verb} to {value}")
    if moved:
        out.append(
            "A bound given a value makes the case feasible when it alone is moved that far, the "
            "others unchanged."
        )
    if stuck:
        out.append(
            "A bound that cannot be moved alone needs another bound of this set to move with it."
        )
    if any(k.startswith("phenomena.") for k in sol.get("conflict", [])):
        out.append(
            "phenomena.* bounds are published scale-effect thresholds, enforced only with "
            "--enforce-thresholds."
        )
    return out


def binding_lines(binding: dict[str, Any], units: dict[str, str]) -> list[str]:
    """What each binding limit costs, with the reason wherever the estimate does not hold."""
    out = ["What each binding limit costs (relaxed by 10 %; drops of the weighted mismatch):"]
    rows = []
    notes = []
    for k, b in binding.items():
        holds = not b.get("note")
        unit = units.get(k, "-")
        bound = format_ratio(b["relaxed_bound"]) if unit == "ratio" else b["relaxed_bound"]
        rows.append(
            [
                k,
                bound,
                "-" if unit == "ratio" else unit,
                b["multiplier"] if holds else "-",
                b["estimate"] if holds else "-",
                b["drop"],
                b.get("condition") or "",
            ]
        )
        if b.get("note") == "degenerate":
            notes.append(
                f"{k}: degenerate. Other binding limits hold the design too, so relaxing this "
                f"one alone gains nothing; its estimate ({fmt(b['estimate'])}) is an arbitrary "
                "share of a multiplier the binding limits have in common. Relax them together."
            )
        elif b.get("note") == "non-smooth":
            notes.append(
                f"{k}: non-smooth. Within the 10 % the set of binding limits changes (this one "
                "stops binding or another starts to) or the best fluid or temperature changes, "
                f"so the first-order estimate ({fmt(b['estimate'])}) does not hold: read the "
                "re-solved drop."
            )
    out.append(
        table(
            [
                "binding",
                "relaxed bound",
                "unit",
                "multiplier [-]",
                "estimate [-]",
                "re-solved drop [-]",
                "condition",
            ],
            rows,
        )
    )
    return out + [
        textwrap.fill(n, 100, initial_indent="  ", subsequent_indent="    ") for n in notes
    ]


def alternatives_lines(alternatives: list[dict[str, Any]], chosen: str | None) -> list[str]:
    """The best design per fluid and per preferred ratio; ties with the chosen design said."""
    out = ["Alternatives (best design per fluid and per preferred ratio):"]
    t_unit = next(
        (a["design"].get("temperature_unit", "degC") for a in alternatives if a["design"]),
        "degC",
    )
    rows = []
    for a in alternatives:
        d = a["design"]
        if d is None:
            rows.append([a["kind"], a["label"], "-", "-", "-", None, a["separator"]])
            continue
        versus = a["separator"]
        if a.get("tied"):
            versus = "chosen" if a["kind"] == "fluid" and a["label"] == chosen else "tied"
        rows.append(
            [
                a["kind"],
                a["label"],
                d["fluid"],
                f"{d['temperature']:.1f}",
                f"{format_ratio(d['horizontal_ratio'])} / {format_ratio(d['vertical_ratio'])}",
                a["objective"],
                versus,
            ]
        )
    out.append(
        table(
            ["by", "choice", "fluid", f"T [{t_unit}]", "X / Y", "mismatch [-]", "separated by"],
            rows,
        )
    )
    if sum(bool(a.get("tied")) for a in alternatives) > 1:
        out.append(
            textwrap.fill(
                "tied: the same weighted mismatch as the chosen design (within the solver's "
                "noise); among tied designs the case's own order decides (fluids as "
                "model.fluids lists them, then the preferred ratios).",
                100,
                initial_indent="  ",
                subsequent_indent="  ",
            )
        )
    return out


def account_lines(data: dict[str, Any]) -> list[str]:
    """Groups per condition, limits (with what each binding one costs, where priced) and
    quantities per condition: the account shared by ``solve`` and ``evaluate``."""
    out: list[str] = []
    system = data.get("unit_system", "si")
    conds = data.get("conditions")
    if conds:
        for name, c in conds.items():
            out += [
                "",
                f"Groups in condition '{name}' (weight {fmt(c['weight'])}):",
                groups_table(c["groups"]),
            ]
    else:
        out += ["", "Groups:", groups_table(data["groups"])]
    if data.get("sediment"):
        from compromise.presentation.text import sediment_lines

        out += sediment_lines(data["sediment"])
    out += [
        "",
        "Limits (worst condition):",
        limits_table(data["limits"], data.get("quantities"), system),
    ]
    if data.get("binding"):
        out += ["", *binding_lines(data["binding"], _bound_units(data))]
    if conds:
        for name, c in conds.items():
            out += [
                "",
                f"Quantities in condition '{name}':",
                quantities_table(c["quantities"], system),
            ]
    else:
        out += ["", "Quantities:", quantities_table(data["quantities"], system)]
    return out


def format_solution(sol: dict[str, Any]) -> str:
    """The readable answer of ``compromise solve``."""
    out = [sol.get("title", ""), ""]
    if sol["status"] != "optimal":
        out += infeasible_lines(sol)
        if sol.get("phenomena_hint"):
            out += ["", *phenomena_hint_lines(sol["phenomena_hint"])]
        out += ["", CAUTION]
        return "\n".join(out)
    out.append(f"Best design (weighted mismatch {fmt(sol['objective'], 6)}):")
    out += design_lines(sol["design"])
    out += account_lines(sol)
    if sol.get("effects"):
        out += ["", *effects_lines(sol["effects"])]
    if sol.get("phenomena_hint"):
        out += ["", *phenomena_hint_lines(sol["phenomena_hint"])]
    if sol.get("alternatives"):
        out += ["", *alternatives_lines(sol["alternatives"], sol["design"]["fluid"])]
    out += ["", CAUTION]
    return "\n".join(out)


def _bound_units(sol: dict[str, Any]) -> dict[str, str]:
    """The unit of each binding key: a limit's quantity unit, ``ratio`` for a model ratio."""
    out = {}
    quantities = sol.get("quantities", {})
    for key in sol.get("binding", {}):
        parts = key.split(".")
        if parts[0] == "limits" and parts[1] in quantities:
            out[key] = quantities[parts[1]]["unit"]
        elif parts[0] == "model" and parts[1] != "distortion":
            out[key] = "ratio"
        else:
            out[key] = "-"
    return out


def phenomena_hint_lines(hint: dict[str, Any]) -> list[str]:
    """The scale-effect checks a case does not ask for, and the line that would add them."""
    out = textwrap.wrap(hint["message"], 100)
    for s in hint.get("suggested", []):
        mapped = f" (map {', '.join(s['missing'])})" if s.get("missing") else ""
        out.append(f"  - {s['phenomenon']}{mapped}: {s['why']}")
    if hint.get("line"):
        out += [f"  To check them, add {hint['where']}:", *(f"    {x}" for x in hint["line"])]
    return out


def effects_lines(eff: dict[str, Any]) -> list[str]:
    """Scale effects: risks first, then regimes, thresholds and consequences."""
    out = ["Scale effects:"]
    if eff["risks"]:
        out.append("  Main risks:")
        out += [f"  ! {r}" for r in eff["risks"]]
    else:
        checked = "no threshold fails" if eff["thresholds"] else "no threshold was checked"
        out.append(f"  No regime change between prototype and model; {checked}.")
    if eff["regimes"]:
        rough = [r["roughness_reynolds"] for r in eff["regimes"] if r.get("roughness_reynolds")]
        rows = [
            [
                r["group"],
                r["condition"],
                r["prototype"],
                r["model"],
                *(
                    [
                        fmt(r["roughness_reynolds"]["prototype"], 3)
                        + " / "
                        + fmt(r["roughness_reynolds"]["model"], 3)
                        if r.get("roughness_reynolds")
                        else ""
                    ]
                    if rough
                    else []
                ),
                "CHANGED" if r["changed"] else "",
            ]
            for r in eff["regimes"]
        ]
        head = ["regime of", "condition", "prototype", "model"]
        head += ["ks+ [-] (prototype / model)"] if rough else []
        out += ["", table([*head, ""], rows)]
        same = any(t["phenomenon"] == "rough_wall" for t in eff["thresholds"])
        for basis in sorted({k["shear_velocity"] for k in rough}):
            out.append(
                f"  ks+ = u* ks / nu (smooth below 5, fully rough above 70), {basis}"
                + ("; the rough_wall threshold checks the same number" if same else "")
            )
    if eff["thresholds"]:
        rows = [
            [
                f"{t['phenomenon']}.{t['name']}",
                t["condition"],
                t["model"],
                f"{'>=' if t['kind'] == 'min' else '<='} {fmt(t['passing'])}",
                t["unit"],
                t["verdict"].upper(),
                t["status"],
            ]
            for t in eff["thresholds"]
        ]
        head = ["threshold", "condition", "model", "needs", "unit", "verdict", "source"]
        out += ["", table(head, rows)]
        sources = sorted(
            {f"{t['phenomenon']}.{t['name']}: {t['source']}" for t in eff["thresholds"]}
        )
        out += ["  Sources:"] + [f"    {s}" for s in sources]
    if eff["consequences"]:
        out += ["", "  Consequences in prototype terms:"]
        out += [f"  - [{c['condition']}] {c['message']}" for c in eff["consequences"]]
    if eff.get("estimates"):
        out += ["", "  Estimated properties:"] + [f"  ~ {e}" for e in eff["estimates"]]
    if eff["thresholds"] or eff["consequences"] or eff.get("estimates"):
        out += ["", f"  {eff.get('tag_legend', TAG_LEGEND)}"]
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
    head = [
        "group",
        "expression",
        "weight [-]",
        "exact",
        "min [-]",
        "max [-]",
        f"prototype{where} [-]",
    ]
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
        units = {n: q["unit"] for n, q in summary["quantities"].items()}
        rows = [
            [lim["quantity"], lim["kind"], lim["bound"], units.get(lim["quantity"], "-")]
            for lim in summary["limits"]
        ]
        out += [
            "",
            "Limits (model values):",
            table(["quantity", "kind", "bound", "unit [SI]"], rows),
        ]
    if summary.get("phenomena"):
        out += ["", "Scale effects checked (phenomena):"]
        for name, aliases in summary["phenomena"].items():
            mapped = ", ".join(f"{k} = {v}" for k, v in aliases.items() if k != v)
            out.append(f"  {name}" + (f" ({mapped})" if mapped else ""))
    if summary.get("phenomena_hint"):
        out += ["", *phenomena_hint_lines(summary["phenomena_hint"])]
    return "\n".join(out)


def format_scales(t: dict[str, Any]) -> str:
    """The scale table printed by ``compromise scales``."""
    out = [t["title"], ""] if t.get("title") else []
    if t.get("warnings"):
        out += [f"Warning: {w}" for w in t["warnings"]] + [""]
    out.append("Design:")
    out += design_lines(t["design"])
    out.append(f"  velocity rule      {t['velocity_rule']}")
    if t.get("notes"):
        out += ["", "Notes:"] + [f"  - {n}" for n in t["notes"]]
    labels = t.get("labels", {})
    rows = [[k, format_ratio(v), v, labels.get(k, "")] for k, v in t["ratios"].items()]
    out += [
        "",
        "Scale ratios (model / prototype):",
        table(["kind", "ratio", "value [-]", "what"], rows),
    ]
    skip = set(t.get("not_holding", []))
    where = f" in condition '{t['condition']}'" if t.get("condition") else ""
    quantities = {k: v for k, v in t["quantities"].items() if k not in skip}
    groups = {k: v for k, v in t["groups"].items() if k not in skip}
    out += ["", f"Quantities{where}:", quantities_table(quantities, t.get("unit_system", "si"))]
    if groups:
        out += ["", f"Groups{where}:", groups_table(groups)]
    if skip:
        out.append(f"  (not shown: {', '.join(sorted(skip))}; see the notes)")
    if len(t.get("conditions", {})) > 1:
        others = [c for c in t["conditions"] if c != t.get("condition")]
        out.append(f"  Other conditions ({', '.join(others)}): see --condition or --json.")
    out += ["", CAUTION]
    return "\n".join(out)


def format_fluids(data: dict[str, Any], temperature: float) -> str:
    """The fluid catalogue printed by ``compromise fluids``."""
    rows = []
    notes: dict[tuple[str, str], list[str]] = {}
    for name, p in data.items():
        if p is None:
            rows.append([name, "out of range", None, None, None, None])
            continue
        estimated = p.get("estimated") or {}
        for prop, why in estimated.items():
            notes.setdefault((prop.replace("_", " "), why), []).append(name)
        sigma = p["surface_tension"]
        rows.append(
            [
                name,
                p["density"],
                p["dynamic_viscosity"],
                p["kinematic_viscosity"],
                f"{fmt(sigma)} *" if "surface_tension" in estimated else sigma,
                p["speed_of_sound"],
            ]
        )
    out = f"Fluids at {temperature:.2f} degC:\n" + table(
        ["fluid", "density [kg/m^3]", "mu [Pa s]", "nu [m^2/s]", "sigma [N/m]", "c [m/s]"], rows
    )
    for (prop, why), names in notes.items():
        out += f"\n* {prop} of {', '.join(names)}: {why}"
    if notes:
        out += "\n" + TAG_LEGEND
    return out


def format_tolerance(data: dict[str, Any]) -> str:
    """The answer of ``compromise tolerance`` (with the solution under the floor, when applied)."""
    t = data["tolerance"]
    on = f" on {t['length']}" if t.get("length") else ""
    floor = data.get("floor")
    out = [data["title"], ""] if data.get("title") and floor is None else []
    out += [
        f"{t['quantity']} within {t['within']:.1%} (condition '{t['condition']}'):",
        f"  prototype Reynolds number{on}      {fmt(t['reynolds_prototype'])}",
        f"  smallest model Reynolds number{on} {fmt(t['reynolds_min'])}"
        f"  (a reduction of {t['reynolds_prototype'] / t['reynolds_min']:.4g} times at most)",
        f"  basis: {t['basis']}",
    ]
    if t.get("limited_by") == "turbulent_limit":
        out.append(
            f"  ! set by the turbulent limit ({fmt(t['turbulent_limit'])}{on}), not by the "
            "tolerance: below it the flow is transitional and Colebrook-White does not apply"
        )
    if floor is not None:
        out += ["", f"With the floor {floor['outcome']}:", ""]
        out.append(format_solution(data["solution"]))
    else:
        out += ["", CAUTION]
    return "\n".join(out)
