"""The same --id (one definition, commands/options.add_id_option) in every command that names rows: check, compare,
invariance and replicate (and bootstrap, cutoffs and align) took none, so their careless-rows cautions named row numbers only while fit and scores named
ids (new-user trial s19, finding 17).  Each names the planted rows by their ids and gives the one row filter that
leaves them out.  Check values: the rows the test planted (positions 100-129 of simulated answers, a fixed seed;
invented ids)."""

from __future__ import annotations

import argparse

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
