"""What the decision document says: every fact of the report, gathered as plain data.

:func:`report_data` solves the case, assesses the scale effects, reviews a proposed design when
one is given, builds the scale table of the reported design, traces the trade-offs (the
design-space map, the main Pareto front, the weight sensitivity) and lists the sources of every
property model, correlation and threshold used. The presentation layer
(:mod:`compromise.presentation.report`) turns the result into HTML and Markdown and computes
nothing new; so the report and ``solve --json`` never disagree (they are the same data).

The trade-offs are traced with modest resolutions (:data:`MAP_RESOLUTION`, :data:`FRONT_POINTS`,
:data:`SENSITIVITY_SAMPLES`) so that the report of the river case takes a few seconds; each
can be changed by keyword.
"""

from __future__ import annotations

import datetime as _dt
import inspect
import math
import os
import re
from dataclasses import dataclass, field
from typing import Any

from compromise.casefile.designs import DesignSpec
from compromise.casefile.model import Case
from compromise.errors import CompromiseError
from compromise.review.answer import solve
from compromise.review.provenance import tool_version
from compromise.review.wording import TAG_LEGEND, caution_line

#: Grid points per axis of the design-space map in the report.
MAP_RESOLUTION = 41
#: Epsilon values of the main Pareto front's sweep in the report.
FRONT_POINTS = 30
#: Weight samples of the sensitivity in the report.
SENSITIVITY_SAMPLES = 200
#: Admissible biases of the acceptable-mismatch table [-].
TOLERANCES = (0.05, 0.10)

#: The caution of the report's own section (one paragraph, the same message as every answer).
REPORT_CAUTION = (
    "A physical model informs engineering judgement; it does not replace it. The ratios, "
    "fluid and temperature above are the best compromise for the weights and limits the case "
    "file states, and every scale effect flagged here changes what the model's measurements "
    "mean. Structures whose failure can hurt people (dams, spillways, flood defences, "
    "bridges, intakes) are designed, checked and approved under the local codes by licensed "
    "engineers."
)


@dataclass(frozen=True)
class ReportData:
    """Everything the decision document shows (SI units; the presentation converts).

    Attributes
    ----------
    case : Case
    answer : dict
        ``compromise.solve(case).to_dict()``: the optimum, its groups, limits, quantities per
        condition, binding costs, alternatives and scale effects.
    proposal : dict or None
        The reviewed proposed design (``DesignReview.to_dict()``), when one was given.
    reported : dict or None
        The account of the design the report is about: the proposal when given, else the
        optimum (the same layout as ``answer``).
    scales : dict or None
        The scale table of the reported design (``ScaleTable.to_dict()``).
    summary : dict
        The job, the decision and the three things a reviewer must know.
    tolerance : list of dict
        Acceptable-mismatch results: the least model Reynolds number keeping a friction bias
        within each of :data:`TOLERANCES`, beside the model's value.
    front, dmap, sens : object or None
        The main Pareto front, the design-space map and the weight sensitivity (None with a
        reason in ``notes`` where the case does not allow them).
    sources : list of dict
        ``{"what", "reference", "tag"}`` of every property model, correlation and threshold.
    provenance : dict
        Tool version, case file SHA-256, command line and date.
    notes : dict
        Why a trade-off is missing, by name (``front``, ``map``, ``sensitivity``).
    """

    case: Case
    answer: dict[str, Any]
    proposal: dict[str, Any] | None
    reported: dict[str, Any] | None
    scales: dict[str, Any] | None
    summary: dict[str, Any]
    tolerance: list[dict[str, Any]]
    front: Any
    dmap: Any
    sens: Any
    sources: list[dict[str, str]]
    provenance: dict[str, str]
    notes: dict[str, str] = field(default_factory=dict)
    front_axes: tuple[str, ...] = ()
    caution: str = REPORT_CAUTION
    caution_line: str = field(default_factory=caution_line)
    tag_legend: str = TAG_LEGEND


def report_date(now: _dt.datetime | None = None) -> str:
    """The report's date (UTC, ISO 8601): ``SOURCE_DATE_EPOCH`` when set, so that the same
    input gives the same bytes (reproducible-builds.org convention), else now.

    Examples
    --------
    >>> import os
    >>> os.environ["SOURCE_DATE_EPOCH"] = "0"
    >>> report_date()
    '1970-01-01 00:00 UTC'
    >>> del os.environ["SOURCE_DATE_EPOCH"]
    """
    epoch = os.environ.get("SOURCE_DATE_EPOCH", "").strip()
    if epoch.isdigit():
        when = _dt.datetime.fromtimestamp(int(epoch), tz=_dt.UTC)
    else:
        when = now or _dt.datetime.now(tz=_dt.UTC)
    return when.strftime("%Y-%m-%d %H:%M UTC")


