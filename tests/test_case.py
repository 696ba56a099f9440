"""Tests of the case loader (compromise.casefile.model): the design example, and bad input of every
kind.

Sources of the expected values:

- SI conversions: BIPM (2019), *The International System of Units (SI Brochure)*, 9th ed.:
  Celsius temperature t = T - 273.15 K (sect. 2.3.1 and Table 4); prefixes kilo = 1e3 and
  centi = 1e-2 (Table 7). The numbers are taken from ``scipy.constants`` (CODATA), not from pint,
  which the loader itself uses.
- Fahrenheit: Thompson, A. and Taylor, B. N. (2008), NIST SP 811, *Guide for the Use of the
  International System of Units*, sect. B.9: T/K = (t/degF + 459.67) / 1.8.
- Standard atmosphere 101325 Pa: ISO 2533:1975, *Standard Atmosphere* (sea level).
- Scale ratios of a distorted model (model/prototype; X horizontal, Y vertical, V velocity):
  discharge = V X Y by continuity, slope = Y / X, Manning n (wide channel, general V) =
  Y^(7/6) X^(-1/2) / V, which is Y^(2/3) X^(-1/2) under Froude scaling V = Y^(1/2)
  (Chanson, H. 1999, *The Hydraulics of Open Channel Flow*, ch. 14, from memory).
- Dimensionless groups: only how the loader substitutes the case's lengths into the built-in
  groups is checked here; their values are checked once, against the ``fluids`` library, in
  ``tests/test_groups.py``.
- Water phase limits at 101325 Pa: ice point 0 degC (common practice); normal boiling point from
  IAPWS-IF97 (Wagner, W. et al. 2000, J. Eng. Gas Turbines Power 122, 150) through ``iapws``.
- The keys, defaults and error lines checked here are the case-file contract of the project's
  design notes and ``docs/case-format.md`` (common practice for the message wording).
"""

from __future__ import annotations

import re
import tomllib
from pathlib import Path

import iapws
import pytest
import scipy.constants as sc
from numpy.testing import assert_allclose

from compromise.casefile.load import case_from_dict, load_case
from compromise.casefile.model import LENGTH_NAMES, Case
from compromise.errors import CaseError, CaseErrors
from compromise.physics.scaling import BASIS, DERIVED_KINDS, INDEX

DATA = Path(__file__).parent / "data"
EXAMPLE = DATA / "design_example.toml"
EXAMPLE_TEXT = EXAMPLE.read_text(encoding="utf-8")
DOCS = Path(__file__).parent.parent / "docs" / "case-format.md"
ATMOSPHERE = 101325.0  # [Pa] ISO 2533:1975 sea-level pressure


# ----------------------------------------------------------------------------- helpers


def edit(*pairs: tuple[str, str], text: str = EXAMPLE_TEXT) -> str:
    """The example text with each ``old`` replaced once by ``new`` (``old`` must be present)."""
    for old, new in pairs:
        assert text.count(old) == 1, f"{old!r} is not in the text exactly once"
        text = text.replace(old, new)
    return text


def write(tmp_path: Path, text: str, name: str = "case.toml") -> Path:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def problems(path: Path, key: str | None, *expected: str) -> list[CaseError]:
    """Load ``path``, expect failure, and check the line for ``key`` names file, key, expectation.

    Returns every problem reported, so a test can also count them.
    """
    prefix = f"{path}: {key}: " if key else f"{path}: "
    with pytest.raises(CaseErrors, match=re.escape(prefix)) as info:
        load_case(path)
    errors = info.value.errors
    assert errors, "CaseErrors without problems"
    for e in errors:
        assert isinstance(e, CaseError)
        assert e.file == str(path)
        assert "\n" not in e.line()
        assert e.line().startswith(f"{path}: ")
    mine = [e for e in errors if e.key == key]
    assert mine, f"no problem with key {key!r}: {[e.line() for e in errors]}"
    line = mine[0].line()
    for fragment in expected:
        assert fragment in line, f"{fragment!r} not in {line!r}"
    return errors


def scaling_of(case: Case, name: str) -> dict[str, float]:
    """Non-zero scaling exponents of a quantity, by basis name."""
    s = case.quantities[name].scaling
    return {b: float(s[INDEX[b]]) for b in BASIS if abs(s[INDEX[b]]) > 1e-12}


@pytest.fixture(scope="module")
def example() -> Case:
    return load_case(EXAMPLE)


# ----------------------------------------------------------------------------- the design example


def test_design_example_temperature_bipm2019_celsius(example: Case) -> None:
    # BIPM (2019) sect. 2.3.1: 12 degC = 12 K + 273.15 K.
    assert_allclose(example.temperature, sc.zero_Celsius + 12.0, rtol=1e-12)
    assert_allclose(example.temperature, 285.15, rtol=1e-12)
    assert example.fluid == "water"
    assert_allclose(example.pressure, ATMOSPHERE, rtol=0)  # ISO 2533 default


