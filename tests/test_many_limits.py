"""Many laboratory limits on quantities that scale alike (behaviour users rely on).

Limits on lengths of one axis all bound the same log-ratio, so only the tightest can bind: a
case with hundreds of such limits must give the design of the same case with the tightest limit
alone (the exact answer, checked against that smaller case), and quickly (the rows collapse
before the active sets are enumerated; timings live in benchmarks/solve.py).
"""

from __future__ import annotations

import copy
from typing import Any

from numpy.testing import assert_allclose

from compromise.casefile.load import case_from_dict
from compromise.solving.optimum import find_optimum

BASE: dict[str, Any] = {
    "title": "many limits",
    "prototype": {
        "fluid": "water",
        "temperature": "15 degC",
        "quantities": {
            "depth": {"value": "2 m", "axis": "vertical"},
            "reach": "1500 m",
            "velocity": "1.5 m/s",
            "discharge": "300 m^3/s",
        },
    },
    "groups": {
        "froude": {"exact": True},
        "reynolds": {"weight": 1, "min": 4000},
    },
    "model": {
        "horizontal_ratio": {"min": "1:1000", "max": "1:10"},
        "distortion": {"min": 1, "max": 4},
        "fluids": ["water"],
        "temperature": {"min": "10 degC", "max": "30 degC"},
        "preferred_ratios": ["1:50", "1:100", "1:400"],
    },
    "limits": {"reach": {"max": "30 m"}, "discharge": {"max": "0.2 m^3/s"}},
}


def with_features(n: int) -> dict[str, Any]:
    data = copy.deepcopy(BASE)
    for i in range(n):
        name = f"feature_{i}"
        data["prototype"]["quantities"][name] = f"{100 + 7 * i} m"
        data["limits"][name] = {"max": f"{40 + i} m"}  # every one looser than the reach
    return data


def test_hundreds_of_alike_limits_give_the_tightest_limits_design() -> None:
    small = find_optimum(case_from_dict(BASE))
    big = find_optimum(case_from_dict(with_features(300)))
    assert small.design is not None and big.design is not None
    assert_allclose(big.design.logs, small.design.logs, rtol=1e-12, atol=1e-12)
    assert_allclose(big.objective, small.objective, rtol=1e-12)
    assert list(big.binding) == list(small.binding)
    assert [a.label for a in big.alternatives] == [a.label for a in small.alternatives]
    assert [a.separator for a in big.alternatives] == [a.separator for a in small.alternatives]