def front_axes(case: Case, answer: dict[str, Any]) -> tuple[str, ...]:
    """The axes of the main Pareto front: the heaviest weighted group against the quantity of
    the first binding limit; without a binding limit, the heaviest group against the total
    weighted mismatch's other cost, the model's plan area.

    Groups kept exactly, and thresholds turned into bounds, are not candidates (their mismatch
    is zero by construction).
    """
    if case.sediment is not None:
        # a movable bed or armour layer: the two heaviest groups (fronts of such a case trade
        # group mismatches and the total only), or the heaviest against the total
        from compromise.solving.granular import GranularProblem

        normals = GranularProblem(case).normals
        ranked = sorted(
            (
                (-g.weight, i, n)
                for i, (n, g) in enumerate(case.groups.items())
                if not g.exact and not g.threshold and g.weight > 0 and normals[n] is not None
            )
        )
        names = [n for _, _, n in ranked[:2]]
        return tuple(names) if len(names) == 2 else (*names, "total")
    groups = [
        (g.weight, i, n)
        for i, (n, g) in enumerate(case.groups.items())
        if not g.exact and not g.threshold and g.weight > 0 and g.power is not None
    ]
    first = max(groups, key=lambda t: (t[0], -t[1]))[2] if groups else "total"
    for key in answer.get("binding", {}):
        parts = key.split(".")
        if parts[0] == "limits" and parts[1] in case.quantities:
            return (first, parts[1])
    return (first, "plan_area") if first != "total" else ("total", "distortion")


def _docstring_references(fn: Any) -> str:
    """The References section of a function's docstring, on one line."""
    doc = inspect.getdoc(fn) or ""
    m = re.search(r"References\n-+\n(.*?)(?:\n\n[A-Z][a-z]+\n-+|\Z)", doc, re.S)
    return " ".join(m.group(1).split()) if m else ""


def _sources(case: Case, reported: dict[str, Any], fluids: list[str]) -> list[dict[str, str]]:
    from compromise.physics.fluids import get_fluid
    from compromise.physics.friction import friction_factor, ittc_1957, strickler_roughness

    out: list[dict[str, str]] = []
    for name in dict.fromkeys([case.fluid, *fluids]):
        try:
            fl = get_fluid(name)
        except CompromiseError:
            continue
        refs = "; ".join(fl.references) or "-"
        role = "prototype and model fluid" if name == case.fluid else "model fluid"
        if name == case.fluid and name not in fluids:
            role = "prototype fluid"
        out.append({"what": f"{name} properties ({role})", "reference": refs, "tag": "found"})
    effects = reported.get("effects") or {}
    kinds = {c.get("kind") for c in effects.get("consequences", [])}
    correlations = (
        ("friction", "Darcy friction factor (Colebrook-White; laminar 64/Re)", friction_factor),
        ("manning", "grain size of a Manning n (Strickler)", strickler_roughness),
        ("ittc", "ship-model friction line (ITTC 1957)", ittc_1957),
    )
    for kind, what, fn in correlations:
        if kind in kinds:
            out.append({"what": what, "reference": _docstring_references(fn), "tag": "found"})
    seen: set[str] = set()
    for t in effects.get("thresholds", []):
        key = f"{t['phenomenon']}.{t['name']}"
        if key in seen:
            continue
        seen.add(key)
        out.append({"what": f"threshold {key}", "reference": t["source"], "tag": t["status"]})
    return out


def _summary(case: Case, answer: dict[str, Any], reported: dict[str, Any] | None) -> dict:
    """The job, the decision, the objective and the three things a reviewer must know."""
    rep = reported or {}
    binding = [k for k, lim in rep.get("limits", {}).items() if lim.get("binding")]
    broken = [k for k, lim in rep.get("limits", {}).items() if lim.get("margin", 0) < -1e-9]
    effects = rep.get("effects") or {}
    failing = [t for t in effects.get("thresholds", []) if t.get("verdict") == "fail"]
    worst_effect = (
        min(failing, key=lambda t: t.get("margin", 0.0)) if failing else None
    )  # the deepest failure
    largest: tuple[str, str, float] | None = None
    conds = rep.get("conditions") or {"": {"groups": rep.get("groups", {})}}
    for cname, c in conds.items():
        for gname, g in c.get("groups", {}).items():
            m = g.get("mismatch")
            if m is None or not math.isfinite(m) or g.get("by_construction"):
                continue
            if largest is None or abs(m) > abs(largest[2]) + 1e-12:
                largest = (gname, cname, m)
    job = case.description or case.title
    return {
        "job": job,
        "phenomena": list(case.phenomena),
        "binding": binding,
        "broken": broken,
        "worst_effect": worst_effect,
        "failing": len(failing),
        "largest_mismatch": largest,
        "objective": rep.get("objective"),
        "status": answer.get("status"),
    }


