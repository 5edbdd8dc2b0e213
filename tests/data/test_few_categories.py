"""Items of few answer categories fitted as continuous get a note pointing to the ordinal analysis (new-user
trial 7, U5: four-point items with a floor were fitted by normal-theory ML without a word).  The guide value, at most
four categories, is common practice after Rhemtulla, Brosseau-Liard & Savalei (2012; recalled from memory: ML on
Pearson covariances does well from about five categories on).  Check values: categories counted by numpy.unique."""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.data.descriptives import few_category_items

MODEL = "factor f: y1, y2, y3, y4\n"


def _answers(categories: int, seed: int = 3, n: int = 400) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    latent = rng.normal(size=(n, 1)) * 0.8 + rng.normal(size=(n, 4)) * 0.6
    cuts = np.quantile(latent, np.linspace(0, 1, categories + 1)[1:-1])
    return pd.DataFrame(np.searchsorted(cuts, latent).astype(float), columns=["y1", "y2", "y3", "y4"])


def test_items_of_four_categories_are_named_with_the_remedy():
    data = _answers(4)
    data.loc[::7, "y2"] = np.nan  # gaps do not count as a category
    assert all(len(np.unique(data[c].dropna())) == 4 for c in data)
    result = cfa_tool.fit(MODEL, data)
    (note,) = [w for w in result.warnings if "answer categories" in w]
    assert note.startswith("4 of the 4 items (y1, y2, y3, y4) have at most 4 answer categories") and \
        note.endswith("--ordinal all")
    assert not [w for w in cfa_tool.fit(MODEL, data, ordinal="all").warnings if "answer categories" in w]


def test_five_categories_or_measures_bring_no_note():
    five = _answers(5)
    assert all(len(np.unique(five[c])) == 5 for c in five)
    assert not [w for w in cfa_tool.fit(MODEL, five).warnings if "answer categories" in w]
    measured = _answers(4).assign(y3=lambda d: d["y3"] + 0.5 * (d.index % 2))  # half steps: a measure, 8 values
    assert few_category_items(measured.to_numpy(), tuple(measured.columns)) == ("y1", "y2", "y4")
    constant = _answers(4).assign(y4=1.0)
    assert "y4" not in few_category_items(constant.to_numpy(), tuple(constant.columns))


def test_compare_and_invariance_give_the_same_note():
    # re-check 7: the note was given by fit only; compare and invariance treat the items as continuous too
    from cfa_tool.workflows.compare import compare
    from cfa_tool.workflows.invariance import invariance

    data = _answers(4, n=600).assign(site=lambda d: np.where(d.index % 2 == 0, "east", "west"))
    two = "factor f: y1, y2\nfactor g: y3, y4\n"
    assert any("answer categories" in w for w in compare([MODEL, two], data).notes)
    assert any("answer categories" in w for w in invariance(MODEL, data, "site").notes)
