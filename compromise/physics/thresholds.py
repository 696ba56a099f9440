"""Published scale-effect thresholds, as data with a source on every row.

A case names the phenomena it involves (``phenomena = ["open_channel", "surface_tension"]``);
each phenomenon brings thresholds on model values. A threshold has a failing side, a passing
value and, between them where the literature gives a range, a marginal band. Each row carries
its source and how sure we are of it: ``found`` (the value is stated in the cited source, seen
in its text or abstract), ``from memory`` (recalled, to be checked against the source before
relying on it), ``common practice`` (a rule of the trade with no single source) or ``physics``
(computed from a law). The source names the publication that states the number; a work that only
lists it is named as such ("as listed in").

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
        "turbulent open-channel flow, Re = V R / nu (R = depth: wide channel)",
        "velocity * depth / nu",
        "min",
        500.0,
        2000.0,
        "-",
        "Chow, V. T. (1959). Open-Channel Hydraulics, ch. 1, state of flow (section not "
        "checked): laminar below about 500, turbulent above about 2000, on the hydraulic radius "
        "R. The check takes R as the depth, true of wide channels only; in a narrow channel map "
        'the depth to the hydraulic radius ([phenomena.open_channel] depth = "hydraulic_radius")',
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
        "smooth below 5, transitional 5-70, fully rough above 70: the textbook bands on the "
        "equivalent sand roughness (Schlichting, H., Boundary-Layer Theory, ch. on rough pipes; "
        "White, F. M., Fluid Mechanics, ch. 6), drawn from Nikuradse's sand-grain pipes "
        "(Nikuradse, J. (1933), VDI-Forschungsheft 361), whose own smooth limit differs",
        "from memory",
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
        "keep model depths above about 1.5-3 cm, where surface tension and a laminar film "
        "begin to matter: a rule of the trade with no single source, recalled from the "
        "discussions of minimum model size in Novak, P. et al. (2010), Hydraulic Modelling - "
        "an Introduction, and Chanson, H. (1999), The Hydraulics of Open Channel Flow, ch. 14, "
        "neither checked for these figures",
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
        "minimum phase speed of the linear dispersion relation of capillary-gravity waves, "
        "c_min = (4 g sigma / rho)^1/4, 0.23 m/s at 17 mm wavelength for water at 20 degC "
        "(Lamb, H. (1932). Hydrodynamics, 6th ed., chapter on surface waves)",
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
        "Engineering, as listed in Heller, V. (2011), Scale effects in physical hydraulic "
        "engineering models, J. Hydraul. Res. 49(3), 293-306, Table 2: wave period above "
        "0.35 s and water depth above 2 cm",
        "from memory",
    ),
    Threshold(
        "waves",
        "depth",
        "water depth in the wave basin",
        "water_depth",
        "min",
        0.02,
        0.02,
        "m",
        "Hughes (1993), as listed in Heller (2011), Table 2: water depth above 2 cm (a depth, "
        "not a wave height)",
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
        "Reynolds number of at least 4e4-6e4; Chanson, H., Murzyn, F. (2008): some viscous "
        "scale effects in facilities up to 1e5. Failing below the first, passing from the "
        "second",
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
        "Pfister, M., Chanson, H. (2014), J. Hydrodynamics 26(2), whose abstract asks for "
        "minimal Reynolds or Weber numbers; Pfister, M., Hager, W. H. (2010), J. Hydraul. Eng., "
        "on chute aerators: We^0.5 at least 140 (the value recalled, not checked)",
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
        "Anwar, H. O., Weller, J. A., Amphlett, M. B. (1978), J. Hydraul. Res. 16(2): radial "
        "Reynolds number above 3e4",
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
        "Anwar, Weller & Amphlett (1978), J. Hydraul. Res. 16(2): Weber number above 1e4",
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
        "Dai, Y. B., Kamel, A. M. (1969), US Army Engineer Waterways Experiment Station, as "
        "cited by Hughes (1993) and Heller (2011): above 3e4 (some authors 4e4)",
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
        "towing-tank practice with no single source: laminar flow is a risk below about "
        "2-3e6 even with turbulence stimulators, and tanks aim at 5e6 or more",
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
        "isentropic flow of a perfect gas with gamma = 1.4: rho0/rho = (1 + 0.2 M^2)^2.5 = "
        "1.0456 at M = 0.3, a density change within 5 %",
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
        "US Bureau of Reclamation research project 21200, Physical modeling of rivers in the "
        "hydraulics laboratory (Shinebein, M., principal investigator), project summary seen: "
        "Reclamation's distorted models stayed below 5, and up to 10 is judged feasible for "
        "quantitative results. Distortion is valid only where vertical velocities and "
        "accelerations are small (Hughes, S. A. (1993), as quoted in USACE report TR-03-6)",
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
        "laminar below about 2300, turbulent above about 4000 (White, F. M., Fluid Mechanics, "
        "ch. 6; the transition first observed by Reynolds, O. (1883), Phil. Trans. R. Soc. 174)",
        "from memory",
    ),
    Threshold(
        "cavitation",
        "chute_surface",
        "cavitation index at the flow surface, (p_ambient + rho g h - p_v) / (rho V^2 / 2)",
        "(p_ambient + rho * g * depth - p_vapour) / (0.5 * rho * velocity**2)",
        "min",
        0.25,
        1.8,
        "-",
        "Falvey, H. T. (1990). Cavitation in Chutes and Spillways. US Bureau of Reclamation, "
        "Engineering Monograph 42, ch. on design criteria: above about 1.8 a chute surface "
        "needs no cavitation protection; between about 0.25 and 1.8 offsets and irregularities "
        "must be ground to tolerances; below 0.25 the design must change (and below about 0.2 "
        "be aerated). h is the pressure head over the surface (the flow depth on a chute)",
        "from memory",
    ),
    Threshold(
        "blockage",
        "solid_blockage",
        "blockage ratio, model frontal area / test-section area",
        "frontal_area / section_area",
        "max",
        0.10,
        0.05,
        "-",
        "ship wind-tunnel tests: 'blockage ratio to the wind tunnel less than 5%', a ceiling of "
        "0.05 (IMO guideline for wind-tunnel tests of ships' wind loads, document number not "
        "checked); beyond about 0.1 the classical corrections lose accuracy (Barlow, J. B., "
        "Rae, W. H., "
        "Pope, A. (1999). Low-Speed Wind Tunnel Testing, 3rd ed., Wiley, ch. 9, boundary "
        "corrections)",
        "from memory",
    ),
    Threshold(
        "tank_walls",
        "depth_froude",
        "depth Froude number of the towed model, V / (g h_tank)^0.5",
        "velocity / sqrt(g * tank_depth)",
        "max",
        0.7,
        0.5,
        "-",
        "shallow-water effects on resistance are small below a depth Froude number of about "
        "0.5 and grow fast towards the critical speed (1.0); 0.7 is the usual upper bound of a "
        "deep-water test (Schlichting, O. (1934), Schiffswiderstand auf beschraenkter "
        "Wassertiefe, STG Jahrbuch 35; ITTC Recommended Procedure 7.5-02-02-01, Resistance "
        "Test, section on blockage and finite depth corrections)",
        "from memory",
    ),
    Threshold(
        "tank_walls",
        "depth_draught",
        "tank depth over model draught, h_tank / T",
        "tank_depth / draught",
        "min",
        4.0,
        4.0,
        "-",
        "a tank depth of at least 4 draughts keeps the bottom's effect on the flow around "
        "the hull small at moderate speeds (ITTC Recommended Procedure 7.5-02-02-01, section "
        "on finite depth; value recalled)",
        "from memory",
    ),
    Threshold(
        "tank_walls",
        "blockage",
        "tank blockage, midship section area / (tank width x tank depth)",
        "frontal_area / (tank_width * tank_depth)",
        "max",
        0.02,
        0.01,
        "-",
        "keep the midship section within about 0.01-0.02 of the tank's cross-section, else "
        "correct (Schuster, S. (1956), Jahrbuch STG 50; Tamura, K. (1972); as named in ITTC "
        "Recommended Procedure 7.5-02-02-01, section 'Blockage and Finite Depth Corrections')",
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
    "cavitation": "cavitation on chutes, gates and offsets (the cavitation index)",
    "blockage": "a model in a wind-tunnel, flume or tunnel test section (solid blockage)",
    "tank_walls": "towing tanks: the tank's depth and width (shallow water, blockage)",
}

#: Names a threshold may use that describe the design rather than a prototype quantity.
DESIGN_NAMES: tuple[str, ...] = ("distortion",)

#: Names a threshold may use that describe the laboratory facility (``[facility]``); infinite
#: in the prototype (open air, open water), the facility's value in the model.
FACILITY_NAMES: tuple[str, ...] = ("section_area", "tank_depth", "tank_width")

#: Names of the fluid state a threshold may use (not quantities of the case).
STATE_NAMES: tuple[str, ...] = ("p_ambient", "p_vapour")

#: The thresholds whose ceiling ``[facility] blockage_max`` replaces in the solver's bound.
BLOCKAGE_THRESHOLDS: tuple[tuple[str, str], ...] = (
    ("blockage", "solid_blockage"),
    ("tank_walls", "blockage"),
)


def thresholds_for(phenomenon: str) -> tuple[Threshold, ...]:
    """The thresholds of one phenomenon (empty for an unknown name)."""
    return tuple(t for t in THRESHOLDS if t.phenomenon == phenomenon)


def conventional_names(phenomenon: str) -> tuple[str, ...]:
    """Quantity names the phenomenon's thresholds use (fluid properties excluded)."""
    from compromise import expressions as ex

    out: set[str] = set()
    for t in thresholds_for(phenomenon):
        out |= ex.names(ex.parse(t.expression))
    return tuple(
        sorted(
            out
            - set(ex.PROPERTY_NAMES)
            - set(DESIGN_NAMES)
            - set(FACILITY_NAMES)
            - set(STATE_NAMES)
        )
    )


def facility_names(phenomenon: str) -> tuple[str, ...]:
    """Facility names (``[facility]`` values) the phenomenon's thresholds use."""
    from compromise import expressions as ex

    out: set[str] = set()
    for t in thresholds_for(phenomenon):
        out |= ex.names(ex.parse(t.expression))
    return tuple(sorted(out & set(FACILITY_NAMES)))
