"""explore's default items leave out a column whose values are not answers on the scale the items share (mostly
fractions, or far more values over a far wider range) and that correlates with none of them (new-user trial s17,
finding 8: years of service, 0 to 30 with one decimal, were explored among answers of 1 to 7, 14 of the 20 items
partly typed as words), with a note naming it and how to include it; such a column that goes with the items stays.
Check values: the degrees of freedom of a maximum-likelihood factor analysis, ((p - m)^2 - (p + m)) / 2 (Lawley &
Maxwell 1971, ch. 2), and the correlations the rule reads against pandas' pairwise Pearson correlations
(DataFrame.corrwith).  Invented data: a fictional transit agency's staff survey, fixed seed."""

from __future__ import annotations

import numpy as np
import pandas as pd

from cfa_tool.workflows.explore import explore, unlike_the_items

ITEMS = [f"{p}{i}" for p in ("en", "be", "au", "ba") for i in range(1, 6)]
REVERSED = {"en3", "en5", "be2", "au4", "ba2", "ba5"}
WORDED = ITEMS[1:15]  # 14 items with some answers typed as words, as in the trial's workbook


def _staff_survey(n: int = 600, seed: int = 17) -> pd.DataFrame:
    """Four factors of five items answered 1 to 7 (six reverse-keyed), 6% gaps, 6 and 7 typed as 'agree' and
    'strongly agree' in some cells of 14 items, a department and a language as text, and years of service with one
    decimal (a gamma(2, 3) variable, 0 to about 30) that has nothing to do with the answers."""
    rng = np.random.default_rng(seed)
    phi = np.array([[1, .45, .35, .40], [.45, 1, .30, .35], [.35, .30, 1, .25], [.40, .35, .25, 1]])
    eta = rng.multivariate_normal(np.zeros(4), phi, size=n)
    frame = pd.DataFrame({"department": rng.choice(["Depot", "Control room", "Ticketing"], n),
                          "language": rng.choice(["English", "Other"], n),
                          "tenure_years": np.round(rng.gamma(2, 3, n), 1)})
    for k, name in enumerate(ITEMS):
        lam = rng.uniform(.6, .8)
        y = lam * eta[:, k // 5] + np.sqrt(1 - lam ** 2) * rng.standard_normal(n)
        x = np.clip(np.round(4 + 1.3 * y), 1, 7)
        x = 8 - x if name in REVERSED else x
        column = pd.Series(x, dtype=object).mask(rng.random(n) < 0.06)
        if name in WORDED:
            typed = (rng.random(n) < 0.05) & column.isin([6.0, 7.0])
            column[typed] = column[typed].map({6.0: "agree", 7.0: "strongly agree"})
        frame[name] = column if name in WORDED else pd.to_numeric(column)
    return frame


def _answers_file(tmp_path):
    path = tmp_path / "answers.cfa"
    path.write_text('answers 1 = 1, 2 = 2, 3 = 3, 4 = 4, 5 = 5, 6 = 6, 7 = 7, "agree" = 6, "strongly agree" = 7\n')
    return path


def test_years_of_service_with_decimals_are_not_explored_among_answers_of_1_to_7(tmp_path):
    frame = _staff_survey()
    assert frame["tenure_years"].min() >= 0 and frame["tenure_years"].max() > 20
    assert frame[ITEMS[:1] + ITEMS[15:]].corrwith(frame["tenure_years"]).abs().max() < 0.30  # pandas
    result = explore(frame, answers=_answers_file(tmp_path), factors=4, replications=10)
    assert "tenure_years" not in result.items and list(result.items) == ITEMS
    note = next(str(n) for n in result.notes if str(n).startswith("Items:"))
    low, high = frame["tenure_years"].min(), frame["tenure_years"].max()
    assert (f"Left out as measures rather than answers on the 1 to 7 scale that most columns hold (mostly fractions, "
            f"or far more values over a far wider range, and no correlation of .30 or more with any item, as years "
            f"of service or an income would be): tenure_years ({low:.10g} to {high:.10g}, mostly fractions) (name them "
            f"in items=... to explore them).") in note
    # the fit of four factors counts 20 items: df ((20 - 4)^2 - (20 + 4)) / 2 = 116 (Lawley & Maxwell 1971), not the
    # 132 of 21 items the trial saw
    assert next(s for s in result.fits if s.factors == 4).solution.fit.df == 116
    named = explore(frame, items=", ".join(ITEMS[:1] + ITEMS[15:] + ["tenure_years"]), factors=1, replications=10)
    assert "tenure_years" in named.items  # named: explored


def test_an_off_scale_column_that_goes_with_the_items_stays_and_items_with_codes_or_a_stray_fraction_stay():
    frame = _staff_survey(400, seed=3)
    frame[WORDED] = frame[WORDED].replace({"agree": 6.0, "strongly agree": 7.0}).astype(float)  # all numbers
    rng = np.random.default_rng(5)
    base = frame[ITEMS[15:]].mean(axis=1)
    # hours of overtime a month, with decimals, that go with the last factor's answers
    frame["overtime_hours"] = np.round(np.clip(12 - 2.5 * base + rng.normal(0, 1.5, len(frame)), 0, None), 1)
    frame["birth_year"] = rng.integers(1960, 2006, len(frame)).astype(float)  # many whole values, far off 1 to 7
    frame["ba1"] = frame["ba1"].mask(rng.random(len(frame)) < 0.03, 99.0)  # an item with a missing-value code
    frame.loc[[4, 9], "ba2"] = 3.5  # an item with two fractions: still answers on the scale
    assert frame[ITEMS].corrwith(frame["overtime_hours"]).abs().max() >= 0.30  # pandas: it goes with the items
    assert frame[ITEMS].corrwith(frame["birth_year"]).abs().max() < 0.30  # pandas
    found = unlike_the_items(frame, ITEMS + ["overtime_hours", "birth_year"])
    assert found.scale == (1.0, 7.0) and found.groupings == ()
    assert found.off_scale == (("birth_year", frame["birth_year"].min(), frame["birth_year"].max(), False),)
    result = explore(frame, factors=4, replications=10)
    assert "overtime_hours" in result.items and "ba1" in result.items and "ba2" in result.items
    assert "birth_year" not in result.items
    note = next(str(n) for n in result.notes if str(n).startswith("Items:"))
    assert (f"birth_year ({frame['birth_year'].min():g} to {frame['birth_year'].max():g}, "
            f"{frame['birth_year'].nunique()} different values)") in note


def test_the_correlations_are_read_against_the_items_typed_partly_as_words_too():
    frame = _staff_survey(400, seed=11)
    rng = np.random.default_rng(9)
    # related to the second factor, whose items be1..be5 hold words: the items of numbers alone would miss it
    be = frame[["be1", "be3", "be4"]].apply(pd.to_numeric, errors="coerce")
    score = (be["be1"] + be["be3"] + be["be4"]).fillna(12)
    frame["commute_km"] = np.round(np.clip(3 * score + rng.normal(0, 3, len(frame)), 0, None), 1)
    numeric = ["en1"] + ITEMS[15:]
    worded = [c for c in ITEMS if c not in numeric]
    assert be.corrwith(frame["commute_km"]).abs().max() >= 0.30  # pandas, the cells of numbers
    assert frame[numeric].corrwith(frame["commute_km"]).abs().max() < 0.30  # pandas
    assert [f[0] for f in unlike_the_items(frame, numeric + ["commute_km"]).off_scale] == ["commute_km"]
    assert unlike_the_items(frame, numeric + ["commute_km"], worded).off_scale == ()


def _school_survey(n: int = 500, seed: int = 18) -> pd.DataFrame:
    """Eight items answered 1 to 4 under two factors, about 5% of the cells coded 8 ('don't know') or 9 ('no
    answer'), and the students' grade, 7 to 9, unrelated to the answers."""
    rng = np.random.default_rng(seed)
    eta = rng.multivariate_normal([0, 0], [[1, .4], [.4, 1]], size=n)
    frame = pd.DataFrame({"grade": rng.integers(7, 10, n)})
    for k in range(8):
        x = np.clip(np.round(2.5 + 0.9 * (0.7 * eta[:, k // 4] + 0.7 * rng.standard_normal(n))), 1, 4)
        x[rng.random(n) < 0.05] = rng.choice([8, 9])
        frame[f"b{k + 1}"] = x
    return frame


def test_a_grade_is_not_taken_for_an_item_whose_missing_codes_empty_it():
    # new-user trial s18 (03): with --missing-codes 8,9 explore took grade (7 to 9) for an item on a scale of 1 to 9
    # (the codes among the items' answers), emptied its 8s and 9s as 'no answer' and called it constant
    frame = _school_survey()
    result = explore(frame, missing_codes=(8, 9), factors=2, replications=10)
    assert list(result.items) == [f"b{k}" for k in range(1, 9)]
    notes = " ".join(str(n) for n in result.notes)
    assert ("Left out as groupings or records rather than answers (a few whole values, most of them above the 1 to 4 "
            "that most columns hold, and no correlation of .30 or more with any item, as a grade or a year would "
            "be): grade (7 to 9)") in notes
    assert "constant" not in notes and "(grade " not in notes


def test_a_grade_is_not_taken_for_an_item_when_only_one_code_of_two_is_given():
    # re-check s18 (R6): with --missing-codes 9 alone, the items' 8 ('don't know', in every item) made their scale 1 to
    # 8, and grade (7 to 9) entered the items with its 9s emptied; the 8 lies outside the answer scale of the items
    # (data.odd_values), so the scale they share is 1 to 4, and the caution counts the 8 in every item
    frame = _school_survey(seed=21).replace({8.0: 9.0})  # the items' codes all 9 ('no answer'); grade keeps its 8s
    frame["grade"] = _school_survey(seed=21)["grade"]
    rng = np.random.default_rng(2)
    for k, share in enumerate((0.01, 0.03, 0.01, 0.03, 0.04, 0.01, 0.03, 0.01)):  # then 8 ('don't know') in each
        frame.loc[rng.random(len(frame)) < share, f"b{k + 1}"] = 8.0
    eights = (frame[[f"b{k}" for k in range(1, 9)]] == 8).sum()  # pandas
    assert (eights > 0).all()
    result = explore(frame, missing_codes=(9,), factors=2, replications=10)
    assert list(result.items) == [f"b{k}" for k in range(1, 9)]
    notes = " ".join(str(n) for n in result.notes)
    assert "Left out as groupings or records rather than answers (a few whole values, most of them above the 1 to 4 " \
           "that most columns hold" in notes and "grade (7 to 9)" in notes
    caution = next(str(p) for p in result.problems() if "hold the value 8" in str(p))
    assert caution.startswith(f"8 item columns of <data frame> (b1, b2, b3 and 5 more) hold the value 8 "
                              f"({int(eights.sum())} answers")
