"""Items whose answers pile up at one end, named in a continuous fit's note with the ordinal fit as the remedy
(new-user trial s25, finding 7): about 60% of the answers of four items at the top answer of a 0-6 scale passed a
continuous fit without a word, though the note for items of at most four categories exists; one rule, one note.
Invented data (a fictional transit agency's rider survey), simulated with a fixed seed; the shares are checked
against pandas' own counts of the answers.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.data.descriptives import PILED_UP_SHARE, few_category_note, piled_up_items

ITEMS = ("seat", "clean", "quiet", "driver", "info", "punctual")
MODEL = "factor comfort: seat, clean, quiet\nfactor service: driver, info, punctual\n"


def _riders(n: int = 400, seed: int = 7) -> pd.DataFrame:
    """Answers 0-6; 'clean' shifted up so that most answers are 6 (a ceiling), 'info' shifted down (a floor),
    'punctual' cut into three categories (a few-category item)."""
    rng = np.random.default_rng(seed)
    traits = rng.multivariate_normal([0, 0], [[1, .4], [.4, 1]], size=n)
    raw = .8 * traits[:, [0, 0, 0, 1, 1, 1]] + rng.normal(0, .6, (n, 6)) + np.array([0, 1.8, 0, 0, -2.5, 0])
    answers = np.searchsorted([-2.0, -1.3, -.6, 0, .6, 1.3], raw).astype(float)
    answers[:, 5] = np.searchsorted([-.5, .5], raw[:, 5]) + 1.0
    return pd.DataFrame(answers, columns=ITEMS)


def test_items_piled_at_one_end_are_found_by_their_share():
    frame = _riders()
    found = piled_up_items(frame.to_numpy(), ITEMS, skip=("punctual",))
    # the check: pandas' count of each item's answers, the share of its top and bottom answer
    expected = {}
    for name in ITEMS[:5]:
        shares = frame[name].value_counts(normalize=True)
        top, bottom = shares[frame[name].max()], shares[frame[name].min()]
        if max(top, bottom) > PILED_UP_SHARE:
            expected[name] = (top > PILED_UP_SHARE, max(top, bottom))
    assert set(expected) == {"clean", "info"}  # planted above
    assert {p.name: (p.ceiling, p.share) for p in found} == {k: (c, np.float64(v)) for k, (c, v) in expected.items()}
    assert [p.answer for p in found] == [6.0, 0.0]
    # a few-category item is named by its own rule, not twice
    assert "punctual" not in {p.name for p in piled_up_items(frame.to_numpy(), ITEMS, skip=("punctual",))}


def test_one_note_names_both_kinds_with_one_ordinal_remedy():
    frame = _riders()
    note = few_category_note(("punctual",), ITEMS, piled_up_items(frame.to_numpy(), ITEMS, skip=("punctual",)))
    words = " ".join(str(note).split())
    assert words.startswith("1 of the 6 items (punctual) has at most 4 answer categories")
    assert "Of the other items, 2 have more than half of their answers at their highest or lowest answer (clean " in words
    assert words.count("--ordinal") == 1 and "--ordinal punctual,clean,info" in words


def test_a_continuous_fit_names_them_and_an_ordinal_fit_does_not():
    frame = _riders().drop(columns="punctual")
    model = "factor comfort: seat, clean, quiet\nfactor service: driver, info\n"
    fitted = cfa_tool.fit(model, frame)
    said = [" ".join(str(w).split()) for w in fitted.warnings if "more than half" in str(w)]
    assert len(said) == 1 and "(clean " in said[0] and ", info " in said[0] and "a ceiling or a floor" in said[0]
    ordinal = cfa_tool.fit(model, frame, ordinal="all")
    assert not any("more than half" in str(w) for w in ordinal.warnings)
    # compare gives the same note (pipeline.inputs.few_categories, the one place)
    compared = cfa_tool.compare([model, "factor all: seat, clean, quiet, driver, info\n"], frame)
    assert any("more than half" in str(n) for n in compared.notes)
