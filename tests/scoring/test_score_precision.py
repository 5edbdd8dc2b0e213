"""How precise one person's score is, in plain words (scores report).

Check values by hand: for one factor, the regression score's error variance is Phi - Phi^2 l' Sigma^-1 l with
Sigma = l Phi l' + Theta (Thurstone 1935's regression estimator; the mean squared error of a best linear
predictor), the 95% band is +/-1.96 SE and the smallest difference two people's scores need to exceed chance at
the 5% level is 1.96 sqrt(2) SE (Gulliksen 1950; recalled from memory, common practice)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.reporting.score_report import scores_report
from cfa_tool.scoring.methods import ScoreMethod
from cfa_tool.scoring.quality import precision_of


def test_standard_error_band_and_smallest_difference_by_hand(hs_data):
    result = cfa_tool.scores("factor visual: x1, x2, x3\n", hs_data)
    est = {(r.kind, r.variables): r.estimate for r in result.fit.estimates}
    lam = np.array([est[("loading", ("visual", f"x{i}"))] for i in (1, 2, 3)])
    theta = np.diag([est[("residual_variance", (f"x{i}",))] for i in (1, 2, 3)])
    phi = est[("factor_variance", ("visual",))]
    sigma = phi * np.outer(lam, lam) + theta
    se = np.sqrt(phi - phi**2 * lam @ np.linalg.solve(sigma, lam))
    (p,) = precision_of(result.quality[0], ScoreMethod.REGRESSION)
    assert p.standard_error == pytest.approx(se, rel=1e-8)
    assert p.band == pytest.approx(1.959964 * se, rel=1e-6)
    assert p.smallest_difference == pytest.approx(1.959964 * np.sqrt(2) * se, rel=1e-6)
    assert p.band_in_sd == pytest.approx(1.959964 * se / np.sqrt(phi), rel=1e-6)
    # the regression score's reliability is 1 - SE^2 / Phi (its squared correlation with the factor)
    assert p.reliability == pytest.approx(1 - se**2 / phi, rel=1e-8)
    report = scores_report(result)
    table = next(t for t in report.tables if t.title.startswith("Precision of one person"))
    assert table.rows[0][:3] == ("visual", f"{se:.2f}", f"±{1.959964 * se:.2f}")
    # three items of a reliability below .90: a caution first, in the box read before the scores (new user s14:
    # it came last, after the tables), not among the closing cautions
    low = [c for c in report.notice.lines if "below the .90 that decisions about individuals usually need" in c]
    assert len(low) == 1 and f"visual {p.reliability:.2f}".replace("0.", ".") in low[0]
    assert report.notice.heading == "Check before using these scores"
    assert not [c for c in report.cautions if "decisions about individuals usually need" in c]


def test_the_precision_table_is_of_the_first_method_written(hs_data):
    """Continuous items' quality holds every method's precision in one field, as the ordinal items' quality holds the
    posterior means': the report reads the first method written from it.  Bartlett scores' error variance
    (L' Theta^-1 L)^-1 (Bartlett 1937; the formula recalled from memory) by hand."""
    result = cfa_tool.scores("factor visual: x1, x2, x3\n", hs_data, methods=["bartlett", "regression"])
    q = result.quality[0]
    assert [p.method for p in q.precision] == [ScoreMethod.REGRESSION, ScoreMethod.BARTLETT,
                                               ScoreMethod.CORRELATION_PRESERVING]
    est = {(r.kind, r.variables): r.estimate for r in result.fit.estimates}
    lam = np.array([est[("loading", ("visual", f"x{i}"))] for i in (1, 2, 3)])
    theta = np.array([est[("residual_variance", (f"x{i}",))] for i in (1, 2, 3)])
    se = np.sqrt(1.0 / (lam @ (lam / theta)))
    (p,) = precision_of(q, ScoreMethod.BARTLETT)
    assert p.standard_error == pytest.approx(se, rel=1e-8)
    table = next(t for t in scores_report(result).tables if t.title.startswith("Precision of one person"))
    assert table.rows[0][:2] == ("visual", f"{se:.2f}") and "For Bartlett scores" in table.note
    assert [d["method"] for d in q.to_dict()["precision"]] == ["regression", "bartlett", "correlation-preserving"]


def test_no_precision_caution_when_the_scores_are_reliable_enough():
    rng = np.random.default_rng(12)
    eta = rng.normal(size=(600, 1))
    data = pd.DataFrame(eta * 0.95 + rng.normal(size=(600, 8)) * np.sqrt(1 - 0.95**2),
                        columns=[f"q{i}" for i in range(1, 9)])
    result = cfa_tool.scores("factor f: q1..q8\n", data)
    (p,) = precision_of(result.quality[0], ScoreMethod.REGRESSION)
    assert p.reliability > 0.9
    report = scores_report(result)
    assert not [c for c in report.cautions + (report.notice.lines if report.notice else ())
                if "decisions about individuals usually need" in c]


def test_a_factor_of_one_item_is_said_to_restate_its_fixed_error_variance(hs_data):
    # one item with its error variance fixed at 0 (hostile trial 6, H6): determinacy 1 and SE 0 are the assumption,
    # not evidence; both tables say so (Bollen 1989, ch. 7, on single indicators; the chapter recalled from memory)
    result = cfa_tool.scores("factor visual: x1\nfix variance(x1) = 0\nfactor textual: x4, x5, x6\n", hs_data)
    report = scores_report(result)
    for title in ("Quality of the scores", "Precision of one person"):
        table = next(t for t in report.tables if t.title.startswith(title))
        assert ("visual: measured by one item, whose error variance the model fixes, so its determinacy, "
                "reliability and precision restate that fixed value") in table.note
        assert "textual: measured" not in table.note
    plain = scores_report(cfa_tool.scores("factor textual: x4, x5, x6\n", hs_data))
    assert not any("measured by one item" in (t.note or "") for t in plain.tables)


def test_scores_from_a_saved_fit_of_a_one_item_factor_say_it_too(tmp_path, hs_data, capsys):
    # the note reads the saved fit's JSON rows (scores --from-fit has no fit object: it stopped with an internal
    # error when the note read the fit's estimates)
    from cfa_tool.cli import main

    model = tmp_path / "one.cfa"
    model.write_text("factor visual: x1\nfix variance(x1) = 0\nfactor textual: x4, x5, x6\n")
    data = tmp_path / "hs.csv"
    hs_data.to_csv(data, index=False)
    saved = tmp_path / "fit.json"
    assert main([str(a) for a in ("fit", model, "--data", data, "--json", saved)]) == 0
    capsys.readouterr()
    code = main([str(a) for a in ("scores", model, "--data", data, "--from-fit", saved,
                                  "--output", tmp_path / "s.csv")])
    out = capsys.readouterr()
    assert code == 0, out.err
    assert "visual: measured by one item, whose error variance the model fixes" in " ".join(out.out.split())


def test_the_problems_table_of_the_scores_holds_what_the_first_box_says(hs_data):
    """--tables' problems.csv of a scores run: the rows scored without their factor's items and the precision caution
    both, under the box's heading (review s14: the precision caution was missing whenever another problem was
    there)."""
    data = hs_data.copy()
    data.loc[data.index[3], ["x1", "x2", "x3"]] = np.nan
    report = scores_report(cfa_tool.scores(
        "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n", data))
    table = report.problem_table
    assert table.title == report.notice.heading == "Check before using these scores"
    assert [row[0] for row in table.rows] == ["scores without the factor's own answers",
                                              "scores less reliable than decisions about individuals need"]
    assert report.notice.lines[1].startswith([row[5] for row in table.rows][1])  # the box adds 'What to try'
    # one group: no advice to compare groups whose invariance nobody tested (new-user trial s22)
    assert table.rows[1][6].startswith("use the scores for research, not for decisions about one person; comparing "
                                       "groups or units (wards, sites, teams) by their mean scores needs measurement "
                                       "invariance across them tested first")


def test_the_quality_note_says_no_factor_score_method_was_written_with_item_sums_alone(rider_demo, rider_model):
    """--method item-sum,item-mean: the quality table's note read 'Written to the file: ; shown for comparison'
    (hostile s14)."""
    result = cfa_tool.scores(rider_model, rider_demo, methods=["item-sum", "item-mean"])
    note = " ".join(str(next(t for t in scores_report(result).tables if t.title.startswith("Quality")).note).split())
    assert "Written to the file: ;" not in note
    assert "No factor-score method is written to the file; shown for comparison only, not written" in note
    assert "regression, Bartlett, and correlation-preserving." in note
