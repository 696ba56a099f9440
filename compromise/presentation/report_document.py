"""The decision document's model: the summary, alternatives, trade-offs, sources, caution and
reproducibility sections around the account (presentation only; it computes nothing new)."""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any

from compromise.presentation.display import to_display
from compromise.presentation.report_account import (
    case_section,
    design_section,
    effects_section,
    limits_section,
    similitude_section,
)
from compromise.presentation.report_model import (
    Doc,
    design_text,
    h3,
    para,
    svg_bytes,
    t_unit,
    ul,
)
from compromise.presentation.tables import infeasible_lines
from compromise.presentation.text import _pct, fmt
from compromise.units import format_ratio

if TYPE_CHECKING:
    from compromise.review.report_data import ReportData


def _summary(doc: Doc, data: ReportData, rep: dict[str, Any] | None, system: str) -> None:
    b = doc.section(0)
    s = data.summary
    conds = data.case.conditions
    where = (
        f", in {len(conds)} conditions: "
        + ", ".join(f"{c.name} (weight {fmt(c.weight)})" for c in conds)
        if len(conds) > 1
        else ""
    )
    phen = ", ".join(p.replace("_", " ") for p in s["phenomena"])
    b.append(
        para(
            f"The job of the model: {s['job']}{where}."
            + (f" Scale effects checked: {phen}." if phen else "")
        )
    )
    if rep is None:
        lines = infeasible_lines(data.answer)
        b.append(para("Decision: none. " + lines[0]))
        b.append(ul([ln.strip()[2:] for ln in lines[1:] if ln.strip().startswith("- ")]))
        b.extend(para(ln) for ln in lines[1:] if not ln.strip().startswith("- "))
        return
    d = rep["design"]
    objective = (
        "the weighted sum of squared log-mismatches of the case's dimensionless groups over "
        "every condition"
    )
    if data.proposal:
        prop = rep
        opt = prop["optimum"]
        ratio = prop.get("objective_ratio")
        times = f", {fmt(ratio, 3)} times the optimum's" if ratio is not None else ""
        verdict = (
            "It holds every limit of the case."
            if prop["status"] == "holds"
            else f"It breaks {len(prop['violations'])} limit(s) of the case."
        )
        text = (
            f"Decision under review. The proposed design {prop['label']} is "
            f"{design_text(d, system)}. {verdict} Its objective ({objective}) is "
            f"{fmt(s['objective'], 6)} [-]{times}"
            + (
                f"; the optimum, {design_text(opt['design'], system)}, is set beside it in "
                "section 7."
                if opt.get("design")
                else "."
            )
        )
    else:
        text = (
            f"Decision. The chosen design is {design_text(d, system)}. It minimises "
            f"{objective}, within every laboratory limit; the minimum (the objective) is "
            f"{fmt(s['objective'], 6)} [-]."
        )
    b.append(para(text))
    must = []
    if s["broken"]:
        must.append("Broken limits: " + ", ".join(s["broken"]) + " (section 5).")
    if s["binding"]:
        costs = []
        for k in s["binding"]:
            cost = data.answer.get("binding", {}).get(f"limits.{k}")
            costs.append(
                f"{k} (relaxing it by 10 % lowers the objective by {fmt(cost['drop'])})"
                if cost and not data.proposal
                else k
            )
        must.append("Binding limits: " + "; ".join(costs) + " (section 5).")
    else:
        must.append(
            "Binding limits: none."
            if s["broken"]
            else "Binding limits: none; the design sits inside every laboratory limit."
        )
    w = s["worst_effect"]
    if w:
        unit = "" if w["unit"] == "-" else " " + w["unit"]
        low = w["kind"] == "min"
        bands = f"fails {'below' if low else 'above'} {fmt(w['failing'])}{unit}"
        if w["passing"] != w["failing"]:
            bands += f", passes {'from' if low else 'up to'} {fmt(w['passing'])}{unit}"
        must.append(
            f"Worst scale effect: {w['label']} fails in condition '{w['condition']}' "
            f"(model {fmt(w['model'])}{unit}; {bands}); {s['failing']} threshold check(s) fail "
            "in all (section 6)."
        )
    else:
        must.append("Worst scale effect: every threshold check passes (section 6).")
    lm = s["largest_mismatch"]
    if lm:
        where = f" in condition '{lm[1]}'" if lm[1] else ""
        must.append(
            f"Largest mismatch: {lm[0]}{where}, model value {_pct(lm[2])} against the "
            "prototype's (section 4)."
        )
    b.append(h3("What a reviewer must know"))
    b.append(ul(must))


