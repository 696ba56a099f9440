"""Friction laws: Darcy friction factor, the ITTC-1957 line, Manning and Strickler.

Each function carries its source; tests are named after them.
"""

from __future__ import annotations

import math

#: Manning n [s/m^1/3] of the smoothest model materials: the NORMAL values of acrylic (Lucite,
#: perspex) 0.009 and glass 0.010 in Chow, V. T. (1959), Open-Channel Hydraulics, Table 5-6
#: (from memory; the table's minimum/normal/maximum are Lucite 0.008/0.009/0.010 and glass
#: 0.009/0.010/0.013). The normal values are used, not the minima, because a built model has
#: joints, sealant and fittings that a freshly finished test surface does not: a model needing
#: less than 0.009 is reported as not buildable, although a flawless acrylic surface may reach
#: 0.008.
SMOOTH_MATERIALS_N: tuple[float, float] = (0.009, 0.010)

LAMINAR_LIMIT = 2300.0  # [-] pipe Reynolds number below which f = 64/Re (from memory)


def friction_factor_colebrook(reynolds: float, relative_roughness: float) -> float:
    r"""Darcy friction factor of turbulent flow by the Colebrook-White equation.

    .. math:: \frac{1}{\sqrt f} = -2\log_{10}\left(\frac{\epsilon/D}{3.7}
              + \frac{2.51}{Re\sqrt f}\right)

    Solved to machine precision by Newton iteration on :math:`x = 1/\sqrt f`.

    Parameters
    ----------
    reynolds : float
        Reynolds number on the (hydraulic) diameter [-].
    relative_roughness : float
        Equivalent sand roughness over diameter [-].

    References
    ----------
    Colebrook, C. F. (1939). Turbulent flow in pipes, with particular reference to the
    transition region between the smooth and rough pipe laws. *J. Inst. Civ. Eng.* 11,
    133-156.

    Examples
    --------
    >>> round(friction_factor_colebrook(1e5, 1e-4), 6)
    0.018514
    """
    a = relative_roughness / 3.7
    b = 2.51 / reynolds
    x = 1.0 / math.sqrt(0.02)
    ln10 = math.log(10.0)
    for _ in range(50):
        inner = a + b * x
        g = x + 2.0 * math.log10(inner)
        dg = 1.0 + 2.0 * b / (inner * ln10)
        step = g / dg
        x -= step
        if abs(step) < 1e-15 * abs(x):
            break
    return 1.0 / (x * x)


def friction_factor_haaland(reynolds: float, relative_roughness: float) -> float:
    r"""Darcy friction factor by Haaland's explicit approximation of Colebrook-White.

    .. math:: \frac{1}{\sqrt f} = -1.8\log_{10}\left[\left(\frac{\epsilon/D}{3.7}\right)^{1.11}
              + \frac{6.9}{Re}\right]

    References
    ----------
    Haaland, S. E. (1983). Simple and explicit formulas for the friction factor in turbulent
    pipe flow. *J. Fluids Eng.* 105(1), 89-90.
    """
    x = -1.8 * math.log10((relative_roughness / 3.7) ** 1.11 + 6.9 / reynolds)
    return 1.0 / (x * x)


def friction_factor_fully_rough(relative_roughness: float) -> float:
    r"""Darcy friction factor in the fully rough limit.

    .. math:: 1/\sqrt f = -2\log_{10}(\epsilon / 3.7 D)

    References
    ----------
    von Karman, T. (1930); Nikuradse, J. (1933); as tabulated in White, F. M. *Fluid
    Mechanics*, eq. 6.63 (e.g. 0.0196 at epsilon/D = 0.001).
    """
    x = -2.0 * math.log10(relative_roughness / 3.7)
    return 1.0 / (x * x)


def friction_factor(
    reynolds: float, relative_roughness: float, *, method: str = "colebrook"
) -> float:
    """Darcy friction factor: 64/Re when laminar, else the chosen turbulent law.

    Parameters
    ----------
    reynolds : float
        Reynolds number on the (hydraulic) diameter [-].
    relative_roughness : float
        Equivalent sand roughness over diameter [-].
    method : {"colebrook", "haaland"}

    References
    ----------
    Hagen-Poiseuille law f = 64/Re for laminar flow; Colebrook (1939); Haaland (1983).
    """
    if reynolds <= 0 or not math.isfinite(reynolds):
        raise ValueError(f"expected a positive Reynolds number, got {reynolds}")
    if reynolds < LAMINAR_LIMIT:
        return 64.0 / reynolds
    if method == "haaland":
        return friction_factor_haaland(reynolds, relative_roughness)
    if method != "colebrook":
        raise ValueError(f"unknown method {method!r}; expected 'colebrook' or 'haaland'")
    return friction_factor_colebrook(reynolds, relative_roughness)


def ittc_1957(reynolds: float) -> float:
    r"""Frictional resistance coefficient of the ITTC-1957 model-ship correlation line.

    .. math:: C_F = \frac{0.075}{(\log_{10} Re - 2)^2}

    References
    ----------
    ITTC (1957). Proceedings of the 8th International Towing Tank Conference, Madrid;
    ITTC Recommended Procedure 7.5-02-02-02.

    Examples
    --------
    >>> round(ittc_1957(1e7), 6)
    0.003
    """
    return 0.075 / (math.log10(reynolds) - 2.0) ** 2


def strickler_roughness(manning_n: float) -> float:
    r"""Median grain size d50 [m] of a bed whose grain roughness gives a Manning n [s/m^1/3].

    Strickler's law, with his constant 21.1 on the median grain size (SI units):

    .. math:: n = \frac{d_{50}^{1/6}}{21.1} \quad\Rightarrow\quad d_{50} = (21.1\,n)^6

    The result is a grain size, not Nikuradse's equivalent sand roughness ks: ks of a natural
    bed is larger than d50 (often taken as 2 to 3 times d50 or d90, common practice). Valid for
    plane beds of grains well below the flow depth.

    References
    ----------
    Strickler, A. (1923). Beitraege zur Frage der Geschwindigkeitsformel und der
    Rauhigkeitszahlen fuer Stroeme, Kanaele und geschlossene Leitungen, Mitteilungen des
    Eidgenoessischen Amtes fuer Wasserwirtschaft 16, Bern: the constant 21.1 with d50 in metres
    (the series, number and constant from memory).

    Examples
    --------
    >>> round(strickler_roughness(0.020) * 1000, 2)  # a Manning n of 0.020 is d50 = 5.7 mm
    5.65
    """
    return (21.1 * manning_n) ** 6
