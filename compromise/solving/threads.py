"""One BLAS thread for the solver's small batched matrix products.

The products are a few thousand rows by a few columns: a second OpenBLAS thread saves no wall
time on an idle machine, costs 35-40 % more CPU, and on a busy one (threads spinning for a
core) makes a front or a map two to four times slower. :func:`one_blas_thread` limits BLAS to
one thread for the duration of a library call and restores the caller's setting after, with
threadpoolctl (a dependency; without it the call runs as it is). The command line also sets
``OPENBLAS_NUM_THREADS=1`` before numpy is imported (:mod:`compromise.cli`).

Single-threaded BLAS computes every element of a product with the same kernel as several
threads do (they split rows, not sums), so results are the same to the last bit.
"""

from __future__ import annotations

import contextlib
import functools
from collections.abc import Callable, Iterator
from typing import Any, TypeVar

F = TypeVar("F", bound=Callable[..., Any])

_CONTROLLER: list[Any] = []  # the threadpoolctl controller, made on first use (about 5 ms)


@contextlib.contextmanager
def blas_single_thread() -> Iterator[None]:
    """Run the body with one BLAS thread (nested uses are fine)."""
    if not _CONTROLLER:
        try:
            from threadpoolctl import ThreadpoolController

            _CONTROLLER.append(ThreadpoolController())
        except Exception:  # not installed, or no BLAS found: run as it is
            _CONTROLLER.append(None)
    controller = _CONTROLLER[0]
    if controller is None:
        yield
        return
    with controller.limit(limits=1, user_api="blas"):
        yield


def one_blas_thread(fn: F) -> F:
    """Decorator: ``fn`` runs under :func:`blas_single_thread`."""

    @functools.wraps(fn)
    def wrapper(*args: Any, **kwargs: Any) -> Any:
        with blas_single_thread():
            return fn(*args, **kwargs)

    return wrapper  # type: ignore[return-value]
