"""Validation tests of compromise.physics.fluids against published values and reference libraries.

Each check names its source. Oracles: the ``iapws`` package (IAPWS-95, IAPWS 2008, IAPWS
R1-76), ``gsw`` (TEOS-10) and CoolProp evaluated at inputs the module does not use. Tables of
published digits are written out beside their citation.
"""

from __future__ import annotations

import subprocess
import sys
import timeit
from pathlib import Path

import numpy as np
import pytest
from numpy.testing import assert_allclose

from compromise.errors import FluidRangeError, UnknownFluidError
from compromise.physics.fluids import (
    ATMOSPHERE,
    FluidTable,
    catalogue,
    fluid_names,
    get_fluid,
    glycerol_water_density_volk_kahler,
    glycerol_water_viscosity_cheng,
    seawater_freezing_temperature,
    seawater_sound_speed_coppens,
)

K = 273.15
SA = 35.16504  # [g/kg] standard seawater, practical salinity 35 (Millero et al. 2008)


# ------------------------------------------------------------------------------------- water
@pytest.mark.parametrize(("celsius", "nu_mm2"), [(15.0, 1.1386), (20.0, 1.0034), (25.0, 0.8927)])
def test_water_kinematic_viscosity_iapws2008_iapws95(celsius: float, nu_mm2: float) -> None:
    # IAPWS 2008 viscosity (Huber et al. 2009, J. Phys. Chem. Ref. Data 38, 101) over IAPWS-95
    # density (Wagner & Pruss 2002) at 101325 Pa, computed outside the module and rounded to
    # 1e-4 mm^2/s (ITTC's fresh-water 1.1386 at 15 degC agrees, from memory), so the tolerance
    # is half a unit of the last digit. The one check of these values in the suite.
    nu = get_fluid("water").properties(K + celsius).kinematic_viscosity
    assert_allclose(nu * 1e6, nu_mm2, rtol=0, atol=5e-5)


def test_water_properties_match_iapws_package() -> None:
    # The iapws package (IAPWS95 class) solves the same IAPWS-95 equation and IAPWS 2008
    # viscosity independently of CoolProp; they differ only by the tolerance of each one's
    # density iteration (about 1e-13 here), so rtol 1e-9 leaves room and still catches any
    # change of formulation.
    iapws = pytest.importorskip("iapws")
    water = get_fluid("water")
    for celsius in (1.0, 30.0, 60.0, 90.0):
        ref = iapws.IAPWS95(T=K + celsius, P=ATMOSPHERE * 1e-6)
        got = water.properties(K + celsius)
        assert_allclose(got.density, ref.rho, rtol=1e-9)
        assert_allclose(got.dynamic_viscosity, ref.mu, rtol=1e-9)
        assert_allclose(got.kinematic_viscosity, ref.nu, rtol=1e-9)
        assert_allclose(got.speed_of_sound, ref.w, rtol=1e-7)
    # viscosity formula alone across 1-90 degC at the module's own density
    from iapws._iapws import _Viscosity

    for celsius in np.linspace(1.0, 90.0, 12):
        got = water.properties(K + celsius)
        assert_allclose(got.dynamic_viscosity, _Viscosity(got.density, K + celsius), rtol=1e-12)


@pytest.mark.parametrize(
    ("temperature", "density", "mu_micro"),
    [(298.15, 998.0, 889.735100), (298.15, 1200.0, 1437.649467), (373.15, 1000.0, 307.883622)],
)
def test_water_viscosity_iapws2008_table4(temperature: float, density: float, mu_micro: float):
    # IAPWS 2008 release (Huber et al. 2009), Table 4 check values at given (T, rho); printed to
    # 1e-6 uPa s, tolerance half a unit. CoolProp's water viscosity is the one the module uses;
    # iapws._iapws._Viscosity is an independent implementation of the same formula.
    import CoolProp.CoolProp as CP
    from iapws._iapws import _Viscosity

    coolprop = CP.PropsSI("V", "T", temperature, "D", density, "Water")
    assert_allclose(coolprop * 1e6, mu_micro, rtol=0, atol=5e-7)
    assert_allclose(_Viscosity(density, temperature) * 1e6, mu_micro, rtol=0, atol=5e-7)


