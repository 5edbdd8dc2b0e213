"""Run many independent replications: in local processes by default, or on a Dask
cluster when a scheduler address is given.  Each task carries its own seed, so
results do not depend on where or in which order tasks run.

With ``workers`` processes, this process is one of them: it starts ``workers - 1`` worker processes, which take
the batches of tasks from the front of the list, and computes batches from the back itself until the two meet
(a batch not yet handed to a worker is taken back), so that no process waits while another has batches left, and
one worker process fewer is started (a bootstrap of 1,000 resamples of a small model is two batches: one for
this process, one for its worker)."""

from __future__ import annotations

import contextlib
import gc
import os
import signal
from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait
from functools import partial
from typing import Callable, Sequence

from cfa_tool import options as check
from cfa_tool.errors import OptionError
from cfa_tool.numerics.threads import blas_libraries, one_blas_thread, one_blas_thread_from_now


REFITS_TOGETHER = 500  # replications a workflow fits together (pipeline.continuous.replicate_fits): enough to
# spread each stacked iteration's fixed cost and the few slow replications' last iterations (each batch waits for
# its slowest), and 1,000 resamples are one batch for each of two processes
STACK_BYTES = 64 * 2**20  # the most one (R, q, q) array of R replications' q x q matrices may take


def refits_together(most: int, free: int) -> int:
    """How many replications of a model of ``free`` parameters to fit together: ``most``, fewer when their
    (R, q, q) information matrices would take more than :data:`STACK_BYTES` (a model of a hundred items)."""
    return max(1, min(most, STACK_BYTES // (8 * max(free, 1) ** 2)))


def default_workers() -> int:
    return max(1, len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else (os.cpu_count() or 1))


def run_tasks(fn: Callable, tasks: Sequence, workers: int | None = None, scheduler: str | None = None,
              progress: Callable[..., None] | None = None, chunk: int = 25, batched: bool = False) -> list:
    """fn(task) for every task, results in task order; with ``batched``, fn(list of up to ``chunk`` tasks)
    gives the list of their results (a function that computes several tasks together).  ``progress(0,
    more=n)`` announces the n tasks before they start (a workflow may run several batches), and
    ``progress(k)`` is called as tasks finish."""
    workers = check.workers(workers, scheduler)
    progress = _progress_function(progress)
    if progress:
        progress(0, more=len(tasks))
    batches = [list(tasks[i : i + chunk]) for i in range(0, len(tasks), chunk)]
    if scheduler:
        if batched:
            return _run_on_cluster(fn, batches, scheduler, progress, batched=True)
        return _run_on_cluster(fn, tasks, scheduler, progress)
    workers = default_workers() if workers is None else workers
    if workers <= 1 or len(tasks) <= chunk:
        out = []
        for batch in (batches if batched else [[task] for task in tasks]):
            out.extend(fn(batch) if batched else [fn(batch[0])])
            if progress:
                progress(len(batch))
        return out
    return _run_locally(fn if batched else partial(_run_batch, fn), batches, workers, progress)


def _run_locally(fn: Callable, batches: list[list], workers: int, progress) -> list:
    """fn(batch) of every batch (each a list of results), joined in order, on this process and ``workers - 1``
    worker processes: the workers take batches from the front, this process from the back (taking back a batch
    the pool has not yet handed to a worker), all with one BLAS thread.  ``progress`` is called from this thread
    only, as this process finishes a batch and as it collects the workers'."""
    results: list = [None] * len(batches)
    blas_libraries()  # found here once: forked workers inherit the list (numerics.threads)
    finished = False
    # BLAS set before the workers are forked: they start with one thread and set nothing
    with _objects_frozen(), one_blas_thread():
        # no more workers than batches they could take (a pool forks all its processes at the first batch)
        pool = ProcessPoolExecutor(max_workers=min(workers - 1, len(batches) - 1), initializer=_worker_start)
        try:
            pending = {pool.submit(fn, batch): k for k, batch in enumerate(batches[:-1])}
            reported = set()

            def report(done) -> None:
                for future in done:
                    if future not in reported:
                        reported.add(future)
                        results[pending[future]] = future.result()  # a worker's error is raised here
                        if progress:
                            progress(len(results[pending[future]]))

            mine = len(batches) - 1
            while True:
                results[mine] = fn(batches[mine])
                if progress:
                    progress(len(results[mine]))
                report([f for f in pending if f.done()])
                taken = next((f for f, k in pending.items() if k == mine - 1), None)
                if taken is None or not taken.cancel():  # the workers have it (or have done it)
                    break
                del pending[taken]
                mine -= 1
            left = set(pending) - reported
            while left:
                done, left = wait(left, return_when=FIRST_COMPLETED)
                report(done)
            finished = True
        finally:
            # with every result in hand, the workers exit while this process goes on (the pool's own thread
            # joins them); after an error or a stop (Ctrl-C, or a termination signal sent to this process alone,
            # as 'timeout', a batch scheduler's time limit and 'kill' send it), the batches not started are
            # dropped and the running ones stopped, so that no worker is left behind running or asleep
            if not finished:
                _stop_workers(pool)
            pool.shutdown(wait=not finished, cancel_futures=True)
    return [r for batch in results for r in batch]


def _worker_start() -> None:
    """A worker process's start: one BLAS thread, and a termination signal ends it at once (the default), whatever
    the command line set for its own process (cli.program turns it into a stop that cleans up)."""
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    one_blas_thread_from_now()


def _stop_workers(pool: ProcessPoolExecutor) -> None:
    """End the pool's worker processes now (a stopped run waits for none of their batches).  The standard library
    gives no public way before Python 3.14 (Executor.terminate_workers); its table of processes is used."""
    for process in list((getattr(pool, "_processes", None) or {}).values()):
        with contextlib.suppress(Exception):
            process.terminate()


@contextlib.contextmanager
def _objects_frozen():
    """This process's objects frozen (gc.freeze) while a pool's workers are forked and run, unfrozen after: a
    collection in a forked worker would otherwise touch every object it inherited and copy their memory pages (the
    fork's copy-on-write; Python's gc documentation, gc.freeze), measured at 0.17 s of a 0.31 s bootstrap of case 1
    once a collection fell in the worker (lead, s14: 0.14 s with the freeze)."""
    gc.freeze()
    try:
        yield
    finally:
        gc.unfreeze()


def _progress_function(progress):
    """``progress`` as a function of (done, more=0): one that takes only the count done gets no
    announcements of how many tasks are coming."""
    if progress is None:
        return None
    if not callable(progress):
        raise OptionError(f"progress must be a function called with the number of tasks done, not "
                          f"{type(progress).__name__}")
    import inspect

    try:
        parameters = inspect.signature(progress).parameters
    except (TypeError, ValueError):
        return progress
    if "more" in parameters or any(p.kind is p.VAR_KEYWORD for p in parameters.values()):
        return progress
    return lambda done, more=0: progress(done) if done else None


def _run_batch(fn: Callable, batch: list) -> list:
    return [fn(task) for task in batch]


def _run_on_cluster(fn: Callable, tasks: Sequence, address: str, progress, batched: bool = False) -> list:
    """fn of every task on the cluster; with ``batched``, ``tasks`` are batches and their results are joined."""
    try:
        from dask.distributed import Client, as_completed
    except ImportError:
        raise OptionError("running on a cluster needs the dask.distributed package (pip install 'cfa-tool[cluster]')") from None
    try:
        client = Client(address, timeout=10)
    except Exception as exc:  # connection errors come in many types
        raise OptionError(f"cannot reach the cluster scheduler at {address} ({type(exc).__name__})") from None
    try:
        futures = client.map(fn, list(tasks), pure=False)
        if progress:
            for future in as_completed(futures):
                progress(len(future.result()) if batched else 1)
        results = client.gather(futures)
        return [r for batch in results for r in batch] if batched else results
    finally:
        client.close()
