"""A refusal names an option as its caller wrote it: the flag on the command line ('--robust'), the keyword in
Python ("test='robust'"), from one declaration (cfa_tool.options.Option).  Each case is run both ways: in Python
through the public function, on the command line through cfa_tool.cli.main in this process (the same code the
program runs; tests/commands/test_cli.py runs the program itself)."""

from __future__ import annotations

import inspect
import shutil

import pandas as pd
import pytest

import cfa_tool
from cfa_tool import cli
from cfa_tool.errors import CfaError
from cfa_tool.options import Interface, Option, interface, on_command_line
from tests.commands.test_cli import DATA, MODEL

#: a model with intercepts written in it (a mean structure needs groups or full-information ML)
INTERCEPTS = MODEL.read_text(encoding="utf-8") + "\nstart intercept(on_time) = 3\n"
#: every item of the rider survey on the reverse-keyed scale 1 to 5 (so 5 is an answer, not a code of no answer)
REVERSED = MODEL.read_text(encoding="utf-8") + "\nreversed on_time on 1 to 5\n"
MODEL_2 = "factor service: on_time, short_wait, accurate_info, easy_transfer, seat_available, clean, temperature, " \
          "room_to_stand, greeting, helpful, respectful, clear_answers\n"


@pytest.fixture()
def files(tmp_path):
    shutil.copy(DATA, tmp_path / "rider.csv")
    for name, text in (("rider.cfa", MODEL.read_text(encoding="utf-8")), ("one.cfa", MODEL_2),
                       ("means.cfa", INTERCEPTS), ("reversed.cfa", REVERSED)):
        (tmp_path / name).write_text(text, encoding="utf-8")
    return tmp_path


def _python(call) -> str:
    with pytest.raises(CfaError) as caught:
        call()
    return str(caught.value)


def _command_line(capsys, *argv: str) -> str:
    code = cli.main(list(argv))
    err = capsys.readouterr().err
    assert code in (2, 3) and "Traceback" not in err, err
    return err