@pytest.mark.parametrize(("celsius", "sigma_mn"), [(20.0, 72.74), (25.0, 71.97), (0.01, 75.65)])
def test_water_surface_tension_iapws_r1_76(celsius: float, sigma_mn: float) -> None:
    # IAPWS R1-76(2014) tabulated values, printed to 0.01 mN/m: tolerance half a unit
    sigma = get_fluid("water").properties(K + celsius).surface_tension
    assert sigma is not None
    assert_allclose(sigma * 1e3, sigma_mn, rtol=0, atol=5e-3)


def test_water_surface_tension_matches_iapws_package() -> None:
    # iapws._iapws._Tension implements the same R1-76(2014) formula: agreement to rounding
    from iapws._iapws import _Tension

    water = get_fluid("water")
    for celsius in np.linspace(0.01, 99.9, 15):
        sigma = water.properties(K + celsius).surface_tension
        assert_allclose(sigma, _Tension(K + celsius), rtol=1e-12)


# ---------------------------------------------------------------------------- glycerol-water
@pytest.mark.parametrize(("fraction", "mu_mpa"), [(0.5, 6.002), (0.8, 60.86)])
def test_glycerol_water_viscosity_cheng2008_formula(fraction: float, mu_mpa: float) -> None:
    # Cheng (2008), Ind. Eng. Chem. Res. 47, 3285, eqs. 21-22 (constants as seen in a public
    # implementation of the paper) evaluated by hand at 20 degC and rounded to four figures:
    # tolerance half a unit of the last digit. Guards our coding of the formula; the
    # published data it fits are checked in the next test.
    name = f"glycerol-water {fraction * 100:g}%"
    mu = get_fluid(name).properties(K + 20.0).dynamic_viscosity
    assert_allclose(mu * 1e3, mu_mpa, rtol=0, atol=0.5 * 10 ** (np.floor(np.log10(mu_mpa)) - 3))


@pytest.mark.parametrize(
    ("fraction", "mu_mpa"),
    [(0.0, 1.005), (0.5, 6.00), (0.6, 10.8), (0.7, 22.5), (0.8, 60.1), (0.9, 219.0), (1.0, 1410.0)],
)
def test_glycerol_water_viscosity_segur_oberstar_1951(fraction: float, mu_mpa: float) -> None:
    # Segur & Oberstar (1951), Ind. Eng. Chem. 43, 2117, viscosities at 20 degC as tabulated by
    # Dow and compared in Cheng (2008). Cheng's formula is a fit to several such data sets and
    # agrees within a few percent (largest here 2.6 % at 70 %); rtol 3 %.
    mu = glycerol_water_viscosity_cheng(K + 20.0, fraction)
    assert_allclose(mu * 1e3, mu_mpa, rtol=0.03)


# Glycerine Producers' Association (1963), Physical properties of glycerine and its solutions,
# densities [g/cm^3] at 15, 20, 25, 30 degC (as tabulated by Dow), glycerol mass % 100 to 0.
GPA_1963_DENSITY = {
    100: (1.26415, 1.26108, 1.25802, 1.25495),
    90: (1.23810, 1.23510, 1.23200, 1.22890),
    80: (1.21160, 1.20850, 1.20545, 1.20240),
    70: (1.18415, 1.18125, 1.17840, 1.17565),
    60: (1.15650, 1.15380, 1.15105, 1.14830),
    50: (1.12870, 1.12630, 1.12375, 1.12110),
    40: (1.10145, 1.09930, 1.09710, 1.09475),
    30: (1.07455, 1.07270, 1.07070, 1.06855),
    20: (1.04840, 1.04690, 1.04525, 1.04350),
    10: (1.02325, 1.02210, 1.02070, 1.01905),
    0: (0.99913, 0.99823, 0.99708, 0.99568),
}


def test_glycerol_water_density_volk_kahler_vs_gpa_1963() -> None:
    # Volk & Kähler (2018), Exp. Fluids 59, 75 fitted such tables at 15-30 degC; their model's
    # stated accuracy is better than about 0.07 % (from memory): rtol 7e-4.
    temperatures = K + np.array([15.0, 20.0, 25.0, 30.0])
    for percent, row in GPA_1963_DENSITY.items():
        rho = glycerol_water_density_volk_kahler(temperatures, percent / 100.0)
        assert_allclose(rho, 1000.0 * np.array(row), rtol=7e-4)
    got = get_fluid("glycerol-water 50%").properties(K + 20.0).density
    assert_allclose(got, 1126.3, rtol=7e-4)


