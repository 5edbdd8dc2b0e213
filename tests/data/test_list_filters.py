"""A row filter with a list of values, 'COLUMN in V1, V2, ...' and 'COLUMN not in V1, V2, ...' (new-user trial s19,
finding 08: the careless-responding caution named 30 ids and advised a row filter, --keep had no list form, so it took
30 options and the methods paragraph said 30 clauses "student_id was not S-00601, ...").  The list is one filter, one
note and one clause with its count; the JSON keeps it as written, every value; the caution's advice writes the exact
filter from the ids.  Check values: the fit of the rows pandas keeps itself (``Series.isin``), and the rows the test
planted.  Data: simulated answers (a fixed seed) of invented respondents."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.data.filters import apply_filters, parse_filter
from cfa_tool.errors import OptionError
from cfa_tool.note_parts import Command, Note
from cfa_tool.reporting.paragraph import methods_paragraph
from tests.conftest import five_point_answers, run_cli

MODEL = "factor f: a1, a2, a3, a4\nfactor g: b1, b2, b3, b4\nreversed a2, b3 on 1 to 5\n"
CARELESS = list(range(100, 130))  # the positions of 30 rows answering 1 to every item


def careless_answers(seed: int = 19) -> pd.DataFrame:
    """400 simulated respondents (tests.conftest.five_point_answers), the 30 at :data:`CARELESS` answering 1 to
    every item; an id, a school and a sex column."""
    frame = five_point_answers(400, seed)
    frame.loc[CARELESS, list(frame.columns)] = 1.0
    # the planted rows alone answer alike throughout: a row of the draw that did by chance (the draws of numpy's
    # default factor differ between machines) has its first answer changed
    alike = (frame.nunique(axis=1) <= 1) & ~frame.index.isin(CARELESS)
    frame.loc[alike, "a1"] = np.where(frame.loc[alike, "a1"] == 1, 2.0, 1.0)
    frame.insert(0, "student_id", [f"S-{k:05d}" for k in range(1, 401)])
    frame.insert(1, "school", [f"School {k % 8 + 1}" for k in range(400)])
    frame.insert(2, "sex", ["girl", "boy"] * 200)
    return frame


_answers = careless_answers


def test_a_list_keeps_the_rows_with_one_of_its_values_or_none_of_them():
    frame = _answers()
    kept, notes, [counted] = apply_filters(frame, [parse_filter("school in School 1, School 2")], "f.csv")
    assert kept.index.tolist() == frame.index[frame["school"].isin(["School 1", "School 2"])].tolist()
    assert notes == ["row filter 'school in School 1, School 2' kept 100 of 400 rows"]
    assert counted.in_words() == 'school was one of "School 1", "School 2"'  # values of several words quoted
    ids = frame["student_id"][CARELESS].tolist()
    text = "student_id not in " + ", ".join(ids)
    kept, notes, [counted] = apply_filters(frame, [parse_filter(text)], "f.csv")
    assert kept.index.tolist() == frame.index[~frame["student_id"].isin(ids)].tolist()
    assert notes == ["row filter 'student_id not in S-00101, S-00102, S-00103, ... (30 values)' kept 370 of 400 rows"]
    assert counted.in_words() == "student_id was none of 30 listed values: S-00101, S-00102, S-00103, ..."
    numbers, _, _ = apply_filters(frame, [parse_filter("a1 not in 1, 2")], "f.csv")  # numbers compared as numbers
    assert len(numbers) == int((~frame["a1"].isin([1.0, 2.0])).sum())
    quoted = parse_filter('school in "School 1, annex", School 2')  # a value with a comma, in double quotes
    assert quoted.value == ("School 1, annex", "School 2")


def test_the_fit_the_methods_paragraph_and_the_json_say_the_list_once(tmp_path, capsys):
    frame = _answers()
    ids = frame["student_id"][CARELESS].tolist()
    text = "student_id not in " + ", ".join(ids)
    result = cfa_tool.fit(MODEL, frame, keep=[text])
    reference = cfa_tool.fit(MODEL, frame[~frame["student_id"].isin(ids)].reset_index(drop=True))
    assert result.n_obs == 370 and result.fit.chi_square == pytest.approx(reference.fit.chi_square, rel=1e-10)
    paragraph = methods_paragraph(result)
    assert ("N = 370 of the 400 rows in the data file, those where student_id was none of 30 listed values: "
            "S-00101, S-00102, S-00103, ...") in paragraph
    assert result.to_dict()["data"]["row_filters"] == [text]  # every value, as written
    # the same rows left out by 30 filters of one column: one clause too
    many = cfa_tool.fit(MODEL, frame, keep=[f"student_id != {i}" for i in ids])
    assert many.fit.chi_square == pytest.approx(reference.fit.chi_square, rel=1e-10)
    assert "was none of 30 listed values: S-00101, S-00102, S-00103, ..." in methods_paragraph(many)
    assert "was not S-" not in methods_paragraph(many)


@pytest.mark.parametrize("text, words", [
    ("student_id not in", "no values after 'not in'"),
    ("student_id not in S-00101,, S-00102", "value 2 of the list is empty after 'S-00101'"),
    ("student_id in S-00101, S-00101", "'S-00101' is listed twice"),
    ('school in "School 1, School 2', "a double quote in the list of values is not closed"),
])
def test_a_bad_list_is_refused_naming_the_option_and_the_value(tmp_path, capsys, text, words):
    with pytest.raises(OptionError) as caught:
        cfa_tool.fit(MODEL, _answers(), keep=[text])
    assert words in str(caught.value) and f"keep=[{text!r}]" in str(caught.value)
    data, model = tmp_path / "answers.csv", tmp_path / "m.cfa"
    _answers().to_csv(data, index=False)
    model.write_text(MODEL)
    code, _, err = run_cli(["fit", model, "--data", data, "--keep", text], capsys)
    assert code == 2 and len(err.strip().splitlines()) == 1
    assert words in err and "--keep" in err


def test_the_careless_rows_caution_gives_the_one_filter_that_leaves_them_out():
    frame = _answers()
    result = cfa_tool.fit(MODEL, frame, id_column="student_id")
    [caution] = [p for p in result.problems if p.kind is ProblemKind.SAME_ANSWER_ROWS]
    assert isinstance(caution.advice, Note)
    commands = [p.text for p in caution.advice.parts if isinstance(p, Command)]
    ids = frame["student_id"][CARELESS].tolist()
    assert commands == [f": keep=['student_id not in {', '.join(ids)}']"]  # from Python, as Python writes it
    words = "".join(p for p in caution.advice.parts if isinstance(p, str))  # what the Word file keeps
    assert "a row filter that lists their ids; or deleting them" in words and "keep" not in words
    refit = cfa_tool.fit(MODEL, frame, id_column="student_id", keep=[commands[0][len(": keep=['"):-2]])
    assert refit.n_obs == 370 and not [p for p in refit.problems if p.kind is ProblemKind.SAME_ANSWER_ROWS]
    without_ids = cfa_tool.fit(MODEL, frame.drop(columns="student_id"))
    [caution] = [p for p in without_ids.problems if p.kind is ProblemKind.SAME_ANSWER_ROWS]
    commands = [p.text for p in caution.advice.parts if isinstance(p, Command)]
    assert commands == [", --keep; from Python, keep=[...], such as 'ID_COLUMN not in ID1, ID2, ...'"]


def test_a_value_of_several_words_reads_as_one_value_in_the_methods_words():
    """new-user trial s19: 'those where gender was not prefer not to say' read as a garbled sentence; the value is
    quoted when it holds several words, a one-word value is not."""
    assert parse_filter('gender != "prefer not to say"').in_words() == 'gender was not "prefer not to say"'
    assert parse_filter("department != Audit").in_words() == "department was not Audit"


def test_several_exclusions_of_one_column_are_one_note_as_they_are_one_clause():
    # s20: 30 filters 'student_id != ...' gave 30 notes while the methods paragraph said one clause; the notes follow
    # the same merge (data.filters.merged_exclusions).  Check values: the 30 planted rows, and pandas' own count of
    # the rows of 'School 1' among the 370 left (Series.isin).
    frame = _answers()
    ids = frame["student_id"][CARELESS].tolist()
    filters = [parse_filter(f"student_id != {i}") for i in ids]
    kept, notes, counted = apply_filters(frame, filters, "f.csv")
    assert len(counted) == 30 and kept.index.tolist() == frame.index[~frame["student_id"].isin(ids)].tolist()
    assert notes == ["30 row filters 'student_id != ...', read as one: 'student_id not in S-00101, S-00102, "
                     "S-00103, ... (30 values)' kept 370 of 400 rows"]
    # another filter between them (on a column the 30 rows all answered 1), and a value no row has: still one note,
    # at the first one's place, with the rows the 30 left out in all (pandas' count: Series.isin)
    between = filters[:10] + [parse_filter("a1 != 5")] + filters[10:] + [parse_filter("student_id != X-1")]
    _, notes, _ = apply_filters(frame, between, "f.csv")
    fives = int((frame["a1"][~frame["student_id"].isin(ids[:10])] == 5).sum())
    assert notes == ["31 row filters 'student_id != ...', read as one: 'student_id not in S-00101, S-00102, S-00103, "
                     "... (31 values)' left out 30 rows in all; no row has 'X-1' in 'student_id' (values present: "
                     + notes[0].split("(values present: ")[1],
                     f"row filter 'a1 != 5' kept {390 - fives} of 390 rows"]
    assert fives > 0  # the filter between had rows of its own to leave out
    # the notes a fit carries, beside its one clause of the methods paragraph
    many = cfa_tool.fit(MODEL, frame, keep=[f"student_id != {i}" for i in ids])
    said = [str(n) for n in many.warnings if "row filter" in str(n)]
    assert len(said) == 1 and "30 row filters 'student_id != ...'" in said[0]
    # and the data line of every view quotes them as that one list (reporting.tables.selection_phrase)
    text = " ".join(str(many).split())
    assert ("370 rows analysed of 370 kept by the row filter 'student_id not in S-00101, S-00102, S-00103, ... "
            "(30 values)' (400 rows in the file)") in text and "'student_id != S-00102'" not in text


def test_an_error_about_the_rows_kept_quotes_the_clause_concerned_not_every_value():
    # s20: messages quoted a list filter whole (350 ids: a message of 3,353 characters); they quote the clause
    # concerned and the list cut to three values with its count, as the notes do

    from cfa_tool.errors import DataError

    frame = _answers()
    frame.loc[frame["school"] == "School 1", "a1"] = np.nan  # invented: a1 not asked at School 1 (50 rows: 400 / 8)
    others = frame["student_id"][frame["school"] != "School 1"].tolist()
    with pytest.raises(DataError) as caught:
        cfa_tool.fit("factor f: a1, a2, a3, a4\n", frame, keep=["student_id not in " + ", ".join(others), "sex = girl"])
    said = str(caught.value)
    assert ("column 'a1' has no answers in the 50 rows kept by keep=['student_id not in S-00002, S-00003, S-00004, "
            "... (350 values)', 'sex = girl']") in said and len(said) < 400 and others[-1] not in said
    # several '!=' of one column: quoted as the one list they make
    with pytest.raises(DataError) as caught:
        cfa_tool.fit("factor f: a1, a2, a3, a4\n", frame, keep=[f"student_id != {i}" for i in others[:40]]
                     + ["school = School 1"])
    assert "kept by keep=['student_id not in S-00002, S-00003, S-00004, ... (40 values)', 'school = School 1']" in str(
        caught.value)
    # one value of a list that cannot be compared: its clause, and the list it is in, cut
    frame["visit"] = [f"2026-03-{k % 28 + 1:02d}" for k in range(len(frame))]
    days = ", ".join(f"2026-03-{k:02d}" for k in range(1, 20))
    with pytest.raises(OptionError) as caught:
        cfa_tool.check("factor f: a1, a2, a3, a4\n", frame, keep=[f"visit in {days}, March 5"])
    assert str(caught.value).startswith("row filter 'visit = \"March 5\"' (of 'visit in 2026-03-01, 2026-03-02, "
                                        "2026-03-03, ... (20 values)'): 'visit' holds dates")
    assert "2026-03-19" not in str(caught.value)


def test_several_exclusions_on_an_item_are_one_caution():
    # s20: the range-restriction caution followed each '!=' filter (three cautions for one selection); it follows the
    # one merge too.  Check value: pandas' count of the rows answering 1, 2 or 5 to a1 (Series.isin)
    frame = _answers()
    checked = cfa_tool.check("factor f: a1, a2, a3, a4\n", frame, keep=["a1 != 1", "a1 != 2", "a1 != 5"])
    [caution] = [p for p in checked.problems if p.kind is ProblemKind.SELECTED_ON_ITEM]
    assert caution.value == int(frame["a1"].isin([1, 2, 5]).sum())
    assert str(caution.explanation).startswith("Row filter 'a1 not in 1, 2, 5' selects rows by their answers to 'a1'")
