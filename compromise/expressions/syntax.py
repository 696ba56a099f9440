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
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

import numpy as np

from compromise.errors import ExpressionError

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
    hit = _PARSED.get(text)
    if hit is None:
        hit = _parse(text)
        if len(_PARSED) >= _PARSE_CACHE:
            _PARSED.clear()
        _PARSED[text] = hit
    return hit


#: Parsed trees by text: a tree is immutable (frozen dataclasses), and the scale-effect checks
#: evaluate the same few texts for every design, so each text is parsed once per process.
_PARSED: dict[str, Expr] = {}
_PARSE_CACHE = 4096


def _parse(text: str) -> Expr:
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

    with np.errstate(all="ignore"):
        result = compiled(expr)(env)
    if np.ndim(result) == 0:
        return float(result)
    return np.asarray(result)


def compiled(expr: Expr) -> Callable[[Mapping[str, Any]], Any]:
    """The expression as a function of the environment (what :func:`evaluate` runs, without
    its ``np.errstate`` and its conversion of the result: for callers that evaluate many
    expressions inside one ``np.errstate(all="ignore")`` of their own)."""
    kept = _COMPILED.get(id(expr))
    if kept is None or kept[0] is not expr:
        kept = (expr, _compile(expr, expr))
        if len(_COMPILED) >= 4096:
            _COMPILED.clear()
        _COMPILED[id(expr)] = kept
    return kept[1]


#: compiled expressions (:func:`_compile`) by the expression's id, beside the expression itself
#: (held, so that its id is not reused; a frozen tree's hash would cost a walk per call)
_COMPILED: dict[int, tuple[Expr, Callable[[Mapping[str, Any]], Any]]] = {}


def _compile(node: Expr, whole: Expr) -> Callable[[Mapping[str, Any]], Any]:
    """A function of the environment that applies the node's numpy operations in the order
    a walk of the tree would, so its results are the walk's to the last bit; compiled once
    per expression, it skips the tree's type tests on every evaluation."""
    if isinstance(node, Num):
        value = np.float64(node.value)
        return lambda env: value
    if isinstance(node, Name):
        ident = node.id
        if ident in CONSTANTS:
            constant = np.float64(CONSTANTS[ident])
            return lambda env: constant

        def name(env: Mapping[str, Any]) -> Any:
            if ident not in env:
                raise _unknown_name(ident, list(env), to_text(whole))
            return np.asarray(env[ident], dtype=float)

        return name
    if isinstance(node, Unary):
        operand = _compile(node.operand, whole)
        if node.op == "-":
            return lambda env: np.negative(operand(env))
        return operand
    if isinstance(node, Binary):
        op = _NP_BINARY[node.op]
        left, right = _compile(node.left, whole), _compile(node.right, whole)
        return lambda env: op(left(env), right(env))
    if isinstance(node, Call):
        fn = _NP_FUNCS[node.func]
        arg = _compile(node.arg, whole)
        return lambda env: fn(arg(env))
    raise ExpressionError(f"not an expression node: {node!r}")


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


__all__ = [
    "FUNCTIONS",
    "PROPERTY_DIMENSIONS",
    "PROPERTY_NAMES",
    "Binary",
    "Call",
    "Expr",
    "Name",
    "Num",
    "Unary",
    "evaluate",
    "names",
    "parse",
    "substitute",
    "to_text",
]