def test_glycerol_water_surface_tension_is_marked_an_estimate() -> None:
    # No published data for the mixture were checked (see
    # correlations.glycerol_water_surface_tension), so the catalogue must say so wherever the
    # value is shown; with no glycerol the estimate is IAPWS R1-76 water exactly, and no other
    # catalogue fluid carries an estimate.
    mix = get_fluid("glycerol-water 40%").properties(K + 20.0)
    assert [prop for prop, _ in mix.estimated] == ["surface_tension"]
    assert "estimate" in mix.to_dict()["estimated"]["surface_tension"]
    none = get_fluid("glycerol-water 0%").properties(K + 20.0)
    assert none.estimated == ()
    water = get_fluid("water").properties(K + 20.0)
    assert_allclose(none.surface_tension, water.surface_tension, rtol=1e-15)
    for name in fluid_names():
        if not name.startswith("glycerol"):
            assert get_fluid(name).estimated == {}, name


# --------------------------------------------------------------------------------------- air
def test_air_iso2533_sea_level() -> None:
    # ISO 2533:1975 standard atmosphere at sea level: 288.15 K, 101325 Pa -> 1.2250 kg/m^3,
    # 1.7894e-5 Pa s, 340.294 m/s. ISA is an ideal gas (M = 28.9644 g/mol) with Sutherland's
    # viscosity law; the module uses CoolProp's real-gas Lemmon et al. (2000) air (Z = 0.9997
    # here) and the Lemmon & Jacobsen (2004) viscosity, whose stated uncertainty is about 1 %
    # (from memory). Hence rtol 1e-3 on density and speed of sound, 5e-3 on viscosity (the two
    # viscosity models differ by 0.38 %).
    air = get_fluid("air").properties(288.15, 101325.0)
    assert_allclose(air.density, 1.2250, rtol=1e-3)
    assert_allclose(air.speed_of_sound, 340.294, rtol=1e-3)
    assert_allclose(air.dynamic_viscosity, 1.7894e-5, rtol=5e-3)
    assert air.surface_tension is None and air.vapour_pressure is None


# ---------------------------------------------------------------------------------- seawater
def test_seawater_density_teos10() -> None:
    # TEOS-10 (IOC, SCOR & IAPSO 2010) through gsw.rho_t_exact at sea pressure 0 is the
    # oracle; the module uses the older UNESCO EOS-80 one-atmosphere equation, which agrees
    # with TEOS-10 for standard seawater to about 1e-5 (from memory): rtol 1.5e-5.
    gsw = pytest.importorskip("gsw")
    sea = get_fluid("seawater").properties(K + 20.0)
    assert_allclose(sea.density, 1024.766, rtol=1.5e-5)
    assert_allclose(sea.density, gsw.rho_t_exact(SA, 20.0, 0.0), rtol=1.5e-5)
    for salinity in (10.0, 20.0, 30.0, SA, 40.0):
        fluid = get_fluid(f"seawater {salinity} g/kg")
        lo, hi = fluid.valid_range()
        for t in np.linspace(lo, hi, 9):
            oracle = gsw.rho_t_exact(salinity, t - K, 0.0)
            assert_allclose(fluid.properties(t).density, oracle, rtol=1.5e-5)


def test_seawater_kinematic_viscosity_sharqawy2010() -> None:
    # Sharqawy et al. (2010), Desalin. Water Treat. 16, 354, eqs. 22-23 viscosity (equations as
    # seen in a public implementation) over TEOS-10 density (gsw) at 35.16504 g/kg, 1 atm,
    # computed outside the module and rounded to 1e-4 mm^2/s: tolerance half a unit
    expected = {0.0: 1.8541, 10.0: 1.3606, 15.0: 1.1894, 20.0: 1.0510, 25.0: 0.9373, 30.0: 0.8427}
    sea = get_fluid("seawater")
    for celsius, nu_mm2 in expected.items():
        assert_allclose(sea.properties(K + celsius).kinematic_viscosity * 1e6, nu_mm2, atol=5e-5)


