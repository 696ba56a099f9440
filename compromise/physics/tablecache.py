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
"""

from __future__ import annotations

import contextlib
import hashlib
import importlib.util
import io
import os
from functools import lru_cache
from pathlib import Path

import numpy as np

from compromise.units import cache_folder

#: A table's arrays: nodes (n,), log-values (n, k) and scipy's coefficients (4, n - 1, k).
Arrays = tuple[np.ndarray, np.ndarray, np.ndarray]

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
    """Remove this version's cached tables (tests and benchmarks measure a cold start)."""
    folder = _folder()
    if folder is None:
        return
    for path in folder.glob("*.npz"):
        with contextlib.suppress(OSError):
            os.unlink(path)
