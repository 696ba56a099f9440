"""Pieces of the ITTC-1978 performance prediction method for a towed hull's resistance.

The ship's total resistance coefficient is built from the model's (ITTC 1978; ITTC
Recommended Procedure 7.5-02-03-01.4):

.. math::

    C_R = C_{TM} - (1 + k) C_{FM}, \\qquad
    C_{TS} = (1 + k) C_{FS} + \\Delta C_F + C_A + C_R + C_{AAS}

with the friction coefficients from the ITTC-1957 line
(:func:`compromise.physics.friction.ittc_1957`), the form factor ``1 + k`` from the case or a
Prohaska fit (:func:`prohaska_form_factor`), the roughness allowance ``dC_F``
(:func:`roughness_allowance`), a correlation allowance ``C_A`` and the air resistance
``C_AAS`` (:func:`air_resistance_coefficient`).
"""

from __future__ import annotations

import math

import numpy as np

#: Roughness-allowance formulas :func:`roughness_allowance` knows.
ROUGHNESS_METHODS = ("bowden-davison", "townsin")


def roughness_allowance(
    method: str, hull_roughness: float, length: float, reynolds: float | None = None
) -> float:
    r"""Roughness allowance dC_F of a ship's hull [-].

    Bowden & Davison (the ITTC-1978 method as first adopted):

    .. math:: \Delta C_F = \left[105 \left(\frac{k_s}{L}\right)^{1/3} - 0.64\right] 10^{-3}

    Townsin (the form of later revisions of the procedure, which needs the ship's Reynolds
    number):

    .. math::

        \Delta C_F = 0.044\left[\left(\frac{k_s}{L}\right)^{1/3}
        - 10\,Re^{-1/3}\right] + 0.000125

    Parameters
    ----------
    method : {"bowden-davison", "townsin"}
    hull_roughness : float
        Mean apparent amplitude of the hull's roughness k_s [m] (150 um is the ITTC's
        standard value).
    length : float
        The ship's waterline length [m].
    reynolds : float, optional
        The ship's Reynolds number (needed by ``townsin``).

    References
    ----------
    Bowden, B. S. & Davison, N. J. (1974). Resistance increments due to hull roughness
    associated with form factor extrapolation methods. NPL Ship Technical Manual 3800, from
    memory. Townsin, R. L. (1985). The ITTC line: its genesis and correlation allowance.
    Naval Architect, from memory. ITTC (1978, revised 1984, 1987, 1999-2017): Recommended
    Procedure 7.5-02-03-01.4, 1978 ITTC Performance Prediction Method, section on the total
    resistance of the ship (from memory).

    Examples
    --------
    >>> round(roughness_allowance("bowden-davison", 150e-6, 96.0) * 1e3, 4)
    0.5784
    """
    if hull_roughness < 0 or length <= 0:
        raise ValueError("expected a hull roughness >= 0 and a positive length")
    rel = (hull_roughness / length) ** (1.0 / 3.0)
    if method == "bowden-davison":
        return (105.0 * rel - 0.64) * 1e-3
    if method == "townsin":
        if reynolds is None or not reynolds > 0:
            raise ValueError("the Townsin roughness allowance needs the ship's Reynolds number")
        return 0.044 * (rel - 10.0 * reynolds ** (-1.0 / 3.0)) + 0.000125
    raise ValueError(f"unknown method {method!r}; expected one of {', '.join(ROUGHNESS_METHODS)}")


def air_resistance_coefficient(transverse_area: float, wetted_surface: float) -> float:
    r"""Air resistance coefficient of the ship, on its wetted surface [-].

    .. math:: C_{AAS} = 0.001 \frac{A_T}{S_S}

    References
    ----------
    ITTC (1978). Recommended Procedure 7.5-02-03-01.4, 1978 ITTC Performance Prediction
    Method (the original form, A_T the transverse projected area above the waterline), from
    memory.

    Examples
    --------
    >>> round(air_resistance_coefficient(260.0, 1530.0), 7)
    0.0001699
    """
    return 0.001 * transverse_area / wetted_surface


def prohaska_form_factor(
    froude: np.ndarray, c_tm: np.ndarray, c_fm: np.ndarray
) -> tuple[float, float, float]:
    r"""Form factor from low-speed resistance tests by Prohaska's method.

    A straight line fitted by least squares through the points

    .. math:: \frac{C_{TM}}{C_{FM}} = (1 + k) + c \frac{Fn^4}{C_{FM}}

    has the intercept ``1 + k``.

    Parameters
    ----------
    froude, c_tm, c_fm : array
        Froude number, total and frictional (ITTC-1957) resistance coefficients of the model
        at the low speeds (at least three points, Fn below about 0.2).

    Returns
    -------
    k, c, rms
        The form factor's k, the slope c and the root-mean-square residual of the fit in
        C_TM / C_FM.

    References
    ----------
    Prohaska, C. W. (1966). A simple method for the evaluation of the form factor and the low
    speed wave resistance. Proc. 11th ITTC, Tokyo, from memory. ITTC Recommended Procedure
    7.5-02-02-01, Resistance Test, section on the form factor (from memory).
    """
    fn = np.asarray(froude, dtype=float)
    ct = np.asarray(c_tm, dtype=float)
    cf = np.asarray(c_fm, dtype=float)
    if fn.size < 3:
        raise ValueError("a Prohaska fit needs at least three low-speed points")
    x = fn**4 / cf
    y = ct / cf
    if float(np.ptp(x)) == 0.0:
        raise ValueError("a Prohaska fit needs points at different speeds")
    a = np.column_stack([np.ones_like(x), x])
    (intercept, slope), *_ = np.linalg.lstsq(a, y, rcond=None)
    rms = float(math.sqrt(float(np.mean((a @ np.array([intercept, slope]) - y) ** 2))))
    return float(intercept) - 1.0, float(slope), rms
