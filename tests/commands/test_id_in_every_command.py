"""The same --id (one definition, commands/options.add_id_option) in every command that names rows: check, compare,
invariance and replicate (and bootstrap, cutoffs and align) took none, so their careless-rows cautions named row numbers only while fit and scores named
ids (new-user trial s19, finding 17).  Each names the planted rows by their ids and gives the one row filter that
leaves them out.  Check values: the rows the test planted (positions 100-129 of simulated answers, a fixed seed;
invented ids)."""

from __future__ import annotations

import argparse

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.cli import build_parser
from cfa_tool.errors import OptionError
from tests.conftest import run_cli
from tests.data.test_list_filters import CARELESS, careless_answers as _answers

MODEL = "factor f: a1, a2, a3, a4\nfactor g: b1, b2, b3, b4\nreversed a2, b3 on 1 to 5\n"
ONE_FACTOR = "factor h: a1, a2, a3, a4, b1, b2, b3, b4\nreversed a2, b3 on 1 to 5\n"
FILTER = "student_id not in " + ", ".join(f"S-{k + 1:05d}" for k in CARELESS)


def _named_by_ids(problems) -> None:
    [caution] = [p for p in problems if p.kind is ProblemKind.SAME_ANSWER_ROWS]
    said = str(caution.explanation)
    assert " (S-00101), " in said and " (S-00102), " in said  # beside the row, as fit names them
    assert FILTER in str(caution.advice)  # the one filter that leaves the 30 rows out


def test_every_command_that_names_rows_names_them_by_the_id_column(tmp_path):
    frame = _answers()
    _named_by_ids(cfa_tool.check(MODEL, frame, id_column="student_id").problems)
    compared = cfa_tool.compare([MODEL, ONE_FACTOR], frame, id_column="student_id")
    _named_by_ids(compared.problems)
    _named_by_ids(cfa_tool.invariance(MODEL, frame, "sex", id_column="student_id").data_problems)
    halves = cfa_tool.split_half(MODEL, frame, id_column="student_id")
    _named_by_ids(halves[0].data_problems)
    data = tmp_path / "first.csv"
    frame.to_csv(data, index=False)
    other = tmp_path / "second.csv"
    _answers(seed=20).to_csv(other, index=False)
    both = cfa_tool.replicate(MODEL, str(data), str(other), id_column="student_id")
    _named_by_ids(both.data_problems)
    _named_by_ids(cfa_tool.bootstrap(MODEL, frame, replications=20, id_column="student_id").fit.problems)
    _named_by_ids(cfa_tool.cutoffs(MODEL, frame, replications=20, id_column="student_id").fit.problems)
    _named_by_ids(cfa_tool.align(MODEL, frame, "sex", trials=0, id_column="student_id").configural.problems)
    # and the filter it gives leaves the rows out, with no caution left
    again = cfa_tool.check(MODEL, frame, id_column="student_id", keep=[FILTER])
    assert again.rows == 370 and not [p for p in again.problems if p.kind is ProblemKind.SAME_ANSWER_ROWS]


def test_the_option_is_one_definition_checked_as_fit_checks_it(tmp_path, capsys):
    helps = set()
    for command in ("fit", "check", "compare", "invariance", "replicate", "scores", "bootstrap", "cutoffs", "align"):
        parser = build_parser(command)
        sub = next(a for a in parser._actions if isinstance(a, argparse._SubParsersAction))
        found = [a for a in sub.choices[command]._actions if "--id" in a.option_strings]
        assert len(found) == 1, command
        helps.add(found[0].help)
    assert len(helps) == 1  # the same words everywhere
    frame = _answers()
    with pytest.raises(OptionError, match="'a1' is a variable of the model and cannot also be the id column"):
        cfa_tool.check(MODEL, frame, id_column="a1")
    with pytest.raises(OptionError, match="the id column 'student' is not a column of <data frame>; did you mean "
                                          "'student_id'"):
        cfa_tool.compare([MODEL, ONE_FACTOR], frame, id_column="student")
    data, model = tmp_path / "answers.csv", tmp_path / "m.cfa"
    frame.to_csv(data, index=False)
    model.write_text(MODEL)
    code, out, _ = run_cli(["check", model, "--data", data, "--id", "student_id"], capsys)
    assert code == 0 and "601" not in out and "(S-00101)" in " ".join(out.split())
    code, _, err = run_cli(["invariance", model, "--data", data, "--group-column", "sex", "--id", "sexx"], capsys)
    assert code == 2 and "the id column 'sexx' is not a column" in err and "did you mean 'sex'" in err


