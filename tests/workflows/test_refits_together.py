"""Workflows that refit one model many times fit their replications together (pipeline.continuous.replicate_fits):
what they report for a seed must not depend on how many replications share a batch or on the worker processes."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool.workflows.bootstrap as bootstrap_module
import cfa_tool.workflows.cutoffs as cutoffs_module
import cfa_tool.workflows.montecarlo as montecarlo_module
from cfa_tool.language import parse_model
from tests.conftest import THREE_FACTORS

POPULATION = """
factor f: y1, y2, y3, y4
factor g: y5, y6, y7, y8
"""


def _runs(monkeypatch, module, run):
    """The workflow's result with the default batches in one process, small batches in one process and
    small batches on two worker processes."""
    out = [run(1)]
    monkeypatch.setattr(module, "REFITS_TOGETHER", 7)
    out += [run(1), run(2)]
    return out


def test_bootstrap_does_not_depend_on_batches_or_workers(monkeypatch, hs_data):
    results = _runs(monkeypatch, bootstrap_module, lambda workers: bootstrap_module.bootstrap(
        THREE_FACTORS, hs_data, replications=30, seed=8, workers=workers).to_dict()["result"])
    assert results[0]["converged"] == 30
    assert results[0] == results[1] == results[2]


def test_power_curve_does_not_depend_on_batches_or_workers(monkeypatch):
    spec = parse_model(POPULATION)
    results = _runs(monkeypatch, montecarlo_module, lambda workers: montecarlo_module.monte_carlo_power(
        spec, "60,150", replications=20, seed=3, workers=workers).to_dict())
    assert results[0]["converged"] == [20, 20]
    assert results[0] == results[1] == results[2]


def test_cutoffs_do_not_depend_on_batches_or_workers(monkeypatch, hs_data):
    results = _runs(monkeypatch, cutoffs_module, lambda workers: cutoffs_module.cutoffs(
        THREE_FACTORS, hs_data, replications=20, seed=2, workers=workers).to_dict()["result"])
    assert results[0] == results[1] == results[2]


def test_power_simulation_counts_what_one_fit_at_a_time_counts(monkeypatch):
    """Small samples: replications that fail in the stacked search are refitted alone, so the count of
    converged replications and every summary equal those of one fit at a time."""
    from cfa_tool.estimation import stacked  # imported by replicate_fits when it runs

    spec = parse_model(POPULATION)
    together = montecarlo_module.monte_carlo_power(spec, 25, replications=40, seed=12, workers=1)
    monkeypatch.setattr(stacked, "stackable", lambda model: False)
    alone = montecarlo_module.monte_carlo_power(spec, 25, replications=40, seed=12, workers=1)
    assert together.converged == alone.converged < 40  # the case has failures to count
    for a, b in zip(together.parameters, alone.parameters):
        for name in ("mean_estimate", "sd_estimate", "mean_se", "coverage", "power"):
            assert getattr(a, name) == pytest.approx(getattr(b, name), rel=1e-7, abs=1e-9), (a.label, name)


def _blas_threads(_task) -> list[int]:
    from threadpoolctl import threadpool_info

    return [lib["num_threads"] for lib in threadpool_info() if lib["user_api"] == "blas"]


def test_worker_processes_compute_with_one_blas_thread_each():
    """The parallelism is across processes (numerics.threads): each worker's BLAS runs one thread, read back by
    threadpoolctl's own report, whatever the parent runs with."""
    from cfa_tool.workflows.parallel import run_tasks

    counts = run_tasks(_blas_threads, list(range(4)), workers=2, chunk=1)
    assert counts and all(c == [1] * len(c) and c for c in counts)


def test_the_blas_libraries_are_found_when_first_asked_for_before_numpy_is_loaded():
    """numerics.threads keeps the BLAS libraries it finds for the life of the process: asked for before numpy is
    imported (a script that imports only the tool and runs a workflow), it must still find numpy's BLAS, or no
    limit set later would apply.  Checked in a fresh process against threadpoolctl's own report once numpy is loaded."""
    import subprocess
    import sys
    from pathlib import Path

    code = ("import sys\nfrom cfa_tool.numerics.threads import blas_libraries\nbefore = 'numpy' in sys.modules\n"
            "found = len(blas_libraries())\nfrom threadpoolctl import threadpool_info\n"
            "print(before, found, sum(lib['user_api'] == 'blas' for lib in threadpool_info()))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True,
                         cwd=Path(__file__).resolve().parents[2]).stdout.split()
    assert out[0] == "False"  # the case: numpy not yet loaded when the libraries are first asked for
    assert int(out[1]) == int(out[2]) >= 1


def test_resampled_moments_computed_together_equal_each_resamples_own(hs_data):
    """The bootstrap's moments of complete rows, computed from the counts of each row's draws, against numpy's
    own mean and covariance (np.cov, divisor N) of the rows each seed draws."""
    names = tuple(f"x{i}" for i in range(1, 10))
    rows = hs_data[list(names)].to_numpy(float)
    seeds = [11, 12, 13, 14, 15]
    together = bootstrap_module.resampled_moments(rows, names, seeds)
    for seed, moments in zip(seeds, together):
        drawn = rows[np.random.default_rng(seed).integers(0, len(rows), len(rows))]
        np.testing.assert_allclose(moments.means, drawn.mean(axis=0), rtol=1e-13)
        np.testing.assert_allclose(moments.covariance, np.cov(drawn, rowvar=False, bias=True), rtol=1e-12, atol=1e-13)
        assert (moments.n_obs, moments.names) == (len(rows), names)
    # a resample's moments do not depend on the others computed with it
    alone = bootstrap_module.resampled_moments(rows, names, seeds[2:3])[0]
    assert np.array_equal(alone.covariance, together[2].covariance) and np.array_equal(alone.means, together[2].means)


def test_large_models_are_fitted_in_smaller_batches():
    """Replications fitted together keep each stacked (R, q, q) array within its budget: a questionnaire model takes
    the full batch, a 120-item model (about 300 free parameters) fewer replications at a time."""
    from cfa_tool.workflows.parallel import REFITS_TOGETHER, STACK_BYTES, refits_together

    assert refits_together(REFITS_TOGETHER, 21) == REFITS_TOGETHER
    large = refits_together(REFITS_TOGETHER, 306)
    assert 1 <= large < REFITS_TOGETHER and 8 * large * 306**2 <= STACK_BYTES < 8 * (large + 1) * 306**2
