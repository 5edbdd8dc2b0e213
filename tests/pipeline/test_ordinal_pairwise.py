"""Ordinal items with missing answers: every answer used (pairwise present rows) by default, listwise only when
asked.  Check values: thresholds from each item's cumulative proportions (Olsson 1979, written out with
scipy.stats.norm); each polychoric correlation by maximising the bivariate-normal likelihood of the pair's table
with scipy.optimize and scipy.stats.multivariate_normal on the rows that answered both items; the row counts
by pandas; the standard errors against the Monte Carlo spread of seeded simulations whose population values are
set here."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest
from scipy import stats

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.data.polychoric import ordinal_moments
from cfa_tool.errors import DataError, OptionError
from cfa_tool.method import MissingData
from cfa_tool.reporting import tables as T
from tests.pipeline.test_ordinal import scipy_polychoric

LOADINGS = np.array([0.8, 0.7, 0.6, 0.75, 0.7, 0.65])  # population values of the simulations below
CUTS = np.array([-1.0, 0.0, 0.9])
NAMES = tuple(f"y{j + 1}" for j in range(6))
ONE_FACTOR = "factor f: y1..y6\nscale latent by variance\n"


def _sample(n: int, seed: int, share: float = 0.15, loadings=LOADINGS) -> pd.DataFrame:
    """Four-category answers of a one-factor population, a ``share`` of answers removed completely at random."""
    rng = np.random.default_rng(seed)
    S = np.outer(loadings, loadings)
    S[np.diag_indices(len(loadings))] = 1.0
    z = rng.multivariate_normal(np.zeros(len(loadings)), S, size=n)
    y = np.searchsorted(CUTS, z).astype(float) + 1
    y[rng.random(y.shape) < share] = np.nan
    return pd.DataFrame(y, columns=[f"y{j + 1}" for j in range(len(loadings))])


def _rows(result) -> np.ndarray:
    return np.array([[r.estimate, r.se] for r in result.estimates])


def test_without_missing_answers_the_default_is_the_listwise_fit_exactly():
    data = _sample(600, 1, share=0.0)
    default = cfa_tool.fit(ONE_FACTOR, data, ordinal="all")
    listwise = cfa_tool.fit(ONE_FACTOR, data, ordinal="all", missing="listwise")
    assert np.array_equal(_rows(default), _rows(listwise), equal_nan=True)
    assert default.fit.chi_square == listwise.fit.chi_square and default.robust == listwise.robust
    assert default.method.missing is MissingData.PAIRWISE and listwise.method.missing is MissingData.LISTWISE
    assert default.n_obs == listwise.n_obs == 600 and default.warnings == listwise.warnings
    assert default.data.pair_range == (600, 600)


def test_thresholds_and_correlations_come_from_the_rows_that_answered():
    data = _sample(500, 2, share=0.2)
    om = ordinal_moments(data, NAMES, "sim", pairwise=True)
    assert om.n_obs == int(data.notna().any(axis=1).sum())
    for j, name in enumerate(NAMES):  # Olsson (1979): tau_c = Phi^-1(P(x <= c)) among the rows answering the item
        answered = data[name].dropna()
        cumulative = np.cumsum(answered.value_counts().sort_index().to_numpy())[:-1] / len(answered)
        assert om.thresholds[j] == pytest.approx(stats.norm.ppf(cumulative), abs=1e-12)
    for i, j in ((1, 0), (4, 2), (5, 3)):
        both = data[[NAMES[i], NAMES[j]]].dropna()
        assert om.pair_counts[i, j] == len(both)
        table = pd.crosstab(both[NAMES[i]], both[NAMES[j]]).to_numpy()  # every category is used at these sizes
        rho = scipy_polychoric(table, om.thresholds[i], om.thresholds[j])
        assert om.correlations[i, j] == pytest.approx(rho, abs=2e-4)


def test_missing_at_random_estimates_and_robust_standard_errors_match_a_monte_carlo():
    # 60 seeded replications of N = 400 with 15% of answers missing completely at random: the loadings stay near
    # the population values and the mean robust standard error near the spread of the estimates (a standard
    # deviation from 60 replications is known to about +/- 9%, one SE)
    estimates, ses = [], []
    for s in range(60):
        result = cfa_tool.fit(ONE_FACTOR, _sample(400, 1000 + s), ordinal="all", modification_indices=False,
                              diagnostics=False)
        rows = {r.variables: r for r in result.estimates}
        estimates.append([rows[("f", x)].estimate for x in NAMES])
        ses.append([rows[("f", x)].se for x in NAMES])
    estimates, ses = np.array(estimates), np.array(ses)
    spread = estimates.std(axis=0, ddof=1)
    assert np.all(np.abs(estimates.mean(axis=0) - LOADINGS) < 0.03)
    ratio = ses.mean(axis=0) / spread
    assert np.all((ratio > 0.7) & (ratio < 1.3)) and 0.85 < ratio.mean() < 1.15


def test_asymptotic_covariance_of_pairwise_correlations_matches_the_spread():
    # the variance of sqrt(N)(r - rho) over replications estimates the diagonal of Gamma (N: the rows with an
    # answer); with a third of the answers missing a pair has about 44% of the rows, and a Gamma that treated the
    # pair's rows as complete would be about a fifth of the spread
    fits = [ordinal_moments(_sample(300, 500 + s, share=1 / 3), NAMES[:3], "sim", pairwise=True) for s in range(120)]
    spread = np.var([m.correlations[np.tril_indices(3, -1)] for m in fits], axis=0) * np.mean([m.n_obs for m in fits])
    gamma = ordinal_moments(_sample(20000, 9, share=1 / 3), NAMES[:3], "sim", pairwise=True).gamma
    # with 120 replications a variance is known to about +/- 13% (one SE)
    assert np.allclose(spread, np.diag(gamma), rtol=0.35)


def test_listwise_only_when_asked():
    data = _sample(500, 3, share=0.1)
    complete = int(data.notna().all(axis=1).sum())
    pairwise = cfa_tool.fit(ONE_FACTOR, data, ordinal="all")
    listwise = cfa_tool.fit(ONE_FACTOR, data, ordinal="all", missing="listwise")
    assert pairwise.n_obs == 500 and listwise.n_obs == complete < 400
    assert listwise.method.missing is MissingData.LISTWISE and listwise.data.pair_rows == ()
    # over a twentieth of the rows: a caution first, as for continuous items, naming what would keep them
    assert listwise.problems[0].explanation.startswith(f"Listwise deletion left out {500 - complete} of 500 rows")
    assert "pairwise present rows (the default for ordinal items" in listwise.problems[0].line()
    assert not any("listwise deletion" in w.lower() for w in listwise.warnings)  # said once, in the cautions
    assert pairwise.missing_data["coverage"] == pytest.approx(data.notna().mean().to_dict())  # shares by pandas
    note = next(w for w in pairwise.warnings if "pairwise present rows" in w)
    assert f"only the {complete} complete rows" in note
    with pytest.raises(OptionError, match="full-information ML"):
        cfa_tool.fit(ONE_FACTOR, data, ordinal="all", missing="full-information")


def test_report_and_json_give_the_rows_of_each_pair(tmp_path, capsys):
    data = _sample(400, 4, share=0.12)
    csv, model, out = tmp_path / "answers.csv", tmp_path / "m.cfa", tmp_path / "fit.json"
    data.to_csv(csv, index=False)
    model.write_text(ONE_FACTOR + "ordinal y1..y6\n")
    code = main(["fit", str(model), "--data", str(csv), "--json", str(out)])
    text = capsys.readouterr().out
    assert code == 0
    answered = data.notna().astype(int)
    both = answered.T @ answered  # pandas: rows answering both items
    pairs = json.loads(out.read_text())["data"]["pair_rows"]
    assert len(pairs) == 15
    for pair in pairs:
        assert pair["rows"] == both.loc[pair["items"][0], pair["items"][1]]
    low, high = min(p["rows"] for p in pairs), max(p["rows"] for p in pairs)
    lower = both.to_numpy()[np.tril_indices(6, -1)]
    assert (low, high) == (lower.min(), lower.max())
    assert f"from {low} rows" in text and f"to {high}" in text  # the note on missing answers
    assert f"{low} to {high} rows per pair of items" in " ".join(text.split())  # the data line
    assert main(["check", str(model), "--data", str(csv)]) == 0
    assert "pairwise present rows" in " ".join(capsys.readouterr().out.split())  # (the terminal wraps lines)
    result = cfa_tool.fit(ONE_FACTOR, data, ordinal="all")
    assert f"N = {low} to {high} per pair" in T.correlation_table(result).title


def test_groups_use_every_answer_too():
    data = pd.concat([_sample(500, 5, share=0.1).assign(site="east"), _sample(500, 6, share=0.1).assign(site="west")])
    result = cfa_tool.fit("factor f: y1..y6\n", data, ordinal="all", group="site")
    assert result.method.missing is MissingData.PAIRWISE and result.n_obs == 1000
    for g, label in zip(result.groups, ("east", "west")):
        part = data[data["site"] == label]
        answered = part[list(NAMES)].notna().astype(int)
        assert dict(((a, b), c) for a, b, c in g.data.pair_rows) == {
            (a, b): int((answered[a] * answered[b]).sum()) for i, a in enumerate(NAMES) for b in NAMES[i + 1:]}
    assert sum("in group east" in w and "pairwise present rows" in w for w in result.warnings) == 1
    groups_json = result.to_dict()["groups"]
    assert [p["rows"] for p in groups_json[0]["pair_rows"]] == [c for _, _, c in result.groups[0].data.pair_rows]
    assert [p["rows"] for p in result.to_dict()["data"]["pair_rows"]] == [
        a[2] + b[2] for a, b in zip(result.groups[0].data.pair_rows, result.groups[1].data.pair_rows)]
    listwise = cfa_tool.fit("factor f: y1..y6\n", data, ordinal="all", group="site", missing="listwise")
    assert listwise.method.missing is MissingData.LISTWISE
    assert listwise.n_obs == int(data[list(NAMES)].notna().all(axis=1).sum())


def test_pairs_the_gaps_leave_empty_are_one_line_errors():
    data = _sample(200, 7, share=0.0)
    apart = data.copy()
    apart.loc[:99, "y1"] = np.nan  # y1 answered only in the second half, y2 only in the first
    apart.loc[100:, "y2"] = np.nan
    with pytest.raises(DataError, match="0 of the 200 rows answered both 'y1' and 'y2'"):
        cfa_tool.fit(ONE_FACTOR, apart, ordinal="all")
    # a continuous item beside them that varies, but not among the rows that answered y1
    mixed = apart.drop(columns="y2").assign(x=np.where(np.arange(200) < 100, np.arange(200) / 10, 1.0))
    with pytest.raises(DataError, match="'x' has the same value in every row that also answered 'y1'"):
        cfa_tool.fit("factor f: y1, y3, y4, y5, y6, x\n", mixed, ordinal=["y1", "y3", "y4", "y5", "y6"])


def test_the_note_and_the_methods_paragraphs_state_the_missing_data_assumption():
    """Pairwise present rows are consistent when answers are missing completely at random (Little & Rubin 2002):
    the fit's note, its methods paragraph and compare's paragraph say so; without gaps nothing is said."""
    from cfa_tool.reporting.paragraph import comparison_paragraph, methods_paragraph

    data = _sample(400, 7, share=0.1)
    result = cfa_tool.fit(ONE_FACTOR, data, ordinal="all")
    note = next(w for w in result.warnings if "pairwise present rows" in w)
    assert "missing completely at random (whether an answer is missing" in note
    assert "valid when answers are missing at random" in note
    paragraph = methods_paragraph(result)
    assert "rows per pair, which assumes that answers are missing completely at random, Little & Rubin, 2002)" in paragraph
    two = "factor f: y1..y3\nfactor g: y4..y6\n"
    compared = cfa_tool.compare([ONE_FACTOR, two], data, ordinal="all")
    assert "both items, which assumes that answers are missing completely at random" in comparison_paragraph(compared)
    from cfa_tool.reporting.reports import report_of

    halves = pd.concat([data.assign(site="east"), _sample(400, 8, share=0.1).assign(site="west")])
    ladder = cfa_tool.invariance(ONE_FACTOR, halves, "site", ordinal="all")
    assert "which assumes that answers are missing completely at random" in report_of(ladder).paragraph
    complete = _sample(400, 7, share=0.0)
    assert "completely at random" not in methods_paragraph(cfa_tool.fit(ONE_FACTOR, complete, ordinal="all"))
    assert "completely at random" not in comparison_paragraph(cfa_tool.compare([ONE_FACTOR, two], complete,
                                                                                 ordinal="all"))
