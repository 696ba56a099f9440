"""Tests of the safe expression language (compromise.expressions).

Numerical oracle: Python's own arithmetic and math module (the values of the physical groups are
checked once, against the ``fluids`` library, in ``tests/test_groups.py``). Dimension vectors
of the variables come from pint through ``compromise.units.parse_quantity``.
Security and printing checks follow Python's own grammar (common practice).
"""

from __future__ import annotations

import builtins
import math
import time
from fractions import Fraction
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from compromise.errors import ExpressionError
from compromise.expressions import (
    MAX_LENGTH,
    PROPERTY_DIMENSIONS,
    PROPERTY_NAMES,
    Binary,
    Call,
    Expr,
    Name,
    Num,
    Unary,
    dimension,
    evaluate,
    names,
    parse,
    power_product,
    substitute,
    to_text,
)
from compromise.units import parse_quantity

# Dimension vectors read by pint from SI units (oracle: pint's definitions of the SI units).
UNITS = {
    "velocity": "1 m/s",
    "depth": "1 m",
    "width": "1 m",
    "rho": "1 kg/m^3",
    "mu": "1 Pa*s",
    "nu": "1 m^2/s",
    "sigma": "1 N/m",
    "c": "1 m/s",
    "g": "1 m/s^2",
}
DIMS = {name: parse_quantity(text)[1] for name, text in UNITS.items()}

# Prototype of the design document's example case: water at about 12 degC in a river.
ENV = {
    "velocity": 1.8,
    "depth": 3.5,
    "width": 120.0,
    "rho": 999.5,
    "mu": 1.2349e-3,
    "nu": 1.2355e-6,
    "sigma": 0.07422,
    "c": 1450.0,
    "g": 9.80665,
}


# --------------------------------------------------------------------------- evaluation


def test_evaluate_operators_match_python_arithmetic() -> None:
    # oracle: the same arithmetic written in Python; '^' is read as '**'
    v, h, g, rho, sigma = (ENV[k] for k in ("velocity", "depth", "g", "rho", "sigma"))
    assert_allclose(evaluate(parse("velocity / sqrt(g * depth)"), ENV), v / math.sqrt(g * h))
    assert_allclose(evaluate(parse("rho * velocity * depth / mu"), ENV), rho * v * h / ENV["mu"])
    for text in ("rho * velocity**2 * depth / sigma", "rho*velocity^2*depth/sigma"):
        assert_allclose(evaluate(parse(text), ENV), rho * v**2 * h / sigma, rtol=1e-14)
    assert_allclose(evaluate(parse("-velocity**2"), ENV), -(v**2), rtol=1e-14)


def test_evaluate_vectorised_matches_scalar_evaluation() -> None:
    # an array in the environment gives the array of the scalar results, element by element
    depths = np.array([0.03, 0.1, 1.0, 3.5])
    tree = parse("velocity / sqrt(g * depth)")
    values = evaluate(tree, {**ENV, "depth": depths})
    assert isinstance(values, np.ndarray)
    expected = [evaluate(tree, {**ENV, "depth": float(d)}) for d in depths]
    assert_allclose(values, expected, rtol=1e-15)


def test_evaluate_functions_and_pi_match_math_module() -> None:
    # oracle: Python's math module
    value = evaluate(parse("exp(log(width)) + abs(-depth) + pi * sqrt(4)"), ENV)
    assert_allclose(value, 120.0 + 3.5 + 2 * math.pi, rtol=1e-14)


def test_evaluate_unknown_name_suggests_the_close_one() -> None:
    with pytest.raises(ExpressionError, match=r"unknown name 'widht'.*did you mean 'width'\?"):
        evaluate(parse("widht / depth"), ENV)


def test_names_excludes_pi_and_functions() -> None:
    assert names(parse("sqrt(pi * velocity) / exp(depth / width)")) == {
        "velocity",
        "depth",
        "width",
    }


def test_substitute_maps_characteristic_length() -> None:
    tree = substitute(parse("velocity / sqrt(g * L)"), {"L": Name("depth")})
    assert tree == parse("velocity / sqrt(g * depth)")
    assert to_text(substitute(parse("a * pi"), {"pi": "3"})) == "a * pi"  # pi is a constant


def test_property_names_dimensions_match_pint() -> None:
    # oracle: pint's SI definitions (kg/m^3, Pa s, m^2/s, N/m, m/s, m/s^2)
    assert set(PROPERTY_NAMES) == set(PROPERTY_DIMENSIONS)
    for name in PROPERTY_NAMES:
        assert PROPERTY_DIMENSIONS[name] == DIMS[name], name


