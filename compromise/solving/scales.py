"""The classic table of scale ratios: a design from a length ratio and a velocity rule, the
ratio of every derived kind of quantity that holds under it, and the case's quantities and
groups under that design.

The velocity rule defaults to the case's exact group; the model fluid to the case's first; the
friction rows (Manning n, Chezy C, Darcy f, shear velocity, shear stress) appear only where a
friction law holds (:func:`compromise.physics.scaling.friction_law`).
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass, field
from typing import Any

from compromise.casefile.model import Case
from compromise.errors import CaseError
from compromise.physics.scaling import N_DECISION
from compromise.solving.design import (
    Design,
    Evaluation,
    evaluate_design,
    property_log_ratios,
    scaled_log_ratio,
)
from compromise.units import format_ratio, to_celsius


@dataclass(frozen=True)
class ScaleTable:
    """Scale ratios of a design, with the case's quantities and groups.

    Attributes
    ----------
    ratios : dict
        Ratio of every derived kind that holds for the design [-]; the friction kinds only
        where a friction law holds (``friction_law``).
    labels : dict
        What each ratio is, with the law it follows.
    condition : str
        The condition whose quantities and groups ``to_dict`` shows first.
    velocity_rule : str
        How the velocity ratio was set, in words.
    friction_law : str or None
        ``"open_channel"``, ``"reynolds"`` or None (see
        :func:`compromise.physics.scaling.friction_law`).
    not_holding : tuple of str
        The case's quantities (and groups built on them) whose open-channel law does not hold
        under this velocity rule; their model values mean nothing here.
    notes, warnings : tuple of str
        The defaults used and the laws applied; what looks wrong (a model larger than its
        prototype).
    """

    design: Design
    ratios: dict[str, float]
    evaluation: Evaluation
    labels: dict[str, str] = field(default_factory=dict)
    condition: str = ""
    velocity_rule: str = ""
    friction_law: str | None = None
    not_holding: tuple[str, ...] = ()
    notes: tuple[str, ...] = ()
    warnings: tuple[str, ...] = ()

    def to_dict(self) -> dict[str, Any]:
        """Plain data: the design, the rules applied, ``ratios`` with their ``labels``, the
        ``quantities`` and ``groups`` of ``condition``, and ``conditions`` when the case has
        several."""
        shown = next(
            (c for c in self.evaluation.conditions if c.name == self.condition),
            self.evaluation.conditions[0],
        )
        out: dict[str, Any] = {
            "design": self.design.to_dict(),
            "velocity_rule": self.velocity_rule,
            "friction_law": self.friction_law,
            "condition": shown.name,
            "ratios": dict(self.ratios),
            "labels": dict(self.labels),
            "quantities": {k: v.to_dict() for k, v in shown.quantities.items()},
            "groups": {k: v.to_dict() for k, v in shown.groups.items()},
            "not_holding": list(self.not_holding),
            "notes": list(self.notes),
            "warnings": list(self.warnings),
        }
        if len(self.evaluation.conditions) > 1:
            out["conditions"] = {c.name: c.to_dict() for c in self.evaluation.conditions}
        return out


def _velocity_group(case: Case, velocity: str | float | None) -> tuple[str | None, str]:
    """The group whose exact match sets the velocity ratio, and how it was chosen."""
    from compromise.solving.problem import group_exponents

    if velocity is not None and not isinstance(velocity, str):
        return None, f"velocity ratio given ({format_ratio(float(velocity))})"
    if velocity is None:
        moving = [
            n
            for n, g in case.groups.items()
            if g.power is not None and not g.threshold and abs(group_exponents(case, g)[2]) > 0
        ]
        exact = [n for n in moving if case.groups[n].exact]
        if exact:
            return exact[0], f"group '{exact[0]}' kept exactly (the case's exact group)"
        if "froude" in moving:
            return "froude", "group 'froude' kept exactly (the case keeps no group exactly)"
        raise CaseError(
            "the case keeps no group exactly and has no 'froude' group; say how velocity "
            f"scales: one of its groups ({', '.join(moving) or 'none involves velocity'}) or a "
            "velocity ratio",
            key="--velocity",
        )
    key = velocity.lower()
    if key not in case.groups:
        from compromise.physics.groups import BUILTIN_GROUPS

        if key not in BUILTIN_GROUPS:
            raise CaseError(
                f"expected 'froude', 'reynolds', a group of the case or a ratio, got {velocity!r}",
                key="--velocity",
            )
        raise CaseError(
            f"the case has no group '{key}'; add it under [groups] to scale velocity by it",
            file=case.path,
            key="groups",
        )
    return key, f"group '{key}' kept exactly (as asked)"


def _model_state(
    case: Case, fluid: str | None, temperature: float | None, pressure: float | None
) -> tuple[str, float, float, list[str]]:
    """The model fluid and its state, defaulting to the case's first model fluid at the
    prototype's temperature and pressure brought inside the case's model ranges."""
    notes = []
    if fluid is None:
        fluid = case.model.fluids[0]
        notes.append(f"model fluid {fluid}: the case's first model fluid")
    if temperature is None:
        lo, hi = case.model.temperature
        temperature = min(max(case.temperature, lo), hi)
        where = (
            "the prototype's"
            if temperature == case.temperature
            else "the prototype's brought inside the case's model range"
        )
        notes.append(f"model temperature {to_celsius(temperature):.1f} degC: {where}")
    if pressure is None:
        lo, hi = case.model.pressure
        pressure = min(max(case.pressure, lo), hi)
    return fluid, temperature, pressure, notes


def design_by_rule(
    case: Case,
    ratio: float,
    *,
    vertical: float | None,
    velocity: str | float | None,
    fluid: str,
    temperature: float,
    pressure: float,
) -> tuple[Design, str]:
    """The design with these length ratios and model fluid state whose velocity ratio follows
    a rule: a group of the case kept exactly (default: the case's exact group, else Froude) or
    a given velocity ratio. Returns the design and the rule in words.

    Parameters
    ----------
    ratio, vertical : float
        Horizontal and vertical length ratios [-] (``vertical`` None: undistorted).
    velocity : str, float or None
        Group name, velocity ratio [-] or None (the default rule).
    fluid, temperature, pressure
        Model fluid and its state [K, Pa].
    """
    from compromise.solving.problem import group_exponents

    key, rule = _velocity_group(case, velocity)
    vertical = ratio if vertical is None else vertical
    x, z = math.log(ratio), math.log(vertical)
    if key is not None:
        g = case.groups[key]
        if g.power is None:
            raise CaseError(
                f"group '{key}' is not a power product; give a velocity ratio", key="--velocity"
            )
        s = group_exponents(case, g)
        if abs(s[2]) < 1e-12:
            raise CaseError(f"group '{key}' does not involve velocity", key="--velocity")
        p = property_log_ratios(case, fluid, temperature, pressure)
        b = s[N_DECISION:]
        used = b != 0
        rest = s[0] * x + s[1] * z + (b[used] @ p[used] if used.any() else 0.0)
        v = -rest / s[2]
    else:
        v = math.log(float(velocity))  # type: ignore[arg-type]
    return Design(fluid, temperature, pressure, ratio, vertical, math.exp(v)), rule


def scale_table(
    case: Case,
    ratio: float,
    *,
    vertical: float | None = None,
    velocity: str | float | None = None,
    fluid: str | None = None,
    temperature: float | None = None,
    pressure: float | None = None,
    condition: int | str = 0,
) -> ScaleTable:
    """Scale ratios of every kind of quantity for a given length ratio and velocity rule.

    Parameters
    ----------
    case : Case
    ratio : float
        Horizontal length ratio, model/prototype [-].
    vertical : float, optional
        Vertical length ratio [-]; defaults to ``ratio`` (undistorted).
    velocity : str or float, optional
        The name of a power-product group of the case kept exactly (``"froude"``,
        ``"reynolds"``, ...), or the velocity ratio. Default: the case's (first) exact group
        that involves velocity, else ``"froude"`` when the case has that group.
    fluid, temperature, pressure : optional
        Model fluid and its state [K, Pa]. Default: the case's first model fluid, at the
        prototype's temperature and pressure brought inside the case's model ranges.
    condition : int or str
        The condition whose quantities and groups are shown first (all are evaluated).

    Notes
    -----
    The friction kinds (Manning n, Chezy C, Darcy f, shear velocity, shear stress) are given
    only where a friction law holds (:func:`compromise.physics.scaling.friction_law`): the
    open-channel laws under Froude velocity on the vertical; Darcy f unchanged when Reynolds
    number and relative roughness are kept; none otherwise.

    Examples
    --------
    The Froude ratios at 1:25 (Chanson 1999, ch. 14; Hughes 1993, ch. 2):

    >>> from compromise.casefile.load import case_from_dict
    >>> c = case_from_dict({"prototype": {"fluid": "water", "temperature": "20 degC",
    ...     "quantities": {"depth": "2 m", "velocity": "1 m/s"}},
    ...     "groups": {"froude": {}}, "model": {"horizontal_ratio": "1:25"}})
    >>> t = scale_table(c, 1 / 25)
    >>> round(1 / t.ratios["discharge"])
    3125
    """
    from compromise.physics.scaling import (
        FRICTION_LAWS,
        GEOMETRIC_KINDS,
        friction_law,
        open_channel_law,
    )

    try:
        shown = case.condition(condition).name
    except (KeyError, IndexError):
        names = ", ".join(c.name for c in case.conditions)
        raise CaseError(
            f"expected one of the case's conditions ({names}), got {condition!r}",
            key="--condition",
        ) from None
    fluid, temperature, pressure, notes = _model_state(case, fluid, temperature, pressure)
    design, rule = design_by_rule(
        case,
        ratio,
        vertical=vertical,
        velocity=velocity,
        fluid=fluid,
        temperature=temperature,
        pressure=pressure,
    )
    vertical = design.vertical_ratio
    if case.sediment is not None:  # the material and grain that suit these ratios best
        from compromise.solving.granular import grain_for_ratios

        material, grain, _ = grain_for_ratios(
            case, design.fluid, design.temperature, design.pressure, design.logs
        )
        design = dataclasses.replace(design, material=material, grain_size=grain)
        notes.append(
            f"model material {material}, grain size {grain * 1e3:.4g} mm: the least weighted "
            "mismatch for these ratios and this fluid (limits are checked below, not imposed)"
        )
    p = property_log_ratios(case, fluid, temperature, pressure)
    y = design.logs
    rough = case.quantities.get("roughness")
    law = friction_law(y, p, rough.scaling if rough is not None else None)
    kinds = dict(GEOMETRIC_KINDS)
    if law is not None:
        kinds.update(FRICTION_LAWS[law][0])
        notes.append(f"friction rows: {FRICTION_LAWS[law][1]}")
    else:
        notes.append(
            "friction rows (Manning n, Chezy C, Darcy f, shear velocity, shear stress) left "
            "out: they hold under Froude velocity on the vertical (open-channel laws) or with "
            "Reynolds number and relative roughness kept (f unchanged), and this velocity rule "
            "is neither; the model's friction factor then follows from its own Reynolds number"
        )
    ratios = {name: math.exp(scaled_log_ratio(s, y, p)) for name, (s, _) in kinds.items()}
    ratios["density"] = math.exp(p[0])
    ratios["kinematic_viscosity"] = math.exp(p[2])
    labels = {name: text for name, (_, text) in kinds.items()}
    labels |= {"density": "fluid density", "kinematic_viscosity": "kinematic viscosity"}
    not_holding: list[str] = []
    if law != "open_channel":
        off = [n for n, q in case.quantities.items() if open_channel_law(q.scaling)]
        off += [
            n
            for n, g in case.groups.items()
            if g.power is not None and not g.threshold and set(g.power[1]) & set(off)
        ]
        not_holding = off
        if off:
            notes.append(
                f"{', '.join(off)}: built on an open-channel friction law (uniform flow at the "
                "scaled slope), which does not hold under this velocity rule: the model values "
                "of these mean nothing here"
            )
    sides = (
        (("length", ratio),)
        if vertical == ratio
        else (("horizontal", ratio), ("vertical", vertical))
    )
    warnings = [
        f"the {what} ratio {format_ratio(r)} makes the model larger than the prototype; "
        "ratios are model over prototype (1:25 is a model 25 times smaller)"
        for what, r in sides
        if r > 1 + 1e-12
    ]
    return ScaleTable(
        design,
        ratios,
        evaluate_design(case, design),
        labels,
        shown,
        rule,
        law,
        tuple(not_holding),
        tuple(notes),
        tuple(warnings),
    )
