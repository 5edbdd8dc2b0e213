"""The 'join answers' statement: its normal use, each error message of the parser and the checks, the one writer of
the statement (which the cautions on rare and empty categories advise, so its advice must parse), and the refusal on
an item analysed as continuous."""

from __future__ import annotations

import pytest

from cfa_tool.data.answer_counts import AnswerCounts, join_advice
from cfa_tool.errors import ModelError
from cfa_tool.language import parse_model
from cfa_tool.language.checks import refuse_continuous_joins
from cfa_tool.language.spec import join_statement

MODEL = "factor f: a, b, c, \"item d\"\nordinal a, b, c, \"item d\"\n"


def test_join_answers_names_codes_their_code_and_items():
    spec = parse_model(MODEL + "join answers 0, 1 as 1 for a, b\njoin answers 4,\n    5 as 4 for c\n")
    first, second = spec.joins
    assert first.values == (0.0, 1.0) and first.into == 1.0 and first.item_names == ("a", "b")
    assert first.merged == (0.0,) and second.merged == (5.0,)
    assert (first.location.line, first.location.column) == (3, 1)
    assert [(p.line, p.column) for p in second.value_locations] == [(4, 14), (5, 5)]  # each code where it is written
    assert spec.joined_items() == {"a": (first,), "b": (first,), "c": (second,)}
    # two statements of one item that share no code: each its own category
    both = parse_model(MODEL + "join answers 1, 2 as 2 for a\njoin answers 4, 5 as 4 for a\n")
    assert [j.values for j in both.joined_items()["a"]] == [(1.0, 2.0), (4.0, 5.0)]


def test_the_one_writer_of_the_statement_parses_back_to_it():
    written = join_statement((2.0, 1.0), 2.0, ("a", "item d"))
    assert written == 'join answers 1, 2 as 2 for a, "item d"'  # codes lowest first, a name with a space quoted
    (join,) = parse_model(MODEL + written + "\n").joins
    assert join.values == (1.0, 2.0) and join.into == 2.0 and join.item_names == ("a", "item d")
    assert join.statement == written


#: each error of a 'join answers' statement written below MODEL: the statement lines -> line, column, words
JOIN_ERRORS = {
    "join answers 1 as 1 for a": (3, 14, "'join answers' needs at least two answer codes"),
    "join answers 1, 2 as 3 for a": (3, 22, "the joined category is coded 3, which is not one of the codes joined"),
    "join answers 1, 2, 1 as 1 for a": (3, 20, "the answer code 1 is listed twice"),
    "join answers 1.5, 2 as 2 for a": (3, 14, "1.5 is not an answer code of an ordinal item"),
    "join answers 1, 2e9 as 1 for a": (3, 17, "2000000000 is not an answer code"),  # plain digits
    "join answers 1, 2 as 2 for a, a": (3, 31, "'a' is named twice in this 'join answers' statement"),
    "join answers 1, 2 as 2 for f": (3, 28, "'f' is a factor; 'join answers' joins answer categories"),
    "join answers 1, 2 as 2 for z": (3, 28, "'z' is not a factor or an indicator"),
    "join answers 1, 2 as 2 for a\njoin answers 2, 3 as 3 for b, a": (
        4, 31, "the answers 2 of 'a' are joined by the statement on line 3 too; join the category once, in one "
               "statement ('join answers 1, 2, 3 as ...')"),
    "join answers 1, 2 as 2": (3, 23, "a 'join answers' statement names its items after 'for'"),
    "join 1, 2 as 2 for a": (3, 6, "expected 'answers'"),
    "in group x: join answers 1, 2 as 2 for a": (3, 13, "the same join applies in every group"),
}


@pytest.mark.parametrize("statements", list(JOIN_ERRORS))
def test_join_answers_errors(statements):
    line, column, words = JOIN_ERRORS[statements]
    with pytest.raises(ModelError) as caught:
        parse_model(MODEL + statements + "\n", source="m.cfa")
    message = str(caught.value)
    assert message.startswith(f"m.cfa:{line}:{column}:"), message
    assert words in message, message


def test_a_join_of_an_item_analysed_as_continuous_is_an_error_at_its_name():
    spec = parse_model("factor f: a, b, c\nordinal a, b\njoin answers 1, 2 as 2 for a, c\n", source="m.cfa")
    refuse_continuous_joins(spec, {"a", "b", "c"})  # every item ordinal (--ordinal all): accepted
    with pytest.raises(ModelError) as caught:
        refuse_continuous_joins(spec, {"a", "b"})
    message = str(caught.value)
    assert message.startswith("m.cfa:3:31:") and "'c' is analysed as continuous" in message
    assert "declare it ordinal with an 'ordinal' statement or ordinal=..." in message  # the option as Python names it


def test_the_advice_of_the_rare_category_caution_parses():
    """The statements data.answer_counts.join_advice writes for the rare and empty categories of a table of answers
    per category parse as the model's own statements, and join each marked category with its neighbour towards the
    middle of the scale (counts invented for the test; 'few' is fewer than 5 rows: a rule of thumb of this project)."""
    codes = (1.0, 2.0, 3.0, 4.0, 5.0)
    counts = ((3, 40, 80, 60, 17),  # a: 1 rare -> joined with 2
              (2, 50, 70, 60, 18),  # b: the same join, in the same statement
              (20, 50, 70, 55, 1),  # item d: 5 rare -> joined with 4
              (20, 40, 80, 60, 17))  # c: nothing rare
    answers = AnswerCounts(None, ("a", "b", "item d", "c"), codes, counts, (codes,) * 4)
    advice = join_advice([answers])
    assert advice == ("join answers 1, 2 as 2 for a, b", 'join answers 4, 5 as 4 for "item d"')
    spec = parse_model(MODEL + "\n".join(advice) + "\n")
    assert [(j.values, j.into, j.item_names) for j in spec.joins] == [
        ((1.0, 2.0), 2.0, ("a", "b")), ((4.0, 5.0), 4.0, ("item d",))]
    # two rare categories at one end: joined with the first category that is not rare, in one statement
    two = AnswerCounts(None, ("a",), codes, ((2, 3, 80, 60, 17),), (codes,))
    assert join_advice([two]) == ("join answers 1, 2, 3 as 3 for a",)
    # in groups: a category empty in one group is joined in every group
    north = AnswerCounts("north", ("a",), codes, ((0, 40, 80, 60, 17),), (codes,))
    south = AnswerCounts("south", ("a",), codes, ((12, 40, 80, 60, 17),), (codes,))
    assert join_advice([north, south]) == ("join answers 1, 2 as 2 for a",)


def test_the_refusal_of_a_singular_polychoric_matrix_writes_statements_that_parse():
    """data.polychoric's refusal names rare categories (item, code, rows) and writes their joins by the cautions'
    rule; the statements it quotes parse (counts invented for the test)."""
    import re

    from cfa_tool.data.polychoric import _rare_remedy

    said = _rare_remedy([("a", 1.0, 2), ("a", 2.0, 3), ("item d", 5.0, 1)], ("a", "item d"),
                        [(1.0, 2.0, 3.0, 4.0, 5.0), (1.0, 2.0, 3.0, 4.0, 5.0)])
    statements = re.findall(r"'(join answers [^']*)'", said)
    assert statements == ["join answers 1, 2, 3 as 3 for a", 'join answers 4, 5 as 4 for "item d"']
    spec = parse_model(MODEL + "\n".join(statements) + "\n")
    assert [j.into for j in spec.joins] == [3.0, 4.0]
