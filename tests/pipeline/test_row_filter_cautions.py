"""What a row filter did to the sample is a caution first in every view of every command taking --keep (hostile
trial s12): a filter selecting rows by their answers to a model item (range restriction: the item's loading and its
factor's omega fall, as the numbers below show), and a filter on a value label that two codes of an SPSS/Stata column
carry (it kept both codes' rows without a word, while --group-column on the same column said so).

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed) and a district code
invented below; the rows each code holds are counted with pandas, not by the tool."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from tests.conftest import run_cli

pyreadstat = pytest.importorskip("pyreadstat")

FOUR = "factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"


def _kinds(problems) -> list[ProblemKind]:
    return [p.kind for p in problems]


def test_filter_on_a_model_item_is_a_caution_naming_item_and_factor(rider_demo, rider_model):
    whole = cfa_tool.fit(rider_model, rider_demo)
    kept = cfa_tool.fit(rider_model, rider_demo, keep="on_time >= 3")
    assert kept.problems[0].kind is ProblemKind.SELECTED_ON_ITEM
    said = kept.problems[0].explanation
    left_out = int((rider_demo["on_time"] < 3).sum())  # counted by pandas: rows with an answer below 3
    assert f"Row filter 'on_time >= 3' selects rows by their answers to 'on_time', an item of punctuality: it left " \
           f"out {left_out} rows with an answer to it" in said
    assert "range restriction" in said and "Thorndike 1949" in said
    # the effect the caution names, in these data: the standardized loading of on_time falls (.71 -> .57)
    def loading(result) -> float:
        return next(e.standardized for e in result.estimates if e.kind == "loading"
                    and tuple(e.variables) == ("punctuality", "on_time"))
    assert loading(kept) < loading(whole) - 0.1
    # a filter on a column that is not in the model, or one that leaves out no answer, says nothing of the kind
    assert ProblemKind.SELECTED_ON_ITEM not in _kinds(cfa_tool.fit(rider_model, rider_demo,
                                                                   keep="district = north").problems)
    assert ProblemKind.SELECTED_ON_ITEM not in _kinds(cfa_tool.fit(rider_model, rider_demo,
                                                                   keep="on_time >= 1").problems)


@pytest.mark.parametrize("argv", [
    ["fit", "{model}", "--data", "{data}"],
    ["check", "{model}", "--data", "{data}"],
    ["compare", "{model}", "{four}", "--data", "{data}"],
    ["invariance", "{model}", "--data", "{data}", "--group-column", "district"],
    ["scores", "{model}", "--data", "{data}", "--output", "{folder}/scores.csv"],
    ["explore", "--data", "{data}"],
])
def test_every_command_taking_keep_gives_the_selection_first(argv, rider_demo, rider_model, tmp_path, capsys):
    files = {"model": tmp_path / "m.cfa", "four": tmp_path / "four.cfa", "data": tmp_path / "survey.csv",
             "folder": tmp_path}
    files["model"].write_text(rider_model)
    files["four"].write_text(FOUR)
    rider_demo.to_csv(files["data"], index=False)
    args = [a.format(**files) for a in argv] + ["--keep", "on_time >= 3", "--json", str(tmp_path / "r.json")]
    code, out, _ = run_cli(args, capsys)
    assert code == 0
    plain = " ".join(out.replace("│", " ").replace("┃", " ").split())
    assert plain.index("Row filter 'on_time >= 3' selects rows by their answers to 'on_time'") < 300  # first
    assert ProblemKind.SELECTED_ON_ITEM.value in (tmp_path / "r.json").read_text()


@pytest.fixture(scope="module")
def coded(tmp_path_factory, rider_demo) -> tuple[str, pd.DataFrame]:
    """The demo with its district as codes: 1 north, 2 south, and 3 (every third row, north or south) labelled
    'north' too, in an SPSS file."""
    frame = rider_demo.drop(columns=["rider_id"]).copy()
    frame["dcode"] = np.where(frame.pop("district") == "north", 1.0, 2.0)
    frame.loc[frame.index[::3], "dcode"] = 3.0
    path = tmp_path_factory.mktemp("coded") / "district.sav"
    pyreadstat.write_sav(frame, str(path), variable_value_labels={"dcode": {1: "north", 2: "south", 3: "north"}})
    return str(path), frame


def test_filter_on_a_label_two_codes_carry_is_a_caution_naming_the_codes(coded, rider_model):
    path, frame = coded
    ones, threes = int((frame["dcode"] == 1).sum()), int((frame["dcode"] == 3).sum())  # counted by pandas
    kept = cfa_tool.fit(rider_model, path, keep="dcode = north")
    assert kept.n_obs == ones + threes  # the label's rows, both codes: the file says they are one category
    first = kept.problems[0]
    assert first.kind is ProblemKind.FILTER_LABEL_OF_SEVERAL_CODES
    assert first.explanation == (f"Row filter 'dcode = north' compares the value labels of 'dcode', and codes 1 "
                                 f"({ones} rows) and 3 ({threes} rows) both carry the label 'north': the filter kept "
                                 f"the rows of every one of them.")
    assert "keep=['dcode = 1']" in first.advice
    # the code the advice names keeps that code only, with no caution
    one = cfa_tool.fit(rider_model, path, keep="dcode = 1")
    assert one.n_obs == ones and ProblemKind.FILTER_LABEL_OF_SEVERAL_CODES not in _kinds(one.problems)
    # '!=' leaves out both codes' rows, and says so; a label of one code says nothing
    other = cfa_tool.fit(rider_model, path, keep="dcode != north")
    assert other.n_obs == len(frame) - ones - threes
    assert "the filter left out the rows of every one of them" in other.problems[0].explanation
    south = cfa_tool.fit(rider_model, path, keep="dcode = south")
    assert ProblemKind.FILTER_LABEL_OF_SEVERAL_CODES not in _kinds(south.problems)


def test_the_command_line_gives_the_shared_label_first(coded, rider_model, tmp_path, capsys):
    path, _ = coded
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    code, out, _ = run_cli(["fit", model, "--data", path, "--keep", "dcode = north", "--json", tmp_path / "r.json"],
                           capsys)
    assert code == 0
    plain = " ".join(out.replace("│", " ").split())
    assert plain.index("codes 1 (") < plain.index("Rider experience")
    assert 'filter by a code (--keep "dcode = 1" compares the codes themselves)' in plain
    kinds = [p["kind"] for p in json.loads((tmp_path / "r.json").read_text())["problems"]]
    assert kinds[0] == ProblemKind.FILTER_LABEL_OF_SEVERAL_CODES.value
