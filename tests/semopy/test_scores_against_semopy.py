"""Regression factor scores against semopy's factor predictions (an independent implementation).

semopy's ``Model.predict_factors`` computes (Lambda' Theta^-1 Lambda + Phi^-1)^-1 Lambda' Theta^-1 x
from uncentred rows and then subtracts the scores' sample means (``center=True``, its default).  By
the Woodbury identity that is Phi Lambda' Sigma^-1 (x - mean of x), which is our regression score of
a model without a mean structure: intercepts at the sample means (the ML estimate of a saturated
mean), factor means 0.  So the two compare directly, no conversion needed.  Both programs are fitted
to the same data (semopy with solver="trust-constr", as DEVELOPERS.md prescribes).
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from cfa_tool.pipeline.continuous import FitOptions, estimate
from cfa_tool.scoring.linear import score_rows
from cfa_tool.scoring.methods import ScoreMethod
from cfa_tool.scoring.model import score_inputs
from tests.conftest import THREE_FACTORS, single_group
from tests.commands.test_scores_command import FACTORS, HS_FILE, _run, model_file  # noqa: F401 (a fixture)

semopy = pytest.importorskip("semopy", reason="the comparisons with semopy need semopy (pip install '.[test]')")


def test_regression_scores_equal_semopy_predictions_on_holzinger_swineford(hs_data):
    import semopy

    spec, moments = single_group(THREE_FACTORS, hs_data)
    groups = [(None, moments)]
    (model,) = score_inputs(estimate(spec, groups, FitOptions(missing="listwise")), groups)
    ours = score_rows(model, hs_data[list(model.items)].to_numpy(float))[ScoreMethod.REGRESSION].scores

    theirs = semopy.Model("visual =~ x1 + x2 + x3\ntextual =~ x4 + x5 + x6\nspeed =~ x7 + x8 + x9")
    theirs.fit(hs_data, solver="trust-constr")
    predicted = theirs.predict_factors(hs_data)[list(model.factors)].to_numpy()
    # tolerance from the issue (1e-6); the two optimisers stop within about 1e-7 of each other
    np.testing.assert_allclose(ours, predicted, rtol=0, atol=1e-6)


def test_regression_scores_written_by_the_command_equal_semopy_predictions(tmp_path, model_file, hs_data, capsys):
    import semopy

    out = tmp_path / "scores.csv"
    code, text, err = _run(["scores", model_file, "--data", HS_FILE, "--output", out], capsys)
    assert code == 0, err
    ours = pd.read_csv(out)
    theirs = semopy.Model("visual =~ x1 + x2 + x3\ntextual =~ x4 + x5 + x6\nspeed =~ x7 + x8 + x9")
    theirs.fit(hs_data, solver="trust-constr")
    predicted = theirs.predict_factors(hs_data)[FACTORS].to_numpy()
    columns = [f"{f}_regression" for f in FACTORS]
    np.testing.assert_allclose(ours[columns].to_numpy(), predicted, rtol=0, atol=1e-6)  # issue 16: 1e-6
    assert "Quality of the scores" in text and "Keyed sum scores" in text
