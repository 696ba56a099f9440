"""Flow regimes of prototype and model: laminar or turbulent (smooth or rough), sub- or
supercritical, incompressible or compressible, capillary or gravity waves.

A regime change between prototype and model is the main risk of a scale model. The wall
roughness Reynolds number ``ks+ = u* ks / nu`` that splits turbulent flow into smooth,
transitional-rough and rough has one definition, :func:`roughness_reynolds`, which is also the
value the ``rough_wall`` threshold checks, so the two never disagree.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from compromise.casefile.model import Case
from compromise.errors import CompromiseError
from compromise.physics.friction import friction_factor
from compromise.physics.thresholds import Threshold, conventional_names, thresholds_for
from compromise.review.context import (
    condition_environments,
    evaluate_text,
    is_reynolds,
    length_of,
    viscous_limits,
)
from compromise.solving.design import Evaluation

#: The threshold whose expression defines ks+ (uniform-flow shear velocity (g R S)^1/2).
ROUGH_WALL: Threshold = next(t for t in thresholds_for("rough_wall") if t.name == "fully_rough")
#: Bands of ks+: hydraulically smooth below the first, fully rough above the second.
KS_PLUS_BANDS: tuple[float, float] = (ROUGH_WALL.failing, ROUGH_WALL.passing)

#: How the shear velocity of ks+ is obtained, by key of :func:`roughness_reynolds`.
SHEAR_VELOCITY_BASIS: dict[str, str] = {
    "uniform_flow": "u* = (g R S)^1/2 of uniform flow at the bed slope (hydraulic radius "
    "taken as the depth): the shear velocity of a model that reproduces the prototype's water "
    "levels",
    "friction_slope": "u* = V (f/8)^1/2 = (g R S_f)^1/2 at the friction slope of the Darcy f "
    "by Colebrook-White (no bed slope in the case)",
}


@dataclass(frozen=True)
class Regime:
    """The flow regime of one group in prototype and model, in one condition.

    ``roughness_reynolds`` holds ks+ in prototype and model where the turbulent regime is split
    by wall roughness, and ``shear_velocity`` names how its u* was obtained
    (:data:`SHEAR_VELOCITY_BASIS`).
    """

    group: str
    kind: str  # "viscous", "froude", "compressibility", "waves"
    condition: str
    prototype: str
    model: str
    roughness_reynolds: tuple[float | None, float | None] = (None, None)
    shear_velocity: str = ""

    @property
    def changed(self) -> bool:
        """Whether the model is in another regime than the prototype."""
        return self.prototype != self.model

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        ks = self.roughness_reynolds
        return {
            "group": self.group,
            "kind": self.kind,
            "condition": self.condition,
            "prototype": self.prototype,
            "model": self.model,
            "changed": self.changed,
            "roughness_reynolds": (
                None
                if ks == (None, None)
                else {
                    "prototype": ks[0],
                    "model": ks[1],
                    "shear_velocity": SHEAR_VELOCITY_BASIS.get(self.shear_velocity, ""),
                }
            ),
        }


def roughness_reynolds(
    case: Case, env: dict[str, float], length: str | None
) -> tuple[float, str] | None:
    r"""Wall roughness Reynolds number ks+ = u* ks / nu in one environment, and its u* basis.

    .. math:: k_s^+ = \frac{u_* k_s}{\nu}, \qquad u_* = (g R S)^{1/2}

    With a bed slope, u* is the shear velocity of uniform flow, computed by the ``rough_wall``
    threshold's own expression (and the case's names for it), so the regime table and the
    threshold show the same number. A model built to reproduce the prototype's water levels has
    this shear velocity once its roughness is adjusted; it scales as ``g^1/2 Y X^-1/2`` in a
    distorted Froude model. Without a slope (pipes), the friction slope of the Darcy factor by
    Colebrook-White takes its place: ``(g R S_f)^1/2 = V (f/8)^1/2``, the same definition.

    Parameters
    ----------
    case : Case
    env : dict
        Quantities and fluid properties of prototype or model [SI].
    length : str or None
        The Reynolds group's length: ``diameter`` (a pipe) or a depth-like length (hydraulic
        diameter four times it).

    Returns
    -------
    (ks_plus, basis) or None
        None where the case gives no roughness.

    References
    ----------
    Chow, V. T. (1959). Open-Channel Hydraulics, ch. 8: shear velocity (g R S)^1/2 of uniform
    flow, from memory. Nikuradse, J. (1933). Stroemungsgesetze in rauhen Rohren,
    VDI-Forschungsheft 361: the bands 5 and 70, as tabulated in White, F. M., Fluid Mechanics,
    ch. 6, from memory. Colebrook, C. F. (1939), J. Inst. Civ. Eng. 11.
    """
    aliases = dict(case.phenomena.get("rough_wall", {}))
    needed = conventional_names("rough_wall")
    if all(aliases.get(n, n) in env for n in needed):
        return evaluate_text(ROUGH_WALL.expression, env, aliases), "uniform_flow"
    if "roughness" not in env or "velocity" not in env or length is None or length not in env:
        return None
    dh = env[length] if length == "diameter" else 4.0 * env[length]
    f = friction_factor(env["velocity"] * dh / env["nu"], env["roughness"] / dh)
    u_star = env["velocity"] * math.sqrt(f / 8)
    return u_star * env["roughness"] / env["nu"], "friction_slope"


def viscous_regime(re: float, lo: float, hi: float, ks_plus: float | None) -> str:
    """Laminar, transitional or turbulent; turbulent split by ks+ at :data:`KS_PLUS_BANDS`."""
    if re < lo:
        return "laminar"
    if re < hi:
        return "transitional"
    if ks_plus is None:
        return "turbulent"
    smooth, rough = KS_PLUS_BANDS
    if ks_plus < smooth:
        return "turbulent smooth"
    if ks_plus < rough:
        return "turbulent transitional-rough"
    return "turbulent rough"


def _on_depth(g: Any, case: Case) -> bool:
    """Whether a Froude-type group's length is a depth (a vertical length)."""
    length = length_of(g, case)
    return length is not None and case.quantities[length].axis == "vertical"


