"""The test of one solution in both samples when the fit to the two samples pooled does not converge (complete rows,
normal-theory ML: the closed form of workflows.replication's docstring).  pooled_chi_square read the fit's df before
anything checked that it converged, so replicate stopped with an internal error (AttributeError: the unconverged fit
has no fit indices).  Its caller reports a two-sample fit that does not converge as the test not computed, with the
fit's own message, as it does for the full-information two-sample fit: the two samples' own fits stand.

Data: simulated with a fixed seed, two samples of 200 rows with different structures (some loadings of the second
sample of opposite sign and near zero), whose pooled covariance matrix the two-factor model cannot reproduce: its
search lets a factor's variance grow without end (found by trying seeds; the two samples' own fits converge)."""

from __future__ import annotations

import json
import math

import numpy as np
import pandas as pd

from cfa_tool.data.moments import sample_moments
from cfa_tool.language.parser import parse_model
from cfa_tool.pipeline.continuous import FitOptions, fit_moments
from cfa_tool.workflows import replication as R
from tests.conftest import run_cli

MODEL = "factor comfort: q1, q2, q3\nfactor speed: q4, q5, q6\n"
NAMES = tuple(f"q{k}" for k in range(1, 7))


def _sample(rng, n: int, loadings, correlation: float) -> pd.DataFrame:
    factors = rng.normal(size=(n, 2)) @ np.linalg.cholesky([[1.0, correlation], [correlation, 1.0]]).T
    L = np.zeros((6, 2))
    L[:3, 0], L[3:, 1] = loadings[:3], loadings[3:]
    return pd.DataFrame(factors @ L.T + 0.7 * rng.normal(size=(n, 6)), columns=NAMES).round(4)


def _samples() -> tuple[pd.DataFrame, pd.DataFrame]:
    rng = np.random.default_rng(0)
    return (_sample(rng, 200, [1, .8, .7, 1, .8, .7], .3), _sample(rng, 200, [1, -.6, .2, .3, .9, -.8], -.4))


def test_a_pooled_fit_that_does_not_converge_gives_no_chi_square_and_reads_no_fit_index():
    spec = parse_model(MODEL)
    first, second = (sample_moments(frame, NAMES, name) for frame, name in zip(_samples(), ("first", "second")))
    assert all(fit_moments(spec, m, FitOptions()).converged for m in (first, second))
    chi, df, pooled = R.pooled_chi_square(spec, (first, second), FitOptions(diagnostics=False))
    assert not pooled.converged and pooled.fit is None
    assert math.isnan(chi) and df is None


def test_replicate_says_the_test_of_one_solution_was_not_computed_and_why(tmp_path, capsys):
    model, calibration, validation = tmp_path / "m.cfa", tmp_path / "a.csv", tmp_path / "b.csv"
    model.write_text(MODEL)
    for frame, path in zip(_samples(), (calibration, validation)):
        frame.to_csv(path, index=False)
    code, out, err = run_cli(["replicate", model, "--calibration", calibration, "--validation", validation,
                              "--json", tmp_path / "r.json"], capsys)
    assert code == 0 and "internal error" not in err
    text = " ".join(out.split())
    assert "one solution for both samples was not tested: the model did not converge in the two samples pooled (no " \
           "convergence within the limit of 500 iterations" in text
    [replication] = json.loads((tmp_path / "r.json").read_text())["replications"]
    test = replication["same_solution_test"]
    assert test["p_value"] is None and test["chi_square_difference"] is None
    assert test["not_computed"].startswith("the model did not converge in the two samples pooled")