# --------------------------------------------------------------------------- power products


@pytest.mark.parametrize(
    ("text", "coefficient", "exponents"),
    [
        ("velocity / sqrt(g * depth)", 1.0, {"depth": -0.5, "g": -0.5, "velocity": 1.0}),
        ("2 * a**2 / a", 2.0, {"a": 1.0}),
        (
            "rho * velocity**2 * depth / sigma",
            1.0,
            {"depth": 1, "rho": 1, "sigma": -1, "velocity": 2},
        ),
        ("abs(-3 * a) / (b * c)**(1/2)", 3.0, {"a": 1.0, "b": -0.5, "c": -0.5}),
        ("a**(1/3) * a**(2/3) / a * b", 1.0, {"b": 1.0}),
        ("pi * d**2 / 4", math.pi / 4, {"d": 2.0}),
        ("exp(1) * a^-2", math.e, {"a": -2.0}),
        ("vertical / horizontal", 1.0, {"horizontal": -1.0, "vertical": 1.0}),
    ],
)
def test_power_product_exponents_common_practice(
    text: str, coefficient: float, exponents: dict[str, float]
) -> None:
    # laws of exponents (common practice)
    result = power_product(parse(text))
    assert result is not None
    assert_allclose(result[0], coefficient, rtol=1e-14)
    assert result[1] == exponents
    assert list(result[1]) == sorted(result[1])


@pytest.mark.parametrize(
    "text", ["width/depth + 1", "log(a)", "exp(a)", "a**b", "2**a", "a - a", "sqrt(-a)"]
)
def test_power_product_rejects_non_products(text: str) -> None:
    assert power_product(parse(text)) is None


def test_power_product_division_by_zero_raises() -> None:
    with pytest.raises(ExpressionError, match="division by zero"):
        power_product(parse("a / (2 - 2)"))


# --------------------------------------------------------------------------- dimensions


@pytest.mark.parametrize(
    "text",
    [
        "velocity / sqrt(g * depth)",  # Froude (White 2011, ch. 5; from memory)
        "velocity * depth / nu",  # Reynolds
        "rho * velocity * depth / mu",  # Reynolds
        "rho * velocity**2 * depth / sigma",  # Weber
        "velocity / c",  # Mach
        "width / depth + 1",
        "log(width / depth) * exp(-velocity / c)",
    ],
)
def test_classic_groups_dimensionless_pint_dimensions(text: str) -> None:
    assert dimension(parse(text), DIMS) == (0.0, 0.0, 0.0, 0.0)


def test_dimension_of_discharge_and_half_power_matches_pint() -> None:
    # oracle: pint, m^3/s and m^(1/2)
    assert dimension(parse("velocity * width * depth"), DIMS) == parse_quantity("1 m^3/s")[1]
    assert dimension(parse("sqrt(depth)"), DIMS) == (0.0, 0.5, 0.0, 0.0)


def test_dimension_rejects_adding_length_and_velocity() -> None:
    with pytest.raises(
        ExpressionError, match=r"cannot add \[length\] and \[velocity\] in 'depth \+ velocity'"
    ):
        dimension(parse("depth + velocity"), DIMS)
    with pytest.raises(ExpressionError, match=r"cannot subtract"):
        dimension(parse("depth - velocity * 2"), DIMS)


def test_dimension_unknown_name_suggests_the_close_one() -> None:
    with pytest.raises(ExpressionError, match=r"unknown name 'widht'.*did you mean 'width'\?"):
        dimension(parse("widht / depth"), DIMS)


@pytest.mark.parametrize(
    ("text", "match"),
    [
        ("log(depth)", r"log needs a dimensionless argument; got \[length\]"),
        ("exp(velocity)", r"exp needs a dimensionless argument; got \[velocity\]"),
        ("depth**(width / depth)", r"must be a constant number"),
        ("2**depth", r"exponent must be dimensionless; got \[length\]"),
    ],
)
def test_dimension_rejects_dimensional_arguments(text: str, match: str) -> None:
    with pytest.raises(ExpressionError, match=match):
        dimension(parse(text), DIMS)


# --------------------------------------------------------------------------- security


