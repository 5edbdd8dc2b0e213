"""The note on values a file declares as missing listed each code's items in no order ("sq5 24, ds2 30, sq3 25, ...",
new-user trial, sixteenth round): the items with most such cells come first, so that the ones the note cuts off
('and 9 more items') are the least affected.  Counts checked by hand below."""

from cfa_tool.data.non_answers import NonAnswer, NonAnswerKind, non_answer_note


def test_items_are_listed_by_their_cells_most_first():
    found = tuple(NonAnswer(NonAnswerKind.DECLARED, item, ".a", "refused", tuple(range(n)))
                  for item, n in (("sq5", 24), ("ds2", 30), ("sq3", 25), ("sq2", 21), ("ds5", 16), ("df2", 20),
                                  ("df1", 20)))
    note = non_answer_note(found, "survey.dta")
    # seven items: every one named, none cut to 'and 1 more item' (numbers.names_shown; new-user trial s21)
    assert "(156 cells: ds2 30, sq3 25, sq5 24, sq2 21, df2 20, df1 20, ds5 16)" in note, note
