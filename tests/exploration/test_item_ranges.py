"""explore's items counted by the model language's one range rule (language.names.range_names).

'q1..q9' names q1, q2, ..., q9 in a model file and in --ordinal; explore's --items counts it the same way, whatever
the order of the columns in the file (it took the columns between the two ends in the file's order before, so that a
file ordered q1, q2, q10, q3 gave q10 to 'q1..q3', and the draft model's items differed from the ones a model file
with the same range names).  Ends that do not number alike are an error that says so; a range that counts a name the
file does not have is an error naming it.  No computation is checked here: only which columns the option names."""

from __future__ import annotations

import pytest

from cfa_tool.errors import OptionError
from cfa_tool.language.names import range_names
from cfa_tool.options import on_command_line
from cfa_tool.workflows.explore import item_names

# a file whose numbered columns are not in the order of their numbers, with columns that carry no number
COLUMNS = ["id", "q1", "q2", "q10", "q3", "q4", "on_time", "clear_answers", "mood1_t2", "mood2_t2", "mood3_t2"]


@pytest.mark.parametrize("text, expected", [
    ("q1..q3", ("q1", "q2", "q3")),  # q10 stands between q2 and q3 in the file, and is not counted
    ("q3..q4, q10", ("q3", "q4", "q10")),
    ("mood1_t2..mood3_t2", ("mood1_t2", "mood2_t2", "mood3_t2")),
    (["q1..q2", "on_time"], ("q1", "q2", "on_time")),  # from Python, a list of names and ranges
])
def test_a_range_of_items_counts_numbered_names_as_a_model_file_does(text, expected):
    assert item_names(text, COLUMNS, "d.csv") == expected
    pieces = [p.strip() for p in (text.split(",") if isinstance(text, str) else text)]
    counted = [x for p in pieces for x in (range_names(*p.split(".."), ValueError) if ".." in p else [p])]
    assert tuple(counted) == expected  # the model language's rule, the one --ordinal and model files follow


@pytest.mark.parametrize("text, words", [
    ("on_time..clear_answers", "--items on_time..clear_answers: a range such as 'item1..item9' needs names with a "
                               "number to count; got 'on_time..clear_answers'; name columns that do not number alike "
                               "one by one, separated by commas"),
    ("q1..mood3_t2", "--items q1..mood3_t2: the two ends of the range 'q1..mood3_t2' must be the same name but for "
                     "one number"),
    ("q1..q10", "--items q1..q10: the range counts 'q5', which is not a column of d.csv; a range counts numbered "
                "names ('q1..q9' is q1, q2, ..., q9), not the columns between its ends in the file"),
    ("q4..q1", "--items q4..q1: the range 'q4..q1' counts down; write the smaller number first"),
])
def test_a_range_whose_ends_do_not_number_alike_is_an_error_that_says_so(text, words):
    with on_command_line(), pytest.raises(OptionError) as info:
        item_names(text, COLUMNS, "d.csv")
    assert words in str(info.value)


def test_from_python_the_error_names_the_keyword():
    with pytest.raises(OptionError) as info:
        item_names("on_time..clear_answers", COLUMNS, "d.csv")
    assert str(info.value).startswith("items='on_time..clear_answers': ")


def test_a_column_named_like_a_range_is_that_column():
    assert item_names("a..b", ["a..b", "c"], "d.csv") == ("a..b",)