@pytest.mark.parametrize(
    ("text", "match"),
    [
        ("().__class__", r"attribute access is not allowed: \(\)\.__class__"),
        ("a.real", r"attribute access is not allowed"),
        ("a[0]", r"subscripts are not allowed: a\[0\]"),
        ("lambda: 1", r"lambda is not allowed"),
        ("[x for x in y]", r"comprehensions are not allowed"),
        ("(x for x in y)", r"comprehensions are not allowed"),
        ("{x: 1 for x in y}", r"comprehensions are not allowed"),
        ("__import__('os').system('x')", r"not allowed"),
        ("__import__('os')", r"'__import__' is not allowed"),
        ("__builtins__", r"'__builtins__' is not allowed"),
        ("open('x', 'w')", r"calls are limited to sqrt, log, exp, abs; got 'open'"),
        ("print(1)", r"calls are limited to sqrt, log, exp, abs; got 'print'"),
        ("eval('1')", r"calls are limited to sqrt, log, exp, abs; got 'eval'"),
        ("exec('1')", r"calls are limited to sqrt, log, exp, abs; got 'exec'"),
        ("'text'", r"strings are not allowed"),
        ("b'bytes'", r"strings are not allowed"),
        ("f'{a}'", r"f-strings are not allowed"),
        ("sqrt(x=1)", r"keyword or starred arguments are not allowed"),
        ("sqrt(*a)", r"keyword or starred arguments are not allowed"),
        ("sqrt(a, b)", r"sqrt takes exactly one argument; got 2"),
        ("(a := 1)", r"assignment \(:=\) is not allowed"),
        ("a if b else c", r"conditional expressions are not allowed"),
        ("a < b", r"comparisons are not allowed"),
        ("a and b", r"'and'/'or' are not allowed"),
        ("not a", r"operator 'not' is not allowed"),
        ("a // b", r"only the operators \+ - \* / \*\* are allowed"),
        ("a % b", r"only the operators"),
        ("(a, b)", r"tuples are not allowed"),
        ("True", r"only real numbers are allowed"),
        ("1j", r"only real numbers are allowed"),
        ("sqrt", r"'sqrt' is a function; call it as sqrt\(\.\.\.\)"),
        ("(a + b)(c)", r"calls are limited to sqrt, log, exp, abs; got 'a \+ b'"),
        ("x +", r"cannot parse 'x \+': "),
        ("a; b", r"cannot parse"),
        ("", r"cannot parse '': empty expression"),
        ("1e999 * a", r"number too large"),
        ("\u03c1 * v", r"names must be ASCII identifiers"),
    ],
)
def test_parse_rejects_forbidden_constructs(text: str, match: str) -> None:
    with pytest.raises(ExpressionError, match=match) as info:
        parse(text)
    assert "\n" not in str(info.value)


def test_parse_rejected_calls_have_no_side_effect(tmp_path: Path) -> None:
    target = tmp_path / "x"
    attempts = [
        f"open('{target}', 'w')",
        f"__import__('os').system('touch {target}')",
        f"__import__('pathlib').Path('{target}').touch()",
        f"().__class__.__base__.__subclasses__()[0]('{target}')",
        f"[open('{target}', 'w') for _ in 'a']",
        f"(lambda: open('{target}', 'w'))()",
    ]
    for text in attempts:
        with pytest.raises(ExpressionError):
            parse(text)
    assert not target.exists()
    assert list(tmp_path.iterdir()) == []


def test_parse_and_evaluate_never_call_eval_or_exec(monkeypatch: pytest.MonkeyPatch) -> None:
    def refuse(*args: object, **kwargs: object) -> None:
        raise AssertionError("eval/exec called")

    monkeypatch.setattr(builtins, "eval", refuse)
    monkeypatch.setattr(builtins, "exec", refuse)
    tree = parse("rho * velocity**2 * depth / sigma")
    assert evaluate(tree, ENV) > 0
    assert power_product(tree) is not None
    assert dimension(tree, DIMS) == (0.0, 0.0, 0.0, 0.0)


@pytest.mark.parametrize("text", ["10**10**10", "9**9**9**9", "2^2^2^2^2^2^2^2", "a**10**400"])
def test_huge_exponents_do_not_hang(text: str) -> None:
    start = time.perf_counter()
    tree = parse(text)
    value = evaluate(tree, {"a": 2.0})
    assert math.isinf(value)
    with pytest.raises(ExpressionError, match="not a finite number"):
        power_product(tree)
    assert time.perf_counter() - start < 2.0


def test_length_and_nesting_limits() -> None:
    with pytest.raises(ExpressionError, match=rf"too long \({MAX_LENGTH + 1} characters"):
        parse("a" * (MAX_LENGTH + 1))
    with pytest.raises(ExpressionError, match="nested too deeply"):
        parse("-" * 200 + "a")
    with pytest.raises(ExpressionError, match="nested too deeply"):
        parse("sqrt(" * 80 + "a" + ")" * 80)
    with pytest.raises(ExpressionError, match=r"^cannot parse '\(+\.\.\.': ") as info:
        parse("(" * 240 + "a" + ")" * 240)  # Python's parser refuses this nesting itself
    assert len(str(info.value)) < 200


