"""Validation tests of compromise.physics.sediment against published formulas and check values.

Each check names its source. Check values were computed from the published formulas for quartz
(R = 1.65) in water at 20 degC (nu = 1.0034e-6 m^2/s, IAPWS; checked below against the
``iapws`` package and the fluid catalogue) with g = 9.81 m/s^2; they are quoted to the digits
given, so the tolerance is half a unit of the last digit.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from numpy.testing import assert_allclose

from compromise.physics.correlations import seawater_density_eos80
from compromise.physics.fluids import get_fluid
from compromise.physics.sediment import (
    KARMAN,
    STANDARD_GRAVITY,
    armour_density_for_stability,
    armour_size_correction,
    critical_shields_soulsby_whitehouse,
    dimensionless_grain_size,
    morphological_time_ratio,
    particle_reynolds,
    relative_density,
    rouse_number,
    settling_velocity_dietrich,
    settling_velocity_ferguson_church,
    settling_velocity_stokes,
    shields_parameter,
    stability_number,
    transport_rate_mpm,
)
from compromise.units import ZERO_CELSIUS

NU_20 = 1.0034e-6  # [m^2/s] water at 20 degC, IAPWS 2008 viscosity / IAPWS-95 density
R_QUARTZ = 1.65  # [-] quartz 2650 kg/m^3 in water of 1000 kg/m^3
G_CHECK = 9.81  # [m/s^2] the g of the check values


def _within_last_digit(value: float, quoted: float, decimals: int) -> None:
    assert abs(value - quoted) <= 0.5 * 10.0**-decimals + 1e-12, (value, quoted)


def test_check_viscosity_is_water_at_20_degC_iapws():
    """The check values' nu: IAPWS-95 density and IAPWS 2008 viscosity (``iapws`` package)
    and the project's own fluid catalogue."""
    iapws = pytest.importorskip("iapws")
    state = iapws.IAPWS95(T=ZERO_CELSIUS + 20.0, P=0.101325)
    assert state.nu == pytest.approx(NU_20, rel=1e-4)
    water = get_fluid("water").properties(ZERO_CELSIUS + 20.0, 101325.0)
    assert water.kinematic_viscosity == pytest.approx(NU_20, rel=1e-4)


def test_relative_density_quartz():
    """Quartz 2650 kg/m^3 in fresh water: R = 1.65 (Soulsby 1997, Dynamics of Marine Sands,
    from memory)."""
    assert relative_density(2650.0, 1000.0) == pytest.approx(1.65)
    assert_allclose(relative_density(np.array([2650.0, 1050.0]), 1000.0), [1.65, 0.05])


def test_ferguson_church_2004_check_values():
    """Ferguson & Church (2004), J. Sediment. Res. 74:933, eq. 4 with C1 = 18, C2 = 1:
    0.751 cm/s at 0.1 mm, 7.097 at 0.5 mm, 12.62 at 1 mm, 19.64 at 2 mm."""
    for d, cm_s, decimals in (
        (1e-4, 0.751, 3),
        (5e-4, 7.097, 3),
        (1e-3, 12.62, 2),
        (2e-3, 19.64, 2),
    ):
        w = settling_velocity_ferguson_church(d, R_QUARTZ, NU_20, g=G_CHECK, c1=18.0, c2=1.0)
        _within_last_digit(w * 100.0, cm_s, decimals)
    # the project's standard gravity moves the fourth digit only
    w = settling_velocity_ferguson_church(1e-3, R_QUARTZ, NU_20)
    assert w * 100.0 == pytest.approx(12.62, abs=0.005)


def test_ferguson_church_2004_tends_to_stokes_1851_for_fine_grains():
    """Stokes (1851): w = R g d^2 / (18 nu); Ferguson & Church with C1 = 18 reduces to it as
    d -> 0 (their eq. 4, first term of the denominator)."""
    for d, rel in ((1e-6, 3e-4), (1e-5, 7e-3)):
        fc = settling_velocity_ferguson_church(d, R_QUARTZ, NU_20)
        stokes = settling_velocity_stokes(d, R_QUARTZ, NU_20)
        assert fc == pytest.approx(stokes, rel=rel)
        assert fc < stokes  # the drag term only slows the grain
    # Stokes at 0.01 mm, by hand: 1.65 * 9.81 * 1e-10 / (18 * 1.0034e-6)
    assert settling_velocity_stokes(1e-5, R_QUARTZ, NU_20, g=G_CHECK) == pytest.approx(
        1.65 * 9.81 * 1e-10 / (18 * 1.0034e-6), rel=1e-12
    )


def test_ferguson_church_2004_tends_to_constant_drag_for_coarse_grains():
    """Ferguson & Church (2004): for large grains the drag coefficient tends to C2, i.e.
    w -> sqrt(4 R g d / (3 C2)) (Newton drag law)."""
    for c2 in (1.0, 1.2, 0.4):
        d = 0.5
        w = settling_velocity_ferguson_church(d, R_QUARTZ, NU_20, c2=c2)
        assert w == pytest.approx(
            math.sqrt(4 * R_QUARTZ * STANDARD_GRAVITY * d / (3 * c2)), rel=1e-3
        )


