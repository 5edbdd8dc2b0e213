"""workflows.parallel.run_tasks with several processes: this process computes batches from the back of the list while
``workers - 1`` worker processes take them from the front.  What a workflow gets must not depend on that: every
result in task order, each batch computed once, errors raised as they were, progress counted to the total and
reported from this thread, BLAS at one thread in every process that computes and back to its setting after."""

from __future__ import annotations

import os
import threading

import pytest

from cfa_tool.workflows.parallel import run_tasks


def _square_with_pid(batch: list) -> list:
    return [(x * x, os.getpid()) for x in batch]


def _fails_on_seven(batch: list) -> list:
    if 7 in batch:
        raise ValueError("task seven")
    return list(batch)


@pytest.mark.parametrize("count, chunk", [(2, 1), (10, 3), (40, 4)])
def test_results_in_order_from_this_process_and_one_worker(count, chunk):
    out = run_tasks(_square_with_pid, list(range(count)), workers=2, chunk=chunk, batched=True)
    assert [value for value, _ in out] == [x * x for x in range(count)]  # each task once, in order
    pids = {pid for _, pid in out}
    assert os.getpid() in pids  # this process computed its share: the last batch at least
    assert out[-1][1] == os.getpid()
    assert len(pids) <= 2  # and one worker process, not two


def test_unbatched_tasks_too():
    out = run_tasks(abs, list(range(-30, 30)), workers=2, chunk=4)
    assert out == [abs(x) for x in range(-30, 30)]


@pytest.mark.parametrize("chunk", [1, 2, 8])  # task seven in this process's batches or in a worker's
def test_an_error_in_any_batch_is_raised_as_it_was(chunk):
    with pytest.raises(ValueError, match="task seven"):
        run_tasks(_fails_on_seven, list(range(9 if chunk == 8 else 20)), workers=2, chunk=chunk, batched=True)


def test_progress_counts_every_task_from_this_thread():
    calls = []

    def progress(done, more=0):
        calls.append((done, more, threading.current_thread() is threading.main_thread()))

    run_tasks(_square_with_pid, list(range(25)), workers=2, chunk=4, batched=True, progress=progress)
    assert calls[0] == (0, 25, True)
    assert sum(done for done, _, _ in calls) == 25 and all(main for _, _, main in calls)


def test_blas_threads_are_one_while_computing_and_restored_after():
    from threadpoolctl import threadpool_info, threadpool_limits

    from tests.workflows.test_refits_together import _blas_threads

    with threadpool_limits(2, user_api="blas"):  # this process set to two threads, as a session may be
        before = _blas_threads(None)
        counts = run_tasks(_blas_threads, list(range(6)), workers=2, chunk=1)
        after = [lib["num_threads"] for lib in threadpool_info() if lib["user_api"] == "blas"]
    assert before and all(n == 2 for n in before)
    assert all(c and all(n == 1 for n in c) for c in counts), counts  # this process's share and the worker's
    assert after == before


def test_no_more_worker_processes_than_batches_they_could_take(monkeypatch):
    # a pool forks all its processes at the first batch: with 4 processes asked for and 2 batches, this process takes
    # one and a single worker the other
    import cfa_tool.workflows.parallel as parallel

    sizes = []
    real = parallel.ProcessPoolExecutor

    def recording(max_workers, **kwargs):
        sizes.append(max_workers)
        return real(max_workers=max_workers, **kwargs)

    monkeypatch.setattr(parallel, "ProcessPoolExecutor", recording)
    out = run_tasks(_square_with_pid, list(range(10)), workers=4, chunk=5, batched=True)
    assert [value for value, _ in out] == [x * x for x in range(10)] and sizes == [1]
    run_tasks(_square_with_pid, list(range(40)), workers=4, chunk=5, batched=True)
    assert sizes == [1, 3]


def test_the_objects_are_unfrozen_after_the_pool():
    """The pool freezes this process's objects while its workers are forked and run (gc.freeze: a collection in a
    forked worker would copy every inherited page) and unfreezes them when it is done, also after an error."""
    import gc

    from cfa_tool.workflows.parallel import run_tasks

    before = gc.get_freeze_count()
    assert run_tasks(abs, list(range(-60, 0)), workers=2, chunk=10) == list(range(60, 0, -1))
    assert gc.get_freeze_count() == before
    with pytest.raises(ZeroDivisionError):
        run_tasks(_inverse, [1, 2, 0, 4] * 10, workers=2, chunk=5)
    assert gc.get_freeze_count() == before


def _inverse(x):
    return 1 / x