# --------------------------------------------------------------------------- text


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("velocity/sqrt(g*depth)", "velocity / sqrt(g * depth)"),
        ("rho*velocity^2*depth/sigma", "rho * velocity**2 * depth / sigma"),
        ("a - (b - c)", "a - (b - c)"),
        ("(a - b) - c", "a - b - c"),
        ("a / (b / c)", "a / (b / c)"),
        ("a / b * c", "a / b * c"),
        ("(a**b)**c", "(a**b)**c"),
        ("a**b**c", "a**b**c"),
        ("-a**2", "-a**2"),
        ("(-a)**2", "(-a)**2"),
        ("(-2)**a", "(-2)**a"),
        ("a**-2", "a**-2"),
        ("a**(-b)", "a**-b"),
        ("-(a + b)", "-(a + b)"),
        ("-(-a)", "-(-a)"),
        ("a * -b", "a * -b"),
        ("0.4 * 1e-3 + 2.5e20", "0.4 * 0.001 + 2.5e+20"),
    ],
)
def test_to_text_is_stable_and_round_trips(text: str, expected: str) -> None:
    tree = parse(text)
    assert to_text(tree) == expected
    assert parse(expected) == tree
    assert str(tree) == expected


# --------------------------------------------------------------------------- properties

NAMES = ["velocity", "depth", "width", "rho", "nu", "sigma", "g"]
exponent_fractions = st.builds(
    Fraction, st.integers(min_value=-6, max_value=6), st.integers(min_value=1, max_value=4)
)


def _power(name: str, exponent: Fraction) -> Expr:
    if exponent.denominator == 1:
        power: Expr = Num(exponent.numerator)
    else:
        power = Binary("/", Num(exponent.numerator), Num(exponent.denominator))
    return Binary("**", Name(name), power)


@settings(max_examples=200, deadline=None)
@given(
    terms=st.lists(st.tuples(st.sampled_from(NAMES), exponent_fractions), min_size=1, max_size=6),
    coefficient=st.floats(min_value=1e-3, max_value=1e3),
    values=st.lists(st.floats(min_value=1e-3, max_value=1e3), min_size=7, max_size=7),
)
def test_power_product_recovers_exponents_law_of_exponents(
    terms: list[tuple[str, Fraction]], coefficient: float, values: list[float]
) -> None:
    # property (laws of exponents, common practice): prod(x_i ** e_i) with repeated names
    # sums their exponents; the printed text parses back to the same tree.
    tree: Expr = Num(coefficient)
    for name, exponent in terms:
        tree = Binary("*", tree, _power(name, exponent))
    text = to_text(tree)
    reparsed = parse(text)
    assert reparsed == tree
    expected: dict[str, Fraction] = {}
    for name, exponent in terms:
        expected[name] = expected.get(name, Fraction(0)) + exponent
    expected = {k: v for k, v in expected.items() if v != 0}
    result = power_product(reparsed)
    assert result is not None
    assert_allclose(result[0], coefficient, rtol=1e-12)
    assert set(result[1]) == set(expected)
    for name, exponent in expected.items():
        assert_allclose(result[1][name], float(exponent), rtol=1e-15, atol=1e-15)
    env = dict(zip(NAMES, values, strict=True))
    direct = coefficient * np.prod([env[n] ** float(e) for n, e in terms])
    assert_allclose(evaluate(reparsed, env), direct, rtol=1e-9)


leaves = st.one_of(
    st.builds(Num, st.floats(min_value=-1e6, max_value=1e6, allow_nan=False)),
    st.builds(Name, st.sampled_from(["a", "b", "c", "pi"])),
)


def _extend(children: st.SearchStrategy[Expr]) -> st.SearchStrategy[Expr]:
    unary = st.builds(Unary, st.sampled_from(["-", "+"]), children).filter(
        lambda u: not (u.op == "-" and isinstance(u.operand, Num) and u.operand.value >= 0)
    )
    binary = st.builds(Binary, st.sampled_from(["+", "-", "*", "/", "**"]), children, children)
    call = st.builds(Call, st.sampled_from(["sqrt", "log", "exp", "abs"]), children)
    return st.one_of(unary, binary, call)


@settings(max_examples=300, deadline=None)
@given(tree=st.recursive(leaves, _extend, max_leaves=12))
def test_to_text_round_trips_random_trees_python_grammar(tree: Expr) -> None:
    # property: the printer's parentheses follow Python's operator precedence (common practice)
    assert parse(to_text(tree)) == tree
