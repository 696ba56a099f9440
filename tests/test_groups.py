"""Tests of the group catalogue and of Buckingham pi analysis (compromise.physics.groups).

Oracles: pint (dimension vectors of SI units, through ``compromise.units.parse_quantity``), the
``fluids`` library (Bell, C., fluids.core: Froude, Reynolds, Weber, Mach, Euler, Strouhal,
Froude_densimetric), textbook sets of groups (White, F. M. (2011), Fluid Mechanics, 7th ed.,
McGraw-Hill, ch. 5 and 6; from memory, example numbers not verified) and closed-form laws
(Stokes drag, pendulum period).
"""

from __future__ import annotations

import math

import fluids.core
import numpy as np
import pytest
from numpy.testing import assert_allclose

from compromise.errors import CompromiseError
from compromise.expressions import dimension, evaluate, names, parse, power_product
from compromise.physics.groups import (
    BUILTIN_GROUPS,
    CONVENTIONAL_DIMENSIONS,
    DerivedGroup,
    GroupDefinition,
    UnknownGroupError,
    derive_groups,
    get_group,
)
from compromise.units import parse_quantity

# SI units of the conventional names; pint gives their dimension vectors.
CONVENTIONAL_UNITS = {
    "velocity": "m/s",
    "L": "m",
    "pressure_drop": "Pa",
    "frequency": "Hz",
    "bulk_modulus": "GPa",
    "density_difference": "kg/m^3",
    "shear_velocity": "m/s",
    "grain_density": "kg/m^3",
    "grain_size": "mm",
    "settling_velocity": "m/s",
    "roughness": "mm",
    "rho": "kg/m^3",
    "mu": "Pa*s",
    "nu": "m^2/s",
    "sigma": "N/m",
    "c": "m/s",
    "g": "m/s^2",
    "p_ambient": "kPa",
    "p_vapour": "kPa",
}


def dims_of(units: dict[str, str]) -> dict[str, tuple[int, int, int, int]]:
    return {name: parse_quantity(f"1 {unit}")[1] for name, unit in units.items()}


# Water near 20 degC with quartz sand (values of the order of IAPWS and common practice;
# the oracles below are evaluated on the same inputs, so only the formulas are compared).
ENV = {
    "velocity": 0.6,
    "L": 0.12,
    "pressure_drop": 850.0,
    "frequency": 1.7,
    "bulk_modulus": 2.2e9,
    "density_difference": 25.0,
    "shear_velocity": 0.035,
    "grain_density": 2650.0,
    "grain_size": 4.0e-4,
    "settling_velocity": 0.052,
    "roughness": 1.2e-3,
    "rho": 998.2,
    "mu": 1.0016e-3,
    "nu": 1.0034e-6,
    "sigma": 0.07274,
    "c": 1482.0,
    "g": 9.80665,
}


# --------------------------------------------------------------------------- catalogue


def test_conventional_dimensions_match_pint() -> None:
    assert dims_of(CONVENTIONAL_UNITS) == CONVENTIONAL_DIMENSIONS


@pytest.mark.parametrize("name", list(BUILTIN_GROUPS))
def test_builtin_group_parses_and_is_dimensionless_pint_dimensions(name: str) -> None:
    group = BUILTIN_GROUPS[name]
    assert isinstance(group, GroupDefinition)
    assert group.name == name
    tree = parse(group.expression)
    assert str(tree) == group.expression  # stored in the printer's stable form
    assert names(tree) <= set(CONVENTIONAL_DIMENSIONS)
    assert dimension(tree, dims_of(CONVENTIONAL_UNITS)) == (0.0, 0.0, 0.0, 0.0)
    assert group.symbol and group.forces and group.meaning and group.references


@pytest.mark.parametrize(
    ("name", "expected"),
    [
        ("froude", fluids.core.Froude(ENV["velocity"], ENV["L"], g=ENV["g"])),
        ("reynolds", fluids.core.Reynolds(ENV["velocity"], ENV["L"], nu=ENV["nu"])),
        ("weber", fluids.core.Weber(ENV["velocity"], ENV["L"], ENV["rho"], ENV["sigma"])),
        ("mach", fluids.core.Mach(ENV["velocity"], ENV["c"])),
        ("euler", fluids.core.Euler(ENV["pressure_drop"], ENV["rho"], ENV["velocity"])),
        ("strouhal", fluids.core.Strouhal(ENV["frequency"], ENV["L"], ENV["velocity"])),
        (
            "densimetric_froude",
            fluids.core.Froude_densimetric(
                ENV["velocity"],
                ENV["L"],
                ENV["rho"],
                ENV["rho"] - ENV["density_difference"],
                heavy=True,
                g=ENV["g"],
            ),
        ),
        (
            "particle_reynolds",
            fluids.core.Reynolds(ENV["shear_velocity"], ENV["grain_size"], nu=ENV["nu"]),
        ),
        (
            "roughness_reynolds",
            fluids.core.Reynolds(ENV["shear_velocity"], ENV["roughness"], nu=ENV["nu"]),
        ),
    ],
)
def test_builtin_group_value_matches_fluids_core(name: str, expected: float) -> None:
    # oracle: fluids.core (Bell, C., fluids library) with the same inputs
    value = evaluate(parse(BUILTIN_GROUPS[name].expression), ENV)
    assert_allclose(value, expected, rtol=1e-13)


