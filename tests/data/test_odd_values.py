"""The screening for values that are not answers (cfa_tool.data.odd_values): forgotten missing-value codes and a
spreadsheet's totals or means row are found; ordinary data give no false alarm.  The rules are the project's own
(common practice of data cleaning, not a published test); the data sets they must leave alone are the bundled demo
data, Holzinger & Swineford (1939, the 301 children of tests/datasets) and seeded normal samples."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from cfa_tool.data.odd_values import OddKind, code_like, odd_values
from cfa_tool.errors import EstimationError

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "demo" / "rider_survey.csv"
HOLZINGER = ROOT / "tests" / "datasets" / "holzinger_swineford_1939.csv"


def _numeric(frame: pd.DataFrame) -> list[str]:
    return [c for c in frame.columns if pd.api.types.is_numeric_dtype(frame[c])]


def _likert(seed: int, n: int = 300, p: int = 6) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    factor = rng.standard_normal((n, 1))
    items = np.clip(np.round(3 + 0.8 * factor + 0.7 * rng.standard_normal((n, p))), 1, 5)
    return pd.DataFrame(items, columns=[f"x{k + 1}" for k in range(p)])


def test_a_forgotten_code_in_a_simulated_item_is_named_with_its_rows():
    frame = _likert(1)
    frame.loc[[4, 17, 250], "x3"] = -99  # rows 5, 18 and 251
    found = odd_values(frame, list(frame.columns))
    assert len(found) == 1
    odd = found[0]
    assert odd.kind is OddKind.MISSING_CODE and odd.columns == ("x3",) and odd.values == (-99.0,)
    assert odd.rows == (5, 18, 251) and odd.answers == 3 and odd.others == (1.0, 5.0)
    assert "missing_codes=[-99]" in odd.advice()  # the keyword: a Python call


def test_codes_within_codes_and_codes_of_nines():
    frame = _likert(2)
    frame.loc[[1, 2], "x1"] = -99
    frame.loc[[3], "x1"] = -9
    frame.loc[[7, 8], "x2"] = 999
    frame.loc[[9], "x4"] = 9  # on a 1-to-5 scale, 9 lies the range (4) beyond the highest answer
    found = {(o.values[0], o.columns) for o in odd_values(frame, list(frame.columns))}
    assert found == {(-99.0, ("x1",)), (-9.0, ("x1",)), (999.0, ("x2",)), (9.0, ("x4",))}


def test_answers_on_scales_that_hold_negative_numbers_or_nines_are_answers():
    rng = np.random.default_rng(3)
    frame = pd.DataFrame({"bipolar": rng.integers(-3, 4, 300).astype(float),  # -3..3
                          "ten": rng.integers(0, 11, 300).astype(float),  # 0..10 holds 9
                          "nine": rng.integers(1, 10, 300).astype(float)})  # 1..9
    assert odd_values(frame, list(frame.columns)) == ()
    assert code_like(-99) and code_like(999) and code_like(9) and not code_like(5) and not code_like(-9.5)


def test_a_totals_row_under_the_demo_data_is_named_by_its_row():
    frame = pd.read_csv(DEMO)
    items = _numeric(frame)  # the twelve rating items (1 to 5, some unanswered)
    assert len(items) == 12
    totals = frame[items].count().to_frame().T  # a spreadsheet's COUNT row, as in the new user's file
    frame = pd.concat([frame, totals], ignore_index=True)
    found = odd_values(frame, items)
    # the counts of answers of the rows above it (pandas' count): a summary row, said as such (review s15)
    assert [(o.kind, o.rows, o.holds) for o in found] == [(OddKind.SUMMARY_BLOCK, (len(frame),),
                                                            ("the counts of answers",))]
    assert found[0].columns == tuple(items) and "Delete row" in found[0].advice()


@pytest.mark.parametrize("kind, make", [(OddKind.SUMS_ROW, lambda f: f.sum()), (OddKind.MEANS_ROW, lambda f: f.mean().round(2))])
def test_rows_of_sums_and_of_means_are_found(kind, make):
    frame = _likert(4)
    frame = pd.concat([frame, make(frame).to_frame().T], ignore_index=True)
    found = odd_values(frame, list(frame.columns))
    assert [(o.kind, o.rows, len(o.columns)) for o in found] == [(kind, (len(frame),), 6)]


def test_a_typing_error_far_beyond_the_scale_is_found_alone():
    frame = _likert(5)
    frame.loc[10, "x2"] = 55  # 55 for 5: 50 beyond the highest answer, more than ten ranges (4)
    found = odd_values(frame, list(frame.columns))
    assert [(o.kind, o.rows, o.columns) for o in found] == [(OddKind.FAR_BEYOND, (11,), ("x2",))]


@pytest.mark.parametrize("path", [DEMO, HOLZINGER], ids=["demo", "holzinger_swineford_1939"])
def test_ordinary_data_sets_raise_no_alarm(path):
    frame = pd.read_csv(path)
    assert odd_values(frame, _numeric(frame)) == ()


def test_no_false_alarm_in_200_seeded_normal_data_sets():
    alarms = 0
    for seed in range(200):
        rng = np.random.default_rng(seed)
        n, p = int(rng.integers(50, 1000)), int(rng.integers(3, 20))
        frame = pd.DataFrame(rng.standard_normal((n, p)), columns=[f"x{k}" for k in range(p)])
        alarms += bool(odd_values(frame, list(frame.columns)))
    assert alarms == 0  # false alarms: 0 of 200 (also 0 of 200 for rounded 1-to-5 items and for t(3) data)


def test_a_failed_estimation_names_the_values_first():
    from cfa_tool.data.readers import LoadedData
    from cfa_tool.pipeline.inputs import odd_values_named

    frame = _likert(6)
    frame.loc[[0, 1], "x1"] = -99
    loaded = LoadedData(frame, "survey.csv", odd_values=odd_values(frame, list(frame.columns)))
    with pytest.raises(EstimationError) as caught:
        with odd_values_named(loaded):
            raise EstimationError("the estimation did not converge")
    message = str(caught.value)
    assert message.index("-99") < message.index("missing_codes=[-99]") < message.index("did not converge")


def test_the_columns_skipped_before_peeling_hold_nothing_to_peel():
    """The screening peels only the columns whose highest or lowest answer lies at least the others' range beyond them
    (``_may_stand_out``, all columns at once); on seeded data with codes, far values, gaps, infinities and ties,
    every column it skips gives no finding when peeled one by one."""
    from cfa_tool.data.odd_values import _may_stand_out, _outside_scale, _peeled

    rng = np.random.default_rng(20)
    skipped = 0
    for _ in range(400):
        n, p = int(rng.integers(5, 60)), int(rng.integers(1, 6))
        X = np.round(rng.normal(3, 1, size=(n, p)), int(rng.integers(0, 3)))
        for _ in range(int(rng.integers(0, 4))):
            X[rng.integers(0, n), rng.integers(0, p)] = rng.choice([-99, 999, 9, 55, np.nan, np.inf, -np.inf, 1e308])
        with np.errstate(over="ignore", invalid="ignore"):
            kept, apart = (set(columns.tolist()) for columns in _may_stand_out(X))
            for j in set(range(p)) - kept:
                skipped += 1
                assert _peeled(X[:, j]) == [], (X[:, j], j)
            for j in set(range(p)) - apart:
                assert _outside_scale(X[:, j]) == [], (X[:, j], j)
    assert skipped > 200  # the shortcut is taken (most columns have nothing to peel)


def test_the_frame_read_once_gives_the_findings_of_the_frame():
    """Findings from the model's columns taken out once (data.moments.item_values, as fit does) equal those read
    from the frame, for numpy and nullable integer columns."""
    from cfa_tool.data.moments import item_values

    frame = _likert(3)
    frame.loc[[4, 17, 250], "x3"] = -99
    frame["x5"] = frame["x5"].astype("Int64")
    frame.loc[7, "x5"] = pd.NA
    columns = list(frame.columns)
    assert odd_values(frame, columns, None, item_values(frame, columns)) == odd_values(frame, columns) != ()
    assert item_values(frame.assign(x1=frame["x1"].astype(str)), columns) is None  # text: the frame's own path


def test_scores_of_the_fitted_file_say_its_odd_values_once(tmp_path):
    # the fit's caution about a -99 and the scored file's are the same when the file is the same: said once
    import cfa_tool

    data = _likert(4)
    data.iloc[[3, 10], 0] = -99
    path = tmp_path / "with_code.csv"
    data.to_csv(path, index=False)
    model = "factor f: " + ", ".join(data.columns[:3]) + "\nfactor g: " + ", ".join(data.columns[3:6]) + "\n"
    fitted = cfa_tool.fit(model, path)
    scores = fitted.scores(path)
    said = [p for p in scores.fit.problems if p.kind.value == fitted.problems[0].kind.value]
    assert fitted.problems and len(said) == 1 and said[0] == fitted.problems[0]


def test_a_means_row_that_stops_an_ordinal_fit_is_named_as_one_first():
    # new-user trial s8: the error on an ordinal item's answer 3.24 said "correct the value", not that the reading had
    # already found its row to be a row of means (the means are computed here by construction)
    import cfa_tool
    from cfa_tool.errors import DataError

    rng = np.random.default_rng(3)
    latent = rng.normal(size=(200, 1)) @ np.full((1, 6), 0.7) + rng.normal(scale=0.7, size=(200, 6))
    frame = pd.DataFrame(np.digitize(latent, [-1.0, -0.3, 0.3, 1.0]) + 1.0, columns=[f"q{i}" for i in range(1, 7)])
    frame.loc[len(frame)] = frame.mean().round(2)  # index label 200: the means of the rows above
    with pytest.raises(DataError) as found:
        cfa_tool.fit("factor f: q1..q6\n", frame, ordinal="all")
    message = str(found.value)
    assert message.startswith("Row labelled 200 of <data frame> holds the means of the other rows' answers")
    assert "leave it out with a row filter, keep=..." in message  # a Python caller reads the Python keyword
    assert message.index("What to try first") < message.index("has the answer") < message.index("in row labelled 200")


@pytest.mark.parametrize("value", [7, 10, 12, 20])
def test_an_answer_outside_a_bounded_answer_scale_is_named_with_item_value_and_rows(value):
    """Review s12: 12 on an item answered 1 to 5 was analysed with no word (9 is a code, 55 is far beyond, 10 to 44
    were neither).  A few cells two or more steps beyond a scale of whole numbers whose end is a common answer are
    named; 6 beside 1 to 5 may be the scale's own top answer and is left alone."""
    frame = _likert(8)
    frame.loc[[10, 200], "x2"] = value
    frame.loc[30, "x5"] = value
    frame.loc[50, "x4"] = 6
    found = odd_values(frame, list(frame.columns))
    assert [(o.kind, o.columns, o.values, o.rows, o.answers, o.others) for o in found] == [
        (OddKind.OUTSIDE_SCALE, ("x2", "x5"), (float(value),) * 2, (11, 31, 201), 3, (1.0, 5.0))]
    caution = found[0].caution("survey.csv")
    assert caution.startswith(f"2 item columns of survey.csv (x2, x5) hold the value {value} (3 answers in rows 11, "
                              f"31, 201), outside the answer scale of the other answers (1 to 5)")
    assert f"give missing_codes=[{value}]" in found[0].advice()


