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


#: The source tags of thresholds, consequences and property notes, explained on one line. Every
#: output that shows a tag prints this once (the ``effects`` JSON carries it as ``tag_legend``).
TAG_LEGEND = (
    "Tags: found = value stated in the cited source; from memory = recalled, check before "
    "relying on it; common practice = a trade rule with no single source; physics = computed "
    "from a law."
)

#: The tags a source may carry, in the order of :data:`TAG_LEGEND`.
TAGS: tuple[str, ...] = ("found", "from memory", "common practice", "physics")


def caution_line() -> str:
    """The caution on one line, as the JSON answers carry it."""
    return " ".join(CAUTION.split())