def test_cauchy_equals_mach_squared_newton_laplace() -> None:
    # speed of sound in a liquid c = sqrt(K / rho) (Newton-Laplace; White 2011, ch. 9, from
    # memory), hence Ca = rho V^2 / K = Ma^2
    env = {**ENV, "bulk_modulus": ENV["rho"] * ENV["c"] ** 2}
    cauchy = evaluate(parse(BUILTIN_GROUPS["cauchy"].expression), env)
    assert_allclose(cauchy, fluids.core.Mach(ENV["velocity"], ENV["c"]) ** 2, rtol=1e-13)


def test_shields_parameter_shear_stress_form_shields1936() -> None:
    # Shields (1936), from memory: theta = tau_b / ((rho_s - rho) g D) with tau_b = rho u*^2
    tau = ENV["rho"] * ENV["shear_velocity"] ** 2
    expected = tau / ((ENV["grain_density"] - ENV["rho"]) * ENV["g"] * ENV["grain_size"])
    value = evaluate(parse(BUILTIN_GROUPS["shields"].expression), ENV)
    assert_allclose(value, expected, rtol=1e-13)


def test_rouse_number_von_karman_0_4_rouse1937() -> None:
    # Rouse (1937), from memory: P = w_s / (kappa u*), kappa = 0.40 (common practice)
    value = evaluate(parse(BUILTIN_GROUPS["rouse"].expression), ENV)
    assert_allclose(value, ENV["settling_velocity"] / (0.40 * ENV["shear_velocity"]), rtol=1e-14)


def test_builtin_groups_power_products_except_shields() -> None:
    # the '- 1' of the submerged relative density (Shields, stability number) and the sums of
    # pressures of the cavitation index make non-product expressions
    for name, group in BUILTIN_GROUPS.items():
        result = power_product(parse(group.expression))
        assert (result is None) == (name in ("shields", "stability_number", "cavitation")), name


def test_froude_exponents_and_length_substitution_white2011() -> None:
    # Fr = V / sqrt(g L) (White 2011, ch. 5, from memory)
    tree = get_group("froude").parsed("depth")
    assert power_product(tree) == (1.0, {"depth": -0.5, "g": -0.5, "velocity": 1.0})


def test_get_group_by_name_and_symbol() -> None:
    assert get_group("froude") is BUILTIN_GROUPS["froude"]
    assert get_group("Densimetric-Froude").name == "densimetric_froude"
    assert get_group("We").name == "weber"
    assert list(BUILTIN_GROUPS)[:3] == ["froude", "reynolds", "weber"]


def test_get_group_unknown_suggests_close_name() -> None:
    with pytest.raises(UnknownGroupError, match=r"unknown group 'frode'; did you mean 'froude'"):
        get_group("frode")
    with pytest.raises(KeyError, match="Built-in groups: froude, reynolds"):
        get_group("nonexistent")
    assert issubclass(UnknownGroupError, CompromiseError)


# --------------------------------------------------------------------------- Buckingham pi

PIPE = {  # pressure drop in a straight pipe
    "dp": (1, -1, -2, 0),
    "rho": (1, -3, 0, 0),
    "mu": (1, -1, -1, 0),
    "V": (0, 1, -1, 0),
    "D": (0, 1, 0, 0),
    "eps": (0, 1, 0, 0),
    "Lpipe": (0, 1, 0, 0),
}
SPHERE = {  # drag force on a sphere
    "F": (1, 1, -2, 0),
    "rho": (1, -3, 0, 0),
    "mu": (1, -1, -1, 0),
    "V": (0, 1, -1, 0),
    "D": (0, 1, 0, 0),
}
WEIR = {"Q": (0, 3, -1, 0), "g": (0, 1, -2, 0), "H": (0, 1, 0, 0), "b": (0, 1, 0, 0)}
PENDULUM = {"T": (0, 0, 1, 0), "l": (0, 1, 0, 0), "m": (1, 0, 0, 0), "g": (0, 1, -2, 0)}


