"""Scale ratios of every kind of quantity, as log-linear maps of the base ratios.

All ratios are model over prototype. The base ratios are the horizontal length ratio ``X``,
the vertical length ratio ``Y`` (``Y = X`` in an undistorted model), the velocity ratio ``V`` and
the fluid-property ratios of density, dynamic and kinematic viscosity, surface tension, speed of
sound and gravity. The logarithm of any ratio is a linear form in the logarithms of these base
ratios; this module holds those forms as exponent vectors over :data:`BASIS`.

References
----------
Chanson, H. (1999). *The Hydraulics of Open Channel Flow*, ch. 14 (Froude similitude and
distorted models), from memory.
Novak, P., Guinot, V., Jeffrey, A., Reeve, D. E. (2010). *Hydraulic Modelling - an
Introduction*, ch. 4, from memory.
"""

from __future__ import annotations

import numpy as np

#: Log-ratio basis: decision variables first, then fluid properties.
BASIS: tuple[str, ...] = (
    "horizontal",
    "vertical",
    "velocity",
    "rho",
    "mu",
    "nu",
    "sigma",
    "c",
    "g",
)
#: Index of each basis name.
INDEX: dict[str, int] = {name: i for i, name in enumerate(BASIS)}
#: Number of decision variables at the start of the basis (x, z, v).
N_DECISION = 3
#: The fluid-property names of the basis, in order.
PROPERTY_BASIS: tuple[str, ...] = BASIS[N_DECISION:]


def vec(**exponents: float) -> np.ndarray:
    """Exponent vector over :data:`BASIS` from keyword exponents.

    Examples
    --------
    >>> vec(horizontal=1, velocity=-1).tolist()
    [1.0, 0.0, -1.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0]
    """
    out = np.zeros(len(BASIS))
    for name, e in exponents.items():
        out[INDEX[name]] = e
    return out


#: Derived kinds of quantity and their scaling, for the scale table. The friction laws are
#: written for a general velocity ratio; under Froude scaling (V = Y^1/2) they reduce to the
#: textbook forms: Manning n = Y^2/3 X^-1/2, Chezy C = (X/Y)^1/2, Darcy f = Y/X (wide channel,
#: hydraulic radius scaling as depth).
DERIVED_KINDS: dict[str, tuple[np.ndarray, str]] = {
    "horizontal_length": (vec(horizontal=1), "horizontal length"),
    "vertical_length": (vec(vertical=1), "vertical length (depths, heights)"),
    "plan_area": (vec(horizontal=2), "plan area"),
    "cross_section_area": (vec(horizontal=1, vertical=1), "cross-section area"),
    "volume": (vec(horizontal=2, vertical=1), "volume"),
    "velocity": (vec(velocity=1), "velocity"),
    "time": (vec(horizontal=1, velocity=-1), "time (horizontal travel)"),
    "frequency": (vec(horizontal=-1, velocity=1), "frequency"),
    "acceleration": (vec(horizontal=-1, velocity=2), "acceleration"),
    "discharge": (vec(velocity=1, horizontal=1, vertical=1), "discharge"),
    "unit_discharge": (vec(velocity=1, vertical=1), "discharge per unit width"),
    "mass": (vec(rho=1, horizontal=2, vertical=1), "mass"),
    "force": (vec(rho=1, velocity=2, horizontal=1, vertical=1), "force"),
    "pressure": (vec(rho=1, velocity=2), "pressure"),
    "power": (vec(rho=1, velocity=3, horizontal=1, vertical=1), "power"),
    "slope": (vec(vertical=1, horizontal=-1), "slope"),
    "manning_n": (vec(vertical=7 / 6, horizontal=-0.5, velocity=-1), "Manning n (wide channel)"),
    "chezy_c": (vec(velocity=1, horizontal=0.5, vertical=-1), "Chezy C (wide channel)"),
    "darcy_f": (vec(vertical=2, horizontal=-1, velocity=-2), "Darcy f (wide channel)"),
}


def default_scaling(dim: tuple[int, ...], axis: str = "horizontal") -> np.ndarray | None:
    """Scaling of a quantity from its dimension, where the dimension makes it unambiguous.

    Lengths follow their axis; areas are plan areas (``axis="vertical"`` is meaningless for an
    area, so ``axis="section"`` gives a cross-section); discharge is velocity x horizontal x
    vertical; discharge per unit width is velocity x vertical; time is horizontal / velocity;
    mass, force, pressure and power carry the density ratio. Other dimensions are built from
    ``M -> rho L^3`` and ``T -> L / V`` with horizontal lengths. Returns ``None`` for a
    temperature.

    Examples
    --------
    >>> default_scaling((0, 3, -1, 0)).tolist()[:3]
    [1.0, 1.0, 1.0]
    >>> default_scaling((0, 1, 0, 0), axis="vertical").tolist()[:3]
    [0.0, 1.0, 0.0]
    """
    m, length, t, theta = (round(d) for d in dim)
    if theta:
        return None
    key = (m, length, t)
    if key == (0, 1, 0):
        return vec(vertical=1) if axis == "vertical" else vec(horizontal=1)
    if key == (0, 2, 0):
        return vec(horizontal=1, vertical=1) if axis == "section" else vec(horizontal=2)
    named = {
        (0, 3, 0): "volume",
        (0, 3, -1): "discharge",
        (0, 2, -1): "unit_discharge",
        (1, 0, 0): "mass",
        (1, 1, -2): "force",
        (1, -1, -2): "pressure",
        (1, 2, -3): "power",
    }
    if key in named:
        return DERIVED_KINDS[named[key]][0].copy()
    # generic: M^m L^l T^t = rho^m L^(l + 3m) T^t, and T = L / V
    out = vec(rho=m)
    n_len = length + 3 * m + t
    out[INDEX["vertical" if axis == "vertical" else "horizontal"]] += n_len
    out[INDEX["velocity"]] -= t
    return out


def log_ratio(exponents: np.ndarray, decision: np.ndarray, properties: np.ndarray) -> float:
    """ln(ratio) for an exponent vector, decision log-ratios (x, z, v) and property log-ratios.

    Examples
    --------
    >>> import math
    >>> x = math.log(1 / 25)
    >>> d = np.array([x, x, x / 2])
    >>> round(math.exp(log_ratio(DERIVED_KINDS["discharge"][0], d, np.zeros(6))) * 25**2.5, 9)
    1.0
    """
    return float(exponents[:N_DECISION] @ decision + exponents[N_DECISION:] @ properties)
