"""The bootstrap report's first line counts the resamples that converged and those that did not; when every one
converged it says so, instead of '0 did not; those are left out of the intervals' (a sentence about nothing)."""
from __future__ import annotations

from dataclasses import replace

import numpy as np

import cfa_tool
from cfa_tool.reporting.workflow_tables import bootstrap_report
from tests.conftest import simulate_cfa

MODEL = "factor f1: y1, y2, y3\nfactor f2: y4, y5, y6\n"


def _boot():
    loadings = np.zeros((6, 2))
    loadings[:3, 0] = (0.8, 0.7, 0.6)
    loadings[3:, 1] = (0.75, 0.65, 0.7)
    phi = np.array([[1.0, 0.4], [0.4, 1.0]])
    data = simulate_cfa(loadings, phi, np.diag(1.0 - np.sum(loadings**2, axis=1)), 300, 11)
    return cfa_tool.bootstrap(MODEL, data, replications=20, seed=3)


def test_every_resample_converged_is_said_plainly():
    boot = _boot()
    assert boot.converged == boot.replications and boot.failed == 0
    first = bootstrap_report(boot).lines[0]
    assert first.endswith("every one converged.") and "did not" not in first and "left out" not in first


def test_resamples_that_did_not_converge_or_failed_are_counted_and_left_out():
    boot = _boot()
    some = replace(boot, converged=boot.replications - 3)
    first = bootstrap_report(some).lines[0]
    assert "17 converged, 3 did not; those are left out of the intervals." in first
    failed = replace(boot, converged=boot.replications - 2, failed=2)
    first = bootstrap_report(failed).lines[0]
    assert "18 converged, 2 could not be analysed (" in first and "did not" not in first
    assert first.endswith("; those are left out of the intervals.")
