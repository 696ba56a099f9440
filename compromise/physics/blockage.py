"""Blockage of a model in a closed test section, and the corrections of measured speed and force.

A model of frontal area S in a section of area C makes the flow past it faster than the flow
upstream: the measured force coefficients are too high. Three estimates, from the crudest bound
to the correction for bluff bodies with a separated wake:

* :func:`continuity_speed_factor`: the mean speed beside the model by continuity, 1 / (1 - S/C)
  (mass conservation: an upper bound on the speed-up at the model's largest section).
* :func:`simple_blockage`: the total blockage factor eps = S / (4 C) of Barlow, Rae & Pope for a
  model whose volume is not known, and the speed, dynamic pressure and force coefficient
  corrected by it.
* :func:`maskell_blockage`: Maskell's (1963) correction for bluff bodies and stalled wings,
  q_c / q = 1 + m C_D S / C with m = 5/2, which also holds for the wake's blockage.

References
----------
.. [1] Barlow, J. B., Rae, W. H., Pope, A. (1999). Low-Speed Wind Tunnel Testing, 3rd ed.,
   Wiley, ch. 9-10, boundary corrections: the simple total blockage eps_t = (1/4) S / C
   (from memory).
.. [2] Maskell, E. C. (1963). A theory of the blockage effects on bluff bodies and stalled wings
   in a closed wind tunnel. Aeronautical Research Council, Reports and Memoranda 3400 (from
   memory: the form q_c/q = 1 + m C_D S/C and m = 5/2 for three-dimensional bluff bodies).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

MASKELL_FACTOR = 2.5
"""Maskell's (1963) blockage factor m for three-dimensional bluff bodies [-] (from memory)."""


@dataclass(frozen=True)
class BlockageCorrection:
    """A blockage correction: speed, dynamic pressure and force coefficient, corrected/measured.

    Attributes
    ----------
    method : str
    ratio : float
        Blockage ratio S / C [-].
    speed_factor : float
        Corrected speed over the measured (upstream) speed [-].
    pressure_factor : float
        Corrected dynamic pressure over the measured one, ``speed_factor**2`` [-].
    coefficient_factor : float
        Corrected force coefficient over the measured one, ``1 / pressure_factor`` [-].
    """

    method: str
    ratio: float
    speed_factor: float
    pressure_factor: float
    coefficient_factor: float

    def to_dict(self) -> dict[str, object]:
        """Plain data."""
        return {
            "method": self.method,
            "ratio": self.ratio,
            "speed_factor": self.speed_factor,
            "pressure_factor": self.pressure_factor,
            "coefficient_factor": self.coefficient_factor,
        }


def _ratio(frontal_area: float, section_area: float) -> float:
    s, c = float(frontal_area), float(section_area)
    if not (math.isfinite(s) and math.isfinite(c) and s > 0 and c > 0 and s < c):
        raise ValueError(
            f"expected 0 < frontal area < section area, got {frontal_area!r} and {section_area!r}"
        )
    return s / c


def continuity_speed_factor(frontal_area: float, section_area: float) -> float:
    """Mean speed beside the model over the upstream speed, 1 / (1 - S/C) [-].

    Mass conservation in the section (physics); an upper bound of the speed-up, reached only
    where the model's largest section stands across the flow.

    Examples
    --------
    >>> round(continuity_speed_factor(0.05, 1.0), 6)
    1.052632
    """
    return 1.0 / (1.0 - _ratio(frontal_area, section_area))


def simple_blockage(frontal_area: float, section_area: float) -> BlockageCorrection:
    """The simple total blockage of Barlow, Rae & Pope, eps = (1/4) S / C.

    Corrected speed V_c = V (1 + eps), dynamic pressure q_c = q (1 + eps)^2, force
    coefficient C_c = C / (1 + eps)^2.

    References
    ----------
    .. [1] Barlow, J. B., Rae, W. H., Pope, A. (1999). Low-Speed Wind Tunnel Testing, 3rd ed.,
       Wiley, boundary corrections: eps_t = (1/4)(model frontal area / test-section area)
       (from memory).
    """
    r = _ratio(frontal_area, section_area)
    speed = 1.0 + 0.25 * r
    return BlockageCorrection(
        "Barlow, Rae & Pope (1999), eps = S/(4C)", r, speed, speed**2, speed**-2
    )


def maskell_blockage(
    frontal_area: float,
    section_area: float,
    drag_coefficient: float,
    factor: float = MASKELL_FACTOR,
) -> BlockageCorrection:
    """Maskell's (1963) blockage correction of a bluff body, from its measured drag coefficient.

    q_c / q = 1 + m C_D S / C (m = 5/2 for three-dimensional bluff bodies); the corrected drag
    coefficient is C_D / (1 + m C_D S / C).

    References
    ----------
    .. [1] Maskell, E. C. (1963). A theory of the blockage effects on bluff bodies and stalled
       wings in a closed wind tunnel. ARC R&M 3400 (from memory).
    """
    r = _ratio(frontal_area, section_area)
    cd = float(drag_coefficient)
    if not (math.isfinite(cd) and cd > 0):
        raise ValueError(f"expected a positive drag coefficient, got {drag_coefficient!r}")
    q = 1.0 + factor * cd * r
    return BlockageCorrection(f"Maskell (1963), m = {factor:g}", r, math.sqrt(q), q, 1.0 / q)