def test_dietrich_1982_check_values():
    """Dietrich (1982), Water Resour. Res. 18:1615, eqs. 8-10, cm/s. Sphere (CSF 1, P 6):
    0.746 at 0.1 mm, 7.386 at 0.5 mm, 15.49 at 1 mm, 28.27 at 2 mm; natural sand (CSF 0.7,
    P 3.5): 6.373 at 0.5 mm, 12.37 at 1 mm, 19.35 at 2 mm."""
    sphere = ((1e-4, 0.746, 3), (5e-4, 7.386, 3), (1e-3, 15.49, 2), (2e-3, 28.27, 2))
    for d, cm_s, decimals in sphere:
        w = settling_velocity_dietrich(d, R_QUARTZ, NU_20, g=G_CHECK)
        _within_last_digit(w * 100.0, cm_s, decimals)
    natural = ((5e-4, 6.373, 3), (1e-3, 12.37, 2), (2e-3, 19.35, 2))
    for d, cm_s, decimals in natural:
        w = settling_velocity_dietrich(d, R_QUARTZ, NU_20, g=G_CHECK, csf=0.7, powers=3.5)
        _within_last_digit(w * 100.0, cm_s, decimals)


def test_dietrich_1982_stokes_range():
    """Dietrich (1982): below D* = 0.05 (his D* = R g d^3/nu^2), W* = D*^2/5832, which is
    Stokes (1851) exactly; the fitted curve joins it closely at D* = 0.05."""
    d_small = 1e-6
    assert settling_velocity_dietrich(d_small, R_QUARTZ, NU_20) == pytest.approx(
        settling_velocity_stokes(d_small, R_QUARTZ, NU_20), rel=1e-12
    )
    d_joint = (0.05 * NU_20**2 / (R_QUARTZ * STANDARD_GRAVITY)) ** (1 / 3)
    below = settling_velocity_dietrich(d_joint * 0.999, R_QUARTZ, NU_20)
    above = settling_velocity_dietrich(d_joint * 1.001, R_QUARTZ, NU_20)
    assert above == pytest.approx(below, rel=0.05)


def test_settling_velocities_take_arrays():
    """Vectorised form equals the scalar form (Ferguson & Church 2004; Dietrich 1982)."""
    d = np.array([1e-4, 1e-3])
    fc = settling_velocity_ferguson_church(d, R_QUARTZ, NU_20)
    di = settling_velocity_dietrich(d, R_QUARTZ, NU_20)
    assert isinstance(fc, np.ndarray) and fc.shape == (2,)
    assert_allclose(fc, [settling_velocity_ferguson_church(x, R_QUARTZ, NU_20) for x in d])
    assert_allclose(di, [settling_velocity_dietrich(x, R_QUARTZ, NU_20) for x in d])
    assert isinstance(settling_velocity_ferguson_church(1e-4, R_QUARTZ, NU_20), float)


def test_soulsby_whitehouse_1997_check_values():
    """Soulsby & Whitehouse (1997), Pacific Coasts and Ports '97: D* and theta_cr for quartz
    at 20 degC: 0.2 mm -> 5.05, 0.0478; 1 mm -> 25.24, 0.0314; 5 mm -> 126.2, 0.0526."""
    for d, d_star, theta_cr in ((2e-4, 5.05, 0.0478), (1e-3, 25.24, 0.0314), (5e-3, 126.2, 0.0526)):
        ds = dimensionless_grain_size(d, R_QUARTZ, NU_20, g=G_CHECK)
        decimals = 1 if d_star > 100 else 2
        _within_last_digit(ds, d_star, decimals)
        _within_last_digit(critical_shields_soulsby_whitehouse(ds), theta_cr, 4)


def test_soulsby_whitehouse_1997_limits():
    """Soulsby & Whitehouse (1997): theta_cr -> 0.30 as D* -> 0 and -> 0.055 for coarse
    grains (the constant Shields value for fully rough flow), with its minimum at D* 10-30."""
    assert critical_shields_soulsby_whitehouse(0.0) == pytest.approx(0.30)
    assert critical_shields_soulsby_whitehouse(1e5) == pytest.approx(0.055, rel=1e-4)
    ds = np.geomspace(1.0, 1000.0, 400)
    theta = critical_shields_soulsby_whitehouse(ds)
    assert 10.0 < ds[np.argmin(theta)] < 30.0


def test_shields_1936_definition():
    """Shields (1936): theta = tau_b / ((rho_s - rho) g d) with tau_b = rho u*^2."""
    rho, rho_s, u_star, d = 998.2, 2650.0, 0.03, 4e-4
    tau_b = rho * u_star**2
    expected = tau_b / ((rho_s - rho) * STANDARD_GRAVITY * d)
    assert shields_parameter(u_star, d, relative_density(rho_s, rho)) == pytest.approx(expected)


