"""``cfa-tool scores`` of ordinal items when a row gives the top answer to every item (new-user trial s23b, finding 5:
'internal error: LinAlgError: Matrix is not positive definite', exit 1 and no scores file for anyone, on a fresh fit
and with --from-fit alike).

The data are simulated here from a two-factor model of nine four-answer items (standardized loadings .80 to .88,
factor correlation .90, thresholds .3, 1.0 and 1.7: invented values like the trial's clinic), with one row answering
3 throughout and one 0 throughout.  Check values: every row has a finite score and a positive posterior SD; the top
row scores highest and the bottom row lowest on both factors (each factor's likelihood rises with every answer of
the normal-ogive graded model, whose category probabilities have a monotone likelihood ratio in the factor, and the
factors correlate positively: Milgrom 1981, recalled from memory).
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from cfa_tool.cli import main

MODEL = "factor somatic: d1..d4\nfactor cognitive: d5..d9\nordinal d1..d9\n"


def _data(path):
    rng = np.random.default_rng(2323)
    n = 400
    eta = rng.multivariate_normal([0.0, 0.0], [[1.0, 0.9], [0.9, 1.0]], size=n)
    loadings = np.array([0.80, 0.88, 0.82, 0.84, 0.85, 0.86, 0.83, 0.81, 0.80])
    factor = np.array([0, 0, 0, 0, 1, 1, 1, 1, 1])
    latent = eta[:, factor] * loadings + rng.normal(size=(n, 9)) * np.sqrt(1 - loadings**2)
    answers = np.searchsorted([0.3, 1.0, 1.7], latent)
    frame = pd.DataFrame(answers, columns=[f"d{j}" for j in range(1, 10)])
    frame.insert(0, "pid", [f"P{i:04d}" for i in range(n)])
    extremes = pd.DataFrame([["TOP"] + [3] * 9, ["BOTTOM"] + [0] * 9], columns=frame.columns)
    pd.concat([frame, extremes], ignore_index=True).to_csv(path, index=False)


@pytest.mark.parametrize("from_fit", [False, True])
def test_a_row_of_top_answers_is_scored_with_everyone_else(tmp_path, capsys, from_fit):
    data, model, out = tmp_path / "screen.csv", tmp_path / "two.cfa", tmp_path / "scores.csv"
    _data(data)
    model.write_text(MODEL)
    saved = []
    if from_fit:
        assert main(["fit", str(model), "--data", str(data), "--json", str(tmp_path / "fit.json")]) == 0
        saved = ["--from-fit", str(tmp_path / "fit.json")]
    code = main(["scores", str(model), "--data", str(data), "--id", "pid", "--output", str(out)] + saved)
    assert code == 0, capsys.readouterr().err
    written = pd.read_csv(out).set_index("pid")
    means = written[["somatic_posterior_mean", "cognitive_posterior_mean"]]
    sds = written[["somatic_posterior_sd", "cognitive_posterior_sd"]]
    assert np.isfinite(means.to_numpy()).all() and (sds.to_numpy() > 0.05).all()
    assert (means.loc["TOP"] >= means.max()).all() and (means.loc["BOTTOM"] <= means.min()).all()
