"""Value labels that say no answer are read once per text (data.non_answers.says_no_answer keeps its readings per
run's words): the rules of labelled codes (labelled_non_answers, between_answers, answers_labelled_like_none) read an
item's labels again for each of its codes, and a survey file gives every item the same labels.  The readings are the
same as before (the rule's words, the run's own words of --missing-codes), and the frame with the labelled codes
read as missing is what pandas' Series.where gives, whatever the column's type.

The data are invented: answers 1 to 5 of a fictional transit agency's rider survey with 9 'Refused', set by hand."""

from __future__ import annotations

from collections import Counter

import numpy as np
import pandas as pd
import pytest

from cfa_tool.data import non_answers
from cfa_tool.data.non_answers import also_no_answer, labelled_non_answers, says_no_answer

SCALE = {1.0: "Very poor", 2.0: "Poor", 3.0: "Fair", 4.0: "Good", 5.0: "Very good", 9.0: "Refused"}


def _forget_readings() -> None:
    """The kept readings of earlier tests forgotten, so that this one counts its own."""
    kept = getattr(non_answers, "_says", None)
    if kept is not None:
        kept.cache_clear()


def test_each_label_is_read_once_for_every_item_and_code(monkeypatch):
    calls = []
    plain = non_answers._plain
    monkeypatch.setattr(non_answers, "_plain", lambda text: calls.append(text) or plain(text))
    _forget_readings()
    frame = pd.DataFrame({f"q{k}": [1.0, 2.0, 3.0, 4.0, 5.0, 9.0] for k in range(12)})
    out, found = labelled_non_answers(frame, {f"q{k}": SCALE for k in range(12)})
    assert len(found) == 12 and out.isna().sum().sum() == 12  # each item's 9 'Refused' read as missing
    # six distinct labels without separators, each read once: its whole text, then (when it is no phrase) its one
    # part; before, every item read all six labels again for each labelled code (12 items x 6 labels x 2 rules)
    assert max(Counter(calls).values()) <= 2 and len(calls) <= 2 * len(SCALE)


def test_the_run_words_still_decide_after_a_reading_is_kept():
    _forget_readings()
    assert not says_no_answer("Ne sait pas")
    with also_no_answer(("Ne sait pas",)):
        assert says_no_answer("Ne sait pas")
        assert says_no_answer("ne sait PAS!")  # compared as the phrases are: lower case, punctuation ignored
    assert not says_no_answer("Ne sait pas")
    assert says_no_answer("Refused") and says_no_answer("Don't know / refused")
    assert not says_no_answer("Not at all") and not says_no_answer("   ") and not says_no_answer(9.0)
    assert says_no_answer("Not applicable / never ride", explained=True)
    assert not says_no_answer("Not applicable / never ride")


@pytest.mark.parametrize("dtype", ["float64", "int64", "int32", "uint8", "float32", "Int64", "Float64", "object"])
def test_the_codes_read_as_missing_are_what_series_where_gives(dtype):
    # the reference: the rule written out with pandas, each hit column through Series.where
    cells = [1, 9, 3, 5, 9, 2]
    frame = pd.DataFrame({"q1": pd.Series(cells, dtype=dtype), "q2": pd.Series([1, 2, 3, 4, 5, 1], dtype=dtype),
                          "id": [f"R{k}" for k in range(6)]})
    labels = {1.0: "Never", 2.0: "Sometimes", 3.0: "Often", 4.0: "Usually", 5.0: "Always", 9.0: "Refused"}
    out, found = labelled_non_answers(frame, {"q1": labels, "q2": labels})
    if dtype == "object":  # numbers held as objects: not a numeric column, no text codes labelled: nothing read
        assert found == () and out is frame
        return
    expected = frame.copy()
    expected["q1"] = frame["q1"].where(~np.isin(np.asarray(cells), [9]))
    pd.testing.assert_frame_equal(out, expected)
    assert [(f.column, f.value, f.rows) for f in found] == [("q1", 9.0, (1, 4))]
    assert frame["q1"].tolist() == cells  # the caller's frame unchanged


def _beyond_written_out(column: np.ndarray, labels: dict) -> list[tuple[float, str]]:
    """The rule of codes beyond an item's scale (non_answers.unlabelled_extra_codes) written out item by item, as it
    read before its labels' part was kept per set of labels: the reference of the test below."""
    coded = sorted((float(k), v) for k, v in labels.items()
                   if isinstance(k, (int, float)) and not says_no_answer(v, explained=True))
    if len(coded) < 4:
        return []
    present = set(column[np.isfinite(column)].tolist())
    out = []
    for k in (0, len(coded) - 1):
        code, text = coded[k]
        others = coded[1:] if k == 0 else coded[:-1]
        steps = np.diff([c for c, _ in others])
        if code not in present or not (steps > 0).all() or not np.allclose(steps, steps[0]):
            continue
        gap = abs(code - (others[0][0] if k == 0 else others[-1][0]))
        words = [set(non_answers._plain(t).split()) for t in (text, others[0][1], others[-1][1])]
        far = words[2] if k == 0 else words[1]
        if gap > steps[0] + 1e-9 or (bool(words[1] & words[2]) and not words[0] & far):
            out.append((code, text))
    return out


def test_codes_beyond_the_scale_are_those_of_the_rule_written_out():
    rng = np.random.default_rng(31)
    words = ["Strongly disagree", "Disagree", "Agree", "Strongly agree", "Other", "Refused", "Ne sait pas", "Never",
             "Always", "Something else", "Not applicable", "Sometimes"]
    found = 0
    for case in range(3000):
        codes = rng.choice([-1.0, 0.0, 1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 8.0, 9.0, 99.0, np.inf], size=rng.integers(2, 8),
                           replace=False)
        labels = {float(c): str(rng.choice(words)) for c in codes}
        column = rng.choice(np.append(codes, np.nan), size=rng.integers(1, 40))
        with also_no_answer(("Ne sait pas",) if case % 2 else ()):
            got = non_answers.unlabelled_extra_codes(column, labels)
            assert got == _beyond_written_out(column, labels), (labels, column)
        found += bool(got)
    assert found > 100  # the rule names codes in many of the cases, not in all