def test_seawater_tupper_table_5_1() -> None:
    # Tupper, Introduction to Naval Architecture, Table 5.1 (salt water, 3.5 % salt): 20 degC
    # 1024.7 kg/m^3 and 1.054 mm^2/s. The table comes from older data than Sharqawy et al.
    # (2010); the viscosities differ by 0.3 %: rtol 1e-4 on density (printed to 0.1 kg/m^3),
    # 5e-3 on viscosity.
    sea = get_fluid("seawater").properties(K + 20.0)
    assert_allclose(sea.density, 1024.7, rtol=1e-4)
    assert_allclose(sea.kinematic_viscosity * 1e6, 1.054, rtol=5e-3)


def test_seawater_freezing_and_sound_speed_teos10() -> None:
    # TEOS-10 via gsw: freezing of air-saturated seawater (gsw.t_freezing, saturation 1) and
    # speed of sound (gsw.sound_speed_t_exact). The module's recalled UNESCO (1983) freezing
    # formula and Coppens (1981) equation agree within 3 mK and 0.35 m/s; tolerances 5 mK and
    # 0.5 m/s (3e-4 of c).
    gsw = pytest.importorskip("gsw")
    for salinity in (0.0, 10.0, 20.0, 30.0, SA, 40.0):
        t_f = seawater_freezing_temperature(salinity)
        assert_allclose(t_f - K, gsw.t_freezing(salinity, 0.0, 1.0), atol=5e-3)
        temperatures = np.linspace(-2.0, 40.0, 22)
        c = seawater_sound_speed_coppens(temperatures + K, salinity)
        assert_allclose(c, gsw.sound_speed_t_exact(salinity, temperatures, 0.0), atol=0.5)
    lo, _ = get_fluid("seawater").valid_range()
    assert_allclose(lo - K, gsw.t_freezing(SA, 0.0, 1.0), atol=5e-3)


def test_seawater_vapour_pressure_teos10_chemical_potential() -> None:
    # TEOS-10: p_sw / p_w = exp[(mu_W(SA) - mu_W(0)) / (R_W T)] from the chemical potential of
    # water in seawater (gsw.chem_potential_water_t_exact, J/g), R_W = 461.51805 J/(kg K)
    # (IAPWS-95). The recalled Sharqawy et al. (2010) lowering (about 2 %) is within a tenth of
    # itself of TEOS-10: rtol 3e-3.
    gsw = pytest.importorskip("gsw")
    sea, water = get_fluid("seawater"), get_fluid("water")
    for celsius in (0.0, 20.0, 40.0):
        d_mu = gsw.chem_potential_water_t_exact(SA, celsius, 0) - gsw.chem_potential_water_t_exact(
            0.0, celsius, 0
        )
        ratio = np.exp(d_mu * 1e3 / (461.51805 * (K + celsius)))
        p_w = water.properties(K + celsius).vapour_pressure
        assert_allclose(sea.properties(K + celsius).vapour_pressure, ratio * p_w, rtol=3e-3)


# ------------------------------------------------------------------------ light oil and gases
def test_n_decane_crc_handbook_from_memory() -> None:
    # CRC Handbook of Chemistry and Physics (from memory): n-decane 730 kg/m^3 at 20 degC;
    # Jasper (1972), J. Phys. Chem. Ref. Data 1, 841 (from memory): 23.83 mN/m at 20 degC.
    # Recalled to three or four figures: rtol 1e-3 and 5e-3.
    decane = get_fluid("decane").properties(K + 20.0)
    assert_allclose(decane.density, 730.0, rtol=1e-3)
    assert_allclose(decane.surface_tension * 1e3, 23.83, rtol=5e-3)


def test_n_dodecane_crc_handbook_from_memory() -> None:
    # CRC Handbook of Chemistry and Physics (from memory): n-dodecane melts at -9.6 degC, boils
    # at 216.3 degC at 101325 Pa and has a density of 749.5 kg/m^3 at 20 degC; Jasper (1972),
    # J. Phys. Chem. Ref. Data 1, 841 (from memory): 25.35 mN/m at 20 degC. Recalled to 0.1 K
    # and four figures: atol 0.3 K, rtol 1e-3 on density, 5e-3 on surface tension (the module's
    # Mulero et al. (2012) fit, like the decane check above).
    dodecane = get_fluid("dodecane")
    lo, hi = dodecane.valid_range()
    assert_allclose([lo - K, hi - K], [-9.6, 216.3], atol=0.3)
    props = dodecane.properties(K + 20.0)
    assert_allclose(props.density, 749.5, rtol=1e-3)
    assert props.surface_tension is not None
    assert_allclose(props.surface_tension * 1e3, 25.35, rtol=5e-3)