# One rule for the option (s20): every command that reads rows names them in its caution about copies of earlier rows,
# whatever its model and items, so --id applies in every one of them; a fit of ordinal items refused it ('nothing
# uses it') while check, compare and the rest took it for the same caution, and explore, which names copied rows
# too, had no --id at all.

def _with_copies() -> pd.DataFrame:
    """The simulated answers with the rows at positions 5 and 40 pasted again at the end (identical in every column,
    their ids too): two copies a caution must name."""
    frame = _answers()
    return pd.concat([frame, frame.iloc[[5, 40]]], ignore_index=True)


def _copies_named_by_ids(problems) -> None:
    [caution] = [p for p in problems if p.kind is ProblemKind.COPIED_ROWS]
    said = " ".join(str(caution.explanation).split())
    # the planted pairs: index labels 400 and 401 of the data frame repeat labels 5 and 40 (a file's rows: 402, 403
    # repeat rows 7 and 42, under the row of names)
    assert ("row labelled 400 (S-00006) repeats row labelled 5 (S-00006)" in said
            and "row labelled 401 (S-00041) repeats row labelled 40 (S-00041)" in said), said


def test_every_command_that_reads_rows_takes_the_id_option():
    from cfa_tool.commands import MODULES

    reading, naming, helps = [], [], set()
    for command in MODULES:
        parser = build_parser(command)
        sub = next(a for a in parser._actions if isinstance(a, argparse._SubParsersAction))
        options = {o: a for a in sub.choices[command]._actions for o in a.option_strings}
        if "--keep" in options:  # reads rows of data (and chooses among them)
            reading.append(command)
            if "--id" in options:
                naming.append(command)
                helps.add(options["--id"].help)
    assert "explore" in reading and len(reading) >= 10
    assert naming == reading and len(helps) == 1


def test_a_fit_of_ordinal_items_names_copied_rows_by_the_id_column(tmp_path, capsys):
    frame = _with_copies()
    model = "factor f: a1, a2, a3, a4\nfactor g: b1, b2, b3, b4\n"  # no 'reversed' statement: copies name rows
    _copies_named_by_ids(cfa_tool.fit(model, frame, ordinal="all", id_column="student_id").problems)
    _copies_named_by_ids(cfa_tool.fit(model, frame, id_column="student_id", diagnostics=False).problems)
    data, path = tmp_path / "answers.csv", tmp_path / "m.cfa"
    frame.to_csv(data, index=False)
    path.write_text(model)
    code, out, err = run_cli(["fit", path, "--data", data, "--ordinal", "all", "--id", "student_id"], capsys)
    assert code == 0, err
    assert "row 402 (S-00006) repeats row 7 (S-00006)" in " ".join(out.split())


def test_explore_names_copied_rows_by_the_id_column(tmp_path, capsys):
    from cfa_tool.workflows.explore import LeftOut

    frame = _with_copies()[["student_id"] + [f"{s}{k}" for s in "ab" for k in range(1, 5)]]
    result = cfa_tool.explore(frame, factors=2, replications=5, id_column="student_id")
    _copies_named_by_ids(result.data_problems)
    assert "student_id" not in result.items
    numbered = frame.assign(student_id=range(1, len(frame) + 1))  # an id of numbers: never an item, and said so
    explored = cfa_tool.explore(numbered, factors=2, replications=5, id_column="student_id")
    assert ("student_id", LeftOut.ROW_IDS) in explored.left_out and "student_id" not in explored.items
    assert "Left out as the id column: student_id." in " ".join(str(n) for n in explored.notes)
    with pytest.raises(OptionError, match="the id column 'student' is not a column"):
        cfa_tool.explore(frame, factors=2, replications=5, id_column="student")
    data = tmp_path / "answers.csv"
    frame.to_csv(data, index=False)
    code, out, err = run_cli(["explore", "--data", data, "--factors", "2", "--replications", "5", "--id",
                              "student_id"], capsys)
    assert code == 0, err
    assert "row 402 (S-00006) repeats row 7 (S-00006)" in " ".join(out.split())