def test_design_example_lengths_bipm2019_prefixes(example: Case) -> None:
    q = example.quantities
    assert_allclose(q["reach"].value, 2.5 * sc.kilo, rtol=1e-12)  # 2.5 km
    assert_allclose(q["reach"].value, 2500.0, rtol=1e-12)
    assert_allclose(q["depth"].value, 3.5, rtol=1e-12)
    assert_allclose(q["width"].value, 120.0, rtol=1e-12)
    for name in ("reach", "depth", "width"):
        assert q[name].unit == "m"
        assert q[name].dimension == (0, 1, 0, 0)
    depth_floor = {lim.quantity: lim for lim in example.limits}["depth"]
    assert_allclose(depth_floor.bound, 3 * sc.centi, rtol=1e-12)  # 3 cm


def test_design_example_flow_quantities_si(example: Case) -> None:
    q = example.quantities
    assert_allclose(q["discharge"].value, 760.0, rtol=1e-12)
    assert q["discharge"].unit == "m^3/s"
    assert q["discharge"].dimension == (0, 3, -1, 0)
    assert_allclose(q["velocity"].value, 1.8, rtol=1e-12)
    assert q["velocity"].unit == "m/s"
    assert_allclose(q["slope"].value, 4e-4, rtol=1e-12)
    assert q["slope"].dimension == (0, 0, 0, 0)


def test_design_example_slope_scales_as_parsed(example: Case) -> None:
    # the case file's own scales_as "vertical / horizontal" is read into exponents (parsing;
    # the law itself is checked in tests/test_scaling.py)
    assert scaling_of(example, "slope") == {"vertical": 1.0, "horizontal": -1.0}
    assert example.quantities["slope"].scales_as == "vertical / horizontal"


def test_design_example_length_axes_parsed(example: Case) -> None:
    # Depths follow the vertical ratio Y; plan dimensions the horizontal ratio X.
    assert scaling_of(example, "depth") == {"vertical": 1.0}
    assert example.quantities["depth"].axis == "vertical"
    assert scaling_of(example, "width") == {"horizontal": 1.0}
    assert scaling_of(example, "reach") == {"horizontal": 1.0}
    assert scaling_of(example, "velocity") == {"velocity": 1.0}


def test_design_example_discharge_scales_by_continuity(example: Case) -> None:
    # Q = V * B * h: discharge ratio = velocity ratio x horizontal ratio x vertical ratio.
    q = example.quantities
    assert_allclose(
        q["discharge"].scaling,
        q["velocity"].scaling + q["width"].scaling + q["depth"].scaling,
        rtol=0,
        atol=1e-12,
    )
    assert scaling_of(example, "discharge") == {"horizontal": 1.0, "vertical": 1.0, "velocity": 1.0}


def test_design_example_froude_substituted_with_depth(example: Case) -> None:
    froude = example.groups["froude"]
    assert froude.builtin
    assert froude.text == "velocity / sqrt(g * depth)"
    assert_allclose(froude.weight, 100.0, rtol=0)
    assert froude.power == (1.0, {"depth": -0.5, "g": -0.5, "velocity": 1.0})


def test_design_example_reynolds_weber_substituted_with_depth(example: Case) -> None:
    reynolds, weber = example.groups["reynolds"], example.groups["weber"]
    assert reynolds.text == "velocity * depth / nu"
    assert weber.text == "rho * velocity**2 * depth / sigma"
    assert reynolds.min == 4000.0 and reynolds.max is None
    assert weber.min == 50.0 and weber.max is None
    assert_allclose([reynolds.weight, weber.weight], [1.0, 0.1], rtol=0)
    assert not reynolds.exact and not weber.exact


def test_design_example_custom_group_is_a_power_product(example: Case) -> None:
    aspect = example.groups["aspect"]
    assert not aspect.builtin
    assert aspect.text == "width / depth"
    assert aspect.power == (1.0, {"width": 1.0, "depth": -1.0})
    assert_allclose(aspect.weight, 2.0, rtol=0)
    assert list(example.groups) == ["froude", "reynolds", "weber", "aspect"]


def test_design_example_model_choices(example: Case) -> None:
    m = example.model
    assert_allclose(m.horizontal_ratio, (1 / 1000, 1 / 20), rtol=1e-12)
    assert_allclose(m.distortion, (1.0, 5.0), rtol=0)
    assert example.distorted
    assert m.velocity_ratio is None
    assert m.fluids == ("water", "seawater", "glycerol-water 20%")
    assert_allclose(m.temperature, (sc.zero_Celsius + 5, sc.zero_Celsius + 35), rtol=1e-12)
    assert_allclose(m.pressure, (ATMOSPHERE, ATMOSPHERE), rtol=0)
    # "1:25" -> 0.04 and so on: ratios are model over prototype.
    assert_allclose(
        m.preferred_ratios, [1 / 25, 1 / 50, 1 / 100, 1 / 200, 1 / 250, 1 / 500], rtol=1e-12
    )
    assert_allclose(m.preferred_ratios[0], 0.04, rtol=1e-12)