R_MOLAR = 8.314462618  # [J/(mol K)] exact since the 2019 SI (CODATA 2018)


def test_nitrogen_ideal_gas_sutherland_and_boiling_point() -> None:
    # Independent of any equation of state: at 100 Pa and 300 K nitrogen is an ideal gas to a
    # few 1e-6 (second virial term, from memory), rho = p M / (R T) with M = 28.0134 g/mol
    # (IUPAC atomic weight of N, 14.0067): rtol 1e-5. Speed of sound of a diatomic ideal gas
    # with frozen vibration, gamma = 7/5 (kinetic theory): c = (gamma R T / M)^1/2; the small
    # vibrational heat capacity at 300 K lowers it by about 2e-4 (from memory): rtol 3e-4.
    nitrogen = get_fluid("n2")
    m = 28.0134e-3
    dilute = nitrogen.properties(300.0, 100.0)
    assert_allclose(dilute.density, 100.0 * m / (R_MOLAR * 300.0), rtol=1e-5)
    assert_allclose(dilute.speed_of_sound, np.sqrt(1.4 * R_MOLAR * 300.0 / m), rtol=3e-4)
    # Sutherland's law for nitrogen, mu0 = 1.663e-5 Pa s at 273 K, S = 107 K (White, F. M.,
    # Viscous Fluid Flow, Table 1-2, from memory), stated good to about 2 %: rtol 2e-2
    for t in (250.0, 300.0, 350.0, 400.0):
        sutherland = 1.663e-5 * (t / 273.0) ** 1.5 * (273.0 + 107.0) / (t + 107.0)
        assert_allclose(nitrogen.properties(t).dynamic_viscosity, sutherland, rtol=2e-2)
    # normal boiling point 77.355 K (CRC Handbook, from memory; 77.36 K to two decimals): the
    # gas condenses below it at 101325 Pa
    assert_allclose(nitrogen.valid_range()[0], 77.355, atol=0.01)


def test_sf6_ideal_gas_limit() -> None:
    # At 100 Pa SF6 is an ideal gas to a few 1e-5 (second virial term, from memory):
    # rho = p M / (R T), M = 146.05 g/mol (IUPAC atomic weights S 32.06, F 18.998): rtol 1e-4
    sf6 = get_fluid("sf6")
    m = (32.06 + 6 * 18.998403) * 1e-3
    for t in (240.0, 300.0, 380.0):
        assert_allclose(sf6.properties(t, 100.0).density, 100.0 * m / (R_MOLAR * t), rtol=1e-4)


@pytest.mark.parametrize(
    ("name", "coolprop_name", "states"),
    [
        ("nitrogen", "Nitrogen", [(90.0, ATMOSPHERE), (300.0, ATMOSPHERE), (350.0, 8e5)]),
        ("sf6", "SulfurHexafluoride", [(230.0, ATMOSPHERE), (300.0, ATMOSPHERE), (320.0, 8e5)]),
        ("n-dodecane", "n-Dodecane", [(270.0, ATMOSPHERE), (313.15, ATMOSPHERE), (450.0, 5e5)]),
    ],
)
def test_coolprop_fluids_match_propssi_at_temperature_and_density(
    name: str, coolprop_name: str, states: list[tuple[float, float]]
) -> None:
    # The module asks CoolProp's low-level AbstractState for (p, T) with the phase imposed;
    # CoolProp's high-level PropsSI, given (T, density), must return the same pressure,
    # viscosity and speed of sound. Same equations of state (Span et al. 2000; Guder & Wagner
    # 2009; Lemmon & Huber 2004) reached by another route: this checks the catalogue's
    # plumbing (fluid, phase, units, pressure), not the equations, which the tests above do
    # against independent values. rtol 1e-8: each density solve converges to about 1e-12.
    import CoolProp.CoolProp as CP

    fluid = get_fluid(name)
    for t, p in states:
        got = fluid.properties(t, p)
        assert_allclose(CP.PropsSI("P", "T", t, "Dmass", got.density, coolprop_name), p, rtol=1e-8)
        mu = CP.PropsSI("V", "T", t, "Dmass", got.density, coolprop_name)
        assert_allclose(got.dynamic_viscosity, mu, rtol=1e-8)
        c = CP.PropsSI("A", "T", t, "Dmass", got.density, coolprop_name)
        assert_allclose(got.speed_of_sound, c, rtol=1e-8)


