"""A model design (fluid, temperature, base ratios) and everything it implies for a case.

:func:`evaluate_design` gives, per condition, the model value of every prototype quantity, every
group's prototype and model values and mismatch, and every laboratory limit's margin.
:func:`compromise.solving.scales.scale_table` builds a design from a length ratio and a velocity
rule and adds the ratios of every derived kind of quantity (the classic table of scale ratios).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from compromise import expressions as ex
from compromise.casefile.model import Case
from compromise.physics.scaling import N_DECISION
from compromise.solving.problem import PROPERTY_NAMES, property_environment
from compromise.units import format_ratio, to_celsius

BINDING_TOL = 1e-6  # [-] fractional margin below which a limit counts as binding


@dataclass(frozen=True)
class Design:
    """A model design. Ratios are model over prototype.

    Attributes
    ----------
    fluid : str
        Model fluid (catalogue name).
    temperature : float
        Model fluid temperature [K].
    pressure : float
        Model fluid pressure [Pa].
    horizontal_ratio, vertical_ratio, velocity_ratio : float
        Base ratios [-].
    material : str or None
        Model granular material (catalogue name), in a case with ``[sediment]``.
    grain_size : float or None
        Model grain size [m], in a case with ``[sediment]``.
    """

    fluid: str
    temperature: float
    pressure: float
    horizontal_ratio: float
    vertical_ratio: float
    velocity_ratio: float
    material: str | None = None
    grain_size: float | None = None

    @property
    def distortion(self) -> float:
        """Vertical ratio over horizontal ratio [-] (1 when undistorted)."""
        return self.vertical_ratio / self.horizontal_ratio

    @property
    def logs(self) -> np.ndarray:
        """Decision log-ratios ``(x, z, v)``."""
        return np.log([self.horizontal_ratio, self.vertical_ratio, self.velocity_ratio])

    def to_dict(self) -> dict[str, Any]:
        """Plain data: ratios, temperature in degC, pressure in Pa (and the model material
        and grain size [m] in a case with ``[sediment]``)."""
        out: dict[str, Any] = {
            "fluid": self.fluid,
            "temperature": to_celsius(self.temperature),
            "pressure": self.pressure,
            "horizontal_ratio": self.horizontal_ratio,
            "vertical_ratio": self.vertical_ratio,
            "velocity_ratio": self.velocity_ratio,
            "distortion": self.distortion,
        }
        if self.material is not None:
            out["material"] = self.material
            out["grain_size"] = self.grain_size
        return out

    def label(self) -> str:
        """Short text such as ``water 20.0 degC, 1:50 / 1:10``."""
        ratios = format_ratio(self.horizontal_ratio)
        if abs(self.distortion - 1) > 1e-9:
            ratios += f" / {format_ratio(self.vertical_ratio)}"
        text = f"{self.fluid} {to_celsius(self.temperature):.1f} degC, {ratios}"
        if self.material is not None and self.grain_size is not None:
            text += f", {self.material} {self.grain_size * 1e3:.3g} mm"
        return text


@dataclass(frozen=True)
class GroupValue:
    """A group's value in prototype and model for one condition.

    ``by_construction`` marks a group whose model/prototype ratio is 1 for every design: the
    scale laws of its quantities cancel (an Euler number whose pressure drop is itself scaled
    as ``rho V^2``, a relative roughness whose two lengths share an axis). Its zero mismatch is
    not a result of the design, and the weight on it does nothing.
    """

    prototype: float
    model: float
    mismatch: float  # ln(model / prototype)
    weight: float
    exact: bool = False
    by_construction: bool = False

    def to_dict(self) -> dict[str, Any]:
        """Plain data, with the mismatch also as a factor."""
        return {
            "prototype": self.prototype,
            "model": self.model,
            "mismatch": self.mismatch,
            "factor": math.exp(self.mismatch),
            "weight": self.weight,
            "by_construction": self.by_construction,
        }


@dataclass(frozen=True)
class QuantityValue:
    """A quantity in prototype and model for one condition [SI]."""

    prototype: float
    model: float
    ratio: float
    unit: str

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "prototype": self.prototype,
            "model": self.model,
            "ratio": self.ratio,
            "unit": self.unit,
        }


@dataclass(frozen=True)
class LimitValue:
    """A laboratory limit checked in one condition."""

    quantity: str
    kind: str
    bound: float
    model: float
    margin: float  # fractional slack; negative when violated

    @property
    def binding(self) -> bool:
        """Whether the limit holds with (almost) no slack."""
        return abs(self.margin) <= BINDING_TOL

    @property
    def violated(self) -> bool:
        """Whether the model value is on the wrong side of the bound."""
        return self.margin < -BINDING_TOL

    def to_dict(self) -> dict[str, Any]:
        """Plain data, as in the output contract."""
        return {
            "model": self.model,
            "bound": self.bound,
            "kind": self.kind,
            "margin": self.margin,
            "binding": self.binding,
        }


@dataclass(frozen=True)
class ConditionResult:
    """Groups, quantities and limits of a design in one prototype condition."""

    name: str
    weight: float
    groups: dict[str, GroupValue]
    quantities: dict[str, QuantityValue]
    limits: dict[str, LimitValue]

    @property
    def objective(self) -> float:
        """This condition's weighted sum of squared log-mismatches (exact groups excluded)."""
        return sum(g.weight * g.mismatch**2 for g in self.groups.values() if not g.exact)

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "weight": self.weight,
            "groups": {k: v.to_dict() for k, v in self.groups.items()},
            "quantities": {k: v.to_dict() for k, v in self.quantities.items()},
            "limits": {k: v.to_dict() for k, v in self.limits.items()},
        }


