"""One way to shorten a text for a message: errors.clipped (printable, cut to its width, '…' marking the cut) and,
for a file's path, errors.shown_path (cut in its middle around '…'), used by every message that quotes text of
unbounded length: option values, model words, data cells, a summary file's 'n' row, saved estimates, the paths of
input and output files.  Hand cuts marked '...' (which reads as the text's own dots) or not marked at all ('a
workbook's title quoted to its 60th character read as the whole', re-check s17) are gone from the package.

The data are the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed)."""

from __future__ import annotations

import ast
import json
from pathlib import Path

import pandas as pd
import pytest

import cfa_tool
from cfa_tool import errors
from cfa_tool.errors import CfaError, DataError, OptionError, clipped
from cfa_tool.resources import resource_dir

PACKAGE = Path(cfa_tool.__file__).resolve().parent
LONG = "x" * 100
MARKS = ("...", "…")


def _hand_cuts(path: Path) -> list[int]:
    """Lines of ``path`` that join a cut mark to a text ('text[:37] + "..."')."""
    found = []
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.BinOp) and isinstance(node.op, ast.Add) and any(
                isinstance(side, ast.Constant) and side.value in MARKS for side in (node.left, node.right)):
            found.append(node.lineno)
    return found


def test_no_module_cuts_a_text_by_hand():
    cuts = {str(path.relative_to(PACKAGE)): lines for path in sorted(PACKAGE.rglob("*.py"))
            if path.name != "errors.py" and (lines := _hand_cuts(path))}
    assert cuts == {}


def test_clipped_and_shown_path_mark_the_cut():
    assert clipped("abc", 3) == "abc" and clipped("abcd", 3) == "ab…"
    assert clipped("a\x1bbc", 40) == "a\\x1bbc"  # printable first (an escape shown, never sent to the terminal)
    path = "/" + "a" * 150 + "/" + "b" * 100 + ".csv"
    assert errors.shown_path(path) == path[:120] + "…" + path[-60:] and len(errors.shown_path(path)) == 181
    assert errors.shown_path("/short/path.csv") == "/short/path.csv"


def test_a_long_path_is_shown_alike_for_an_input_and_an_output(tmp_path):
    folder = tmp_path / ("f" * 150) / ("g" * 100)
    with pytest.raises(DataError) as data:
        cfa_tool.fit(resource_dir("models") / "rider_three_factors.cfa", folder / "data.csv")
    from cfa_tool.output_files import check_target

    with pytest.raises(OptionError) as output:
        check_target("--json", str(folder / "result.json"))
    assert errors.shown_path(folder / "data.csv") in str(data.value) and "…" in str(data.value)
    assert errors.shown_path(folder / "result.json") in str(output.value)
    assert "..." not in str(data.value) + str(output.value)


@pytest.mark.parametrize("option", ["information", "max_iterations"])
def test_an_option_value_is_cut_with_the_mark(option, rider):
    """A choice of words (method.Method.parse) quoted in full before; a number's check (options) cut with '...'."""
    with pytest.raises(OptionError) as refused:
        cfa_tool.fit(resource_dir("models") / "rider_three_factors.cfa", rider, **{option: LONG})
    assert "x" * 38 + "…" in str(refused.value) and "..." not in str(refused.value) and LONG not in str(refused.value)


def test_a_planned_test_is_cut_with_the_mark():
    from cfa_tool.workflows.power import plan

    with pytest.raises(OptionError) as refused:
        plan(df=10, test=LONG, n_obs=200)
    assert "x" * 39 + "…" in str(refused.value) and LONG not in str(refused.value)


@pytest.mark.parametrize("text, quoted", [(LONG + "..b1\n", "x" * 39 + "…"),  # an unknown statement
                                          ("reversed " + LONG + " 1 5\n", "reversed " + "x" * 50 + "…")])
