"""A column of an SPSS file whose codes carry value labels, used in a role that takes numbers (new-user trial s19,
finding 4): a tenure band coded 1 to 4 with labels ('<1 year', ...) as a missing-data helper was refused as 'holds
text', because the reader turned every labelled column but the items into its labels (as a group column is read).
A helper and a weights column are read as their codes; a helper's note names each code with its label (the order
the number gives the categories), and a helper the file measures as nominal, of more than two categories, is a
caution first (its codes enter the likelihood as one number, an order the file says they have not).

The check value is the fit of the same codes without value labels (a CSV file): what the codes mean.  Data:
tests/pipeline/test_missing_helpers.py's answers (simulated, fixed seed)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from tests.pipeline.test_missing_helpers import frame  # noqa: F401 (a fixture)

pyreadstat = pytest.importorskip("pyreadstat")

MODEL = "factor F: y1, y2, y3, y4\n"
TENURE = {1.0: "<1 year", 2.0: "1-3 years", 3.0: "3-10 years", 4.0: "10+ years"}
DEPARTMENT = {1.0: "Depot", 2.0: "Fleet", 3.0: "Desk"}


@pytest.fixture(scope="module")
def coded(frame) -> pd.DataFrame:
    """The answers with 'tenure', age cut into four bands coded 1 to 4 (y1 is missing where age is high, so the band
    carries the gaps), 'unit' coded 1 to 3 and 'count' (frequency weights 1 to 3)."""
    out = frame[["y1", "y2", "y3", "y4", "count"]].astype(float).copy()
    out["tenure"] = pd.cut(frame["age"], frame["age"].quantile([0, .25, .5, .75, 1]).to_numpy(), labels=False,
                           include_lowest=True).astype(float) + 1
    out["unit"] = (np.arange(len(out)) % 3 + 1).astype(float)
    return out


def _sav(coded: pd.DataFrame, path, measure: str = "ordinal") -> str:
    pyreadstat.write_sav(coded, str(path), variable_value_labels={
        "tenure": TENURE, "unit": DEPARTMENT, "count": {1.0: "one", 2.0: "two", 3.0: "three"}},
        variable_measure={"tenure": measure, "unit": "nominal"})
    return str(path)


def _estimates(result) -> list[float]:
    return [e.estimate for e in result.estimates]


def test_a_labelled_helper_is_read_as_its_codes(coded, tmp_path):
    plain = tmp_path / "plain.csv"
    coded.to_csv(plain, index=False)
    reference = cfa_tool.fit(MODEL, str(plain), missing_helpers="tenure")  # the same codes without labels
    result = cfa_tool.fit(MODEL, _sav(coded, tmp_path / "labelled.sav"), missing_helpers="tenure")
    assert np.allclose(_estimates(result), _estimates(reference), atol=1e-8)
    assert result.fit.chi_square == pytest.approx(reference.fit.chi_square, abs=1e-8)
    note = [str(w) for w in result.warnings if "the missing-data helper 'tenure' is read as its codes" in str(w)]
    assert len(note) == 1
    assert "labels 1 '<1 year', 2 '1-3 years', 3 '3-10 years', 4 '10+ years'" in note[0]
    assert "its codes stand for an order of its categories" in note[0]
    assert not any(p.kind is ProblemKind.HELPER_UNORDERED for p in result.problems)  # measured as ordinal


def test_a_nominal_helper_of_three_categories_is_a_caution_first(coded, tmp_path):
    data = _sav(coded, tmp_path / "labelled.sav", measure="nominal")
    result = cfa_tool.fit(MODEL, data, missing_helpers="unit")
    first = result.problems[0]
    assert first.kind is ProblemKind.HELPER_UNORDERED
    assert first.explanation.startswith("labelled.sav measures the missing-data helper 'unit' as nominal")
    assert "its 3 codes were used as if they ordered its categories" in first.explanation
    assert "one 0/1 column per category but one" in str(first.advice)
    # a nominal helper of two categories is carried whole by one number: no caution, the note says so
    two = coded.assign(unit=np.where(coded["unit"] > 1, 2.0, 1.0))
    result = cfa_tool.fit(MODEL, _sav(two, tmp_path / "two.sav", measure="nominal"), missing_helpers="unit")
    assert not any(p.kind is ProblemKind.HELPER_UNORDERED for p in result.problems)
    assert any("carries the whole distinction, as a 0/1 column would" in str(w) for w in result.warnings)


def test_labelled_weights_are_read_as_their_codes(coded, tmp_path):
    plain = tmp_path / "plain.csv"
    coded.to_csv(plain, index=False)
    reference = cfa_tool.fit(MODEL, str(plain), weights="count", weight_kind="frequency")
    result = cfa_tool.fit(MODEL, _sav(coded, tmp_path / "labelled.sav"), weights="count", weight_kind="frequency")
    assert np.allclose(_estimates(result), _estimates(reference), atol=1e-8)
    assert result.n_obs == reference.n_obs == int(coded["count"].sum())
