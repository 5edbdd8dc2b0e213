"""Two trait factors correlating nearly 1 are a caution of the fit itself, in every view (hostile s20: a correlation of
.998 was cautioned in the scores' report but the fit showed it only in the distinctness table).  The data are rows
whose covariance matrix is exactly the population one (tests.conftest.exact_cfa_rows), so the fitted correlation is
the invented population value; the line of .95 is this tool's (assessment.admissibility.HARDLY_DISTINCT)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import HARDLY_DISTINCT, ProblemKind
from tests.conftest import exact_cfa_rows

THREE = "factor a: y1, y2, y3\nfactor b: y4, y5, y6\nfactor c: y7, y8, y9\n"


def _rows(r_ab: float, n: int = 600):
    L = np.zeros((9, 3))
    for k in range(3):
        L[3 * k:3 * k + 3, k] = 0.7
    phi = np.array([[1.0, r_ab, 0.3], [r_ab, 1.0, 0.3], [0.3, 0.3, 1.0]])  # invented population values
    return exact_cfa_rows(L, phi, np.eye(9) * 0.51, n, 20261205)


def _hardly(result):
    return [p for p in result.problems if p.kind is ProblemKind.FACTORS_HARDLY_DISTINCT]


def test_a_correlation_of_97_is_a_caution_first_and_the_solution_stays_admissible():
    result = cfa_tool.fit(THREE, _rows(0.97))
    found = _hardly(result)
    assert len(found) == 1 and result.admissible
    assert found[0].touches("factor_covariance", ("a", "b"))
    assert found[0].value == pytest.approx(0.97, abs=1e-6)  # the population value of the exact rows
    assert "correlate .970" in str(found[0].explanation)
    assert result.problems[0].kind is ProblemKind.FACTORS_HARDLY_DISTINCT  # nothing else to say before it
    words = str(found[0].advice)
    assert "one factor" in words and "convention" in words
    assert [p["kind"] for p in result.to_dict()["problems"]] == [ProblemKind.FACTORS_HARDLY_DISTINCT.value]


def test_below_the_line_no_caution():
    assert HARDLY_DISTINCT == 0.95
    assert _hardly(cfa_tool.fit(THREE, _rows(0.93))) == []


def test_a_correlation_the_model_fixes_at_one_is_not_the_datas_finding():
    text = THREE + "scale latent by variance\nfix covariance(a, b) = 1\n"
    assert _hardly(cfa_tool.fit(text, _rows(0.97))) == []


def test_a_general_factor_and_its_specific_factors_are_not_compared():
    L = np.zeros((9, 4))
    L[:, 0] = 0.6
    for k in range(3):
        L[3 * k:3 * k + 3, k + 1] = 0.4
    rows = exact_cfa_rows(L, np.eye(4), np.diag(1 - (L**2).sum(axis=1)), 800, 7)
    text = ("factor g: y1, y2, y3, y4, y5, y6, y7, y8, y9\nfactor s1: y1, y2, y3\nfactor s2: y4, y5, y6\n"
            "factor s3: y7, y8, y9\nuncorrelated g, s1, s2, s3\nscale latent by variance\n")
    assert _hardly(cfa_tool.fit(text, rows)) == []


def test_first_order_factors_nearly_one_through_a_higher_order_factor_are_cautioned():
    # a and b load .99 and .99 on a factor above them: their implied correlation is .9801; c loads .5 (invented)
    gamma = np.array([0.99, 0.99, 0.5])
    phi = np.outer(gamma, gamma)
    np.fill_diagonal(phi, 1.0)
    L = np.zeros((9, 3))
    for k in range(3):
        L[3 * k:3 * k + 3, k] = 0.7
    rows = exact_cfa_rows(L, phi, np.eye(9) * 0.51, 800, 11)
    text = THREE + "factor top: a, b, c\n"
    found = _hardly(cfa_tool.fit(text, rows))
    assert len(found) == 1 and found[0].touches("factor_covariance", ("a", "b"))
    assert found[0].value == pytest.approx(0.9801, abs=1e-4)


def test_the_scores_report_says_it_once():
    from cfa_tool.reporting.score_report import _with_precision_problems

    scored = cfa_tool.scores(THREE, _rows(0.97))
    kinds = [p.kind for p in _with_precision_problems(scored).problems]
    assert kinds.count(ProblemKind.SCORED_FACTORS_HARDLY_DISTINCT) == 1
    assert ProblemKind.FACTORS_HARDLY_DISTINCT not in kinds
    assert ProblemKind.FACTORS_HARDLY_DISTINCT in [p.kind for p in scored.fit.problems]  # the fit's own kept


def test_in_each_group_its_own():
    rows = _rows(0.97)
    other = _rows(0.6)
    rows["g"], other["g"] = "north", "south"

    result = cfa_tool.fit(THREE, pd.concat([rows, other], ignore_index=True), group="g")
    found = _hardly(result)
    assert [p.group for p in found] == ["north"]
