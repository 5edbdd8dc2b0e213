"""simulate from an earlier ordinal fit writes each item's answers in that fit's own codes (hostile s22, finding 5:
answers 0 to 10 came out 1 to 11, and answers 1, 2, 4, 5 with 3 never chosen came out 1 to 4, so `scores --from-fit`
of the very same fit refused the simulated file).

Check values: the codes are those of the data the fit was made from (its distinct answers); the share of each
simulated answer is the data's share of it, since the two-step thresholds of one group are the normal quantiles of the
cumulative shares (Olsson 1979), so the population's category probabilities are the observed shares exactly and a
simulated share differs from them by Monte Carlo error only (binomial SE at most .0035 at N = 20,000).
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from cfa_tool.version import __version__
from cfa_tool.workflows.factor_scores import score_with_saved_fit
from cfa_tool.workflows.simulation import simulate
from tests.commands.test_cli import run

MODEL = "factor f: q1, q2, q3, q4\nfactor g: y1, y2, y3\nordinal q1..q4\n"


def _data(n: int = 600, seed: int = 5) -> pd.DataFrame:
    """Items q1, q2 answered 0 to 10 (an 11-point item), q3 answered 1, 2, 4, 5 (3 never chosen), q4 answered
    1 to 4; y1..y3 continuous."""
    rng = np.random.default_rng(seed)
    eta = rng.multivariate_normal([0, 0], [[1, 0.4], [0.4, 1]], n)
    latent = 0.7 * eta[:, [0, 0, 0, 0]] + np.sqrt(0.51) * rng.standard_normal((n, 4))
    eleven = np.linspace(-1.8, 1.8, 10)
    out = {"q1": np.searchsorted(eleven, latent[:, 0]), "q2": np.searchsorted(eleven, latent[:, 1]),
           "q3": np.array([1, 2, 4, 5])[np.searchsorted([-1.0, 0.0, 1.0], latent[:, 2])],
           "q4": np.searchsorted([-0.8, 0.1, 0.9], latent[:, 3]) + 1}
    for j in range(3):
        out[f"y{j + 1}"] = 5 + 0.8 * eta[:, 1] + 0.6 * rng.standard_normal(n)
    return pd.DataFrame(out)


@pytest.fixture(scope="module")
def fitted():
    data = _data()
    assert sorted(data.q1.unique()) == list(range(11)) and sorted(data.q3.unique()) == [1, 2, 4, 5]
    return data, cfa_tool.fit(MODEL, data)


def _saved(result, path, edit=None):
    payload = dict(result.to_dict(), tool="cfa-tool", version=__version__)
    if edit is not None:
        edit(payload)
    path.write_text(json.dumps(payload))
    return path


def test_the_simulated_answers_are_the_fits_own_codes_in_its_shares(fitted):
    data, fit = fitted
    frame = simulate(MODEL, 20_000, seed=7, population=fit).frame
    for item in ("q1", "q2", "q3", "q4"):
        observed = data[item].value_counts(normalize=True).sort_index()
        simulated = frame[item].value_counts(normalize=True).sort_index()
        assert list(simulated.index) == list(observed.index), item  # 0..10; 1, 2, 4, 5; 1..4
        assert np.abs(simulated.to_numpy() - observed.to_numpy()).max() < 0.015, item  # 4 binomial SEs
        assert str(frame[item].dtype) == "Int64"  # whole answers written as whole numbers


def test_scores_from_the_same_fit_read_the_simulated_file(fitted, tmp_path):
    _, fit = fitted
    model = tmp_path / "m.cfa"
    model.write_text(MODEL)
    saved = _saved(fit, tmp_path / "fit.json")
    out = tmp_path / "sim.csv"
    proc = run("simulate", str(model), "--n", "300", "--output", str(out), "--population-from", str(saved))
    assert proc.returncode == 0, proc.stderr
    assert "answers in the earlier fit's own codes" in " ".join(proc.stdout.split())
    written = pd.read_csv(out)
    assert set(written.q3.unique()) <= {1, 2, 4, 5} and 3 not in set(written.q3)
    scored = score_with_saved_fit(model, saved, written)  # refused before: 'answer 3 ... not one of the categories'
    assert len(scored.table) == 300


def test_a_fit_without_its_categories_writes_1_to_k_and_says_so(fitted, tmp_path):
    _, fit = fitted
    saved = _saved(fit, tmp_path / "old.json", lambda p: p["data"].pop("category_counts"))
    simulated = simulate(MODEL, 2_000, seed=3, population=saved)
    assert sorted(simulated.frame.q1.unique()) == list(range(1, 12))
    model = tmp_path / "m.cfa"
    model.write_text(MODEL)
    proc = run("simulate", str(model), "--n", "50", "--output", str(tmp_path / "s.csv"), "--population-from", str(saved))
    assert proc.returncode == 0 and "(answers 1 to k)" in " ".join(proc.stdout.split())


def test_categories_that_do_not_match_the_thresholds_are_refused(fitted, tmp_path):
    _, fit = fitted

    def edit(payload):
        payload["data"]["category_counts"]["q3"] = payload["data"]["category_counts"]["q3"][:3]

    saved = _saved(fit, tmp_path / "edited.json", edit)
    with pytest.raises(OptionError, match=r"answer categories of 'q3' .*\(1, 2, 4\) are not the 4 increasing answers"):
        simulate(MODEL, 50, population=saved)