def test_design_example_limits(example: Case) -> None:
    got = [(lim.quantity, lim.kind, lim.bound) for lim in example.limits]
    want = [
        ("reach", "max", 45.0),
        ("width", "max", 12.0),
        ("discharge", "max", 0.25),
        ("depth", "min", 0.03),
        ("velocity", "min", 0.08),
    ]
    assert [g[:2] for g in got] == [w[:2] for w in want]
    assert_allclose([g[2] for g in got], [w[2] for w in want], rtol=1e-12)


def test_design_example_has_one_design_condition(example: Case) -> None:
    assert len(example.conditions) == 1
    cond = example.conditions[0]
    assert cond.name == "design" and cond.weight == 1.0 and dict(cond.values) == {}
    assert example.values() == {n: q.value for n, q in example.quantities.items()}
    assert example.title == "Heron Creek bend: flood scoping model"
    assert example.path == str(EXAMPLE)


def test_docs_example_is_the_design_example() -> None:
    text = DOCS.read_text(encoding="utf-8")
    blocks = re.findall(r"```toml\n(.*?)```", text, flags=re.S)
    assert blocks, "docs/case-format.md has no TOML block"
    assert tomllib.loads(blocks[0]) == tomllib.loads(EXAMPLE_TEXT)


def test_docs_toml_blocks_are_valid_toml() -> None:
    # Every TOML snippet of docs/case-format.md parses (TOML 1.0: inline tables on one line).
    text = DOCS.read_text(encoding="utf-8")
    blocks = re.findall(r"```toml\n(.*?)```", text, flags=re.S)
    assert len(blocks) > 5
    for block in blocks:
        assert isinstance(tomllib.loads(block), dict)


def test_case_from_dict_agrees_with_load_case(example: Case) -> None:
    case = case_from_dict(tomllib.loads(EXAMPLE_TEXT), path="example")
    assert case.path == "example"
    assert case.values() == example.values()
    assert [g.text for g in case.groups.values()] == [g.text for g in example.groups.values()]


# ----------------------------------------------------------------------------- other good input


@pytest.mark.parametrize(
    ("text", "kelvin"),
    [
        ("12 degC", sc.zero_Celsius + 12.0),  # BIPM (2019) sect. 2.3.1
        ("285.15 K", 285.15),
        ("53.6 degF", (53.6 + 459.67) / 1.8),  # NIST SP 811 (2008) sect. B.9
        ("12.0degC", sc.zero_Celsius + 12.0),
    ],
)
def test_prototype_temperature_units_nist_sp811(tmp_path: Path, text: str, kelvin: float) -> None:
    path = write(tmp_path, edit(('temperature = "12 degC"', f'temperature = "{text}"')))
    assert_allclose(load_case(path).temperature, kelvin, rtol=1e-12)


def test_temperature_in_kelvin_is_read_as_a_temperature(tmp_path: Path) -> None:
    # "12 K" is a temperature (not refused for its dimension); water is frozen there.
    path = write(tmp_path, edit(('temperature = "12 degC"', 'temperature = "12 K"')))
    errors = problems(path, "prototype.temperature", "freezes")
    assert not any("expected a temperature" in e.message for e in errors)


def test_model_temperature_defaults_to_20_degC(tmp_path: Path) -> None:
    path = write(tmp_path, edit(('temperature      = { min = "5 degC", max = "35 degC" }\n', "")))
    assert_allclose(load_case(path).model.temperature, (293.15, 293.15), rtol=1e-12)


def test_fixed_model_values_give_equal_bounds(tmp_path: Path) -> None:
    path = write(
        tmp_path,
        edit(
            ('horizontal_ratio = { min = "1:1000", max = "1:20" }', 'horizontal_ratio = "1:50"'),
            ("distortion       = { min = 1, max = 5 }", "distortion = 1"),
            ('{ min = "5 degC", max = "35 degC" }', '"18 degC"'),
        ),
    )
    m = load_case(path).model
    assert_allclose(m.horizontal_ratio, (0.02, 0.02), rtol=1e-12)
    assert_allclose(m.distortion, (1.0, 1.0), rtol=0)
    assert_allclose(m.temperature, (291.15, 291.15), rtol=1e-12)
    assert not load_case(path).distorted


def test_ratios_as_numbers_equal_ratios_as_text(tmp_path: Path, example: Case) -> None:
    path = write(
        tmp_path,
        edit(
            ('{ min = "1:1000", max = "1:20" }', '{ min = 0.001, max = "0.05" }'),
            ('"1:25", "1:50"', '0.04, "2:100"'),
        ),
    )
    m = load_case(path).model
    assert_allclose(m.horizontal_ratio, example.model.horizontal_ratio, rtol=1e-12)
    assert_allclose(m.preferred_ratios, example.model.preferred_ratios, rtol=1e-12)


