"""The granular-material catalogue and the ``materials`` command.

Densities are checked against the values recalled from Hughes (1993), Physical Models and
Laboratory Techniques in Coastal Engineering, ch. 5, and ASCE (2000), Manual of Practice 97
(lightweight sediments), and CIRIA, CUR, CETMEF (2007), The Rock Manual (armour), all from
memory; quartz against Soulsby (1997), Dynamics of Marine Sands.
"""

from __future__ import annotations

import dataclasses
import json
import re
from pathlib import Path

import pytest
from typer.testing import CliRunner

from compromise.cli import app
from compromise.errors import CaseError
from compromise.physics.materials import (
    COHESION_LIMIT,
    COHESION_NOTE,
    MATERIALS,
    USES,
    Material,
    get_material,
    materials_for,
)

RUNNER = CliRunner()

# Lightweight model sediments, kg/m^3: Hughes (1993) ch. 5; ASCE MOP 97 (2000) (from memory).
HUGHES_1993_LIGHTWEIGHT = {
    "polystyrene": (1040, 1060),
    "nylon": (1140, 1140),
    "pvc": (1140, 1400),
    "acrylic": (1180, 1190),
    "bakelite": (1250, 1450),
    "walnut shell": (1300, 1400),
    "anthracite": (1300, 1500),
    "pumice": (1100, 1600),
}


def test_catalogue_has_the_issue_materials_in_display_order():
    """Common practice: the materials movable-bed and breakwater models use."""
    names = list(MATERIALS)
    assert names[0] == "quartz sand"
    for name in ("anthracite", "pvc", "acrylic", "polystyrene", "nylon", "walnut shell"):
        assert name in names
    for name in ("bakelite", "pumice", "rock", "concrete", "crushed granite"):
        assert name in names
    uses = [m.use for m in MATERIALS.values()]
    # sediments first, then armour: the order the command prints
    assert uses.index("armour") > max(i for i, u in enumerate(uses) if u == "sediment")


def test_every_entry_is_consistent_and_has_a_source():
    """Every density lies inside its range, every entry has a use and a dated source, and
    recalled values say so (project rule: 'from memory')."""
    for key, m in MATERIALS.items():
        assert key == m.name == m.name.lower().strip()
        low, high = m.density_range
        assert 0 < low <= m.density <= high, key
        assert m.use in USES, key
        assert re.search(r"\(\d{4}\)", m.source), key
        assert "from memory" in m.source or "Zhu" in m.source, key


def test_hughes_1993_lightweight_sediment_densities():
    """Hughes (1993) ch. 5; ASCE MOP 97 (2000) (from memory): each catalogue range covers
    the recalled one, and the typical density lies in it."""
    for name, (low, high) in HUGHES_1993_LIGHTWEIGHT.items():
        m = get_material(name)
        assert m.use in ("sediment", "both")
        assert m.density_range[0] <= low and high <= m.density_range[1], name
        assert low <= m.density <= high or low == high, name
    # rigid PVC about 1380 kg/m^3 (from memory)
    assert get_material("pvc").density == pytest.approx(1380.0)


def test_lightweight_sediments_are_lighter_than_quartz():
    """Why they are used (Hughes 1993 ch. 5, from memory): a lower relative density moves at
    a lower shear, so the model grain need not be too fine."""
    quartz = get_material("quartz sand")
    for m in materials_for("sediment"):
        if m.name != "quartz sand":
            assert m.density < quartz.density / 1.5, m.name


def test_soulsby_1997_quartz_density():
    """Soulsby (1997), Dynamics of Marine Sands: quartz 2650 kg/m^3 (from memory)."""
    assert get_material("quartz sand").density == 2650.0


def test_rock_manual_2007_armour_densities():
    """CIRIA, CUR, CETMEF (2007), The Rock Manual (from memory): armourstone 2600-2700
    kg/m^3, concrete 2300-2400 kg/m^3."""
    rock = get_material("rock")
    concrete = get_material("concrete")
    assert rock.density_range == (2600.0, 2700.0)
    assert concrete.density_range == (2300.0, 2400.0)
    armour = [m.name for m in materials_for("armour")]
    assert "rock" in armour and "concrete" in armour and "quartz sand" not in armour


def test_cohesion_limit_common_practice():
    """Common practice: model grains of 0.1 mm or coarser (finer ones turn cohesive)."""
    assert COHESION_LIMIT == 1e-4
    assert "0.1 mm" in COHESION_NOTE and "common practice" in COHESION_NOTE


def test_get_material_lookup_and_error():
    assert get_material("  Walnut   Shell ") is MATERIALS["walnut shell"]
    with pytest.raises(ValueError, match=r"unknown material 'glass beads'; known: 'quartz sand'"):
        get_material("glass beads")
    with pytest.raises(CaseError):
        get_material("glass beads")
    with pytest.raises(CaseError, match="expected one of"):
        materials_for("filter")


def test_material_is_frozen_and_serialises():
    m = get_material("anthracite")
    with pytest.raises(dataclasses.FrozenInstanceError):
        m.density = 1.0  # type: ignore[misc]
    d = m.to_dict()
    assert json.loads(json.dumps(d)) == d
    back = Material(**{**d, "density_range": tuple(d["density_range"])})
    assert back == m


def test_materials_command_json():
    r = RUNNER.invoke(app, ["materials", "--json"])
    assert r.exit_code == 0, r.output
    data = json.loads(r.output)
    assert list(data) == list(MATERIALS)
    assert data == {k: m.to_dict() for k, m in MATERIALS.items()}


def test_materials_command_text_lists_catalogue_sources_and_cohesion():
    r = RUNNER.invoke(app, ["materials"])
    assert r.exit_code == 0, r.output
    out = r.output
    assert "density [kg/m^3]" in out and "range [kg/m^3]" in out
    for name, m in MATERIALS.items():
        row = next(line for line in out.splitlines() if line.startswith(name + " "))
        assert m.use in row and f"{m.density_range[0]:.0f}-{m.density_range[1]:.0f}" in row
    assert "Hughes (1993)" in out and "The Rock Manual" in out and "from memory" in out
    assert "Smallest model grain: 0.1 mm" in out
    assert out.rstrip().endswith("(from memory).")
    assert RUNNER.invoke(app, ["materials"]).output == out  # same bytes every time


def test_materials_command_rejects_an_argument():
    r = RUNNER.invoke(app, ["materials", "--temperature", "20 degC"])
    assert r.exit_code == 2
    assert "Traceback" not in r.output


def test_docs_list_the_catalogue():
    """docs/materials.md shows every entry with its typical density and range."""
    doc = (Path(__file__).resolve().parents[1] / "docs" / "materials.md").read_text("utf-8")
    for name, m in MATERIALS.items():
        low, high = m.density_range
        assert f"| {name} | {m.use} | {m.density:.0f} | {low:.0f}-{high:.0f} |" in doc, name