def _alt_row(a: dict[str, Any], best: float | None) -> list[Any]:
    d = a["design"]
    if d is None:
        sep = a["separator"] or "infeasible"
        return [a["kind"], a["label"], "-", "-", "-", "-", sep]
    if a.get("tied"):
        why = "chosen" if a["kind"] == "fluid" else "tied with the chosen design"
    else:
        more = a["objective"] - best if best is not None else math.nan
        why = f"costs {fmt(more)} more, mostly in {a['separator'] or 'several groups'}"
    return [
        a["kind"],
        a["label"],
        d["fluid"],
        f"{d['temperature']:.1f}",
        f"{format_ratio(d['horizontal_ratio'])} / {format_ratio(d['vertical_ratio'])}",
        a["objective"],
        why,
    ]


def _alternatives(
    doc: Doc, data: ReportData, ans: dict[str, Any], prop: dict[str, Any] | None, system: str
) -> None:
    b = doc.section(6)
    alts = ans.get("alternatives", [])
    if alts:
        rows = [_alt_row(a, ans.get("objective")) for a in alts]
        b.append(
            doc.table(
                "The best design per model fluid and per preferred ratio, and why each lost.",
                [
                    "by",
                    "choice",
                    "fluid",
                    f"T [{t_unit(system)}]",
                    "X / Y",
                    "objective [-]",
                    "why",
                ],
                rows,
            )
        )
    else:
        b.append(para("The case offers no other fluid and no preferred ratio to compare."))
    pr = prop
    if pr is not None:
        b.append(h3(f"Proposed design {pr['label']} beside the optimum"))
        opt = pr["optimum"]
        rows = [
            [
                "proposal",
                design_text(pr["design"], system),
                pr["objective"],
                "holds every limit"
                if pr["status"] == "holds"
                else f"breaks {len(pr['violations'])} limit(s)",
            ]
        ]
        if opt.get("design"):
            rows.append(
                [
                    "optimum",
                    design_text(opt["design"], system),
                    opt["objective"],
                    "holds every limit",
                ]
            )
        b.append(
            doc.table(
                "The proposal and the optimum.", ["design", "what", "objective [-]", "limits"], rows
            )
        )
        if pr.get("notes"):
            b.append(ul([f"Rule used: {n}" for n in pr["notes"]]))
        if pr["differences"]:
            b.append(para("What makes the difference, largest first:"))
            b.append(ul([x["text"] for x in pr["differences"]]))


def _tradeoffs(doc: Doc, data: ReportData, system: str) -> None:
    from compromise.presentation import plots

    b = doc.section(7)
    case = data.case
    if data.dmap is not None:
        fig = doc.figure(
            f"Design-space map over {data.dmap.axes[0]} and {data.dmap.axes[1]} "
            f"({data.dmap.fluid if hasattr(data.dmap, 'fluid') else ''}): the feasible window "
            "inside the laboratory's limits, the weighted mismatch as contours, the chosen "
            "design marked.",
            svg_bytes(plots.map_figure(data.dmap, system), case),
            "figure-map",
        )
        b.append(fig)
    else:
        b.append(para(f"No design-space map: {data.notes.get('map', 'not available')}."))
    if data.front is not None and data.front.points:
        names = " against ".join(data.front.names)
        f = data.front
        why = (
            "axes: the case's two heaviest groups, or its heaviest group and the total; the "
            "model material and grain size are decided at every point"
            if case.sediment is not None
            else "axes chosen from the case's heaviest group and its binding limit; the limits "
            "on the axes' own quantities are lifted, so the front shows what relaxing them buys"
        )
        marked = (
            "The knee and the chosen design are marked."
            if f.has_knee
            else "The front is nearly straight, so no knee is marked; the chosen design is."
        )
        fig = doc.figure(
            f"Main Pareto front, {names} ({why}). {marked}",
            svg_bytes(plots.front_figure(data.front, system=system), case),
            "figure-front",
        )
        b.append(fig)
    else:
        why = data.notes.get("front", "no feasible point")
        b.append(para(f"No Pareto front between {' and '.join(data.front_axes)}: {why}."))
    if data.sens is not None:
        s = data.sens
        fig = doc.figure(
            f"Weight sensitivity: share of {s.samples} weight samples (each weight multiplied "
            f"by a factor log-uniform between 1/{fmt(s.spread)} and {fmt(s.spread)}, seed "
            f"{s.seed}) in which each candidate design is the best.",
            svg_bytes(plots.sensitivity_figure(s), case),
            "figure-sensitivity",
        )
        b.append(fig)
        if s.note:
            b.append(para(s.note))
    else:
        b.append(para(f"No weight sensitivity: {data.notes.get('sensitivity', 'not available')}."))


