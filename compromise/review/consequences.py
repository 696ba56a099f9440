"""Consequences of the unmatched groups, quantified in prototype terms.

Darcy friction in model and prototype and what it does to head loss, slope and depth of an open
channel, or to the pressure drop and head loss per length of a pressurised pipe; the Manning n
a distorted model needs against what smooth materials give; the ITTC-1957 friction line for
towed hulls.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from compromise.casefile.model import Case
from compromise.physics.friction import (
    SMOOTH_MATERIALS_N,
    friction_factor,
    ittc_1957,
    strickler_roughness,
)
from compromise.review.context import condition_environments, evaluate_text
from compromise.solving.design import Evaluation


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


def consequences(case: Case, evaluation: Evaluation) -> tuple[Consequence, ...]:
    """Quantified biases of the design in prototype terms (see the module docstring)."""
    out: list[Consequence] = []
    ratios = _base_ratios(evaluation)
    for cond in evaluation.conditions:
        penv, menv = condition_environments(case, evaluation, cond)
        out += _friction(case, cond.name, penv, menv, ratios)
        out += _manning(case, cond.name, penv, menv, ratios)
        if "ship_resistance" in case.phenomena:
            al = case.phenomena["ship_resistance"]
            re_p = evaluate_text("velocity * length / nu", penv, al)
            re_m = evaluate_text("velocity * length / nu", menv, al)
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
    """Darcy friction in model and prototype, and its bias in prototype terms.

    A pressurised pipe (a ``diameter``): the bias of f is the bias of the pressure drop and of
    the head loss per length at a given velocity. An open channel (a ``depth``, hydraulic
    diameter four times it): the bias of f against what the design's scales need is the bias of
    the head loss and the friction slope, and its cube root that of the depth at a given
    discharge (wide channel, Darcy-Weisbach with q = V h kept).
    """
    if "roughness" not in penv or "velocity" not in penv:
        return []
    pipe = "diameter" in penv
    if pipe:
        dh_p, dh_m = penv["diameter"], menv["diameter"]
        required_ratio = 1.0  # full pipe, undistorted: the Euler number carries f directly
        where = "pressurised pipe"
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
    values: dict[str, float | str | None] = {
        "reynolds_prototype": re_p,
        "reynolds_model": re_m,
        "f_prototype": f_p,
        "f_model": f_m,
        "f_required": f_req,
        "head_loss_bias": bias - 1,
    }
    if pipe:
        values |= {"pressure_drop_bias": bias - 1}
        effect = f"pressure drop and head loss per length {bias - 1:+.1%} at a given velocity"
    else:
        values |= {"slope_bias": bias - 1, "depth_bias": bias ** (1 / 3) - 1}
        effect = (
            f"head loss and friction slope {bias - 1:+.1%}, "
            f"depth at a given discharge {bias ** (1 / 3) - 1:+.1%}"
        )
    msg = (
        f"Darcy f {f_m:.4f} in the model where {f_req:.4f} is needed ({where}; "
        f"Colebrook-White): in prototype terms {effect}"
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
            f"the model needs Manning n = {n_m:.4f} ({form}), smoother than acrylic or glass "
            f"({lo}-{hi}, their normal values in Chow 1959, Table 5-6, from memory): not "
            "buildable"
        )
        return [Consequence("manning", cond, values | {"added_roughness": None}, msg, "infeasible")]
    if n_m <= hi:
        msg = (
            f"the model needs Manning n = {n_m:.4f} ({form}): smooth acrylic or glass "
            f"({lo}-{hi}, their normal values in Chow 1959, Table 5-6, from memory)"
        )
        return [Consequence("manning", cond, values | {"added_roughness": None}, msg)]
    d50 = strickler_roughness(n_m)  # a median grain size, not an equivalent sand roughness
    depth = menv.get("hydraulic_radius", menv.get("depth"))
    if depth is not None and d50 > 0.2 * depth:
        # Strickler's law describes grain roughness well below the flow depth (common practice)
        msg = (
            f"the model needs Manning n = {n_m:.4f} ({form}); as a bed of grains this would be "
            f"d50 = {d50 * 1000:.0f} mm (Strickler), more than a fifth of the model depth "
            f"({depth * 1000:.0f} mm): use roughness elements (vertical rods, strips or "
            "cubes) and calibrate them against prototype stage-discharge data"
        )
        return [Consequence("manning", cond, values | {"added_roughness": d50}, msg, "warning")]
    msg = (
        f"the model needs Manning n = {n_m:.4f} ({form}), rougher than smooth materials: "
        f"glue on grains of median size about d50 = {d50 * 1000:.2f} mm (Strickler, "
        "n = d50^1/6 / 21.1), then calibrate against prototype stage-discharge data"
    )
    return [Consequence("manning", cond, values | {"added_roughness": d50}, msg, "warning")]
