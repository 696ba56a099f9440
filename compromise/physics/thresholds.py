"""Published scale-effect thresholds, as data with a source on every row.

A case names the phenomena it involves (``phenomena = ["open_channel", "surface_tension"]``);
each phenomenon brings thresholds on model values. A threshold has a failing side, a passing
value and, between them where the literature gives a range, a marginal band. Each row carries
its source and how sure we are of it: ``found`` (read in the published text), ``from memory``
(recalled, to be checked against the source), ``common practice`` (a rule of the trade with no
single source) or ``physics`` (computed from a law).

Expressions use the safe expression language over conventional quantity names; a case maps its
own names onto them (``[phenomena.hydraulic_jump] depth = "toe_depth"``).
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Threshold:
    """A limit on a model value beyond which a scale effect is expected.

    Attributes
    ----------
    phenomenon : str
        The phenomenon it belongs to (a case names phenomena).
    name : str
        Short snake_case name, unique within the phenomenon.
    label : str
        What is checked, for reports.
    expression : str
        Model value, over conventional quantity names and fluid properties.
    kind : str
        ``"min"``: the value must be at least ``passing``; ``"max"``: at most ``passing``.
    failing : float
        Beyond this value (below for min, above for max) the check fails; between ``failing``
        and ``passing`` it is marginal. Equal to ``passing`` when no band is published.
    passing : float
        The value at which the check passes [units of the expression, SI].
    unit : str
    source : str
    status : str
        ``found``, ``from memory``, ``common practice`` or ``physics``.
    """

    phenomenon: str
    name: str
    label: str
    expression: str
    kind: str
    failing: float
    passing: float
    unit: str
    source: str
    status: str

    def to_dict(self) -> dict[str, object]:
        """Plain data."""
        return {
            "phenomenon": self.phenomenon,
            "name": self.name,
            "label": self.label,
            "expression": self.expression,
            "kind": self.kind,
            "failing": self.failing,
            "passing": self.passing,
            "unit": self.unit,
            "source": self.source,
            "status": self.status,
        }


THRESHOLDS: tuple[Threshold, ...] = (
    Threshold(
        "open_channel",
        "turbulent",
        "turbulent open-channel flow, Re = V R / nu",
        "velocity * depth / nu",
        "min",
        500.0,
        2000.0,
        "-",
        "Chow, V. T. (1959). Open-Channel Hydraulics, sec. 1-4: laminar below about 500, "
        "turbulent above about 2000 (hydraulic radius taken as the depth)",
        "from memory",
    ),
    Threshold(
        "rough_wall",
        "fully_rough",
        "fully rough wall, ks+ = u* ks / nu",
        "sqrt(g * depth * slope) * roughness / nu",
        "min",
        5.0,
        70.0,
        "-",
        "Nikuradse, J. (1933). Stroemungsgesetze in rauhen Rohren, VDI-Forschungsheft 361: "
        "smooth below 5, transitional 5-70, fully rough above 70",
        "found",
    ),
    Threshold(
        "surface_tension",
        "min_depth",
        "model depth above the surface-tension limit",
        "depth",
        "min",
        0.015,
        0.03,
        "m",
        "Novak, P. et al. (2010). Hydraulic Modelling - an Introduction, ch. 4; Chanson, H. "
        "(1999), ch. 14: 1.5-3 cm",
        "common practice",
    ),
    Threshold(
        "surface_tension",
        "capillary_speed",
        "velocity above the minimum phase speed of capillary-gravity waves",
        "velocity / (4 * g * sigma / rho)**0.25",
        "min",
        1.0,
        1.0,
        "-",
        "linear dispersion relation of capillary-gravity waves, c_min = (4 g sigma / rho)^1/4 "
        "= 0.23 m/s at 17 mm wavelength (Lamb, H. (1932). Hydrodynamics, sec. 267)",
        "physics",
    ),
    Threshold(
        "waves",
        "period",
        "wave period",
        "wave_period",
        "min",
        0.35,
        0.35,
        "s",
        "Hughes, S. A. (1993). Physical Models and Laboratory Techniques in Coastal "
        "Engineering, as listed in Heller, V. (2011), J. Hydraul. Res. 49(3), Table 2",
        "from memory",
    ),
    Threshold(
        "waves",
        "height",
        "wave height",
        "wave_height",
        "min",
        0.02,
        0.02,
        "m",
        "Hughes (1993), as listed in Heller (2011), Table 2",
        "from memory",
    ),
    Threshold(
        "hydraulic_jump",
        "reynolds",
        "jump inflow Reynolds number, V1 d1 / nu",
        "velocity * depth / nu",
        "min",
        4.0e4,
        1.0e5,
        "-",
        "Wang, H., Chanson, H. (2016), Environ. Fluid Mech.: aeration reproduced for a model "
        "Reynolds number no less than 4e4-6e4; Chanson, H., Murzyn, F. (2008): viscous scale "
        "effects observed up to 1e5",
        "found",
    ),
    Threshold(
        "chute_aeration",
        "weber",
        "air concentration on chutes, We^0.5 = V (rho h / sigma)^0.5",
        "velocity * sqrt(rho * depth / sigma)",
        "min",
        140.0,
        140.0,
        "-",
        "Pfister, M., Chanson, H. (2014), J. Hydrodynamics 26(2); Pfister & Hager (2010)",
        "from memory",
    ),
    Threshold(
        "intake_vortex",
        "radial_reynolds",
        "intake vortex, radial Reynolds Q / (nu s)",
        "discharge / (nu * submergence)",
        "min",
        3.0e4,
        3.0e4,
        "-",
        "Anwar, H. O., Weller, J. A., Amphlett, M. B. (1978), J. Hydraul. Res. 16(2)",
        "found",
    ),
    Threshold(
        "intake_vortex",
        "weber",
        "intake vortex, Weber rho V^2 s / sigma",
        "rho * velocity**2 * submergence / sigma",
        "min",
        1.0e4,
        1.0e4,
        "-",
        "Anwar, Weller & Amphlett (1978)",
        "found",
    ),
    Threshold(
        "rubble_mound",
        "reynolds",
        "armour Reynolds number, (g H)^0.5 D / nu",
        "sqrt(g * wave_height) * armour_size / nu",
        "min",
        3.0e4,
        3.0e4,
        "-",
        "Dai, Y. B., Kamel, A. M. (1969), via Hughes (1993) and Heller (2011)",
        "from memory",
    ),
    Threshold(
        "ship_resistance",
        "reynolds",
        "hull Reynolds number V L / nu (with stimulation)",
        "velocity * length / nu",
        "min",
        2.0e6,
        5.0e6,
        "-",
        "laminar flow a risk below about 2-3e6 even with turbulence stimulators; towing tanks "
        "aim at 5e6 or more (ITTC practice)",
        "common practice",
    ),
    Threshold(
        "compressibility",
        "mach",
        "Mach number for incompressible flow",
        "velocity / c",
        "max",
        0.3,
        0.3,
        "-",
        "density change within 5 % below Mach 0.3 (isentropic flow: rho0/rho = 1.0455 at M = 0.3)",
        "physics",
    ),
    Threshold(
        "distortion",
        "ratio",
        "vertical exaggeration Y/X of a distorted model",
        "distortion",
        "max",
        10.0,
        5.0,
        "-",
        "US Bureau of Reclamation, Physical modeling of rivers in the hydraulics laboratory "
        "(research project 21200): distortion below 5 for quantitative data, up to 10 feasible; "
        "valid only where vertical velocities and accelerations are small (Hughes 1993)",
        "found",
    ),
    Threshold(
        "pipe_flow",
        "turbulent",
        "turbulent pipe flow, Re = V D / nu",
        "velocity * diameter / nu",
        "min",
        2300.0,
        4000.0,
        "-",
        "laminar below about 2300, turbulent above about 4000 (Reynolds 1883; "
        "White, F. M., Fluid Mechanics, ch. 6)",
        "from memory",
    ),
)

#: Phenomenon name -> one-line description.
PHENOMENA: dict[str, str] = {
    "open_channel": "free-surface flow in channels and rivers (turbulence)",
    "rough_wall": "wall roughness: the model's boundary must be as rough, hydraulically",
    "surface_tension": "free surface: depths and speeds where surface tension is negligible",
    "waves": "wave basins and flumes",
    "hydraulic_jump": "hydraulic jumps and stilling basins (air entrainment)",
    "chute_aeration": "air concentration on spillway chutes",
    "intake_vortex": "free-surface vortices at intakes and pump sumps",
    "rubble_mound": "flow through rubble-mound armour",
    "ship_resistance": "towing-tank hull resistance",
    "compressibility": "gas flows that must stay incompressible",
    "pipe_flow": "full pipe flow (friction)",
    "distortion": "distorted models: how far the vertical scale is exaggerated",
}

#: Names a threshold may use that describe the design rather than a prototype quantity.
DESIGN_NAMES: tuple[str, ...] = ("distortion",)


def thresholds_for(phenomenon: str) -> tuple[Threshold, ...]:
    """The thresholds of one phenomenon (empty for an unknown name)."""
    return tuple(t for t in THRESHOLDS if t.phenomenon == phenomenon)


def conventional_names(phenomenon: str) -> tuple[str, ...]:
    """Quantity names the phenomenon's thresholds use (fluid properties excluded)."""
    from compromise import expressions as ex

    out: set[str] = set()
    for t in thresholds_for(phenomenon):
        out |= ex.names(ex.parse(t.expression))
    return tuple(sorted(out - set(ex.PROPERTY_NAMES) - set(DESIGN_NAMES)))
