"""Scale effects: what the unmatched groups do, judged against published thresholds.

* :func:`check_thresholds` applies the thresholds of the phenomena a case names
  (:mod:`compromise.physics.thresholds`) in every condition: pass, marginal or fail, with margins.
* :func:`regimes` classifies prototype and model flow for every group: laminar, transitional or
  turbulent (smooth or rough); sub- or supercritical; capillary or gravity waves; incompressible
  or compressible. A regime change between prototype and model is the main risk.
* :func:`consequences` quantifies the remaining bias: Darcy friction in model and prototype and
  what it does to head loss, slope and depth in prototype terms; the Manning n a distorted model
  needs against what smooth materials give; the ITTC-1957 friction line for towed hulls.
* :func:`reynolds_tolerance` finds the smallest model Reynolds number that keeps the bias of a
  friction-controlled quantity inside a tolerance.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass, field
from typing import Any

from compromise import expressions as ex
from compromise.casefile.model import Case, Group
from compromise.errors import CaseError
from compromise.physics.friction import (
    SMOOTH_MATERIALS_N,
    friction_factor,
    ittc_1957,
    strickler_roughness,
)
from compromise.physics.thresholds import DESIGN_NAMES, THRESHOLDS, Threshold, thresholds_for
from compromise.solving.design import ConditionResult, Evaluation

VERDICTS = ("pass", "marginal", "fail")


@dataclass(frozen=True)
class ThresholdCheck:
    """One threshold checked in one condition.

    ``margin`` is ``ln(model / passing)`` for a floor and ``ln(passing / model)`` for a ceiling:
    positive on the safe side, negative where the check is not passed.
    """

    threshold: Threshold
    condition: str
    prototype: float
    model: float
    verdict: str
    margin: float

    def to_dict(self) -> dict[str, Any]:
        """Plain data, with the threshold's source."""
        t = self.threshold
        return {
            "phenomenon": t.phenomenon,
            "name": t.name,
            "label": t.label,
            "condition": self.condition,
            "prototype": self.prototype,
            "model": self.model,
            "kind": t.kind,
            "failing": t.failing,
            "passing": t.passing,
            "unit": t.unit,
            "verdict": self.verdict,
            "margin": self.margin,
            "source": t.source,
            "status": t.status,
        }


@dataclass(frozen=True)
class Regime:
    """The flow regime of one group in prototype and model, in one condition."""

    group: str
    kind: str  # "viscous", "froude", "compressibility", "waves"
    condition: str
    prototype: str
    model: str

    @property
    def changed(self) -> bool:
        """Whether the model is in another regime than the prototype."""
        return self.prototype != self.model

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "group": self.group,
            "kind": self.kind,
            "condition": self.condition,
            "prototype": self.prototype,
            "model": self.model,
            "changed": self.changed,
        }


@dataclass(frozen=True)
class Consequence:
    """A quantified consequence of an unmatched group, in prototype terms."""

    kind: str  # "friction", "manning", "ittc"
    condition: str
    values: dict[str, float | str | None]
    message: str
    flag: str = ""  # "", "warning" or "infeasible"

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "kind": self.kind,
            "condition": self.condition,
            **self.values,
            "message": self.message,
            "flag": self.flag,
        }


@dataclass(frozen=True)
class Effects:
    """Everything :func:`assess` found for one design."""

    checks: tuple[ThresholdCheck, ...]
    regimes: tuple[Regime, ...]
    consequences: tuple[Consequence, ...]
    risks: tuple[str, ...] = field(default=())

    def to_dict(self) -> dict[str, Any]:
        """Plain data: risks first (regime changes, failed thresholds)."""
        return {
            "risks": list(self.risks),
            "regimes": [r.to_dict() for r in self.regimes],
            "thresholds": [c.to_dict() for c in self.checks],
            "consequences": [c.to_dict() for c in self.consequences],
        }


# --------------------------------------------------------------------------------------------
# environments


def _envs(case: Case, evaluation: Evaluation, cond: ConditionResult) -> tuple[dict, dict]:
    """Prototype and model environments (quantities and fluid properties) of one condition."""
    from compromise.solving.design import property_environments

    d = evaluation.design
    proto, model = property_environments(case, d.fluid, d.temperature, d.pressure)
    penv = {n: q.prototype for n, q in cond.quantities.items()} | proto | {"distortion": 1.0}
    menv = {n: q.model for n, q in cond.quantities.items()} | model
    menv["distortion"] = d.distortion
    return penv, menv


