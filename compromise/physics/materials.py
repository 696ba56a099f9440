"""The catalogue of granular materials: movable-bed sediments and armour stones.

A movable-bed model of a river or a coast chooses its bed material (quartz sand, or a lighter
material where geometrically scaled sand would be too fine or would not move), and a
rubble-mound model chooses its armour (rock, concrete units, model stone). Each entry carries a
typical density, the range met in practice and its source; "from memory" marks a value
recalled rather than read from the source at the time of writing.

Data only; the formulas that use these densities live in :mod:`compromise.physics.sediment`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from compromise.errors import CaseError

__all__ = [
    "COHESION_LIMIT",
    "COHESION_NOTE",
    "MATERIALS",
    "USES",
    "Material",
    "get_material",
    "materials_for",
]

COHESION_LIMIT = 1e-4  # [m] common practice: finer model grains turn cohesive
COHESION_NOTE = (
    "Model grains finer than about 0.1 mm turn cohesive (they flocculate and stick; silt below "
    "0.062 mm is cohesive), so a movable bed keeps its grains at 0.1 mm or coarser (common "
    "practice). Quartz sand finer than about 0.6 mm forms ripples that a gravel prototype "
    "lacks (from memory)."
)

USES = ("sediment", "armour", "both")

_HUGHES = "Hughes (1993), Physical Models and Laboratory Techniques in Coastal Engineering, ch. 5"
_ASCE = "ASCE (2000), Hydraulic Modeling: Concepts and Practice, Manual of Practice 97"
_ROCK = "CIRIA, CUR, CETMEF (2007), The Rock Manual, ch. 3"


@dataclass(frozen=True)
class Material:
    """One granular material of the catalogue.

    Attributes
    ----------
    name : str
        Lower-case catalogue key, e.g. ``"quartz sand"``.
    density : float
        Typical density [kg/m^3], the value the solver uses.
    density_range : tuple of float
        Densities met in practice [kg/m^3], low to high.
    use : str
        ``"sediment"`` (a movable bed), ``"armour"`` (a rubble mound) or ``"both"``.
    source : str
        Where the densities come from, tagged "from memory" where recalled.
    note : str
        What a modeller should know when choosing it.
    """

    name: str
    density: float
    density_range: tuple[float, float]
    use: str
    source: str
    note: str = ""

    def to_dict(self) -> dict[str, Any]:
        """Plain data for JSON output."""
        return {
            "name": self.name,
            "density": self.density,
            "density_range": list(self.density_range),
            "use": self.use,
            "source": self.source,
            "note": self.note,
        }


def _m(
    name: str, density: float, low: float, high: float, use: str, source: str, note: str = ""
) -> Material:
    return Material(name, float(density), (float(low), float(high)), use, source, note)


_ENTRIES = (
    _m(
        "quartz sand",
        2650,
        2600,
        2700,
        "sediment",
        f"Soulsby (1997), Dynamics of Marine Sands, quartz 2650 kg/m^3; {_HUGHES} (from memory)",
        "natural sand; geometrically scaled it is often too fine (cohesive) or too heavy to move",
    ),
    _m(
        "anthracite",
        1400,
        1300,
        1500,
        "sediment",
        f"{_HUGHES}; {_ASCE} (from memory)",
        "crushed coal; angular grains, wear in long runs",
    ),
    _m(
        "pvc",
        1380,
        1140,
        1400,
        "sediment",
        f"{_HUGHES}; {_ASCE} (from memory)",
        "rigid PVC about 1380 kg/m^3; plasticised grades lighter",
    ),
    _m(
        "acrylic",
        1185,
        1180,
        1190,
        "sediment",
        f"{_HUGHES}; {_ASCE} (from memory)",
        "PMMA (perspex) granules",
    ),
    _m(
        "polystyrene",
        1050,
        1040,
        1060,
        "sediment",
        f"{_HUGHES}; {_ASCE} (from memory)",
        "very light: moves at low shear, sensitive to temperature and air bubbles",
    ),
    _m(
        "nylon",
        1140,
        1130,
        1150,
        "sediment",
        f"{_HUGHES}; {_ASCE} (from memory)",
        "absorbs some water; density about 1140 kg/m^3",
    ),
    _m(
        "walnut shell",
        1350,
        1300,
        1400,
        "sediment",
        f"{_HUGHES}; {_ASCE} (from memory)",
        "crushed shell; absorbs water, soak before use",
    ),
    _m(
        "bakelite",
        1350,
        1250,
        1450,
        "sediment",
        f"{_HUGHES}; {_ASCE} (from memory); bakelite powder in use: Zhu et al. (2004)",
        "phenolic resin grains",
    ),
    _m(
        "pumice",
        1350,
        1100,
        1600,
        "sediment",
        f"{_HUGHES} (from memory; low confidence)",
        "density depends on porosity and on how long it has soaked",
    ),
    _m(
        "rock",
        2650,
        2600,
        2700,
        "armour",
        f"{_ROCK} (from memory)",
        "quarried armourstone of the prototype",
    ),
    _m(
        "concrete",
        2350,
        2300,
        2400,
        "armour",
        f"{_ROCK}; USACE (2002), Coastal Engineering Manual, part VI-5 (from memory)",
        "armour units (cubes, tetrapods and the like); model units cast to the model density",
    ),
    _m(
        "crushed granite",
        2650,
        2600,
        2700,
        "armour",
        f"{_ROCK}; {_HUGHES} (from memory)",
        "model stone sieved and weighed to the scaled Dn50",
    ),
    _m(
        "crushed limestone",
        2600,
        2500,
        2700,
        "armour",
        f"{_ROCK} (from memory)",
        "model stone a little lighter than granite; density varies between quarries",
    ),
    _m(
        "crushed basalt",
        2900,
        2800,
        3000,
        "armour",
        f"{_ROCK} (from memory)",
        "heavy model stone: raises the relative density of a fresh-water model",
    ),
)

MATERIALS: dict[str, Material] = {m.name: m for m in _ENTRIES}
"""The catalogue by name; insertion order is display order."""


def get_material(name: str) -> Material:
    """The catalogue entry called ``name`` (case and surrounding blanks ignored).

    Raises
    ------
    CaseError
        (a ``ValueError``) naming the known materials, when ``name`` is not in the catalogue.
    """
    key = " ".join(str(name).lower().split())
    try:
        return MATERIALS[key]
    except KeyError:
        known = ", ".join(repr(k) for k in MATERIALS)
        raise CaseError(f"unknown material {name!r}; known: {known}") from None


def materials_for(use: str) -> list[Material]:
    """The materials fit for ``use`` ("sediment" or "armour"), in catalogue order."""
    if use not in USES:
        raise CaseError(f"expected one of {', '.join(USES)}, got {use!r}")
    return [m for m in MATERIALS.values() if m.use in (use, "both")]
