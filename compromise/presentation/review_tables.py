"""Text and CSV of design reviews: ``compromise evaluate`` and ``compromise compare``.

Presentation only: everything here comes from ``DesignReview.to_dict()`` and
``Comparison.to_dict()``.
"""

from __future__ import annotations

import csv
import io
import math
from pathlib import Path
from typing import Any

from compromise.outfiles import write_text
from compromise.presentation.tables import (
    account_lines,
    design_lines,
    effects_lines,
    fmt,
    table,
)
from compromise.review.wording import CAUTION
from compromise.units import format_ratio


def format_review(r: dict[str, Any]) -> str:
    """The readable answer of ``compromise evaluate``."""
    out = [r.get("title", ""), ""]
    verdict = (
        "holds every limit and bound of the case"
        if r["status"] == "holds"
        else f"breaks {len(r['violations'])} limit(s) or bound(s) of the case"
    )
    out.append(
        f"Proposed design {r['label']} {verdict} (weighted mismatch {fmt(r['objective'], 6)}):"
    )
    out += design_lines(r["design"])
    if r.get("notes"):
        out += ["", "Defaults and rules used:", *(f"  - {n}" for n in r["notes"])]
    if r["violations"]:
        out += ["", "Violations (amounts in the bound's own unit):"]
        out += [f"  - {violation_text(v)}" for v in r["violations"]]
    out += ["", *distance_lines(r)]
    out += account_lines(r)
    if r.get("effects"):
        out += ["", *effects_lines(r["effects"])]
    out += ["", CAUTION]
    return "\n".join(out)


def violation_text(v: dict[str, Any]) -> str:
    """One violation; rebuilt from its fields where display units converted them."""
    if not v.get("converted"):
        return v["text"]
    key, unit = v["key"], v["unit"]
    word = "above its maximum" if v["value"] > v["bound"] else "below its minimum"
    where = f" in condition '{v['condition']}'" if v.get("condition") else ""
    name = key.split(".")[1]
    return (
        f"{key}: model {name} {fmt(v['value'])} {unit} is {fmt(v['excess'])} {unit} {word} "
        f"{fmt(v['bound'])} {unit} ({100 * v['margin']:+.1f} %){where}"
    )


def distance_lines(r: dict[str, Any]) -> list[str]:
    """How far the proposal is from the optimum, and what makes the difference."""
    opt = r["optimum"]
    if opt["status"] != "optimal":
        return ["Distance from the optimum: the case has no design that holds every limit."]
    ratio = r.get("objective_ratio")
    times = f" ({fmt(ratio, 3)} times the optimum's)" if ratio is not None else ""
    d = opt["design"]
    ratios = format_ratio(d["horizontal_ratio"])
    if abs(d["distortion"] - 1) > 1e-9:
        ratios += f" / {format_ratio(d['vertical_ratio'])}"
    out = [
        "Distance from the optimum:",
        f"  optimum            {d['fluid']} at {d['temperature']:.1f} "
        f"{d.get('temperature_unit', 'degC')}, {ratios}, "
        f"weighted mismatch {fmt(opt['objective'], 6)}",
        f"  this proposal      weighted mismatch {fmt(r['objective'], 6)}{times}",
    ]
    if r["differences"]:
        out.append("  what makes the difference (largest first):")
        out += [f"    - {x['text']}" for x in r["differences"]]
    else:
        out.append("  the proposal is the optimum")
    return out


def _cell(value: Any, row: dict[str, Any]) -> str:
    if value is None:
        return "-"
    if isinstance(value, str):
        return value
    if row["section"] == "design" and row["name"] in ("horizontal_ratio", "vertical_ratio"):
        return format_ratio(value)
    if row["section"].startswith("mismatch"):
        return f"{100 * math.expm1(value):+.1f} %"
    if row["section"] == "limit margin":
        return f"{100 * value:+.1f} %"
    return fmt(value)


def _unit(row: dict[str, Any]) -> str:
    if row["section"].startswith("mismatch") or row["section"] == "limit margin":
        return "%"
    if row["section"] == "design" and row["name"] in ("horizontal_ratio", "vertical_ratio"):
        return "ratio"
    return row["unit"]


def format_comparison(c: dict[str, Any]) -> str:
    """The readable table of ``compromise compare``: a column per design, * marks the best."""
    labels = [d["label"] for d in c["designs"]]
    out = [c.get("title", ""), ""]
    for d in c["designs"]:
        state = (
            "holds every limit"
            if d["status"] == "holds"
            else "BREAKS " + ", ".join(v["key"] for v in d["violations"])
        )
        out.append(f"  {d['label']}: {state}")
    out.append("")
    rows = []
    section = None
    for row in c["rows"]:
        if row["section"] != section:
            section = row["section"]
            rows.append([f"[{section}]", "", *([""] * len(labels))])
        cells = [
            _cell(v, row) + (" *" if i in row["best"] else "") for i, v in enumerate(row["values"])
        ]
        rows.append([row["name"], _unit(row), *cells])
    out.append(table(["row", "unit", *labels], rows))
    out += [
        "",
        "* the best value of the row (objective: among the designs that hold every limit;",
        "  mismatch: smallest magnitude; limit margin: largest slack; threshold: pass).",
        "",
        CAUTION,
    ]
    return "\n".join(out)


def write_comparison_csv(c: dict[str, Any], folder: str | Path) -> list[str]:
    """``comparison.csv`` (SI units in the column ``unit``; best marked in ``best``) in
    ``folder``; returns the paths written."""
    labels = [d["label"] for d in c["designs"]]
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(["section", "row", "unit", *labels, "best"])
    for row in c["rows"]:
        values = ["" if v is None else v for v in row["values"]]
        best = ";".join(labels[i] for i in row["best"])
        w.writerow([row["section"], row["name"], row["unit"], *values, best])
    path = Path(folder) / "comparison.csv"
    write_text(path, buf.getvalue())
    return [str(path)]