def _value(text: str, env: dict[str, float], aliases: dict[str, str]) -> float:
    tree = ex.substitute(ex.parse(text), {k: ex.parse(v) for k, v in aliases.items()})
    return float(ex.evaluate(tree, env))


def _verdict(t: Threshold, value: float) -> tuple[str, float]:
    if not math.isfinite(value) or value <= 0:
        return "fail", -math.inf
    if t.kind == "min":
        margin = math.log(value / t.passing)
        verdict = "pass" if value >= t.passing else ("marginal" if value >= t.failing else "fail")
    else:
        margin = math.log(t.passing / value)
        verdict = "pass" if value <= t.passing else ("marginal" if value <= t.failing else "fail")
    return verdict, margin


def check_thresholds(case: Case, evaluation: Evaluation) -> tuple[ThresholdCheck, ...]:
    """Apply the thresholds of the case's phenomena in every condition."""
    out = []
    for cond in evaluation.conditions:
        penv, menv = _envs(case, evaluation, cond)
        for phen, aliases in case.phenomena.items():
            for t in thresholds_for(phen):
                mv = _value(t.expression, menv, aliases)
                pv = _value(t.expression, penv, aliases)
                verdict, margin = _verdict(t, mv)
                out.append(ThresholdCheck(t, cond.name, pv, mv, verdict, margin))
    return tuple(out)


# --------------------------------------------------------------------------------------------
# regimes


def _viscous_regime(re: float, lo: float, hi: float, ks_plus: float | None) -> str:
    if re < lo:
        return "laminar"
    if re < hi:
        return "transitional"
    if ks_plus is None:
        return "turbulent"
    if ks_plus < 5:
        return "turbulent smooth"
    if ks_plus < 70:
        return "turbulent transitional-rough"
    return "turbulent rough"


def _length_of(group: Group, case: Case) -> str | None:
    """The characteristic length quantity of a Reynolds-type group (its only length)."""
    if group.power is None:
        return None
    lengths = [
        n
        for n in group.power[1]
        if n in case.quantities and case.quantities[n].dimension == (0, 1, 0, 0)
    ]
    return lengths[0] if len(lengths) == 1 else None


def _viscous_limits(case: Case, length: str | None, pipe: bool) -> tuple[float, float]:
    """Reynolds numbers that bound the transitional range for a group's length.

    Pipes (on the diameter): 2300 and 4000; a towed hull (``ship_resistance``, on its
    length): 2e6 and 5e6, the range where laminar flow is a risk even with stimulators (common
    practice); a body in an external flow (a length or chord that is not a depth): 5e5, the
    critical Reynolds number of a flat plate (Schlichting, Boundary-Layer Theory, from memory);
    open channels (on the depth): 500 and 2000 (Chow 1959).
    """
    if pipe or length == "diameter":
        return 2300.0, 4000.0
    if length is not None and case.quantities[length].axis != "vertical":
        if "ship_resistance" in case.phenomena:
            return 2.0e6, 5.0e6
        if length in ("length", "chord", "span") or "compressibility" in case.phenomena:
            return 5.0e5, 5.0e5
    return 500.0, 2000.0


def _on_depth(g: Group, case: Case) -> bool:
    """Whether a Froude-type group's length is a depth (a vertical length)."""
    length = _length_of(g, case)
    return length is not None and case.quantities[length].axis == "vertical"


def _is_reynolds(g: Group) -> bool:
    if g.power is None:
        return False
    e = g.power[1]
    return abs(e.get("nu", 0) + 1) < 1e-12 and abs(e.get("velocity", 0) - 1) < 1e-12


def _wavenumber(period: float, depth: float, g: float, sigma: float, rho: float) -> float:
    """Wavenumber of capillary-gravity waves of a period in a depth (linear dispersion)."""
    from scipy.optimize import brentq

    omega = 2 * math.pi / period

    def f(k: float) -> float:
        return (g * k + sigma / rho * k**3) * math.tanh(k * depth) - omega**2

    return float(brentq(f, 1e-9, 1e7, xtol=1e-14, rtol=1e-13))