def test_conditions_override_values_and_weigh(tmp_path: Path) -> None:
    text = EXAMPLE_TEXT + (
        '\n[conditions.mean]\nvelocity = "0.9 m/s"\ndischarge = "120 m^3/s"\n'
        '\n[conditions.flood]\nweight = 3\ndescription = "100-year flood"\n'
        'depth = "550 cm"\n'
    )
    case = load_case(write(tmp_path, text))
    assert [c.name for c in case.conditions] == ["mean", "flood"]
    assert [c.weight for c in case.conditions] == [1.0, 3.0]
    mean, flood = case.values("mean"), case.values(1)
    assert_allclose([mean["velocity"], mean["discharge"], mean["depth"]], [0.9, 120, 3.5], rtol=0)
    assert_allclose([flood["velocity"], flood["depth"]], [1.8, 5.5], rtol=1e-12)
    with pytest.raises(KeyError, match="no condition named 'dry'"):
        case.values("dry")


def test_group_length_key_replaces_characteristic_length(tmp_path: Path) -> None:
    path = write(
        tmp_path,
        edit(
            (
                'velocity  = "1.8 m/s"',
                'velocity  = "1.8 m/s"\nradius = { value = "3.2 m", axis = "vertical" }',
            ),
            (
                "reynolds = { weight = 1, min = 4000 }",
                'reynolds = { weight = 1, min = 4000, length = "radius" }',
            ),
        ),
    )
    case = load_case(path)
    assert case.groups["reynolds"].text == "velocity * radius / nu"
    assert case.groups["froude"].text == "velocity / sqrt(g * depth)"


def test_characteristic_length_follows_length_names_order(tmp_path: Path) -> None:
    # Without 'depth' or 'diameter', the next name of LENGTH_NAMES that the case defines as a
    # length is used: 'length' is an area here and is passed over, 'height' comes before 'width'.
    assert LENGTH_NAMES.index("length") < LENGTH_NAMES.index("height")
    assert LENGTH_NAMES.index("height") < LENGTH_NAMES.index("width")
    text = """
[prototype]
fluid = "water"
temperature = "15 degC"
[prototype.quantities]
length = "0.5 m^2"
velocity = "2 m/s"
width = "0.6 m"
height = "0.3 m"
[groups]
froude = { exact = true }
[model]
horizontal_ratio = "1:10"
"""
    case = load_case(write(tmp_path, text))
    assert case.groups["froude"].text == "velocity / sqrt(g * height)"
    assert case.groups["froude"].exact
    assert case.model.fluids == ("water",)  # default: the prototype fluid


def test_scales_as_manning_n_parsed_like_the_builtin_law(tmp_path: Path) -> None:
    # parsing: a scales_as string written out by hand gives the built-in law's exponents
    path = write(
        tmp_path,
        edit(
            (
                'width     = "120 m"',
                'width     = "120 m"\nmanning_n = { value = "0.03", '
                'scales_as = "vertical^(7/6) * horizontal^(-1/2) / velocity" }',
            ),
        ),
    )
    case = load_case(path)
    assert_allclose(case.quantities["manning_n"].scaling, DERIVED_KINDS["manning_n"][0], atol=1e-12)
    # Under Froude scaling V = Y^(1/2) (v = z/2) the exponents reduce to Y^(2/3) X^(-1/2).
    s = case.quantities["manning_n"].scaling
    assert_allclose(
        [s[INDEX["horizontal"]], s[INDEX["vertical"]] + s[INDEX["velocity"]] / 2],
        [-0.5, 2 / 3],
        rtol=1e-12,
    )


def test_section_area_scales_as_horizontal_times_vertical(tmp_path: Path) -> None:
    path = write(
        tmp_path,
        edit(
            (
                'width     = "120 m"',
                'width     = "120 m"\narea = { value = "400 m^2", '
                'axis = "section" }\nplan = "3 ha"',
            )
        ),
    )
    case = load_case(path)
    assert scaling_of(case, "area") == {"horizontal": 1.0, "vertical": 1.0}
    assert scaling_of(case, "plan") == {"horizontal": 2.0}
    assert_allclose(case.quantities["plan"].value, 3e4, rtol=1e-12)  # 1 ha = 1e4 m^2 (BIPM)


# ----------------------------------------------------------------------------- bad files


def test_missing_file_names_the_file(tmp_path: Path) -> None:
    path = tmp_path / "nowhere.toml"
    errors = problems(path, None, "file not found")
    assert len(errors) == 1


def test_directory_is_refused(tmp_path: Path) -> None:
    errors = problems(tmp_path, None, "expected a case file, got a directory")
    assert len(errors) == 1


def test_toml_syntax_error_gives_the_line(tmp_path: Path) -> None:
    path = write(tmp_path, edit(('fluid = "water"', "fluid = water")))
    line = EXAMPLE_TEXT.splitlines().index('fluid = "water"') + 1
    errors = problems(path, None, "TOML syntax error", f"line {line}")
    assert len(errors) == 1


def test_file_that_is_not_utf8_is_refused(tmp_path: Path) -> None:
    path = tmp_path / "latin1.toml"
    path.write_bytes('title = "Sa\u00f4ne"\n'.encode("latin-1"))
    problems(path, None, "expected UTF-8 text")


# ----------------------------------------------------------------------------- unknown keys