def _sources(doc: Doc, data: ReportData, rep: dict[str, Any] | None) -> None:
    b = doc.section(8)
    rows = [[f"S{i}", s["what"], s["reference"], s["tag"]] for i, s in enumerate(data.sources, 1)]
    b.append(
        doc.table(
            "Every property model, correlation and threshold used, with its source.",
            ["#", "what", "reference", "tag"],
            rows,
            [data.tag_legend],
        )
    )
    assume = [
        "Ratios are model over prototype (1:50 is a model fifty times smaller).",
        "The objective is the weighted sum over conditions and groups of the squared natural "
        "logarithm of each group's factor (model over prototype), with the case's weights.",
        "Fluid properties are evaluated at the stated temperature and pressure of the "
        "prototype and of the model fluid.",
    ]
    if data.scales:
        assume += [f"Scale table: {n}." for n in data.scales.get("notes", [])]
    if rep and (rep.get("effects") or {}).get("regimes"):
        assume.append(
            "Regimes and thresholds use the case's phenomena and the quantities they map; a "
            "check is only as good as the mapping (see docs/case-format.md)."
        )
    b.append(h3("Assumptions"))
    b.append(ul(assume))


def build_document(data: ReportData, system: str = "si") -> dict[str, Any]:
    """The document model of the report: numbered sections of paragraphs, lists, numbered
    tables and figures, with dimensional values in ``system`` units (``"si"`` or ``"us"``)."""
    doc = Doc()
    ans = to_display(data.answer, system)
    rep = to_display(data.reported, system) if data.reported is not None else None
    _summary(doc, data, rep, system)
    case_section(doc, data, system)
    refs = {s["what"]: i for i, s in enumerate(data.sources, 1)}
    if rep is not None:
        design_section(doc, data, rep, system)
        similitude_section(doc, rep)
        limits_section(doc, data, rep)
        effects_section(doc, data, rep, refs)
    else:
        for i in (2, 3, 4, 5):
            doc.section(i).append(para("No design: the case is infeasible (see the summary)."))
    _alternatives(doc, data, ans, rep if data.proposal is not None else None, system)
    _tradeoffs(doc, data, system)
    _sources(doc, data, rep)
    doc.section(9).extend([para(data.caution), para(data.caution_line)])
    pv = data.provenance
    doc.section(10).append(
        doc.table(
            "What made this report.",
            ["item", "value"],
            [
                ["tool", pv["tool"]],
                ["case file", pv["case_file"]],
                ["case file SHA-256", pv["case_sha256"]],
                ["command", pv["command"]],
                ["date", pv["date"]],
            ],
            [
                "The date is SOURCE_DATE_EPOCH when set, so the same case, version and command "
                "give the same bytes."
            ],
        )
    )
    return {
        "title": data.case.title,
        "subtitle": "Decision document: the scales, fluid and temperature of the model",
        "provenance": pv,
        "caution_line": data.caution_line,
        "unit_system": "US customary" if system == "us" else "SI",
        "sections": doc.sections,
        "figures": doc.figures,
    }