def _tolerance(case: Case, reported: dict[str, Any]) -> list[dict[str, Any]]:
    """The least model Reynolds number for a head-loss and a depth bias within each tolerance,
    beside the model's own (the case's Reynolds group, first condition)."""
    from compromise.review.context import is_reynolds
    from compromise.review.tolerance import reynolds_tolerance

    group = next((n for n, g in case.groups.items() if is_reynolds(g) and not g.threshold), None)
    if group is None:
        return []
    conds = reported.get("conditions") or {}
    first = next(iter(conds.values()), reported)
    model = first.get("groups", {}).get(group, {}).get("model")
    rows = []
    for quantity in ("head_loss", "depth"):
        for within in TOLERANCES:
            try:
                tol = reynolds_tolerance(case, quantity, within)
            except CompromiseError:
                return rows
            rows.append(
                {
                    "group": group,
                    **tol.to_dict(),
                    "reynolds_model": model,
                    "meets": model is not None and model >= tol.reynolds_min,
                }
            )
    return rows


def _explore(
    case: Case, answer: dict[str, Any], resolution: int, points: int, samples: int
) -> tuple[Any, Any, Any, dict[str, str], tuple[str, ...]]:
    from compromise.explore.designmap import design_map
    from compromise.explore.sensitivity import weight_sensitivity
    from compromise.explore.tradeoffs import trace_front

    notes: dict[str, str] = {}
    dmap = front = sens = None
    axes = front_axes(case, answer)
    try:
        dmap = design_map(case, resolution=resolution)
    except CompromiseError as exc:
        notes["map"] = str(exc)
    try:
        front = trace_front(case, list(axes), points=points)
    except CompromiseError as exc:
        notes["front"] = str(exc)
    try:
        sens = weight_sensitivity(case, samples=samples)
    except CompromiseError as exc:
        notes["sensitivity"] = str(exc)
    return dmap, front, sens, notes, axes


def report_data(
    case: Case,
    *,
    design: DesignSpec | None = None,
    command: str = "",
    resolution: int | None = None,
    points: int | None = None,
    samples: int | None = None,
) -> ReportData:
    """Gather every fact of the decision document of ``case``.

    Parameters
    ----------
    case : Case
    design : DesignSpec, optional
        A proposed design to report beside the optimum (a saved answer or an inline spec).
    command : str
        The command line that made the report (shown under Reproducibility).
    resolution, points, samples : int, optional
        Grid points per axis of the map, epsilon values of the front, weight samples (default
        :data:`MAP_RESOLUTION`, :data:`FRONT_POINTS`, :data:`SENSITIVITY_SAMPLES`).

    Returns
    -------
    ReportData
    """
    from compromise.solving.scales import scale_table

    ans = solve(case)
    answer = ans.to_dict()
    proposal = None
    if design is not None:
        from compromise.review.proposal import design_from_spec, evaluate

        d, notes = design_from_spec(case, design)
        proposal = evaluate(
            case, d, notes=notes, label=design.label, optimum=ans.solution
        ).to_dict()
    reported = proposal if proposal is not None else (answer if ans.feasible else None)
    scales = None
    if reported is not None:
        dd = reported["design"]
        try:
            scales = scale_table(
                case,
                dd["horizontal_ratio"],
                vertical=dd["vertical_ratio"],
                velocity=dd["velocity_ratio"],
                fluid=dd["fluid"],
                temperature=dd["temperature"] + 273.15,
                pressure=dd["pressure"],
            ).to_dict()
        except CompromiseError:
            scales = None
    dmap, front, sens, notes, axes = _explore(
        case,
        answer,
        MAP_RESOLUTION if resolution is None else resolution,
        FRONT_POINTS if points is None else points,
        SENSITIVITY_SAMPLES if samples is None else samples,
    )
    fluids = list(case.model.fluids)
    return ReportData(
        case=case,
        answer=answer,
        proposal=proposal,
        reported=reported,
        scales=scales,
        summary=_summary(case, answer, reported),
        tolerance=_tolerance(case, reported) if reported is not None else [],
        front=front,
        dmap=dmap,
        sens=sens,
        sources=_sources(case, reported or answer, fluids),
        provenance={
            "tool": tool_version(),
            "case_file": case.path,
            "case_sha256": case.source_sha256,
            "command": command,
            "date": report_date(),
        },
        notes=notes,
        front_axes=axes,
    )
