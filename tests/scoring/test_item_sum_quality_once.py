"""An item sum's reliability and spread are computed once (scoring.quality.SumScore) and every table that prints them
reads that value: the quality table's item-sum column, the item sums' precision table and the keyed sums' table.

Check values and their sources:
* a congeneric factor's keyed sum has omega (sum lambda)^2 phi / ((sum lambda)^2 phi + sum theta) (McDonald 1999),
  computed here with numpy from the fit's estimates (Holzinger & Swineford 1939 data, tests/datasets);
* a factor with one item gets no omega: its share of the item's variance is whatever the fixed error variance makes
  it (Bollen 1989, ch. 7), the rule the fit's reliability table already follows;
* the sum of ordinal answers' codes has Green & Yang's (2009, eqs. 19-21) reliability, written out term by term with
  scipy in tests/assessment/test_ordinal_reliability.py (its helper is used here) from the fitted loadings, factor
  variance and thresholds of rows simulated with numpy (fixed seed);
* a sum that adds continuous items' values to ordinal answers' codes has no such formula in Green & Yang (2009): no
  figure is printed for it, and a note says why.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.reporting.numbers import unit
from cfa_tool.reporting.score_report import scores_report
from tests.assessment.test_ordinal_reliability import _green_yang_by_hand

ONE_ITEM = "factor visual: x1\nfix variance(x1) = 0.3\nfactor textual: x4, x5, x6\n"


def _tables(result) -> dict:
    found = {}
    for t in scores_report(result).tables:
        for key, start in (("quality", "Quality of the scores"), ("precision", "Precision of one person's item"),
                           ("sums", "Keyed sum scores")):
            if t.title.startswith(start):
                found[key] = t
    return found


def _printed_omegas(result) -> dict:
    """factor -> (quality table's item-sum cell, precision table's omega cell or None, sums table's omega cell)."""
    t = _tables(result)
    quality = {row[0]: row[t["quality"].columns.index("Item sum ω")] for row in t["quality"].rows}
    precision = {row[0]: row[t["precision"].columns.index("ω")] for row in t["precision"].rows} if "precision" in t \
        else {}
    sums = {row[0]: row[t["sums"].columns.index("Sum omega")] for row in t["sums"].rows}
    return {f: (quality[f], precision.get(f), sums[f]) for f in quality}


def test_the_three_tables_print_one_omega_and_a_one_item_sum_has_none(hs_data):
    result = cfa_tool.scores(ONE_ITEM, hs_data, methods=["regression", "item-sum"])
    est = {(r.kind, r.variables): r.estimate for r in result.fit.estimates}
    lam = sum(est[("loading", ("textual", x))] for x in ("x4", "x5", "x6"))
    common = lam**2 * est[("factor_variance", ("textual",))]
    mcdonald = common / (common + sum(est[("residual_variance", (x,))] for x in ("x4", "x5", "x6")))
    printed = _printed_omegas(result)
    assert printed["textual"] == (unit(mcdonald),) * 3
    # before: the sums table printed .779 for visual's one item while the quality table left the cell empty
    assert printed["visual"] == ("—", None, "—")
    # nor its correlation with the factor, the square root of that reliability (review s14: .883 beside the dash)
    from cfa_tool.reporting.score_report import sum_table

    row = next(r for r in sum_table(result, 0).rows if r[0] == "visual")
    assert row[4] == "—"
    (summary,) = result.item_sums
    (quality,) = result.quality
    assert all(any(s is q for q in quality.sums) for s in summary.sums)  # the same objects, not a second computation
    sums = {s.factor: s for s in quality.sums}
    assert sums["textual"].omega == pytest.approx(mcdonald, rel=1e-9)
    assert np.isnan(sums["visual"].omega) and np.isnan(summary.omega[summary.factors.index("visual")])
    (p,) = [p for p in summary.precision if p.factor == "textual"]
    assert p.reliability == sums["textual"].omega and p.scale_sd == sums["textual"].sd


def _ordinal_answers(n: int, seed: int, continuous: bool = False) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    eta = rng.standard_normal(n)
    loadings = np.array([0.8, 0.7, 0.75, 0.6])
    latent = eta[:, None] * loadings + rng.standard_normal((n, 4)) * np.sqrt(1 - loadings**2)
    answers = 1 + (latent[:, :, None] > np.array([-1.0, 0.0, 0.8])).sum(axis=2)  # four answers, coded 1 to 4
    frame = pd.DataFrame(answers, columns=["a1", "a2", "a3", "a4"]).astype(float)
    if continuous:
        frame["a4"] = 10 + 2 * latent[:, 3]
    return frame


def test_an_ordinal_sum_prints_green_and_yangs_reliability_in_every_table():
    frame = _ordinal_answers(1500, 14)
    result = cfa_tool.scores("factor f: a1, a2, a3, a4\n", frame, methods=["item-sum"], ordinal="all")
    est = {(r.kind, r.variables): r.estimate for r in result.fit.estimates}
    phi = est[("factor_variance", ("f",))]
    lam = [est[("loading", ("f", x))] for x in ("a1", "a2", "a3", "a4")]
    thresholds = [[est[("threshold", (x, str(k)))] for k in (1, 2, 3)] for x in ("a1", "a2", "a3", "a4")]
    by_hand = _green_yang_by_hand(lam, phi, thresholds, [[1, 2, 3, 4]] * 4, [1, 1, 1, 1])
    (sums,) = result.quality[0].sums
    assert sums.omega == pytest.approx(by_hand, rel=1e-6)
    assert _printed_omegas(result)["f"] == (unit(by_hand),) * 3


def test_a_sum_of_ordinal_and_continuous_items_says_why_it_has_no_reliability():
    frame = _ordinal_answers(800, 15, continuous=True)
    result = cfa_tool.scores("factor f: a1, a2, a3, a4\n", frame, methods=["item-sum"], ordinal=["a1", "a2", "a3"])
    (summary,) = result.item_sums
    assert summary.mixed == ("f",) and summary.precision == () and np.isnan(summary.omega[0])
    tables = _tables(result)
    quality = tables["quality"]
    assert quality.rows[0][quality.columns.index("Item sum ω")] == "—"
    assert "precision" not in tables
    assert ("No reliability or standard error of measurement for the item sums and means of f: they add continuous "
            "items' values to ordinal answers' codes, and the fitted model gives the spread of a sum of answers' codes "
            "alone (Green & Yang 2009), not of such a mixture.") in scores_report(result).notes
