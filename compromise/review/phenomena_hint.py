"""Which scale-effect checks a case does not ask for, though its quantities and groups suggest
them.

A case names the phenomena whose published thresholds are checked (``phenomena = [...]``); a
case that names none gets no threshold check at all. :func:`phenomena_hint` reads what the case
describes (its quantities, its groups, its fluids, whether the model may be distorted) and names
the phenomena of :data:`compromise.physics.thresholds.PHENOMENA` that plausibly apply, each with
the reason and the line to add. The rules are a modeller's first reading of a case (common
practice), not physics: they suggest, the user decides.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from compromise.casefile.model import Case
from compromise.physics.thresholds import PHENOMENA, conventional_names

#: Quantity names that say a flow has a free surface (a liquid with one of these is an open
#: channel, a basin or a tank rather than a full pipe).
FREE_SURFACE_NAMES = ("depth", "water_depth", "head", "toe_depth", "draft")


@dataclass(frozen=True)
class Suggestion:
    """A phenomenon the case may involve.

    Attributes
    ----------
    phenomenon : str
        A key of :data:`~compromise.physics.thresholds.PHENOMENA`.
    why : str
        What in the case suggests it.
    missing : tuple of str
        Conventional quantity names its thresholds use that the case does not define under
        that name (map them: ``[phenomena.X] depth = "<quantity>"``).
    """

    phenomenon: str
    why: str
    missing: tuple[str, ...] = ()

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "phenomenon": self.phenomenon,
            "why": self.why,
            "missing": list(self.missing),
        }


@dataclass(frozen=True)
class PhenomenaHint:
    """What the answer says about threshold checks the case does not ask for.

    Attributes
    ----------
    checked : tuple of str
        The phenomena the case names (their thresholds are checked).
    suggested : tuple of Suggestion
        Phenomena not named that the case's quantities and groups make relevant.
    """

    checked: tuple[str, ...]
    suggested: tuple[Suggestion, ...] = field(default=())

    @property
    def message(self) -> str:
        """One sentence for the answer."""
        names = ", ".join(s.phenomenon for s in self.suggested)
        if not self.checked:
            head = "The case lists no phenomena, so no scale-effect threshold is checked. "
            if not self.suggested:
                return head + "None of the known phenomena is suggested by its quantities."
            return head + f"Its quantities and groups suggest: {names}."
        return f"Not checked, though the case's quantities and groups suggest them: {names}."

    def lines(self) -> list[str]:
        """The TOML to add to the case file, as lines."""
        if not self.suggested:
            return []
        if self.checked or any(s.missing for s in self.suggested):
            out: list[str] = []
            for s in self.suggested:
                out.append(f"[phenomena.{s.phenomenon}]")
                out += [f'{m} = "<the case\'s quantity that is its {m}>"' for m in s.missing]
            return out
        names = ", ".join(f'"{s.phenomenon}"' for s in self.suggested)
        return [f"phenomena = [{names}]"]

    @property
    def where(self) -> str:
        """Where in the case file the lines go."""
        if self.lines() and self.lines()[0].startswith("phenomena ="):
            return "near the top of the case file, before the first [table]"
        return "at the end of the case file (one table per phenomenon)"

    def to_dict(self) -> dict[str, Any]:
        """Plain data, for the answer's ``phenomena_hint``."""
        return {
            "checked": list(self.checked),
            "message": self.message,
            "suggested": [s.to_dict() for s in self.suggested],
            "line": self.lines(),
            "where": self.where if self.suggested else "",
        }


def _powers(case: Case) -> dict[str, dict[str, float]]:
    """Each power-product group's exponents by name (groups that are not, left out)."""
    return {n: dict(g.power[1]) for n, g in case.groups.items() if g.power is not None}


def suggest_phenomena(case: Case) -> tuple[Suggestion, ...]:
    """The phenomena a case's quantities, groups and fluids make relevant, each with why.

    Parameters
    ----------
    case : Case

    Returns
    -------
    tuple of Suggestion
        In the order of :data:`~compromise.physics.thresholds.PHENOMENA`; the case's own
        ``phenomena`` included (the caller leaves them out).
    """
    from compromise.physics.fluids import get_fluid
    from compromise.solving.problem import prototype_group_values

    q = set(case.quantities)
    powers = _powers(case)
    gas = get_fluid(case.fluid).phase == "gas"
    gravity = sorted(n for n, p in powers.items() if "g" in p)
    froude_like = [n for n, p in powers.items() if p.get("g") == -0.5 and p.get("velocity") == 1]
    surface = [n for n in FREE_SURFACE_NAMES if n in q]
    free_surface = not gas and bool(gravity or surface)
    why: dict[str, str] = {}

    def say(phenomenon: str, reason: str) -> None:
        why.setdefault(phenomenon, reason)

    if free_surface:
        basis = f"a gravity group ({', '.join(gravity)})" if gravity else f"a {surface[0]} quantity"
        if {"depth", "velocity"} <= q:
            say("open_channel", f"{basis} with depth and velocity: a free-surface flow")
            say(
                "surface_tension",
                "a free surface at model scale: shallow, slow model flows feel surface tension",
            )
        if {"roughness", "slope"} <= q:
            say("rough_wall", "roughness and slope: wall friction must be as rough in the model")
        if froude_like:
            values = prototype_group_values(case)
            high = max(float(values[n].max()) for n in froude_like)
            if high > 1:
                text = f"a prototype Froude number up to {high:.3g} (supercritical flow)"
                say("hydraulic_jump", f"{text}: jumps and their air entrainment")
                say("chute_aeration", f"{text}: self-aerated chute flow")
        if "submergence" in q:
            say("intake_vortex", "a submergence: free-surface vortices at the intake")
        if {"wave_period", "wave_height"} & q:
            say("waves", "wave quantities: wave propagation in the basin")
        if "armour_size" in q:
            say("rubble_mound", "an armour size: flow through the armour layer")
        if "length" in q and {"beam", "draft"} & q:
            say("ship_resistance", "a hull length with beam or draft: towed-hull resistance")
    elif not gas and "diameter" in q and "velocity" in q:
        say("pipe_flow", "a diameter and a velocity without a free surface: full pipe flow")
    if gas or any("c" in p for p in powers.values()):
        say("compressibility", "a gas or a Mach group: the flow must stay incompressible")
    if case.distorted:
        say("distortion", "the model may be distorted (model.distortion above 1)")
    out = []
    for name in PHENOMENA:
        if name in why:
            missing = tuple(n for n in conventional_names(name) if n not in q)
            out.append(Suggestion(name, why[name], missing))
    return tuple(out)


def phenomena_hint(case: Case) -> PhenomenaHint | None:
    """What to tell a user about phenomena the case does not name (None: nothing to say).

    A case that names no phenomenon is told so, with every suggestion (mapped quantities
    marked). A case that names some is told only of suggestions whose quantities it defines
    under their conventional names, so that a deliberate choice is not second-guessed with
    guesses.
    """
    checked = tuple(case.phenomena)
    found = [s for s in suggest_phenomena(case) if s.phenomenon not in case.phenomena]
    if checked:
        found = [s for s in found if not s.missing]
        if not found:
            return None
    return PhenomenaHint(checked, tuple(found))
