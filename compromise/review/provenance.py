"""Where a result came from: the case's title, the tool's version and the case file's hash.

Every answer that feeds a design carries the caution and this provenance, in its JSON and in a
footer of every figure, so that a table pasted into a report or a picture on a slide still says
which case file, and which version of the tool, produced it.
"""

from __future__ import annotations

from typing import Any

from compromise.casefile.model import Case
from compromise.review.wording import caution_line

#: Hex digits of the SHA-256 shown where space is short (figure footers); 12 digits (48 bits)
#: tell apart any two case files a laboratory will ever hold.
SHORT_HASH = 12


def tool_version() -> str:
    """``compromise X.Y.Z``."""
    from compromise import __version__

    return f"compromise {__version__}"


def provenance(case: Case) -> dict[str, str]:
    """Plain data: the case's title, the tool and version, the case file's SHA-256 (hex)."""
    return {"case": case.title, "tool": tool_version(), "case_sha256": case.source_sha256}


def provenance_line(case: Case) -> str:
    """One line for a figure footer: title, version and the short hash.

    Examples
    --------
    >>> from types import SimpleNamespace
    >>> line = provenance_line(SimpleNamespace(title="Weir", source_sha256="ab" * 32))
    >>> line.startswith("Weir | compromise ") and line.endswith("case sha256 abababababab")
    True
    """
    return f"{case.title} | {tool_version()} | case sha256 {case.source_sha256[:SHORT_HASH]}"


def stamped(data: dict[str, Any], case: Case) -> dict[str, Any]:
    """``data`` with the caution and the provenance after its title (JSON of the commands whose
    result feeds a design)."""
    out: dict[str, Any] = {"title": data.get("title", case.title)}
    out["caution"] = caution_line()
    out["provenance"] = provenance(case)
    out.update({k: v for k, v in data.items() if k not in out})
    return out
