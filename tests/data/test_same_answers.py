"""Rows that gave one answer to every item, reverse-worded ones included (data.same_answers): a long string of
identical answers, the simplest index of careless responding (Johnson 2005; Curran 2016).  The expected rows are
planted by construction in simulated answers (a fixed seed), so the test knows them without the tool."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.data.same_answers import same_answer_rows
from cfa_tool.version import __version__
from tests.conftest import five_point_answers

MODEL = "factor f: a1, a2, a3, a4\nfactor g: b1, b2, b3, b4\n"
REVERSED = "reversed a2, b3 on 1 to 5\n"


def _answers(seed: int = 5) -> pd.DataFrame:
    """Two factors of four five-point items, a2 and b3 reverse-keyed (negative population loadings), N = 300."""
    frame = five_point_answers(300, seed)
    frame.insert(0, "respondent", [f"P{k:03d}" for k in range(1, 301)])
    return frame


def _planted(frame: pd.DataFrame) -> pd.DataFrame:
    frame = frame.copy()
    items = [c for c in frame.columns if c != "respondent"]
    frame.loc[6, items] = 5.0  # row 7: 5 to every item
    frame.loc[40, items] = 1.0  # row 41: 1 to every item ...
    frame.loc[40, "a1"] = np.nan  # ... but one it left blank
    frame.loc[99, items] = 3.0  # row 100: 3 to all but one
    frame.loc[99, "b4"] = 4.0
    return frame


def test_the_rows_with_one_answer_throughout_are_found():
    values = np.array([[5, 5, 5, 5], [1, 1, np.nan, 1], [3, 3, 3, 4], [2, 2, np.nan, np.nan], [np.nan] * 4, [4, 4, 4, 4]],
                      dtype=float)
    reversed_items = np.array([False, True, False, False])
    found = same_answer_rows(values, np.arange(1, 7), reversed_items)
    # rows 1, 2, 4 and 6 answered one value throughout (rows 2 and 4 with gaps: row 4 answered half the items, the
    # least that counts, the reversed a2 among them); row 3 did not; row 5 answered nothing
    assert found.rows == (1, 2, 4, 6) and found.answers == (5.0, 1.0, 2.0, 4.0)
    assert found.items == 4 and found.reversed_items == 1
    # a row that skipped every reverse-keyed item does not contradict itself
    assert same_answer_rows(np.array([[5, np.nan, 5, 5]]), np.array([1]), reversed_items) is None
    # without reverse-keyed items there is nothing to judge
    assert same_answer_rows(values, np.arange(1, 7), np.zeros(4, dtype=bool)) is None


def test_fit_and_scores_name_the_rows_first_by_their_ids_and_keep_them():
    frame = _planted(_answers())
    result = cfa_tool.fit(MODEL + REVERSED, frame, id_column="respondent")
    first = result.problems[0]
    assert first.kind is ProblemKind.SAME_ANSWER_ROWS and not first.kind.inadmissible and result.admissible
    assert first.value == 2.0
    assert "2 rows gave one answer each (1, 5)" in first.explanation
    assert "rows labelled 6 (P007), 40 (P041)" in first.explanation and "P100" not in first.explanation
    assert result.n_obs == 300  # kept in the analysis
    scored = cfa_tool.scores(MODEL + REVERSED, frame, id_column="respondent")
    assert scored.fit.problems[0] == first
    assert scored.table["respondent"].tolist()[6] == "P007" and not np.isnan(scored.table.iloc[6, 1])
    # the same data without a 'reversed' statement: the fit's loadings key a2 and b3 as reversed (as its report
    # says), so one answer throughout contradicts them too (new-user trial s18: explore's draft model declares none)
    [keyed] = [p for p in cfa_tool.fit(MODEL, frame).problems if p.kind is ProblemKind.SAME_ANSWER_ROWS]
    assert keyed.value == 2.0 and "the 2 items loading against their factors (reversed in the keyed sums)" in str(
        keyed.explanation)
    # and data without such rows have no caution (common practice: no false alarm on ordinary answers)
    assert not any(p.kind is ProblemKind.SAME_ANSWER_ROWS for p in cfa_tool.fit(MODEL + REVERSED, _answers()).problems)


def test_the_middle_answer_is_its_own_reversal_and_skipped_items_are_not_counted():
    # a hostile trial: on 1 to 5 the answer 3 reverses to 5 + 1 - 3 = 3 (the keyed-sum rule of the 'reversed'
    # statement, worked by hand), so a row of 3s agrees with the keying; it was called 'agreeing alike with an item
    # and its reversal'. A row that skipped a reversed item was said to have answered 'the 2 reverse-worded items'.
    reversed_items = np.array([False, True, False, True])
    middles = np.array([np.nan, 3.0, np.nan, 3.0])
    values = np.array([[3, 3, 3, 3], [4, np.nan, 4, 4], [5, 5, 5, 5]], dtype=float)
    found = same_answer_rows(values, np.array([4, 8, 9]), reversed_items, middles)
    assert found.rows == (4, 8, 9) and found.contradicts == (False, True, True)
    assert found.reversed_answered == (2, 1, 2) and found.reversed_items == 2
    # on 1 to 6 no whole answer is its own reversal (3.5): 3 everywhere contradicts the keying
    assert same_answer_rows(values[:1], np.array([4]), reversed_items, np.array([np.nan, 3.5, np.nan, 3.5])).contradicts == (True,)

    frame = _answers()
    items = [c for c in frame.columns if c != "respondent"]
    frame.loc[3, items] = 3.0  # row 4: the middle answer throughout
    frame.loc[7, items] = 4.0  # row 8: 4 throughout, but b3 (reversed) left blank
    frame.loc[7, "b3"] = np.nan
    text = str(cfa_tool.fit(MODEL + REVERSED, frame, id_column="respondent").problems[0].explanation)
    said_of_row_4 = text[text.index("P004"):]
    assert "1 row gave the answer 4" in text and "agreeing alike" in text.split("P004")[0]
    assert "agreeing alike" not in said_of_row_4 and "middle of the scale" in said_of_row_4
    assert "7 (P008; 1 of the 2 reverse-worded items answered)" in text
    assert "the 2 reverse-worded items included" not in text


def test_a_reversed_scale_wider_than_every_answer_is_named_first(rider_demo, rider_model):
    # a hostile trial: 'reversed short_wait, clean on 1 to 7' on answers from 1 to 5 was taken silently and shifted
    # the keyed sums' means by 2. The keyed sum is recomputed here with pandas (x counts as 1 + 7 - x, the statement's
    # rule) as the check value of the shift the caution names.
    data = rider_demo.copy()
    data["short_wait"] = 6 - data["short_wait"]
    data["clean"] = 6 - data["clean"]
    assert data[["on_time", "short_wait", "accurate_info", "clean"]].max().max() == 5
    wide = cfa_tool.fit(rider_model + "reversed short_wait, clean on 1 to 7\n", data)
    right = cfa_tool.fit(rider_model + "reversed short_wait, clean on 1 to 5\n", data)
    first = wide.problems[0]
    assert first.kind is ProblemKind.SCALE_ENDS_UNREACHED
    assert "declares answers from 1 to 7 for short_wait, clean, but no answer of the items it covers reaches 7" in first.explanation
    assert "run from 1 to 5" in first.explanation and "each reversed answer counts 2 too high" in first.explanation
    assert not any(p.kind is ProblemKind.SCALE_ENDS_UNREACHED for p in right.problems)
    punctuality = next(r for r in wide.groups[0].reliability if r.factor == "punctuality")
    items = list(punctuality.items)
    complete = data[items].dropna()
    by_hand = sum((8 - complete[x]) if x == "short_wait" else complete[x] for x in items)
    assert punctuality.sum_score_mean == pytest.approx(by_hand.mean(), abs=0.05)  # the tool's rows may keep gaps
    other = next(r for r in right.groups[0].reliability if r.factor == "punctuality")
    assert punctuality.sum_score_mean - other.sum_score_mean == pytest.approx(2.0, abs=1e-9)


@pytest.mark.parametrize("saved", [False, True])
def test_scores_of_other_data_name_that_files_rows_and_say_which_are_the_fits(saved, tmp_path):
    # a new-user trial: scores --from-fit on a new wave named the earlier file's same-answer rows (some beyond the
    # new file's length) and missed the new file's own.  The rows are planted by construction (a fixed seed)
    import json

    from cfa_tool.workflows.factor_scores import ABOUT_THE_FIT, score_with_fit, score_with_saved_fit

    result = cfa_tool.fit(MODEL + REVERSED, _planted(_answers()), id_column="respondent")  # rows 7 and 41
    wave = _answers(seed=6).iloc[:50].reset_index(drop=True)
    items = [c for c in wave.columns if c != "respondent"]
    wave.loc[2, items] = 2.0  # row 3 of the new wave: 2 to every item
    if saved:
        path = tmp_path / "fit.json"
        path.write_text(json.dumps({"tool": "cfa-tool", "version": __version__, **result.to_dict()}))
        scored = score_with_saved_fit(MODEL + REVERSED, path, wave, id_column="respondent")
    else:
        scored = score_with_fit(result, wave, id_column="respondent")
    same = [p for p in scored.fit.problems if p.kind is ProblemKind.SAME_ANSWER_ROWS]
    own = same[0]
    assert own.value == 1.0 and "row labelled 2 (P003)" in own.explanation and "scored like every row" in own.explanation
    assert not str(own.explanation).startswith(ABOUT_THE_FIT) and "fit again" not in own.advice
    # the earlier fit's rows are still said, as the fit's
    assert [str(p.explanation).startswith(ABOUT_THE_FIT) for p in same[1:]] == [True]
    assert "rows labelled 6 (P007), 40 (P041)" in same[1].explanation
    assert all(str(p.explanation).startswith(ABOUT_THE_FIT) for p in scored.fit.problems[1:])
    assert not np.isnan(scored.table.iloc[2, 1])  # scored like every row
    # the scores file marks the row (a plain column, 1 or 0), the scored file's own rows only
    assert scored.table["same_answer_to_every_item"].tolist() == [1 if k == 2 else 0 for k in range(50)]


def test_the_scores_file_marks_the_same_answer_rows():
    frame = _planted(_answers())
    table = cfa_tool.scores(MODEL + REVERSED, frame, id_column="respondent").table
    assert list(table.columns[-2:]) == ["same_answer_to_every_item", "why_not_scored"]
    assert table.loc[table["same_answer_to_every_item"] == 1, "respondent"].tolist() == ["P007", "P041"]
    # without a 'reversed' statement no row is judged: the column is there all the same, empty
    plain = cfa_tool.scores(MODEL, frame).table
    assert list(plain.columns[-2:]) == ["same_answer_to_every_item", "why_not_scored"]
    assert plain["same_answer_to_every_item"].isna().all()


def test_one_reverse_worded_item_is_counted_in_the_singular():
    # hostile s25b case 10: one item declared reversed gave 'the 1 reverse-worded items included', and keys by the
    # loadings' signs 'the 1 items loading against their factors' (numbers.counted is the one rule of a count)
    frame = _planted(_answers())
    [declared] = [p for p in cfa_tool.fit(MODEL + "reversed a2 on 1 to 5\n", frame).problems
                  if p.kind is ProblemKind.SAME_ANSWER_ROWS]
    text = " ".join(str(declared.explanation).split())
    assert "the 1 reverse-worded item included" in text and "reverse-worded items" not in text
    # by the signs: a model of a1..a4 alone, where a2 alone loads against its factor (its population loading negative)
    [keyed] = [p for p in cfa_tool.fit("factor f: a1, a2, a3, a4\n", frame).problems
               if p.kind is ProblemKind.SAME_ANSWER_ROWS]
    text = " ".join(str(keyed.explanation).split())
    assert "the 1 item loading against its factor (reversed in the keyed sums) included" in text
    assert "1 items" not in text
