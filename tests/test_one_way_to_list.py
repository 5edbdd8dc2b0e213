"""One way to list names that may be many: numbers.cut_list (and numbers.more_words for lists of notes), which names
every one when only one would be left over (numbers.names_shown: 'and 1 more item' hides a name to save none) and
counts the rest.  Every list that cuts goes through it; a hand-written 'and {n} more' is gone from the package, and a
test keeps it from coming back."""

from __future__ import annotations

import ast
from pathlib import Path

import cfa_tool
from cfa_tool.data.descriptives import few_category_note
from cfa_tool.numbers import cut_list, more_words

PACKAGE = Path(cfa_tool.__file__).resolve().parent


def test_a_list_names_everything_when_one_would_be_left():
    names = [f"q{i}" for i in range(1, 7)]
    assert cut_list(names, 5) == "q1, q2, q3, q4, q5, q6"
    assert cut_list(names + ["q7"], 5) == "q1, q2, q3, q4, q5 and 2 more"
    assert cut_list(names + ["q7"], 5, sep="; ", lead="; and ", noun="item") == "q1; q2; q3; q4; q5; and 2 more items"
    assert cut_list([], 5) == ""


def test_show_runs_on_the_named_items_only():
    seen = []
    cut_list(list(range(1000)), 3, lambda x: seen.append(x) or str(x))
    assert seen == [0, 1, 2]


def test_the_tail_counts_with_thousands_and_the_noun_in_its_number():
    assert more_words(0) == ""
    assert more_words(1, noun="id") == " and 1 more id"
    assert more_words(1234, "; and ", "such set") == "; and 1,234 more such sets"


def test_the_few_categories_note_names_all_nine_items():
    # nine items with few categories: the note of 4bad237e said 'and 1 more' after eight of them
    names = tuple(f"item{i}" for i in range(1, 10))
    text = str(few_category_note(names, names + ("other",)))
    assert "more" not in text.split("(")[1].split(")")[0]
    assert all(name in text for name in names)


def _hand_lists(path: Path) -> list[int]:
    """Lines of ``path`` whose f-strings end a list by hand: a literal ' more' after a formatted count."""
    found = []
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.JoinedStr):
            parts = node.values
            for a, b in zip(parts, parts[1:]):
                if (isinstance(a, ast.FormattedValue) and isinstance(b, ast.Constant) and isinstance(b.value, str)
                        and b.value.startswith(" more") and any(
                            isinstance(c, ast.Constant) and isinstance(c.value, str) and c.value.endswith("and ")
                            for c in parts[:parts.index(a)])):
                    found.append(node.lineno)
    return found


def test_no_module_lists_by_hand():
    left = {str(path.relative_to(PACKAGE)): lines for path in sorted(PACKAGE.rglob("*.py")) if (lines := _hand_lists(path))}
    assert not left, f"hand-written 'and N more' lists: {left}"


def _private_word_lists(path: Path) -> list[int]:
    """Lines of ``path`` that write a list in a sentence by a join of their own instead of numbers.word_list: a join
    by ' and ' or ' or ' ('a and b and c' for three), or a join of all but the last name with the last added by hand
    ('a, b and c', where word_list writes 'a, b, and c')."""
    found = []
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if not (isinstance(node, ast.Call) and isinstance(node.func, ast.Attribute) and node.func.attr == "join"
                and isinstance(node.func.value, ast.Constant) and isinstance(node.func.value.value, str)):
            continue
        by_hand = node.func.value.value.strip() in {"and", "or"}
        all_but_last = any(isinstance(s, ast.Subscript) and isinstance(s.slice, ast.Slice) and s.slice.lower is None
                           and isinstance(s.slice.upper, ast.UnaryOp) and isinstance(s.slice.upper.operand, ast.Constant)
                           and s.slice.upper.operand.value == 1 for arg in node.args for s in ast.walk(arg))
        if by_hand or all_but_last:
            found.append(node.lineno)
    return found


def test_no_module_writes_a_word_list_of_its_own():
    left = {str(path.relative_to(PACKAGE)): lines for path in sorted(PACKAGE.rglob("*.py"))
            if path.name != "numbers.py" and (lines := _private_word_lists(path))}
    assert not left, f"lists in sentences written by their own join instead of numbers.word_list: {left}"


def test_no_module_ends_a_list_with_and_others():
    # s26: 'The data barely determine a, b, c, d, e and others' hid the names and the count beyond five, and named five
    # of six where numbers.names_shown names all six; numbers.cut_list counts them
    left = {str(path.relative_to(PACKAGE)): node.lineno for path in sorted(PACKAGE.rglob("*.py"))
            for node in ast.walk(ast.parse(path.read_text(encoding="utf-8")))
            if isinstance(node, ast.Constant) and isinstance(node.value, str) and node.value.rstrip().endswith(" and others")}
    assert not left, f"lists ended by 'and others': {left}"
