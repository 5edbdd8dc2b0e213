"""The methods-and-results paragraph of an invariance ladder describes exactly the ladder fitted: the groups and
their rows, what each level holds equal, the estimator, how each step was judged (the difference test with its
authors), each step's figures, what a partial search freed, and the latent mean differences.

Check values: the ladder of Holzinger & Swineford (1939) by school (three-factor model) in a widely published
invariance tutorial on these data (recalled from memory): configural 115.851 on 48 df, metric 124.044 on 54 df, so
the metric step's difference is 8.19 on 6 df; scalar 164.103 on 60 df (40.06 on 6 df against metric), and the score
tests of the scalar step point at the intercepts of x3 and x7."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from cfa_tool.reporting.workflow_tables import invariance_report
from cfa_tool.workflows.invariance import invariance
from tests.conftest import THREE_FACTORS


def _text(result) -> str:
    return " ".join(invariance_report(result).paragraph.split())


@pytest.fixture(scope="module")
def partial_ladder(hs_data):
    return invariance(THREE_FACTORS, hs_data, "school", partial="auto")


def test_the_paragraph_names_the_ladder_the_groups_and_the_test(partial_ladder):
    text = _text(partial_ladder)
    assert text.startswith("Measurement invariance across school (two groups: Grant-White, n = 145; Pasteur, n = 156)")
    assert ("configural, metric (loadings equal across groups), scalar (loadings and intercepts equal across groups), "
            "and strict (loadings, intercepts, and error variances and covariances equal across groups)") in text
    assert "The configural model had nine indicators of three correlated factors (visual, textual, and speed)" in text
    assert "the factor means of Grant-White were fixed at zero" in text
    assert "the likelihood-ratio chi-square difference test (Steiger, Shapiro & Browne, 1985)" in text
    assert "The configural model did not hold (\u03c7\u00b2(48) = 115.85, p < .001" in text
    assert "Metric invariance held (\u03c7\u00b2(6) = 8.19, p = .224" in text
    # the scalar step with every equality, then what the search freed (the tutorial's x3 and x7)
    assert "Scalar invariance did not hold with every equality (\u03c7\u00b2(6) = 40.06, p < .001); after freeing " \
           "the intercept of x3 and the intercept of x7" in text
    assert "capitalises on chance" in text and "as partial invariance" in text
    assert "The metric, scalar, and strict steps were tested after a step that did not hold" in text
    assert "conventions rather than strict criteria" in text


def test_the_latent_differences_are_those_of_the_report(partial_ladder):
    text = _text(partial_ladder)
    assert "Latent mean differences from the partially invariant scalar model, against Grant-White" in text
    for d in partial_ladder.latent_differences:
        assert f"{d.factor} in {d.group}, {d.mean:.2f} (SE = {d.se:.2f}" in text.replace("-0.00", "0.00")


def test_every_step_figure_is_the_step_test(partial_ladder):
    text = _text(partial_ladder)
    for step in partial_ladder.steps[1:]:
        t = step.versus_previous
        assert f"\u03c7\u00b2({t.df_difference}) = {t.chi_square_difference:.2f}" in text


def test_ordinal_ladders_name_thresholds_first_and_the_adjusted_difference(hs_data):
    cut = hs_data.copy()
    for column in [f"x{i}" for i in range(1, 10)]:
        cut[column] = pd.qcut(hs_data[column], 4, labels=False) + 1
    text = _text(invariance(THREE_FACTORS, cut, "school", ordinal="all"))
    assert "configural, thresholds (thresholds equal across groups), metric (thresholds and loadings equal" in text
    assert "thresholds before loadings as Wu & Estabrook (2016) set out" in text
    assert "Threshold invariance" in text and "Thresholds invariance" not in text
    assert "(Satorra, 2000; Asparouhov & Muthen, 2006)" in text
    assert "\u0394CFI" not in text and "change-in-fit guides" not in text


def test_parameters_freed_at_an_earlier_step_stay_free_and_are_said(partial_ladder):
    # re-check: a step after a partial one keeps the freed parameters free; it read as plain full invariance, and
    # the latent differences' table note was pasted into the paragraph
    from cfa_tool.reporting.workflow_tables import invariance_report

    text = _text(partial_ladder)
    assert "Strict invariance did not hold with every equality but those freed at earlier steps" in text
    assert "From the partially invariant scalar model:" not in text
    labels = [row[0] for row in invariance_report(partial_ladder).tables[1].rows]
    assert "strict (before its search)" in labels and "strict (partial, 1 freed)" in labels
    assert "scalar (all equal)" in labels and "scalar (2 freed)" in labels
