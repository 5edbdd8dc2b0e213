"""BLAS threads for small problems: one thread is faster than several when the matrices are too
small to share out (a factor model of a few dozen items), and on a machine that other programs keep
busy, several threads per process take turns with them and slow every one down (a 120-item fit took
seconds instead of a tenth of a second with two threads on this two-core machine under load).

Where threads are set (one rule, so that they never oversubscribe the cores):

* a fit (its data moments, estimation and report) of up to :data:`SMALL_MODEL` items runs with one BLAS thread;
* worker processes of bootstraps, cutoffs and power simulations (``workflows.parallel``) run with one
  thread each, the parallelism being across processes (:func:`one_blas_thread_from_now`, with the libraries
  the parent process found: a forked worker does not search for them again), and so does the parent process
  while it computes its share beside them (:func:`one_blas_thread`).
"""

from __future__ import annotations

import contextlib
from functools import lru_cache

SMALL_MODEL = 250  # indicators; up to this one BLAS thread is never much slower than several and never oversubscribes


def blas_threads_for(p: int):
    """A context with one BLAS thread for problems of ``p`` variables up to :data:`SMALL_MODEL`
    (nothing changes for larger ones)."""
    if p > SMALL_MODEL:
        return contextlib.nullcontext()
    return _OneBlasThread(blas_libraries())


def one_blas_thread():
    """A context in which this process's BLAS libraries run one thread (a parent process computing beside its
    worker processes), back to their numbers after it."""
    return _OneBlasThread(blas_libraries())


def one_blas_thread_from_now() -> None:
    """This process's BLAS libraries run one thread from now on (a worker process of many fits)."""
    for lib in blas_libraries():
        if lib.num_threads != 1:
            lib.set_num_threads(1)


class _OneBlasThread:
    """BLAS libraries run one thread inside the context and return to their numbers after it
    (threadpoolctl's own limiter does the same with more bookkeeping, noticeable on a 1 ms fit)."""

    def __init__(self, libraries: tuple) -> None:
        self.libraries = libraries
        self.previous: list[int] = []

    def __enter__(self) -> None:
        self.previous = [lib.num_threads for lib in self.libraries]
        for lib, n in zip(self.libraries, self.previous):
            if n != 1:
                lib.set_num_threads(1)

    def __exit__(self, *exc) -> None:
        for lib, n in zip(self.libraries, self.previous):
            if n != 1:
                lib.set_num_threads(n)


def blas_libraries() -> tuple:
    """The BLAS libraries loaded in this process (threadpoolctl finds them, once: the search reads every
    loaded library and costs milliseconds).  numpy is imported first: its BLAS is the one the fits use, and a
    search made before it is loaded would find none and be kept, leaving every later limit without effect.
    scipy's wheels bring their own BLAS, loaded with scipy.linalg: a search made before that is made again once
    it is loaded, or that library would keep its threads (in worker processes too)."""
    import sys

    import numpy  # noqa: F401

    return _found_libraries("scipy.linalg" in sys.modules)


@lru_cache(maxsize=2)
def _found_libraries(with_scipy: bool) -> tuple:
    from threadpoolctl import ThreadpoolController

    return tuple(lib for lib in ThreadpoolController().lib_controllers if lib.user_api == "blas")
