"""Non-negative least squares (the binding limits' multipliers) without scipy.optimize's import.

``scipy.optimize.nnls`` is a thin wrapper around a compiled routine (Lawson & Hanson's active
set method); importing ``scipy.optimize`` to reach it loads the whole package (linear
programming, fft, special functions, ...), about half a second, more than the rest of a
``solve``. :func:`nnls` loads only the compiled module and calls it exactly as the wrapper
does, so the numbers are scipy's own, bit for bit. It does so only where the installed
wrapper is the one mirrored here (its source is read and compared); any other scipy, or any
failure to load the module, takes the public ``scipy.optimize.nnls``.
"""

from __future__ import annotations

import importlib.machinery
import importlib.util
import sys
from functools import lru_cache
from pathlib import Path
from typing import Any

import numpy as np

_MODULE = "scipy.optimize._slsqplib"
#: the lines of scipy's wrapper (scipy/optimize/_nnls.py) that :func:`nnls` reproduces
_WRAPPER = (
    "from ._slsqplib import nnls as _nnls",
    "A = np.asarray_chkfinite(A, dtype=np.float64, order='C')",
    "b = np.asarray_chkfinite(b, dtype=np.float64)",
    "maxiter = 3*n",
    "x, rnorm, info = _nnls(A, b, maxiter)",
    'raise RuntimeError("Maximum number of iterations reached.")',
)


@lru_cache(maxsize=1)
def _compiled() -> Any:
    """scipy's compiled ``nnls`` when the installed wrapper is the mirrored one, else None."""
    try:
        spec = importlib.util.find_spec("scipy")
        if spec is None or spec.origin is None:
            return None
        folder = Path(spec.origin).parent / "optimize"
        source = (folder / "_nnls.py").read_text(encoding="utf-8")
        if not all(line in source for line in _WRAPPER):
            return None
        module = sys.modules.get(_MODULE)
        if module is None:
            paths = [
                folder / f"_slsqplib{suffix}"
                for suffix in importlib.machinery.EXTENSION_SUFFIXES
                if (folder / f"_slsqplib{suffix}").exists()
            ]
            if not paths:
                return None
            loader = importlib.machinery.ExtensionFileLoader(_MODULE, str(paths[0]))
            found = importlib.util.spec_from_file_location(_MODULE, paths[0], loader=loader)
            if found is None:
                return None
            module = importlib.util.module_from_spec(found)
            loader.exec_module(module)
        return module.nnls
    except (ImportError, OSError, AttributeError):
        return None


def nnls(A: np.ndarray, b: np.ndarray) -> tuple[np.ndarray, float]:
    """``scipy.optimize.nnls(A, b)``: argmin ``||A x - b||`` over ``x >= 0``, and the residual.

    The same compiled routine with the same arguments as scipy's wrapper (at most ``3 n``
    iterations), so the same bits.

    References
    ----------
    Lawson, C. L. & Hanson, R. J. (1995). *Solving Least Squares Problems*, SIAM, ch. 23
    (the NNLS algorithm), as implemented by scipy.
    """
    compiled = _compiled()
    if compiled is None:
        from scipy.optimize import nnls as public

        x, rnorm = public(A, b)
        return x, float(rnorm)
    A = np.asarray_chkfinite(A, dtype=np.float64, order="C")
    b = np.asarray_chkfinite(b, dtype=np.float64)
    if A.ndim != 2 or b.ndim != 1 or A.shape[0] != b.shape[0]:
        raise ValueError(f"nnls: shapes {A.shape} and {b.shape} do not match")
    x, rnorm, info = compiled(A, b, 3 * A.shape[1])
    if info == 3:
        raise RuntimeError("Maximum number of iterations reached.")
    return x, float(rnorm)
