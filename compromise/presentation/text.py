"""The plain-text building blocks of every table: numbers, aligned tables, and the tables of
groups, quantities and limits that several answers share (presentation only).

Every header carries its unit in brackets (``[-]`` dimensionless, ``[%]`` a percentage); where
the rows of one table have different units, the table has a unit column.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Any

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
        f"  model fluid        {d['fluid']} at {d['temperature']:.1f} "
        f"{d.get('temperature_unit', 'degC')}"
        + (
            f", {fmt(d['pressure'])} {d.get('pressure_unit', 'Pa')}"
            if abs(d.get("pressure_si", d["pressure"]) - 101325.0) > 1
            else ""
        ),
        f"  horizontal ratio   {format_ratio(d['horizontal_ratio'])}",
        f"  vertical ratio     {format_ratio(d['vertical_ratio'])}",
        f"  distortion         {fmt(d['distortion'])}",
        f"  velocity ratio     {format_ratio(d['velocity_ratio'])}  ({fmt(d['velocity_ratio'])})",
    ]
    if d.get("material") is not None:  # a case with [sediment]
        lines += [
            f"  model material     {d['material']}",
            f"  model grain size   {fmt(d['grain_size'] * 1e3)} mm",
        ]
    return lines


def sediment_lines(s: dict[str, Any]) -> list[str]:
    """The granular account of an answer (a case with ``[sediment]``)."""

    def pair(name: str, v: dict[str, float] | None) -> list[str]:
        if v is None:
            return []
        return [f"  {name:<26} prototype {fmt(v['prototype'])}, model {fmt(v['model'])}"]

    morph = s.get("morphological_time_ratio")
    no_bed = "- (no moving bed: no Shields group, or a bed at rest)"
    lines = [
        "",
        "Granular material:",
        f"  {'material':<26} {s['material']}, grain size {fmt(s['grain_size'] * 1e3)} mm "
        f"(prototype {fmt(s['prototype_grain_size'] * 1e3)} mm, ratio "
        f"{format_ratio(s['grain_size_ratio'])})",
        *pair("relative density R", s["relative_density"]),
        *pair("Shields", s["shields"]),
        *pair("critical Shields (S&W 1997)", s["critical_shields"]),
        f"  {'hydraulic time ratio':<26} {format_ratio(s['hydraulic_time_ratio'])}",
        f"  {'morphological time ratio':<26} "
        + (format_ratio(morph) if morph is not None else no_bed),
        f"  {'path':<26} {s['path']}",
    ]
    return lines


def groups_table(groups: dict[str, Any]) -> str:
    """Groups: prototype, model, factor, mismatch in %, weight."""
    rows = [
        [
            n,
            g["prototype"],
            g["model"],
            g["factor"],
            "by construction" if g.get("by_construction") else _pct(g["mismatch"]),
            g["weight"],
        ]
        for n, g in groups.items()
    ]
    text = table(
        ["group", "prototype [-]", "model [-]", "factor [-]", "mismatch [%]", "weight [-]"], rows
    )
    built = [n for n, g in groups.items() if g.get("by_construction")]
    if built:
        text += (
            f"\n  matched by construction: {', '.join(built)} (the scale laws of the "
            "quantities cancel: no design can change the ratio, and a weight on it does nothing)"
        )
    return text


def quantities_table(quantities: dict[str, Any], system: str = "si") -> str:
    """Quantities: prototype, model, ratio, unit (``system``: the units the values are in)."""
    rows = [
        [n, q["prototype"], q["model"], format_ratio(q["ratio"]), q["unit"]]
        for n, q in quantities.items()
    ]
    return table(["quantity", "prototype", "model", "ratio [-]", unit_header(system)], rows)


def unit_header(system: str) -> str:
    """The header of a unit column: ``unit [SI]`` or ``unit [US]``."""
    return f"unit [{system.upper()}]"


def _margin(margin: float) -> str:
    """A fractional margin in %, without a negative zero for a binding limit."""
    pct = margin * 100
    return f"{0.0 if abs(pct) < 0.05 else pct:+.1f} %"


def limits_table(
    limits: dict[str, Any], quantities: dict[str, Any] | None = None, system: str = "si"
) -> str:
    """Limits: kind, bound, model, unit, margin, binding, condition.

    A limit's unit is its quantity's (from ``quantities``); a group's floor or ceiling, and an
    enforced threshold, are dimensionless (``-``) unless the limit carries its own ``unit``.
    """
    quantities = quantities or {}
    rows = []
    for n, lim in limits.items():
        name = n.rsplit(".", 1)[0]
        unit = lim.get("unit") or quantities.get(name, {}).get("unit", "-")
        rows.append(
            [
                n,
                lim["kind"],
                lim["bound"],
                lim["model"],
                unit,
                _margin(lim["margin"]),
                "BINDS" if lim["binding"] else ("VIOLATED" if lim["margin"] < 0 else ""),
                lim.get("condition", ""),
            ]
        )
    return table(
        ["limit", "kind", "bound", "model", unit_header(system), "margin [%]", "", "condition"],
        rows,
    )
