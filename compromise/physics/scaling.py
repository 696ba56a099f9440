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
Chow, V. T. (1959). *Open-Channel Hydraulics*, McGraw-Hill, ch. 8: boundary shear of uniform
flow rho g R S and shear velocity (g R S)^1/2, from memory.
Yalin, M. S. (1971). *Theory of Hydraulic Models*, Macmillan: shear velocity and friction
criteria of distorted models, from memory.
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


#: Derived kinds of quantity whose scaling follows from geometry and kinematics alone, for any
#: velocity ratio: lengths, areas, volumes, time, discharge, forces, pressure, power, bed slope.
GEOMETRIC_KINDS: dict[str, tuple[np.ndarray, str]] = {
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
    "slope": (vec(vertical=1, horizontal=-1), "bed slope (geometric)"),
}

#: Friction kinds of gravity-driven open-channel flow whose friction slope is the bed slope
#: (uniform flow, slope ``Y/X``), for a general velocity ratio and a wide channel (hydraulic
#: radius scaling as the depth, ``Y``). From the uniform-flow shear velocity
#: ``u* = (g R S)^1/2``, Darcy-Weisbach ``f = 8 g R S / V^2``, Chezy ``V = C (R S)^1/2`` and
#: Manning ``V = R^2/3 S^1/2 / n`` (SI): shear velocity ``g^1/2 Y X^-1/2``, bed shear stress
#: ``rho g Y^2 / X``, Darcy f ``g Y^2 / (X V^2)``, Chezy C ``V X^1/2 / Y`` and Manning n
#: ``Y^7/6 X^-1/2 / V``. Under Froude scaling on the vertical (``V = (g Y)^1/2``) they reduce
#: to the textbook forms: shear velocity ``Y X^-1/2``, Manning n ``Y^2/3 X^-1/2``, Chezy C
#: ``(X/Y)^1/2``, Darcy f ``Y/X``. They hold only where the model is a gravity (Froude) model;
#: under another velocity law the flow cannot be uniform at the scaled slope.
OPEN_CHANNEL_KINDS: dict[str, tuple[np.ndarray, str]] = {
    "shear_velocity": (
        vec(g=0.5, vertical=1, horizontal=-0.5),
        "shear velocity (g R S)^1/2 (uniform flow, wide channel)",
    ),
    "bed_shear_stress": (
        vec(rho=1, g=1, vertical=2, horizontal=-1),
        "bed shear stress rho g R S (uniform flow, wide channel)",
    ),
    "manning_n": (vec(vertical=7 / 6, horizontal=-0.5, velocity=-1), "Manning n (wide channel)"),
    "chezy_c": (vec(velocity=1, horizontal=0.5, vertical=-1), "Chezy C (wide channel)"),
    "darcy_f": (vec(g=1, vertical=2, horizontal=-1, velocity=-2), "Darcy f (wide channel)"),
}

#: Friction kinds when the Reynolds number on the hydraulic radius (the vertical length) and
#: the relative roughness are both kept: the Darcy friction factor is then unchanged
#: (Colebrook, C. F. (1939): f depends only on these two), and every friction quantity follows
#: from Darcy-Weisbach with ``f`` kept: shear velocity ``V (f/8)^1/2`` scales as ``V``, wall
#: shear stress as ``rho V^2``, the hydraulic gradient (head loss per length) as ``V^2/(g Y)``,
#: Chezy C ``(8 g / f)^1/2`` as ``g^1/2`` and Manning n ``R^1/6 (f / 8 g)^1/2`` as
#: ``Y^1/6 g^-1/2``.
REYNOLDS_FRICTION_KINDS: dict[str, tuple[np.ndarray, str]] = {
    "shear_velocity": (vec(velocity=1), "shear velocity V (f/8)^1/2 (f kept)"),
    "bed_shear_stress": (vec(rho=1, velocity=2), "wall shear stress rho V^2 f / 8 (f kept)"),
    "hydraulic_gradient": (
        vec(velocity=2, g=-1, vertical=-1),
        "head loss per length f V^2 / (2 g D) (f kept)",
    ),
    "manning_n": (vec(vertical=1 / 6, g=-0.5), "Manning n (f kept)"),
    "chezy_c": (vec(g=0.5), "Chezy C (f kept)"),
    "darcy_f": (vec(), "Darcy f (Reynolds and relative roughness kept)"),
}

#: Every derived kind under the open-channel (Froude) laws: the laws a case's bare ``slope``,
#: ``manning_n``, ``darcy_f`` and ``shear_velocity`` follow (a case file describes a Froude
#: model unless its quantities say otherwise through ``scales_as``).
DERIVED_KINDS: dict[str, tuple[np.ndarray, str]] = {**GEOMETRIC_KINDS, **OPEN_CHANNEL_KINDS}