@pytest.mark.parametrize(
    ("old", "new", "key", "suggestion"),
    [
        ("[limits]", "[limts]", "limts", "did you mean 'limits'?"),
        (
            "froude   = { weight = 100 }",
            "froude   = { wieght = 100 }",
            "groups.froude.wieght",
            "did you mean 'weight'?",
        ),
        ('title = "Heron', 'titel = "Heron', "titel", "did you mean 'title'?"),
        (
            'temperature = "12 degC"',
            'temprature = "12 degC"',
            "prototype.temprature",
            "did you mean 'temperature'?",
        ),
        (
            "distortion       =",
            "distorsion       =",
            "model.distorsion",
            "did you mean 'distortion'?",
        ),
        (
            'axis = "vertical"',
            'axes = "vertical"',
            "prototype.quantities.depth.axes",
            "did you mean 'axis'?",
        ),
        (
            'depth     = { min = "3 cm" }',
            'depth     = { mni = "3 cm" }',
            "limits.depth.mni",
            "did you mean 'min'?",
        ),
        (
            '{ min = "1:1000", max = "1:20" }',
            '{ min = "1:1000", maxi = "1:20" }',
            "model.horizontal_ratio.maxi",
            "did you mean 'max'?",
        ),
        ("froude   =", "frode   =", "groups.frode", "did you mean 'froude'?"),
        (
            'reach     = { max = "45 m" }',
            'raech     = { max = "45 m" }',
            "limits.raech",
            "did you mean 'reach'?",
        ),
    ],
)
def test_unknown_key_suggests_the_nearest(
    tmp_path: Path, old: str, new: str, key: str, suggestion: str
) -> None:
    path = write(tmp_path, edit((old, new)))
    problems(path, key, suggestion)


def test_unknown_condition_key_suggests_a_quantity(tmp_path: Path) -> None:
    path = write(tmp_path, EXAMPLE_TEXT + '\n[conditions.flood]\nvelocty = "3 m/s"\n')
    problems(path, "conditions.flood.velocty", "not a prototype quantity", "'velocity'")


# ----------------------------------------------------------------------------- units and dimensions


@pytest.mark.parametrize(
    ("old", "new", "key", "expected"),
    [
        (
            'depth     = { min = "3 cm" }',
            "depth     = { min = 3 }",
            "limits.depth.min",
            ("expected a length with units", "'3 m'", "bare number 3"),
        ),
        (
            'temperature = "12 degC"',
            "temperature = 12",
            "prototype.temperature",
            ("expected a temperature", "degC", "bare number 12"),
        ),
        (
            '{ min = "5 degC", max = "35 degC" }',
            '{ min = 5, max = "35 degC" }',
            "model.temperature.min",
            ("expected a temperature", "bare number 5"),
        ),
        (
            'discharge = { max = "0.25 m^3/s" }',
            "discharge = { max = 0.25 }",
            "limits.discharge.max",
            ("expected a discharge with units", "'0.25 m^3/s'"),
        ),
    ],
)
def test_bare_number_where_units_are_needed(
    tmp_path: Path, old: str, new: str, key: str, expected: tuple[str, ...]
) -> None:
    problems(write(tmp_path, edit((old, new))), key, *expected)


@pytest.mark.parametrize(
    ("old", "new", "key", "expected"),
    [
        (
            'depth     = { min = "3 cm" }',
            'depth     = { min = "3 m/s" }',
            "limits.depth.min",
            ("expected a length", "'3 m/s'", "(a velocity)"),
        ),
        (
            'discharge = { max = "0.25 m^3/s" }',
            'discharge = { max = "0.25 m^3" }',
            "limits.discharge.max",
            ("expected a discharge", "(a volume)"),
        ),
        (
            'temperature = "12 degC"',
            'temperature = "12 m"',
            "prototype.temperature",
            ("expected a temperature", "'12 m'", "(a length)"),
        ),
        (
            'max = "35 degC"',
            'max = "35 m/s"',
            "model.temperature.max",
            ("expected a temperature", "(a velocity)"),
        ),
        (
            'temperature = "12 degC"',
            'temperature = "12 degC"\npressure = "2 m"',
            "prototype.pressure",
            ("expected a pressure", "(a length)"),
        ),
        (
            "temperature      = { min",
            'pressure = "1 kg"\ntemperature      = { min',
            "model.pressure",
            ("expected a pressure", "(a mass)"),
        ),
        (
            'width     = "120 m"',
            'width     = "120 mtrs"',
            "prototype.quantities.width",
            ("unknown unit",),
        ),
    ],
)
def test_wrong_dimension_is_named(
    tmp_path: Path, old: str, new: str, key: str, expected: tuple[str, ...]
) -> None:
    problems(write(tmp_path, edit((old, new))), key, *expected)


def test_condition_value_must_have_the_quantity_dimension(tmp_path: Path) -> None:
    path = write(tmp_path, EXAMPLE_TEXT + '\n[conditions.flood]\nvelocity = "3 m"\n')
    problems(path, "conditions.flood.velocity", "expected a velocity", "(a length)")