def _rank(vectors: list[list[float]]) -> int:
    return int(np.linalg.matrix_rank(np.array(vectors, dtype=float)))


def check_complete_set(variables: dict[str, tuple[int, ...]], groups: list[DerivedGroup]) -> None:
    """Each group dimensionless, and the set independent with n - r members."""
    order = list(variables)
    r = _rank([list(v) for v in variables.values()])
    assert len(groups) == len(order) - r
    for group in groups:
        assert dimension(parse(group.to_text()), variables) == (0.0, 0.0, 0.0, 0.0)
        assert power_product(parse(group.to_text())) == (
            1.0,
            {k: float(v) for k, v in sorted(group.exponents.items())},
        )
    matrix = [[g.exponents.get(k, 0) for k in order] for g in groups]
    if groups:
        assert _rank(matrix) == len(order) - r


def test_pipe_pressure_drop_textbook_groups_white2011_sec5_3() -> None:
    # White (2011), sec. 5.3 and ch. 6, from memory: dp/(rho V^2) = f(rho V D / mu, eps/D, L/D)
    groups = derive_groups(PIPE, ["rho", "V", "D"])
    assert [g.exponents for g in groups] == [
        {"dp": 1, "rho": -1, "V": -2},
        {"rho": -1, "mu": 1, "V": -1, "D": -1},
        {"D": -1, "eps": 1},
        {"D": -1, "Lpipe": 1},
    ]
    assert [g.to_text() for g in groups] == [
        "dp / (rho * V**2)",
        "mu / (rho * V * D)",
        "eps / D",
        "Lpipe / D",
    ]
    check_complete_set(PIPE, groups)


def test_pipe_pressure_drop_automatic_repeating_is_complete() -> None:
    groups = derive_groups(PIPE)
    check_complete_set(PIPE, groups)
    textbook = [g.exponents for g in derive_groups(PIPE, ["rho", "V", "D"])]
    # the same space of groups: adding the textbook set does not raise the rank
    order = list(PIPE)
    both = [[e.get(k, 0) for k in order] for e in [*textbook, *(g.exponents for g in groups)]]
    assert _rank(both) == 4


def test_sphere_drag_two_groups_white2011_ch5() -> None:
    # White (2011), ch. 5, from memory: F/(rho V^2 D^2) = f(rho V D / mu)
    groups = derive_groups(SPHERE, ["rho", "V", "D"])
    assert [g.to_text() for g in groups] == ["F / (rho * V**2 * D**2)", "mu / (rho * V * D)"]
    check_complete_set(SPHERE, groups)
    auto = derive_groups(SPHERE)
    assert len(auto) == 2
    check_complete_set(SPHERE, auto)


def test_sphere_drag_groups_with_stokes_law_stokes1851() -> None:
    # Stokes (1851), from memory: F = 3 pi mu V D at low Reynolds number, so
    # [F/(rho V^2 D^2)] / [mu/(rho V D)] = 3 pi for any creeping flow
    force_coefficient, inverse_reynolds = (
        g.to_expr() for g in derive_groups(SPHERE, ["rho", "V", "D"])
    )
    rng = np.random.default_rng(1851)
    env = {
        "rho": rng.uniform(800, 1300, 20),
        "mu": rng.uniform(0.1, 2.0, 20),
        "V": rng.uniform(1e-4, 1e-3, 20),
        "D": rng.uniform(1e-4, 1e-3, 20),
    }
    env["F"] = 3 * math.pi * env["mu"] * env["V"] * env["D"]
    ratio = evaluate(force_coefficient, env) / evaluate(inverse_reynolds, env)
    assert_allclose(ratio, 3 * math.pi, rtol=1e-12)


def test_weir_groups_span_froude_type_weir_coefficient_henderson1966() -> None:
    # sharp-crested weir, Q = f(g, H, b): Q / (b g^1/2 H^3/2) = f(b/H) (Henderson 1966, Open
    # Channel Flow, ch. 6, from memory). Integer exponents give Q^2/(g H^5) and b/H.
    groups = derive_groups(WEIR, ["g", "H"])
    assert [g.exponents for g in groups] == [{"Q": 2, "g": -1, "H": -5}, {"H": -1, "b": 1}]
    check_complete_set(WEIR, groups)
    order = list(WEIR)
    weir_coefficient = {"Q": 1.0, "g": -0.5, "H": -1.5, "b": -1.0}
    matrix = [[g.exponents.get(k, 0) for k in order] for g in groups]
    assert _rank([*matrix, [weir_coefficient[k] for k in order]]) == 2


