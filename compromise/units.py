"""The one pint registry, and the conversions done at the edge (case file, command line).

Everything inside compromise works on SI floats: metres, seconds, kilograms, kelvin, pascals.
Temperatures are handed to the core in kelvin; they are shown to users in degC.
"""

from __future__ import annotations

import math
import os
import re
from functools import lru_cache
from pathlib import Path
from typing import Any

ZERO_CELSIUS = 273.15

#: Every number compromise accepts (after conversion to SI) lies in this range of magnitudes,
#: or is zero where zero is allowed: its logarithm, square, cube and reciprocal then stay
#: finite in float64 (largest about 1.8e308, smallest normal 2.2e-308).
SAFE_MIN = 1e-150
SAFE_MAX = 1e150

#: Scale ratios (model over prototype) are tighter: a quantity scales as a power of a ratio
#: up to about the 4th (power, force), and a group's exponents rarely pass 25, so 1e12 keeps
#: every derived ratio finite.
RATIO_MIN = 1e-12
RATIO_MAX = 1e12

#: The largest exponent a unit may carry (``m^12``); towers such as ``m**(9**9**9)`` are
#: refused before pint evaluates them.
MAX_UNIT_EXPONENT = 12

#: The longest run of digits accepted in a unit string.
_MAX_UNIT_DIGITS = 8

_RANGE = "1e-150 and 1e150"

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


def cache_folder(name: str) -> Path | None:
    """``name`` under the user's cache directory (created on first use), or None.

    For data compromise can always rebuild (pint's parsed definitions, fluid property
    tables): None when ``COMPROMISE_NO_CACHE`` is set or the folder cannot be created or
    written, and every caller then works without a cache, so a read-only home never breaks a
    run. The directory is the platform's (``platformdirs``, a dependency of pint), e.g.
    ``~/.cache/compromise`` on Linux.
    """
    if os.environ.get("COMPROMISE_NO_CACHE"):
        return None
    import platformdirs

    folder = platformdirs.user_cache_path("compromise", appauthor=False) / name
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError:
        return None
    return folder if os.access(folder, os.W_OK | os.X_OK) else None


@lru_cache(maxsize=1)
def registry() -> Any:
    """Return the single pint ``UnitRegistry`` of compromise (built on first use).

    Parsing pint's definition files takes about 150 ms per run; pint keeps the parsed result
    on disk (keyed by the files' contents) under the user's cache directory
    (:func:`cache_folder`) and reads it back in about 15 ms. A cache that
    cannot be read or written (a file half-written by a concurrent run, a full disk) is
    ignored and the registry built from the definition files, as without a cache.
    """
    import pint

    folder = cache_folder(f"pint-{pint.__version__}")
    ureg = None
    if folder is not None:
        try:
            ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True, cache_folder=folder)
        except Exception:  # any cache failure: build without the cache
            ureg = None
    if ureg is None:
        ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    ureg.formatter.default_format = "~P"
    for definition in TRADE_UNITS:
        ureg.define(definition)
    return ureg


#: Discharge units of the trade that pint does not know by these names. The US gallon is
#: 231 in^3 and the foot 0.3048 m, both exact by definition (NIST Special Publication 811,
#: 2008 edition, appendix B; from memory), so each factor below is exact.
TRADE_UNITS: tuple[str, ...] = (
    "cubic_feet_per_second = foot ** 3 / second = cfs = _ = CFS",
    "gallons_per_minute = gallon / minute = gpm = _ = GPM",
    "million_gallons_per_day = 1e6 * gallon / day = mgd = _ = MGD",
    "cubic_metres_per_second = meter ** 3 / second = cumec",
    "litres_per_second = liter / second = lps",
)

#: Units a case file commonly means, for the "did you mean" of an error message.
COMMON_UNITS: tuple[str, ...] = (
    "m", "mm", "cm", "km", "ft", "in", "s", "min", "h", "day", "kg", "g", "t",
    "m^2", "m^3", "L", "m/s", "ft/s", "m^3/s", "L/s", "cfs", "gpm", "mgd", "m^2/s",
    "Pa", "kPa", "MPa", "bar", "atm", "psi", "N", "kN", "N/m", "Pa*s", "kg/m^3",
    "degC", "degF", "K", "Hz",
)  # fmt: skip

#: Temperature units written the way people say them; pint reads "C" as the coulomb and "F" as
#: the farad.
_TEMPERATURE_SPELLINGS = {
    "c": "degC",
    "deg c": "degC",
    "deg. c": "degC",
    "degrees c": "degC",
    "degree c": "degC",
    "oc": "degC",
    "f": "degF",
    "deg f": "degF",
    "degrees f": "degF",
    "degree f": "degF",
    "of": "degF",
}


