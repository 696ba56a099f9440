"""The ``[resistance]`` table: inputs of a towed hull's ITTC-1978 resistance extrapolation.

::

    [resistance]
    wetted_surface        = "1530 m^2"        # the ship's; the model's is S_S X^2
    form_factor           = 0.15              # k; leave it out for a Prohaska fit
    prohaska_max_froude   = 0.2               # rows up to this Fn enter the fit
    roughness_allowance   = "bowden-davison"  # or "townsin", or a number (dC_F)
    hull_roughness        = "150 um"          # k_s
    correlation_allowance = 0.0               # C_A
    air_area              = "260 m^2"         # optional: air resistance 0.001 A_T / S_S

See :mod:`compromise.review.resistance` for the method.
"""

from __future__ import annotations

import math
from typing import Any

from compromise.casefile.checks import Loader, show
from compromise.casefile.model import ResistanceInputs
from compromise.physics.ship import ROUGHNESS_METHODS

RESISTANCE_KEYS = (
    "wetted_surface",
    "form_factor",
    "prohaska_max_froude",
    "roughness_allowance",
    "hull_roughness",
    "correlation_allowance",
    "air_area",
    "description",
)


def _number(L: Loader, value: Any, key: str, low: float, high: float) -> float | None:
    number = math.nan
    if isinstance(value, int | float) and not isinstance(value, bool):
        try:
            number = float(value)
        except OverflowError:  # an integer beyond any float
            number = math.nan
    if not low <= number <= high:  # also refuses NaN
        L.error(key, f"expected a number between {low:g} and {high:g}, got {show(value)}")
        return None
    return number


def check_resistance(L: Loader, data: Any) -> ResistanceInputs | None:
    """Check ``[resistance]``; None (with the problems collected in ``L``) when it is unusable."""
    table = L.table(data, "resistance")
    L.keys(table, RESISTANCE_KEYS, "resistance")
    if "wetted_surface" not in table:
        L.error("resistance.wetted_surface", "missing; expected the ship's wetted surface, e.g. "
                "'1530 m^2'")  # fmt: skip
        return None
    ok = True
    area = L.quantity(
        table["wetted_surface"], "resistance.wetted_surface", (0, 2, 0, 0), what="an area"
    )
    ok &= area is not None
    k = None
    if "form_factor" in table:
        k = _number(L, table["form_factor"], "resistance.form_factor", 0.0, 1.0)
        ok &= k is not None
    fn_max = 0.2
    if "prohaska_max_froude" in table:
        got = _number(L, table["prohaska_max_froude"], "resistance.prohaska_max_froude", 0.05, 0.5)
        ok &= got is not None
        fn_max = got if got is not None else fn_max
    method: str | float = "bowden-davison"
    if "roughness_allowance" in table:
        raw = table["roughness_allowance"]
        if isinstance(raw, str) and raw.strip().lower() in ROUGHNESS_METHODS:
            method = raw.strip().lower()
        elif isinstance(raw, int | float) and not isinstance(raw, bool):
            got = _number(L, raw, "resistance.roughness_allowance", -0.001, 0.002)
            ok &= got is not None
            method = got if got is not None else method
        else:
            L.error(
                "resistance.roughness_allowance",
                f"expected {' or '.join(repr(m) for m in ROUGHNESS_METHODS)} or a number "
                f"(dC_F), got {show(raw)}",
            )
            ok = False
    ks = 150e-6
    if "hull_roughness" in table:
        got_q = L.quantity(table["hull_roughness"], "resistance.hull_roughness", (0, 1, 0, 0))
        ok &= got_q is not None
        ks = got_q[0] if got_q is not None else ks
    ca = 0.0
    if "correlation_allowance" in table:
        got = _number(L, table["correlation_allowance"], "resistance.correlation_allowance",
                      -0.001, 0.002)  # fmt: skip
        ok &= got is not None
        ca = got if got is not None else ca
    air = None
    if "air_area" in table:
        got_q = L.quantity(table["air_area"], "resistance.air_area", (0, 2, 0, 0), what="an area")
        ok &= got_q is not None
        air = got_q[0] if got_q is not None else None
    if "description" in table and not isinstance(table["description"], str):
        L.error("resistance.description", f"expected a string, got {show(table['description'])}")
    if not ok or area is None:
        return None
    return ResistanceInputs(area[0], k, fn_max, method, ks, ca, air)
