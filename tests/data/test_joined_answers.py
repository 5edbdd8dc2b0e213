"""'join answers' applied where the rows are read (data.joined_answers): the same thresholds, polychoric correlations
and fit as the data file recoded by hand, checked against the tool's fit of the recoded file and against references
written here from the published formulas (thresholds from the normal quantiles of the cumulative proportions, and
the two-step polychoric correlation maximising the bivariate-normal likelihood of the table with the thresholds held
fixed: Olsson 1979), with scipy; the same join in every group; and its refusals."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy import optimize, stats

import cfa_tool
from cfa_tool.data.joined_answers import JOINED, join_answers
from cfa_tool.data.polychoric import ordinal_moments
from cfa_tool.errors import DataError, ModelError
from cfa_tool.language import parse_model

MODEL = "factor f: q1, q2, q3, q4\n"
JOIN = "join answers 1, 2 as 2 for q1, q2\n"


def _answers(seed: int = 7, n: int = 400) -> pd.DataFrame:
    """Invented answers of four items on 1 to 5 from one normal factor (loadings .7), cut so that answer 1 is rare
    (about 2% of the rows), as the new user's items were (seeded simulation)."""
    rng = np.random.default_rng(seed)
    f = rng.normal(size=n)
    latent = 0.7 * f[:, None] + np.sqrt(1 - 0.49) * rng.normal(size=(n, 4))
    cuts = np.array([-2.05, -0.8, 0.3, 1.2])
    return pd.DataFrame(1 + (latent[:, :, None] > cuts).sum(axis=2), columns=["q1", "q2", "q3", "q4"])


def _recoded(frame: pd.DataFrame) -> pd.DataFrame:
    """The data file recoded by hand: answers 1 of q1 and q2 given as 2."""
    out = frame.copy()
    for item in ("q1", "q2"):
        out.loc[out[item] == 1, item] = 2
    return out


def _olsson_thresholds(x: np.ndarray) -> np.ndarray:
    """tau_c = Phi^-1(P(x <= c)) over the categories held (Olsson 1979, eq. 3), by scipy."""
    values, counts = np.unique(x, return_counts=True)
    return stats.norm.ppf(np.cumsum(counts)[:-1] / len(x))


def _olsson_polychoric(x: np.ndarray, y: np.ndarray) -> float:
    """The two-step polychoric correlation (Olsson 1979): the thresholds from the margins, then rho maximising the
    multinomial likelihood of the contingency table with the cells' probabilities from scipy's bivariate normal."""
    a, b = _olsson_thresholds(x), _olsson_thresholds(y)
    xs, ys = np.unique(x), np.unique(y)
    table = np.array([[np.sum((x == u) & (y == v)) for v in ys] for u in xs])
    big = 10.0
    ea, eb = np.concatenate([[-big], a, [big]]), np.concatenate([[-big], b, [big]])

    def minus_loglik(rho: float) -> float:
        mvn = stats.multivariate_normal(mean=[0, 0], cov=[[1, rho], [rho, 1]])
        grid = np.array([[mvn.cdf([s, t]) for t in eb] for s in ea])
        cells = grid[1:, 1:] - grid[:-1, 1:] - grid[1:, :-1] + grid[:-1, :-1]
        return -float(np.sum(table * np.log(np.maximum(cells, 1e-300))))

    return optimize.minimize_scalar(minus_loglik, bounds=(-0.99, 0.99), method="bounded",
                                    options={"xatol": 1e-7}).x


