"""Instrument resolution in prototype terms.

A point gauge read to 0.1 mm in a model whose vertical ratio is 1:21.45 reads the river's level
to 2.1 mm. :func:`resolution` carries each instrument's model-scale resolution to the prototype
with the law of the quantity it measures, per condition, and flags an instrument whose
resolution is more than a share (default 5 %, common practice) of the smallest prototype value
it must resolve. A resolution given in percent is a share of the reading and is the same share
in both frames.
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from dataclasses import dataclass
from typing import Any

import numpy as np

from compromise.casefile.model import Case, Instrument
from compromise.errors import CaseError
from compromise.review.columns import ALIASES, KIND_DIMENSIONS, kind_vector
from compromise.review.convert import chain_of
from compromise.solving.design import Design, scaled_log_ratio
from compromise.units import dimension_name, si_unit

#: Default share of the smallest prototype value an instrument must resolve (common practice).
DEFAULT_SHARE = 0.05

#: Trade words in an instrument's name and the kind it measures (common practice).
INSTRUMENT_WORDS: tuple[tuple[str, str], ...] = (
    ("point gauge", "vertical_length"),
    ("wave probe", "vertical_length"),
    ("wave gauge", "vertical_length"),
    ("level", "vertical_length"),
    ("stage", "vertical_length"),
    ("piezometer", "vertical_length"),
    ("flow meter", "discharge"),
    ("flowmeter", "discharge"),
    ("weir", "discharge"),
    ("current meter", "velocity"),
    ("velocimeter", "velocity"),
    ("pitot", "velocity"),
    ("adv", "velocity"),
    ("pressure", "pressure"),
    ("manometer", "pressure"),
    ("transducer", "pressure"),
    ("load cell", "force"),
    ("dynamometer", "force"),
    ("balance", "force"),
    ("clock", "time"),
    ("timer", "time"),
    ("stopwatch", "time"),
)


@dataclass(frozen=True)
class Reading:
    """One instrument in one condition [SI units of ``unit``].

    Attributes
    ----------
    condition : str
    prototype_value, model_value : float
        The value it must resolve.
    prototype_resolution, model_resolution : float
    share : float
        Resolution over the value [-] (the same in both frames).
    """

    condition: str
    prototype_value: float
    model_value: float
    prototype_resolution: float
    model_resolution: float
    share: float

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "condition": self.condition,
            "prototype_value": self.prototype_value,
            "model_value": self.model_value,
            "prototype_resolution": self.prototype_resolution,
            "model_resolution": self.model_resolution,
            "share": self.share,
        }


@dataclass(frozen=True)
class InstrumentResolution:
    """An instrument's resolution in prototype terms.

    Attributes
    ----------
    name, text : str
    kind : str
        The kind it measures (a kind of the scale laws, or ``quantity:NAME``).
    quantity : str or None
        The case quantity it must resolve (None when none of the case's is of its kind).
    unit : str
        SI unit of the values.
    ratio : float
        Model over prototype of what it measures [-].
    law : str
    relative : bool
    prototype_resolution : float or None
        For an absolute resolution, the prototype value of one model resolution step [SI].
    readings : tuple of Reading
        Per condition (empty without a quantity).
    worst_share : float or None
        The largest share over conditions [-].
    flagged : bool
        ``worst_share`` above the share asked for.
    note : str
    """

    name: str
    text: str
    kind: str
    quantity: str | None
    unit: str
    ratio: float
    law: str
    relative: bool
    prototype_resolution: float | None
    readings: tuple[Reading, ...]
    worst_share: float | None
    flagged: bool
    note: str

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "name": self.name,
            "text": self.text,
            "kind": self.kind,
            "quantity": self.quantity,
            "unit": self.unit,
            "ratio": self.ratio,
            "law": self.law,
            "relative": self.relative,
            "prototype_resolution": self.prototype_resolution,
            "readings": [r.to_dict() for r in self.readings],
            "worst_share": self.worst_share,
            "flagged": self.flagged,
            "note": self.note,
        }


@dataclass(frozen=True)
class ResolutionReport:
    """Every instrument's resolution in prototype terms for one design."""

    design: Design
    design_source: str
    share: float
    instruments: tuple[InstrumentResolution, ...]

    @property
    def flagged(self) -> tuple[str, ...]:
        """Names of the instruments too coarse for what they must resolve."""
        return tuple(i.name for i in self.instruments if i.flagged)

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "design": self.design.to_dict(),
            "design_source": self.design_source,
            "share": self.share,
            "instruments": [i.to_dict() for i in self.instruments],
            "flagged": list(self.flagged),
        }


def _kind_from_name(name: str) -> str | None:
    low = " ".join(name.lower().replace("-", " ").replace("_", " ").split())
    for word, kind in INSTRUMENT_WORDS:
        if word in low.split() or (" " in word and word in low) or low == word:
            return kind
    return None


