"""The one pint registry, and the conversions done at the edge (case file, command line).

Everything inside compromise works on SI floats: metres, seconds, kilograms, kelvin, pascals.
Temperatures are handed to the core in kelvin; they are shown to users in degC.
"""

from __future__ import annotations

import math
import re
from functools import lru_cache
from typing import Any

ZERO_CELSIUS = 273.15

# Base dimensions in the order used for dimension vectors everywhere in compromise.
BASE_DIMENSIONS = ("[mass]", "[length]", "[time]", "[temperature]")

# Names for common dimension vectors (M, L, T, Theta), for messages and summaries.
DIMENSION_NAMES: dict[tuple[int, int, int, int], str] = {
    (0, 0, 0, 0): "dimensionless",
    (0, 1, 0, 0): "length",
    (0, 2, 0, 0): "area",
    (0, 3, 0, 0): "volume",
    (0, 0, 1, 0): "time",
    (0, 0, -1, 0): "frequency",
    (0, 1, -1, 0): "velocity",
    (0, 1, -2, 0): "acceleration",
    (0, 2, -1, 0): "unit discharge or kinematic viscosity",
    (0, 3, -1, 0): "discharge",
    (1, 0, 0, 0): "mass",
    (1, -3, 0, 0): "density",
    (1, 1, -2, 0): "force",
    (1, -1, -2, 0): "pressure",
    (1, 2, -3, 0): "power",
    (1, -1, -1, 0): "dynamic viscosity",
    (1, 0, -2, 0): "surface tension",
    (0, 0, 0, 1): "temperature",
}


@lru_cache(maxsize=1)
def registry() -> Any:
    """Return the single pint ``UnitRegistry`` of compromise (built on first use)."""
    import pint

    ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    ureg.formatter.default_format = "~P"
    return ureg


def dimension_name(dim: tuple[int, ...]) -> str:
    """A readable name for a dimension vector, e.g. ``(0, 1, -1, 0)`` -> ``'velocity'``."""
    key = tuple(round(d) for d in dim)
    if key in DIMENSION_NAMES:
        return DIMENSION_NAMES[key]
    symbols = ("M", "L", "T", "K")
    parts = [f"{s}^{d}" if d != 1 else s for s, d in zip(symbols, key, strict=True) if d]
    return " ".join(parts) or "dimensionless"


def parse_quantity(text: str | float | int) -> tuple[float, tuple[int, int, int, int], str]:
    """Parse a value with units into (SI magnitude, dimension vector, unit as written).

    Offset temperatures (``"12 degC"``) are converted to kelvin. Plain numbers are
    dimensionless.

    Raises
    ------
    ValueError
        When the text is not a number followed by units pint knows.

    Examples
    --------
    >>> parse_quantity("3.5 m")[:2]
    (3.5, (0, 1, 0, 0))
    >>> round(parse_quantity("12 degC")[0], 2)
    285.15
    """
    if isinstance(text, bool):
        raise ValueError(f"expected a value with units, got {text!r}")
    if isinstance(text, int | float):
        return float(text), (0, 0, 0, 0), ""
    if not isinstance(text, str):
        raise ValueError(f"expected a value with units as a string, got {text!r}")
    s = text.strip()
    ureg = registry()
    m = re.match(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?|[-+]?inf|nan)\s*(.*)$", s, re.I)
    if not m:
        raise ValueError(f"expected a number followed by units, got {text!r}")
    number = float(m.group(1))
    unit_text = m.group(2).strip().replace("^", "**")
    if unit_text in ("", "%"):
        value = number / 100.0 if unit_text == "%" else number
        return value, (0, 0, 0, 0), unit_text
    try:
        unit = ureg.Unit(unit_text)
    except Exception as exc:  # pint raises several kinds; all mean "not a unit"
        raise ValueError(f"unknown unit {m.group(2).strip()!r} in {text!r}") from exc
    q = ureg.Quantity(number, unit)
    dims = q.dimensionality
    vec = tuple(int(dims.get(b, 0)) for b in BASE_DIMENSIONS)
    other = [k for k in dims if k not in BASE_DIMENSIONS]
    if other:
        raise ValueError(f"unsupported dimension {other} in {text!r}")
    base = q.to_base_units()
    return float(base.magnitude), vec, str(m.group(2).strip())  # type: ignore[return-value]


def parse_ratio(text: str | float | int) -> float:
    """Parse a scale ratio, model over prototype: ``"1:50"`` -> 0.02, ``0.02`` -> 0.02.

    ``"1:50"`` means one unit of model for fifty of prototype. A bare number is the ratio itself.

    Examples
    --------
    >>> parse_ratio("1:50")
    0.02
    >>> parse_ratio(0.5)
    0.5
    """
    if isinstance(text, bool):
        raise ValueError(f"expected a ratio like '1:50' or a number, got {text!r}")
    if isinstance(text, int | float):
        value = float(text)
    elif isinstance(text, str):
        s = text.strip()
        if ":" in s:
            a, _, b = s.partition(":")
            try:
                num, den = float(a), float(b)
            except ValueError:
                raise ValueError(f"expected a ratio like '1:50', got {text!r}") from None
            if den == 0:
                raise ValueError(f"expected a ratio like '1:50', got {text!r} (zero denominator)")
            value = num / den
        else:
            try:
                value = float(s)
            except ValueError:
                raise ValueError(
                    f"expected a ratio like '1:50' or a number, got {text!r}"
                ) from None
    else:
        raise ValueError(f"expected a ratio like '1:50' or a number, got {text!r}")
    if not math.isfinite(value) or value <= 0:
        raise ValueError(f"expected a positive finite ratio, got {text!r}")
    return value


def format_ratio(value: float) -> str:
    """Write a ratio as ``1:N`` when it is below one, ``N:1`` above.

    Examples
    --------
    >>> format_ratio(0.02)
    '1:50'
    >>> format_ratio(1 / 37.25)
    '1:37.25'
    """
    if value <= 0 or not math.isfinite(value):
        return str(value)
    if value <= 1:
        n = 1.0 / value
        return f"1:{_g(n)}"
    return f"{_g(value)}:1"


def _g(n: float) -> str:
    if abs(n - round(n)) < 1e-9 * max(1.0, n):
        return str(round(n))
    if n >= 100:
        return f"{n:.1f}".rstrip("0").rstrip(".")
    return f"{n:.4g}"


def to_celsius(kelvin: float) -> float:
    """Kelvin to degC."""
    return kelvin - ZERO_CELSIUS


def si_unit(dim: tuple[int, ...]) -> str:
    """The SI unit text for a dimension vector, e.g. ``(0, 3, -1, 0)`` -> ``'m^3/s'``."""
    special = {
        (0, 0, 0, 0): "-",
        (1, 1, -2, 0): "N",
        (1, -1, -2, 0): "Pa",
        (1, 2, -3, 0): "W",
        (1, 0, -2, 0): "N/m",
        (1, -1, -1, 0): "Pa s",
        (0, 0, 0, 1): "K",
        (0, 0, -1, 0): "Hz",
    }
    key = tuple(round(d) for d in dim)
    if key in special:
        return special[key]
    names = ("kg", "m", "s", "K")
    num = [n + (f"^{d}" if d != 1 else "") for n, d in zip(names, key, strict=True) if d > 0]
    den = [n + (f"^{-d}" if d != -1 else "") for n, d in zip(names, key, strict=True) if d < 0]
    out = " ".join(num) or "1"
    if den:
        out += "/" + "/".join(den) if len(den) == 1 else "/(" + " ".join(den) + ")"
    return out