def test_a_join_gives_the_thresholds_and_correlations_of_the_file_recoded_by_hand():
    frame = _answers()
    assert 3 <= (frame.q1 == 1).sum() <= 15  # the rare category the join is for
    spec = parse_model(MODEL + JOIN)
    joined, notes = join_answers(spec, frame, "answers.csv")
    assert (frame.q1 == 1).any()  # the caller's frame is not changed
    pd.testing.assert_frame_equal(joined.astype(float), _recoded(frame).astype(float), check_dtype=False)
    (record_q1, record_q2) = joined.attrs[JOINED]
    assert record_q1.answered == (int((frame.q1 == 1).sum()), int((frame.q1 == 2).sum()))
    assert record_q1.recoded == int((frame.q1 == 1).sum())
    assert "the answers 1 and 2 of q1 and q2 are analysed as one category coded 2" in notes[0]
    names = ("q1", "q2", "q3", "q4")
    mine, by_hand = ordinal_moments(joined, names, "a"), ordinal_moments(_recoded(frame), names, "b")
    for t, u, item in zip(mine.thresholds, by_hand.thresholds, names):
        np.testing.assert_allclose(t, u, rtol=0, atol=1e-12)
        np.testing.assert_allclose(t, _olsson_thresholds(_recoded(frame)[item].to_numpy()), atol=1e-10)  # scipy
    assert mine.categories[0] == (2.0, 3.0, 4.0, 5.0)  # four categories left: the threshold 1|2 is gone
    np.testing.assert_allclose(mine.correlations, by_hand.correlations, atol=1e-12)
    recoded = _recoded(frame)
    reference = _olsson_polychoric(recoded.q1.to_numpy(), recoded.q2.to_numpy())  # Olsson (1979) with scipy
    assert mine.correlations[1, 0] == pytest.approx(reference, abs=1e-4)


def test_the_fit_with_a_join_is_the_fit_of_the_file_recoded_by_hand():
    frame = _answers()
    joined = cfa_tool.fit(MODEL + JOIN, frame, ordinal="all")
    by_hand = cfa_tool.fit(MODEL, _recoded(frame), ordinal="all")
    assert joined.fit.chi_square == pytest.approx(by_hand.fit.chi_square, rel=1e-10)
    assert [(r.kind, r.variables) for r in joined.estimates] == [(r.kind, r.variables) for r in by_hand.estimates]
    np.testing.assert_allclose([r.estimate for r in joined.estimates], [r.estimate for r in by_hand.estimates],
                               atol=1e-10)
    # the fit names the join: the data summary (JSON), the methods paragraph, the table of answers as analysed
    assert joined.data.joined_answers == ((("q1", "q2"), (1.0, 2.0), 2.0),)
    assert joined.to_dict()["data"]["joined_answers"] == [{"items": ["q1", "q2"], "codes": [1.0, 2.0], "as": 2.0}]
    from cfa_tool.reporting.paragraph import methods_paragraph
    from cfa_tool.reporting.tables import category_table

    assert ("Neighbouring answer categories of ordinal items were analysed as one category: answers 1 and 2 of q1 "
            "and q2 (coded 2)") in methods_paragraph(joined)
    table = category_table(joined)
    assert table.rows[0][1] == "in 2" and table.rows[2][1].endswith("%)")  # q1's 1 joined; q3's 1 as answered
    assert "in N: a category analysed as one with category N" in str(table.note)
    assert category_table(by_hand).rows[0][1] == ""  # recoded by hand: an empty cell, no word of the join


def test_the_same_join_applies_in_every_group():
    """A category that one group never gave stops an ordinal fit of the groups; the join the refusal advises is
    applied in every group, as recoding the whole file by hand is."""
    frame = pd.concat([_answers(1, 300), _answers(2, 300)], ignore_index=True)
    frame["site"] = ["north"] * 300 + ["south"] * 300
    frame.loc[(frame.site == "north") & (frame.q1 == 1), "q1"] = 2  # no one in north gave 1 to q1
    with pytest.raises(DataError) as refused:
        cfa_tool.fit(MODEL, frame, group="site", ordinal="all")
    advice = "'join answers 1, 2 as 2 for q1'"
    assert advice in str(refused.value)
    joined = cfa_tool.fit(MODEL + advice.strip("'") + "\n", frame, group="site", ordinal="all")
    recoded = frame.copy()
    recoded.loc[recoded.q1 == 1, "q1"] = 2
    by_hand = cfa_tool.fit(MODEL, recoded, group="site", ordinal="all")
    assert joined.fit.chi_square == pytest.approx(by_hand.fit.chi_square, rel=1e-10)
    np.testing.assert_allclose([r.estimate for r in joined.estimates], [r.estimate for r in by_hand.estimates],
                               atol=1e-10)


@pytest.mark.parametrize("statement, words", [
    ("join answers 1, 3 as 3 for q1", "'q1' has the answer 2 between 1 and 3"),
    ("join answers 5, 6 as 5 for q1", "no row read gave the answer 6 to 'q1'"),
    ("join answers 1, 2, 3, 4, 5 as 3 for q1", "would leave 'q1' a single category (3)"),
    ("join answers 1, 2, 3, 4, 5, 6 as 6 for q1", "would leave 'q1' a single category (6)"),  # 6 not answered
])
def test_joins_the_data_refuse(statement, words):
    with pytest.raises(ModelError) as refused:
        join_answers(parse_model(MODEL + statement + "\n", source="m.cfa"), _answers(), "answers.csv")
    assert str(refused.value).startswith("m.cfa:2:") and words in str(refused.value)


