"""The same case written in US customary and in SI units gives the same design.

Source of the conversions: the international yard and pound agreement (1959) fixes
1 ft = 0.3048 m exactly, hence 1 ft^3/s = 0.028316846592 m^3/s and 1 in = 0.0254 m exactly; the
Fahrenheit scale gives 50 degF = 10 degC and 77 degF = 25 degC exactly (NIST SP 811, 2008,
appendix B, seen as printed tables, from memory). ``cases/culvert_si.toml`` is
``cases/culvert_us.toml`` converted with these factors by hand.
"""

from __future__ import annotations

from pathlib import Path

from numpy.testing import assert_allclose

from compromise.casefile.load import load_case
from compromise.solving.optimum import find_optimum

CASES = Path(__file__).resolve().parents[1] / "cases"


def test_us_and_si_twins_load_to_the_same_si_values() -> None:
    us, si = load_case(CASES / "culvert_us.toml"), load_case(CASES / "culvert_si.toml")
    assert us.quantities.keys() == si.quantities.keys()
    for name in us.quantities:
        assert_allclose(us.quantities[name].value, si.quantities[name].value, rtol=1e-14)
    for a, b in zip(us.limits, si.limits, strict=True):
        assert (a.quantity, a.kind) == (b.quantity, b.kind)
        assert_allclose(a.bound, b.bound, rtol=1e-14)
    assert_allclose(us.model.temperature, si.model.temperature, rtol=1e-14)


def test_us_and_si_twins_give_one_design_to_1e9() -> None:
    us = find_optimum(load_case(CASES / "culvert_us.toml"))
    si = find_optimum(load_case(CASES / "culvert_si.toml"))
    assert us.status == si.status == "optimal"
    assert us.design is not None and si.design is not None
    a, b = us.design, si.design
    assert a.fluid == b.fluid
    assert_allclose(
        [a.horizontal_ratio, a.vertical_ratio, a.velocity_ratio, a.temperature],
        [b.horizontal_ratio, b.vertical_ratio, b.velocity_ratio, b.temperature],
        rtol=1e-9,
    )
    assert_allclose(us.objective, si.objective, rtol=1e-9)
    assert [x.label for x in us.alternatives] == [x.label for x in si.alternatives]