def test_vertical_axis_only_for_a_length(tmp_path: Path) -> None:
    # The quantity's own dimension is free; 'axis = "vertical"' is what needs a length.
    path = write(
        tmp_path,
        edit(('depth     = { value = "3.5 m",', 'depth     = { value = "3 m/s",')),
    )
    errors = problems(path, "prototype.quantities.depth.axis", "only a length", "scales_as")
    assert len(errors) == 1  # no second message about 'depth' in groups or limits


def test_section_axis_only_for_an_area(tmp_path: Path) -> None:
    path = write(
        tmp_path, edit(('width     = "120 m"', 'width = { value = "120 m", axis = "section" }'))
    )
    problems(path, "prototype.quantities.width.axis", "only an area")


def test_temperature_quantity_needs_scales_as(tmp_path: Path) -> None:
    path = write(tmp_path, edit(('width     = "120 m"', 'width     = "120 m"\nair_t = "20 degC"')))
    problems(path, "prototype.quantities.air_t", "temperature", "scales_as")


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ('"horizontal ** velocity"', "product of powers"),
        ('"2 * vertical / horizontal"', "product of powers"),
        ('"vertical / horizantal"', "unknown name 'horizantal'"),
        ("4", "expected an expression string"),
    ],
)
def test_bad_scales_as(tmp_path: Path, text: str, message: str) -> None:
    path = write(tmp_path, edit(('scales_as = "vertical / horizontal"', f"scales_as = {text}")))
    problems(path, "prototype.quantities.slope.scales_as", message)


# ----------------------------------------------------------------------------- values out of range


@pytest.mark.parametrize(
    ("old", "new", "key", "expected"),
    [
        ('"120 m"', '"0 m"', "prototype.quantities.width", "expected a positive finite value"),
        ('"120 m"', '"-120 m"', "prototype.quantities.width", "expected a positive finite value"),
        ('"120 m"', '"nan m"', "prototype.quantities.width", "expected a positive finite value"),
        ('"120 m"', '"inf m"', "prototype.quantities.width", "expected a positive finite value"),
        ('{ max = "45 m" }', '{ max = "0 m" }', "limits.reach.max", "expected a positive value"),
        ('{ max = "45 m" }', '{ max = "-45 m" }', "limits.reach.max", "expected a positive value"),
        ('{ max = "45 m" }', '{ max = "nan m" }', "limits.reach.max", "expected a finite value"),
        ('{ max = "45 m" }', '{ max = "inf m" }', "limits.reach.max", "expected a finite value"),
        ('min = "1:1000"', "min = 0", "model.horizontal_ratio.min", "positive finite ratio"),
        (
            'min = "1:1000"',
            'min = "-1:1000"',
            "model.horizontal_ratio.min",
            "positive finite ratio",
        ),
        ('min = "1:1000"', "min = nan", "model.horizontal_ratio.min", "positive finite ratio"),
        ('min = "1:1000"', "min = inf", "model.horizontal_ratio.min", "positive finite ratio"),
        ('min = "1:1000"', 'min = "1:0"', "model.horizontal_ratio.min", "zero denominator"),
        (
            "{ min = 1, max = 5 }",
            "{ min = 1, max = inf }",
            "model.distortion.max",
            "expected a positive number",
        ),
        (
            "{ min = 1, max = 5 }",
            "{ min = 0.5, max = 5 }",
            "model.distortion",
            "expected values >= 1",
        ),
        ("{ weight = 100 }", "{ weight = -1 }", "groups.froude.weight", "expected a weight >= 0"),
        ("{ weight = 100 }", "{ weight = nan }", "groups.froude.weight", "expected a weight >= 0"),
        ("min = 4000 }", "min = -4000 }", "groups.reynolds.min", "expected a positive number"),
        ('"1:25", "1:50"', '"1:25", "1/50"', "model.preferred_ratios[1]", "expected a ratio"),
        (
            'temperature = "12 degC"',
            'temperature = "12 degC"\npressure = "-1 bar"',
            "prototype.pressure",
            "expected a positive value",
        ),
    ],
)
def test_zero_negative_nan_infinite_values(
    tmp_path: Path, old: str, new: str, key: str, expected: str
) -> None:
    problems(write(tmp_path, edit((old, new))), key, expected)


def test_condition_weight_must_be_positive(tmp_path: Path) -> None:
    path = write(tmp_path, EXAMPLE_TEXT + "\n[conditions.flood]\nweight = 0\n")
    problems(path, "conditions.flood.weight", "expected a positive weight")


@pytest.mark.parametrize(
    ("old", "new", "key", "expected"),
    [
        (
            '{ min = "1:1000", max = "1:20" }',
            '{ min = "1:20", max = "1:1000" }',
            "model.horizontal_ratio",
            "min '1:20' is greater than max '1:1000'",
        ),
        (
            '{ min = "5 degC", max = "35 degC" }',
            '{ min = "35 degC", max = "5 degC" }',
            "model.temperature",
            "min '35 degC' is greater than max '5 degC'",
        ),
        ("{ min = 1, max = 5 }", "{ min = 5, max = 1 }", "model.distortion", "is greater than max"),
        (
            'depth     = { min = "3 cm" }',
            'depth     = { min = "3 cm", max = "2 cm" }',
            "limits.depth",
            "min is greater than max",
        ),
        (
            "min = 4000 }",
            "min = 4000, max = 100 }",
            "groups.reynolds",
            "min 4000.0 is greater than max 100.0",
        ),
    ],
)
def test_min_greater_than_max(tmp_path: Path, old: str, new: str, key: str, expected: str) -> None:
    problems(write(tmp_path, edit((old, new))), key, expected)


