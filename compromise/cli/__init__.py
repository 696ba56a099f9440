"""The ``compromise`` command: parses, calls the library, prints. No physics here.

Exit status: 0 answered, 1 infeasible (an answer with its diagnosis), 2 bad input.

Layer: the top. One module per family of commands; importing them registers the commands on
the one typer ``app``.
"""

from __future__ import annotations

import sys

from compromise.cli import (  # noqa: F401  (registers the commands)
    core,
    data,
    explore,
    materials,
    report,
    review,
)
from compromise.cli.common import app

__all__ = ["app", "main"]


def main() -> None:
    """Entry point of the ``compromise`` command."""
    try:
        app()
    except KeyboardInterrupt:  # pragma: no cover
        sys.exit(130)
