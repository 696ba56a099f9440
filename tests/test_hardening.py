"""Extreme, degenerate and hostile input (issue 16): one test per defect the issue lists.

The contract is the project's own (README, "Exit status"): 0 answered, 1 infeasible, 2 bad
input or a wrong option (one ``error:`` line per problem naming the file and the key or the
option, no traceback), 3 an internal error. The numeric limits rest on IEEE 754 double
precision: the largest finite double is about 1.8e308 and the smallest subnormal 4.9e-324
(IEEE 754-2008, section 3.4; from memory), so a value between 1e-150 and 1e150 keeps its
square, reciprocal and logarithm finite.
"""

from __future__ import annotations

import os
import time
from pathlib import Path

import pytest
from numpy.testing import assert_allclose
from typer.testing import CliRunner

from compromise.cli import app

ROOT = Path(__file__).parent.parent
SPILLWAY = ROOT / "cases" / "spillway.toml"
TEXT = SPILLWAY.read_text(encoding="utf-8")
WEBER = 'weber    = { weight = 0.1, min = 500, length = "toe_depth" }'


@pytest.fixture
def runner() -> CliRunner:
    return CliRunner()


def case(tmp_path: Path, *pairs: tuple[str, str], name: str = "case.toml") -> str:
    """The spillway case with each ``old`` replaced once by ``new``, written to a file."""
    text = TEXT
    for old, new in pairs:
        assert text.count(old) == 1, old
        text = text.replace(old, new)
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return str(path)


def one_error(result, *fragments: str) -> str:
    """The run ended with status 2 and one ``error:`` line holding every fragment."""
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    lines = [ln for ln in result.stderr.splitlines() if ln.strip()]
    assert len(lines) == 1 and lines[0].startswith("error: "), lines
    for fragment in fragments:
        assert fragment in lines[0], (fragment, lines[0])
    return lines[0]


# ------------------------------------------------------------------ numbers at the edge


@pytest.mark.parametrize("command", ["check", "solve"])
def test_an_integer_of_401_digits_is_refused_with_its_key(
    runner: CliRunner, tmp_path: Path, command: str
) -> None:
    path = case(tmp_path, ('velocity     = "22 m/s"', "velocity = " + "9" * 401))
    line = one_error(runner.invoke(app, [command, path]), "prototype.quantities.velocity")
    assert "9.99e+400" in line and "9" * 20 not in line  # short scientific form (item 8)


def test_an_integer_beyond_the_digit_limit_is_refused(runner: CliRunner, tmp_path: Path) -> None:
    # CPython refuses to convert integer strings of more than 4300 digits (PEP 651's companion,
    # the int max_str_digits limit of Python 3.11; from memory)
    path = case(tmp_path, ("distortion       = 1 ", "distortion = " + "9" * 5000 + " "))
    one_error(runner.invoke(app, ["check", path]), path, "4300 digits")


@pytest.mark.parametrize(
    ("old", "new", "key"),
    [
        ("distortion       = 1 ", "distortion = 1e300 ", "model.distortion"),
        ('head         = { min = "5 cm" }', 'head = { min = "1e-320 m" }', "limits.head.min"),
        (
            'basin_length = { max = "4 m" }',
            'basin_length = { max = "5e-324 m" }',
            "limits.basin_length.max",
        ),
        (
            'basin_length = { max = "4 m" }',
            'basin_length = { max = "1e308 m" }',
            "limits.basin_length.max",
        ),
        ('"1:25", "1:30"', '1e-320, "1:30"', "model.preferred_ratios[0]"),
        ("weber    = { weight = 0.1,", "weber    = { weight = 1e308,", "groups.weber.weight"),
    ],
)
def test_values_whose_log_or_square_overflow_are_refused(
    runner: CliRunner, tmp_path: Path, old: str, new: str, key: str
) -> None:
    path = case(tmp_path, (old, new))
    for command in ("check", "solve"):
        one_error(runner.invoke(app, [command, path]), key, "expected a")


