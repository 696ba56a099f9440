"""Instruments and their resolution: the case's ``[instruments]`` table and ``--instrument``.

An instrument is written ``NAME=RESOLUTION[ on QUANTITY]`` on the command line
(``point gauge=0.1 mm``, ``flow meter=0.5 %``, ``level probe=0.2 mm on depth``) or in a case::

    [instruments]
    "point gauge" = "0.1 mm"
    "flow meter"  = { resolution = "0.5 %", measures = "discharge" }

A resolution with a unit is an absolute model-scale resolution; one in percent is a share of
the reading. What it measures is a quantity of the case or a kind of the scale laws; without
one, the review layer tells it from the instrument's name.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from compromise.casefile.checks import Loader, show
from compromise.casefile.model import Instrument, Quantity
from compromise.errors import CaseError
from compromise.physics.scaling import DERIVED_KINDS, REYNOLDS_FRICTION_KINDS
from compromise.units import parse_quantity

INSTRUMENT_KEYS = ("resolution", "measures", "description")


def parse_instrument(
    text: str, *, key: str = "--instrument", measures: str | None = None, name: str | None = None
) -> Instrument:
    """Read ``NAME=RESOLUTION[ on QUANTITY]`` (or, with ``name``, the resolution alone).

    Examples
    --------
    >>> i = parse_instrument("point gauge=0.1 mm")
    >>> i.name, round(i.resolution, 12), i.relative, i.measures
    ('point gauge', 0.0001, False, None)
    >>> i = parse_instrument("flow meter=0.5 % on discharge")
    >>> round(i.resolution, 12), i.relative, i.measures
    (0.005, True, 'discharge')
    """
    raw = text.strip()
    if name is None:
        name, sep, value = raw.partition("=")
        if not sep or not name.strip() or not value.strip():
            raise CaseError(
                f"expected NAME=RESOLUTION such as 'point gauge=0.1 mm', got {text!r}", key=key
            )
        name = name.strip()
    else:
        value = raw
    value, sep, on = value.partition(" on ")
    if sep:
        if measures is not None:
            raise CaseError("say what it measures once ('on' or 'measures')", key=key)
        measures = on.strip() or None
    try:
        number, dim, unit = parse_quantity(value.strip())
    except ValueError as exc:
        raise CaseError(str(exc), key=key) from None
    relative = unit == "%"
    if dim == (0, 0, 0, 1):
        raise CaseError("temperatures do not scale; expected a length, a discharge, ...", key=key)
    if not relative and dim == (0, 0, 0, 0):
        raise CaseError(
            f"expected a resolution with a unit ('0.1 mm') or in percent ('0.5 %'), got {value!r}",
            key=key,
        )
    if not number > 0:
        raise CaseError(f"expected a positive resolution, got {value.strip()!r}", key=key)
    return Instrument(name, number, relative, dim, measures, raw)


def known_measures(quantities: Mapping[str, Quantity]) -> list[str]:
    """What an instrument may measure: the case's quantities and the kinds of the scale laws."""
    return [
        *quantities,
        *DERIVED_KINDS,
        *(k for k in REYNOLDS_FRICTION_KINDS if k not in DERIVED_KINDS),
    ]


def check_instruments(
    L: Loader, data: Any, quantities: Mapping[str, Quantity]
) -> tuple[Instrument, ...]:
    """``[instruments]``: name = resolution, or name = {resolution, measures, description}."""
    out: list[Instrument] = []
    table = L.table(data, "instruments")
    allowed = known_measures(quantities)
    for name, entry in table.items():
        key = f"instruments.{name}"
        measures = None
        if isinstance(entry, dict):
            L.keys(entry, INSTRUMENT_KEYS, key)
            if "resolution" not in entry:
                L.error(key, "expected a resolution such as '0.1 mm' or '0.5 %'")
                continue
            measures = entry.get("measures")
            if measures is not None and (not isinstance(measures, str) or measures not in allowed):
                L.error(
                    f"{key}.measures",
                    f"expected a prototype quantity or a kind ({', '.join(allowed)}), got "
                    f"{show(measures)}",
                )
                continue
            value = entry["resolution"]
            vkey = f"{key}.resolution"
        else:
            value, vkey = entry, key
        if not isinstance(value, str):
            L.error(vkey, f"expected a resolution such as '0.1 mm' or '0.5 %', got {show(value)}")
            continue
        try:
            out.append(parse_instrument(value, key=vkey, measures=measures, name=name))
        except CaseError as exc:
            L.error(vkey, exc.message)
    return tuple(out)