@dataclass(frozen=True)
class Evaluation:
    """A design evaluated in every condition of a case."""

    design: Design
    conditions: tuple[ConditionResult, ...]
    property_ratios: dict[str, float] = field(default_factory=dict)

    @property
    def objective(self) -> float:
        """Sum over conditions of condition weight x weighted squared log-mismatches."""
        return sum(c.weight * c.objective for c in self.conditions)

    def worst_limits(self) -> dict[str, tuple[str | None, LimitValue]]:
        """For each limit, the condition with the smallest margin and its value there.

        The condition is None where every condition gives the same margin (a limit on a
        quantity that no condition changes).
        """
        out: dict[str, tuple[str | None, LimitValue]] = {}
        margins: dict[str, list[float]] = {}
        for c in self.conditions:
            for k, v in c.limits.items():
                margins.setdefault(k, []).append(v.margin)
                if k not in out or v.margin < out[k][1].margin:
                    out[k] = (c.name, v)
        for k, ms in margins.items():
            if len(ms) > 1 and max(ms) - min(ms) <= 1e-12 * max(1.0, abs(min(ms))):
                out[k] = (None, out[k][1])
        return out

    @property
    def feasible(self) -> bool:
        """Whether every limit holds in every condition."""
        return not any(v.violated for _, v in self.worst_limits().values())


def property_environments(
    case: Case, fluid: str, temperature: float, pressure: float
) -> tuple[dict[str, float], dict[str, float]]:
    """Prototype and model fluid properties (``rho, mu, nu, sigma, c, g``) from the source
    models (not the solver's splines)."""
    from compromise.physics.fluids import get_fluid

    proto = property_environment(get_fluid(case.fluid).properties(case.temperature, case.pressure))
    model = property_environment(get_fluid(fluid).properties(temperature, pressure))
    return proto, model


def _log_ratios(model: dict[str, float], proto: dict[str, float]) -> np.ndarray:
    return np.array(
        [
            math.log(model[n] / proto[n]) if model[n] > 0 and proto[n] > 0 else float("nan")
            for n in PROPERTY_NAMES
        ]
    )


def property_log_ratios(case: Case, fluid: str, temperature: float, pressure: float) -> np.ndarray:
    """``ln(model / prototype)`` of rho, mu, nu, sigma, c, g for a model fluid state.

    Uses the fluids' source models (not the solver's splines).
    """
    proto, model = property_environments(case, fluid, temperature, pressure)
    return _log_ratios(model, proto)


def evaluate_design(case: Case, design: Design) -> Evaluation:
    """Evaluate a design in every condition of a case.

    Model quantity values are ``prototype x ratio``; group model values are computed from the
    model quantities and the model fluid's properties (so non-power-product groups are exact
    too); limit margins are fractional slacks, negative where a limit is violated.
    """
    y = design.logs
    proto_props, model_props = property_environments(
        case, design.fluid, design.temperature, design.pressure
    )
    p = _log_ratios(model_props, proto_props)
    constructed = matched_by_construction(case)
    granular = granular_model_values(case, design)
    results = []
    for i, cond in enumerate(case.conditions):
        vals = case.values(i)
        quantities: dict[str, QuantityValue] = {}
        for name, q in case.quantities.items():
            lr = scaled_log_ratio(q.scaling, y, p)
            if name in granular:
                lr = math.log(granular[name] / vals[name])
            quantities[name] = QuantityValue(
                vals[name], vals[name] * math.exp(lr), math.exp(lr), q.unit
            )
        penv = {**vals, **proto_props}
        menv = {n: v.model for n, v in quantities.items()}
        menv.update(model_props)
        groups: dict[str, GroupValue] = {}
        model_group: dict[str, float] = {}
        for name, g in case.groups.items():
            pv = float(ex.evaluate(g.expression, penv))
            mv = float(ex.evaluate(g.expression, menv))
            model_group[name] = mv
            if g.threshold:
                continue
            mm = math.log(mv / pv) if pv > 0 and mv > 0 else float("nan")
            if name in constructed:
                mm = 0.0  # exactly: the laws cancel; rounding of the model values is not a result
            groups[name] = GroupValue(pv, mv, mm, g.weight, g.exact, name in constructed)
        limits: dict[str, LimitValue] = {}
        for lim in case.limits:
            mv = quantities[lim.quantity].model
            margin = (
                (lim.bound - mv) / lim.bound if lim.kind == "max" else (mv - lim.bound) / lim.bound
            )
            limits[f"{lim.quantity}.{lim.kind}"] = LimitValue(
                lim.quantity, lim.kind, lim.bound, mv, margin
            )
        for name, g in case.groups.items():
            gv = model_group[name]
            if g.min is not None:
                limits[f"{name}.min"] = LimitValue(name, "min", g.min, gv, (gv - g.min) / g.min)
            if g.max is not None:
                limits[f"{name}.max"] = LimitValue(name, "max", g.max, gv, (g.max - gv) / g.max)
        results.append(ConditionResult(cond.name, cond.weight, groups, quantities, limits))
    ratios = {n: math.exp(v) for n, v in zip(PROPERTY_NAMES, p, strict=True) if math.isfinite(v)}
    return Evaluation(design, tuple(results), ratios)


