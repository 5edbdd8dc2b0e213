"""A list cut short never ends '1 more item' (new-user trial s21) nor '1 more items' (new-user trial s13, U10: "pur4 2
and 1 more items"), in the caution on values the file writes as no answer, the methods paragraph's clause on them and
the lists of rows."""

from __future__ import annotations

from cfa_tool.data.kept_rows import rows_listed
from cfa_tool.data.non_answers import SHOWN, BRIEF, NonAnswer, NonAnswerKind, non_answer_clause, non_answer_note
from cfa_tool.numbers import names_shown


def _found(columns: int) -> tuple[NonAnswer, ...]:
    return tuple(NonAnswer(NonAnswerKind.WRITTEN, f"q{i}", "Don't know", None, (i + 1,)) for i in range(columns))


def test_a_list_never_cuts_one_name_and_counts_the_rest_in_the_plural():
    """New-user trial s21: "('Prefer not to say' in vig3, ded2, exh1 and 1 more item)" left exh4 unnamed in a methods
    paragraph to save one name; a list that would leave one name over names it (numbers.names_shown), and what it
    cuts is at least two, in the plural."""
    note = non_answer_note(_found(SHOWN + 1), "survey.csv")
    assert f"q{SHOWN} 1). To analyse" in note and "more item" not in note
    note = non_answer_note(_found(SHOWN + 2), "survey.csv")
    assert f"q{SHOWN - 1} 1 and 2 more items). To analyse" in note
    assert non_answer_clause(_found(BRIEF + 1)).endswith("in q0, q1, q2, and q3)")
    assert non_answer_clause(_found(BRIEF + 4)).endswith("q2 and 4 more items)")
    assert [names_shown(n, 3) for n in range(7)] == [0, 1, 2, 3, 4, 3, 3]


def test_rows_listed_by_number_never_cut_one_row():
    assert rows_listed([4, 8, 15, 16, 23, 42]) == "rows 4, 8, 15, 16, 23, 42"
    assert rows_listed([4, 8, 15, 16, 23, 42, 50]) == "rows 4, 8, 15, 16, 23 and 2 more"


def test_a_value_in_every_item_is_said_so():
    """New-user trial s15 (12): "8 'don't know' in joy1, joy2, joy3 and 17 more items" meant every one of the 20 items;
    the methods clause says 'in all 20 items' then, and keeps the short list when some item lacks it."""
    items = tuple(f"q{i}" for i in range(20))
    assert non_answer_clause(_found(20), model_items=items).endswith("'Don't know' in all 20 items)")
    assert non_answer_clause(_found(19), model_items=items).endswith("q2 and 16 more items)")
    assert non_answer_clause(_found(BRIEF), model_items=items[:BRIEF]).endswith("q0, q1, and q2)")  # a short list named
