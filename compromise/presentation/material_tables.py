"""The granular-material catalogue as text, printed by ``compromise materials``."""

from __future__ import annotations

import textwrap
from collections.abc import Mapping
from typing import Any

from compromise.presentation.text import fmt

__all__ = ["format_materials"]

_WIDTH = 100  # [characters] wrap of the notes below the table


def _aligned(headers: list[str], rows: list[list[str]], right: set[int]) -> list[str]:
    """Columns left-aligned, except those in ``right`` (numbers); no trailing blanks."""
    widths = [max(len(r[i]) for r in [headers, *rows]) for i in range(len(headers))]

    def line(cells: list[str]) -> str:
        return "  ".join(
            c.rjust(w) if i in right else c.ljust(w)
            for i, (c, w) in enumerate(zip(cells, widths, strict=True))
        ).rstrip()

    return [line(headers), line(["-" * w for w in widths]), *(line(r) for r in rows)]


def _wrapped(text: str, first: str, rest: str) -> list[str]:
    return textwrap.wrap(text, _WIDTH, initial_indent=first, subsequent_indent=rest)


def format_materials(
    data: Mapping[str, Mapping[str, Any]], cohesion_note: str, cohesion_limit: float
) -> str:
    """The catalogue: one row per material (``Material.to_dict()`` by name), the notes, the
    sources numbered (identical sources share a number), then the smallest model grain
    ``cohesion_limit`` [m] and why."""
    sources: list[str] = []
    rows = []
    for name, m in data.items():
        if m["source"] not in sources:
            sources.append(m["source"])
        low, high = m["density_range"]
        rows.append(
            [
                name,
                m["use"],
                fmt(m["density"]),
                f"{fmt(low)}-{fmt(high)}",
                f"[{sources.index(m['source']) + 1}]",
            ]
        )
    headers = ["material", "use", "density [kg/m^3]", "range [kg/m^3]", "source"]
    out = ["Granular materials: movable-bed sediments and armour stones", ""]
    out.extend(_aligned(headers, rows, right={2, 3}))
    out.extend(["", "Notes:"])
    for name, m in data.items():
        if m.get("note"):
            out.extend(_wrapped(f"{name}: {m['note']}", "  ", "    "))
    out.extend(["", "Sources:"])
    for i, s in enumerate(sources, 1):
        out.extend(_wrapped(s, f"  [{i}] ", "      "))
    out.append("")
    limit = f"Smallest model grain: {fmt(cohesion_limit * 1e3)} mm. {cohesion_note}"
    out.extend(_wrapped(limit, "", ""))
    return "\n".join(out)