def test_bounds_need_both_ends(tmp_path: Path) -> None:
    path = write(tmp_path, edit(('{ min = "1:1000", max = "1:20" }', '{ min = "1:1000" }')))
    problems(path, "model.horizontal_ratio", "expected both 'min' and 'max'")


# ----------------------------------------------------------------------------- fluids


def test_unknown_prototype_fluid_suggests_water(tmp_path: Path) -> None:
    path = write(tmp_path, edit(('fluid = "water"', 'fluid = "watr"')))
    problems(path, "prototype.fluid", "unknown fluid 'watr'", "did you mean 'water'?")


def test_unknown_model_fluid_suggests_seawater(tmp_path: Path) -> None:
    path = write(tmp_path, edit(('"seawater", "glycerol', '"seawter", "glycerol')))
    problems(path, "model.fluids[1]", "unknown fluid 'seawter'", "did you mean 'seawater'?")


def test_glycerol_fraction_above_100_percent_is_a_case_error(tmp_path: Path) -> None:
    path = write(tmp_path, edit(('"glycerol-water 20%"', '"glycerol-water 120%"')))
    problems(path, "model.fluids[2]", "120 %", "above 100 %")


def test_model_fluid_listed_twice(tmp_path: Path) -> None:
    path = write(tmp_path, edit(('"seawater", "glycerol', '"Water", "glycerol')))
    problems(path, "model.fluids[1]", "'water' is listed twice")


def test_prototype_water_below_ice_point_common_practice(tmp_path: Path) -> None:
    # Water freezes at 0 degC at 101325 Pa (ice point; common practice).
    path = write(tmp_path, edit(('temperature = "12 degC"', 'temperature = "-10 degC"')))
    problems(path, "prototype.temperature", "water", "freezes", "-10.0 degC")


def test_model_water_above_boiling_point_iapws97(tmp_path: Path) -> None:
    boiling = iapws.IAPWS97(P=ATMOSPHERE / 1e6, x=0).T  # [K], about 373.12 K (99.97 degC)
    assert_allclose(boiling, 373.124, rtol=1e-5)
    too_hot = boiling - sc.zero_Celsius + 20.0  # [degC] about 120 degC
    path = write(tmp_path, edit(('max = "35 degC"', f'max = "{too_hot:.1f} degC"')))
    errors = problems(path, "model.temperature", "water:", "boils")
    # Each model fluid is checked: all three liquids boil or leave their range up there.
    assert {e.message.split(":")[0] for e in errors if e.key == "model.temperature"} == {
        "water",
        "seawater",
        "glycerol-water 20%",
    }


# ----------------------------------------------------------------------------- groups


@pytest.mark.parametrize(
    ("expr", "expected"),
    [
        ('"width / (depth"', ("cannot parse", "'(' was never closed")),
        ('"width"', ("expected a dimensionless expression", "got a length", "width")),
        ('"sqrt(width)"', ("expected a dimensionless expression", "L^1/2")),
        ('"width / deptth"', ("unknown name 'deptth'", "did you mean 'depth'?")),
        ('"width + velocity"', ("cannot add [length] and [velocity]",)),
        ('"width.real / depth"', ("attribute access is not allowed",)),
        ('"open(width)"', ("calls are limited to sqrt, log, exp, abs",)),
        ("3", ("expected an expression string",)),
    ],
)
def test_bad_group_expression(tmp_path: Path, expr: str, expected: tuple[str, ...]) -> None:
    path = write(tmp_path, edit(('expr = "width / depth"', f"expr = {expr}")))
    problems(path, "groups.aspect.expr", *expected)


def test_builtin_group_needs_its_quantities(tmp_path: Path) -> None:
    path = write(tmp_path, edit(("aspect   =", "euler    = { weight = 1 }\naspect   =")))
    problems(path, "groups.euler", "unknown name 'pressure_drop'", "built-in 'euler'")


def test_builtin_group_needs_a_characteristic_length(tmp_path: Path) -> None:
    text = """
[prototype]
fluid = "air"
temperature = "15 degC"
[prototype.quantities]
velocity = "30 m/s"
span = "12 m"
[groups]
reynolds = { weight = 1 }
[model]
horizontal_ratio = "1:20"
"""
    problems(write(tmp_path, text), "groups.reynolds", "needs a characteristic length", "length = ")


@pytest.mark.parametrize("length", ['"velocity"', '"depht"', "3"])
def test_group_length_must_name_a_length_quantity(tmp_path: Path, length: str) -> None:
    path = write(
        tmp_path,
        edit(("froude   = { weight = 100 }", f"froude   = {{ weight = 100, length = {length} }}")),
    )
    problems(
        path, "groups.froude.length", "expected the name of a prototype quantity that is a length"
    )