def test_measures_of_many_values_and_thinning_counts_are_not_judged_by_a_scale():
    """No false alarm where the values form no bounded scale: seeded counts of trips (Poisson, whose highest counts
    are rare: a tail, not the end of a scale), incomes (lognormal, rounded to whole units) and reaction times; and a
    seeded 1-to-5 scale without a stray value."""
    alarms = []
    for seed in range(100):
        rng = np.random.default_rng(seed)
        n = int(rng.integers(50, 1000))
        data = {"trips": rng.poisson(1.5, n), "income": np.round(rng.lognormal(10, 0.6, n)),
                "reaction": rng.gamma(2.0, 150.0, n), "likert": _likert(seed, n, 1)["x1"].to_numpy()}
        frame = pd.DataFrame({k: np.asarray(v, dtype=float) for k, v in data.items()})
        alarms += [(seed, o.kind, o.columns) for o in odd_values(frame, list(frame.columns))
                   if o.kind is OddKind.OUTSIDE_SCALE]
    assert alarms == []


def _skewed_ten(seed: int, n: int = 300, p: int = 5) -> pd.DataFrame:
    """Seeded answers on 0 to 10 to ``p`` items of one factor, the first skewed: most answers low, no one choosing
    9, a few (1%) choosing 10, as a reviewer's data had them (review s13)."""
    rng = np.random.default_rng(seed)
    factor = rng.standard_normal((n, 1))
    items = np.clip(np.round(5 + 2.0 * factor + 1.5 * rng.standard_normal((n, p))), 0, 10)
    skewed = np.clip(np.round(2 + 2.0 * np.abs(factor[:, 0] + rng.standard_normal(n))), 0, 8)
    skewed[rng.choice(n, 3, replace=False)] = 10
    items[:, 0] = skewed
    return pd.DataFrame(items, columns=[f"t{k + 1}" for k in range(p)])


