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
from cfa_tool.reporting.tables import distinct_table, reliability_table
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
    return " ".join(str(text).split())  # (a note with a model statement apart is a Note: as the terminal says it)


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
    # (a value's delta-method interval in brackets after it, where the fit gives one)
    said = dict((f, float("0" + v)) for v, f in re.findall(r"(\.\d\d)(?: \[[^\]]*\])? for (\w+)", text))
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


# ---------------------------------------------------------------- the distinct-factors table

def test_pairs_whose_correlation_the_model_fixes_are_left_out_with_a_note(fits):
    """A correlation the model fixes (at 0 in the bundled bifactor model) is not estimated, so 'sqrt(AVE) > |r|'
    holds for it by construction: such pairs are left out and the note says which and why."""
    assert distinct_table(fits["uncorrelated"]) is None and distinct_table(fits["fix"]) is None  # nothing is left
    table = distinct_table(fits["correlated"])  # the specific factors' correlations are estimated: compared
    assert [tuple(row[:2]) for row in table.rows] == [("punctuality", "comfort"), ("punctuality", "courtesy"),
                                                      ("comfort", "courtesy")]
    note = _flat(table.note)
    assert "Not compared: experience with punctuality, experience with comfort, and experience with courtesy." in note
    assert "Left out" not in note


@pytest.mark.parametrize("line, scale, left_out, at", [
    ("uncorrelated comfort, courtesy", "", ("comfort", "courtesy"), "0"),
    ("fix covariance(comfort, courtesy) = 0", "", ("comfort", "courtesy"), "0"),
    # both factors of fixed variance: the covariance fixed at .3 fixes their correlation at .3
    ("fix covariance(punctuality, comfort) = 0.3", "scale latent by variance\n", ("punctuality", "comfort"), ".3"),
])
def test_any_fixed_correlation_is_left_out(line, scale, left_out, at):
    data = resource_dir("demo") / "rider_survey.csv"
    text = (resource_dir("models") / "rider_three_factors.cfa").read_text() + scale + line + "\n"
    table = distinct_table(cfa_tool.fit(text, data))
    pairs = [tuple(row[:2]) for row in table.rows]
    assert left_out not in pairs and len(pairs) == 2
    a, b = left_out
    assert (f"Left out: {a} with {b}, whose correlation the model fixes (at {at}): a correlation the model sets is not "
            f"estimated from the data") in _flat(table.note)
    assert "fixed by the model, not estimated" not in _flat(table.note)  # no longer a reason for a missing interval


def test_a_fixed_covariance_of_factors_with_free_variances_leaves_their_correlation_estimated():
    """Marker scaling: a covariance fixed at .1 with the factors' variances estimated fixes no correlation
    (r = .1 / sqrt(var_a var_b)), so the pair stays in the table."""
    data = resource_dir("demo") / "rider_survey.csv"
    text = (resource_dir("models") / "rider_three_factors.cfa").read_text() + "fix covariance(punctuality, comfort) = 0.1\n"
    result = cfa_tool.fit(text, data)
    table = distinct_table(result)
    row = next(r for r in table.rows if tuple(r[:2]) == ("punctuality", "comfort"))
    variances = {r.variables[0]: r.estimate for r in result.estimates if r.kind == "factor_variance"}
    assert float("0" + row[2]) == pytest.approx(0.1 / (variances["punctuality"] * variances["comfort"]) ** 0.5, abs=0.005)
    assert "Left out" not in _flat(table.note)
