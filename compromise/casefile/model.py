"""The case data model: a case file's content in SI floats, as frozen dataclasses.

:mod:`compromise.casefile.load` builds a :class:`Case` from a TOML file (checking every key
with :mod:`compromise.casefile.checks`); the layers above read it and never see pint.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from compromise import expressions as ex
from compromise.physics.scaling import BASIS, INDEX
from compromise.units import dimension_name, to_celsius

ATMOSPHERE = 101325.0  # [Pa]
DEFAULT_MODEL_TEMPERATURE = 293.15  # [K], a laboratory at 20 degC (common practice)
#: Quantity names tried, in order, as the characteristic length ``L`` of a built-in group.
LENGTH_NAMES = ("depth", "diameter", "length", "height", "chord", "thickness", "width")

TOP_KEYS = (
    "title",
    "description",
    "prototype",
    "groups",
    "model",
    "limits",
    "conditions",
    "phenomena",
    "display_units",
    "instruments",
    "facility",
    "sediment",
    "resistance",
)
SEDIMENT_KEYS = ("materials", "grain_size", "material", "grain", "density", "moving_bed")
DISPLAY_UNITS = ("si", "us")
PROTOTYPE_KEYS = ("fluid", "temperature", "pressure", "quantities")
QUANTITY_KEYS = ("value", "axis", "scales_as", "description")
GROUP_KEYS = ("weight", "exact", "min", "max", "expr", "length", "description")
MODEL_KEYS = (
    "horizontal_ratio",
    "distortion",
    "velocity_ratio",
    "fluids",
    "temperature",
    "pressure",
    "preferred_ratios",
)
LIMIT_KEYS = ("min", "max")
FACILITY_KEYS = ("section_area", "depth", "width", "blockage_max")
SCALES_AS_NAMES = ("horizontal", "vertical", "velocity", "rho", "mu", "nu", "sigma", "c", "g")


@dataclass(frozen=True)
class Quantity:
    """A characteristic prototype quantity and how it scales.

    Attributes
    ----------
    name : str
    value : float
        Prototype value [SI units of ``unit``] (the base value; conditions may override it).
    dimension : tuple of int
        (mass, length, time, temperature) exponents.
    unit : str
        SI unit text.
    scaling : numpy.ndarray
        Exponents of the quantity's ratio over :data:`compromise.physics.scaling.BASIS`.
    axis : str
        ``"horizontal"``, ``"vertical"`` or ``"section"`` (areas); only meaningful for lengths.
    scales_as : str or None
        The user's scaling expression, when one was given.
    """

    name: str
    value: float
    dimension: tuple[int, int, int, int]
    unit: str
    scaling: np.ndarray = field(repr=False, compare=False)
    axis: str = "horizontal"
    scales_as: str | None = None
    description: str = ""

    def scaling_text(self) -> str:
        """The scaling as a readable product of base ratios, e.g. ``X^1 Y^1 V^1``."""
        return scaling_text(self.scaling)


@dataclass(frozen=True)
class Condition:
    """A named prototype condition (a flow) that overrides some quantity values."""

    name: str
    weight: float
    values: Mapping[str, float]


@dataclass(frozen=True)
class Group:
    """A dimensionless group of the case, with its weight and model-value bounds.

    Attributes
    ----------
    text : str
        The expression after substitution of the characteristic length.
    power : tuple or None
        ``(coefficient, {name: exponent})`` when the expression is a power product.
    """

    name: str
    expression: ex.Expr = field(repr=False, compare=False)
    text: str
    weight: float
    exact: bool = False
    min: float | None = None
    max: float | None = None
    builtin: bool = False
    power: tuple[float, dict[str, float]] | None = field(default=None, compare=False)
    description: str = ""
    #: a scale-effect threshold turned into a bound (reported as a limit, not as a group)
    threshold: bool = False


@dataclass(frozen=True)
class Limit:
    """A laboratory bound on the model value of a prototype quantity [SI]."""

    quantity: str
    kind: str  # "min" or "max"
    bound: float


@dataclass(frozen=True)
class Instrument:
    """A laboratory instrument and its resolution (``[instruments]``, ``--instrument``).

    Attributes
    ----------
    name : str
    resolution : float
        Model-scale resolution [SI], or a share of the reading [-] when ``relative``.
    relative : bool
        Whether the resolution is a share of the reading (written in %).
    dimension : tuple of int
        (M, L, T, Theta) of an absolute resolution.
    measures : str or None
        The case quantity or kind it measures (None: from its name).
    text : str
        As written.
    """

    name: str
    resolution: float
    relative: bool
    dimension: tuple[int, int, int, int]
    measures: str | None
    text: str


@dataclass(frozen=True)
class Facility:
    """The laboratory facility (``[facility]``): its cross-section and, for a tank, its depth
    and width [SI]; ``blockage_max`` is the case's ceiling on the blockage ratio [-]."""

    section_area: float | None = None
    depth: float | None = None
    width: float | None = None
    blockage_max: float | None = None

    def environment(self) -> dict[str, float]:
        """Facility names of the thresholds (``section_area``, ``tank_depth``, ``tank_width``)
        with the values given; the section is the tank's width x depth when not given."""
        area = self.section_area
        if area is None and self.depth is not None and self.width is not None:
            area = self.depth * self.width
        named = {"section_area": area, "tank_depth": self.depth, "tank_width": self.width}
        return {k: v for k, v in named.items() if v is not None}

    def to_dict(self) -> dict[str, float | None]:
        """Plain data [SI]; the section is the one the thresholds use."""
        return {
            "section_area": self.environment().get("section_area"),
            "depth": self.depth,
            "width": self.width,
            "blockage_max": self.blockage_max,
        }