# (what, Python call given the folder, command line given the folder, said in Python, said on the command line)
CASES = [
    ("fit: ordinal items with the robust switch",
     lambda d: cfa_tool.fit(d / "rider.cfa", d / "rider.csv", ordinal="all", test="robust"),
     lambda d: ["fit", str(d / "rider.cfa"), "--data", str(d / "rider.csv"), "--ordinal", "all", "--robust"],
     "so test='robust' cannot apply", "so --robust cannot apply"),
    ("fit: information beside a robust test",
     lambda d: cfa_tool.fit(d / "rider.cfa", d / "rider.csv", test="robust", information="expected"),
     lambda d: ["fit", str(d / "rider.cfa"), "--data", str(d / "rider.csv"), "--robust",
                "--standard-errors-from", "expected"],
     "('expected', information=...)", "('expected', --standard-errors-from)"),
    ("fit: intercepts without groups",
     lambda d: cfa_tool.fit(d / "means.cfa", d / "rider.csv", missing="listwise"),
     lambda d: ["fit", str(d / "means.cfa"), "--data", str(d / "rider.csv"), "--incomplete-rows", "listwise"],
     "give groups (group='COLUMN') or fit by full-information ML (missing='full-information',",
     "give groups (--group-column COLUMN) or fit by full-information ML (--incomplete-rows full-information,"),
    ("fit: a code of no answer that is an answer of a declared scale",
     lambda d: cfa_tool.fit(d / "reversed.cfa", d / "rider.csv", missing_codes=[5]),
     lambda d: ["fit", str(d / "reversed.cfa"), "--data", str(d / "rider.csv"), "--missing-codes", "5"],
     "missing_codes=[5] is an answer of the scale 1 to 5", "--missing-codes 5 is an answer of the scale 1 to 5"),
    ("fit: the iteration limit reached",
     lambda d: cfa_tool.fit(d / "rider.cfa", d / "rider.csv", max_iterations=1),
     lambda d: ["fit", str(d / "rider.cfa"), "--data", str(d / "rider.csv"), "--max-iterations", "1"],
     "raise the limit (max_iterations=...)", "raise the limit (--max-iterations)"),
    ("compare: ordinal items with full-information ML",
     lambda d: cfa_tool.compare([d / "rider.cfa", d / "one.cfa"], d / "rider.csv", ordinal="all",
                                missing="full-information"),
     lambda d: ["compare", str(d / "rider.cfa"), str(d / "one.cfa"), "--data", str(d / "rider.csv"), "--ordinal",
                "all", "--incomplete-rows", "full-information"],
     "complete rows (missing='listwise')", "complete rows (--incomplete-rows listwise)"),
    ("invariance: a level of the difference tests with the fit-change rule",
     lambda d: cfa_tool.invariance(d / "rider.cfa", d / "rider.csv", "district", decide_by="fit-change", alpha=0.01),
     lambda d: ["invariance", str(d / "rider.cfa"), "--data", str(d / "rider.csv"), "--group-column", "district",
                "--decide-by", "fit-change", "--alpha", "0.01"],
     "alpha with decide_by='difference-test', decide_by='both' or a partial search (partial='auto')",
     "alpha with --decide-by difference-test, --decide-by both or a partial search (--partial auto)"),
    ("invariance: ordinal items judged by the fit indices",
     lambda d: cfa_tool.invariance(d / "rider.cfa", d / "rider.csv", "district", ordinal="all", decide_by="fit-change"),
     lambda d: ["invariance", str(d / "rider.cfa"), "--data", str(d / "rider.csv"), "--group-column", "district",
                "--ordinal", "all", "--decide-by", "fit-change"],
     "(decide_by='difference-test')", "(--decide-by difference-test)"),
    ("scores: a code of no answer that is an answer of a declared scale",
     lambda d: cfa_tool.scores(d / "reversed.cfa", d / "rider.csv", missing_codes=[5]),
     lambda d: ["scores", str(d / "reversed.cfa"), "--data", str(d / "rider.csv"), "--output", str(d / "s.csv"),
                "--missing-codes", "5"],
     "leave 5 out of missing_codes=...", "leave 5 out of --missing-codes"),
    ("bootstrap: intercepts without groups",
     lambda d: cfa_tool.bootstrap(d / "means.cfa", d / "rider.csv", 10, missing="listwise"),
     lambda d: ["bootstrap", str(d / "means.cfa"), "--data", str(d / "rider.csv"), "--replications", "10",
                "--incomplete-rows", "listwise"],
     "give groups (group='COLUMN')", "give groups (--group-column COLUMN)"),
]


@pytest.mark.parametrize("what, python, command_line, in_python, on_the_command_line", CASES,
                         ids=[case[0] for case in CASES])
def test_a_refusal_names_the_option_as_the_caller_wrote_it(what, python, command_line, in_python,
                                                           on_the_command_line, files, capsys):
    said = _python(lambda: python(files))
    assert in_python in said and "--" not in said, said
    said = _command_line(capsys, *command_line(files))
    assert on_the_command_line in said, said
    assert interface() is Interface.PYTHON  # the command line's naming ends with its run


def test_each_option_renders_its_flag_or_its_keyword():
    assert (str(Option.ROBUST), Option.INCOMPLETE_ROWS.given("listwise"), Option.MISSING_CODES.given("9,99"),
            Option.KEEP.given(["district = north", "age >= 18"])) == (
        "test='robust'", "missing='listwise'", "missing_codes=[9, 99]", "keep=['district = north', 'age >= 18']")
    with on_command_line():
        assert (str(Option.ROBUST), Option.INCOMPLETE_ROWS.given("listwise"), Option.MISSING_CODES.given("9,99"),
                Option.KEEP.given(["district = north", "age >= 18"])) == (
            "--robust", "--incomplete-rows listwise", "--missing-codes 9,99",
            '--keep "district = north" --keep "age >= 18"')
    assert interface() is Interface.PYTHON


