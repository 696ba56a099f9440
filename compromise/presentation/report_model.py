"""The report's document model: numbered sections of paragraphs, lists, numbered tables and
figures, and the small formatting helpers the section builders share (presentation only).

:mod:`compromise.presentation.report_account` and :mod:`compromise.presentation.report_document`
fill it from :class:`~compromise.review.report_data.ReportData`;
:mod:`compromise.presentation.report` renders it.
"""

from __future__ import annotations

import base64
from typing import Any

from compromise.presentation.display import celsius_to
from compromise.presentation.text import fmt
from compromise.units import format_ratio

#: Section ids and titles, in the order of the document.
SECTIONS = (
    ("summary", "Summary"),
    ("case", "The case"),
    ("design", "The design"),
    ("similitude", "Similitude"),
    ("limits", "Laboratory limits"),
    ("scale-effects", "Scale effects"),
    ("alternatives", "Alternatives considered"),
    ("trade-offs", "Trade-offs"),
    ("sources", "Sources and assumptions"),
    ("caution", "Caution"),
    ("reproducibility", "Reproducibility"),
)


class Doc:
    """The document model under construction: sections of blocks, tables and figures
    numbered in order."""

    def __init__(self) -> None:
        self.sections: list[dict[str, Any]] = []
        self.tables = 0
        self.figures: list[dict[str, Any]] = []

    def section(self, index: int) -> list[dict[str, Any]]:
        ident, title = SECTIONS[index]
        blocks: list[dict[str, Any]] = []
        self.sections.append({"number": index + 1, "id": ident, "title": title, "blocks": blocks})
        return blocks

    def table(
        self, caption: str, headers: list[str], rows: list[list[Any]], notes: list[str] = ()
    ) -> dict[str, Any]:
        self.tables += 1
        cells = [[fmt(c) if not isinstance(c, str) else c for c in r] for r in rows]
        numeric = [
            bool(col) and all(numeric_cell(c) for c in col if c != "-")
            for col in ([r[i] for r in cells] for i in range(len(headers)))
        ]
        return {
            "numeric": numeric,
            "type": "table",
            "number": self.tables,
            "caption": caption,
            "headers": headers,
            "rows": cells,
            "notes": list(notes),
        }

    def figure(self, caption: str, svg: bytes, name: str) -> dict[str, Any]:
        fig = {
            "type": "figure",
            "number": len(self.figures) + 1,
            "caption": caption,
            "data_uri": "data:image/svg+xml;base64," + base64.b64encode(svg).decode("ascii"),
            "file": f"{name}.svg",
            "svg": svg,
        }
        self.figures.append(fig)
        return fig


def numeric_cell(text: str) -> bool:
    """Whether a table cell is a number (right-aligned), a percentage or a ratio included."""
    t = text.replace(" %", "").replace("%", "").strip()
    if ":" in t:
        t = t.replace(":", "", 1)
    try:
        float(t)
    except ValueError:
        return False
    return True


def para(text: str) -> dict[str, Any]:
    return {"type": "p", "text": text}


def h3(text: str) -> dict[str, Any]:
    return {"type": "h3", "text": text}


def ul(items: list[str]) -> dict[str, Any]:
    return {"type": "list", "items": list(items)}


def svg_bytes(fig: Any, case: Any) -> bytes:
    """A matplotlib figure as reproducible SVG bytes (fixed id salt, no date)."""
    import io

    import matplotlib

    from compromise.presentation.figures import figure_metadata

    _, meta = figure_metadata(case)
    buf = io.BytesIO()
    with matplotlib.rc_context({"svg.hashsalt": "compromise", "svg.fonttype": "none"}):
        fig.savefig(buf, format="svg", metadata=meta)
    return buf.getvalue()


def temp(value_c: float | None, system: str) -> str:
    if value_c is None:
        return "-"
    return f"{celsius_to(value_c, system)[0]:.1f}"


def t_unit(system: str) -> str:
    return "degF" if system == "us" else "degC"


def design_text(d: dict[str, Any], system: str) -> str:
    t = d["temperature"]  # already converted by to_display
    ratios = f"horizontal ratio {format_ratio(d['horizontal_ratio'])}"
    if abs(d["distortion"] - 1) > 1e-9:
        ratios += (
            f", vertical ratio {format_ratio(d['vertical_ratio'])} (distortion "
            f"{fmt(d['distortion'])})"
        )
    else:
        ratios += " (undistorted)"
    return (
        f"{d['fluid']} at {t:.1f} {d.get('temperature_unit', 'degC')}, {ratios}, velocity "
        f"ratio {format_ratio(d['velocity_ratio'])}"
    )
