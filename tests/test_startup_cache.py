"""The caches that keep start-up short: pint's parsed definitions and the fluid tables on disk.

A cache must be invisible in the numbers (common practice for a memo: a hit returns exactly what
a fresh computation returns), optional (a run without it, or with a broken one, works), and never
a hazard for concurrent runs (files appear whole, through a rename).
"""

from __future__ import annotations

import os
from pathlib import Path

import numpy as np
import pytest

from compromise.physics import tablecache
from compromise.physics.fluids import ATMOSPHERE, GlycerolWater, Seawater
from compromise.units import cache_folder


@pytest.fixture
def cache_home(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path))
    monkeypatch.delenv("COMPROMISE_NO_CACHE", raising=False)
    return tmp_path


def _arrays(table: object) -> list[np.ndarray]:
    return [table.nodes, table.log_values, table.spline_c]  # type: ignore[attr-defined]


def test_cached_table_is_bit_identical_to_a_fresh_build(cache_home: Path) -> None:
    # Oracle: the table built from the source models (Millero & Poisson 1981 density,
    # Sharqawy et al. 2010 viscosity) in this process, compared bit for bit.
    fresh = Seawater(30.0)._build_table(ATMOSPHERE)
    first = Seawater(30.0).table()  # builds and saves
    saved = list((cache_home / "compromise").glob("tables-*/*.npz"))
    assert len(saved) == 1
    second = Seawater(30.0).table()  # a new instance reads the file
    for a, b, c in zip(_arrays(fresh), _arrays(first), _arrays(second), strict=True):
        assert a.tobytes() == b.tobytes() == c.tobytes()
    t = np.linspace(second.t_min, second.t_max, 57)
    for key, value in fresh(t).items():
        assert np.array_equal(value, second(t)[key], equal_nan=True)


def test_no_cache_when_disabled_or_unwritable(
    cache_home: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setenv("COMPROMISE_NO_CACHE", "1")
    assert cache_folder("x") is None
    assert GlycerolWater(0.3).table().nodes.size > 2
    assert not (cache_home / "compromise").exists()
    monkeypatch.delenv("COMPROMISE_NO_CACHE")
    blocker = cache_home / "compromise"
    blocker.write_text("a file where the folder should be")
    assert cache_folder("x") is None
    assert GlycerolWater(0.3).table().nodes.size > 2  # still works, nothing written


def test_a_damaged_or_foreign_file_is_rebuilt(cache_home: Path) -> None:
    good = Seawater(31.0).table()
    (path,) = (cache_home / "compromise").glob("tables-*/*.npz")
    path.write_bytes(b"not a table")
    assert tablecache.load("seawater 31 g/kg", ATMOSPHERE) is None
    again = Seawater(31.0).table()  # rebuilt and saved again
    assert again.spline_c.tobytes() == good.spline_c.tobytes()
    assert tablecache.load("seawater 31 g/kg", ATMOSPHERE) is not None
    # a file for another fluid or pressure under this name is not taken
    assert tablecache.load("seawater 31 g/kg", ATMOSPHERE * 2) is None
    os.replace(path, path.with_name("other.npz"))
    assert tablecache.load("seawater 31 g/kg", ATMOSPHERE) is None


def test_pint_cache_gives_the_same_registry(cache_home: Path) -> None:
    # pint's own cache (pint documentation, "Caching"): the registry read back from the cache
    # converts as the registry parsed from the definition files.
    import pint

    fresh = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    folder = cache_folder(f"pint-{pint.__version__}")
    assert folder is not None
    pint.UnitRegistry(autoconvert_offset_to_baseunit=True, cache_folder=folder)
    cached = pint.UnitRegistry(autoconvert_offset_to_baseunit=True, cache_folder=folder)
    assert any(folder.iterdir())
    for text in ("3 ft", "1 gallon/minute", "20 degC", "1 psi", "2 cP", "1 knot"):
        a, b = fresh.Quantity(text).to_base_units(), cached.Quantity(text).to_base_units()
        assert a.magnitude == b.magnitude and str(a.units) == str(b.units)


def test_remembered_states_and_limits_are_bit_identical(cache_home: Path) -> None:
    # Oracle: CoolProp's IAPWS-95 water (Wagner & Pruss 2002) and Helmholtz air (Lemmon et al.
    # 2000) evaluated in this process, compared bit for bit with what a later run reads back.
    from compromise.physics.fluids import CoolPropFluid, Water

    air = lambda: CoolPropFluid("air", "Air", "gas", (), t_min=200.0)  # noqa: E731
    fresh = [Water().properties(288.15, ATMOSPHERE), air().properties(300.0, 5e5)]
    limits = [Water().valid_range(ATMOSPHERE), air().valid_range(5e5)]
    tablecache.flush()  # as at the end of a run
    saved = list((cache_home / "compromise").glob("tables-*/*.json"))
    assert len(saved) == 2
    tablecache._STORES.clear()  # a new run: read the files back
    again = [Water().properties(288.15, ATMOSPHERE), air().properties(300.0, 5e5)]
    assert tablecache.load_state("water", 288.15, ATMOSPHERE) is not None
    assert tablecache.load_bounds("air", 5e5) is not None
    assert [Water().valid_range(ATMOSPHERE), air().valid_range(5e5)] == limits
    for a, b in zip(fresh, again, strict=True):
        assert a.to_dict() == b.to_dict()
        assert a.density.hex() == b.density.hex()
        assert a.dynamic_viscosity.hex() == b.dynamic_viscosity.hex()
    assert tablecache.load_state("water", 288.15, 2 * ATMOSPHERE) is None


def test_a_damaged_states_file_is_ignored(cache_home: Path) -> None:
    from compromise.physics.fluids import Water

    fresh = Water().properties(290.0, ATMOSPHERE)
    tablecache.flush()
    (path,) = (cache_home / "compromise").glob("tables-*/*.json")
    path.write_text('{"format": 1, "fluid": "water", "states": {"x": [1]}, "bounds": 7}')
    tablecache._STORES.clear()
    assert tablecache.load_state("water", 290.0, ATMOSPHERE) is None
    assert Water().properties(290.0, ATMOSPHERE).to_dict() == fresh.to_dict()


def test_a_warm_solve_needs_neither_coolprop_nor_scipy_optimize(tmp_path: Path) -> None:
    # The second run of a case reads CoolProp's states and limits and the spline tables from
    # the cache, and the binding limits' multipliers need only scipy's compiled NNLS routine.
    import subprocess
    import sys

    root = Path(__file__).resolve().parents[1]
    code = (
        "import sys\n"
        "from compromise.cli import main\n"
        "sys.argv = ['compromise', 'solve', 'cases/river_bend.toml', '--json']\n"
        "try:\n    main()\nexcept SystemExit:\n    pass\n"
        "heavy = [m for m in ('CoolProp', 'scipy.optimize', 'scipy.interpolate') "
        "if m in sys.modules]\n"
        "print('HEAVY', ','.join(heavy))\n"
    )
    env = {k: v for k, v in os.environ.items() if k != "COMPROMISE_NO_CACHE"}
    env["XDG_CACHE_HOME"] = str(tmp_path)
    outs = [
        subprocess.run(
            [sys.executable, "-c", code], cwd=root, env=env, capture_output=True, text=True
        ).stdout
        for _ in range(2)
    ]
    assert outs[0].rsplit("HEAVY", 1)[0] == outs[1].rsplit("HEAVY", 1)[0]  # the same answer
    assert "CoolProp" in outs[0].rsplit("HEAVY", 1)[1]  # the first run computed
    assert outs[1].rsplit("HEAVY", 1)[1].strip() == ""
