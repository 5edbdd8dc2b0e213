"""Values a data file itself marks as no answer (a value label 'refused', an SPSS user-missing value, a text cell
'refused') are read as missing and named first in every view, never analysed as the most extreme answers; values
outside a declared scale get --missing-codes as their remedy (new-user trial 7: U1, U4, U10, U12, U14).

The data are invented (a fictional transit agency's rider survey: ride comfort c1..c3 and staff courtesy s1..s3,
answered 0 to 3), written as Stata and SPSS files by pyreadstat, an independent writer of those formats.  Check
values: the cells set by hand below (which rows hold which code), counted here by numpy; the fit of the file
with its marked cells is compared with the fit of the same answers with those cells left empty."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.data.non_answers import says_no_answer
from cfa_tool.errors import DataError, ModelError

ITEMS = ["c1", "c2", "c3", "s1", "s2", "s3"]
MODEL = "factor comfort: c1..c3\nfactor courtesy: s1..s3\nordinal c1..c3, s1..s3\n"
SCALE = {0: "never", 1: "sometimes", 2: "often", 3: "always"}
REFUSED = {3: "c2", 40: "s1", 77: "s3"}  # row position -> item coded 8 'refused'
NOT_ASKED = {5: "c2", 6: "c2", 90: "c3", 150: "s2"}  # coded 9 'Not asked'


@pytest.fixture(scope="module")
def answers() -> pd.DataFrame:
    rng = np.random.default_rng(2207)
    eta = rng.normal(size=(400, 2)) @ np.linalg.cholesky([[1, 0.5], [0.5, 1]]).T
    latent = np.repeat(eta, 3, axis=1) * 0.75 + rng.normal(size=(400, 6)) * 0.66
    return pd.DataFrame(np.digitize(latent, [-0.6, 0.3, 1.1]).astype(float), columns=ITEMS)


@pytest.fixture(scope="module")
def coded(answers) -> pd.DataFrame:
    data = answers.copy()
    for row, item in REFUSED.items():
        data.loc[row, item] = 8
    for row, item in NOT_ASKED.items():
        data.loc[row, item] = 9
    return data


def _blanked(answers: pd.DataFrame) -> pd.DataFrame:
    data = answers.copy()
    for row, item in {**REFUSED, **NOT_ASKED}.items():
        data.loc[row, item] = np.nan
    return data


def refusal(model: str, data, **options) -> str:
    """The one-line message with which a check of ``model`` on ``data`` is refused."""
    with pytest.raises(ModelError) as caught:
        cfa_tool.check(model, data, **options)
    return caught.value.message


def _labels(extra: dict | None = None) -> dict:
    return {c: {**SCALE, 8: "refused", 9: "Not asked", **(extra or {})} for c in ITEMS}


@pytest.mark.parametrize("text", ["refused", "Refused.", "DON'T KNOW", "don’t know", "Don't know / refused",
                                  "Prefer not to say", "not applicable", "No answer", "Not asked", "skipped",
                                  "missing", "Refused or don't know",
                                  # a new-user trial's SPSS file labelled 9 'did not answer' (common codebook wording)
                                  "did not answer", "Didn't answer", "Not answered", "No answer given"])
def test_the_declared_words_of_non_answers(text):
    assert says_no_answer(text)


@pytest.mark.parametrize("text", ["never", "always", "Not at all", "Nearly every day", "missing my bus", "refuse bins",
                                  "Don't agree", "know", "", "Other"])
def test_answers_are_not_non_answers(text):
    assert not says_no_answer(text)


def _read_note(result) -> str:
    """The data summary's note on the values read as no answer (data.non_answers.non_answer_note): a note, not a
    caution, when every row stays in the analysis (the lead's decision, s14)."""
    notes = getattr(result, "warnings", None) or getattr(result, "notes", ())
    assert not any(p.kind is ProblemKind.VALUES_READ_AS_MISSING for p in result.problems)
    [note] = [n for n in notes if " of the items in " in n and "read as missing, not as answers" in n]
    return note


def test_stata_codes_labelled_as_non_answers_are_read_as_missing_and_said_first(tmp_path, answers, coded):
    import pyreadstat

    path = tmp_path / "riders.dta"
    pyreadstat.write_dta(coded, str(path), variable_value_labels=_labels())
    result = cfa_tool.fit(MODEL, path)
    # never a category: the answers per category hold 0 to 3 only
    assert all(tuple(v for v, _ in cats) == (0.0, 1.0, 2.0, 3.0) for cats in result.groups[0].data.categories)
    counted = dict(zip(ITEMS, result.groups[0].data.categories))
    assert sum(n for _, n in counted["c2"]) == int(coded["c2"].isin([0, 1, 2, 3]).sum()) == 400 - 3
    same = cfa_tool.fit(MODEL, _blanked(answers))
    assert result.fit.chi_square == pytest.approx(same.fit.chi_square, rel=1e-10)
    first = _read_note(result)
    assert first == (
        "7 cells of the items in riders.dta hold values that the file labels as no answer, read as missing, not as "
        "answers: 8 'refused' (3 cells: c2 1, s1 1, s3 1); 9 'Not asked' (4 cells: c2 2, c3 1, s2 1). To analyse one "
        "as an answer, give its code another value label, in a copy of the file")
    assert result.admissible
    from cfa_tool.reporting.paragraph import methods_paragraph

    # the paragraph names the values and their items (the cells written by the fixture above)
    assert ("values the data file marks as no answer were treated as missing (8 'refused' in c2, s1, and s3; "
            "9 'Not asked' in c2, c3, and s2)") in " ".join(methods_paragraph(result).split())
    # the check says so as the fit does
    checked = cfa_tool.check(MODEL, path)
    assert _read_note(checked) == first
    from cfa_tool.reporting.workflow_tables import check_report

    coverage = check_report(checked).tables[0]  # read as missing, so not 'counted as an answer here'
    assert coverage.key == "coverage" and coverage.note is None


def test_a_code_given_as_missing_is_not_named_again(tmp_path, coded):
    import pyreadstat

    path = tmp_path / "riders.dta"
    pyreadstat.write_dta(coded, str(path), variable_value_labels=_labels())
    result = cfa_tool.check(MODEL, path, missing_codes=[8])
    assert ": 9 'Not asked' (4 cells: c2 2, c3 1, s2 1). To analyse" in _read_note(result)


def test_spss_user_missing_values_are_honoured_and_said(tmp_path, answers, coded):
    import pyreadstat

    path = tmp_path / "riders.sav"
    pyreadstat.write_sav(coded, str(path), variable_value_labels={c: SCALE for c in ITEMS},
                         missing_ranges={c: [8, 9] for c in ITEMS})
    result = cfa_tool.fit(MODEL, path)
    assert result.fit.chi_square == pytest.approx(cfa_tool.fit(MODEL, _blanked(answers)).fit.chi_square, rel=1e-10)
    assert _read_note(result).startswith(
        "7 cells of the items in riders.sav hold values that the file declares as missing values, read as missing, "
        "not as answers: 8 (3 cells: c2 1, s1 1, s3 1); 9 (4 cells: c2 2, c3 1, s2 1)")


def test_stata_missing_values_of_their_own_kind_are_said(tmp_path, answers):
    # Stata's .a to .z are missing by the format itself: read as missing, as before, and now named with labels
    import pyreadstat

    data = answers.astype(object)
    data.loc[3, "c2"], data.loc[40, "s1"], data.loc[41, "s1"] = "a", "b", "b"
    path = tmp_path / "riders.dta"
    pyreadstat.write_dta(data, str(path), missing_user_values={"c2": ["a"], "s1": ["b"]},
                         variable_value_labels={"c2": {**SCALE, "a": "refused"}, "s1": {**SCALE, "b": "not asked"}})
    first = _read_note(cfa_tool.check(MODEL, path))
    assert first == (
        "3 cells of the items in riders.dta hold values that the file declares as missing values, read as missing, "
        "not as answers: .a 'refused' (1 cell: c2 1); .b 'not asked' (2 cells: s1 2). To analyse one as an answer, "
        "remove its declaration as a missing value, in a copy of the file")


def test_a_labelled_code_outside_a_declared_scale_gets_missing_codes_never_a_wider_scale(tmp_path, answers):
    import pyreadstat

    data = answers.copy()
    data.loc[[10, 11], "c3"] = 7  # labelled 'other', not a word of no answer: still not on the 0 to 3 scale
    path = tmp_path / "riders.dta"
    pyreadstat.write_dta(data, str(path), variable_value_labels=_labels({7: "other"}))
    assert refusal(MODEL + "reversed c1 on 0 to 3\n", path) == (
        "riders.dta holds answers outside the scale 0 to 3 declared here: 'c3' 7 'other' (2 cells: rows 11, 12); "
        "if they are typing errors or codes for no answer, give missing_codes=[7] (or correct them in a copy of the "
        "file)")


def test_an_answer_outside_a_declared_scale_is_refused_in_every_item_it_covers(answers):
    # the trial's -1 and 4: an error on the partners of a reversed item as on the item itself (it was a note, and
    # the values became categories whose threshold steps no longer lined up across items)
    data = answers.copy()
    data.loc[140, "c1"], data.loc[5, "c3"] = -1, 4
    assert refusal(MODEL + "reversed c2 on 0 to 3\n", data) == (
        "<data frame> holds answers outside the scale 0 to 3 declared here: 'c1' -1 (row labelled 140); 'c3' 4 "
        "(row labelled 5); if they are typing errors or codes for no answer, give missing_codes=[-1, 4] (or correct them in a copy "
        "of the file)")
    assert cfa_tool.check(MODEL + "reversed c2 on 0 to 3\n", data, missing_codes=[-1, 4]).complete == len(data) - 2


def test_text_cells_that_say_no_answer_are_read_as_missing_and_codes_then_apply(tmp_path, answers):
    # 'refused' made the column text, so --missing-codes 9 did not apply and the advice to give it looped (U10)
    text = answers.astype(int).astype(str)
    text.loc[3, "c2"], text.loc[40, "s1"], text.loc[77, "s3"] = "refused", "Don't know", "refused"
    text.loc[5, "c2"] = "9"
    path = tmp_path / "riders.csv"
    text.to_csv(path, index=False)
    result = cfa_tool.check(MODEL + "reversed c2 on 0 to 3\n", path, missing_codes=[9])
    # the rows that gave one answer throughout are a caution; the values read as no answer, which leave no row out
    # (full information keeps the rows with gaps), a note
    assert result.problems[0].kind is ProblemKind.SAME_ANSWER_ROWS
    assert _read_note(result).startswith(
        "3 cells of the items in riders.csv hold values that the file writes as no answer, read as missing, not as "
        "answers: 'refused' (2 cells: c2 1, s3 1); 'Don't know' (1 cell: s1 1).")
    assert result.complete == len(answers) - 4
    # other text is named where it is (column, row, value), whatever codes are given
    text.loc[12, "c1"] = "n/k"
    text.to_csv(path, index=False)
    with pytest.raises(DataError, match=r"column 'c1' holds text \('n/k' in row 14\) among numbers"):
        cfa_tool.check(MODEL + "reversed c2 on 0 to 3\n", path, missing_codes=[9])


def test_an_excel_cell_that_says_no_answer_is_read_as_missing(tmp_path, answers):
    data = answers.astype(object)
    data.loc[40, "s1"] = "Refused"
    path = tmp_path / "riders.xlsx"
    data.to_excel(path, index=False)
    result = cfa_tool.check(MODEL, path)
    assert "'Refused' (1 cell: s1 1). To analyse" in _read_note(result)


def test_codes_read_as_value_labels_are_said_only_for_the_group_column(tmp_path, answers):
    # the note named answer items of other models, changed with the model, and did not say what it meant (U14)
    import pyreadstat

    data = answers.copy()
    data["line"] = np.where(np.arange(len(data)) % 2 == 0, 1.0, 2.0)
    data["c1_later"] = data["c1"]  # a later wave's item, labelled as every item is
    path = tmp_path / "riders.sav"
    labels = {**{c: SCALE for c in ITEMS + ["c1_later"]}, "line": {1: "Harbour line", 2: "Ridge line"}}
    pyreadstat.write_sav(data, str(path), variable_value_labels=labels)
    plain = cfa_tool.check(MODEL, path)
    assert not [n for n in plain.notes if "value labels" in n]
    grouped = cfa_tool.check(MODEL, path, group="line")
    assert [n for n in grouped.notes if "value labels" in n] == [
        "the group column 'line' holds codes with value labels in the data file; its groups are named by those "
        "labels (1 as 'Harbour line', 2 as 'Ridge line')"]


def test_an_answer_given_once_at_the_end_of_the_scale_gets_missing_codes_first(answers):
    from cfa_tool.reporting.tables import category_table

    data = answers.copy()
    data.loc[140, "c1"] = -1
    table = category_table(cfa_tool.fit(MODEL, data))
    assert "unstable (c1 -1 (1 row))" in table.note  # marked 'few': fewer than 5 rows (the project's rule of thumb)
    assert "if -1 is a typing error or a code for no answer, give --missing-codes -1;" in table.note


def test_missing_codes_say_how_many_cells_they_read_as_no_answer(tmp_path):
    """Re-check 7: nothing said that --missing-codes -1,4 had turned 4 cells into missing answers.  Check values:
    the cells set by hand, counted by pandas."""
    import cfa_tool

    rng = np.random.default_rng(8)
    f = rng.normal(size=(200, 1))
    data = pd.DataFrame(np.clip(np.round(f * 0.9 + rng.normal(size=(200, 4)) * 0.7 + 3), 1, 5),
                        columns=["a1", "a2", "a3", "a4"])
    data.loc[[3, 7], "a1"], data.loc[11, "a3"] = -9, 99
    path = tmp_path / "coded.csv"
    data.to_csv(path, index=False)
    result = cfa_tool.fit("factor f: a1, a2, a3, a4\n", path, missing_codes=[-9, 99])
    said = [str(w) for w in result.warnings if "missing_codes=" in str(w)]  # the keyword: a Python call
    assert said == ["coded.csv: 3 cells holding a code given with missing_codes=... (-9, 99) were read as no answer "
                    "(a1 2, a3 1)"]
    none = cfa_tool.fit("factor f: a1, a2, a3, a4\n", path, missing_codes=[-99])
    assert "coded.csv: no cell of the items holds any of the codes given with missing_codes=... (-99)" in map(str, none.warnings)


def test_not_sure_between_the_answers_is_an_answer_and_beyond_them_is_none(tmp_path, answers):
    # 'Not sure' is the middle answer of some scales (0 'never', 1 'not sure', 2 'often'...) and the no-answer code
    # of others (9 'Not sure' after the scale): read as missing only in the second case ("defaults keep data"; a
    # merge found the wider no-answer vocabulary reading a middle 'Not sure' as missing)
    import pyreadstat

    middle = tmp_path / "middle.dta"
    pyreadstat.write_dta(answers, str(middle),
                         variable_value_labels={c: {0: "never", 1: "Not sure", 2: "often", 3: "always"} for c in ITEMS})
    kept = cfa_tool.fit(MODEL, middle)
    counted = dict(zip(ITEMS, kept.groups[0].data.categories))
    assert dict(counted["c1"])[1.0] == int((answers["c1"] == 1).sum()) > 0
    assert not any(p.kind is ProblemKind.VALUES_READ_AS_MISSING for p in kept.problems)
    beyond = tmp_path / "beyond.dta"
    coded = answers.copy()
    coded.loc[[4, 9], "c1"] = 9
    pyreadstat.write_dta(coded, str(beyond), variable_value_labels={c: {**SCALE, 9: "Not sure"} for c in ITEMS})
    read = cfa_tool.fit(MODEL, beyond)
    assert "9 'Not sure'" in _read_note(read)


def test_a_labelled_code_beyond_the_scale_of_many_items_is_one_caution_naming_them(tmp_path, answers):
    # a new-user trial: a labelled code beyond the scale of 16 items gave 16 near-identical cautions first (and the
    # same code once more as a missing-value code): one caution names every item and its cells
    import pyreadstat

    data = answers.copy()
    cells = {"c1": [1, 2], "c3": [4], "s1": [7, 8, 9], "s2": [12]}
    for item, rows in cells.items():
        data.loc[rows, item] = 9  # labelled 'Other': not a word of no answer, but far beyond the 0-3 scale
    path = tmp_path / "riders.sav"
    pyreadstat.write_sav(data, str(path), variable_value_labels={c: {**SCALE, 9: "Other"} for c in ITEMS})
    result = cfa_tool.fit(MODEL, path)
    named = [p for p in result.problems if p.kind is ProblemKind.VALUES_NOT_ANSWERS]
    assert len(named) == 1
    assert named[0].explanation == (
        "4 items of riders.sav hold the code 9 labelled 'Other' (7 cells: c1 2, c3 1, s1 3, s2 1), beyond their other "
        "labelled answers (0 to 3), read as an answer: a code of no answer?")
    assert str(named[0].advice).startswith("If 9 'Other' is not an answer on the scale, give missing_codes=[9]")
