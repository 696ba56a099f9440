"""Display units: the answer's plain data shown in SI (as computed) or in US customary units.

The library answers in SI; people in a design review may think in feet and cubic feet per
second. :func:`to_display` returns a converted copy of an answer's ``to_dict()`` for the text
tables (and for CSV when asked explicitly): every dimensional value that carries its unit is
converted with the same factor as its unit, so two parts of one output never disagree.
Prose built by the library (consequence sentences, notes) stays in SI and says so.

Conversion factors are exact by definition: the international foot (1959) is 0.3048 m, the
pound 0.45359237 kg, standard gravity 9.80665 m/s^2, the US gallon 231 in^3 (NIST SP 811, 2008,
appendix B, from memory).
"""

from __future__ import annotations

import copy
from typing import Any

FT = 0.3048  # [m]
IN = 0.0254  # [m]
LBF = 0.45359237 * 9.80665  # [N]
GAL = 231 * IN**3  # [m^3]

#: SI unit -> (US unit, factor): US value = SI value x factor
US: dict[str, tuple[str, float]] = {
    "m": ("ft", 1 / FT),
    "m/s": ("ft/s", 1 / FT),
    "m/s^2": ("ft/s^2", 1 / FT),
    "m^2": ("ft^2", 1 / FT**2),
    "m^3": ("ft^3", 1 / FT**3),
    "m^3/s": ("cfs", 1 / FT**3),
    "m^2/s": ("ft^2/s", 1 / FT**2),
    "s": ("s", 1.0),
    "1/s": ("1/s", 1.0),
    "Hz": ("Hz", 1.0),
    "Pa": ("psi", IN**2 / LBF),
    "N": ("lbf", 1 / LBF),
    "N/m": ("lbf/ft", FT / LBF),
    "kg/m^3": ("lb/ft^3", FT**3 / 0.45359237),
    "kg": ("lb", 1 / 0.45359237),
    "W": ("hp", 1 / (550 * FT * LBF)),
    "Pa s": ("lbf s/ft^2", FT**2 / LBF),
}
#: smaller units for small model-scale values (a flume's depth in inches, a pump in gpm)
SMALL: dict[str, tuple[str, float, float]] = {
    "ft": ("in", FT / IN, 1.0),  # below 1 ft
    "cfs": ("gpm", FT**3 / GAL * 60, 0.1),  # below 0.1 cfs
}


def convert(value: float | None, unit: str, system: str) -> tuple[float | None, str]:
    """One value in ``unit`` [SI] shown in ``system`` (``"si"`` or ``"us"``).

    Examples
    --------
    >>> value, unit = convert(0.3048, "m", "us")
    >>> round(value, 12), unit
    (1.0, 'ft')
    >>> round(convert(1.0, "m^3/s", "us")[0], 4)
    35.3147
    """
    if system != "us" or unit not in US:
        return value, unit
    name, factor = US[unit]
    return (None if value is None else value * factor), name


def celsius_to(value: Any, system: str) -> tuple[Any, str]:
    """A temperature (or an array of them) given in degC, shown in ``system``:
    ``(value, "degC")``, or in degF (``F = C x 9/5 + 32``).

    Examples
    --------
    >>> celsius_to(25.0, "us")
    (77.0, 'degF')
    >>> celsius_to(25.0, "si")
    (25.0, 'degC')
    """
    if system == "us":
        return value * 9 / 5 + 32, "degF"
    return value, "degC"


def small_unit(values: list[float], unit: str) -> tuple[str, float]:
    """For model-scale values in a US unit: a smaller unit when all of them are small."""
    if unit not in SMALL:
        return unit, 1.0
    name, factor, below = SMALL[unit]
    finite = [abs(v) for v in values if v is not None]
    if finite and max(finite) < below:
        return name, factor
    return unit, 1.0


def _quantities(qs: dict[str, Any], system: str) -> None:
    for q in qs.values():
        unit = q["unit"]
        q["prototype"], q["unit"] = convert(q["prototype"], unit, system)
        q["model"], _ = convert(q["model"], unit, system)


def _limits(limits: dict[str, Any], units: dict[str, str], system: str) -> None:
    for key, lim in limits.items():
        unit = units.get(key.rsplit(".", 1)[0], lim.get("unit", "-"))
        bound, shown = convert(lim["bound"], unit, system)
        model, _ = convert(lim["model"], unit, system)
        if system == "us":
            shown, f = small_unit([bound, model], shown)
            bound, model = bound * f, model * f
        lim["bound"], lim["model"], lim["unit"] = bound, model, shown


def _design(d: dict[str, Any], system: str) -> None:
    if system != "us" or d is None:
        return
    d["temperature"], d["temperature_unit"] = celsius_to(d["temperature"], system)
    d["pressure_si"] = d["pressure"]
    d["pressure"], d["pressure_unit"] = convert(d["pressure"], "Pa", system)


def to_display(data: dict[str, Any], system: str) -> dict[str, Any]:
    """A copy of an answer's plain data with dimensional values in ``system`` units.

    Handles the parts every answer shares: ``design`` (and designs inside alternatives and
    the optimum), ``quantities`` and ``limits`` (top level and per condition), binding costs'
    relaxed bounds, violations, threshold rows with a unit and comparison rows.
    """
    out = copy.deepcopy(data)
    out["unit_system"] = system
    if system != "us":
        return out
    units = {k: q["unit"] for k, q in data.get("quantities", {}).items()}
    for c in (
        data.get("conditions", {}).values() if isinstance(data.get("conditions"), dict) else []
    ):
        units.update({k: q["unit"] for k, q in c.get("quantities", {}).items()})
    _design(out.get("design"), system)
    for alt in out.get("alternatives", []):
        _design(alt.get("design"), system)
    if isinstance(out.get("optimum"), dict):
        _design(out["optimum"].get("design"), system)
    if "quantities" in out:
        _quantities(out["quantities"], system)
    if "limits" in out:
        _limits(out["limits"], units, system)
    if isinstance(out.get("conditions"), dict):
        for c in out["conditions"].values():
            if "quantities" in c:
                _quantities(c["quantities"], system)
            if "limits" in c:
                _limits(c["limits"], units, system)
    for key, b in out.get("binding", {}).items():
        parts = key.split(".")
        if parts[0] == "limits" and parts[1] in units:
            b["relaxed_bound"], b["unit"] = convert(b["relaxed_bound"], units[parts[1]], system)
    for v in out.get("violations", []):
        if v.get("unit") in US:
            unit = v["unit"]
            for f in ("bound", "value", "excess"):
                v[f], shown = convert(v[f], unit, system)
            v["unit"] = shown
            v["converted"] = True
    effects = out.get("effects") or {}
    for t in effects.get("thresholds", []):
        unit = t.get("unit", "-")
        if unit in US:
            for f in ("prototype", "model", "failing", "passing"):
                t[f], shown = convert(t[f], unit, system)
            t["unit"] = shown
    for d in out.get("designs", []):
        _design(d.get("design"), system)
    for row in out.get("rows", []):
        if row.get("unit") in US and str(row.get("section", "")).startswith("quantities"):
            unit = row["unit"]
            row["values"] = [convert(v, unit, system)[0] for v in row["values"]]
            row["unit"] = US[unit][0]
        elif row.get("section") == "design" and row.get("name") == "temperature":
            row["values"] = [None if v is None else celsius_to(v, system)[0] for v in row["values"]]
            row["unit"] = "degF"
    return out
