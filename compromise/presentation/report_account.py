"""The account sections of the report: the case, the design, similitude, laboratory limits
and scale effects (presentation only; tables from the answer's plain data)."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from compromise.presentation.display import convert
from compromise.presentation.report_model import (
    Doc,
    h3,
    para,
    t_unit,
    temp,
    ul,
)
from compromise.presentation.text import _margin, _pct, fmt
from compromise.units import format_ratio

if TYPE_CHECKING:
    from compromise.review.report_data import ReportData


def case_section(doc: Doc, data: ReportData, system: str) -> None:
    b = doc.section(1)
    c = data.case
    tu = t_unit(system)
    b.append(
        para(
            f"{c.title}. Prototype fluid {c.fluid} at "
            f"{temp(c.temperature - 273.15, system)} {tu}; case file {c.path}."
        )
    )
    heads = ["quantity", "unit"] + [f"{k.name} (weight {fmt(k.weight)})" for k in c.conditions]
    rows = []
    for name, q in c.quantities.items():
        unit = convert(1.0, q.unit, system)[1]
        vals = [convert(c.values(k.name)[name], q.unit, system)[0] for k in c.conditions]
        rows.append([name, unit, *vals])
    b.append(
        doc.table("Prototype quantities per condition (values in the unit column).", heads, rows)
    )
    grow = []
    for name, g in c.groups.items():
        if g.threshold:
            continue
        grow.append(
            [
                name,
                g.text,
                "exact" if g.exact else fmt(g.weight),
                fmt(g.min) if g.min is not None else "-",
                fmt(g.max) if g.max is not None else "-",
            ]
        )
    b.append(
        doc.table(
            "Dimensionless groups and their weights.",
            ["group", "expression", "weight [-]", "min [-]", "max [-]"],
            grow,
        )
    )
    lrows = []
    for lim in c.limits:
        q = c.quantities.get(lim.quantity)
        unit = q.unit if q is not None else "-"
        v, shown = convert(lim.bound, unit, system)
        lrows.append([f"{lim.quantity}.{lim.kind}", lim.kind, v, shown])
    b.append(
        doc.table("Laboratory limits on model values.", ["limit", "kind", "bound", "unit"], lrows)
    )
    m = c.model
    pr = [convert(p, "Pa", system) for p in m.pressure]
    mrows = [
        ["horizontal ratio", " to ".join(format_ratio(r) for r in m.horizontal_ratio), "-"],
        ["distortion", " to ".join(fmt(x) for x in m.distortion), "-"],
        [
            "velocity ratio",
            " to ".join(format_ratio(r) for r in m.velocity_ratio) if m.velocity_ratio else "free",
            "-",
        ],
        ["fluids", ", ".join(m.fluids), "-"],
        ["temperature", " to ".join(temp(t - 273.15, system) for t in m.temperature), tu],
        ["pressure", " to ".join(fmt(p[0]) for p in pr), pr[0][1]],
        ["preferred ratios", ", ".join(format_ratio(r) for r in m.preferred_ratios) or "-", "-"],
    ]
    b.append(doc.table("Model choices and their bounds.", ["choice", "range", "unit"], mrows))


def conditions(rep: dict[str, Any]) -> dict[str, Any]:
    return rep.get("conditions") or {"": {k: rep[k] for k in ("groups", "quantities") if k in rep}}


def design_section(doc: Doc, data: ReportData, rep: dict[str, Any], system: str) -> None:
    b = doc.section(2)
    d = rep["design"]
    rows = [
        ["model fluid", d["fluid"], "-"],
        ["temperature", f"{d['temperature']:.1f}", d.get("temperature_unit", "degC")],
        ["pressure", fmt(d["pressure"]), d.get("pressure_unit", "Pa")],
        ["horizontal ratio", format_ratio(d["horizontal_ratio"]), "-"],
        ["vertical ratio", format_ratio(d["vertical_ratio"]), "-"],
        ["distortion", fmt(d["distortion"]), "-"],
        ["velocity ratio", format_ratio(d["velocity_ratio"]), "-"],
    ]
    if d.get("material") is not None:  # a case with [sediment]
        rows += [
            ["model material", d["material"], "-"],
            ["model grain size", fmt(d["grain_size"] * 1e3), "mm"],
        ]
    b.append(doc.table("The design (ratios model over prototype).", ["", "value", "unit"], rows))
    sed = rep.get("sediment")
    if sed:
        morph = sed.get("morphological_time_ratio")
        grows = [
            ["grain size ratio", format_ratio(sed["grain_size_ratio"]), "-"],
            *(
                [f"{name} (prototype / model)", f"{fmt(v['prototype'])} / {fmt(v['model'])}", "-"]
                for name, v in (
                    ("relative density R", sed["relative_density"]),
                    ("Shields", sed["shields"]),
                    ("critical Shields (Soulsby & Whitehouse 1997)", sed["critical_shields"]),
                )
                if v is not None
            ),
            ["hydraulic time ratio X / V", format_ratio(sed["hydraulic_time_ratio"]), "-"],
            [
                "morphological time ratio",
                format_ratio(morph) if morph is not None else "- (no moving bed)",
                "-",
            ],
            ["how it was found", sed["path"], "-"],
        ]
        b.append(doc.table("The granular material.", ["", "value", "unit"], grows))
    if data.scales:
        sc = data.scales
        srows = [
            [k, format_ratio(r), fmt(r), sc["labels"].get(k, "")] for k, r in sc["ratios"].items()
        ]
        b.append(
            doc.table(
                "Scale ratios of every derived kind of quantity.",
                ["kind", "ratio [-]", "ratio, decimal [-]", "law"],
                srows,
                [f"Velocity rule: {sc['velocity_rule']}.", *sc.get("notes", [])],
            )
        )
    for name, c in conditions(rep).items():
        qrows = [
            [n, q["prototype"], q["model"], format_ratio(q["ratio"]), q["unit"]]
            for n, q in c["quantities"].items()
        ]
        where = f" in condition '{name}'" if name else ""
        b.append(
            doc.table(
                f"Prototype and model quantities{where}.",
                ["quantity", "prototype", "model", "ratio [-]", "unit"],
                qrows,
            )
        )


def similitude_section(doc: Doc, rep: dict[str, Any]) -> None:
    b = doc.section(3)
    b.append(
        para(
            "Factor: model value over prototype value; mismatch: the factor less one, in per "
            "cent. A group kept exactly has a factor of 1."
        )
    )
    regimes = {
        (r["group"], r["condition"]): r for r in (rep.get("effects") or {}).get("regimes", [])
    }
    for name, c in conditions(rep).items():
        rows = []
        for g, v in c["groups"].items():
            r = regimes.get((g, name))
            regime = f"{r['prototype']} / {r['model']}" if r else "-"
            rows.append(
                [
                    g,
                    v["prototype"],
                    v["model"],
                    v["factor"],
                    "by construction" if v.get("by_construction") else _pct(v["mismatch"]),
                    fmt(v["weight"]),
                    regime,
                ]
            )
        where = f" in condition '{name}'" if name else ""
        b.append(
            doc.table(
                f"Groups{where}.",
                [
                    "group",
                    "prototype [-]",
                    "model [-]",
                    "factor [-]",
                    "mismatch [%]",
                    "weight [-]",
                    "regime (prototype / model)",
                ],
                rows,
            )
        )


def limits_section(doc: Doc, data: ReportData, rep: dict[str, Any]) -> None:
    b = doc.section(4)
    units = {k: q["unit"] for k, q in next(iter(conditions(rep).values()))["quantities"].items()}
    rows = []
    for k, lim in rep["limits"].items():
        unit = lim.get("unit") or units.get(k.rsplit(".", 1)[0], "-")
        state = "binds" if lim["binding"] else ("VIOLATED" if lim["margin"] < 0 else "")
        rows.append(
            [
                k,
                lim["kind"],
                lim["bound"],
                lim["model"],
                unit,
                _margin(lim["margin"]),
                state,
                lim.get("condition") or "-",
            ]
        )
    b.append(
        doc.table(
            "Limits in their worst condition; margin: fractional slack to the bound.",
            ["limit", "kind", "bound", "model", "unit", "margin [%]", "state", "condition"],
            rows,
        )
    )
    binding = data.answer.get("binding", {}) if data.proposal is None else {}
    if binding:
        brows = []
        for k, cost in binding.items():
            unit = units.get(k.split(".")[1], "-") if k.startswith("limits.") else "-"
            holds = not cost.get("note")
            brows.append(
                [
                    k,
                    cost["relaxed_bound"],
                    cost.get("unit", unit),
                    cost["multiplier"] if holds else "-",
                    cost["estimate"] if holds else "-",
                    cost["drop"],
                    cost.get("condition") or "-",
                ]
            )
        notes = [
            f"{k}: {c['note']}: the first-order estimate does not hold, read the re-solved drop."
            for k, c in binding.items()
            if c.get("note")
        ]
        b.append(
            doc.table(
                "What each binding limit costs: the drop of the objective when it is relaxed "
                "by 10 %.",
                [
                    "binding",
                    "relaxed bound",
                    "unit",
                    "multiplier [-]",
                    "estimate [-]",
                    "re-solved drop [-]",
                    "condition",
                ],
                brows,
                notes,
            )
        )
    if data.proposal and rep["violations"]:
        from compromise.presentation.review_tables import violation_text

        b.append(h3("Violations of the proposed design"))
        b.append(ul([violation_text(v) for v in rep["violations"]]))


def effects_section(doc: Doc, data: ReportData, rep: dict[str, Any], refs: dict[str, int]) -> None:
    b = doc.section(5)
    eff = rep.get("effects") or {}
    if eff.get("risks"):
        b.append(h3("Main risks"))
        b.append(ul([r if isinstance(r, str) else str(r.get("text", r)) for r in eff["risks"]]))
    rows = []
    for t in eff.get("thresholds", []):
        key = f"{t['phenomenon']}.{t['name']}"
        need = (">= " if t["kind"] == "min" else "<= ") + fmt(t["passing"])
        rows.append(
            [
                key,
                t["condition"],
                t["model"],
                need,
                t["unit"],
                t["verdict"].upper(),
                f"S{refs.get('threshold ' + key, 0)} ({t['status']})",
            ]
        )
    if rows:
        b.append(
            doc.table(
                "Scale-effect thresholds: model value against the published limit; sources in "
                "section 9.",
                ["threshold", "condition", "model", "needs", "unit", "verdict", "source (tag)"],
                rows,
                [data.tag_legend],
            )
        )
    else:
        b.append(para("The case names no phenomena, so no threshold was checked."))
    cons = eff.get("consequences", [])
    if cons:
        b.append(h3("Consequences in prototype terms"))
        b.append(ul([f"[{c['condition']}] {c['message']}" for c in cons]))
    if eff.get("estimates"):
        b.append(h3("Estimates"))
        b.append(ul(list(eff["estimates"])))
    if data.tolerance:
        trows = [
            [
                t["quantity"].replace("_", " "),
                f"{100 * t['within']:.0f}",
                t["reynolds_min"],
                t["reynolds_model"],
                "yes" if t["meets"] else "no",
                t["length"],
            ]
            for t in data.tolerance
        ]
        b.append(
            doc.table(
                "Acceptable mismatch: the least model Reynolds number "
                f"({data.tolerance[0]['group']}, condition '{data.tolerance[0]['condition']}') "
                "keeping the bias of a "
                "friction-controlled quantity within a tolerance (Colebrook-White).",
                [
                    "quantity",
                    "bias within [%]",
                    "least model Re [-]",
                    "model Re [-]",
                    "met",
                    "Re on",
                ],
                trows,
            )
        )
