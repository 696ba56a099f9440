r"""Movable-bed and armour physics: settling, threshold of motion, transport, stability.

Pure functions of SI floats (numpy arrays work too; a scalar input gives a float). Notation:
grain diameter ``d`` [m], relative submerged density ``R`` = rho_s/rho - 1 [-] (written
Delta for armour), kinematic viscosity ``nu`` [m^2/s], shear velocity ``u_star`` [m/s],
gravity ``g`` [m/s^2] (standard gravity by default, as the rest of compromise).

Ratios are model over prototype.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

__all__ = [
    "KARMAN",
    "STANDARD_GRAVITY",
    "armour_density_for_stability",
    "armour_size_correction",
    "critical_shields_soulsby_whitehouse",
    "dimensionless_grain_size",
    "morphological_time_ratio",
    "particle_reynolds",
    "relative_density",
    "rouse_number",
    "settling_velocity_dietrich",
    "settling_velocity_ferguson_church",
    "settling_velocity_stokes",
    "shields_parameter",
    "stability_number",
    "transport_rate_mpm",
]

STANDARD_GRAVITY = 9.80665  # [m/s^2] CGPM (1901), the value compromise uses everywhere
KARMAN = 0.40  # [-] von Karman constant, the value the Rouse number is usually quoted with


def _out(value: Any) -> Any:
    """A float for a scalar result, the array otherwise."""
    arr = np.asarray(value, dtype=float)
    return float(arr) if arr.ndim == 0 else arr


def _a(value: Any) -> np.ndarray:
    return np.asarray(value, dtype=float)


def relative_density(rho_s: Any, rho: Any) -> Any:
    r"""Relative submerged density :math:`R = \rho_s/\rho - 1` [-].

    Parameters
    ----------
    rho_s, rho : float or ndarray
        Density of the grain (or stone) and of the fluid [kg/m^3].

    Examples
    --------
    >>> round(relative_density(2650.0, 1000.0), 3)
    1.65

    References
    ----------
    Shields (1936), Mitteilungen der Preussischen Versuchsanstalt fuer Wasserbau und
    Schiffbau 26 (the submerged weight of a grain); written Delta in Hudson (1959) and
    CIRIA, CUR, CETMEF (2007), The Rock Manual, ch. 5 (from memory).
    """
    return _out(_a(rho_s) / _a(rho) - 1.0)


def dimensionless_grain_size(d: Any, R: Any, nu: Any, g: float = STANDARD_GRAVITY) -> Any:
    r"""Dimensionless grain size :math:`D_* = d\,(gR/\nu^2)^{1/3}` [-].

    (Dietrich (1982) uses the cube of this number, :math:`R g d^3/\nu^2`.)

    Parameters
    ----------
    d : float or ndarray
        Grain diameter [m].
    R : float or ndarray
        Relative submerged density [-].
    nu : float or ndarray
        Kinematic viscosity of the fluid [m^2/s].
    g : float
        Gravity [m/s^2].

    Examples
    --------
    >>> round(dimensionless_grain_size(0.2e-3, 1.65, 1.0034e-6, g=9.81), 2)
    5.05

    References
    ----------
    Soulsby & Whitehouse (1997), Threshold of sediment motion in coastal environments,
    Proc. Pacific Coasts and Ports '97, Christchurch, 149-154; Soulsby (1997), Dynamics of
    Marine Sands, Thomas Telford, eq. 75 (from memory).
    """
    return _out(_a(d) * np.cbrt(g * _a(R) / _a(nu) ** 2))


def settling_velocity_stokes(d: Any, R: Any, nu: Any, g: float = STANDARD_GRAVITY) -> Any:
    r"""Stokes settling velocity of a small sphere :math:`w = R g d^2 / (18\nu)` [m/s].

    Valid for a particle Reynolds number :math:`w d/\nu` well below 1.

    Parameters
    ----------
    d, R, nu, g
        As in :func:`dimensionless_grain_size`.

    References
    ----------
    Stokes (1851), On the effect of the internal friction of fluids on the motion of
    pendulums, Trans. Cambridge Philos. Soc. 9, 8-106.
    """
    return _out(_a(R) * g * _a(d) ** 2 / (18.0 * _a(nu)))


def settling_velocity_ferguson_church(
    d: Any, R: Any, nu: Any, g: float = STANDARD_GRAVITY, c1: float = 18.0, c2: float = 1.0
) -> Any:
    r"""Settling velocity of a grain by Ferguson & Church (2004) [m/s].

    .. math:: w = \frac{R g d^2}{C_1 \nu + \sqrt{0.75\, C_2 R g d^3}}

    Tends to Stokes' law (with :math:`C_1 = 18`) for fine grains and to a constant drag
    coefficient :math:`C_2` for coarse ones.

    Parameters
    ----------
    d, R, nu, g
        As in :func:`dimensionless_grain_size`; ``d`` is the sieve diameter for the default
        constants.
    c1, c2 : float
        Shape constants. C1 = 18, C2 = 1 for natural grains with sieve diameters (the
        default); C1 = 20, C2 = 1.1 with nominal diameters; C2 = 0.4 for smooth spheres;
        C1 = 24, C2 = 1.2 the limit for very angular grains (from memory).

    Examples
    --------
    >>> round(settling_velocity_ferguson_church(1e-3, 1.65, 1.0034e-6, g=9.81) * 100, 2)
    12.62

    References
    ----------
    Ferguson & Church (2004), A simple universal equation for grain settling velocity,
    J. Sediment. Res. 74(6), 933-937, eq. 4.
    """
    d = _a(d)
    rg = _a(R) * g
    return _out(rg * d**2 / (c1 * _a(nu) + np.sqrt(0.75 * c2 * rg * d**3)))


def settling_velocity_dietrich(
    d: Any,
    R: Any,
    nu: Any,
    g: float = STANDARD_GRAVITY,
    csf: float = 1.0,
    powers: float = 6.0,
) -> Any:
    r"""Settling velocity of a grain by Dietrich (1982) [m/s].

    With :math:`D_* = R g d^3/\nu^2`, :math:`l = \log_{10} D_*` and
    :math:`W_* = w^3/(R g \nu)`:

    .. math::
        R_1 &= -3.76715 + 1.92944\,l - 0.09815\,l^2 - 0.00575\,l^3 + 0.00056\,l^4 \\
        R_2 &= \log_{10}\!\Bigl(1 - \frac{1 - CSF}{0.85}\Bigr)
               - (1 - CSF)^{2.3} \tanh(l - 4.6)
               + 0.3\,(0.5 - CSF)(1 - CSF)^2 (l - 4.6) \\
        R_3 &= \Bigl[0.65 - \frac{CSF}{2.83}\tanh(l - 4.6)\Bigr]^{1 + (3.5 - P)/2.5} \\
        W_* &= R_3\, 10^{R_1 + R_2}

    and :math:`W_* = D_*^2/5832` (Stokes) for :math:`D_* < 0.05`. A sphere is CSF = 1,
    P = 6 (then :math:`R_2 = 0`, :math:`R_3 = 1`); natural sand is about CSF = 0.7, P = 3.5.

    Parameters
    ----------
    d, R, nu, g
        As in :func:`dimensionless_grain_size`; ``d`` is the nominal diameter.
    csf : float
        Corey shape factor, from about 0.2 (flat) to 1 (sphere).
    powers : float
        Powers roundness index, 2 (angular) to 6 (perfectly rounded).

    Examples
    --------
    >>> round(settling_velocity_dietrich(1e-4, 1.65, 1.0034e-6, g=9.81) * 100, 3)
    0.746

    References
    ----------
    Dietrich (1982), Settling velocity of natural particles, Water Resour. Res. 18(6),
    1615-1626, eqs. 8-10.
    """
    d = _a(d)
    rg = _a(R) * g
    nu = _a(nu)
    d_star = rg * d**3 / nu**2
    l = np.log10(np.maximum(d_star, 0.05))  # noqa: E741  (the paper's symbol)
    r1 = -3.76715 + 1.92944 * l - 0.09815 * l**2 - 0.00575 * l**3 + 0.00056 * l**4
    one_c = 1.0 - csf
    r2 = (
        math.log10(1.0 - one_c / 0.85)
        - one_c**2.3 * np.tanh(l - 4.6)
        + 0.3 * (0.5 - csf) * one_c**2 * (l - 4.6)
    )
    r3 = (0.65 - (csf / 2.83) * np.tanh(l - 4.6)) ** (1.0 + (3.5 - powers) / 2.5)
    w_star = np.where(d_star < 0.05, d_star**2 / 5832.0, r3 * 10.0 ** (r1 + r2))
    return _out(np.cbrt(w_star * rg * nu))


def critical_shields_soulsby_whitehouse(d_star: Any) -> Any:
    r"""Critical Shields parameter for the threshold of motion, Soulsby & Whitehouse (1997).

    .. math:: \theta_{cr} = \frac{0.30}{1 + 1.2 D_*} + 0.055\,[1 - \exp(-0.020 D_*)]

    Parameters
    ----------
    d_star : float or ndarray
        Dimensionless grain size :math:`D_*` of :func:`dimensionless_grain_size`.

    Examples
    --------
    >>> round(critical_shields_soulsby_whitehouse(25.24), 4)
    0.0314

    References
    ----------
    Soulsby & Whitehouse (1997), Threshold of sediment motion in coastal environments,
    Proc. Pacific Coasts and Ports '97, Christchurch, 149-154; Soulsby (1997), Dynamics of
    Marine Sands, eq. 77 (from memory).
    """
    ds = _a(d_star)
    return _out(0.30 / (1.0 + 1.2 * ds) + 0.055 * (1.0 - np.exp(-0.020 * ds)))


def shields_parameter(u_star: Any, d: Any, R: Any, g: float = STANDARD_GRAVITY) -> Any:
    r"""Shields parameter :math:`\theta = u_*^2/(R g d)` [-].

    Parameters
    ----------
    u_star : float or ndarray
        Bed shear velocity [m/s].
    d, R, g
        As in :func:`dimensionless_grain_size`.

    References
    ----------
    Shields (1936), Anwendung der Aehnlichkeitsmechanik und der Turbulenzforschung auf die
    Geschiebebewegung, Mitt. Preuss. Versuchsanst. Wasserbau Schiffbau 26.
    """
    return _out(_a(u_star) ** 2 / (_a(R) * g * _a(d)))


def particle_reynolds(u_star: Any, d: Any, nu: Any) -> Any:
    r"""Particle (grain) Reynolds number :math:`Re_* = u_* d/\nu` [-].

    References
    ----------
    Shields (1936) (the abscissa of his diagram); ASCE (2008), Sedimentation Engineering,
    Manual of Practice 110, appendix C (from memory).
    """
    return _out(_a(u_star) * _a(d) / _a(nu))


def rouse_number(w_s: Any, u_star: Any, kappa: float = KARMAN) -> Any:
    r"""Rouse number :math:`P = w_s/(\kappa u_*)` [-]: suspension for P below about 2.5.

    Parameters
    ----------
    w_s : float or ndarray
        Settling velocity [m/s].
    u_star : float or ndarray
        Shear velocity [m/s].
    kappa : float
        Von Karman constant (0.40).

    References
    ----------
    Rouse (1937), Modern conceptions of the mechanics of fluid turbulence, Trans. ASCE 102,
    463-543.
    """
    return _out(_a(w_s) / (kappa * _a(u_star)))


def stability_number(h_s: Any, delta: Any, d_n50: Any) -> Any:
    r"""Stability number of an armour layer :math:`N_s = H_s/(\Delta D_{n50})` [-].

    Parameters
    ----------
    h_s : float or ndarray
        Significant wave height [m].
    delta : float or ndarray
        Relative submerged density of the stone, :math:`\rho_s/\rho_w - 1` [-].
    d_n50 : float or ndarray
        Median nominal diameter, the side of the cube of the median stone mass [m].

    Examples
    --------
    >>> round(stability_number(3.0, 1.585, 1.2), 3)
    1.577

    References
    ----------
    Hudson (1959), Laboratory investigation of rubble-mound breakwaters, J. Waterways
    Harbors Div. ASCE 85(WW3), 93-121; CIRIA, CUR, CETMEF (2007), The Rock Manual,
    sec. 5.2.2 (from memory).
    """
    return _out(_a(h_s) / (_a(delta) * _a(d_n50)))


def armour_size_correction(delta_prototype: Any, delta_model: Any) -> Any:
    r"""Factor on the geometrically scaled :math:`D_{n50}` that keeps the stability number.

    Equal :math:`N_s` in model and prototype needs :math:`D_{n,r} = H_r/\Delta_r`; with
    :math:`H_r = L_r` (Froude) the model stone is :math:`L_r D_{n,p}` times

    .. math:: \frac{D_{n,r}}{L_r} = \frac{\Delta_p}{\Delta_m}

    e.g. quarry stone of 2650 kg/m^3 in seawater (1025 kg/m^3, Delta 1.585) modelled with
    the same stone in fresh water (Delta 1.65): 0.961, a model stone 4 % smaller than
    geometric. The stone mass scales with the cube of the factor (and the density ratio).

    Parameters
    ----------
    delta_prototype, delta_model : float or ndarray
        Relative submerged density of the armour in prototype and model [-].

    Examples
    --------
    >>> round(armour_size_correction(2650 / 1025 - 1, 1.65), 3)
    0.961

    References
    ----------
    Hudson (1959), J. Waterways Harbors Div. ASCE 85(WW3), 93-121; Hughes (1993), Physical
    Models and Laboratory Techniques in Coastal Engineering, ch. 7; CIRIA, CUR, CETMEF
    (2007), The Rock Manual, sec. 5.2 (all from memory).
    """
    return _out(_a(delta_prototype) / _a(delta_model))


def armour_density_for_stability(delta_prototype: Any, rho_model_water: Any) -> Any:
    r"""Model stone density [kg/m^3] that keeps :math:`\Delta` (and so :math:`N_s` at a
    geometric :math:`D_{n50}`): :math:`\rho_s = \rho_w (1 + \Delta_p)`.

    Examples
    --------
    >>> round(armour_density_for_stability(2650 / 1025 - 1, 998.2))
    2581

    References
    ----------
    Hudson (1959); Hughes (1993), ch. 7 (from memory): the stability number is the only
    density effect kept, so equal Delta gives equal Ns.
    """
    return _out(_a(rho_model_water) * (1.0 + _a(delta_prototype)))


def transport_rate_mpm(
    theta: Any, theta_cr: Any, R: Any, d: Any, g: float = STANDARD_GRAVITY
) -> Any:
    r"""Volumetric bed-load rate per unit width by Meyer-Peter & Mueller (1948) [m^2/s].

    .. math:: q_s = 8\,(\theta - \theta_{cr})^{3/2} \sqrt{R g d^3}

    and zero at and below the threshold. (The original paper uses
    :math:`\theta_{cr} = 0.047`; here it is a parameter, e.g. from
    :func:`critical_shields_soulsby_whitehouse`.)

    Parameters
    ----------
    theta, theta_cr : float or ndarray
        Shields parameter of the flow and at the threshold [-].
    R, d, g
        As in :func:`dimensionless_grain_size`.

    References
    ----------
    Meyer-Peter & Mueller (1948), Formulas for bed-load transport, Proc. 2nd Meeting IAHR,
    Stockholm, 39-64.
    """
    excess = np.maximum(_a(theta) - _a(theta_cr), 0.0)
    return _out(8.0 * excess**1.5 * np.sqrt(_a(R) * g * _a(d) ** 3))


def morphological_time_ratio(
    vertical_ratio: Any,
    horizontal_ratio: Any,
    transport_ratio: Any,
    porosity_ratio: Any = 1.0,
) -> Any:
    r"""Ratio of bed-change times, model over prototype [-].

    From the Exner equation :math:`(1 - p)\,\partial z/\partial t + \partial q_s/\partial x
    = 0`, a bed level change of scale :math:`Y_r` over a reach of scale :math:`X_r` takes

    .. math:: T_{m,r} = \frac{(1 - p)_r\, Y_r X_r}{q_{s,r}}

    Assumptions: bed load per unit width only (no suspended-load storage or exchange), the
    same form of the transport law in model and prototype, one representative grain size,
    and equal bed porosity unless ``porosity_ratio`` says otherwise. Compare the result with
    the hydraulic time ratio (:math:`X_r/\sqrt{Y_r}` under Froude scaling): where they
    differ, a movable-bed run's duration follows this one and the hydrograph is distorted
    in time.

    Parameters
    ----------
    vertical_ratio, horizontal_ratio : float or ndarray
        Length ratios :math:`Y_r` and :math:`X_r` (equal in an undistorted model).
    transport_ratio : float or ndarray
        Ratio :math:`q_{s,r}` of the volumetric transport rates per unit width, e.g. from
        :func:`transport_rate_mpm` in model and prototype.
    porosity_ratio : float or ndarray
        Ratio of :math:`(1 - p)` of the beds (1: equal porosity).

    Examples
    --------
    >>> round(morphological_time_ratio(1 / 50, 1 / 200, 1 / 5000), 2)
    0.5

    References
    ----------
    Exner (1925), Ueber die Wechselwirkung zwischen Wasser und Geschiebe in Fluessen,
    Sitzungsber. Akad. Wiss. Wien 134; de Vries (1993), Use of models for river problems,
    UNESCO Studies and Reports in Hydrology 51 (from memory).
    """
    return _out(
        _a(porosity_ratio) * _a(vertical_ratio) * _a(horizontal_ratio) / _a(transport_ratio)
    )
