"""A small, safe expression language for dimensionless groups and scaling rules.

Case files write groups such as ``"velocity / sqrt(g * depth)"`` and scalings such as
``"vertical / horizontal"``. This module turns such text into a tree of frozen dataclasses
(:class:`Num`, :class:`Name`, :class:`Unary`, :class:`Binary`, :class:`Call`) and works on
that tree: evaluation with numpy, dimensional analysis, and recognition of products of powers
(the form that makes a group's log-mismatch linear in the log scale ratios).

The grammar is: numbers (``2``, ``0.4``, ``1e-3``), names (ASCII identifiers), binary
``+ - * / **`` (``^`` is read as ``**``), unary ``-`` and ``+``, parentheses, the constant ``pi``
and calls with one argument of ``sqrt``, ``log`` (natural), ``exp`` and ``abs``. Nothing else.

Text is read with :func:`ast.parse` (which only builds a syntax tree and runs nothing), every
node is checked against a whitelist, and the result is copied into this module's own tree.
Nothing is ever passed to ``eval`` or ``exec``.
"""

from __future__ import annotations

import ast
import difflib
import math
import re
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from fractions import Fraction

import numpy as np

from compromise.errors import ExpressionError
from compromise.units import dimension_name

MAX_LENGTH = 500
"""Longest expression text accepted [characters]."""

MAX_DEPTH = 64
"""Deepest nesting of operations accepted."""

FUNCTIONS = ("sqrt", "log", "exp", "abs")
"""The only functions an expression may call, each with one argument."""

CONSTANTS: dict[str, float] = {"pi": math.pi}

PROPERTY_NAMES = ("rho", "mu", "nu", "sigma", "c", "g")
"""Fluid-property names defined in every evaluation environment."""

PROPERTY_DIMENSIONS: dict[str, tuple[int, int, int, int]] = {
    "rho": (1, -3, 0, 0),  # density [kg/m^3]
    "mu": (1, -1, -1, 0),  # dynamic viscosity [Pa s]
    "nu": (0, 2, -1, 0),  # kinematic viscosity [m^2/s]
    "sigma": (1, 0, -2, 0),  # surface tension [N/m]
    "c": (0, 1, -1, 0),  # speed of sound [m/s]
    "g": (0, 1, -2, 0),  # gravitational acceleration [m/s^2]
}
"""Dimension vectors (M, L, T, Theta) of the fluid-property names."""

_BINARY_OPS = ("+", "-", "*", "/", "**")
_UNARY_OPS = ("-", "+")
_NAME_RE = re.compile(r"^[A-Za-z_][A-Za-z0-9_]*$")
_AST_BINOPS = {ast.Add: "+", ast.Sub: "-", ast.Mult: "*", ast.Div: "/", ast.Pow: "**"}
# Node types refused with a specific message (anything else gets a generic one).
_FORBIDDEN_NODES: dict[type, str] = {
    ast.Attribute: "attribute access is not allowed",
    ast.Subscript: "subscripts are not allowed",
    ast.Lambda: "lambda is not allowed",
    ast.ListComp: "comprehensions are not allowed",
    ast.SetComp: "comprehensions are not allowed",
    ast.DictComp: "comprehensions are not allowed",
    ast.GeneratorExp: "comprehensions are not allowed",
    ast.Compare: "comparisons are not allowed",
    ast.BoolOp: "'and'/'or' are not allowed",
    ast.IfExp: "conditional expressions are not allowed",
    ast.NamedExpr: "assignment (:=) is not allowed",
    ast.Starred: "starred arguments are not allowed",
    ast.JoinedStr: "f-strings are not allowed",
    ast.Tuple: "tuples are not allowed",
    ast.List: "lists are not allowed",
    ast.Set: "sets are not allowed",
    ast.Dict: "dicts are not allowed",
}


# --------------------------------------------------------------------------- tree


@dataclass(frozen=True)
class Expr:
    """Base class of expression nodes; ``str(node)`` gives :func:`to_text`."""

    def __str__(self) -> str:
        return to_text(self)


@dataclass(frozen=True)
class Num(Expr):
    """A number (always stored as a finite float)."""

    value: float

    def __post_init__(self) -> None:
        value = float(self.value)
        if not math.isfinite(value):
            raise ExpressionError(f"numbers must be finite; got {self.value!r}")
        object.__setattr__(self, "value", value)


@dataclass(frozen=True)
class Name(Expr):
    """A name: a quantity, a fluid property or the constant ``pi``."""

    id: str

    def __post_init__(self) -> None:
        _check_name(self.id)