@dataclass(frozen=True)
class ResistanceInputs:
    """Inputs of the ITTC-1978 resistance extrapolation of a towed hull (``[resistance]``).

    Attributes
    ----------
    wetted_surface : float
        The ship's wetted surface S_S [m^2] (the model's is S_S X^2).
    form_factor : float or None
        k of the form factor (1 + k); None: a Prohaska fit of the low-speed rows.
    prohaska_max_froude : float
        Rows up to this Froude number enter the Prohaska fit [-].
    roughness_allowance : str or float
        ``"bowden-davison"``, ``"townsin"`` or a fixed dC_F [-].
    hull_roughness : float
        Mean apparent amplitude of the hull's roughness k_s [m].
    correlation_allowance : float
        C_A [-].
    air_area : float or None
        Transverse projected area of the ship above the waterline A_T [m^2] (air resistance).
    """

    wetted_surface: float
    form_factor: float | None = None
    prohaska_max_froude: float = 0.2
    roughness_allowance: str | float = "bowden-davison"
    hull_roughness: float = 150e-6
    correlation_allowance: float = 0.0
    air_area: float | None = None


@dataclass(frozen=True)
class ModelChoices:
    """The designer's choices and their bounds (ratios model/prototype, SI)."""

    horizontal_ratio: tuple[float, float]
    distortion: tuple[float, float]
    velocity_ratio: tuple[float, float] | None
    fluids: tuple[str, ...]
    temperature: tuple[float, float]  # [K]
    pressure: tuple[float, float]  # [Pa]
    preferred_ratios: tuple[float, ...] = ()


@dataclass(frozen=True)
class Sediment:
    """The granular material of a movable bed or an armour layer (``[sediment]``).

    Attributes
    ----------
    materials : tuple of str
        Catalogue names of the model materials the solver may choose (like the model fluids).
    grain_size : (float, float)
        Range of the model grain size [m]; the lower bound defaults to the cohesion limit.
    material : str or None
        The prototype's material (catalogue name), when its density comes from the catalogue.
    grain : str
        The quantity holding the prototype grain size (d50, or Dn50 of armour).
    density : str
        The quantity holding the grain density (the prototype's; the model's is the material's).
    moving_bed : bool
        Whether the model bed must move: model Shields at or above its critical value.
    """

    materials: tuple[str, ...]
    grain_size: tuple[float, float]
    material: str | None
    grain: str = "grain_size"
    density: str = "grain_density"
    moving_bed: bool = False


