"""Property correlations of liquids, each with its source: water, seawater, glycerol-water.

Pure functions of temperature [K] (and salinity or mass fraction) in SI units; numpy arrays
work too. :mod:`compromise.physics.fluids` builds its catalogue on them.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from compromise.units import ZERO_CELSIUS

ATMOSPHERE = 101325.0  # [Pa]
STANDARD_SALINITY = 35.16504  # [g/kg] absolute salinity of standard seawater, SP = 35
_SP_PER_SA = 35.0 / STANDARD_SALINITY  # practical per absolute salinity (Millero et al. 2008)


def water_surface_tension_iapws(temperature: Any) -> Any:
    r"""Surface tension of water against its vapour [N/m], IAPWS R1-76(2014).

    .. math:: \sigma = 235.8\,\tau^{1.256}(1 - 0.625\,\tau)\ \mathrm{mN/m},
              \quad \tau = 1 - T/647.096

    Valid from the triple point to the critical point.

    Parameters
    ----------
    temperature : float or ndarray
        [K]

    Examples
    --------
    >>> round(float(water_surface_tension_iapws(293.15)) * 1e3, 2)
    72.74

    References
    ----------
    IAPWS R1-76(2014), Revised Release on Surface Tension of Ordinary Water Substance;
    Vargaftik, Volkov & Voljak (1983), J. Phys. Chem. Ref. Data 12, 817.
    """
    tau = 1.0 - np.asarray(temperature, dtype=float) / 647.096
    return 235.8e-3 * tau**1.256 * (1.0 - 0.625 * tau)


def seawater_density_eos80(temperature: Any, salinity: Any) -> Any:
    r"""Density of seawater at one standard atmosphere [kg/m^3], UNESCO EOS-80.

    :math:`\rho = \rho_{SMOW}(t) + A(t) S + B(t) S^{1.5} + C S^2` with practical salinity
    :math:`S = S_A \cdot 35/35.16504` and :math:`t_{68} = 1.00024\,t_{90}` in degC. Valid
    -2 to 40 degC, S 0-42. Within 1e-5 of TEOS-10 at 1 atm (tested against ``gsw``).

    Parameters
    ----------
    temperature, salinity : float or ndarray
        Temperature [K] and absolute salinity [g/kg].

    Examples
    --------
    >>> round(float(seawater_density_eos80(293.15, 35.16504)), 2)
    1024.76

    References
    ----------
    Millero & Poisson (1981), International one-atmosphere equation of state of seawater,
    Deep-Sea Res. 28A, 625; UNESCO (1981), Tech. Pap. Mar. Sci. 36. Salinity conversion:
    Millero et al. (2008), Deep-Sea Res. I 55, 50.
    """
    t = 1.00024 * (np.asarray(temperature, dtype=float) - ZERO_CELSIUS)
    s = np.asarray(salinity, dtype=float) * _SP_PER_SA
    rho_w = 999.842594 + t * (6.793952e-2 + t * (-9.095290e-3 + t * (1.001685e-4
            + t * (-1.120083e-6 + t * 6.536332e-9))))  # fmt: skip
    a = 8.24493e-1 + t * (-4.0899e-3 + t * (7.6438e-5 + t * (-8.2467e-7 + t * 5.3875e-9)))
    b = -5.72466e-3 + t * (1.0227e-4 + t * -1.6546e-6)
    return rho_w + a * s + b * s**1.5 + 4.8314e-4 * s**2


def seawater_viscosity_sharqawy(temperature: Any, salinity: Any) -> Any:
    r"""Dynamic viscosity of seawater [Pa s], Sharqawy et al. (2010) eqs. 22-23.

    :math:`\mu = \mu_w (1 + A S + B S^2)`, S in kg/kg,
    :math:`A = 1.541 + 1.998\times10^{-2} t - 9.52\times10^{-5} t^2`,
    :math:`B = 7.974 - 7.561\times10^{-2} t + 4.724\times10^{-4} t^2`,
    :math:`\mu_w = 4.2844\times10^{-5} + [0.157 (t + 64.993)^2 - 91.296]^{-1}`, t in degC.
    Valid 0-180 degC, 0-150 g/kg, accuracy about 1.5 %.

    Parameters
    ----------
    temperature, salinity : float or ndarray
        Temperature [K] and absolute salinity [g/kg].

    References
    ----------
    Sharqawy, Lienhard & Zubair (2010), Thermophysical properties of seawater: a review of
    existing correlations and data, Desalination and Water Treatment 16, 354, eqs. 22-23.
    """
    t = np.asarray(temperature, dtype=float) - ZERO_CELSIUS
    s = np.asarray(salinity, dtype=float) * 1e-3
    mu_w = 4.2844e-5 + 1.0 / (0.157 * (t + 64.993) ** 2 - 91.296)
    a = 1.541 + 1.998e-2 * t - 9.52e-5 * t**2
    b = 7.974 - 7.561e-2 * t + 4.724e-4 * t**2
    return mu_w * (1.0 + a * s + b * s**2)


def seawater_surface_tension_nayar(temperature: Any, salinity: Any) -> Any:
    r"""Surface tension of seawater against air [N/m], Nayar et al. (2014).

    :math:`\sigma = \sigma_w (1 + 3.766\times10^{-4} S + 2.347\times10^{-6} S t)`, S in g/kg,
    t in degC, :math:`\sigma_w` IAPWS R1-76(2014). Valid 0-90 degC, 0-131 g/kg. The
    coefficients and the range are from memory (not checked against the paper).

    Parameters
    ----------
    temperature, salinity : float or ndarray
        Temperature [K] and absolute salinity [g/kg].

    References
    ----------
    Nayar, Panchanathan, McKinley & Lienhard (2014), Surface tension of seawater,
    J. Phys. Chem. Ref. Data 43, 043103.
    """
    t = np.asarray(temperature, dtype=float) - ZERO_CELSIUS
    s = np.asarray(salinity, dtype=float)
    return water_surface_tension_iapws(temperature) * (1.0 + 3.766e-4 * s + 2.347e-6 * s * t)


def seawater_sound_speed_coppens(temperature: Any, salinity: Any) -> Any:
    r"""Speed of sound in seawater at the surface [m/s], Coppens (1981) (from memory).

    :math:`c = 1449.05 + 45.7\theta - 5.21\theta^2 + 0.23\theta^3
    + (1.333 - 0.126\theta + 0.009\theta^2)(S - 35)`, :math:`\theta = t/10`, t in degC,
    S practical salinity. Valid 0-35 degC, S 0-45; within 0.4 m/s of TEOS-10 from -2 to
    40 degC (tested against ``gsw``).

    Parameters
    ----------
    temperature, salinity : float or ndarray
        Temperature [K] and absolute salinity [g/kg].

    References
    ----------
    Coppens (1981), Simple equations for the speed of sound in Neptunian waters,
    J. Acoust. Soc. Am. 69, 862 (depth term omitted: depth zero).
    """
    th = (np.asarray(temperature, dtype=float) - ZERO_CELSIUS) / 10.0
    s = np.asarray(salinity, dtype=float) * _SP_PER_SA
    return (1449.05 + th * (45.7 + th * (-5.21 + th * 0.23))
            + (1.333 + th * (-0.126 + th * 0.009)) * (s - 35.0))  # fmt: skip


def seawater_freezing_temperature(salinity: float, pressure: float = ATMOSPHERE) -> float:
    r"""Freezing temperature of seawater [K], UNESCO (1983) (coefficients from memory).

    :math:`t_f = -0.0575 S + 1.710523\times10^{-3} S^{1.5} - 2.154996\times10^{-4} S^2
    - 7.53\times10^{-4} p` in degC, S practical salinity, p sea pressure [dbar]. Within 3 mK
    of TEOS-10 (``gsw.t_freezing``, air-saturated) for S up to 40 (tested).

    Parameters
    ----------
    salinity, pressure : float
        Absolute salinity [g/kg] and absolute pressure [Pa].

    References
    ----------
    Millero (1978), Freezing point of seawater, UNESCO Tech. Pap. Mar. Sci. 28; Fofonoff &
    Millard (1983), Algorithms for computation of fundamental properties of seawater,
    UNESCO Tech. Pap. Mar. Sci. 44.
    """
    s = salinity * _SP_PER_SA
    p = (pressure - ATMOSPHERE) * 1e-4
    return ZERO_CELSIUS - 0.0575 * s + 1.710523e-3 * s**1.5 - 2.154996e-4 * s**2 - 7.53e-4 * p


def water_vapour_pressure_wagner_pruss(temperature: float) -> float:
    r"""Saturation pressure of pure water [Pa], the IAPWS auxiliary equation.

    .. math:: \ln(p_s/p_c) = (T_c/T)(a_1\tau + a_2\tau^{1.5} + a_3\tau^3 + a_4\tau^{3.5}
              + a_5\tau^4 + a_6\tau^{7.5}),\quad \tau = 1 - T/T_c

    Valid from the triple point to the critical point; used here a few kelvin below the triple
    point too (supercooled seawater near its freezing point), where it extrapolates smoothly.

    References
    ----------
    Wagner, W., Pruss, A. (1993). International equations for the saturation properties of
    ordinary water substance, revised according to the international temperature scale of
    1990. *J. Phys. Chem. Ref. Data* 22(3), 783-787, eq. 1 (coefficients from memory).

    Examples
    --------
    >>> round(water_vapour_pressure_wagner_pruss(373.124), -1)
    101320.0
    """
    tc, pc = 647.096, 22.064e6
    tau = 1.0 - temperature / tc
    a = (-7.85951783, 1.84408259, -11.7866497, 22.6807411, -15.9618719, 1.80122502)
    e = (1.0, 1.5, 3.0, 3.5, 4.0, 7.5)
    return pc * math.exp(tc / temperature * sum(ai * tau**ei for ai, ei in zip(a, e, strict=True)))


def glycerol_water_viscosity_cheng(temperature: Any, mass_fraction: Any) -> Any:
    r"""Dynamic viscosity of glycerol-water mixtures [Pa s], Cheng (2008) eqs. 21-22.

    :math:`\mu = \mu_w^\alpha \mu_g^{1-\alpha}`,
    :math:`\alpha = 1 - C_m + a b C_m (1 - C_m) / [a C_m + b (1 - C_m)]`,
    :math:`a = 0.705 - 0.0017 t`, :math:`b = (4.9 + 0.036 t) a^{2.5}`,
    :math:`\mu_w = 1.790 \exp[(-1230 - t) t / (36100 + 360 t)]`,
    :math:`\mu_g = 12100 \exp[(-1233 + t) t / (9900 + 70 t)]` in cP, t in degC.
    Valid 0-100 degC, 0-100 % glycerol by mass.

    Parameters
    ----------
    temperature, mass_fraction : float or ndarray
        Temperature [K] and glycerol mass fraction [-].

    Examples
    --------
    >>> round(float(glycerol_water_viscosity_cheng(293.15, 0.5)) * 1e3, 3)
    6.002

    References
    ----------
    Cheng (2008), Formula for the viscosity of a glycerol-water mixture, Ind. Eng. Chem. Res.
    47, 3285, eqs. 21-22 with the equations for alpha, a and b.
    """
    t = np.asarray(temperature, dtype=float) - ZERO_CELSIUS
    cm = np.asarray(mass_fraction, dtype=float)
    mu_w = 1.790 * np.exp((-1230.0 - t) * t / (36100.0 + 360.0 * t))
    mu_g = 12100.0 * np.exp((-1233.0 + t) * t / (9900.0 + 70.0 * t))
    a = 0.705 - 0.0017 * t
    b = (4.9 + 0.036 * t) * a**2.5
    alpha = 1.0 - cm + a * b * cm * (1.0 - cm) / (a * cm + b * (1.0 - cm))
    return 1e-3 * mu_w**alpha * mu_g ** (1.0 - alpha)


def glycerol_water_density_volk_kahler(temperature: Any, mass_fraction: Any) -> Any:
    r"""Density of glycerol-water mixtures [kg/m^3], Volk & Kähler (2018).

    Ideal mixing by volume of :math:`\rho_g = 1273.3 - 0.6121 t` and
    :math:`\rho_w = 1000 (1 - |(t - 3.98)/615|^{1.71})`, times the volume contraction
    :math:`\kappa = 1 + A \sin(C_m^{1.31}\pi)^{0.81}`,
    :math:`A = 1.78\times10^{-6} t^2 - 1.82\times10^{-4} t + 1.41\times10^{-2}`, t in degC.
    Fitted at 15-30 degC, where it is within 0.05 % of the 1963 table (tested); used over
    Cheng's 0-100 degC, expect a few tenths of a percent at the ends.

    Parameters
    ----------
    temperature, mass_fraction : float or ndarray
        Temperature [K] and glycerol mass fraction [-].

    References
    ----------
    Volk & Kähler (2018), Density model for aqueous glycerol solutions, Exp. Fluids 59, 75;
    builds on Cheng (2008), Ind. Eng. Chem. Res. 47, 3285, eq. 25.
    """
    t = np.asarray(temperature, dtype=float) - ZERO_CELSIUS
    cm = np.asarray(mass_fraction, dtype=float)
    rho_g = 1273.3 - 0.6121 * t
    rho_w = 1000.0 * (1.0 - np.abs((t - 3.98) / 615.0) ** 1.71)
    cv = cm / rho_g / (cm / rho_g + (1.0 - cm) / rho_w)
    a = 1.78e-6 * t**2 - 1.82e-4 * t + 1.41e-2
    kappa = 1.0 + a * np.maximum(np.sin(cm**1.31 * np.pi), 0.0) ** 0.81
    return kappa * (rho_g * cv + rho_w * (1.0 - cv))


#: What every output that shows a glycerol-water surface tension says about it.
GLYCEROL_WATER_SIGMA_NOTE = (
    "an estimate, not a published correlation: linear in mass fraction between water "
    "(IAPWS R1-76) and glycerol (63.4 mN/m at 20 degC, from memory); real mixtures may lie "
    "a few mN/m off this line"
)


def glycerol_water_surface_tension(temperature: Any, mass_fraction: Any) -> Any:
    r"""Surface tension of glycerol-water mixtures [N/m]: an estimate, not a correlation.

    Linear in mass fraction, :math:`\sigma = (1 - C_m)\sigma_w + C_m \sigma_g`, with
    :math:`\sigma_w` from IAPWS R1-76(2014) and :math:`\sigma_g = 63.4 - 0.0598 (t - 20)`
    mN/m. No published source for the mixture was checked: the mixing rule is an assumption,
    glycerol's 63.4 mN/m at 20 degC is recalled from the CRC Handbook of Chemistry and Physics
    and its slope from Jasper (1972), both from memory, and measured mixtures are recalled to
    lie up to about 2 mN/m above the line (from memory). Every output that shows it says so
    (:data:`GLYCEROL_WATER_SIGMA_NOTE`); the fluid catalogue lists it under
    ``Fluid.estimated``.

    Parameters
    ----------
    temperature, mass_fraction : float or ndarray
        Temperature [K] and glycerol mass fraction [-].

    References
    ----------
    IAPWS R1-76(2014) for water; for glycerol (from memory, not checked): CRC Handbook of
    Chemistry and Physics; Jasper, J. J. (1972), The surface tension of pure liquid compounds,
    J. Phys. Chem. Ref. Data 1, 841.
    """
    t = np.asarray(temperature, dtype=float) - ZERO_CELSIUS
    cm = np.asarray(mass_fraction, dtype=float)
    sigma_g = 63.4e-3 - 5.98e-5 * (t - 20.0)
    return (1.0 - cm) * water_surface_tension_iapws(temperature) + cm * sigma_g
