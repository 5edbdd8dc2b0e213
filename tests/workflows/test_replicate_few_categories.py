"""replicate names the continuous items of few answer categories and those piled up at one end, with fit's note
(pipeline.inputs.few_categories, the one rule of the refitting commands): hostile s25b case 05, an item with 60% of
its answers at the top and one of 4 answer categories were named by fit, compare, invariance, scores and bootstrap,
and passed by replicate (both forms: two files, and halves of one) without a word.  Data: the bundled demo (a fictional
transit agency's rider survey, simulated with a fixed seed), with on_time's answers of 3 and more set to 5 (73% at
the top, counted by pandas here) and clean's 5 read as 4 (four categories): changes made here by construction."""

from __future__ import annotations

import pandas as pd

import cfa_tool


def _answers(rider_demo: pd.DataFrame) -> pd.DataFrame:
    frame = rider_demo.copy()
    frame.loc[frame["on_time"] >= 3, "on_time"] = 5
    frame.loc[frame["clean"] == 5, "clean"] = 4
    return frame


def _said(notes, word: str) -> list[str]:
    return [" ".join(str(n).split()) for n in notes if word in str(n)]


def test_replicate_names_a_ceiling_item_and_a_four_category_item_as_fit_does(rider_demo, rider_model):
    frame = _answers(rider_demo)
    answered = frame["on_time"].dropna()
    assert (answered == 5).mean() > 0.5 and frame["clean"].dropna().nunique() == 4  # the case, by construction
    fitted = cfa_tool.fit(rider_model, frame)
    [note] = _said(fitted.warnings, "a ceiling or a floor")  # one note of both items, the ordinal fit its remedy
    assert "(clean) has at most 4 answer categories" in note and "(on_time 73% at 5)" in note
    halves = cfa_tool.split_half(rider_model, frame, seed=3)
    for half in halves:
        assert _said(half.notes, "a ceiling or a floor") == [note]
    both = cfa_tool.replicate(rider_model, frame.iloc[:240], frame.iloc[240:])
    [pooled] = _said(both.notes, "a ceiling or a floor")  # both samples' answers together, as the split's file
    assert "(clean) has at most 4 answer categories" in pooled and "on_time" in pooled
    # and the demo as it is (five categories, none piled up) gives no such note (no false alarm)
    plain = cfa_tool.split_half(rider_model, rider_demo, seed=3)[0]
    assert not _said(plain.notes, "a ceiling or a floor") and not _said(plain.notes, "answer categories")