def test_scales_ratio_beyond_the_range_is_refused(runner: CliRunner) -> None:
    one_error(runner.invoke(app, ["scales", str(SPILLWAY), "--ratio", "1e308"]), "--ratio")


@pytest.mark.parametrize(
    ("args", "option"),
    [
        (["tradeoff", str(SPILLWAY), "--between", "total", "discharge", "--points", "9" * 23],
         "--points"),
        (["sensitivity", str(SPILLWAY), "--spread", "1e308"], "--spread"),
        (["sensitivity", str(SPILLWAY), "--seed", "-1"], "--seed"),
    ],
)  # fmt: skip
def test_absurd_option_values_are_one_usage_line(
    runner: CliRunner, args: list[str], option: str
) -> None:
    one_error(runner.invoke(app, args), option)


@pytest.mark.parametrize(
    "unit", ["m**(9**9**9)", "m^(10^10^10)", "m**99", "m**123456789012", "m**2**3"]
)
def test_unit_exponent_towers_are_refused_at_once(
    runner: CliRunner, tmp_path: Path, unit: str
) -> None:
    path = case(tmp_path, ('"48 m"', f'"48 {unit}"'))
    start = time.perf_counter()
    one_error(runner.invoke(app, ["check", path]), "prototype.quantities.crest_length")
    assert time.perf_counter() - start < 5


def test_unit_towers_on_the_command_line_are_refused(runner: CliRunner) -> None:
    one_error(runner.invoke(app, ["fluids", "--pressure", "1 Pa**(10**10**10)"]), "--pressure")
    one_error(
        runner.invoke(app, ["groups", "--derive", "--var", "a=m**(9**9**9)", "--var", "b=m"]),
        "--var",
    )


@pytest.mark.parametrize("unit", ["m^1.5", "m^0.5", "m**(1/2)"])
def test_fractional_unit_exponents_are_refused_not_truncated(
    runner: CliRunner, tmp_path: Path, unit: str
) -> None:
    path = case(
        tmp_path, ('crest_length = { max = "1.8 m" }', f'crest_length = {{ max = "1.8 {unit}" }}')
    )
    one_error(runner.invoke(app, ["check", path]), "limits.crest_length.max", "fractional exponent")


def test_whole_units_still_read(runner: CliRunner, tmp_path: Path) -> None:
    """The gate lets ordinary units through: m^3/s, s^-1 (written m**(-1) too)."""
    from compromise.units import parse_quantity

    assert_allclose(parse_quantity("2 m^3/s")[0], 2.0, rtol=1e-15)
    assert parse_quantity("3 s^-1")[1] == (0, 0, -1, 0)
    assert parse_quantity("3 s**(-1)")[1] == (0, 0, -1, 0)
    assert parse_quantity("1 m^(3/1)")[1] == (0, 3, 0, 0)


def test_scaling_every_weight_keeps_the_design(tmp_path: Path) -> None:
    """Multiplying every weight by one factor leaves the best design unchanged and multiplies
    the objective by the factor (the weighted least-squares objective is homogeneous in the
    weights); before the weights were normalised, a factor of 1e50 gave a worse design."""
    from compromise import load_case
    from compromise import solve as run

    base = run(load_case(SPILLWAY))
    for factor in (1e30, 1e50, 1e100, 1e-30):
        path = case(
            tmp_path,
            ("weber    = { weight = 0.1,", f"weber    = {{ weight = {0.1 * factor!r},"),
            ("reynolds = { weight = 1,", f"reynolds = {{ weight = {factor!r},"),
        )
        sol = run(load_case(path))
        assert sol.feasible
        assert_allclose(sol.design.horizontal_ratio, base.design.horizontal_ratio, rtol=1e-9)
        assert sol.design.fluid == base.design.fluid
        if factor > 1:
            assert_allclose(sol.objective, base.objective * factor, rtol=1e-9)


# ------------------------------------------------------------------ check agrees with solve


