"""A list cut short ends '1 more item', not '1 more items' (new-user trial s13, U10: "pur4 2 and 1 more items"), in
the caution on values the file writes as no answer and in the methods paragraph's clause on them."""

from __future__ import annotations

from cfa_tool.data.non_answers import SHOWN, BRIEF, NonAnswer, NonAnswerKind, non_answer_clause, non_answer_note


def _found(columns: int) -> tuple[NonAnswer, ...]:
    return tuple(NonAnswer(NonAnswerKind.WRITTEN, f"q{i}", "Don't know", None, (i + 1,)) for i in range(columns))


def test_one_more_item_in_the_singular():
    note = non_answer_note(_found(SHOWN + 1), "survey.csv")
    assert f"q{SHOWN - 1} 1 and 1 more item). To analyse" in note
    note = non_answer_note(_found(SHOWN + 2), "survey.csv")
    assert f"q{SHOWN - 1} 1 and 2 more items). To analyse" in note
    assert non_answer_clause(_found(BRIEF + 1)).endswith("q2 and 1 more item)")
    assert non_answer_clause(_found(BRIEF + 4)).endswith("q2 and 4 more items)")


def test_a_value_in_every_item_is_said_so():
    """New-user trial s15 (12): "8 'don't know' in joy1, joy2, joy3 and 17 more items" meant every one of the 20 items;
    the methods clause says 'in all 20 items' then, and keeps the short list when some item lacks it."""
    items = tuple(f"q{i}" for i in range(20))
    assert non_answer_clause(_found(20), model_items=items).endswith("'Don't know' in all 20 items)")
    assert non_answer_clause(_found(19), model_items=items).endswith("q2 and 16 more items)")
    assert non_answer_clause(_found(BRIEF), model_items=items[:BRIEF]).endswith("q0, q1 and q2)")  # a short list named