def _wavenumber(period: float, depth: float, g: float, sigma: float, rho: float) -> float:
    """Wavenumber of capillary-gravity waves of a period in a depth (linear dispersion)."""
    from scipy.optimize import brentq

    omega = 2 * math.pi / period

    def f(k: float) -> float:
        return (g * k + sigma / rho * (k * k * k)) * math.tanh(
            k * depth
        ) - omega**2  # inf, not OverflowError

    # the bracket widens for extreme (but accepted) depths and periods; f rises with k
    lo, hi = 1e-9, 1e7
    while f(hi) < 0 and hi < 1e150:
        hi *= 1e8
    while f(lo) > 0 and lo > 1e-150:
        lo *= 1e-8
    if not f(lo) <= 0 <= f(hi):
        raise CompromiseError(
            f"no wavenumber for a wave period of {period:.3g} s in a depth of {depth:.3g} m "
            "(linear dispersion has no root in 1e-150..1e150 1/m)"
        )
    return float(brentq(f, lo, hi, xtol=1e-14, rtol=1e-13))


def regimes(case: Case, evaluation: Evaluation) -> tuple[Regime, ...]:
    """Flow regimes of prototype and model for every group, in every condition.

    Viscous regime from Reynolds-type groups (velocity x length / nu), with the limits of
    :func:`compromise.review.context.viscous_limits` (open channel, pipe, towed hull, external
    flow); turbulent flow is split into smooth / transitional-rough / rough by ks+ (see
    :func:`roughness_reynolds`) at 5 and 70 where the case gives a ``roughness``. Froude groups
    on a depth: subcritical below 1, supercritical above. Mach groups: incompressible below
    0.3. Waves (a ``wave_period``): capillary when the wavenumber exceeds
    ``sqrt(rho g / sigma)``, where surface tension and gravity weigh equally in the dispersion
    relation.
    """
    out: list[Regime] = []
    pipe = "pipe_flow" in case.phenomena
    for cond in evaluation.conditions:
        penv, menv = condition_environments(case, evaluation, cond)
        for name, g in case.groups.items():
            gv = cond.groups.get(name)
            if gv is None:
                continue
            if is_reynolds(g):
                length = length_of(g, case)
                lo, hi = viscous_limits(case, length, pipe)
                ks: list[float | None] = []
                basis = ""
                for env, re in ((penv, gv.prototype), (menv, gv.model)):
                    found = roughness_reynolds(case, env, length) if re >= hi else None
                    ks.append(found[0] if found else None)
                    basis = found[1] if found else basis
                out.append(
                    Regime(
                        name,
                        "viscous",
                        cond.name,
                        viscous_regime(gv.prototype, lo, hi, ks[0]),
                        viscous_regime(gv.model, lo, hi, ks[1]),
                        (ks[0], ks[1]),
                        basis,
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