def test_sf6_gas_range_guder_wagner_2009() -> None:
    # Guder & Wagner (2009): triple point 223.555 K at 2.3 bar, so at 1 atm SF6 is gas down to
    # the triple point (it deposits as a solid below) and at 3 bar it condenses first.
    sf6 = get_fluid("sulphur hexafluoride")
    assert_allclose(sf6.valid_range()[0], 223.555, rtol=1e-6)
    with pytest.raises(FluidRangeError, match="triple point"):
        sf6.check(220.0)
    with pytest.raises(FluidRangeError, match="condenses"):
        sf6.check(226.0, 3e5)
    assert sf6.properties(K + 20.0).density > 5 * get_fluid("air").properties(K + 20.0).density


# --------------------------------------------------------------------- tables vs properties
TABLE_CASES = [(name, ATMOSPHERE) for name in fluid_names()] + [
    ("water", 5e5),
    ("nitrogen", 5e5),
    ("sf6", 5e5),
    ("glycerol", ATMOSPHERE),
]


@pytest.mark.parametrize(("name", "pressure"), TABLE_CASES)
def test_table_matches_properties(name: str, pressure: float) -> None:
    # Splines against direct evaluation of the source models (common practice: 1e-4 is well
    # below every model's own uncertainty). Temperatures: both ends, the midpoints between
    # nodes (where a spline errs most) and random off-grid points.
    fluid = get_fluid(name)
    table = fluid.table(pressure)
    assert table is fluid.table(pressure)  # cached
    lo, hi = fluid.valid_range(pressure)
    assert (table.t_min, table.t_max) == (lo, hi)
    mids = 0.5 * (table.nodes[:-1] + table.nodes[1:])
    rng = np.random.default_rng(7)
    temperatures = np.concatenate(
        [[lo, hi], mids[:: max(1, len(mids) // 40)], rng.uniform(lo, hi, 60)]
    )
    values = table(temperatures)
    keys = (
        "density",
        "dynamic_viscosity",
        "kinematic_viscosity",
        "surface_tension",
        "speed_of_sound",
    )
    for i, t in enumerate(temperatures):
        direct = fluid.properties(float(t), pressure)
        for key, field in zip(("rho", "mu", "nu", "sigma", "c"), keys, strict=True):
            expected = getattr(direct, field)
            if expected is None:
                assert np.isnan(values[key][i])
            else:
                assert_allclose(values[key][i], expected, rtol=1e-4)


def test_table_call_shapes_scalars_and_out_of_range() -> None:
    table = get_fluid("glycerol-water 20%").table()
    grid = np.linspace(table.t_min, table.t_max, 12).reshape(3, 4)
    out = table(grid)
    assert set(out) == {"rho", "mu", "nu", "sigma", "c"}
    assert out["rho"].shape == (3, 4)
    assert np.isnan(out["c"]).all()  # no speed-of-sound model for glycerol-water
    scalar = table(float(grid[1, 2]))
    for key in out:
        assert_allclose(scalar[key], out[key][1, 2], rtol=1e-14, equal_nan=True)
    outside = table(np.array([table.t_min - 1.0, np.nan, table.t_max + 1e-6]))
    assert all(np.isnan(v).all() for v in outside.values())
    assert np.isnan(table(table.t_max + 1.0)["rho"])
    assert np.isfinite(table(table.t_max)["rho"]) and np.isfinite(table(table.t_min)["rho"])
    gas = get_fluid("air").table()(300.0)
    assert np.isnan(gas["sigma"]) and np.isfinite(gas["c"])


def test_table_call_is_fast() -> None:
    # Common practice for an optimiser's inner loop: a 36-element call must stay far below the
    # 200 us budget (typically 15-30 us).
    table: FluidTable = get_fluid("water").table()
    x = np.linspace(table.t_min, table.t_max, 36)
    best = min(timeit.repeat(lambda: table(x), number=200, repeat=5)) / 200
    assert best < 200e-6


# ----------------------------------------------------------------------- ranges and names
def test_water_range_freezing_and_boiling_messages() -> None:
    water = get_fluid("water")
    with pytest.raises(FluidRangeError, match="freez"):
        water.properties(K - 5.0)
    with pytest.raises(FluidRangeError, match=r"boils above 100\.0 degC at 101325 Pa"):
        water.properties(K + 105.0)
    lo, hi = water.valid_range()
    assert lo == pytest.approx(K, abs=1e-6)  # ice point of air-saturated water (common practice)
    # boiling point at 1 atm on ITS-90 is 99.974 degC (IAPWS-95, via CoolProp's saturation)
    assert hi - K == pytest.approx(99.974, abs=1e-3)
    assert water.valid_range(5e5)[1] > K + 150.0


@pytest.mark.parametrize(
    ("name", "temperature", "pattern"),
    [
        ("glycerol-water 20%", K + 120.0, "Cheng \\(2008\\)"),
        ("glycerol", K + 120.0, "outside 0-100 degC, the range of Cheng"),
        ("seawater", K - 3.0, "freezes"),
        ("nitrogen", 70.0, "condenses"),
        ("water", float("nan"), "finite"),
        ("water", -1.0, "positive"),
    ],
)
def test_range_errors(name: str, temperature: float, pattern: str) -> None:
    with pytest.raises(FluidRangeError, match=pattern):
        get_fluid(name).check(temperature)


def test_pressure_errors() -> None:
    with pytest.raises(FluidRangeError, match="pressure must be finite"):
        get_fluid("air").properties(300.0, -5.0)
    with pytest.raises(FluidRangeError, match="not a liquid"):
        get_fluid("water").valid_range(500.0)  # below the triple-point pressure 611.655 Pa


def test_unknown_fluid_suggests_closest_name() -> None:
    with pytest.raises(UnknownFluidError, match="did you mean 'water'"):
        get_fluid("wter")
    with pytest.raises(UnknownFluidError, match="did you mean 'glycerol-water 20%'"):
        get_fluid("glycerol-water 20")
    with pytest.raises(UnknownFluidError, match="no generic oil"):
        get_fluid("light oil")
    with pytest.raises(FluidRangeError, match="salinity"):
        get_fluid("seawater 60 g/kg")


@pytest.mark.parametrize(
    ("spelling", "canonical"),
    [
        ("Water", "water"),
        ("  sea   water ", "seawater"),
        ("seawater 35 psu", "seawater"),
        ("seawater 30 g/kg", "seawater 30 g/kg"),
        ("seawater 3.5%", "seawater 35 g/kg"),
        ("Glycerol-Water 60 %", "glycerol-water 60%"),
        ("glycerol water 20 wt%", "glycerol-water 20%"),
        ("glycerine", "glycerol-water 100%"),
        ("decane", "n-decane"),
        ("N-Dodecane", "n-dodecane"),
        ("Sulfur Hexafluoride", "sf6"),
        ("SF6", "sf6"),
        ("N2", "nitrogen"),
    ],
)
def test_names_accepted(spelling: str, canonical: str) -> None:
    # regression: the catalogue's documented spellings
    fluid = get_fluid(spelling)
    assert fluid.name == canonical
    assert fluid is get_fluid(canonical)
    assert fluid.references and fluid.phase in ("liquid", "gas")


def test_catalogue_and_to_dict() -> None:
    at_minus_10 = catalogue(K - 10.0)
    assert list(at_minus_10) == fluid_names()
    assert at_minus_10["water"] is None and at_minus_10["air"] is not None
    props = catalogue(K + 20.0)["water"]
    assert props is not None
    d = props.to_dict()
    assert set(d) == {
        "density",
        "dynamic_viscosity",
        "kinematic_viscosity",
        "surface_tension",
        "speed_of_sound",
        "vapour_pressure",
        "temperature",
        "pressure",
        "estimated",
    }
    assert d["estimated"] == {}
    assert_allclose(d["temperature"], 20.0, rtol=1e-12)
    # IAPWS-95 saturation pressure at 20 degC: 2339.2 Pa (Wagner & Pruss 2002, from memory)
    assert_allclose(d["vapour_pressure"], 2339.2, rtol=1e-4)


def test_import_does_not_load_coolprop_or_scipy() -> None:
    root = Path(__file__).resolve().parents[1]
    code = (
        "import compromise.physics.fluids, sys; "
        "print('CoolProp' in sys.modules, 'scipy' in sys.modules)"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], cwd=root, capture_output=True, text=True, check=True
    )
    assert out.stdout.split() == ["False", "False"]