def _preferred_quantity(
    case: Case, kind: str, vector: np.ndarray, dim: tuple[int, ...]
) -> str | None:
    """The case quantity an instrument of this kind resolves: the only one with this law, or
    among several the one named as the kind (``discharge``) or a common name of it
    (``depth``)."""
    found = [
        n
        for n, q in case.quantities.items()
        if tuple(q.dimension) == tuple(dim) and np.allclose(q.scaling, vector, atol=1e-12, rtol=0)
    ]
    if len(found) == 1:
        return found[0]
    named = [n for n in found if n == kind or ALIASES.get(n) == kind]
    return named[0] if len(named) == 1 else None


def resolution(
    case: Case,
    design: Design,
    instruments: Iterable[Instrument],
    *,
    share: float = DEFAULT_SHARE,
    design_source: str = "",
) -> ResolutionReport:
    """Each instrument's resolution carried to the prototype, per condition, and flagged when
    it exceeds ``share`` of the smallest prototype value it must resolve.

    Parameters
    ----------
    case : Case
    design : Design
    instruments : iterable of Instrument
        From the case's ``[instruments]`` or ``--instrument``.
    share : float
        Largest acceptable resolution over value [-] (default 0.05, common practice).
    """
    if not 0 < share < 1:
        raise CaseError(
            f"expected a share between 0 and 100 %, got {share * 100:g} %", key="--share"
        )
    chain, p = chain_of(case, design)
    y = design.logs
    out: list[InstrumentResolution] = []
    for inst in instruments:
        key = f"instrument {inst.name!r}"
        what = inst.measures or _kind_from_name(inst.name)
        quantity: str | None = None
        if what is not None and what in case.quantities:
            q = case.quantities[what]
            vector, dim, kind, quantity = q.scaling, q.dimension, f"quantity:{what}", what
        else:
            if what is None:
                if inst.relative:
                    raise CaseError(
                        "a resolution in percent needs to know what it measures; write "
                        "'NAME=0.5 % on QUANTITY'",
                        key=key,
                    )
                what = _kind_by_dimension(inst.dimension, design, key)
            if what not in KIND_DIMENSIONS:
                raise CaseError(
                    f"measures {what!r}: not a quantity of the case nor a kind of the scale laws",
                    key=key,
                )
            vector, dim = kind_vector(what, chain.friction_law, inst.name)
            kind = what
            quantity = _preferred_quantity(case, what, vector, dim)
        if not inst.relative and tuple(inst.dimension) != tuple(dim):
            raise CaseError(
                f"a resolution in {dimension_name(inst.dimension)} cannot resolve a "
                f"{dimension_name(dim)} ({kind})",
                key=key,
            )
        from compromise.casefile.model import scaling_text

        ratio = math.exp(scaled_log_ratio(vector, y, p))
        proto_res = None if inst.relative else inst.resolution / ratio
        readings: list[Reading] = []
        for i, cond in enumerate(case.conditions):
            if quantity is None:
                break
            pv = case.values(i)[quantity]
            mv = pv * ratio
            if inst.relative:
                pr, mr = inst.resolution * abs(pv), inst.resolution * abs(mv)
            else:
                pr, mr = inst.resolution / ratio, inst.resolution
            readings.append(Reading(cond.name, pv, mv, pr, mr, pr / abs(pv) if pv else math.inf))
        worst = max((r.share for r in readings), default=None)
        flagged = worst is not None and worst > share
        if quantity is None:
            note = (
                "no quantity of the case of this kind to resolve (or several); write "
                "'NAME=RESOLUTION on QUANTITY' to check it"
            )
        elif flagged:
            smallest = min(readings, key=lambda r: abs(r.prototype_value))
            note = (
                f"coarser than {share * 100:g} % of the smallest {quantity} ({smallest.condition})"
            )
        else:
            note = ""
        out.append(
            InstrumentResolution(
                inst.name, inst.text, kind, quantity, si_unit(dim), ratio, scaling_text(vector),
                inst.relative, proto_res, tuple(readings), worst, flagged, note,
            )
        )  # fmt: skip
    return ResolutionReport(design, design_source, share, tuple(out))


def _kind_by_dimension(dim: tuple[int, ...], design: Design, key: str) -> str:
    from compromise.review.columns import AXIS_DEPENDENT, BY_DIMENSION

    d = tuple(dim)
    if d in BY_DIMENSION:
        return BY_DIMENSION[d]  # type: ignore[index]
    if d in AXIS_DEPENDENT:
        if abs(design.distortion - 1) > 1e-12:
            raise CaseError(
                f"ambiguous: in a distorted model {AXIS_DEPENDENT[d]} must say its axis; write "  # type: ignore[index]
                "'NAME=RESOLUTION on vertical_length' (or a quantity of the case)",
                key=key,
            )
        return "horizontal_length" if d == (0, 1, 0, 0) else "plan_area"
    raise CaseError(
        f"cannot tell what it measures from a {dimension_name(d)}; write "
        "'NAME=RESOLUTION on QUANTITY'",
        key=key,
    )
