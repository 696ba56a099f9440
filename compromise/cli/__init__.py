"""The ``compromise`` command: parses, calls the library, prints. No physics here.

Exit status: 0 answered, 1 infeasible (an answer with its diagnosis), 2 bad input.

Layer: the top. One module per family of commands; importing them registers the commands on
the one typer ``app``.
"""

from __future__ import annotations

import os
import sys

# The solver's matrix products are small and batched (a few thousand rows by a few columns):
# a second BLAS thread saves no wall time and costs 35-40 % more CPU, and competes with other
# processes on a busy machine. Set before numpy is first imported, for the command only (a
# user's own program that imports the library keeps its own settings); a value already in the
# environment wins.
if "numpy" not in sys.modules:
    for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
        os.environ.setdefault(_var, "1")

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
