"""The bundled scenarios: invented cases shipped with the package as starting points.

``compromise init`` copies one of them, with a header saying where it came from, so a new user
starts from a complete, commented case file rather than a blank page. The scenarios live in
``compromise/scenarios/`` (package data, the same files as the repository's ``cases/``).
"""

from __future__ import annotations

import re
from importlib import resources

from compromise.errors import CaseError


def _folder() -> resources.abc.Traversable:
    return resources.files("compromise").joinpath("scenarios")


def scenario_names() -> list[str]:
    """The bundled scenarios' names, sorted."""
    return sorted(p.name[:-5] for p in _folder().iterdir() if p.name.endswith(".toml"))


def scenario_text(name: str) -> str:
    """A bundled scenario's TOML text.

    Raises
    ------
    CaseError
        When no scenario has that name (the message lists them).
    """
    names = scenario_names()
    if name not in names:
        raise CaseError(f"expected one of {', '.join(names)}, got {name!r}", key="TEMPLATE")
    return _folder().joinpath(f"{name}.toml").read_text(encoding="utf-8")


def scenario_summary(name: str) -> str:
    """One line: the first sentence of the scenario's opening comment.

    Examples
    --------
    >>> scenario_summary("river_bend")
    'a fixed-bed flood model of a river bend, distorted.'
    """
    lines = []
    for line in scenario_text(name).splitlines():
        if not line.startswith("#"):
            break
        text = line.lstrip("#").strip()
        if not text:
            break
        lines.append(text)
    first = " ".join(lines)
    first = re.split(r"(?<=\.)\s", first, maxsplit=1)[0]
    return re.sub(r"^Invented scenario[,:]?\s*", "", first)


def starting_case(name: str) -> str:
    """The text ``compromise init`` writes: a header, then the scenario unchanged."""
    header = (
        f"# Starting case written by 'compromise init {name}' from a bundled, invented scenario.\n"
        "# Replace the title, the prototype's quantities, the groups' weights and the\n"
        "# laboratory's limits with your own; 'compromise check FILE' reports every key it cannot\n"
        "# read, and docs/case-format.md describes each one.\n"
        "#\n"
    )
    return header + scenario_text(name)