def regimes(case: Case, evaluation: Evaluation) -> tuple[Regime, ...]:
    """Flow regimes of prototype and model for every group, in every condition.

    Viscous regime from Reynolds-type groups (velocity x length / nu), with the limits of
    :func:`_viscous_limits` (open channel, pipe, towed hull, external flow); turbulent flow is
    split into smooth / transitional / rough by ks+ = u* ks / nu at 5 and 70 (Nikuradse 1933)
    where the case gives a ``roughness``. Froude groups on a depth: subcritical below 1,
    supercritical above. Mach groups: incompressible below 0.3. Waves (a ``wave_period``):
    capillary when the wavenumber exceeds ``sqrt(rho g / sigma)``, where surface tension and
    gravity weigh equally in the dispersion relation.
    """
    out: list[Regime] = []
    pipe = "pipe_flow" in case.phenomena
    for cond in evaluation.conditions:
        penv, menv = _envs(case, evaluation, cond)
        for name, g in case.groups.items():
            gv = cond.groups.get(name)
            if gv is None:
                continue
            if _is_reynolds(g):
                length = _length_of(g, case)
                lo, hi = _viscous_limits(case, length, pipe)
                ks = []
                for env, re in ((penv, gv.prototype), (menv, gv.model)):
                    if "roughness" in env and length is not None and re >= hi:
                        dh = env[length] if length == "diameter" else 4.0 * env[length]
                        f = friction_factor(
                            4.0 * re if length != "diameter" else re, env["roughness"] / dh
                        )
                        ks.append(env["velocity"] * math.sqrt(f / 8) * env["roughness"] / env["nu"])
                    else:
                        ks.append(None)
                out.append(
                    Regime(
                        name,
                        "viscous",
                        cond.name,
                        _viscous_regime(gv.prototype, lo, hi, ks[0]),
                        _viscous_regime(gv.model, lo, hi, ks[1]),
                    )
                )
            elif (name == "froude" or (g.builtin and name == "densimetric_froude")) and (
                _on_depth(g, case)
            ):
                out.append(
                    Regime(
                        name,
                        "froude",
                        cond.name,
                        "supercritical" if gv.prototype > 1 else "subcritical",
                        "supercritical" if gv.model > 1 else "subcritical",
                    )
                )
            elif name == "mach":
                out.append(
                    Regime(
                        name,
                        "compressibility",
                        cond.name,
                        "compressible" if gv.prototype >= 0.3 else "incompressible",
                        "compressible" if gv.model >= 0.3 else "incompressible",
                    )
                )
        if "wave_period" in penv:
            depth = next((penv[n] for n in ("water_depth", "depth") if n in penv), None)
            names = []
            for env in (penv, menv):
                h = env.get("water_depth", env.get("depth", 1e3)) if depth else 1e3
                k = _wavenumber(env["wave_period"], h, env["g"], env["sigma"], env["rho"])
                names.append(
                    "capillary waves"
                    if k > math.sqrt(env["rho"] * env["g"] / env["sigma"])
                    else "gravity waves"
                )
            out.append(Regime("wave_period", "waves", cond.name, names[0], names[1]))
    return tuple(out)


# --------------------------------------------------------------------------------------------
# consequences


def consequences(case: Case, evaluation: Evaluation) -> tuple[Consequence, ...]:
    """Quantified biases of the design in prototype terms (see the module docstring)."""
    out: list[Consequence] = []
    ratios = _base_ratios(evaluation)
    for cond in evaluation.conditions:
        penv, menv = _envs(case, evaluation, cond)
        out += _friction(case, cond.name, penv, menv, ratios)
        out += _manning(case, cond.name, penv, menv, ratios)
        if "ship_resistance" in case.phenomena:
            al = case.phenomena["ship_resistance"]
            re_p = _value("velocity * length / nu", penv, al)
            re_m = _value("velocity * length / nu", menv, al)
            cf_p, cf_m = ittc_1957(re_p), ittc_1957(re_m)
            out.append(
                Consequence(
                    "ittc",
                    cond.name,
                    {
                        "reynolds_model": re_m,
                        "reynolds_ship": re_p,
                        "cf_model": cf_m,
                        "cf_ship": cf_p,
                        "correction": cf_m - cf_p,
                        "correction_fraction": (cf_m - cf_p) / cf_m,
                    },
                    f"ITTC-1957 line: C_F {cf_m:.5f} in the model, {cf_p:.5f} for the ship; "
                    f"subtract {cf_m - cf_p:.5f} ({(cf_m - cf_p) / cf_m:.0%} of the model's C_F) "
                    "from the model's total resistance coefficient to carry it to the ship "
                    "(ITTC 1957; ITTC 7.5-02-02-02)",
                )
            )
    return tuple(out)


