"""The binding limits' multipliers: non-negative least squares without scipy.optimize's import.

Oracle: ``scipy.optimize.nnls`` (Lawson & Hanson 1995, ch. 23, as implemented by scipy), which
:func:`compromise.solving.lsq.nnls` must reproduce bit for bit.
"""

from __future__ import annotations

import numpy as np
import pytest

from compromise.solving import lsq


def test_lawson_hanson_1995_small_example() -> None:
    # Two equations pull x1 toward 2 and 1 (least squares: 1.5), one pulls x2 toward 1; with
    # b negative the non-negativity binds and x = 0 (worked by hand, common practice).
    A = np.array([[1.0, 0.0], [1.0, 0.0], [0.0, 1.0]])
    x, r = lsq.nnls(A, np.array([2.0, 1.0, 1.0]))
    assert x == pytest.approx([1.5, 1.0], rel=1e-15)
    assert r == pytest.approx(np.sqrt(0.5), rel=1e-15)
    x, r = lsq.nnls(A, np.array([-1.0, -1.0, -1.0]))
    assert x.tolist() == [0.0, 0.0]
    assert r == pytest.approx(np.sqrt(3.0), rel=1e-15)


def test_same_bits_as_scipy_optimize_nnls() -> None:
    from scipy.optimize import nnls

    rng = np.random.default_rng(7)
    for m, n in [(3, 2), (6, 9), (12, 5), (20, 20)]:
        for _ in range(20):
            A = rng.standard_normal((m, n))
            b = rng.standard_normal(m)
            x, r = lsq.nnls(A, b)
            x0, r0 = nnls(A, b)
            assert x.tobytes() == np.asarray(x0).tobytes()
            assert r == r0


def test_the_compiled_routine_is_found_or_scipy_is_used(monkeypatch: pytest.MonkeyPatch) -> None:
    # Either way the answer is scipy's: with the fast path refused, the public function runs.
    A = np.array([[2.0, 1.0], [1.0, 3.0], [0.5, 0.5]])
    b = np.array([1.0, -2.0, 0.3])
    fast = lsq.nnls(A, b)
    monkeypatch.setattr(lsq, "_compiled", lambda: None)
    slow = lsq.nnls(A, b)
    assert fast[0].tobytes() == slow[0].tobytes() and fast[1] == slow[1]


def test_grid_linspace_is_numpy_linspace_bit_for_bit() -> None:
    # Oracle: numpy.linspace; the solver's copy skips its dispatch and must give the same bits
    # (the zoom grids of both searches use it).
    from compromise.solving.grid import linspace

    rng = np.random.default_rng(11)
    for _ in range(500):
        a, b = sorted(rng.uniform(200.0, 400.0, 2))
        num = int(rng.integers(2, 60))
        assert linspace(a, b, num).tobytes() == np.linspace(a, b, num).tobytes()
    assert linspace(1.0, 1.0, 33).tobytes() == np.linspace(1.0, 1.0, 33).tobytes()
