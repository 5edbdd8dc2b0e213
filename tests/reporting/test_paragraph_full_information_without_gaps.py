"""Full-information ML asked for on rows without a missing answer: the methods text said "every answer of every row
was used, including rows with missing answers, which assumes that answers are missing at random ...; each item was
answered in at least 100% of the rows" (hostile tester, sixteenth round, case 05).  On complete rows the
full-information likelihood is the complete-data likelihood (Enders 2010, ch. 4): the text says that nothing was
missing and that the fit is the ordinary ML fit with the item means estimated, and assumes nothing about gaps.  The
chi-square is checked against the ordinary fit's (the same likelihood ratio)."""

from pathlib import Path

import pandas as pd
import pytest

from cfa_tool import compare, fit
from cfa_tool.reporting.paragraph import comparison_paragraph, methods_paragraph

ROOT = Path(__file__).resolve().parents[2]
MODEL = ROOT / "models" / "rider_three_factors.cfa"


@pytest.fixture(scope="module")
def complete():
    return pd.read_csv(ROOT / "demo" / "rider_survey.csv").dropna()


def test_fit_says_nothing_was_missing(complete):
    result = fit(MODEL, complete, missing="full-information")
    ordinary = fit(MODEL, complete)
    assert result.fit.chi_square == pytest.approx(ordinary.fit.chi_square, rel=1e-6)
    text = methods_paragraph(result)
    assert "including rows with missing answers" not in text and "100%" not in text
    assert "missing at random" not in text
    assert "no answer on the model's variables was missing" in text


def test_fit_with_gaps_keeps_its_assumption():
    text = methods_paragraph(fit(MODEL, pd.read_csv(ROOT / "demo" / "rider_survey.csv")))
    assert "including rows with missing answers" in text and "missing at random" in text


def test_compare_says_nothing_was_missing(complete, tmp_path: Path):
    other = tmp_path / "more.cfa"
    other.write_text(MODEL.read_text() + "\ncovary easy_transfer, room_to_stand\n")
    text = comparison_paragraph(compare([MODEL, other], complete, missing="full-information"))
    assert "including rows with missing answers" not in text
    assert "no answer on the model's variables was missing" in text