@dataclass(frozen=True)
class Unary(Expr):
    """Unary ``-`` or ``+``."""

    op: str
    operand: Expr

    def __post_init__(self) -> None:
        if self.op not in _UNARY_OPS:
            raise ExpressionError(f"unknown unary operator {self.op!r}")


@dataclass(frozen=True)
class Binary(Expr):
    """Binary ``+ - * / **``."""

    op: str
    left: Expr
    right: Expr

    def __post_init__(self) -> None:
        if self.op not in _BINARY_OPS:
            raise ExpressionError(f"unknown operator {self.op!r}")


@dataclass(frozen=True)
class Call(Expr):
    """A call of one of :data:`FUNCTIONS` with one argument."""

    func: str
    arg: Expr

    def __post_init__(self) -> None:
        if self.func not in FUNCTIONS:
            raise ExpressionError(f"calls are limited to {', '.join(FUNCTIONS)}; got {self.func!r}")


def _check_name(name: str) -> None:
    if not isinstance(name, str) or not _NAME_RE.match(name):
        raise ExpressionError(f"names must be ASCII identifiers; got {name!r}")
    if name.startswith("__"):
        raise ExpressionError(f"{name!r} is not allowed")
    if name in FUNCTIONS:
        raise ExpressionError(f"{name!r} is a function; call it as {name}(...)")


# --------------------------------------------------------------------------- parsing


def parse(text: str) -> Expr:
    """Parse expression text into a tree, refusing anything outside the grammar.

    Parameters
    ----------
    text : str
        The expression, e.g. ``"velocity / sqrt(g * depth)"``. ``^`` is read as ``**``.

    Returns
    -------
    Expr
        The tree. A minus sign directly on a number is folded into the number.

    Raises
    ------
    ExpressionError
        One line naming what was found: a syntax error, a forbidden construct (attribute,
        subscript, lambda, string, keyword argument, ...), a call of an unknown function, a
        dunder name, too long a text or too deep a nesting.

    Examples
    --------
    >>> parse("a / sqrt(b)")
    Binary(op='/', left=Name(id='a'), right=Call(func='sqrt', arg=Name(id='b')))
    >>> to_text(parse("a^2 / (b*c)"))
    'a**2 / (b * c)'
    """
    if not isinstance(text, str):
        raise ExpressionError(f"an expression must be text; got {text!r}")
    if len(text) > MAX_LENGTH:
        raise ExpressionError(
            f"expression is too long ({len(text)} characters; the limit is {MAX_LENGTH})"
        )
    source = text.replace("^", "**").strip()
    if not source:
        raise ExpressionError(f"cannot parse {text!r}: empty expression")
    shown = text if len(text) <= 80 else text[:77] + "..."
    try:
        tree = ast.parse(source, mode="eval")
    except SyntaxError as exc:
        raise ExpressionError(f"cannot parse {shown!r}: {exc.msg}") from None
    except (ValueError, RecursionError, MemoryError) as exc:
        raise ExpressionError(f"cannot parse {shown!r}: {exc}") from None
    return _convert(tree.body, source, 1)


def _segment(node: ast.AST, source: str) -> str:
    seg = ast.get_source_segment(source, node)
    if seg is None:
        seg = ast.unparse(node)
    seg = " ".join(seg.split())
    return seg if len(seg) <= 60 else seg[:57] + "..."


