"""explore names items answered in few categories that it analyses as continuous (re-check s15: 4-point answers were
explored through Pearson correlations without a word): a note says that its correlations are then Pearson correlations
of few-category answers, that the loadings tend to come out too small, and which option explores the items by
polychoric correlations (--ordinal, which explore offers).  The guide value, at most four categories, is the one fit's
note uses (data.descriptives.FEW_CATEGORIES): treating answers as continuous does about as well as treating them as
ordered categories from five categories on, and understates the loadings below that (Rhemtulla, Brosseau-Liard &
Savalei 2012; recalled from memory).

Check values and their sources: the categories counted by numpy.unique; the loadings against the true loadings of
the simulation (0.7, the values the data were generated with), which the polychoric solution recovers and the Pearson
solution understates (the attenuation of Pearson correlations of categorized answers, Olsson 1979).  Invented data:
a fictional transit agency's rider survey, simulated with a fixed seed."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.cli import main

ITEMS = [f"q{i}" for i in range(1, 9)]
TRUE_LOADING = 0.7


def _survey(cuts, n: int = 400, seed: int = 5) -> pd.DataFrame:
    """Eight items of two factors (four each, loadings 0.7), answered in len(cuts) + 1 categories (invented)."""
    rng = np.random.default_rng(seed)
    eta = rng.standard_normal((n, 2))
    y = TRUE_LOADING * np.repeat(eta, 4, axis=1) + np.sqrt(1 - TRUE_LOADING**2) * rng.standard_normal((n, 8))
    return pd.DataFrame(np.searchsorted(cuts, y) + 1.0, columns=ITEMS)


FOUR = [-0.8, 0.2, 1.0]  # four categories, skewed


def _note(result) -> list[str]:
    return [str(n) for n in result.notes if "answer categories" in str(n)]  # a note with its advice, as text


def test_four_category_items_get_a_note_naming_the_pearson_correlations_and_the_ordinal_option(tmp_path, capsys):
    frame = _survey(FOUR)
    assert all(len(np.unique(frame[c])) == 4 for c in ITEMS)  # numpy: four categories each
    (note,) = _note(cfa_tool.explore(frame, factors=2, replications=10))
    assert note == ("All 8 items (q1, q2, q3, q4, q5, q6, q7, q8) have at most 4 answer categories, and explore's "
                    "correlations of these answers are Pearson correlations, which treat them as continuous: with so "
                    "few categories these correlations, and with them the loadings and communalities, tend to come "
                    "out smaller than those of the responses behind the answers, so that items can seem weaker than "
                    "they are (Rhemtulla, Brosseau-Liard & Savalei 2012). Polychoric correlations estimate the "
                    "correlations of those responses: ordinal='all' explores the items by them.")
    data, js = tmp_path / "four.csv", tmp_path / "four.json"
    frame.to_csv(data, index=False)
    code = main(["explore", "--data", str(data), "--factors", "2", "--replications", "10", "--json", str(js)])
    text = " ".join(capsys.readouterr().out.split())
    assert code == 0 and "--ordinal all explores the items by them." in text
    assert json.loads(js.read_text())["data"]["few_categories_analysed_as_continuous"] == ITEMS


def test_what_the_note_says_of_the_loadings_holds_against_the_simulations_truth():
    frame = _survey(FOUR, n=2000)
    pearson = cfa_tool.explore(frame, factors=2, replications=10)
    polychoric = cfa_tool.explore(frame, factors=2, replications=10, ordinal="all")
    salient = lambda result: np.sort(np.abs(result.exploration.rotated.pattern), axis=1)[:, -1]  # noqa: E731
    assert np.all(salient(pearson) < salient(polychoric))  # every item's loading understated
    assert salient(pearson).mean() < TRUE_LOADING - 0.03  # about .66 against .70
    assert np.abs(salient(polychoric) - TRUE_LOADING).max() < 0.05  # the polychoric solution recovers 0.7
    assert not _note(polychoric)


def test_some_items_of_few_categories_are_named_and_the_option_covers_those_already_ordinal():
    frame = _survey(FOUR).assign(q1=lambda d: d["q1"] + 2 * (d.index % 3))  # q1: 1 to 8, not few categories
    (note,) = _note(cfa_tool.explore(frame, factors=2, replications=10))
    assert note.startswith("7 of the 8 items (q2, q3, q4, q5, q6, q7, q8) have at most 4 answer categories")
    assert note.endswith("ordinal=['q2', 'q3', 'q4', 'q5', 'q6', 'q7', 'q8'] explores the items by them.")
    beside = cfa_tool.explore(frame, factors=2, replications=10, ordinal=["q2"])
    (note,) = _note(beside)
    assert note.startswith("6 of the 8 items (q3, q4, q5, q6, q7, q8) have at most 4 answer categories, and explore "
                           "treats these answers as continuous (Pearson correlations among them, polyserial ones with "
                           "the items analysed as ordinal)")
    assert note.endswith("ordinal=['q2', 'q3', 'q4', 'q5', 'q6', 'q7', 'q8'] explores the items by them.")
    assert beside.few_categories == ("q3", "q4", "q5", "q6", "q7", "q8")


@pytest.mark.parametrize("cuts", [[-1.2, -0.3, 0.4, 1.2], [-1.5, -0.8, -0.2, 0.3, 0.9, 1.5]])
def test_five_or_more_categories_bring_no_note(cuts):
    frame = _survey(cuts)
    assert all(len(np.unique(frame[c])) == len(cuts) + 1 for c in ITEMS)
    result = cfa_tool.explore(frame, factors=2, replications=10)
    assert not _note(result) and result.few_categories == ()
