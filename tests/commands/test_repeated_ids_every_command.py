"""An id that names several rows (a pupil id typed twice) is a caution first in every command that takes --id, one
rule (pipeline.inputs.repeated_id_problems): it names the id and its rows, since nothing merged by those ids (a scores
file) can be matched to the rows one to one (new-user trial s20, item 2: neither check nor scores said so).  A caution,
never a refusal: the rows are analysed and scored alike whatever their ids.  Rows that copy an earlier row in every
column are named by the caution on copies, which says that their ids repeat.

Data: the bundled demo (a fictional transit agency's rider survey, 'rider_id' R0001, R0002, ...); the repeated ids are
planted here, so the rows each caution must name are known by construction."""

from __future__ import annotations

import json

import pandas as pd

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.cli import main
from cfa_tool.resources import resource_dir

MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text()


def _riders() -> pd.DataFrame:
    rows = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    rows.loc[5, "rider_id"] = rows.loc[4, "rider_id"]  # file rows 6 and 7 (under the header) share R0005
    rows.loc[[20, 30, 40], "rider_id"] = "R0021"  # file rows 22, 32 and 42 share R0021 (rows 22's own)
    return rows


def _flat(text) -> str:
    return " ".join(str(text).replace("│", " ").split())  # the terminal's box borders aside


def test_each_id_of_several_rows_with_its_rows_in_order():
    from cfa_tool.data.row_ids import ids_of_several_rows

    # the outside reference: pandas' Series.duplicated(keep=False) marks the same rows
    ids = {2: "a", 3: "b", 4: "a", 5: None, 6: None, 7: "c", 8: "b", 9: "a"}
    assert ids_of_several_rows(ids) == (("a", (2, 4, 9)), ("b", (3, 8)))
    marked = pd.Series(list(ids.values()), index=list(ids)).dropna()
    assert sorted(r for _, rows in ids_of_several_rows(ids) for r in rows) == \
        marked.index[marked.duplicated(keep=False)].tolist()
    assert ids_of_several_rows({2: "a", 3: "b", 4: None, 5: None}) == ()  # rows without an id repeat nothing


def test_check_fit_and_scores_name_the_repeated_ids_first(tmp_path, capsys):
    data, model = tmp_path / "riders.csv", tmp_path / "m.cfa"
    _riders().to_csv(data, index=False)
    model.write_text(MODEL)
    said = "The id column 'rider_id' gives 2 ids each to more than one row (5 rows in all): 'R0005' in rows 6, 7; " \
           "'R0021' in rows 22, 32, 42"
    for problems in (cfa_tool.check(MODEL, data, id_column="rider_id").problems,
                     cfa_tool.fit(MODEL, data, id_column="rider_id").problems,
                     cfa_tool.scores(MODEL, data, id_column="rider_id").fit.problems):
        first = problems[0]
        assert first.kind is ProblemKind.REPEATED_IDS and not first.kind.inadmissible
        assert said in _flat(first.explanation) and "cannot be matched to the rows one to one" in first.explanation
    fitted = cfa_tool.fit(MODEL, data, id_column="rider_id")
    assert not any("repeat" in str(w) for w in fitted.warnings)  # said once, first
    # the command line: first on the terminal; the scores file is written all the same, every row in its place
    assert main(["check", str(model), "--data", str(data), "--id", "rider_id"]) == 0
    assert said in _flat(capsys.readouterr().out)[:600]
    out, scores = tmp_path / "s.json", tmp_path / "s.csv"
    assert main(["scores", str(model), "--data", str(data), "--id", "rider_id", "--output", str(scores),
                 "--json", str(out)]) == 0
    assert said in _flat(capsys.readouterr().out)[:600]
    assert json.loads(out.read_text())["problems"][0]["kind"] == ProblemKind.REPEATED_IDS.value
    written = pd.read_csv(scores)
    assert len(written) == len(_riders()) and (written["rider_id"] == "R0021").sum() == 3


def test_copies_say_that_their_ids_repeat_and_the_id_caution_leaves_them_to_it(tmp_path):
    rows = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    copied = pd.concat([rows, rows.iloc[[10, 11]]], ignore_index=True)  # rows 482, 483 copy rows 12, 13 whole
    path = tmp_path / "copied.csv"
    copied.to_csv(path, index=False)
    problems = cfa_tool.check(MODEL, path, id_column="rider_id").problems
    kinds = [p.kind for p in problems]
    assert ProblemKind.COPIED_ROWS in kinds and ProblemKind.REPEATED_IDS not in kinds
    [copies] = [p for p in problems if p.kind is ProblemKind.COPIED_ROWS]
    assert "row 482 (R0011) repeats row 12 (R0011)" in _flat(copies.explanation)
    assert "Each copy repeats its original's id too" in copies.explanation
    assert "different respondents who answered alike" not in copies.advice  # the same ids: not different people
    # a different rider typed with one of those ids as well: named by the id caution, the copy left to the other
    copied.loc[30, "rider_id"] = "R0011"
    copied.to_csv(path, index=False)
    [repeated] = [p for p in cfa_tool.check(MODEL, path, id_column="rider_id").problems
                  if p.kind is ProblemKind.REPEATED_IDS]
    assert "gives one id to 2 rows: 'R0011' in rows 12, 32" in _flat(repeated.explanation)


def test_row_names_that_repeat_are_named_alike(tmp_path):
    # a file whose first header cell is empty: its first column names the rows (data.readers), by the same rule
    rows = _riders().rename(columns={"rider_id": ""})
    path = tmp_path / "named.csv"
    rows.to_csv(path, index=False)
    first = cfa_tool.check(MODEL, path).problems[0]
    assert first.kind is ProblemKind.REPEATED_IDS
    assert _flat(first.explanation).startswith(f"The row names of {path} give 2 names each to more than one row "
                                               f"(5 rows in all): 'R0005' in rows 6, 7; 'R0021' in rows 22, 32, 42")


def test_explore_names_the_repeated_ids_first_by_the_one_rule(tmp_path, capsys):
    """s20: explore named copied rows by its own call and no repeated id; now it composes its cautions as every other
    command does (pipeline.inputs.data_problems), the repeated ids among them."""
    rows = _riders()
    said = "The id column 'rider_id' gives 2 ids each to more than one row (5 rows in all): 'R0005' in rows 6, 7; " \
           "'R0021' in rows 22, 32, 42"
    explored = cfa_tool.explore(rows, factors=3, replications=5, id_column="rider_id")
    [caution] = [p for p in explored.data_problems if p.kind is ProblemKind.REPEATED_IDS]
    assert explored.data_problems[0] is caution
    assert said.replace("rows 6, 7", "rows labelled 4, 5").replace("rows 22, 32, 42", "rows labelled 20, 30, 40") \
        in _flat(caution.explanation)  # a data frame's rows by their index labels
    data = tmp_path / "riders.csv"
    rows.to_csv(data, index=False)
    assert main(["explore", "--data", str(data), "--factors", "3", "--replications", "5", "--id", "rider_id"]) == 0
    out = _flat(capsys.readouterr().out.replace("┃", " "))  # the caution box's borders aside
    assert said in out and out.index(said) < out.index("Items:")  # first, before the notes
    # ids that each name one row: nothing said
    plain = cfa_tool.explore(pd.read_csv(resource_dir("demo") / "rider_survey.csv"), factors=3, replications=5,
                             id_column="rider_id")
    assert not [p for p in plain.data_problems if p.kind is ProblemKind.REPEATED_IDS]