@pytest.mark.parametrize(
    ("expr", "fragment"),
    [
        ("0 * head/toe_depth", "the prototype value is 0"),
        ("-head/toe_depth", "the prototype value is -"),
        ("log(head/toe_depth - 10)", "the prototype value is nan"),
        ("sqrt(-head/toe_depth)", "the prototype value is nan"),
    ],
)
def test_check_finds_group_values_solve_refuses(
    runner: CliRunner, tmp_path: Path, expr: str, fragment: str
) -> None:
    path = case(tmp_path, (WEBER, f'{WEBER}\nodd = {{ expr = "{expr}", weight = 1 }}'))
    for command in ("check", "solve"):
        one_error(runner.invoke(app, [command, path]), "groups.odd", fragment)


def test_check_finds_a_model_fluid_lacking_a_property(runner: CliRunner, tmp_path: Path) -> None:
    path = case(tmp_path, ('fluids           = ["water"]', 'fluids           = ["air"]'))
    for command in ("check", "solve"):
        one_error(
            runner.invoke(app, [command, path]),
            "model.fluids[0]",
            "'air' has no surface tension",
            "groups.weber",
        )


def test_a_gas_prototype_of_a_free_surface_case_names_fluid_property_and_key(
    runner: CliRunner, tmp_path: Path
) -> None:
    path = case(tmp_path, ('fluid = "water"', 'fluid = "air"'))
    for command in ("check", "solve"):
        one_error(runner.invoke(app, [command, path]), "groups.weber", "'air'", "surface tension")


def test_check_reports_physics_with_the_other_problems_in_one_pass(
    runner: CliRunner, tmp_path: Path
) -> None:
    path = case(
        tmp_path,
        ('fluids           = ["water"]', 'fluids           = ["air"]'),
        ('basin_length = { max = "4 m" }', 'basin_length = { max = "4 kg" }'),
    )
    res = runner.invoke(app, ["check", path])
    assert res.exit_code == 2
    keys = [ln.split(": ")[2] for ln in res.stderr.splitlines()]
    assert "limits.basin_length.max" in keys and "model.fluids[0]" in keys


def test_wavenumber_at_an_extreme_depth_is_found_or_refused() -> None:
    """Linear dispersion, omega^2 = g k tanh(k h) (Airy wave theory; Dean and Dalrymple 1991,
    eq. 4.17; from memory): in very shallow water k -> omega / sqrt(g h)."""
    import math

    from compromise.review.regimes import _wavenumber

    h, period, g = 1e-20, 10.0, 9.80665
    k = _wavenumber(period, h, g, 0.0, 1000.0)
    assert_allclose(k, 2 * math.pi / period / math.sqrt(g * h), rtol=1e-6)


# ------------------------------------------------------------------ last line of defence


def test_an_unexpected_exception_is_one_line_and_status_3(
    runner: CliRunner, monkeypatch: pytest.MonkeyPatch
) -> None:
    import compromise.cli.core as core

    def boom(path: Path) -> None:
        raise RuntimeError("boom\x1b[2J")

    monkeypatch.setattr(core, "_load", boom)
    res = runner.invoke(app, ["check", str(SPILLWAY)])
    assert res.exit_code == 3
    assert res.stderr == (
        "error: internal error: RuntimeError: boom\\x1b[2J; rerun with --debug for the "
        "traceback and report it with the case file\n"
    )
    res = runner.invoke(app, ["--debug", "check", str(SPILLWAY)])
    assert res.exit_code == 3 and "Traceback" in res.stderr and "boom" in res.stderr


def test_usage_errors_are_one_error_line(runner: CliRunner) -> None:
    line = one_error(runner.invoke(app, ["solve", str(SPILLWAY), "--nope"]), "--nope")
    assert "compromise solve --help" in line


# ------------------------------------------------------------------ safe writes


def test_output_path_is_checked_before_the_computation(runner: CliRunner, tmp_path: Path) -> None:
    afile = tmp_path / "afile"
    afile.write_text("x", encoding="utf-8")
    for target in (afile, afile / "below"):
        res = runner.invoke(
            app, ["tradeoff", str(SPILLWAY), "--between", "total", "discharge", "-o", str(target)]
        )
        one_error(res, "-o")
        res = runner.invoke(app, ["sensitivity", str(SPILLWAY), "-o", str(target)])
        one_error(res, "-o")
        res = runner.invoke(app, ["map", str(SPILLWAY), "-o", str(target)])
        one_error(res, "-o")


