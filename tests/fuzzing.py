"""Mutations of the bundled cases, shared by tests/test_fuzz.py and benchmarks/fuzz.py.

A mutation starts from a bundled case (parsed TOML), applies one to three edits drawn from a
``random.Random`` (drop a key, duplicate one, swap two values, replace a number by an extreme,
replace a unit or an expression by random or hostile text) and writes the result as TOML text.
:func:`run_case` then runs ``check`` and ``solve --json`` in-process through the command line
and returns the exit statuses, so a caller can require that every run ends in 0, 1 or 2, with
no traceback, within a time limit (issue 16).
"""

from __future__ import annotations

import copy
import json
import math
import random
import signal
import tomllib
from collections.abc import Iterator
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parent.parent
CASES = sorted((ROOT / "cases").glob("*.toml"))
BASES: list[dict[str, Any]] = [tomllib.loads(p.read_text(encoding="utf-8")) for p in CASES]

#: Numbers at the edge: zero, negative, subnormal, huge, not a number, integers too long for a
#: float or for Python's integer-string limit.
EXTREME_NUMBERS: tuple[Any, ...] = (
    0,
    -1,
    -2.5,
    1e-320,
    5e-324,
    1e300,
    1e308,
    math.nan,
    math.inf,
    -math.inf,
    10**400,
    10**20,
    1e-150,
    1e150,
)

UNITS: tuple[str, ...] = (
    "m", "mm", "km", "m^2", "m^3/s", "m/s", "s", "kg", "Pa", "bar", "degC", "degF", "K", "N/m",
    "Pa*s", "m^2/s", "cfs", "gpm", "ft", "%", "", "C", "m3/s", "m^1.5", "m^0.5", "m**(9**9**9)",
    "m**(10**10**10)", "m^-2", "m^99", "m^(1/2)", "mol", "A", "cd", "furlong/fortnight",
    "m^", "**", "((m", "m^2^3", "1e400 m", "m^123456789012",
)  # fmt: skip

EXPRESSIONS: tuple[str, ...] = (
    "log(slope)", "sqrt(-width/depth)", "0 * velocity", "-velocity/sqrt(g*depth)",
    "velocity**1000", "exp(velocity)", "velocity/0", "__import__('os')", "a.b", "x[0]",
    "lambda: 1", "velocity**(9**9**9)", "1/(depth-depth)", "", "(((", "velocity * nu",
    "rho * velocity / mu", "sigma / (rho * velocity**2)",
)  # fmt: skip


def _leaves(data: Any, path: tuple[Any, ...] = ()) -> Iterator[tuple[Any, ...]]:
    """Paths to every value (tables and lists included), in a stable order."""
    if isinstance(data, dict):
        for k in data:
            yield (*path, k)
            yield from _leaves(data[k], (*path, k))
    elif isinstance(data, list):
        for i, v in enumerate(data):
            yield (*path, i)
            yield from _leaves(v, (*path, i))


def _get(data: Any, path: tuple[Any, ...]) -> Any:
    for k in path:
        data = data[k]
    return data


def _set(data: Any, path: tuple[Any, ...], value: Any) -> None:
    _get(data, path[:-1])[path[-1]] = value


def _random_text(rng: random.Random) -> str:
    alphabet = "abcxyz019._-+*/^()[]{}:;,'\"\\ \t\n\x1b\u00e9\u2028m"
    return "".join(rng.choice(alphabet) for _ in range(rng.randint(0, 24)))


#: Numbers written in place of the number of a value with units (the unit kept), so that
#: most such cases stay valid and reach the solver with extreme values.
NUMBER_TEXTS: tuple[str, ...] = (
    "0", "-1", "1e-320", "1e300", "1e-150", "1e150", "1e-100", "1e100", "1e-30", "1e30",
    "3e-5", "0.001", "1000", "1e6", "nan", "inf", "7" * 30,
)  # fmt: skip


def _rescaled(rng: random.Random, old: Any) -> Any:
    """The same kind of value at another size: a number times a power of ten, or a value with
    units whose number is replaced (its unit kept)."""
    if isinstance(old, int | float) and not isinstance(old, bool):
        return old * 10.0 ** rng.choice([-200, -100, -30, -6, -1, 1, 6, 30, 100, 200])
    if isinstance(old, str):
        head, sep, unit = old.strip().partition(" ")
        if ":" in head and not sep:
            return f"1:{rng.choice(NUMBER_TEXTS)}"
        try:
            float(head)
        except ValueError:
            return old
        return f"{rng.choice(NUMBER_TEXTS)}{sep}{unit}"
    return old


