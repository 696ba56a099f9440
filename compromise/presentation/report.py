"""The decision document: :class:`~compromise.review.report_data.ReportData` as HTML and Markdown.

Presentation only (it computes nothing new): the facts come from
:func:`compromise.review.report_data.report_data`; :mod:`compromise.presentation.report_document`
formats them into numbered sections of tables, figures and paragraphs (one document model),
and two Jinja2 templates (``templates/``) render that model as one self-contained HTML file
(stylesheet inline, figures as SVG data URIs, nothing fetched) and as its Markdown twin
(figures as SVG files beside it). The only module of the package that imports jinja2.
:func:`print_pdf` prints the HTML with headless Chromium.
"""

from __future__ import annotations

import shutil
import subprocess
import tempfile
from pathlib import Path
from typing import TYPE_CHECKING, Any

from compromise.presentation.report_document import build_document
from compromise.presentation.report_model import SECTIONS

if TYPE_CHECKING:
    from compromise.review.report_data import ReportData

__all__ = [
    "SECTIONS",
    "build_document",
    "find_chromium",
    "print_pdf",
    "render_html",
    "render_markdown",
    "write_report",
]

CHROMIUM_NAMES = ("chromium", "chromium-browser")
INSTALL_HINT = (
    "the PDF needs headless Chromium, not found on PATH (chromium or chromium-browser); "
    "install it with 'apt-get install chromium' (Debian/Ubuntu) or drop --pdf"
)


def _environment() -> Any:
    import jinja2

    env = jinja2.Environment(
        loader=jinja2.PackageLoader("compromise.presentation", "templates"),
        autoescape=jinja2.select_autoescape(["html.j2", "html"], default_for_string=False),
        trim_blocks=True,
        lstrip_blocks=True,
        keep_trailing_newline=True,
        undefined=jinja2.StrictUndefined,
    )
    env.filters["mdcell"] = lambda s: str(s).replace("|", "\\|").replace("\n", " ")
    return env


def render_html(document: dict[str, Any]) -> str:
    """The self-contained HTML of a document model."""
    return _environment().get_template("report.html.j2").render(doc=document)


def render_markdown(document: dict[str, Any]) -> str:
    """The Markdown twin (figures referenced as SVG files beside it)."""
    return _environment().get_template("report.md.j2").render(doc=document)


def report_files(folder: str | Path, pdf: bool = False) -> list[Path]:
    """The files a report writes into ``folder`` (figure files included)."""
    folder = Path(folder)
    names = ["report.html", "report.md"] + (["report.pdf"] if pdf else [])
    names += ["figure-map.svg", "figure-front.svg", "figure-sensitivity.svg"]
    return [folder / n for n in names]


def find_chromium() -> str | None:
    """The headless browser on PATH (``chromium`` or ``chromium-browser``), or None."""
    for name in CHROMIUM_NAMES:
        path = shutil.which(name)
        if path:
            return path
    return None


def print_pdf(html: Path, target: Path, *, timeout: float = 120.0) -> bytes:
    """Print ``html`` to PDF bytes with headless Chromium (``target`` names the output only
    for the temporary folder's sake).

    Raises
    ------
    RuntimeError
        When Chromium is missing (with how to install it) or fails.
    """
    exe = find_chromium()
    if exe is None:
        raise RuntimeError(INSTALL_HINT)
    with tempfile.TemporaryDirectory(prefix="compromise-pdf-") as tmp:
        out = Path(tmp) / target.name
        cmd = [
            exe,
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--no-pdf-header-footer",
            f"--user-data-dir={tmp}/profile",
            f"--print-to-pdf={out}",
            html.resolve().as_uri(),
        ]
        try:
            subprocess.run(cmd, capture_output=True, timeout=timeout, check=False)
        except (OSError, subprocess.TimeoutExpired) as exc:
            raise RuntimeError(f"chromium could not print the PDF: {exc}") from None
        if not out.is_file() or out.stat().st_size == 0:
            raise RuntimeError(f"chromium did not write the PDF ({exe})")
        return out.read_bytes()


def write_report(
    data: ReportData, folder: str | Path, *, system: str = "si", pdf: bool = False
) -> list[Path]:
    """Write ``report.html``, ``report.md`` (with its figure files) and, with ``pdf``,
    ``report.pdf`` into ``folder``, each through the write-then-rename helper; return the
    paths written."""
    from compromise.outfiles import write_bytes, write_text

    folder = Path(folder)
    document = build_document(data, system)
    paths = []
    for fig in document["figures"]:
        paths.append(write_bytes(folder / fig["file"], fig["svg"]))
    paths.append(write_text(folder / "report.md", render_markdown(document)))
    html = write_text(folder / "report.html", render_html(document))
    paths.insert(0, html)
    if pdf:
        paths.append(write_bytes(folder / "report.pdf", print_pdf(html, folder / "report.pdf")))
    return paths
