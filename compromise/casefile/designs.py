"""Proposed designs as the user writes them: inline specs and saved answers.

A design review names designs in two ways: an inline spec such as ``1:40/1:10@water,25degC``
(horizontal ratio, optional vertical ratio, optional model fluid, temperature and pressure) or a
JSON answer saved from ``compromise solve --json`` or ``compromise evaluate --json`` (its
``design`` object). Both become a :class:`DesignSpec` in SI units; the review layer turns a spec
into a full design with the case's defaults for whatever it leaves out.
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from compromise.errors import CaseError
from compromise.units import ZERO_CELSIUS, checked_number, parse_quantity, parse_ratio


@dataclass(frozen=True)
class DesignSpec:
    """A proposed design, possibly incomplete. Ratios model/prototype, SI units.

    Attributes
    ----------
    ratio : float
        Horizontal length ratio [-].
    vertical : float or None
        Vertical length ratio [-] (None: from ``distortion``, or undistorted).
    distortion : float or None
        Vertical over horizontal ratio [-].
    fluid : str or None
        Model fluid (None: the case's first model fluid).
    temperature, pressure : float or None
        Model fluid state [K, Pa] (None: the case's lowest allowed).
    velocity : str, float or None
        A velocity law (a group kept exactly) or the velocity ratio [-] (None: the case's exact
        group).
    label : str
        How the user named it (the spec text or the file name).
    material : str or None
        Model granular material (a case with ``[sediment]``; None: the least-mismatch one).
    grain_size : float or None
        Model grain size [m] (None: the least-mismatch one).
    """

    ratio: float
    vertical: float | None = None
    distortion: float | None = None
    fluid: str | None = None
    temperature: float | None = None
    pressure: float | None = None
    velocity: str | float | None = None
    label: str = ""
    material: str | None = None
    grain_size: float | None = None


def _temperature(text: str, key: str) -> float:
    try:
        value, dim, _ = parse_quantity(text)
    except ValueError as exc:
        raise CaseError(f"{exc}", key=key) from None
    if dim != (0, 0, 0, 1):
        raise CaseError(f"expected a temperature such as '25 degC', got {text!r}", key=key)
    return value


def _pressure(text: str, key: str) -> float:
    try:
        value, dim, _ = parse_quantity(text)
    except ValueError as exc:
        raise CaseError(f"{exc}", key=key) from None
    if dim != (1, -1, -2, 0):
        raise CaseError(f"expected a pressure such as '2 bar', got {text!r}", key=key)
    return value


def _ratio(text: str, key: str) -> float:
    try:
        return parse_ratio(text)
    except ValueError as exc:
        raise CaseError(str(exc), key=key) from None


def parse_design_spec(text: str, *, key: str = "DESIGN") -> DesignSpec:
    """Read ``RATIO[/VERTICAL][@FLUID[,TEMPERATURE[,PRESSURE]]]``.

    Examples
    --------
    >>> s = parse_design_spec("1:40/1:10@water,25degC")
    >>> round(1 / s.ratio), round(1 / s.vertical), s.fluid, round(s.temperature - 273.15, 2)
    (40, 10, 'water', 25.0)
    >>> parse_design_spec("1:40").fluid is None
    True
    """
    raw = text.strip()
    if not raw:
        raise CaseError("expected a design such as '1:40/1:10@water,25degC'", key=key)
    ratios, _, state = raw.partition("@")
    h_text, _, v_text = ratios.partition("/")
    ratio = _ratio(h_text.strip(), key)
    vertical = _ratio(v_text.strip(), key) if v_text.strip() else None
    fluid = temperature = pressure = None
    if "@" in raw:
        parts = [p.strip() for p in state.split(",")]
        if len(parts) > 3 or not parts[0]:
            raise CaseError(
                f"expected FLUID[,TEMPERATURE[,PRESSURE]] after '@', got {state!r}", key=key
            )
        fluid = parts[0]
        if len(parts) > 1 and parts[1]:
            temperature = _temperature(parts[1], key)
        if len(parts) > 2 and parts[2]:
            pressure = _pressure(parts[2], key)
    return DesignSpec(ratio, vertical, None, fluid, temperature, pressure, None, raw)


def load_design_file(path: str | Path) -> DesignSpec:
    """Read the ``design`` of a saved answer (``solve --json`` or ``evaluate --json``)."""
    p = Path(path)
    shown = str(path)
    try:
        data: Any = json.loads(p.read_text(encoding="utf-8"))
    except FileNotFoundError:
        raise CaseError("file not found", file=shown) from None
    except (OSError, UnicodeDecodeError) as exc:
        raise CaseError(f"cannot read a saved answer: {exc}", file=shown) from None
    except json.JSONDecodeError as exc:
        raise CaseError(f"expected JSON (a saved answer): {exc.msg}", file=shown) from None
    design = data.get("design") if isinstance(data, dict) else None
    if not isinstance(design, dict):
        raise CaseError(
            "expected an object with a 'design' (the output of solve --json or evaluate --json)",
            file=shown,
            key="design",
        )

    def number(name: str, *, positive: bool = True) -> float:
        v = design.get(name)
        if isinstance(v, bool) or not isinstance(v, int | float):
            raise CaseError(f"expected a number, got {v!r}", file=shown, key=f"design.{name}")
        try:
            out = checked_number(v)
        except ValueError as exc:
            raise CaseError(str(exc), file=shown, key=f"design.{name}") from None
        if positive and out <= 0:
            raise CaseError(
                f"expected a positive number, got {v!r}", file=shown, key=f"design.{name}"
            )
        return out

    fluid = design.get("fluid")
    if not isinstance(fluid, str) or not fluid:
        raise CaseError(f"expected a fluid name, got {fluid!r}", file=shown, key="design.fluid")
    material = design.get("material")
    if material is not None and not isinstance(material, str):
        raise CaseError(
            f"expected a material name, got {material!r}", file=shown, key="design.material"
        )
    return DesignSpec(
        material=material,
        grain_size=number("grain_size") if material is not None else None,
        ratio=number("horizontal_ratio"),
        vertical=number("vertical_ratio"),
        fluid=fluid,
        temperature=number("temperature", positive=False) + ZERO_CELSIUS,
        pressure=number("pressure"),
        velocity=number("velocity_ratio"),
        label=p.name,
    )