def test_particle_reynolds_and_rouse_number():
    """Re* = u* d / nu (Shields 1936); Rouse (1937): P = w_s / (kappa u*) with kappa = 0.40."""
    assert KARMAN == 0.40
    assert particle_reynolds(0.05, 1e-3, NU_20) == pytest.approx(0.05e-3 / NU_20)
    assert rouse_number(0.01, 0.05) == pytest.approx(0.5)
    assert rouse_number(0.01, 0.05, kappa=0.41) == pytest.approx(0.01 / (0.41 * 0.05))


def test_hudson_1959_stability_number():
    """Hudson (1959): W = rho_s g H^3 / (K_D Delta^3 cot(alpha)), i.e. Ns = (K_D cot alpha)^(1/3);
    rough angular quarry stone, two layers, non-breaking waves on the trunk: K_D = 4
    (Shore Protection Manual 1984, Table 7-8, from memory); at cot(alpha) = 2 Ns = 2."""
    rho_s, rho_w, h = 2650.0, 1025.0, 3.0
    delta = relative_density(rho_s, rho_w)
    weight = rho_s * STANDARD_GRAVITY * h**3 / (4.0 * delta**3 * 2.0)
    d_n50 = (weight / (rho_s * STANDARD_GRAVITY)) ** (1 / 3)
    assert stability_number(h, delta, d_n50) == pytest.approx(2.0)


def test_armour_fresh_water_model_of_seawater_prototype_keeps_stability_number():
    """Hudson (1959) / The Rock Manual (2007): equal Ns needs Dn_r = H_r / Delta_r. Seawater
    density from EOS-80 (Millero & Poisson 1981) at 15 degC, S 35; fresh water from the
    catalogue (IAPWS-95) at 20 degC. The corrected model stone keeps Ns exactly; the same
    stone scaled geometrically would be about 4 % too stable."""
    rho_sea = float(seawater_density_eos80(ZERO_CELSIUS + 15.0, 35.16504))
    rho_fresh = get_fluid("water").properties(ZERO_CELSIUS + 20.0, 101325.0).density
    d_p = relative_density(2650.0, rho_sea)
    d_m = relative_density(2650.0, rho_fresh)
    factor = armour_size_correction(d_p, d_m)
    assert 0.955 < factor < 0.965
    scale, h_p, dn_p = 1 / 40, 4.0, 1.6
    dn_m = scale * dn_p * factor
    assert stability_number(scale * h_p, d_m, dn_m) == pytest.approx(
        stability_number(h_p, d_p, dn_p)
    )
    # or keep the size and choose the stone density
    rho_s_model = armour_density_for_stability(d_p, rho_fresh)
    assert relative_density(rho_s_model, rho_fresh) == pytest.approx(d_p)
    assert rho_s_model < 2650.0


def test_meyer_peter_mueller_1948_zero_below_critical_and_value():
    """Meyer-Peter & Mueller (1948): Phi = q_s / sqrt(R g d^3) = 8 (theta - 0.047)^1.5, and no
    transport at or below the threshold."""
    assert transport_rate_mpm(0.03, 0.047, R_QUARTZ, 1e-3) == 0.0
    assert transport_rate_mpm(0.047, 0.047, R_QUARTZ, 1e-3) == 0.0
    theta = np.array([0.01, 0.147])
    q = transport_rate_mpm(theta, 0.047, R_QUARTZ, 1e-3)
    phi = q / math.sqrt(R_QUARTZ * STANDARD_GRAVITY * 1e-9)
    assert_allclose(phi, [0.0, 8.0 * 0.1**1.5])


def test_morphological_time_equals_froude_time_for_geometric_sediment():
    """Exner (1925) with Meyer-Peter & Mueller (1948): in an undistorted Froude model with the
    prototype's sediment scaled geometrically (same R, d_r = L_r, hence the same theta and
    theta_cr in the rough range), q_s,r = L_r^1.5 and the bed-change time ratio equals the
    hydraulic one, L_r^0.5. With a lighter material (R_r < 1, d_r R_r = L_r) it is R_r times
    the hydraulic ratio (computed from the same laws)."""
    scale = 1 / 25
    d_p = 20e-3
    theta, theta_cr = 0.10, 0.05
    q_p = transport_rate_mpm(theta, theta_cr, R_QUARTZ, d_p)
    q_m = transport_rate_mpm(theta, theta_cr, R_QUARTZ, scale * d_p)
    t_m = morphological_time_ratio(scale, scale, q_m / q_p)
    assert t_m == pytest.approx(math.sqrt(scale))
    r_r = 0.4 / R_QUARTZ  # e.g. a material of 1400 kg/m^3 against quartz
    d_m = scale * d_p / r_r
    q_m = transport_rate_mpm(theta, theta_cr, 0.4, d_m)
    t_m = morphological_time_ratio(scale, scale, q_m / q_p)
    assert t_m == pytest.approx(r_r * math.sqrt(scale))
    # porosity: a looser model bed (1 - p smaller) changes faster
    assert morphological_time_ratio(scale, scale, q_m / q_p, porosity_ratio=0.9) == pytest.approx(
        0.9 * t_m
    )
