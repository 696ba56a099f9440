"""A towed hull's measured resistance carried to the ship by the ITTC-1978 method.

Only the wave-making part of a hull's resistance follows Froude similitude; the frictional
part follows the Reynolds number, which a towing tank cannot keep. The ITTC-1978 performance
prediction method therefore carries the resistance coefficient, not the force, in steps; each
step is a column of the converted table:

1. ``C_TM = R_TM / (rho_M V_M^2 S_M / 2)``, the model's total resistance coefficient (fresh
   water at the tank's temperature, from the fluid catalogue);
2. ``C_FM``, the ITTC-1957 line at the model's Reynolds number ``V_M L_M / nu_M``;
3. ``k``, the form factor's, from the case or a Prohaska fit of the low-speed rows;
4. ``C_R = C_TM - (1 + k) C_FM``, the residuary (wave-making) part, the same for the ship at
   the same Froude number;
5. ``C_FS``, the ITTC-1957 line at the ship's Reynolds number (seawater at its temperature);
6. ``dC_F``, the roughness allowance, ``C_A`` the correlation allowance and ``C_AAS`` the air
   resistance (optional);
7. ``C_TS = (1 + k) C_FS + dC_F + C_A + C_R + C_AAS`` and ``R_TS = C_TS rho_S V_S^2 S_S / 2``.

References
----------
ITTC (1978, revised 1984, 1987, 1999). Recommended Procedure 7.5-02-03-01.4, 1978 ITTC
Performance Prediction Method, section 2 (analysis of the model test results; total
resistance of the ship), from memory. ITTC-1957 line: ITTC Recommended Procedure
7.5-02-02-02. Prohaska (1966), Bowden & Davison (1974), Townsin (1985): see
:mod:`compromise.physics.ship`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from compromise.casefile.model import Case, ResistanceInputs
from compromise.errors import CaseError
from compromise.physics.friction import ittc_1957
from compromise.physics.ship import (
    air_resistance_coefficient,
    prohaska_form_factor,
    roughness_allowance,
)

G = 9.80665  # [m/s^2] standard gravity
#: Below this model Reynolds number the ITTC-1957 line is not used (the flow along a hull is
#: not turbulent there; towing tanks work above about 2e6; common practice).
MIN_REYNOLDS = 1e5
#: Header names read as a towed hull's total resistance (lower case, spaces as ``_``).
RESISTANCE_NAMES = ("resistance", "total_resistance", "drag", "r_t", "rt", "r_tm", "rtm")
#: The steps written beside the resistance column, in order.
STEP_NAMES = ("Fn", "Re_M", "C_TM", "C_FM", "k", "C_R", "Re_S", "C_FS", "dC_F", "C_A")


@dataclass(frozen=True)
class Extrapolation:
    """The ITTC-1978 steps for every row of a table.

    Attributes
    ----------
    column, velocity_column : str
        The headers of the model's resistance and speed.
    inputs : ResistanceInputs
    form_factor : float
        k of ``1 + k``.
    form_factor_source : str
        ``case`` or ``prohaska``.
    prohaska : dict or None
        Rows used, slope and rms residual of the fit.
    lengths, surfaces : tuple of float
        (model, ship) waterline length [m] and wetted surface [m^2].
    steps : dict
        Each step's values, by name (``Fn``, ``C_TM``, ..., ``C_TS``, ``R_TS`` in N).
    """

    column: str
    velocity_column: str
    inputs: ResistanceInputs
    form_factor: float
    form_factor_source: str
    prohaska: dict[str, Any] | None
    lengths: tuple[float, float]
    surfaces: tuple[float, float]
    steps: dict[str, np.ndarray] = field(repr=False, compare=False)

    def roughness_text(self) -> str:
        m = self.inputs.roughness_allowance
        if isinstance(m, str):
            return f"{m}, k_s = {self.inputs.hull_roughness * 1e6:g} um"
        return f"fixed, {m:g}"

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "method": "ITTC-1978",
            "column": self.column,
            "velocity_column": self.velocity_column,
            "form_factor_k": self.form_factor,
            "form_factor_source": self.form_factor_source,
            "prohaska": self.prohaska,
            "model_length": self.lengths[0],
            "ship_length": self.lengths[1],
            "model_wetted_surface": self.surfaces[0],
            "ship_wetted_surface": self.surfaces[1],
            "roughness_allowance": self.roughness_text(),
            "correlation_allowance": self.inputs.correlation_allowance,
            "air_area": self.inputs.air_area,
            "steps": {k: [_plain(v) for v in vs] for k, vs in self.steps.items()},
        }


def _plain(v: float) -> float | None:
    return None if math.isnan(v) else float(v)


def is_resistance(name: str) -> bool:
    """Whether a column's name reads as a towed hull's total resistance."""
    return name.strip().lower().replace(" ", "_").replace("-", "_") in RESISTANCE_NAMES


def step_names(inputs: ResistanceInputs) -> tuple[str, ...]:
    """The step columns written beside the resistance (``C_AAS`` only with an air area)."""
    air = ("C_AAS",) if inputs.air_area is not None else ()
    return (*STEP_NAMES, *air, "C_TS")


def extrapolate(
    case: Case,
    design: Any,
    chain: Any,
    speed: np.ndarray,
    resistance: np.ndarray,
    *,
    column: str,
    velocity_column: str,
) -> Extrapolation:
    """Carry model resistances [N] at model speeds [m/s] to the ship by the ITTC-1978 method.

    Parameters
    ----------
    case : Case
        A case with a ``[resistance]`` table and a quantity ``length`` (the ship's waterline
        length).
    design : Design
        An undistorted design that keeps the Froude number.
    chain : Chain
        Both fluids' properties at their temperatures (:func:`compromise.review.convert.chain_of`).
    speed, resistance : array
        The model's speed [m/s] and total resistance [N] of each row (NaN: a blank cell).
    """
    key = f"column {column!r}"
    inputs = case.resistance
    if inputs is None:
        raise CaseError(
            "the ITTC-1978 extrapolation needs the ship's wetted surface; add a [resistance] "
            "table with wetted_surface = '... m^2' to the case (see docs/case-format.md)",
            key=key,
        )
    if "length" not in case.quantities or case.quantities["length"].dimension != (0, 1, 0, 0):
        raise CaseError(
            "the ITTC-1978 extrapolation needs the ship's waterline length as the case "
            "quantity 'length'",
            key=key,
        )
    if abs(design.distortion - 1.0) > 1e-12:
        raise CaseError("a towed hull's model is undistorted; this design is not", key=key)
    x, v = design.horizontal_ratio, design.velocity_ratio
    if abs(v * v / x - 1.0) > 1e-9:
        raise CaseError(
            "the ITTC-1978 method carries the residuary resistance at equal Froude number; "
            f"this design's velocity ratio {v:.6g} is not the square root of its length ratio",
            key=key,
        )
    length_s = case.quantities["length"].value
    length_m = length_s * x
    surface_s = inputs.wetted_surface
    surface_m = surface_s * x * x
    rho_m, nu_m = chain.model["rho"], chain.model["nu"]
    rho_s, nu_s = chain.prototype["rho"], chain.prototype["nu"]

    vm = np.asarray(speed, dtype=float)
    rm = np.asarray(resistance, dtype=float)
    if np.any(vm[~np.isnan(vm)] <= 0):
        raise CaseError("the model speed must be positive in every row", key=velocity_column)
    vs = vm / v
    fn = vm / np.sqrt(G * length_m)
    re_m = vm * length_m / nu_m
    re_s = vs * length_s / nu_s
    low_re = np.flatnonzero(re_m < MIN_REYNOLDS)
    if low_re.size:
        raise CaseError(
            f"row {int(low_re[0]) + 1}: the model's Reynolds number {re_m[low_re[0]]:.3g} is "
            f"below {MIN_REYNOLDS:.0e}, where the ITTC-1957 line (a turbulent-flow line) does not "
            "apply",
            key=key,
        )
    ittc = np.vectorize(lambda r: math.nan if math.isnan(r) else ittc_1957(r), otypes=[float])
    c_fm = ittc(re_m)
    c_fs = ittc(re_s)
    c_tm = rm / (0.5 * rho_m * vm**2 * surface_m)

    prohaska = None
    if inputs.form_factor is not None:
        k, source = inputs.form_factor, "case"
    else:
        low = (fn <= inputs.prohaska_max_froude) & ~np.isnan(c_tm) & ~np.isnan(fn)
        if int(low.sum()) < 3:
            raise CaseError(
                "the form factor is not in the case ([resistance] form_factor) and fewer than "
                f"three rows are at Froude numbers up to {inputs.prohaska_max_froude:g} for a "
                f"Prohaska fit ({int(low.sum())} are)",
                key=key,
            )
        try:
            k, slope, rms = prohaska_form_factor(fn[low], c_tm[low], c_fm[low])
        except ValueError as exc:
            raise CaseError(str(exc), key=key) from None
        if not k > -1.0:
            raise CaseError(f"the Prohaska fit gives 1 + k = {1 + k:.4g}, not a form factor",
                            key=key)  # fmt: skip
        source = "prohaska"
        prohaska = {
            "rows": [int(i) + 1 for i in np.flatnonzero(low)],
            "max_froude": inputs.prohaska_max_froude,
            "one_plus_k": 1.0 + k,
            "slope": slope,
            "rms_residual": rms,
        }
    c_r = c_tm - (1.0 + k) * c_fm
    method = inputs.roughness_allowance
    if isinstance(method, str):
        rough = np.vectorize(
            lambda r: (
                math.nan
                if math.isnan(r)
                else roughness_allowance(method, inputs.hull_roughness, length_s, r)
            ),
            otypes=[float],
        )
        d_cf = rough(re_s)
    else:
        d_cf = np.full_like(vm, float(method))
    c_a = np.full_like(vm, inputs.correlation_allowance)
    c_aas = (
        np.full_like(vm, air_resistance_coefficient(inputs.air_area, surface_s))
        if inputs.air_area is not None
        else np.zeros_like(vm)
    )
    c_ts = (1.0 + k) * c_fs + d_cf + c_a + c_r + c_aas
    r_ts = c_ts * 0.5 * rho_s * vs**2 * surface_s
    steps = {
        "Fn": fn,
        "Re_M": re_m,
        "C_TM": c_tm,
        "C_FM": c_fm,
        "k": np.full_like(vm, k),
        "C_R": c_r,
        "Re_S": re_s,
        "C_FS": c_fs,
        "dC_F": d_cf,
        "C_A": c_a,
    }
    if inputs.air_area is not None:
        steps["C_AAS"] = c_aas
    steps["C_TS"] = c_ts
    steps["R_TS"] = r_ts
    return Extrapolation(
        column, velocity_column, inputs, k, source, prohaska,
        (length_m, length_s), (surface_m, surface_s), steps,
    )  # fmt: skip