def _base_ratios(ev: Evaluation) -> dict[str, float]:
    d = ev.design
    return {"X": d.horizontal_ratio, "Y": d.vertical_ratio, "V": d.velocity_ratio}


def _friction(case: Case, cond: str, penv: dict, menv: dict, r: dict) -> list[Consequence]:
    """Darcy friction in model and prototype, and its bias in prototype terms."""
    if "roughness" not in penv or "velocity" not in penv:
        return []
    if "diameter" in penv:
        dh_p, dh_m = penv["diameter"], menv["diameter"]
        required_ratio = 1.0  # full pipe, undistorted: the Euler number carries f directly
        where = "pipe"
    elif "depth" in penv:
        dh_p, dh_m = 4.0 * penv["depth"], 4.0 * menv["depth"]
        # Darcy f the model must have under the design's scales (wide channel): Y^2/(X V^2)
        required_ratio = r["Y"] ** 2 / (r["X"] * r["V"] ** 2)
        where = "open channel (hydraulic diameter 4 x depth)"
    else:
        return []
    re_p = penv["velocity"] * dh_p / penv["nu"]
    re_m = menv["velocity"] * dh_m / menv["nu"]
    f_p = friction_factor(re_p, penv["roughness"] / dh_p)
    f_m = friction_factor(re_m, menv["roughness"] / dh_m)
    f_req = f_p * required_ratio
    bias = f_m / f_req
    values = {
        "reynolds_prototype": re_p,
        "reynolds_model": re_m,
        "f_prototype": f_p,
        "f_model": f_m,
        "f_required": f_req,
        "head_loss_bias": bias - 1,
        "slope_bias": bias - 1,
        "depth_bias": bias ** (1 / 3) - 1,
    }
    msg = (
        f"Darcy f {f_m:.4f} in the model where {f_req:.4f} is needed ({where}; "
        f"Colebrook-White): in prototype terms head loss and slope {bias - 1:+.1%}, "
        f"depth at a given discharge {bias ** (1 / 3) - 1:+.1%}"
    )
    flag = "warning" if abs(bias - 1) > 0.05 else ""
    return [Consequence("friction", cond, values, msg, flag)]


def _manning(case: Case, cond: str, penv: dict, menv: dict, r: dict) -> list[Consequence]:
    """Model Manning n a design needs, against what smooth materials give (Chow 1959)."""
    if "manning_n" not in penv:
        return []
    n_p = penv["manning_n"]
    if "hydraulic_radius" in penv:
        rr = menv["hydraulic_radius"] / penv["hydraulic_radius"]
        form = "hydraulic-radius form"
    else:
        rr = r["Y"]
        form = "wide-channel form"
    n_ratio = rr ** (2 / 3) * math.sqrt(r["Y"] / r["X"]) / r["V"]
    n_m = n_p * n_ratio
    lo, hi = SMOOTH_MATERIALS_N
    values: dict[str, float | str | None] = {
        "n_prototype": n_p,
        "n_model": n_m,
        "n_ratio": n_ratio,
        "form": form,
    }
    if n_m < lo:
        msg = (
            f"the model needs Manning n = {n_m:.4f} ({form}), smoother than glass or "
            f"acrylic ({lo}-{hi}; Chow 1959, Table 5-6): not buildable"
        )
        return [Consequence("manning", cond, values | {"added_roughness": None}, msg, "infeasible")]
    if n_m <= hi:
        msg = (
            f"the model needs Manning n = {n_m:.4f} ({form}): smooth glass or acrylic "
            f"({lo}-{hi}; Chow 1959, Table 5-6)"
        )
        return [Consequence("manning", cond, values | {"added_roughness": None}, msg)]
    ks = strickler_roughness(n_m)
    depth = menv.get("hydraulic_radius", menv.get("depth"))
    if depth is not None and ks > 0.2 * depth:
        # Strickler's law describes grain roughness well below the flow depth (common practice)
        msg = (
            f"the model needs Manning n = {n_m:.4f} ({form}); as sand roughness this would be "
            f"ks = {ks * 1000:.0f} mm, more than a fifth of the model depth "
            f"({depth * 1000:.0f} mm): use roughness elements (vertical rods, strips or "
            "cubes) and calibrate them against prototype stage-discharge data"
        )
        return [Consequence("manning", cond, values | {"added_roughness": ks}, msg, "warning")]
    msg = (
        f"the model needs Manning n = {n_m:.4f} ({form}), rougher than smooth materials: "
        f"add roughness of about ks = {ks * 1000:.2f} mm equivalent sand (Strickler), "
        "then calibrate against prototype stage-discharge data"
    )
    return [Consequence("manning", cond, values | {"added_roughness": ks}, msg, "warning")]


