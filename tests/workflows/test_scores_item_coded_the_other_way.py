"""Scores of other data with an earlier fit, where one item of the new file is coded the other way round (6 - x: a
reverse-worded item recoded in one file and not the other): its correlation with the rest of its factor's items
runs against the fit's loading, and every score of the factor is pulled the wrong way.  Cautioned first, with the
item and the figures, as a shifted scale is (hostile trial s18, finding 2).  The figure checked against numpy's
correlation of the item with the sum of the other items standardized (the corrected item-total correlation of
standardized items; Nunnally & Bernstein 1994, recalled from memory)."""

from __future__ import annotations

import re

import numpy as np
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from tests.conftest import simulate_cfa

COMFORT = ("seat_available", "clean", "temperature", "room_to_stand")


@pytest.fixture(scope="module")
def fitted(rider_demo, rider_model):
    return cfa_tool.fit(rider_model, rider_demo)


def _against(scored) -> list[str]:
    return [str(p.explanation) for p in scored.fit.problems if p.kind is ProblemKind.ITEM_AGAINST_FITTED_LOADING]


def test_an_item_coded_the_other_way_is_cautioned_first_with_its_figures(fitted, rider_demo):
    flipped = rider_demo.copy()
    flipped["clean"] = 6 - flipped["clean"]
    scored = fitted.scores(flipped)
    [said] = _against(scored)
    assert scored.fit.problems[0].kind is ProblemKind.ITEM_AGAINST_FITTED_LOADING  # first in every view
    assert "'clean' correlates -." in said and "rest of comfort's items" in said and "positive" in said
    complete = flipped[list(COMFORT)].dropna()
    z = (complete - complete.mean()) / complete.std()
    expected = np.corrcoef(complete["clean"], z[["seat_available", "temperature", "room_to_stand"]].sum(axis=1))[0, 1]
    shown = float(re.search(r"correlates (-\.\d\d)", said).group(1))
    assert expected < -0.5 and abs(shown - expected) < 0.011  # pairwise rows: within rounding of the complete rows'
    assert "CFA" not in said and "recode" in str(scored.fit.problems[0].advice)


def test_the_fitted_file_itself_says_nothing(fitted, rider_demo):
    assert not _against(fitted.scores(rider_demo))


def test_a_reverse_keyed_item_coded_as_in_the_fit_says_nothing():
    loadings = np.array([[0.8], [0.7], [-0.7], [0.6]])  # the third item reverse-worded, as in the fit's data
    theta = np.diag(1 - (loadings**2).ravel())
    data = simulate_cfa(loadings, np.eye(1), theta, 400, 5, names=["a", "b", "c", "d"])
    result = cfa_tool.fit("factor f: a, b, c, d\n", data)
    assert result.estimates and not _against(result.scores(simulate_cfa(loadings, np.eye(1), theta, 200, 6,
                                                                         names=["a", "b", "c", "d"])))
    turned = data.copy()
    turned["c"] = -turned["c"]  # now coded as the other items: against its negative loading
    [said] = _against(result.scores(turned))
    assert "'c' correlates" in said and "negative" in said