def test_a_skewed_item_whose_second_highest_answer_no_one_chose_is_no_typing_error():
    """Review s13: the outside-the-scale caution named a 10 of a skewed 0-to-10 item whose 9 no one chose; its other
    items reach 10, so 10 is an answer of the scale (the rule: a gap in the item's own answers AND beyond the range
    the other items of its scale use; common practice of data screening)."""
    frame = _skewed_ten(1)
    first = frame["t1"]
    assert 9 not in set(first) and int((first == 10).sum()) == 3 and int((first == 8).sum()) >= 6  # pandas' counts
    assert all(frame[c].max() == 10 for c in frame.columns[1:])  # the other items use the scale's top answer
    assert [o for o in odd_values(frame, list(frame.columns)) if o.kind is OddKind.OUTSIDE_SCALE] == []
    # a 1-to-7 item whose 6 no one chose, beside items that use 7
    seven = _likert(9, 300, 4).assign(x1=lambda f: f["x1"]).astype(float)
    seven.loc[seven.index[:40], ["x2", "x3", "x4"]] = 7.0  # the other items reach 7 (and 6, 5)
    seven.loc[seven.index[40:60], ["x2", "x3", "x4"]] = 6.0
    seven.loc[seven.index[[5, 99]], "x1"] = 7.0  # x1: 1 to 5, then 7
    assert 6 not in set(seven["x1"])
    assert [o for o in odd_values(seven, list(seven.columns)) if o.kind is OddKind.OUTSIDE_SCALE] == []


