"""Scale tables against textbook scale ratios (validation tests).

Sources
-------
Chanson, H. (1999). *The Hydraulics of Open Channel Flow*, ch. 14, table of Froude similitude
ratios; Hughes, S. A. (1993). *Physical Models and Laboratory Techniques in Coastal
Engineering*, ch. 2 (both from memory): undistorted Froude model with the same fluid,
V, t ~ L^1/2; Q ~ L^5/2; F ~ L^3; p ~ L; P ~ L^7/2; Manning n ~ L^1/6.

Distorted river model exercise with X = 1/500, Y = 1/100, h = 5 m, B = 120 m,
Q = 1500 m^3/s, S = 0.00032, n = 0.021 (textbook attribution from memory: Sturm, T. W.,
*Open Channel Hydraulics*, ch. 10): V_r = Y^1/2, Q_r = X Y^3/2, S_r = Y/X,
n_r = Y^2/3 X^-1/2 (wide channel).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from numpy.testing import assert_allclose

from compromise.casefile.load import case_from_dict
from compromise.solving.scales import scale_table


def _river(quantities: dict, **model) -> object:
    return case_from_dict(
        {
            "prototype": {"fluid": "water", "temperature": "20 degC", "quantities": quantities},
            "groups": {"froude": {}, "reynolds": {}},
            "model": {
                "horizontal_ratio": {"min": "1:1000", "max": "1:1"},
                "distortion": {"min": 1, "max": 10},
                **model,
            },
        },
        path="test.toml",
    )


@pytest.fixture(scope="module")
def froude_25():
    case = _river({"depth": {"value": "2 m", "axis": "vertical"}, "velocity": "1.5 m/s"})
    return scale_table(case, 1 / 25)


@pytest.mark.parametrize(
    ("kind", "n_power"),
    [
        ("velocity", 0.5),
        ("time", 0.5),
        ("discharge", 2.5),
        ("unit_discharge", 1.5),
        ("force", 3.0),
        ("mass", 3.0),
        ("pressure", 1.0),
        ("power", 3.5),
        ("volume", 3.0),
        ("manning_n", 1 / 6),
    ],
)
def test_froude_ratios_chanson1999_ch14(froude_25, kind, n_power):
    # Chanson (1999) ch. 14 / Hughes (1993) ch. 2: ratio = (1/25)^power, same fluid
    assert_allclose(froude_25.ratios[kind], 25.0**-n_power, rtol=1e-12)


def test_froude_ratios_at_1_25_by_hand(froude_25):
    # the laws above worked out by hand at N = 25 (not printed values): V, t = 1/5;
    # Q = 1/3125; F = 1/15625; P = 1/78125; n = 1/25^(1/6) = 1/1.710 (rounded to 4 digits)
    r = froude_25.ratios
    assert_allclose(
        [1 / r["velocity"], 1 / r["time"], 1 / r["discharge"], 1 / r["force"], 1 / r["power"]],
        [5, 5, 3125, 15625, 78125],
        rtol=1e-12,
    )
    assert_allclose(1 / r["manning_n"], 1.710, atol=5e-4)
    for kind in ("slope", "chezy_c", "darcy_f", "acceleration"):
        assert_allclose(r[kind], 1.0, rtol=1e-12)


def test_froude_number_is_kept(froude_25):
    g = froude_25.evaluation.conditions[0].groups["froude"]
    assert abs(g.mismatch) < 1e-12
    # Reynolds falls as L^3/2 with the same fluid
    assert_allclose(
        math.exp(froude_25.evaluation.conditions[0].groups["reynolds"].mismatch),
        25.0**-1.5,
        rtol=1e-9,
    )


@pytest.fixture(scope="module")
def distorted():
    case = _river(
        {
            "depth": {"value": "5 m", "axis": "vertical"},
            "width": "120 m",
            "velocity": "2.5 m/s",
            "discharge": "1500 m^3/s",
            "slope": {"value": "0.00032", "scales_as": "vertical / horizontal"},
        }
    )
    return scale_table(case, 1 / 500, vertical=1 / 100)


def test_distorted_model_ratios_river_exercise(distorted):
    r = distorted.ratios
    assert_allclose(r["velocity"], 1 / 10, rtol=1e-12)
    assert_allclose(r["discharge"], 2.0e-6, rtol=1e-12)
    assert_allclose(r["slope"], 5.0, rtol=1e-12)
    # wide-channel Manning n: Y^2/3 X^-1/2; with the exercise's n = 0.021 the model needs
    # 0.021 x 0.04642 x 22.36 = 0.0218 (computed by hand from the law, not a printed answer)
    assert_allclose(r["manning_n"], (1 / 100) ** (2 / 3) * (1 / 500) ** -0.5, rtol=1e-12)
    assert_allclose(0.021 * r["manning_n"], 0.0218, atol=5e-5)
    assert_allclose(r["cross_section_area"], 1 / 500 / 100, rtol=1e-12)
    assert_allclose(r["chezy_c"], math.sqrt(1 / 5), rtol=1e-12)  # (X/Y)^1/2
    assert_allclose(r["darcy_f"], 5.0, rtol=1e-12)  # Y/X: the model must be rougher
    assert_allclose(r["time"], (1 / 500) / (1 / 10), rtol=1e-12)


def test_distorted_model_values_river_exercise(distorted):
    q = distorted.evaluation.conditions[0].quantities
    assert_allclose(q["depth"].model, 0.05, rtol=1e-12)  # 5 m at 1:100
    assert_allclose(q["width"].model, 0.24, rtol=1e-12)  # 120 m at 1:500
    assert_allclose(q["discharge"].model, 3.0e-3, rtol=1e-12)  # 1500 m^3/s x 2e-6
    assert_allclose(q["slope"].model, 0.0016, rtol=1e-12)
    # Froude number kept (velocity on the vertical scale)
    assert abs(distorted.evaluation.conditions[0].groups["froude"].mismatch) < 1e-12


def test_reynolds_velocity_rule_keeps_reynolds():
    case = _river({"depth": {"value": "2 m", "axis": "vertical"}, "velocity": "1.5 m/s"})
    t = scale_table(case, 1 / 10, velocity="reynolds", fluid="water", temperature=313.15)
    g = t.evaluation.conditions[0].groups["reynolds"]
    assert abs(g.mismatch) < 1e-12
    # V_r = nu_r / L_r
    assert_allclose(t.ratios["velocity"], t.ratios["kinematic_viscosity"] * 10, rtol=1e-12)


def test_scale_table_json_keys(froude_25):
    d = froude_25.to_dict()
    assert set(d) >= {"ratios", "quantities", "groups", "design"}
    for key in (
        "horizontal_length",
        "vertical_length",
        "velocity",
        "time",
        "discharge",
        "force",
        "pressure",
        "power",
        "slope",
        "manning_n",
        "frequency",
        "plan_area",
        "cross_section_area",
        "volume",
        "unit_discharge",
        "chezy_c",
        "darcy_f",
        "acceleration",
    ):
        assert key in d["ratios"]
    assert np.isfinite(list(d["ratios"].values())).all()


def test_conventional_names_scale_by_their_law():
    # behaviour: a bare slope and a bare Manning n, given without scales_as, follow the laws of
    # the table's slope and manning_n rows (Y/X and Y^(2/3) X^(-1/2) under Froude, checked
    # against the river exercise above)
    case = _river(
        {
            "depth": {"value": "5 m", "axis": "vertical"},
            "velocity": "2.5 m/s",
            "slope": 0.00032,
            "manning_n": 0.021,
        }
    )
    t = scale_table(case, 1 / 500, vertical=1 / 100)
    q = t.evaluation.conditions[0].quantities
    assert_allclose(q["slope"].ratio, t.ratios["slope"], rtol=1e-12)
    assert_allclose(q["manning_n"].ratio, t.ratios["manning_n"], rtol=1e-12)
