"""The methods paragraph reads a bifactor structure (Holzinger & Swineford 1937; Reise 2012) from what the fit carries
-- the loadings and the factors' zero correlations, by the one rule (assessment.method_factors.bifactor_parts) the
reliability rows are made by -- however the model holds its factors uncorrelated: by 'uncorrelated' (the bundled
models/rider_bifactor.cfa) or by fixing their covariances at 0.  Before, a model of the second kind was described as
"four correlated factors", each "as a method factor does", while its reliability table gave omega hierarchical."""

from __future__ import annotations

import re

import pytest

import cfa_tool
from cfa_tool.assessment.reliability import BifactorPart
from cfa_tool.reporting.paragraph import comparison_paragraph, methods_paragraph
from cfa_tool.reporting.tables import reliability_table
from cfa_tool.resources import resource_dir

SPECIFIC = ("punctuality", "comfort", "courtesy")
FACTORS = ("experience",) + SPECIFIC
BUNDLED = (resource_dir("models") / "rider_bifactor.cfa").read_text()
PAIRS = [(a, b) for i, a in enumerate(FACTORS) for b in FACTORS[i + 1:]]
# the same model with every covariance fixed at 0 instead of 'uncorrelated'
BY_FIX = BUNDLED.replace("uncorrelated experience, punctuality, comfort, courtesy",
                         "fix " + ", ".join(f"covariance({a}, {b})" for a, b in PAIRS) + " = 0")
# the specific factors correlated with each other, each uncorrelated with the general factor (by fix)
CORRELATED = BUNDLED.replace("uncorrelated experience, punctuality, comfort, courtesy",
                             "fix " + ", ".join(f"covariance(experience, {s})" for s in SPECIFIC) + " = 0")


def _flat(text: str) -> str:
    return " ".join(text.split())


@pytest.fixture(scope="module")
def fits():
    data = resource_dir("demo") / "rider_survey.csv"
    return {name: cfa_tool.fit(text, data) for name, text in
            (("uncorrelated", BUNDLED), ("fix", BY_FIX), ("correlated", CORRELATED))}


def _parts_of_reliability(result) -> dict[str, tuple[str, ...]]:
    return {r.factor: r.shares_items_with for r in result.groups[0].reliability if r.bifactor is BifactorPart.GENERAL}


def test_the_bundled_bifactor_model_is_one_model_however_its_zero_covariances_are_written(fits):
    assert BY_FIX != BUNDLED and "uncorrelated" not in BY_FIX.split("\n", 3)[-1]
    assert fits["fix"].fit.chi_square == pytest.approx(fits["uncorrelated"].fit.chi_square, rel=1e-8)
    assert fits["fix"].fit.df == fits["uncorrelated"].fit.df == 42  # 78 moments - 36 parameters (24 loadings, 12 residuals)


@pytest.mark.parametrize("kind", ["uncorrelated", "fix"])
def test_paragraph_and_reliability_table_describe_one_bifactor_structure(fits, kind):
    result = fits[kind]
    assert _parts_of_reliability(result) == {"experience": SPECIFIC}
    assert [row[0] for row in reliability_table(result).rows] == ["experience"] + [f"{s} (subscale)" for s in SPECIFIC]
    text = _flat(methods_paragraph(result))
    assert ("a bifactor structure (Holzinger & Swineford, 1937; Reise, 2012), a general factor (experience) on all 12 "
            "items and three specific factors (punctuality, comfort, and courtesy), each on its own part of those items "
            "and uncorrelated with the general factor and with each other, was estimated") in text
    for wrong in ("correlated factors", "as a method factor does", "fixed at 0", "fixed at zero", "Factor correlations"):
        assert wrong not in text, wrong
    # the omegas the paragraph gives are the reliability rows' own
    rows = {r.factor: r for r in result.groups[0].reliability}
    said = dict((f, float("0" + v)) for v, f in re.findall(r"(\.\d\d) for (\w+)", text))
    assert said["experience"] == pytest.approx(rows["experience"].omega_hierarchical, abs=0.005)
    for s in SPECIFIC:
        assert rows[s].bifactor is BifactorPart.SPECIFIC and said[s] == pytest.approx(rows[s].omega, abs=0.005)


def test_correlated_specific_factors_are_not_said_to_be_uncorrelated(fits):
    result = fits["correlated"]
    assert _parts_of_reliability(result) == {"experience": SPECIFIC}
    text = _flat(methods_paragraph(result))
    assert "uncorrelated with the general factor, was estimated" in text and "with each other" not in text
    assert "Factor correlations ranged from" in text  # the three estimated ones


def test_a_comparison_without_reliability_rows_reads_the_same_structure():
    """compare fits without diagnostics (no reliability rows): the paragraph reads the structure all the same."""
    data = resource_dir("demo") / "rider_survey.csv"
    comparison = cfa_tool.compare([(resource_dir("models") / "rider_three_factors.cfa").read_text(), BY_FIX], data)
    text = _flat(comparison_paragraph(comparison))
    assert "a general factor (experience) on all 12 items and three specific factors" in text
    assert "as a method factor does" not in text