def test_a_twelve_among_answers_one_to_five_is_still_named():
    frame = _likert(10)
    frame.loc[[8, 120], "x3"] = 12  # rows 9 and 121
    found = [o for o in odd_values(frame, list(frame.columns)) if o.kind is OddKind.OUTSIDE_SCALE]
    assert [(o.columns, o.values, o.rows) for o in found] == [(("x3",), (12.0,), (9, 121))]
    # the same 12 in a skewed 0-to-10 item's data lies beyond its scale too
    ten = _skewed_ten(2)
    ten.loc[[4], "t3"] = 12  # row 5; t3's answers otherwise 0 to 10
    found = [o for o in odd_values(ten, list(ten.columns)) if o.kind is OddKind.OUTSIDE_SCALE]
    assert [(o.columns, o.values, o.rows) for o in found] == [(("t3",), (12.0,), (5,))]


def test_small_answers_of_data_centred_at_zero_are_no_totals_row():
    """Each column centred at zero (as researchers centre or standardise data) sums to zero, so a row of answers
    within 0.25 of zero in every column lay within the sums rule's 0.5 of the other rows' sums and was named a
    totals row (since s14 a totals row is refused): a totals row also lies beyond the other answers' range."""
    rng = np.random.default_rng(11)
    X = rng.standard_normal((500, 3))
    frame = pd.DataFrame(X - X.mean(axis=0), columns=["z1", "z2", "z3"])  # numpy's centring
    near = int((frame.abs() <= 0.25).all(axis=1).sum())  # rows within the tolerance of the sums (pandas' count)
    assert near >= 1  # the seed gives such rows
    assert [o for o in odd_values(frame, list(frame.columns)) if o.kind is OddKind.SUMS_ROW] == []
    # a true totals row under the same data is still found
    scaled = frame + 3.0  # answers around 3, all positive
    totals = pd.concat([scaled, scaled.sum().to_frame().T], ignore_index=True)
    assert [(o.kind, o.rows) for o in odd_values(totals, list(totals.columns))] == [(OddKind.SUMS_ROW, (501,))]