def evaluator(case: Case) -> Callable[[Design], Evaluation]:
    """:func:`evaluate_design` for one case, remembering each design's evaluation: one answer
    asks for the optimum's several times (the optimum itself, its fluid's and its material's
    alternatives, the reference every alternative is compared with). The evaluation is a pure
    function of the design's fields, so a hit is what a fresh evaluation returns."""
    memo: dict[Design, Evaluation] = {}

    def evaluate(design: Design) -> Evaluation:
        found = memo.get(design)
        if found is None:
            found = memo[design] = evaluate_design(case, design)
        return found

    return evaluate


def granular_model_values(case: Case, design: Design) -> dict[str, float]:
    """Model values of the quantities the granular material fixes [SI]: the grain size (the
    design's) and the grain density (the model material's); empty without ``[sediment]``."""
    sed = case.sediment
    if sed is None:
        return {}
    if design.material is None or design.grain_size is None:
        from compromise.errors import CaseError

        raise CaseError(
            "a design of a case with [sediment] needs its model material and grain size; "
            "this command does not yet take them ('compromise solve' chooses them)",
            file=case.path,
            key="sediment",
        )
    from compromise.physics.materials import get_material

    rho_s = get_material(design.material).density
    out = {sed.grain: design.grain_size, sed.density: rho_s}
    if "settling_velocity" in case.quantities:
        # the model grain's settling velocity: the prototype's value times the ratio of the
        # Ferguson & Church (2004) formula (C1 = 18, C2 = 1) at the model and prototype grains
        from compromise.physics.sediment import settling_velocity_ferguson_church as fc

        proto, model = property_environments(
            case, design.fluid, design.temperature, design.pressure
        )
        vals = case.values(0)
        ratio = fc(design.grain_size, rho_s / model["rho"] - 1.0, model["nu"]) / fc(
            vals[sed.grain], vals[sed.density] / proto["rho"] - 1.0, proto["nu"]
        )
        out["settling_velocity"] = vals["settling_velocity"] * float(ratio)
    return out


def matched_by_construction(case: Case) -> frozenset[str]:
    """Names of the power-product groups whose model/prototype ratio is 1 for every design.

    The group's exponent vector over the base ratios vanishes: the scale laws of its
    quantities and properties cancel, so no length ratio, velocity ratio or fluid can change
    it (for example ``pressure_drop / (rho velocity^2)`` with the pressure drop scaled as
    ``rho V^2``).

    Examples
    --------
    >>> from compromise.casefile.load import case_from_dict
    >>> c = case_from_dict({"prototype": {"fluid": "water", "temperature": "20 degC",
    ...     "quantities": {"diameter": "0.1 m", "velocity": "1 m/s", "pressure_drop": "1 kPa"}},
    ...     "groups": {"reynolds": {"length": "diameter"}, "euler": {}},
    ...     "model": {"horizontal_ratio": "1:2"}})
    >>> sorted(matched_by_construction(c))
    ['euler']
    """
    from compromise.solving.problem import group_exponents

    out = set()
    for name, g in case.groups.items():
        if g.power is None or g.threshold:
            continue
        if np.all(np.abs(group_exponents(case, g)) < 1e-12):
            out.add(name)
    return frozenset(out)


def scaled_log_ratio(scaling: np.ndarray, y: np.ndarray, p: np.ndarray) -> float:
    """ln(ratio) of a quantity's exponent vector for decision log-ratios ``y`` and property
    log-ratios ``p``; properties the law does not use are skipped (they may be NaN, as the
    surface tension of a gas)."""
    b = scaling[N_DECISION:]
    used = b != 0
    return float(scaling[:N_DECISION] @ y + (b[used] @ p[used] if used.any() else 0.0))
