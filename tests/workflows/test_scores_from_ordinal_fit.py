"""Scores of new data with the parameters of an earlier ordinal fit, read from its JSON result.

Checks: the scores from the JSON equal those the same run computes from the fit itself on the same data
(the JSON holds every parameter the scores need); the posterior mean of a new row, with the parameters as
the JSON reports them, is the ratio of two integrals over the normal prior times the answers'
probabilities (category probabilities of the latent-response model, Muthén 1984; normal densities for a
continuous item; Bock & Aitkin 1981), evaluated by scipy.integrate.quad (QUADPACK) independently of the
tool's quadrature.
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest
from scipy import integrate
from scipy.special import ndtr
from scipy.stats import norm

import cfa_tool
from cfa_tool.errors import DataError
from cfa_tool.workflows.factor_scores import score_with_saved_fit, scores
from cfa_tool.version import __version__

CUTS = (-1.2, -0.3, 0.5, 1.3)
ONE = "factor f: q1, q2, q3, q4, y1\nordinal q1..q4\n"
TWO = "factor f1: q1, q2, q3\nfactor f2: q4, y1, y2\nordinal q1..q4\n"


def _draw(n: int, seed: int, mean: float = 0.0) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    eta = mean + rng.multivariate_normal([0, 0], [[1, 0.5], [0.5, 1]], n)
    out = {}
    for j in range(4):
        latent = 0.7 * eta[:, 0 if j < 3 else 1] + rng.normal(size=n) * np.sqrt(0.51)
        out[f"q{j + 1}"] = np.searchsorted(CUTS, latent) + 1
    out["y1"] = 10 + 3 * (0.8 * eta[:, 1] + 0.6 * rng.normal(size=n))
    out["y2"] = -2 + 1.5 * (0.7 * eta[:, 1] + 0.7 * rng.normal(size=n))
    return pd.DataFrame(out)


def _saved(result, tmp_path, name: str = "fit.json"):
    path = tmp_path / name
    path.write_text(json.dumps(dict(result.to_dict(), tool="cfa-tool", version=__version__)))
    return path


@pytest.mark.parametrize("model, group", [(ONE, None), (TWO, "site")])
def test_scores_from_the_json_equal_the_scores_of_the_fit(tmp_path, model, group):
    data = _draw(500, 1)
    if group is not None:
        data = pd.concat([data.assign(site="north"), _draw(400, 2, mean=0.4).assign(site="south")], ignore_index=True)
    model_file = tmp_path / "model.cfa"
    model_file.write_text(model)
    own = scores(model_file, data, group=group)
    saved = score_with_saved_fit(model_file, _saved(own.fit, tmp_path), data)
    assert list(saved.table.columns) == list(own.table.columns)
    # the group column, carried as the data hold it (its labels: text), alike in both; the scores numbers
    assert saved.carried == own.carried == ((group,) if group else ())
    assert saved.table[list(own.carried)].equals(own.table[list(own.carried)])
    np.testing.assert_allclose(saved.table.drop(columns=list(own.carried)).to_numpy(float),
                               own.table.drop(columns=list(own.carried)).to_numpy(float), rtol=0, atol=1e-10)
    again = own.fit.scores(data)  # the Python path from the fit result itself
    assert again.carried == own.carried
    np.testing.assert_allclose(again.table.drop(columns=list(own.carried)).to_numpy(float),
                               own.table.drop(columns=list(own.carried)).to_numpy(float), rtol=0, atol=1e-10)


def test_posterior_means_of_new_rows_are_the_integrals_with_the_reported_parameters(tmp_path):
    fitted = cfa_tool.fit(ONE, _draw(800, 3))
    path = _saved(fitted, tmp_path)
    model_file = tmp_path / "model.cfa"
    model_file.write_text(ONE)
    new = _draw(30, 4)[["q1", "q2", "q3", "q4", "y1"]]
    result = score_with_saved_fit(model_file, path, new)
    payload = json.loads(path.read_text())
    est = {(e["kind"], tuple(e["variables"])): e["estimate"] for e in payload["estimates"]}
    data = payload["data"]
    mean_y, sd_y = data["means"][data["variables"].index("y1")], data["sds"][data["variables"].index("y1")]
    phi = est[("factor_variance", ("f",))]

    def density(eta, row, power):
        out = norm.pdf(eta, 0.0, np.sqrt(phi)) * eta**power
        for x in ("q1", "q2", "q3", "q4"):
            loading, theta = est[("loading", ("f", x))], est[("residual_variance", (x,))]
            cuts = [-np.inf] + [est[("threshold", (x, str(k)))] for k in range(1, 5)] + [np.inf]
            c = int(row[x]) - 1
            out *= ndtr((cuts[c + 1] - loading * eta) / np.sqrt(theta)) - ndtr((cuts[c] - loading * eta) / np.sqrt(theta))
        z = (row["y1"] - mean_y) / sd_y  # the continuous item as its polyserial correlations standardized it
        loading, theta = est[("loading", ("f", "y1"))], est[("residual_variance", ("y1",))]
        return out * norm.pdf(z, loading * eta, np.sqrt(theta))

    for i in (0, 11, 29):
        row = new.iloc[i]
        lo, hi = -10 * np.sqrt(phi), 10 * np.sqrt(phi)
        total = integrate.quad(density, lo, hi, args=(row, 0), epsabs=1e-13, epsrel=1e-10, limit=200)[0]
        mean = integrate.quad(density, lo, hi, args=(row, 1), epsabs=1e-13, epsrel=1e-10, limit=200)[0] / total
        second = integrate.quad(density, lo, hi, args=(row, 2), epsabs=1e-13, epsrel=1e-10, limit=200)[0] / total
        assert result.table["f_posterior_mean"].iloc[i] == pytest.approx(mean, abs=1e-6)
        assert result.table["f_posterior_sd"].iloc[i] == pytest.approx(np.sqrt(second - mean**2), abs=1e-6)


def test_an_answer_the_fit_never_saw_is_an_error_naming_item_row_and_value(tmp_path):
    fitted = cfa_tool.fit(ONE, _draw(400, 5))
    model_file = tmp_path / "model.cfa"
    model_file.write_text(ONE)
    new = _draw(20, 6)
    new.loc[4, "q3"] = 9
    with pytest.raises(DataError, match=r"ordinal item 'q3' has the answer 9 in row labelled 4, which is not one of the "
                                        r"categories the earlier fit estimated thresholds for \(1, 2, 3, 4, 5\)"):
        score_with_saved_fit(model_file, _saved(fitted, tmp_path), new)


def test_a_json_of_another_model_or_altered_is_refused(tmp_path):
    from cfa_tool.errors import OptionError

    fitted = cfa_tool.fit(ONE, _draw(400, 7))
    model_file = tmp_path / "model.cfa"
    model_file.write_text(ONE)
    other = tmp_path / "other.cfa"
    other.write_text("factor f: q2, q1, q3, q4, y1\nordinal q1..q4\n")  # another marker: other parameters
    path = _saved(fitted, tmp_path)
    with pytest.raises(OptionError, match="for the loading of q2 on f where the model file .* fixes it at 1"):
        score_with_saved_fit(other, path, _draw(20, 8))
    payload = json.loads(path.read_text())
    payload["estimates"][-1]["estimate"] = "high"  # a threshold that is not a number
    altered = tmp_path / "altered.json"
    altered.write_text(json.dumps(payload))
    # named as the estimate that is not a number (hostile trial), not as the result of another model
    with pytest.raises(OptionError, match='the estimate of threshold 4 of q4 is "high", not a number'):
        score_with_saved_fit(model_file, altered, _draw(20, 8))


def test_the_ordinal_scores_report_gives_score_correlations_and_the_sum_with_its_reliability(tmp_path):
    """What README promises for scores, with ordinal items too: the posterior means' correlations beside the factors'
    (numpy's corrcoef of the written scores) and each factor's keyed sum of answers with its reliability, the fit's
    own observed-sum omega (Green & Yang 2009; checked in tests/assessment/test_ordinal_reliability.py); no note
    about fit indices the report does not show."""
    from cfa_tool.pipeline.ordinal import ORDINAL_NOTE
    from cfa_tool.reporting.reports import report_of

    data = _draw(600, 5)
    model = "factor f1: q1, q2\nfactor f2: q3, q4\nordinal q1..q4\n"
    result = scores(model, data)
    q = result.quality[0]
    written = result.table[["f1_posterior_mean", "f2_posterior_mean"]].dropna().to_numpy()
    assert q.score_correlations[0, 1] == pytest.approx(np.corrcoef(written.T)[0, 1], abs=1e-12)
    fitted = {r.factor: r.observed_sum_omega for r in result.fit.groups[0].reliability}
    assert {s.factor: s.omega for s in q.sums} == pytest.approx(fitted, abs=1e-10)
    report = report_of(result)
    keys = [t.key for t in report.tables]
    assert "score_correlations_0" in keys and "score_sums_0" in keys
    assert ORDINAL_NOTE in result.fit.warnings and ORDINAL_NOTE not in report.notes
    out = result.to_dict()["quality"][0]
    assert len(out["sums"]) == 2 and all(0 < s["validity"] < 1 for s in out["sums"])
    sums = next(t for t in report.tables if t.key == "score_sums_0")
    assert "Sum's r" in sums.columns and "not comparable" in sums.note


def test_the_ordinal_scores_report_says_how_precise_one_persons_score_is():
    """The precision table of ordinal scores (new-user trial 7, U6: README promised it, the ordinal report lacked it):
    SE = the median posterior SD of the rows that answered every item of the factor, read back from the written
    columns with numpy; the band and the smallest real difference are 1.96 and 1.96 sqrt(2) times it (Gulliksen
    1950, recalled from memory); the note gives the SE in the lowest and highest third of the scores and the units."""
    from cfa_tool.reporting.reports import report_of

    data = _draw(600, 5)
    data.loc[data.index[:40], "q2"] = np.nan  # rows with a gap are not among those the SE describes
    result = scores("factor f1: q1, q2\nfactor f2: q3, q4\nordinal q1..q4\n", data)
    q = result.quality[0]
    table = result.table
    for p in q.precision:
        full = table[f"{p.factor}_items_answered"] == 2
        sd = table.loc[full, f"{p.factor}_posterior_sd"].to_numpy()
        assert p.standard_error == pytest.approx(np.median(sd), abs=1e-12)
        assert p.band == pytest.approx(1.959963984540054 * np.median(sd), abs=1e-12)
        assert p.smallest_difference == pytest.approx(1.959963984540054 * np.sqrt(2) * np.median(sd), abs=1e-12)
        scores_full = table.loc[full, f"{p.factor}_posterior_mean"].to_numpy()
        low = np.quantile(scores_full, 1 / 3)
        level = dict((f, (a, b)) for f, a, b in q.precision_by_level)[p.factor]
        assert level[0] == pytest.approx(np.median(sd[scores_full <= low]), abs=1e-12)
    assert {p.factor for p in q.precision} == {"f1", "f2"}
    precision = next(t for t in report_of(result).tables if t.key == "score_precision_0")
    assert "lowest third of the scores" in precision.note and "factor's standard deviation" in precision.note
    out = result.to_dict()["quality"][0]
    assert len(out["precision"]) == 2 and len(out["precision_by_score_level"]) == 2


@pytest.mark.parametrize("model", [ONE, "factor f: q1, q2, q3, q4, y1\n"])
def test_a_model_of_the_same_items_under_other_names_is_told_which_names_differ(tmp_path, model):
    # new-user trial 7, U7: the same model on a retest's columns ('q1_t2' for 'q1') was refused as 'not of the model
    # (its estimates differ from the model's parameters)', without a word that only the names differ
    from cfa_tool.errors import OptionError

    data = _draw(300, 5)
    path = _saved(cfa_tool.fit(model, data), tmp_path)
    retest = tmp_path / "retest.cfa"
    retest.write_text(model.replace("q1, q2, q3, q4", "q1_t2..q4_t2").replace("ordinal q1..q4", "ordinal q1_t2..q4_t2"))
    renamed = data.rename(columns={f"q{j}": f"q{j}_t2" for j in range(1, 5)})
    with pytest.raises(OptionError, match=r"the fit result's items are named otherwise than the model's \(the model "
                                          r".*retest.cfa has 'q1_t2', 'q2_t2', 'q3_t2', 'q4_t2' where the fit has 'q1', "
                                          r"'q2', 'q3', 'q4'\).*copy the data file with those columns renamed"):
        score_with_saved_fit(retest, path, renamed)