def test_a_seven_among_one_to_five_answers_is_named_beside_an_item_on_one_to_seven():
    """A 7 typed twice into a 1-to-5 item is named though another item runs 1 to 7: that item shares the lowest answer
    only, so it is of another scale and hides nothing (review s14: a shared end made the 7 look like an answer of
    the scale)."""
    frame = _likert(3, 300, 4).astype(float)
    frame.loc[[5, 9], "x1"] = 7
    rng = np.random.default_rng(0)
    frame["wide"] = np.clip(np.round(frame["x2"] * 1.5 - 0.5 + rng.normal(0, 0.5, len(frame))), 1, 7)
    assert frame["wide"].min() == 1 and frame["wide"].max() == 7  # pandas: the other item runs 1 to 7
    found = [o for o in odd_values(frame, list(frame.columns)) if o.kind is OddKind.OUTSIDE_SCALE]
    assert [(o.columns, o.values[0]) for o in found] == [(("x1",), 7.0)]


def test_a_value_outside_the_scale_is_counted_in_every_item_of_the_scale_however_often_given():
    """Re-check s18 (R6): a 'don't know' code 8 among answers 1 to 4 in every item, in 1% of some items' answers and
    in 4% of others', was named in the items where it held at most 2% of the answers only (5 of 16 columns, 107 of
    432 cells), so that it read as a few typing errors.  Once the value is found outside the scale, every item of
    that scale holding it is counted, as a declared scale counts every cell outside it; the counts are pandas'."""
    rng = np.random.default_rng(4)
    n = 600
    factor = rng.standard_normal((n, 1))
    frame = pd.DataFrame(np.clip(np.round(2.5 + 0.8 * factor + 0.7 * rng.standard_normal((n, 6))), 1, 4),
                         columns=[f"x{k + 1}" for k in range(6)])
    for k, share in enumerate((0.01, 0.01, 0.04, 0.04, 0.05, 0.01)):
        frame.loc[rng.random(n) < share, f"x{k + 1}"] = 8.0
    held = (frame == 8).sum()  # pandas' counts of the 8s per column
    assert (held > 0).all() and (held / n > 0.02).sum() >= 3  # some columns beyond the 2% of the first judgement
    found = [o for o in odd_values(frame, list(frame.columns)) if o.kind is OddKind.OUTSIDE_SCALE]
    assert [(o.columns, o.values[0], o.answers, o.others) for o in found] == [
        (tuple(frame.columns), 8.0, int(held.sum()), (1.0, 4.0))]
    assert found[0].rows == tuple(int(r) + 1 for r in np.flatnonzero((frame == 8).any(axis=1)))
    assert "(x1, x2, x3 and 3 more) hold the value 8" in found[0].caution("school.csv")
    assert found[0].caution("school.csv").endswith("read as an answer: a code for no answer, or typing errors?")
    # a column of another scale (7 to 9) holding 8 among its answers is not counted
    frame["grade"] = rng.integers(7, 10, n).astype(float)
    found = [o for o in odd_values(frame, list(frame.columns)) if o.kind is OddKind.OUTSIDE_SCALE]
    assert [o.columns for o in found] == [tuple(frame.columns[:6])]
