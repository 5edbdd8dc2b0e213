"""--ordinal (and the Python API's ordinal=) takes ranges of items as a model file writes them ('q1..q3',
'item01..item12'), counted by the model language's own range expansion (language.names.range_names), in every
command that takes the option; a range whose end is not an item, or that counts a name that is not one, is a
one-line error naming the option and the name.

Check values: a fit with '--ordinal q1..q3,q4..q6' is the fit with '--ordinal all' on the same six items (the same
chi-square to the last digit), which is what the range means; nothing else is computed here."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from cfa_tool.cli import main
from cfa_tool.commands.options import ordinal_arg
from cfa_tool.errors import OptionError
from cfa_tool.language import parse_model
from cfa_tool.pipeline.inputs import ordinal_items_of

CORPUS = Path(__file__).parent / "bad_inputs"
MODEL = str(CORPUS / "models" / "good.cfa")  # factor f: q1, q2, q3 / factor g: q4, q5, q6
DATA = str(CORPUS / "data" / "ordinal_survey.csv")  # q1..q6 answered on four points, a column site (a, b)


def _run(argv: list[str], capsys) -> tuple[int, str]:
    code = main(argv)
    return code, capsys.readouterr().err


def test_the_option_keeps_a_range_for_the_commands_to_count():
    assert ordinal_arg("q1..q3, q5") == ["q1..q3", "q5"]
    assert ordinal_arg('"q1"..q3') == ["q1..q3"]  # a quoted end, as a model file may write it
    assert ordinal_arg("all") == "all"


def test_a_range_names_the_items_the_model_language_counts():
    spec = parse_model("factor f: y01..y04\nfactor g: y05..y08\nfactor h: m1_t2, m2_t2, m3_t2\n")
    assert ordinal_items_of(spec, "y02..y04") == {"y02", "y03", "y04"}  # the width of the numbers kept
    assert ordinal_items_of(spec, ["y01..y02", " y07 .. y08 ", "m1_t2..m3_t2"]) == {
        "y01", "y02", "y07", "y08", "m1_t2", "m2_t2", "m3_t2"}
    # a column named with two dots is that column, not a range
    spec = parse_model('factor f: "a..b", c, d\n')
    assert ordinal_items_of(spec, ["a..b"]) == {"a..b"}


@pytest.mark.parametrize("given, words", [
    ("y1..y9", "ordinal='y1..y9': the range's end 'y9' is not an indicator in the model"),
    ("y4..y1", "ordinal='y4..y1': the range 'y4..y1' counts down; write the smaller number first"),
    ("y1..x3", "ordinal='y1..x3': the two ends of the range 'y1..x3' must be the same name but for one number"),
    ("y1..y5", "ordinal='y1..y5': the range counts 'y3', which is not an indicator in the model; name the ordinal "
               "items one by one"),
    ("y1..y2..y4", "'y1..y2..y4' is given as ordinal but is not an indicator in the model"),
    ("y1-y4", "'y1-y4' is given as ordinal but is not an indicator in the model; a range of items is written with "
              "two dots: 'y1..y4'"),
])
def test_a_range_that_names_no_items_is_an_error(given, words):
    spec = parse_model("factor f: y1, y2, y4\nfactor g: y5, x3, y6\n")
    with pytest.raises(OptionError) as info:
        ordinal_items_of(spec, given)
    assert words in str(info.value)


@pytest.mark.parametrize("command", [
    ["fit", MODEL], ["compare", MODEL, str(CORPUS / "models" / "good_twin.cfa")], ["invariance", MODEL, "--group-column", "site"],
    ["replicate", MODEL, "--seed", "1"], ["bootstrap", MODEL], ["scores", MODEL, "--output", "scores.csv"],
    ["cutoffs", MODEL], ["explore", "--items", "q1..q6"],
])
def test_every_command_with_the_option_counts_ranges(command, capsys, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    code, err = _run([*command, "--data", DATA, "--ordinal", "q1..q9"], capsys)
    among = "one of the items explored" if command[0] == "explore" else "an indicator in the model"
    # the suggestion is the item of the same stem at that end (the highest numbered: q6)
    assert code == 2 and err.startswith(f"cfa-tool: --ordinal q1..q9: the range's end 'q9' is not {among}; did you "
                                        f"mean 'q6'?\n"), err
    assert list(tmp_path.iterdir()) == []


def test_a_fit_with_ranges_is_the_fit_with_all(capsys, tmp_path):
    results = {}
    for given in ("q1..q3,q4..q6", "all"):
        out = tmp_path / "fit.json"
        code, err = _run(["fit", MODEL, "--data", DATA, "--ordinal", given, "--json", str(out)], capsys)
        assert code == 0, err
        results[given] = json.loads(out.read_text())["fit"]
    assert results["q1..q3,q4..q6"]["chi_square"] == results["all"]["chi_square"]
    assert results["all"]["df"] == 8