def _new_value(rng: random.Random, old: Any) -> Any:
    if rng.random() < 0.5:
        return _rescaled(rng, old)
    kind = rng.randrange(6)
    if kind == 0 or (isinstance(old, int | float) and kind < 3):
        return rng.choice(EXTREME_NUMBERS)
    if kind == 1:
        number = rng.choice(["1", "0", "-3", "1e300", "1e-320", "nan", "inf", "7" * 30, "2.5"])
        return f"{number} {rng.choice(UNITS)}".strip()
    if kind == 2:
        return rng.choice(EXPRESSIONS)
    if kind == 3:
        return _random_text(rng)
    if kind == 4:
        return rng.choice([True, [], {}, [1, "x"], {"value": "1 m"}, "1:0", "0:1", "1:1e400"])
    return rng.choice(["water", "air", "seawater", "glycerol", "nitrogen", "unobtainium"])


def mutate(rng: random.Random) -> dict[str, Any]:
    """A bundled case with one to three random edits."""
    data = copy.deepcopy(rng.choice(BASES))
    for _ in range(rng.randint(1, 3)):
        paths = list(_leaves(data))
        if not paths:
            break
        path = rng.choice(paths)
        parent = _get(data, path[:-1])
        action = rng.randrange(5)
        if action == 0:  # drop
            if isinstance(parent, dict):
                del parent[path[-1]]
            else:
                parent.pop(path[-1])
        elif action == 1:  # duplicate under another name
            if isinstance(parent, dict):
                parent[f"{path[-1]}_{rng.choice(['2', 'x', chr(27) + '[31m', 'a b'])}"] = (
                    copy.deepcopy(parent[path[-1]])
                )
            else:
                parent.append(copy.deepcopy(parent[path[-1]]))
        elif action == 2:  # swap with another value
            other = rng.choice(paths)
            if other[: len(path)] != path and path[: len(other)] != other:
                a, b = _get(data, path), _get(data, other)
                _set(data, path, copy.deepcopy(b))
                _set(data, other, copy.deepcopy(a))
        else:  # replace
            _set(data, path, _new_value(rng, _get(data, path)))
    return data


# ------------------------------------------------------------------------------ TOML writing


def _key(k: str) -> str:
    return k if k and all(c.isalnum() or c in "_-" for c in k) and k.isascii() else json.dumps(k)


def _value(v: Any) -> str:
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v) if abs(v) < 10**4000 else "1" + "0" * 5000  # beyond the digit limit
    if isinstance(v, float):
        if math.isnan(v):
            return "nan"
        if math.isinf(v):
            return "inf" if v > 0 else "-inf"
        return repr(v)
    if isinstance(v, str):
        return json.dumps(v)
    if isinstance(v, list):
        return "[" + ", ".join(_value(x) for x in v) + "]"
    if isinstance(v, dict):
        return "{" + ", ".join(f"{_key(str(k))} = {_value(x)}" for k, x in v.items()) + "}"
    return json.dumps(str(v))


def to_toml(data: dict[str, Any]) -> str:
    """TOML text of a case dictionary: top-level scalars, then one table per top-level table
    (nested tables written inline)."""
    lines = [f"{_key(k)} = {_value(v)}" for k, v in data.items() if not isinstance(v, dict)]
    for k, v in data.items():
        if isinstance(v, dict):
            lines.append(f"[{_key(k)}]")
            lines.extend(f"{_key(str(kk))} = {_value(vv)}" for kk, vv in v.items())
    return "\n".join(lines) + "\n"


# ------------------------------------------------------------------------------ running


class Hang(BaseException):
    """A run took longer than its time limit (a BaseException, so that neither the command
    line's last line of defence nor the test runner swallows it)."""


def _alarm(signum: int, frame: Any) -> None:
    raise Hang


def run_case(path: Path, seconds: int = 10) -> list[tuple[str, int, str]]:
    """Run ``check`` and ``solve --json`` on ``path``; return (command, exit status, output).

    The status is -1 for an exception that escaped the command line (with its text as the
    output) and -2 for a run longer than ``seconds``.
    """
    from typer.testing import CliRunner

    from compromise.cli import app

    runner = CliRunner()
    out: list[tuple[str, int, str]] = []
    previous = signal.signal(signal.SIGALRM, _alarm)
    try:
        for args in (["check", str(path)], ["solve", str(path), "--json"]):
            signal.alarm(seconds)
            try:
                res = runner.invoke(app, args)
                if res.exception is not None and not isinstance(res.exception, SystemExit):
                    out.append((args[0], -1, f"{type(res.exception).__name__}: {res.exception}"))
                else:
                    out.append((args[0], res.exit_code, res.output))
            except Hang:
                out.append((args[0], -2, "longer than the time limit"))
            finally:
                signal.alarm(0)
    finally:
        signal.signal(signal.SIGALRM, previous)
    return out
