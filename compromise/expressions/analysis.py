"""Analysis of expression trees: products of powers and dimensions.

:func:`power_product` recognises ``coefficient x prod(name ** exponent)`` (the form that makes a
group's log-mismatch linear in the log scale ratios); :func:`dimension` computes the dimension
vector (M, L, T, Theta) of an expression and rejects sums of unlike dimensions. Both are
re-exported by :mod:`compromise.expressions`.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from fractions import Fraction

import numpy as np

from compromise.errors import ExpressionError
from compromise.expressions.syntax import (
    CONSTANTS,
    Binary,
    Call,
    Expr,
    Name,
    Num,
    Unary,
    _constant,
    _snap,
    _unknown_name,
    to_text,
)
from compromise.units import dimension_name

# --------------------------------------------------------------------------- power products

_PP = tuple[float, dict[str, float]]


def power_product(expr: Expr) -> tuple[float, dict[str, float]] | None:
    """Recognise ``coefficient * prod(name_i ** e_i)`` with constant exponents.

    Constant sub-expressions are folded; ``sqrt`` is the power 1/2; division gives negative
    exponents; ``abs`` of a power product is taken as the product with the absolute value of
    its coefficient (the quantities are positive).

    Returns
    -------
    tuple[float, dict[str, float]] or None
        ``(coefficient, {name: exponent})`` with zero exponents dropped and names sorted, or
        None when the expression is not such a product (a sum of non-constant terms, ``log``
        or ``exp`` of a name, an exponent that depends on a name, a fractional power of a
        negative coefficient).

    Raises
    ------
    ExpressionError
        When a constant part is not a finite number (overflow, division by zero).

    Examples
    --------
    >>> from compromise.expressions import parse
    >>> power_product(parse("velocity / sqrt(g * depth)"))
    (1.0, {'depth': -0.5, 'g': -0.5, 'velocity': 1.0})
    >>> power_product(parse("2 * a**2 / a"))
    (2.0, {'a': 1.0})
    >>> power_product(parse("width/depth + 1")) is None
    True
    """
    result = _pp(expr)
    if result is None:
        return None
    coefficient, exps = result
    if not math.isfinite(coefficient):
        raise ExpressionError(f"the constant factor of {to_text(expr)!r} is not a finite number")
    clean = {k: _snap(v) for k, v in sorted(exps.items())}
    return float(coefficient), {k: v for k, v in clean.items() if abs(v) > 1e-12}


def _pp(node: Expr) -> _PP | None:
    constant = _constant(node)
    if constant is not None:
        if not math.isfinite(constant):
            raise ExpressionError(f"{to_text(node)!r} is not a finite number")
        return constant, {}
    if isinstance(node, Name):
        return 1.0, {node.id: 1.0}
    if isinstance(node, Unary):
        inner = _pp(node.operand)
        if inner is None:
            return None
        return (-inner[0] if node.op == "-" else inner[0]), inner[1]
    if isinstance(node, Call):
        inner = _pp(node.arg)
        if inner is None:
            return None
        if node.func == "abs":
            return abs(inner[0]), inner[1]
        if node.func == "sqrt":
            return _pp_power(inner, 0.5)
        return None  # log or exp of a non-constant argument
    if isinstance(node, Binary):
        if node.op in ("+", "-"):
            return None  # both sides constant was handled above
        left = _pp(node.left)
        if left is None:
            return None
        if node.op == "**":
            exponent = _constant(node.right)
            if exponent is None:
                return None
            if not math.isfinite(exponent):
                raise ExpressionError(f"exponent {to_text(node.right)!r} is not a finite number")
            return _pp_power(left, exponent)
        right = _pp(node.right)
        if right is None:
            return None
        exps = dict(left[1])
        sign = 1.0 if node.op == "*" else -1.0
        for k, v in right[1].items():
            exps[k] = exps.get(k, 0.0) + sign * v
        if node.op == "*":
            coefficient = left[0] * right[0]
        else:
            if right[0] == 0.0:
                raise ExpressionError(f"division by zero in {to_text(node)!r}")
            coefficient = left[0] / right[0]
        return coefficient, exps
    return None


def _pp_power(base: _PP, exponent: float) -> _PP | None:
    coefficient, exps = base
    if coefficient < 0 and not float(exponent).is_integer():
        return None
    with np.errstate(all="ignore"):
        new = float(np.power(np.float64(coefficient), np.float64(exponent)))
    if not math.isfinite(new):
        raise ExpressionError(
            f"the constant factor {coefficient!r}**{exponent!r} is not a finite number"
        )
    return new, {k: v * exponent for k, v in exps.items()}


# --------------------------------------------------------------------------- dimensions


def _is_zero(d: np.ndarray) -> bool:
    return bool(np.all(np.abs(d) < 1e-9))


def _dim_label(d: np.ndarray) -> str:
    if np.all(np.abs(d - np.round(d)) < 1e-9):
        return f"[{dimension_name(tuple(int(x) for x in np.round(d)))}]"
    parts = [
        f"{symbol}^{Fraction(float(x)).limit_denominator(1000)}"
        for symbol, x in zip(("M", "L", "T", "K"), d, strict=True)
        if abs(x) > 1e-9
    ]
    return "[" + " ".join(parts) + "]"


def dimension(expr: Expr, dims: Mapping[str, Sequence[float]]) -> tuple[float, float, float, float]:
    """The dimension vector (M, L, T, Theta) of an expression.

    Parameters
    ----------
    expr : Expr
        The expression.
    dims : Mapping[str, Sequence[float]]
        Dimension vector of every free name, e.g. ``{"depth": (0, 1, 0, 0)}``.

    Raises
    ------
    ExpressionError
        When terms of different dimensions are added or subtracted, ``log``/``exp`` or an
        exponent get a dimensional argument, a dimensional base has an exponent that is not a
        constant number, or a name is unknown (with a close match suggested).

    Examples
    --------
    >>> from compromise.expressions import parse
    >>> dims = {"velocity": (0, 1, -1, 0), "depth": (0, 1, 0, 0), "g": (0, 1, -2, 0)}
    >>> dimension(parse("velocity / sqrt(g * depth)"), dims)
    (0.0, 0.0, 0.0, 0.0)
    >>> dimension(parse("depth + velocity"), dims)
    Traceback (most recent call last):
    ...
    compromise.errors.ExpressionError: cannot add [length] and [velocity] in 'depth + velocity'
    """
    table: dict[str, np.ndarray] = {}
    for key, vec in dims.items():
        table[key] = np.asarray(vec, dtype=float).reshape(-1)
        if table[key].shape != (4,):
            raise ExpressionError(
                f"dimension of {key!r} must have 4 entries (M, L, T, Theta); got {list(vec)}"
            )
    zero = np.zeros(4)

    def walk(node: Expr) -> np.ndarray:
        if isinstance(node, Num):
            return zero
        if isinstance(node, Name):
            if node.id in CONSTANTS:
                return zero
            if node.id not in table:
                raise _unknown_name(node.id, list(table), to_text(expr))
            return table[node.id]
        if isinstance(node, Unary):
            return walk(node.operand)
        if isinstance(node, Call):
            inner = walk(node.arg)
            if node.func in ("sqrt", "abs"):
                return 0.5 * inner if node.func == "sqrt" else inner
            if not _is_zero(inner):
                raise ExpressionError(
                    f"{node.func} needs a dimensionless argument; got {_dim_label(inner)} "
                    f"in {to_text(node)!r}"
                )
            return zero
        if not isinstance(node, Binary):
            raise ExpressionError(f"not an expression node: {node!r}")
        left, right = walk(node.left), walk(node.right)
        if node.op in ("+", "-"):
            if not np.allclose(left, right, rtol=0.0, atol=1e-9):
                verb = "add" if node.op == "+" else "subtract"
                raise ExpressionError(
                    f"cannot {verb} {_dim_label(left)} and {_dim_label(right)} in {to_text(node)!r}"
                )
            return left
        if node.op in ("*", "/"):
            return left + right if node.op == "*" else left - right
        if not _is_zero(right):
            raise ExpressionError(
                f"an exponent must be dimensionless; got {_dim_label(right)} in {to_text(node)!r}"
            )
        if _is_zero(left):
            return zero
        exponent = _constant(node.right)
        if exponent is None:
            raise ExpressionError(
                f"the exponent of a base with dimensions {_dim_label(left)} must be a "
                f"constant number in {to_text(node)!r}"
            )
        if not math.isfinite(exponent):
            raise ExpressionError(
                f"exponent {to_text(node.right)!r} is not a finite number in {to_text(node)!r}"
            )
        return left * exponent

    d0, d1, d2, d3 = (_snap(float(x)) + 0.0 for x in walk(expr))
    return d0, d1, d2, d3
