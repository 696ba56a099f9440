"""The catalogue's spline tables kept on disk between runs.

Building a :class:`~compromise.physics.fluids.FluidTable` evaluates the source models a few
hundred times (CoolProp for water and the gases) and fits scipy's cubic splines, whose import
alone costs a quarter of a second. The finished table (nodes, log-values and scipy's spline
coefficients, float64) is saved under the user's cache directory and read back by later runs:
the same numbers to the last bit, so every answer is unchanged.

The folder's name is a key of the property model's version: the contents of this module, of
``fluids.py`` and ``correlations.py``, and the installed CoolProp, scipy and numpy (their
files' sizes and times), so an edit or an upgrade starts a fresh folder and every table is
rebuilt once. Nothing here is ever required: a missing, stale, unreadable or unwritable cache
(or ``COMPROMISE_NO_CACHE`` set) means the table is built as without a cache. Only the
catalogue's own fluid classes are cached (a subclass elsewhere may change a model); the
caller, :meth:`compromise.physics.fluids.Fluid.table`, decides.

The same folder keeps, per CoolProp fluid, the states its source models were asked for (the
solver's finishing states, the prototype's state, the checks' limits: each costs a CoolProp
call, and CoolProp's import alone costs a quarter of a second): one JSON file of exact floats
(``float.hex``) per fluid, read on first use and written once at exit when something was
added, so a later run of the same case needs no CoolProp at all. A hit returns the very
numbers the models returned.
"""

from __future__ import annotations

import atexit
import contextlib
import hashlib
import importlib.util
import io
import json
import math
import os
from functools import lru_cache
from pathlib import Path
from typing import Any

import numpy as np

from compromise.units import cache_folder

#: A table's arrays: nodes (n,), log-values (n, k) and scipy's coefficients (4, n - 1, k).
Arrays = tuple[np.ndarray, np.ndarray, np.ndarray]
#: A fluid's temperature limits at one pressure: (lows, highs), each [(temperature, reason)].
Bounds = tuple[list[tuple[float, str]], list[tuple[float, str]]]
#: One source-model state: density, viscosity, surface tension, sound speed (nan where none)
#: and the vapour pressure (None where none).
Values = tuple[float, float, float, float, float | None]

_FORMAT = 1  # bump when the file layout changes
_OWN = ("fluids.py", "correlations.py", "tablecache.py")
_LIBRARIES = (("CoolProp", "__init__.py"), ("scipy", "version.py"), ("numpy", "version.py"))


@lru_cache(maxsize=1)
def version_key() -> str:
    """A short hash of everything a table's numbers depend on (see the module docstring)."""
    digest = hashlib.sha256(f"format {_FORMAT}".encode())
    here = Path(__file__).resolve().parent
    for name in _OWN:
        digest.update((here / name).read_bytes())
    for package, member in _LIBRARIES:
        spec = importlib.util.find_spec(package)
        origin = Path(spec.origin) if spec and spec.origin else None
        target = origin.parent / member if origin else None
        if target is not None and not target.exists():
            target = origin
        if target is None:
            digest.update(f"{package}: missing".encode())
            continue
        st = target.stat()
        digest.update(f"{package}: {target} {st.st_size} {st.st_mtime_ns}".encode())
    return digest.hexdigest()[:16]


def _path(folder: Path, fluid: str, pressure: float) -> Path:
    key = hashlib.sha256(f"{fluid}|{float(pressure).hex()}".encode()).hexdigest()[:20]
    return folder / f"{key}.npz"


def _folder() -> Path | None:
    try:
        return cache_folder(f"tables-{version_key()}")
    except OSError:
        return None


def load(fluid: str, pressure: float) -> Arrays | None:
    """The cached table of the catalogue fluid named ``fluid`` at ``pressure`` [Pa], or None."""
    folder = _folder()
    if folder is None:
        return None
    path = _path(folder, fluid, pressure)
    try:
        with np.load(path, allow_pickle=False) as data:
            name, p = str(data["fluid"]), float(data["pressure"])
            nodes, logs, c = data["nodes"], data["log_values"], data["spline_c"]
    except (OSError, ValueError, KeyError, EOFError):
        return None
    n = nodes.shape[0] if nodes.ndim == 1 else 0
    consistent = (
        name == fluid
        and p == float(pressure)
        and n >= 2
        and all(a.dtype == np.float64 for a in (nodes, logs, c))
        and logs.shape == (n, logs.shape[1] if logs.ndim == 2 else -1)
        and c.shape == (4, n - 1, logs.shape[1])
    )
    if not consistent:
        return None
    return nodes, logs, c


def save(fluid: str, pressure: float, arrays: Arrays) -> None:
    """Keep a table's arrays on disk for later runs; silently nothing when that is not possible."""
    from compromise.outfiles import atomic_output

    folder = _folder()
    if folder is None:
        return
    buffer = io.BytesIO()
    np.savez(
        buffer,
        fluid=np.array(fluid),
        pressure=np.array(float(pressure)),
        nodes=arrays[0],
        log_values=arrays[1],
        spline_c=arrays[2],
    )
    with (
        contextlib.suppress(OSError),
        atomic_output(_path(folder, fluid, pressure), binary=True) as fh,
    ):
        fh.write(buffer.getvalue())


