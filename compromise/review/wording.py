"""The words every answer carries: the safety caution and the legend of source tags.

They live here, in the review layer, so that the JSON answers (built by this layer) and the
text, CSV and figures (built by the presentation layer above it) quote one text.
"""

from __future__ import annotations

CAUTION = (
    "Caution: a scale model informs, it does not certify. Designs of dams, spillways, flood\n"
    "defences and other structures whose failure can hurt people must follow local codes and\n"
    "be checked and signed by a licensed engineer."
)


def caution_line() -> str:
    """The caution on one line, as the JSON answers carry it."""
    return " ".join(CAUTION.split())
