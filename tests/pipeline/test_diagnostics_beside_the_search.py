"""The data-only part of the diagnostics (whitened rows, Mardia's tests) computed in a second thread while the search
runs (pipeline.continuous._data_only_beside, numerics.threads): the fit's JSON the same to the bit as computed in
turn; the thread given only where the guards allow one (two cores, an idle one, one BLAS thread, the main thread, no
worker of many fits), and a failure in it said by the fit as before.  Mardia's statistics themselves are checked
against their formulas elsewhere (tests/assessment); this checks that the route changes nothing."""

import json
import threading

import numpy as np
import pandas as pd
import pytest

import cfa_tool
import cfa_tool.numerics.threads as threads
from cfa_tool.pipeline import continuous


def _thirty_items(n: int = 400, seed: int = 3) -> tuple[str, pd.DataFrame]:
    """Invented answers: three factors of ten items each, loadings 0.7, N = 400 (a fixed seed)."""
    rng = np.random.default_rng(seed)
    traits = rng.multivariate_normal(np.zeros(3), 0.5 * np.eye(3) + 0.5, size=n)
    columns = {f"q{f * 10 + i + 1}": 0.7 * traits[:, f] + rng.normal(scale=0.7, size=n)
               for f in range(3) for i in range(10)}
    text = "".join(f"factor f{f + 1}: " + ", ".join(f"q{f * 10 + i + 1}" for i in range(10)) + "\n" for f in range(3))
    return text, pd.DataFrame(columns)


def test_beside_the_search_the_json_is_the_same_to_the_bit(monkeypatch):
    text, data = _thirty_items()
    monkeypatch.setattr(threads, "FORCE_SIDE_THREAD", False)
    monkeypatch.setattr(continuous, "side_thread_allowed", lambda: False)
    in_turn = json.dumps(cfa_tool.fit(text, data).to_dict())
    started = []
    real = continuous.Beside

    def counted(*args):
        started.append(threading.current_thread().name)
        return real(*args)

    monkeypatch.setattr(continuous, "side_thread_allowed", lambda: True)
    monkeypatch.setattr(continuous, "Beside", counted)
    beside = json.dumps(cfa_tool.fit(text, data).to_dict())
    assert started  # the side thread ran
    assert beside == in_turn
    assert json.loads(beside)["normality"]["skewness"] is not None


def test_the_guards_refuse_a_side_thread(monkeypatch):
    monkeypatch.setattr(threads, "FORCE_SIDE_THREAD", True)
    found = []
    worker = threading.Thread(target=lambda: found.append(threads.side_thread_allowed()))
    worker.start()
    worker.join()
    assert found == [False]  # not the program's main thread
    monkeypatch.setattr(threads, "_worker", True)
    assert not threads.side_thread_allowed()  # a worker process of many fits
    monkeypatch.setattr(threads, "_worker", False)
    monkeypatch.setattr(threads.os, "sched_getaffinity", lambda pid: {0}, raising=False)
    assert not threads.side_thread_allowed()  # one core
    monkeypatch.setattr(threads, "FORCE_SIDE_THREAD", False)
    monkeypatch.setattr(threads.os, "sched_getaffinity", lambda pid: {0, 1}, raising=False)
    monkeypatch.setattr(threads.os, "getloadavg", lambda: (1.6, 1.0, 1.0))
    assert not threads.side_thread_allowed()  # no idle core: load at least the cores less one half


def test_a_failure_beside_is_raised_where_the_fit_reads_it():
    def fails():
        raise np.linalg.LinAlgError("the covariance matrix of the rows is not positive definite")

    piece = threads.Beside(fails)
    with pytest.raises(np.linalg.LinAlgError):
        piece.result()
    assert threads.Beside(lambda a, b: a + b, 2, 3).result() == 5
