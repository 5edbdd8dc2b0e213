"""A survey export with resubmissions (new-user trial s24): the same respondent id on two rows whose submission
times differ.  The repeated-ids caution advised only 'correct the ids in a copy'; where a column other than the id
and the items tells each id's later rows from every other row, it now writes the row filter that keeps each id's first
row, and that filter, given back, leaves one row per id (checked by pandas' own duplicated(), not the tool's)."""
from __future__ import annotations

import re

import numpy as np
import pandas as pd

import cfa_tool

MODEL = "factor warm: w1, w2, w3, w4\n"


def _export(seed: int = 24) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    n = 300
    f = rng.normal(size=n)
    items = {f"w{k}": np.clip(np.round(3 + 0.8 * f + rng.normal(scale=0.8, size=n)), 1, 5) for k in range(1, 5)}
    frame = pd.DataFrame({"rid": [f"R{i:04d}" for i in range(n)],
                          "submitted": [f"2026-03-01 10:{i // 10:02d}:{i % 10:02d}" for i in range(n)], **items})
    again = frame.iloc[::40].copy()  # 8 people submitted a second time, an hour later, answering a little otherwise
    again["submitted"] = [f"2026-03-01 11:{k:02d}:00" for k in range(len(again))]
    again["w1"] = np.clip(again["w1"] + 1, 1, 5)
    return pd.concat([frame, again], ignore_index=True)


def _advice(result) -> str:
    [caution] = [p for p in result.problems if "ids each to more than one row" in str(p.explanation)]
    return " ".join(str(caution.advice).split())


def test_resubmissions_get_the_filter_that_keeps_each_persons_first_row():
    data = _export()
    advice = _advice(cfa_tool.check(MODEL, data, id_column="rid"))
    found = re.search(r"keep=\['(submitted not in [^']*)'\]", advice)  # (the Python API's form of --keep)
    assert found and "submitted twice" in advice
    kept = cfa_tool.check(MODEL, data, id_column="rid", keep=[found.group(1)])
    assert not [p for p in kept.problems if "more than one row" in str(p.explanation)]
    left = data[~data["submitted"].isin([v.strip(' "') for v in found.group(1)[len("submitted not in "):].split('", "')])]
    assert len(left) == 300 and not left["rid"].duplicated().any()  # pandas: one row per id, the first ones


def test_no_filter_is_written_where_no_column_tells_the_later_rows_apart():
    data = _export()
    data["submitted"] = "2026-03-01"  # the same time on every row: nothing tells a resubmission apart
    advice = _advice(cfa_tool.check(MODEL, data, id_column="rid"))
    assert "keep=" not in advice and "correct the ids in a copy" in advice


def test_a_second_submission_with_the_same_answers_is_named_first_as_such():
    # new-user trial s27: the same id, the same answers to every item and a later time was told only 'a typing
    # error?'; it is now a caution of its own, first, with the filter that leaves the later row out
    from cfa_tool.assessment.admissibility import ProblemKind

    data = _export()
    again = data.iloc[[5]].copy()
    again["submitted"] = "2026-03-02 09:05:00"  # R0005 once more, the same answers a day later
    data = pd.concat([data, again], ignore_index=True)
    for result in (cfa_tool.check(MODEL, data, id_column="rid"), cfa_tool.fit(MODEL, data, id_column="rid"),
                   cfa_tool.fit(MODEL, data.rename(columns={"rid": "RespondentID"}))):  # given, or an id by its name
        twice = [p for p in result.problems if p.kind is ProblemKind.SUBMITTED_TWICE]
        assert twice and result.problems[0] is twice[0]
        words = " ".join(str(twice[0].explanation).split())
        # a data frame's rows by their index labels: R0005 at 5, the appended row at 308 (300 + 8 rows before it)
        assert words.startswith("Submitted twice? In rows labelled 5, 308 ('R0005'), the later row gives the same id (")
        assert "and the same answers to every item as an earlier row." in words
        assert "submitted not in" in str(twice[0].advice)
        # the 8 resubmissions with other answers stay in the caution on repeated ids, which no longer names R0005
        [other] = [p for p in result.problems if p.kind is ProblemKind.REPEATED_IDS]
        assert "gives 8 ids each to more than one row" in " ".join(str(other.explanation).split())
        assert "R0005" not in str(other.explanation)
    # the filter it writes, given back, leaves each id's first row (pandas' duplicated(), not the tool's)
    found = re.search(r"keep=\['(submitted not in [^']*)'\]", str(twice[0].advice))
    assert found and found.group(1) == 'submitted not in "2026-03-02 09:05:00"'
    kept = cfa_tool.check(MODEL, data, id_column="rid", keep=[found.group(1)])
    assert not [p for p in kept.problems if p.kind is ProblemKind.SUBMITTED_TWICE]
    left = data[data["submitted"] != "2026-03-02 09:05:00"]
    assert len(left) == 308 and left["rid"].duplicated().sum() == 8  # pandas: R0005 once, the 8 others as before