def test_group_exact_must_be_boolean(tmp_path: Path) -> None:
    path = write(tmp_path, edit(("froude   = { weight = 100 }", 'froude   = { exact = "yes" }')))
    problems(path, "groups.froude.exact", "expected true or false")


def test_missing_groups_table(tmp_path: Path) -> None:
    start = EXAMPLE_TEXT.index("[groups]")
    end = EXAMPLE_TEXT.index("[model]")
    path = write(tmp_path, EXAMPLE_TEXT[:start] + EXAMPLE_TEXT[end:])
    problems(path, "groups", "expected at least one dimensionless group")


# ----------------------------------------------------------------------------- structure


@pytest.mark.parametrize("name", ["rho", "nu", "g", "L", "pi", "sqrt"])
def test_reserved_quantity_names(tmp_path: Path, name: str) -> None:
    path = write(tmp_path, edit(('width     = "120 m"', f'width     = "120 m"\n{name} = "1 m"')))
    errors = problems(path, f"prototype.quantities.{name}", f"'{name}' is reserved")
    assert len(errors) == 1


@pytest.mark.parametrize(
    ("old", "new", "key", "expected"),
    [
        ('temperature = "12 degC"\n', "", "prototype.temperature", "missing"),
        (
            'horizontal_ratio = { min = "1:1000", max = "1:20" }\n',
            "",
            "model.horizontal_ratio",
            "missing",
        ),
        (
            'title = "Heron Creek bend: flood scoping model"',
            "title = 7",
            "title",
            "expected a string",
        ),
        ('depth     = { min = "3 cm" }', 'depth     = "3 cm"', "limits.depth", "expected a table"),
        (
            'depth     = { min = "3 cm" }',
            "depth     = {}",
            "limits.depth",
            "expected 'min' and/or 'max'",
        ),
        (
            'fluids           = ["water", "seawater", "glycerol-water 20%"]',
            "fluids = []",
            "model.fluids",
            "non-empty list",
        ),
        (
            'preferred_ratios = ["1:25", "1:50", "1:100", "1:200", "1:250", "1:500"]',
            'preferred_ratios = "1:25"',
            "model.preferred_ratios",
            "expected a list",
        ),
    ],
)
def test_structure_problems(tmp_path: Path, old: str, new: str, key: str, expected: str) -> None:
    problems(write(tmp_path, edit((old, new))), key, expected)


def test_limit_that_is_not_a_table_is_one_problem(tmp_path: Path) -> None:
    path = write(tmp_path, edit(('depth     = { min = "3 cm" }', 'depth     = "3 cm"')))
    errors = problems(path, "limits.depth", "expected a table, got '3 cm'")
    assert len(errors) == 1


def test_missing_prototype_table(tmp_path: Path) -> None:
    text = '[groups]\nfroude = { weight = 1 }\n[model]\nhorizontal_ratio = "1:50"\n'
    errors = problems(write(tmp_path, text), "prototype", "missing table")
    keys = {e.key for e in errors}
    assert {"prototype", "prototype.temperature", "prototype.quantities"} <= keys


# ------------------------------------------------------------------------ many problems at once


def test_several_problems_are_all_reported(tmp_path: Path) -> None:
    path = write(
        tmp_path,
        edit(
            ("[limits]", "[limts]"),
            ('temperature = "12 degC"', 'temperature = "12 m"'),
            ('width     = "120 m"', 'width     = "nan m"'),
            ("froude   = { weight = 100 }", "froude   = { wieght = 100 }"),
            ('"seawater", "glycerol', '"seawter", "glycerol'),
        ),
    )
    errors = problems(path, "limts", "did you mean 'limits'?")
    assert [e.key for e in errors] == [
        "limts",
        "prototype.temperature",
        "prototype.quantities.width",
        "groups.froude.wieght",
        "model.fluids[1]",
    ]
    # The rejected 'width' is reported once: not again where 'aspect' uses it.
    assert len(errors) == 5
    assert not any("unknown name 'width'" in e.message for e in errors)


def test_case_errors_joins_one_line_per_problem(tmp_path: Path) -> None:
    path = write(tmp_path, edit(("[limits]", "[limts]"), ('"120 m"', '"-1 m"')))
    with pytest.raises(CaseErrors, match="limts") as info:
        load_case(path)
    lines = str(info.value).split("\n")
    assert lines == [e.line() for e in info.value.errors]
    assert len(lines) == 2
    assert all(line.startswith(f"{path}: ") for line in lines)
    assert isinstance(info.value, ValueError)  # CaseErrors is a ValueError, as CaseError is


def test_loading_does_not_touch_the_file(tmp_path: Path) -> None:
    path = write(tmp_path, edit(("[limits]", "[limts]")))
    before = path.read_bytes()
    with pytest.raises(CaseErrors, match="limts"):
        load_case(path)
    assert path.read_bytes() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["case.toml"]