@dataclass(frozen=True)
class Case:
    """A loaded, checked case in SI units (see ``docs/case-format.md``)."""

    path: str
    title: str
    fluid: str
    temperature: float  # [K]
    pressure: float  # [Pa]
    quantities: Mapping[str, Quantity]
    conditions: tuple[Condition, ...]
    groups: Mapping[str, Group]
    model: ModelChoices
    limits: tuple[Limit, ...]
    description: str = ""
    #: phenomenon -> {conventional quantity name: the case's quantity name}
    phenomena: Mapping[str, Mapping[str, str]] = field(default_factory=dict)
    #: SHA-256 (hex) of the case file's bytes; for a case given as a dictionary, of its
    #: canonical JSON (:func:`compromise.casefile.load.canonical_sha256`). Outputs and figures
    #: carry it so a result can be traced to the exact file it came from.
    source_sha256: str = ""
    #: how human-facing output shows dimensional values: "si" or "us" (US customary)
    display_units: str = "si"
    #: the laboratory's instruments (``[instruments]``), for ``compromise resolution``
    instruments: tuple[Instrument, ...] = ()
    #: the laboratory facility (``[facility]``): test section, tank depth and width
    facility: Facility = field(default_factory=Facility)
    #: the granular material the solver chooses (``[sediment]``), or None
    sediment: Sediment | None = None
    #: inputs of a towed hull's resistance extrapolation (``[resistance]``), for ``convert``
    resistance: ResistanceInputs | None = None

    def values(self, condition: int | str = 0) -> dict[str, float]:
        """Prototype quantity values [SI] in one condition (by index or name)."""
        cond = self.condition(condition)
        out = {name: q.value for name, q in self.quantities.items()}
        out.update(cond.values)
        return out

    def condition(self, which: int | str) -> Condition:
        """One condition by index or name."""
        if isinstance(which, int):
            return self.conditions[which]
        for c in self.conditions:
            if c.name == which:
                return c
        raise KeyError(f"no condition named {which!r}")

    @property
    def distorted(self) -> bool:
        """Whether the vertical ratio may differ from the horizontal one."""
        return self.model.distortion[1] > self.model.distortion[0] or self.model.distortion[0] != 1

    def summary(self) -> dict[str, Any]:
        """A plain-data summary for ``compromise check``."""
        from compromise.units import format_ratio

        m = self.model
        return {
            "title": self.title,
            "source_sha256": self.source_sha256,
            "prototype": {
                "fluid": self.fluid,
                "temperature": to_celsius(self.temperature),
                "pressure": self.pressure,
            },
            "quantities": {
                n: {
                    "value": q.value,
                    "unit": q.unit,
                    "kind": dimension_name(q.dimension),
                    "scales_as": q.scaling_text(),
                }
                for n, q in self.quantities.items()
            },
            "conditions": {
                c.name: {"weight": c.weight, "values": dict(c.values)} for c in self.conditions
            },
            "groups": {
                n: {
                    "expression": g.text,
                    "weight": g.weight,
                    "exact": g.exact,
                    "min": g.min,
                    "max": g.max,
                    "power_product": g.power is not None,
                }
                for n, g in self.groups.items()
            },
            "model": {
                "horizontal_ratio": [format_ratio(r) for r in m.horizontal_ratio],
                "distortion": list(m.distortion),
                "velocity_ratio": list(m.velocity_ratio) if m.velocity_ratio else None,
                "fluids": list(m.fluids),
                "temperature": [to_celsius(t) for t in m.temperature],
                "pressure": list(m.pressure),
                "preferred_ratios": [format_ratio(r) for r in m.preferred_ratios],
            },
            "limits": [
                {"quantity": lim.quantity, "kind": lim.kind, "bound": lim.bound}
                for lim in self.limits
            ],
            "phenomena": {k: dict(v) for k, v in self.phenomena.items()},
            # only a case with a [facility] shows it (other cases' summaries are unchanged)
            **({"facility": self.facility.to_dict()} if self.facility != Facility() else {}),
        }


def scaling_text(s: np.ndarray) -> str:
    """Readable product of base ratios for an exponent vector.

    Examples
    --------
    >>> from compromise.physics.scaling import vec
    >>> scaling_text(vec(horizontal=1, vertical=1, velocity=1))
    'X Y V'
    >>> scaling_text(vec(vertical=1, horizontal=-1))
    'X^-1 Y'
    """
    symbols = {"horizontal": "X", "vertical": "Y", "velocity": "V"}
    parts = []
    for name in BASIS:
        e = float(s[INDEX[name]])
        if abs(e) < 1e-12:
            continue
        sym = symbols.get(name, f"{name}_r")
        if abs(e - 1) < 1e-12:
            parts.append(sym)
        else:
            parts.append(f"{sym}^{fraction_text(e)}")
    return " ".join(parts) or "1"


def fraction_text(e: float) -> str:
    from fractions import Fraction

    f = Fraction(e).limit_denominator(12)
    if abs(float(f) - e) < 1e-9:
        return str(f) if f.denominator != 1 else str(f.numerator)
    return f"{e:.4g}"