def test_pendulum_period_group_huygens1673() -> None:
    # small-angle pendulum T = 2 pi sqrt(l / g) (Huygens 1673, from memory): one group T^2 g / l
    # (the mass cannot enter), equal to 4 pi^2 for any length, gravity and mass
    groups = derive_groups(PENDULUM)
    assert [g.exponents for g in groups] == [{"T": 2, "l": -1, "g": 1}]
    check_complete_set(PENDULUM, groups)
    lengths = np.array([0.1, 0.5, 2.0, 9.0])
    gravity = np.array([9.80665, 1.62, 3.71, 24.79])
    env = {"l": lengths, "g": gravity, "T": 2 * np.pi * np.sqrt(lengths / gravity)}
    assert_allclose(evaluate(groups[0].to_expr(), env), 4 * np.pi**2, rtol=1e-13)


def test_dimensionless_variables_are_their_own_groups() -> None:
    groups = derive_groups({"slope": (0, 0, 0, 0), "V": (0, 1, -1, 0), "h": (0, 1, 0, 0)})
    assert [g.exponents for g in groups] == [{"slope": 1}]
    assert derive_groups({"a": (0, 1, 0, 0), "t": (0, 0, 1, 0)}) == []


def test_derived_group_to_dict_and_text() -> None:
    group = DerivedGroup({"pressure_drop": 1, "rho": -1, "velocity": -2, "zero": 0})
    assert group.to_text() == "pressure_drop / (rho * velocity**2)"
    assert group.to_dict() == {
        "expression": "pressure_drop / (rho * velocity**2)",
        "exponents": {"pressure_drop": 1, "rho": -1, "velocity": -2},
    }
    assert DerivedGroup({"a": -1}).to_text() == "1 / a"
    assert DerivedGroup({"a": 2, "b": 1}).to_text() == "a**2 * b"
    assert hash(group) == hash(DerivedGroup({"rho": -1, "velocity": -2, "pressure_drop": 1}))
    with pytest.raises(ValueError, match="exponents must be integers"):
        DerivedGroup({"a": 0.5})  # type: ignore[dict-item]


@pytest.mark.parametrize(
    ("repeating", "match"),
    [
        (["rho", "V"], r"need exactly 3 repeating variables .*got 2: rho, V"),
        (["rho", "V", "D", "mu"], r"need exactly 3 repeating variables"),
        (["rho", "V", "Dd"], r"unknown repeating variable 'Dd'; did you mean 'D'\?"),
        (["rho", "V", "V"], r"listed twice"),
        (["eps", "D", "V"], r"eps, D, V are dimensionally dependent"),
        (["dp", "rho", "V"], r"dp, rho, V are dimensionally dependent"),
    ],
)
def test_bad_repeating_sets_raise(repeating: list[str], match: str) -> None:
    with pytest.raises(ValueError, match=match):
        derive_groups(PIPE, repeating)


def test_bad_variables_raise() -> None:
    with pytest.raises(ValueError, match="no variables"):
        derive_groups({})
    with pytest.raises(ValueError, match=r"must have 4 entries"):
        derive_groups({"a": (0, 1, 0)})
    with pytest.raises(ValueError, match="'pi' is the constant"):
        derive_groups({"pi": (0, 1, 0, 0), "b": (0, 1, 0, 0)})
    with pytest.raises(ValueError, match="'__class__' is not allowed"):
        derive_groups({"__class__": (0, 1, 0, 0)})


def test_automatic_repeating_variables_give_the_textbook_sets() -> None:
    # with no repeating variables given, the choice follows the textbook rule (common
    # practice): a length, a velocity, a density; never the dependent first variable.
    # Pipe: White, F. M., Fluid Mechanics, sec. 5.3 (from memory); sphere drag: White, ch. 5.
    assert [g.to_text() for g in derive_groups(PIPE)] == [
        "dp / (rho * V**2)",
        "mu / (rho * V * D)",
        "eps / D",
        "Lpipe / D",
    ]
    assert [g.to_text() for g in derive_groups(SPHERE)] == [
        "F / (rho * V**2 * D**2)",
        "mu / (rho * V * D)",
    ]
    # weir: repeating g and H, giving the discharge coefficient's square and b / H
    assert [g.to_text() for g in derive_groups(WEIR)] == ["Q**2 / (g * H**5)", "b / H"]