def test_a_code_some_items_hold_is_joined_where_held():
    """A code one of the statement's items never had (q3 without a 1 here) changes none of its answers, and is no
    error: another item of the statement holds it."""
    frame = _answers()
    frame.loc[frame.q3 == 1, "q3"] = 2
    joined, _ = join_answers(parse_model(MODEL + "join answers 1, 2 as 2 for q1, q3\n"), frame, "answers.csv")
    assert joined.attrs[JOINED][1].recoded == 0 and not (joined.q1 == 1).any()


def test_power_refuses_a_join_it_cannot_apply():
    # analytic power plans from the model alone: a join has no answers to apply to, said at its line as
    # power-simulation says it (s26: power ignored the statement without a word)
    from cfa_tool.workflows.power import model_degrees_of_freedom

    spec = parse_model(MODEL + "ordinal q1..q4\n" + JOIN, "m.cfa")
    with pytest.raises(ModelError, match="'join answers' joins categories .* power plans from the model alone"):
        model_degrees_of_freedom(spec)


def test_the_bootstraps_methods_lines_name_the_joins():
    from cfa_tool.reporting.reports import report_of

    boot = cfa_tool.bootstrap(MODEL + "ordinal q1..q4\n" + JOIN, _answers(), replications=20, seed=3)
    lines = " ".join(str(line) for line in report_of(boot).lines)
    assert "answers 1 and 2 of q1 and q2 (coded 2)" in lines and "in every resample" in lines, lines


def _two_samples() -> tuple[pd.DataFrame, pd.DataFrame]:
    """Two samples of the invented answers, the second without the rare answer 1 of q1 and q2 (given as 2), the first
    with it (hostile s27: a validation file without the answer had replicate refuse the join the calibration file
    needed)."""
    cal, val = _answers(7, 400), _answers(8, 400)
    assert (cal.q1 == 1).any() and (cal.q2 == 1).any()
    return cal, _recoded(val)


def test_replicate_joins_a_code_either_sample_holds():
    """replicate analyses the rows of both files together (its test of one solution fits them at once): a code is
    joined where either file holds it, as across groups, and the replication is that of the files recoded by
    hand."""
    cal, val = _two_samples()
    joined = cfa_tool.replicate(MODEL + "ordinal q1..q4\n" + JOIN, cal, val)
    by_hand = cfa_tool.replicate(MODEL + "ordinal q1..q4\n", _recoded(cal), val)
    test, hand = joined.same_solution, by_hand.same_solution
    assert not test.not_computed and not hand.not_computed, (test.not_computed, hand.not_computed)
    assert test.chi_square_difference == pytest.approx(hand.chi_square_difference, rel=1e-8)
    assert joined.cvi == pytest.approx(by_hand.cvi, rel=1e-8)


def test_replicate_refuses_a_code_neither_sample_holds():
    cal, val = _two_samples()
    with pytest.raises(ModelError) as refused:
        cfa_tool.replicate(MODEL + "ordinal q1..q4\njoin answers 5, 6 as 5 for q1\n", cal, val)
    assert "<data frame>: no row of either read gave the answer 6 to 'q1'" in str(refused.value), refused.value


def test_rows_scored_with_an_earlier_fit_need_not_hold_every_joined_code():
    """Scores of other rows by an earlier fit (scores --from-fit; FitResult.scores) take the fit's categories, the
    join checked against the fit's rows: a file to score without the answer 1 is scored (it was refused), alike by
    the fit with the join and by the fit of its file recoded by hand."""

    from cfa_tool.workflows.factor_scores import score_with_fit

    cal, val = _two_samples()
    joined = cfa_tool.fit(MODEL + "ordinal q1..q4\n" + JOIN, cal)
    by_hand = cfa_tool.fit(MODEL + "ordinal q1..q4\n", _recoded(cal))
    scored, hand = score_with_fit(joined, val), score_with_fit(by_hand, val)
    np.testing.assert_allclose(scored.table["f_posterior_mean"], hand.table["f_posterior_mean"], atol=1e-8)