def unit_hint(number: str, unit_text: str) -> str:
    """A ``"; did you mean '12 degC'?"`` suffix for a unit that was not understood ('' if none).

    Examples
    --------
    >>> unit_hint("12", "C")
    "; did you mean '12 degC'?"
    >>> unit_hint("30", "m3/s")
    "; did you mean '30 m^3/s'?"
    """
    text = unit_text.strip()
    spelled = _TEMPERATURE_SPELLINGS.get(" ".join(text.lower().split()))
    if spelled:
        return f"; did you mean '{number} {spelled}'?"
    # exponents written without a caret: m3/s, m2, s-1
    powered = re.sub(r"(?<=[A-Za-z])(-?\d+)", r"^\1", text)
    if powered != text and _known(powered):
        return f"; did you mean '{number} {powered}'?"
    folded = {u.lower(): u for u in COMMON_UNITS}.get(text.lower())
    if folded and folded != text:
        return f"; did you mean '{number} {folded}'?"
    return ""


def _known(unit_text: str) -> bool:
    """Whether pint reads ``unit_text`` as a unit of compromise's base dimensions."""
    try:
        unit = registry().Unit(unit_text.replace("^", "**"))
    except Exception:  # pint raises several kinds; all mean "not a unit"
        return False
    return all(k in BASE_DIMENSIONS for k in unit.dimensionality)


def number_text(value: Any) -> str:
    """A number written shortly for a message: long integers and extreme floats in scientific
    form (``1.00e+400``), other values as ``repr``.

    Examples
    --------
    >>> number_text(10**400)
    '1.00e+400'
    >>> number_text(2.5)
    '2.5'
    """
    if isinstance(value, bool) or not isinstance(value, int | float):
        return repr(value)
    if isinstance(value, int):
        digits = str(abs(value)) if abs(value) < 10**4000 else None
        if digits is None:
            return ("-" if value < 0 else "") + "an integer of more than 4000 digits"
        if len(digits) <= 15:
            return str(value)
        sign = "-" if value < 0 else ""
        return f"{sign}{digits[0]}.{digits[1:3]}e+{len(digits) - 1}"
    return repr(value)


def checked_number(value: Any, what: str = "a number") -> float:
    """``value`` as a float, refused unless finite and zero or within ``SAFE_MIN..SAFE_MAX``.

    This is the one gate every number from a case file or the command line passes, so that
    its logarithm, square and reciprocal stay finite downstream.

    Raises
    ------
    ValueError
        With a message naming what was expected and the number in short form.

    Examples
    --------
    >>> checked_number(3)
    3.0
    >>> checked_number(1e-320)
    Traceback (most recent call last):
    ...
    ValueError: expected a number between 1e-150 and 1e150 in size (or 0), got 1e-320
    """
    if isinstance(value, bool) or not isinstance(value, int | float):
        raise ValueError(f"expected {what}, got {value!r}")
    if isinstance(value, int) and abs(value) > 10**150:
        raise ValueError(
            f"expected a number between {_RANGE} in size (or 0), got {number_text(value)}"
        )
    v = float(value)
    if not math.isfinite(v):
        raise ValueError(f"expected a finite number, got {number_text(value)}")
    if v != 0 and not SAFE_MIN <= abs(v) <= SAFE_MAX:
        raise ValueError(
            f"expected a number between {_RANGE} in size (or 0), got {number_text(value)}"
        )
    return v


_EXPONENT = re.compile(
    r"\*\*\s*(\(\s*[-+]?\s*\d+(?:\.\d+)?(?:\s*/\s*\d+)?\s*\)|[-+]?\d+(?:\.\d+)?)"
)


