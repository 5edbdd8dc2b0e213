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
import os
import sys
import threading
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
    global _worker
    _worker = True
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


_worker = False  # set in worker processes of many fits (one_blas_thread_from_now): no thread beside the fit there
FORCE_SIDE_THREAD = False  # bench only: the guards' load test skipped, to time side by side whatever the load


def side_thread_allowed() -> bool:
    """Whether a piece of a fit may run in a second thread beside the caller's without oversubscribing the cores
    (round 12's guards): at least two cores, the load average of the last minute below the cores less one half (the
    caller's own fit counts about one), the BLAS libraries at one thread (inside :func:`blas_threads_for`), the caller
    the program's main thread (a program running fits from threads of its own has shared the cores out itself), and
    the process no worker of many fits (those are as many as the cores)."""
    if (_worker or threading.current_thread() is not threading.main_thread()
            or ("multiprocessing" in sys.modules and sys.modules["multiprocessing"].parent_process() is not None)):
        return False
    try:
        cores = len(os.sched_getaffinity(0))
    except AttributeError:  # no affinity outside Linux
        cores = os.cpu_count() or 1
    try:
        idle = cores >= 2 and (FORCE_SIDE_THREAD or os.getloadavg()[0] < cores - 0.5)
    except (AttributeError, OSError):  # no load average (Windows): the load cannot be judged
        idle = False
    return idle and all(lib.num_threads == 1 for lib in blas_libraries())


class Beside:
    """``function(*args)`` run in a thread of its own, started now (with the caller's context: numpy's error settings
    among it) and joined by :meth:`result`, which returns its value or raises its exception.  A thread per piece, not
    a pool: no thread outlives the fit (a process forking workers later has none)."""

    def __init__(self, function, *args) -> None:
        import contextvars

        self._value = self._error = None
        context = contextvars.copy_context()
        self._thread = threading.Thread(target=context.run, args=(self._run, function, args), daemon=True,
                                        name="cfa-tool-beside")
        self._thread.start()

    def _run(self, function, args) -> None:
        try:
            self._value = function(*args)
        except BaseException as error:  # raised in the caller's thread by result()
            self._error = error

    def result(self):
        self._thread.join()
        if self._error is not None:
            raise self._error
        return self._value