def test_every_declared_option_is_an_option_of_the_command_line_and_a_keyword_of_python():
    # the flag: an option some command's parser takes; the keyword: a keyword some public function takes
    from cfa_tool.cli import build_parser

    parser = build_parser()
    sub = next(a for a in parser._actions if a.choices and "fit" in a.choices)  # noqa: SLF001 - argparse's own list
    flags = {flag for p in sub.choices.values() for a in p._actions for flag in a.option_strings}  # noqa: SLF001
    keywords = {name for f in cfa_tool.__all__ if callable(getattr(cfa_tool, f, None))
                for name in inspect.signature(getattr(cfa_tool, f)).parameters}
    from dataclasses import fields

    from cfa_tool.pipeline.continuous import FitOptions

    keywords |= {f.name for f in fields(FitOptions)}
    for option in Option:
        assert option.flag in flags, option
        assert option.keyword in keywords, option


def test_the_public_functions_declare_their_own_keywords():
    # make_options names near keywords of the function called from these declarations (no frame inspection); each
    # is read from its function's signature once, at import (options.own_keywords), not copied by hand
    from cfa_tool.pipeline.inputs import FIT_KEYWORDS
    from cfa_tool.workflows.compare import COMPARE_KEYWORDS
    from cfa_tool.workflows.factor_scores import SCORES_KEYWORDS
    from cfa_tool.workflows.invariance import INVARIANCE_KEYWORDS
    from cfa_tool.workflows.replication import REPLICATE_KEYWORDS, SPLIT_HALF_KEYWORDS

    for function, declared in ((cfa_tool.fit, FIT_KEYWORDS), (cfa_tool.compare, COMPARE_KEYWORDS),
                               (cfa_tool.scores, SCORES_KEYWORDS), (cfa_tool.invariance, INVARIANCE_KEYWORDS),
                               (cfa_tool.replicate, REPLICATE_KEYWORDS), (cfa_tool.split_half, SPLIT_HALF_KEYWORDS)):
        own = tuple(name for name, p in inspect.signature(function).parameters.items() if p.kind is not p.VAR_KEYWORD)
        assert declared == own, function.__name__
        assert f"= own_keywords({function.__name__})" in inspect.getsource(inspect.getmodule(function))
    import cfa_tool.pipeline.inputs as inputs

    assert "inspect" not in inspect.getsource(inputs.make_options)


@pytest.mark.parametrize("call, near", [
    (lambda d: cfa_tool.replicate(d / "rider.cfa", d / "rider.csv", d / "rider.csv", ordinl="all"), "ordinal"),
    (lambda d: cfa_tool.split_half(d / "rider.cfa", d / "rider.csv", sed=3), "seed"),
    (lambda d: cfa_tool.scores(d / "rider.cfa", d / "rider.csv", methds="bartlett"), "methods"),
    (lambda d: cfa_tool.compare([d / "rider.cfa", d / "one.cfa"], d / "rider.csv", grop="district"), "group"),
])
def test_an_unknown_keyword_is_named_with_the_nearest_keyword_of_the_function_called(call, near, files):
    # before, a keyword passed on by a helper (replicate's and split_half's _ordinal_setup) found the helper's
    # own arguments by frame inspection ('options', 'spec'), never the public function's
    said = _python(lambda: call(files))
    assert f"did you mean {near}=...?" in said, said


@pytest.mark.parametrize("written, keyword", [("group_column", "group"), ("incomplete_rows", "missing"),
                                              ("id", "id_column"), ("standard_errors_from", "information")])
def test_a_command_line_flag_written_as_a_keyword_is_named_with_its_python_keyword(written, keyword, files):
    # 'group_column' was answered with "did you mean id_column=...?": the nearest spelling, not the same option
    message = _python(lambda: cfa_tool.fit(files / "rider.cfa", files / "rider.csv", **{written: "district"}))
    assert f"is {keyword}=... in Python" in message


def test_a_row_of_column_names_given_with_a_data_frame_is_named_as_python_writes_it(files):
    frame = pd.read_csv(files / "rider.csv")
    message = _python(lambda: cfa_tool.fit(files / "rider.cfa", frame, names_row=2))
    assert "a row of column names (names_row=...)" in message