def check_unit_text(unit_text: str) -> None:
    """Refuse a unit string whose exponents pint would evaluate at great cost or truncate.

    Exponents (``^`` or ``**``) must be a plain number or a parenthesised number or fraction of
    magnitude at most ``MAX_UNIT_EXPONENT``; an exponent of an exponent is refused; so is any
    run of more than eight digits. Called before pint sees the text.

    Raises
    ------
    ValueError
        When the unit string is refused.

    Examples
    --------
    >>> check_unit_text("m^3/s")
    >>> check_unit_text("m**(9**9**9)")  # doctest: +ELLIPSIS
    Traceback (most recent call last):
    ...
    ValueError: unit 'm**(9**9**9)': expected exponents that are plain numbers such as m^3 ...
    """
    text = unit_text.replace("^", "**")
    if re.search(r"\d{" + str(_MAX_UNIT_DIGITS + 1) + ",}", text):
        raise ValueError(f"unit {unit_text!r}: a number of more than {_MAX_UNIT_DIGITS} digits")
    pos = 0
    while True:
        at = text.find("**", pos)
        if at < 0:
            return
        m = _EXPONENT.match(text, at)
        rest = text[m.end() :].lstrip() if m else ""
        if m is None or rest.startswith("**"):
            raise ValueError(
                f"unit {unit_text!r}: expected exponents that are plain numbers such as m^3 "
                "(an exponent may not carry its own exponent)"
            )
        token = m.group(1).strip("() ").replace(" ", "")
        num, _, den = token.partition("/")
        size = abs(float(num)) / (float(den) if den else 1.0) if den != "0" else math.inf
        if not size <= MAX_UNIT_EXPONENT:
            raise ValueError(
                f"unit {unit_text!r}: exponent {token} is beyond {MAX_UNIT_EXPONENT} in size"
            )
        pos = m.end()


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
    if isinstance(text, int):
        return checked_number(text), (0, 0, 0, 0), ""
    if isinstance(text, float):
        return _in_range(text, repr(text)), (0, 0, 0, 0), ""
    if not isinstance(text, str):
        raise ValueError(f"expected a value with units as a string, got {text!r}")
    s = text.strip()
    ureg = registry()
    m = re.match(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?|[-+]?inf|nan)\s*(.*)$", s, re.I)
    if not m:
        raise ValueError(f"expected a number followed by units, got {_short(text)}")
    if len(m.group(1)) > 40:
        raise ValueError(f"expected a number of at most 40 characters, got {_short(text)}")
    # nan and inf pass here (the caller says what kind of finite value it expected); finite
    # values must lie in the safe range
    number = float(m.group(1))
    if math.isfinite(number):
        checked_number(number)
    unit_text = m.group(2).strip().replace("^", "**")
    if unit_text in ("", "%"):
        value = number / 100.0 if unit_text == "%" else number
        return _in_range(value, text), (0, 0, 0, 0), unit_text
    written = m.group(2).strip()
    check_unit_text(written)
    try:
        unit = ureg.Unit(unit_text)
    except Exception as exc:  # pint raises several kinds; all mean "not a unit"
        hint = unit_hint(m.group(1), written)
        raise ValueError(f"unknown unit {written!r} in {text!r}{hint}") from exc
    q = ureg.Quantity(number, unit)
    dims = q.dimensionality
    fractional = {k: v for k, v in dims.items() if abs(v - round(v)) > 1e-9}
    if fractional:
        name, power = next(iter(fractional.items()))
        raise ValueError(
            f"unit {written!r} in {text!r} has the fractional exponent {power:g} of "
            f"{name.strip('[]')}; expected whole powers (m^3, s^-1)"
        )
    vec = tuple(round(dims.get(b, 0)) for b in BASE_DIMENSIONS)
    other = [k for k in dims if k not in BASE_DIMENSIONS]
    if other:
        hint = unit_hint(m.group(1), written)
        raise ValueError(
            f"unit {written!r} in {text!r} has the dimension {dims}, outside mass, length, "
            f"time and temperature{hint}"
        )
    base = q.to_base_units()
    return _in_range(float(base.magnitude), text), vec, str(m.group(2).strip())  # type: ignore[return-value]


def _in_range(si: float, text: str) -> float:
    """A finite SI value checked against the safe range (nan and inf returned as they are)."""
    if math.isfinite(si):
        try:
            checked_number(si)
        except ValueError as exc:
            raise ValueError(f"{_short(text)} in SI units: {exc}") from None
    return si


def _short(text: str) -> str:
    """``repr`` of a text, cut to 60 characters."""
    return repr(text if len(text) <= 60 else text[:57] + "...")


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
    if isinstance(text, int):
        value = checked_number(text)
    elif isinstance(text, float):
        value = text
    elif isinstance(text, str):
        s = text.strip()
        if len(s) > 60:
            raise ValueError(f"expected a ratio like '1:50', got {_short(s)}")
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
        raise ValueError(f"expected a positive finite ratio, got {_short(str(text))}")
    if not RATIO_MIN <= value <= RATIO_MAX:
        raise ValueError(f"expected a ratio between 1:1e12 and 1e12:1, got {_short(str(text))}")
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