def test_model_words_are_cut_with_the_mark(text, quoted):
    with pytest.raises(CfaError) as refused:
        cfa_tool.parse_model(text)
    assert quoted in str(refused.value) and "..." not in str(refused.value)


@pytest.fixture(scope="module")
def rider() -> pd.DataFrame:
    return pd.read_csv(resource_dir("demo") / "rider_survey.csv")


def test_a_long_word_among_an_items_numbers_is_cut_with_the_mark(rider):
    frame = rider.copy()
    frame["on_time"] = frame["on_time"].astype(object)
    frame.loc[4, "on_time"] = "no opinion " + LONG
    with pytest.raises(DataError) as refused:
        cfa_tool.fit(resource_dir("models") / "rider_three_factors.cfa", frame)
    quoted = str(refused.value).split(" among numbers")[0]  # (the advice after it gives the whole word to copy)
    assert quoted.endswith("('no opinion " + "x" * 28 + "…' in row labelled 4)")


def test_long_words_among_items_numbers_are_listed_cut_with_the_mark(rider):
    """Cut without a mark before: a word's first 40 characters read as the whole word."""
    frame = rider.copy()
    frame["on_time"] = frame["on_time"].astype(object)
    frame.loc[4, "on_time"], frame.loc[5, "on_time"] = "no opinion " + LONG, "skip " + LONG
    with pytest.raises(DataError) as refused:
        cfa_tool.fit(resource_dir("models") / "rider_three_factors.cfa", frame)
    listed = str(refused.value).split(". Correct those cells")[0]
    assert ("'no opinion " + "x" * 28 + "…' (1 cell), 'skip " + "x" * 34 + "…' (1 cell); the first is 'no opinion "
            + "x" * 28 + "…' in") in listed


def test_a_long_word_among_answer_words_is_cut_with_the_mark(rider):
    words = {1: "never", 2: "rarely", 3: "sometimes", 4: "often", 5: "always"}
    model = (resource_dir("models") / "rider_three_factors.cfa").read_text()
    items = cfa_tool.parse_model(model).observed_names
    frame = rider.copy()
    frame[list(items)] = frame[list(items)].apply(lambda column: column.map(words))
    frame.loc[4, "on_time"] = "hardly " + LONG
    model += "\nanswers " + ", ".join(f'"{word}" = {code}' for code, word in words.items()) + "\n"
    with pytest.raises(DataError) as refused:
        cfa_tool.fit(model, frame)
    message = str(refused.value)
    assert "hardly " + "x" * 32 + "…" in message and "..." not in message


def test_a_long_n_row_of_a_summary_file_is_cut_with_the_mark(tmp_path):
    (tmp_path / "summary.stats").write_text("correlation,a,b,c\na,1\nb,.5,1\nc,.5,.5,1\nn,301,302,303,304,305,306\n")
    with pytest.raises(DataError) as refused:
        cfa_tool.fit("factor f: a, b, c\n", tmp_path / "summary.stats")
    assert "'301,302,303,304,305…'" in str(refused.value) and "..." not in str(refused.value)


def test_a_long_saved_estimate_is_cut_with_the_mark():
    from cfa_tool.model.saved_estimates import saved_rows

    with pytest.raises(OptionError) as refused:
        saved_rows([{"kind": "loading", "variables": ["f", "a"], "group": None, "estimate": LONG}], "fit.json")
    assert json.dumps(LONG)[:29] + "…" in str(refused.value) and "..." not in str(refused.value)


def test_a_long_model_line_is_shown_around_the_caret_with_the_mark():
    from cfa_tool.errors import Location, ModelError

    line = "a" * 79 + "b" + "c" * 100
    shown, caret = ModelError("unexpected 'b'", Location("m.cfa", 1, 80), line).excerpt().split("\n")
    assert shown == "    …" + "a" * 59 + "b" + "c" * 58 + "…"
    assert caret.index("^") == shown.index("b")  # the caret under the character named