def test_without_an_id_a_second_submission_is_a_copy_but_for_its_time_stamp():
    # new-user trial s27: without an id the caution on copies needed every column identical, which a submission's
    # time stamp never is; the stamp is now left out of the comparison there, and the filter is written by it
    from cfa_tool.assessment.admissibility import ProblemKind
    from cfa_tool.data.copied_rows import time_stamp_column

    data = _export().drop_duplicates("rid").rename(columns={"rid": "email"})  # no column named as an id
    again = data.iloc[[5]].copy()
    again["submitted"] = "2026-03-02 09:05:00"
    data = pd.concat([data, again], ignore_index=True)
    assert time_stamp_column(data) == "submitted" and time_stamp_column(data, {"submitted"}) is None
    checked = cfa_tool.check(MODEL, data)
    [copies] = [p for p in checked.problems if p.kind is ProblemKind.COPIED_ROWS]
    words = " ".join(str(copies.explanation).split())
    # a data frame's rows by index label: R0005 at 5, the appended row at 300 (300 rows before it)
    assert words.startswith("1 of the 301 rows analysed is identical in every column but the time stamp 'submitted' "
                            "to an earlier row: row labelled 300 repeats row labelled 5 (submitted twice?)")
    assert "keep=['submitted not in \"2026-03-02 09:05:00\"']" in str(copies.advice)
    # the same time on both rows: a copy as before, no word of a second submission
    data.loc[300, "submitted"] = data.loc[5, "submitted"]
    [copies] = [p for p in cfa_tool.check(MODEL, data).problems if p.kind is ProblemKind.COPIED_ROWS]
    assert "submitted twice" not in str(copies.explanation)


def test_without_an_id_or_any_column_telling_respondents_apart_a_second_submission_is_named_by_its_rows(tmp_path):
    # fixleft s28: a file of a time stamp, a team and the items alone (no id, no e-mail) named no second submission,
    # since answers alike by chance needed a column that tells respondents apart; rows that repeat an earlier row in
    # every column but the stamp are named when they are few (data.copied_rows.few_repeats)
    from cfa_tool.assessment.admissibility import ProblemKind

    rng = np.random.default_rng(28)
    n = 300
    f = rng.normal(size=n)
    items = {f"w{k}": np.clip(np.round(4 + 1.2 * f + rng.normal(scale=0.9, size=n)), 1, 7) for k in range(1, 7)}
    data = pd.DataFrame({"Timestamp": [f"2026-03-01 10:{i // 10:02d}:{i % 10:02d}" for i in range(n)],
                         "Team": [f"T{i % 20:02d}" for i in range(n)], **items})
    data = data.drop_duplicates(list(items) + ["Team"], ignore_index=True)  # no respondents alike by chance
    again = data.iloc[[120]].copy()
    again["Timestamp"] = "2026-03-04 09:05:00"
    path = tmp_path / "export.csv"
    pd.concat([data, again], ignore_index=True).to_csv(path, index=False)
    six = "factor warm: w1, w2, w3, w4, w5, w6\n"
    [copies] = [p for p in cfa_tool.check(six, path).problems if p.kind is ProblemKind.COPIED_ROWS]
    words = " ".join(str(copies.explanation).split())
    last = len(data) + 2  # the appended row's number in the file (the header is row 1)
    assert f"row {last} repeats row 122 (submitted twice?)" in words, words
    # answers alike by chance are common on 4 items of 2 answers: many rows repeat others, none named as copies
    common = pd.DataFrame({"Timestamp": data["Timestamp"],
                           **{f"w{k}": (data[f"w{k}"] > 4).astype(int) for k in range(1, 5)}})
    common.to_csv(path, index=False)
    assert not [p for p in cfa_tool.check(MODEL, path).problems if p.kind is ProblemKind.COPIED_ROWS]