def _convert(node: ast.AST, source: str, depth: int) -> Expr:
    if depth > MAX_DEPTH:
        raise ExpressionError(f"expression is nested too deeply (more than {MAX_DEPTH} levels)")
    if isinstance(node, ast.Constant):
        value = node.value
        if isinstance(value, bool) or not isinstance(value, int | float):
            if isinstance(value, str | bytes):
                raise ExpressionError(f"strings are not allowed: {_segment(node, source)}")
            raise ExpressionError(f"only real numbers are allowed; got {_segment(node, source)}")
        try:
            number = float(value)
        except OverflowError:
            raise ExpressionError(f"number too large: {_segment(node, source)}") from None
        if not math.isfinite(number):
            raise ExpressionError(f"number too large: {_segment(node, source)}")
        return Num(number)
    if isinstance(node, ast.Name):
        _check_name(node.id)
        return Name(node.id)
    if isinstance(node, ast.UnaryOp):
        if isinstance(node.op, ast.USub | ast.UAdd):
            op = "-" if isinstance(node.op, ast.USub) else "+"
            operand = _convert(node.operand, source, depth + 1)
            if op == "-" and isinstance(operand, Num) and isinstance(node.operand, ast.Constant):
                return Num(-operand.value)
            return Unary(op, operand)
        symbol = "not" if isinstance(node.op, ast.Not) else "~"
        raise ExpressionError(f"operator {symbol!r} is not allowed: {_segment(node, source)}")
    if isinstance(node, ast.BinOp):
        op = _AST_BINOPS.get(type(node.op))
        if op is None:
            raise ExpressionError(
                f"only the operators + - * / ** are allowed: {_segment(node, source)}"
            )
        left = _convert(node.left, source, depth + 1)
        right = _convert(node.right, source, depth + 1)
        return Binary(op, left, right)
    if isinstance(node, ast.Call):
        func = node.func
        if isinstance(func, ast.Name):
            if func.id.startswith("__"):
                raise ExpressionError(f"{func.id!r} is not allowed")
            if func.id not in FUNCTIONS:
                raise ExpressionError(
                    f"calls are limited to {', '.join(FUNCTIONS)}; got {func.id!r}"
                )
            if node.keywords or any(isinstance(a, ast.Starred) for a in node.args):
                raise ExpressionError(
                    f"keyword or starred arguments are not allowed: {_segment(node, source)}"
                )
            if len(node.args) != 1:
                raise ExpressionError(
                    f"{func.id} takes exactly one argument; got {len(node.args)} in "
                    f"{_segment(node, source)!r}"
                )
            return Call(func.id, _convert(node.args[0], source, depth + 1))
        # Not a bare name: report the inner construct (attribute, subscript, ...) if forbidden.
        _convert(func, source, depth + 1)
        raise ExpressionError(
            f"calls are limited to {', '.join(FUNCTIONS)}; got {_segment(func, source)!r}"
        )
    message = _FORBIDDEN_NODES.get(type(node))
    if message is not None:
        raise ExpressionError(f"{message}: {_segment(node, source)}")
    raise ExpressionError(f"{type(node).__name__} is not allowed: {_segment(node, source)}")


# --------------------------------------------------------------------------- tree utilities


def names(expr: Expr) -> frozenset[str]:
    """The free names of an expression (the constant ``pi`` and function names excluded).

    Examples
    --------
    >>> sorted(names(parse("rho * velocity**2 * depth / sigma + pi")))
    ['depth', 'rho', 'sigma', 'velocity']
    """
    found: set[str] = set()

    def walk(node: Expr) -> None:
        if isinstance(node, Name):
            if node.id not in CONSTANTS:
                found.add(node.id)
        elif isinstance(node, Unary):
            walk(node.operand)
        elif isinstance(node, Binary):
            walk(node.left)
            walk(node.right)
        elif isinstance(node, Call):
            walk(node.arg)

    walk(expr)
    return frozenset(found)


def substitute(expr: Expr, mapping: Mapping[str, Expr | str | float]) -> Expr:
    """Replace names by expressions.

    Parameters
    ----------
    expr : Expr
        The expression.
    mapping : Mapping[str, Expr | str | float]
        Name to replacement. Text is parsed, numbers become :class:`Num`. ``pi`` is a
        constant and is never replaced.

    Examples
    --------
    >>> to_text(substitute(parse("velocity / sqrt(g * L)"), {"L": "depth"}))
    'velocity / sqrt(g * depth)'
    """
    table: dict[str, Expr] = {}
    for key, value in mapping.items():
        if isinstance(value, Expr):
            table[key] = value
        elif isinstance(value, str):
            table[key] = parse(value)
        elif isinstance(value, int | float) and not isinstance(value, bool):
            table[key] = Num(float(value))
        else:
            raise ExpressionError(f"cannot substitute {value!r} for {key!r}")

    def walk(node: Expr) -> Expr:
        if isinstance(node, Name):
            if node.id in CONSTANTS:
                return node
            return table.get(node.id, node)
        if isinstance(node, Unary):
            return Unary(node.op, walk(node.operand))
        if isinstance(node, Binary):
            return Binary(node.op, walk(node.left), walk(node.right))
        if isinstance(node, Call):
            return Call(node.func, walk(node.arg))
        return node

    return walk(expr)


# --------------------------------------------------------------------------- evaluation

_NP_BINARY = {"+": np.add, "-": np.subtract, "*": np.multiply, "/": np.divide, "**": np.power}
_NP_FUNCS = {"sqrt": np.sqrt, "log": np.log, "exp": np.exp, "abs": np.abs}


def _unknown_name(name: str, known: Sequence[str], text: str) -> ExpressionError:
    close = difflib.get_close_matches(name, list(known), n=1)
    hint = f"; did you mean {close[0]!r}?" if close else ""
    where = f" in {text!r}" if text and text != name else ""
    return ExpressionError(f"unknown name {name!r}{where}{hint}")