def test_a_failed_figure_write_keeps_the_old_files(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    """Figures go through compromise.outfiles: a failure before the rename leaves the old files
    (and no temporary file) behind."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from compromise import outfiles
    from compromise.presentation.figures import save_figure

    stem = tmp_path / "fig"
    for suffix in (".png", ".svg"):
        stem.with_suffix(suffix).write_bytes(b"old")

    def fail(src: str, dst: str) -> None:
        raise OSError("disk full")

    monkeypatch.setattr(outfiles.os, "replace", fail)
    fig = plt.figure()
    with pytest.raises(OSError, match="disk full"):
        save_figure(fig, stem)
    plt.close(fig)
    assert stem.with_suffix(".png").read_bytes() == b"old"
    assert stem.with_suffix(".svg").read_bytes() == b"old"
    assert sorted(os.listdir(tmp_path)) == ["fig.png", "fig.svg"]


def test_tradeoff_csv_goes_through_the_safe_writer(
    runner: CliRunner, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    from compromise import outfiles

    seen: list[str] = []
    real = outfiles.os.replace

    def spy(src: str, dst: str) -> None:
        seen.append(Path(dst).name)
        real(src, dst)

    monkeypatch.setattr(outfiles.os, "replace", spy)
    res = runner.invoke(
        app, ["tradeoff", str(SPILLWAY), "--between", "total", "discharge", "-o", str(tmp_path)]
    )
    assert res.exit_code in (0, 1), res.output
    assert {"tradeoff_total_discharge.csv", "tradeoff_total_discharge.png"} <= set(seen)
    assert not [n for n in os.listdir(tmp_path) if n.endswith(".part")]


# ------------------------------------------------------------------ terminal hygiene


def test_control_characters_in_keys_are_escaped(runner: CliRunner, tmp_path: Path) -> None:
    path = case(
        tmp_path, ('crest_length = "48 m"', 'crest_length = "48 m"\n"a\\u001b[31mb\\nc" = "3 m"')
    )
    line = one_error(runner.invoke(app, ["check", path]))
    assert "\x1b" not in line and "a\\x1b[31mb\\nc" in line


# ------------------------------------------------------------------ many limits


def test_certificate_guided_diagnosis_finds_the_same_conflicts(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    """Past 40 rows the deletion filter tests only rows in the support of a Farkas certificate
    (Farkas' lemma: an infeasible system has a nonnegative combination of its rows that reads
    0 <= negative; a row outside its support can go without restoring feasibility). The answer,
    with every infeasible preferred-ratio alternative and its conflict, is the same as testing
    every row."""
    import copy
    import json
    import tomllib

    from compromise import solve as run
    from compromise.casefile.load import case_from_dict
    from compromise.solving import diagnose

    data = copy.deepcopy(tomllib.loads((ROOT / "cases" / "river_bend.toml").read_text()))
    for k in range(60):  # distinct scale laws, so the rows do not collapse
        a = k / 59
        data["prototype"]["quantities"][f"feature_{k}"] = {
            "value": "10 m",
            "scales_as": f"horizontal**{a:.6f} * vertical**{1 - a:.6f}",
        }
        data["limits"][f"feature_{k}"] = {"max": f"{2.0 + 0.001 * k:.3f} m"}
    case = case_from_dict(data, path="many.toml")
    calls: list[int] = []
    real = diagnose._certificate_support

    def spy(*args: object) -> object:
        calls.append(1)
        return real(*args)  # type: ignore[arg-type]

    monkeypatch.setattr(diagnose, "_certificate_support", spy)
    guided = json.dumps(run(case).to_dict(), sort_keys=True, default=str)
    assert calls  # the certificate was used
    assert "infeasible: limits." in guided  # some alternative is infeasible and diagnosed
    monkeypatch.setattr(diagnose, "CERTIFICATE_ROWS", 10**9)
    plain = json.dumps(run(case).to_dict(), sort_keys=True, default=str)
    assert guided == plain