def assess(case: Case, evaluation: Evaluation) -> Effects:
    """Thresholds, regimes and consequences of a design; risks listed first."""
    checks = check_thresholds(case, evaluation)
    regs = regimes(case, evaluation)
    cons = consequences(case, evaluation)
    risks = [
        f"regime change in '{r.condition}': {r.group} is {r.prototype} in the prototype "
        f"but {r.model} in the model"
        for r in regs
        if r.changed
    ]
    risks += [
        f"{c.threshold.label} fails in '{c.condition}': model {c.model:.4g} "
        f"{'<' if c.threshold.kind == 'min' else '>'} {c.threshold.failing:.4g} "
        f"({c.threshold.source}; {c.threshold.status})"
        for c in checks
        if c.verdict == "fail"
    ]
    risks += [f"{c.message} [{c.condition}]" for c in cons if c.flag == "infeasible"]
    return Effects(checks, regs, cons, tuple(risks))


# --------------------------------------------------------------------------------------------
# thresholds as constraints


def with_thresholds(case: Case) -> Case:
    """A copy of the case whose phenomena's thresholds are floors or ceilings on model values.

    Each threshold becomes a group of weight 0 named ``<phenomenon>.<name>`` with ``min`` (or
    ``max``) at its passing value, so the solver treats it like any group bound. Thresholds on
    the design itself (the distortion) are left to the case's ``[model]`` bounds.
    """
    groups = dict(case.groups)
    for phen, aliases in case.phenomena.items():
        for t in thresholds_for(phen):
            if set(ex.names(ex.parse(t.expression))) & set(DESIGN_NAMES):
                continue  # a bound on the design itself: the case's [model] bounds hold it
            tree = ex.substitute(
                ex.parse(t.expression), {k: ex.parse(v) for k, v in aliases.items()}
            )
            name = f"{phen}.{t.name}"
            groups[name] = Group(
                name=name,
                expression=tree,
                text=ex.to_text(tree),
                weight=0.0,
                min=t.passing if t.kind == "min" else None,
                max=t.passing if t.kind == "max" else None,
                power=ex.power_product(tree),
                description=t.label,
                threshold=True,
            )
    return dataclasses.replace(case, groups=groups)


# --------------------------------------------------------------------------------------------
# how much Reynolds mismatch is acceptable

TOLERANCE_QUANTITIES = {
    "head_loss": 1.0,
    "slope": 1.0,
    "pressure_drop": 1.0,
    "friction": 1.0,
    "depth": 1 / 3,
}


@dataclass(frozen=True)
class Tolerance:
    """The smallest model Reynolds number that keeps a friction bias inside a tolerance."""

    quantity: str
    within: float
    condition: str
    reynolds_prototype: float
    reynolds_min: float
    relative_roughness: float
    basis: str

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return dataclasses.asdict(self)