#: Quantity names whose law differs from the default of their dimension, with the dimension
#: (M, L, T, Theta) they must have and the kind whose law they follow. A bare slope scales as
#: ``Y/X``, not as a plain number; a shear velocity as ``(g Y S)^1/2`` (``g^1/2 Y X^-1/2``),
#: not as the mean velocity; a bed shear stress as ``rho g Y S``, not as ``rho V^2``.
NAMED_QUANTITY_LAWS: dict[str, tuple[tuple[int, int, int, int], str]] = {
    "slope": ((0, 0, 0, 0), "slope"),
    "bed_slope": ((0, 0, 0, 0), "slope"),
    "energy_slope": ((0, 0, 0, 0), "slope"),
    "friction_slope": ((0, 0, 0, 0), "slope"),
    "manning_n": ((0, 0, 0, 0), "manning_n"),
    "darcy_f": ((0, 0, 0, 0), "darcy_f"),
    "shear_velocity": ((0, 1, -1, 0), "shear_velocity"),
    "friction_velocity": ((0, 1, -1, 0), "shear_velocity"),
    "bed_shear_stress": ((1, -1, -2, 0), "bed_shear_stress"),
}


def named_scaling(name: str, dim: tuple[int, ...]) -> np.ndarray | None:
    """The law of a quantity whose name fixes it (:data:`NAMED_QUANTITY_LAWS`), else None.

    The name must come with its dimension: a ``shear_velocity`` given in m/s scales as
    ``g^1/2 Y X^-1/2``; a quantity of another dimension under that name keeps its
    dimension's default.

    Examples
    --------
    >>> named_scaling("shear_velocity", (0, 1, -1, 0)).tolist()[:3]
    [-0.5, 1.0, 0.0]
    >>> named_scaling("shear_velocity", (0, 1, 0, 0)) is None
    True
    """
    law = NAMED_QUANTITY_LAWS.get(name)
    if law is None or tuple(round(d) for d in dim) != law[0]:
        return None
    return DERIVED_KINDS[law[1]][0].copy()


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


#: Which friction laws hold, by name: the kinds they give and what they assume.
FRICTION_LAWS: dict[str, tuple[dict[str, tuple[np.ndarray, str]], str]] = {
    "open_channel": (
        OPEN_CHANNEL_KINDS,
        "open-channel laws of uniform flow at the scaled slope (Froude velocity on the "
        "vertical; wide channel, hydraulic radius scaling as the depth)",
    ),
    "reynolds": (
        REYNOLDS_FRICTION_KINDS,
        "Reynolds number on the vertical length and relative roughness kept, so the Darcy "
        "friction factor is unchanged (Colebrook-White depends on these two only)",
    ),
}


def friction_law(
    decision: np.ndarray, properties: np.ndarray, roughness: np.ndarray | None = None
) -> str | None:
    """The friction law that holds for a design's log-ratios, or None.

    ``"open_channel"`` when the velocity ratio is the Froude ratio on the vertical,
    ``V = (g_r Y)^1/2``; else ``"reynolds"`` when the Reynolds number on the vertical length is
    kept (``V Y / nu_r = 1``) and the roughness (its exponent vector, when the case has one)
    scales as the vertical length; else None: the friction factor then depends on the model's
    own Reynolds number and no power law gives it.

    Parameters
    ----------
    decision : numpy.ndarray
        ``(ln X, ln Y, ln V)``.
    properties : numpy.ndarray
        Property log-ratios over :data:`PROPERTY_BASIS`.
    roughness : numpy.ndarray, optional
        The exponent vector of the case's roughness height.

    Examples
    --------
    >>> import math
    >>> y = math.log(1 / 25)
    >>> friction_law(np.array([y, y, y / 2]), np.zeros(6))
    'open_channel'
    >>> friction_law(np.array([y, y, -y]), np.zeros(6))
    'reynolds'
    >>> friction_law(np.array([y, y, 0.0]), np.zeros(6)) is None
    True
    """
    _, z, v = (float(t) for t in decision)
    p = dict(zip(PROPERTY_BASIS, (float(t) for t in properties), strict=True))
    if abs(v - 0.5 * (z + p["g"])) < 1e-9:
        return "open_channel"
    if abs(v + z - p["nu"]) < 1e-9:
        if roughness is None or abs(log_ratio(roughness, decision, properties) - z) < 1e-9:
            return "reynolds"
    return None


def open_channel_law(exponents: np.ndarray) -> str | None:
    """The open-channel friction kind whose law an exponent vector follows, if any.

    Examples
    --------
    >>> open_channel_law(DERIVED_KINDS["manning_n"][0])
    'manning_n'
    >>> open_channel_law(vec(velocity=1)) is None
    True
    """
    for name, (s, _) in OPEN_CHANNEL_KINDS.items():
        if np.allclose(exponents, s, atol=1e-12, rtol=0):
            return name
    return None