def evaluate(expr: Expr, env: Mapping[str, float | np.ndarray]) -> float | np.ndarray:
    """Evaluate an expression with numpy, elementwise over array values.

    Parameters
    ----------
    expr : Expr
        The expression.
    env : Mapping[str, float | numpy.ndarray]
        Value of every free name (SI floats or arrays that broadcast together).

    Returns
    -------
    float or numpy.ndarray
        A float when every value is a scalar, else an array. Overflow, division by zero and
        roots of negative numbers follow IEEE rules (``inf``, ``nan``) without warnings; the
        caller decides what a non-finite value means.

    Raises
    ------
    ExpressionError
        On a name that is not in ``env`` (with a close match suggested).

    Examples
    --------
    >>> round(evaluate(parse("velocity / sqrt(g * depth)"),
    ...                {"velocity": 1.8, "g": 9.80665, "depth": 3.5}), 6)
    0.30724
    """

    def walk(node: Expr) -> np.ndarray:
        if isinstance(node, Num):
            return np.float64(node.value)
        if isinstance(node, Name):
            if node.id in CONSTANTS:
                return np.float64(CONSTANTS[node.id])
            if node.id not in env:
                raise _unknown_name(node.id, list(env), to_text(expr))
            return np.asarray(env[node.id], dtype=float)
        if isinstance(node, Unary):
            value = walk(node.operand)
            return np.negative(value) if node.op == "-" else value
        if isinstance(node, Binary):
            return _NP_BINARY[node.op](walk(node.left), walk(node.right))
        if isinstance(node, Call):
            return _NP_FUNCS[node.func](walk(node.arg))
        raise ExpressionError(f"not an expression node: {node!r}")

    with np.errstate(all="ignore"):
        result = walk(expr)
    if np.ndim(result) == 0:
        return float(result)
    return np.asarray(result)


def _constant(expr: Expr) -> float | None:
    """The value of an expression without free names, else None (may be inf or nan)."""
    if names(expr):
        return None
    value = evaluate(expr, {})
    assert isinstance(value, float)
    return value


def _snap(x: float) -> float:
    """Round a float to a nearby simple fraction (denominator up to 1000) when within 1e-12."""
    if not math.isfinite(x):
        return x
    f = Fraction(x).limit_denominator(1000)
    if abs(float(f) - x) <= 1e-12 * max(1.0, abs(x)):
        return float(f)
    return x


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


# --------------------------------------------------------------------------- text

_PREC_ADD, _PREC_MUL, _PREC_UNARY, _PREC_POW, _PREC_ATOM = 1, 2, 3, 4, 5
_PREC = {"+": _PREC_ADD, "-": _PREC_ADD, "*": _PREC_MUL, "/": _PREC_MUL, "**": _PREC_POW}


def _format_number(value: float) -> str:
    if value.is_integer() and abs(value) < 1e16:
        return str(int(value))
    return repr(value)


def _prec(node: Expr) -> int:
    if isinstance(node, Num):
        return _PREC_UNARY if node.value < 0 else _PREC_ATOM
    if isinstance(node, Unary):
        return _PREC_UNARY
    if isinstance(node, Binary):
        return _PREC[node.op]
    return _PREC_ATOM


def to_text(expr: Expr) -> str:
    """Readable, stable text for an expression; ``parse(to_text(e)) == e`` for parsed trees.

    Parentheses are written only where the structure needs them; ``*``, ``/``, ``+`` and
    ``-`` are spaced, ``**`` is not.

    Examples
    --------
    >>> to_text(parse("rho*velocity^2*L/sigma"))
    'rho * velocity**2 * L / sigma'
    >>> to_text(parse("a - (b - c)"))
    'a - (b - c)'
    """

    def wrap(node: Expr, needs: bool) -> str:
        text = walk(node)
        return f"({text})" if needs else text

    def walk(node: Expr) -> str:
        if isinstance(node, Num):
            return _format_number(node.value)
        if isinstance(node, Name):
            return node.id
        if isinstance(node, Call):
            return f"{node.func}({walk(node.arg)})"
        if isinstance(node, Unary):
            operand = node.operand
            # parenthesise a nested sign ("-(-a)") and anything looser than a power
            needs = _prec(operand) <= _PREC_UNARY
            return node.op + wrap(operand, needs)
        if isinstance(node, Binary):
            p = _PREC[node.op]
            if node.op == "**":
                left = wrap(node.left, _prec(node.left) <= _PREC_POW)
                right = wrap(node.right, _prec(node.right) < _PREC_UNARY)
                return f"{left}**{right}"
            left = wrap(node.left, _prec(node.left) < p)
            right = wrap(node.right, _prec(node.right) <= p)
            return f"{left} {node.op} {right}"
        raise ExpressionError(f"not an expression node: {node!r}")

    return walk(expr)