def reynolds_tolerance(case: Case, quantity: str, within: float, condition: int = 0) -> Tolerance:
    """Smallest model Reynolds number for which ``quantity``'s bias stays within ``within``.

    The bias comes from the Darcy friction factor (Colebrook-White, laminar 64/Re) at the same
    relative roughness: ``f(Re_m) / f(Re_p) - 1`` for head loss, slope and pressure drop, its
    cube root for the depth at a given discharge (wide channel). ``f`` falls as Re rises, so
    the answer is the root of ``bias(Re) = within``, found by bracketing.
    """
    from scipy.optimize import brentq

    if quantity not in TOLERANCE_QUANTITIES:
        raise CaseError(
            f"expected one of {', '.join(TOLERANCE_QUANTITIES)}, got {quantity!r}", key="--quantity"
        )
    if not 0 < within < 1:
        raise CaseError(
            f"expected a tolerance between 0 and 100 %, got {within:.4g}", key="--within"
        )
    vals = case.values(condition)
    from compromise.solving.problem import prototype_environment

    env = prototype_environment(case, condition)
    if "roughness" not in vals or "velocity" not in vals:
        raise CaseError(
            "needs prototype quantities 'velocity' and 'roughness' (and 'depth' or 'diameter')",
            file=case.path,
            key="prototype.quantities",
        )
    if "diameter" in vals:
        dh = vals["diameter"]
    elif "depth" in vals:
        dh = 4.0 * vals["depth"]
    else:
        raise CaseError(
            "needs a prototype 'depth' or 'diameter'", file=case.path, key="prototype.quantities"
        )
    rel = vals["roughness"] / dh
    re_p = vals["velocity"] * dh / env["nu"]
    power = TOLERANCE_QUANTITIES[quantity]
    f_p = friction_factor(re_p, rel)

    def bias(log_re: float) -> float:
        return (friction_factor(math.exp(log_re), rel) / f_p) ** power - 1.0 - within

    lo = math.log(max(4000.0, re_p * 1e-6))
    if bias(math.log(re_p)) > 0:  # pragma: no cover - f is monotone, bias(Re_p) = -within
        raise CaseError("no Reynolds number keeps the bias inside the tolerance", key="--within")
    clamped = bias(lo) <= 0
    if clamped:
        re_min = math.exp(lo)
    else:
        re_min = math.exp(brentq(bias, lo, math.log(re_p), xtol=1e-12))
    basis = (
        f"Darcy friction factor by Colebrook-White at relative roughness {rel:.3g} "
        f"(hydraulic diameter {'D' if 'diameter' in vals else '4 x depth'}); "
        f"{quantity} bias = (f_model / f_prototype)^{power:.3g} - 1 <= {within:.1%}"
    )
    if clamped:
        basis += (
            "; the bias stays inside the tolerance down to the lowest Reynolds number "
            "considered (turbulent flow, 4000 on the hydraulic diameter)"
        )
    return Tolerance(quantity, within, case.conditions[condition].name, re_p, re_min, rel, basis)


def apply_tolerance(case: Case, tol: Tolerance) -> tuple[Case, float]:
    """The case with the tolerance's Reynolds number as a floor on its Reynolds group.

    The tolerance is computed on the hydraulic diameter; the floor is converted to the case's
    Reynolds group (on depth: divided by 4). A case without a Reynolds group gets one of weight
    zero.
    """
    from compromise.physics.groups import BUILTIN_GROUPS

    length = "diameter" if "diameter" in case.quantities else "depth"
    factor = 1.0 if length == "diameter" else 0.25
    g = case.groups.get("reynolds")
    if g is not None and g.power is not None:
        gl = _length_of(g, case)
        factor = 1.0 if gl == "diameter" else 0.25
        floor = tol.reynolds_min * factor
        new = dataclasses.replace(g, min=max(g.min or 0.0, floor))
    else:
        tree = ex.substitute(
            ex.parse(BUILTIN_GROUPS["reynolds"].expression), {"L": ex.parse(length)}
        )
        floor = tol.reynolds_min * factor
        new = Group(
            name="reynolds",
            expression=tree,
            text=ex.to_text(tree),
            weight=0.0,
            min=floor,
            builtin=True,
            power=ex.power_product(tree),
        )
    return dataclasses.replace(case, groups={**case.groups, "reynolds": new}), floor


__all__ = [
    "THRESHOLDS",
    "VERDICTS",
    "Consequence",
    "Effects",
    "Regime",
    "ThresholdCheck",
    "Tolerance",
    "apply_tolerance",
    "assess",
    "check_thresholds",
    "consequences",
    "regimes",
    "reynolds_tolerance",
    "with_thresholds",
]