def clear() -> None:
    """Remove this version's cached tables and states (tests and benchmarks measure a cold
    start)."""
    folder = _folder()
    if folder is None:
        return
    for path in [*folder.glob("*.npz"), *folder.glob("*.json")]:
        with contextlib.suppress(OSError):
            os.unlink(path)
    _STORES.clear()


# ------------------------------------------------------------------------ source-model states
_MAX_STATES = 20000  # states kept per fluid file (a memo: past this it starts again)


def _hex(value: float) -> str:
    return float(value).hex()


def _num(text: Any) -> float:
    if not isinstance(text, str):
        raise ValueError(text)
    return float.fromhex(text)


class _Store:
    """One fluid's remembered states and limits, as read from its file plus what was added."""

    def __init__(self, path: Path, fluid: str) -> None:
        self.path, self.fluid = path, fluid
        self.states: dict[str, Values] = {}
        self.bounds: dict[str, Bounds] = {}
        self.added = False
        self._merge(self._read())

    def _read(self) -> dict[str, Any]:
        try:
            data = json.loads(self.path.read_text(encoding="utf-8"))
        except (OSError, ValueError):
            return {}
        ok = isinstance(data, dict) and data.get("fluid") == self.fluid
        return data if ok and data.get("format") == _FORMAT else {}

    def _merge(self, data: dict[str, Any]) -> None:
        """Take the well-formed entries of a file's ``data`` (a damaged entry is skipped)."""
        states, bounds = data.get("states"), data.get("bounds")
        for key, row in (states if isinstance(states, dict) else {}).items():
            with contextlib.suppress(TypeError, ValueError):
                if len(row) == 5 and key not in self.states:
                    *four, vp = row
                    values = (*(_num(v) for v in four), None if vp is None else _num(vp))
                    self.states[key] = values  # type: ignore[assignment]
        for key, pair in (bounds if isinstance(bounds, dict) else {}).items():
            with contextlib.suppress(TypeError, ValueError):
                lows, highs = pair
                if key not in self.bounds:
                    self.bounds[key] = (
                        [(_num(t), str(why)) for t, why in lows],
                        [(_num(t), str(why)) for t, why in highs],
                    )

    def write(self) -> None:
        """Merge with the file as it is now (a concurrent run may have added to it), write."""
        from compromise.outfiles import atomic_output

        self._merge(self._read())
        data = {
            "format": _FORMAT,
            "fluid": self.fluid,
            "states": {
                k: [*(_hex(v) for v in row[:4]), None if row[4] is None else _hex(row[4])]
                for k, row in sorted(self.states.items())
            },
            "bounds": {
                k: [[[_hex(t), why] for t, why in side] for side in b]
                for k, b in sorted(self.bounds.items())
            },
        }
        with contextlib.suppress(OSError), atomic_output(self.path) as fh:
            fh.write(json.dumps(data, separators=(",", ":")))
        self.added = False


_STORES: dict[tuple[Path, str], _Store] = {}
_AT_EXIT: list[bool] = []  # whether :func:`flush` is registered to run at exit


def _store(fluid: str) -> _Store | None:
    folder = _folder()
    if folder is None:
        return None
    found = _STORES.get((folder, fluid))
    if found is None:
        if not _AT_EXIT:
            atexit.register(flush)
            _AT_EXIT.append(True)
        name = hashlib.sha256(f"{fluid}|states".encode()).hexdigest()[:20]
        found = _STORES[(folder, fluid)] = _Store(folder / f"{name}.json", fluid)
    return found


def load_state(fluid: str, temperature: float, pressure: float) -> Values | None:
    """The remembered source-model values of ``fluid`` at (``temperature``, ``pressure``)."""
    store = _store(fluid)
    return None if store is None else store.states.get(f"{_hex(temperature)} {_hex(pressure)}")


def save_state(fluid: str, temperature: float, pressure: float, values: Values) -> None:
    """Remember a state's values (written at exit, or by :func:`flush`)."""
    store = _store(fluid)
    exact = all(type(v) is float for v in values[:4]) and type(values[4]) in (float, type(None))
    if store is None or not exact:
        return
    if len(store.states) >= _MAX_STATES:
        store.states.clear()
    store.states[f"{_hex(temperature)} {_hex(pressure)}"] = values
    store.added = True


def load_bounds(fluid: str, pressure: float) -> Bounds | None:
    """The remembered temperature limits of ``fluid`` at ``pressure`` (copies), or None."""
    store = _store(fluid)
    found = None if store is None else store.bounds.get(_hex(pressure))
    return None if found is None else (list(found[0]), list(found[1]))


def save_bounds(fluid: str, pressure: float, bounds: Bounds) -> None:
    """Remember a fluid's temperature limits at one pressure (finite or infinite floats)."""
    store = _store(fluid)
    ok = all(type(t) is float and not math.isnan(t) for side in bounds for t, _ in side)
    if store is None or not ok:
        return
    store.bounds[_hex(pressure)] = (list(bounds[0]), list(bounds[1]))
    store.added = True


def flush() -> None:
    """Write every store that gained entries (registered to run at exit)."""
    for store in _STORES.values():
        if store.added:
            store.write()
