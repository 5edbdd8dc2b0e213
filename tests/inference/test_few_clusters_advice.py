"""Too few clusters for the parameters (new-user trial s20, items 3, 4 and 11): the caution says what is in doubt (the
joint tests, the scaled statistic) and what helps, never to leave the clusters out, which makes every standard error
too small when rows of one cluster answer alike; the advice names only routes the run's estimator accepts; the
methods paragraph describes the sandwich in words, without C_h/(C_h - 1); the scores' report carries a one-line note,
not the caution (clusters change no score)."""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.reporting.paragraph import invariance_paragraph, methods_paragraph
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.workflow_tables import invariance_report
from tests.conftest import THREE_FACTORS


def _few(result):
    (problem,) = [p for p in result.problems if p.kind is ProblemKind.FEW_CLUSTERS]
    return problem


def _schools(seed: int, schools: int, pupils: int, items: int = 6, ordinal: bool = True) -> pd.DataFrame:
    """One factor with a school-level part (rows of a school answer alike), four answer categories."""
    rng = np.random.default_rng(seed)
    school = np.repeat(np.arange(schools), pupils)
    f = rng.normal(size=len(school)) + np.repeat(rng.normal(scale=0.5, size=schools), pupils)
    lam = np.resize([.8, .7, .7, .6, .6, .5], items)
    y = f[:, None] * lam + rng.normal(size=(len(school), items)) * np.sqrt(1 - lam ** 2)
    if ordinal:
        y = np.digitize(y, [-1.0, 0.0, 1.0]) + 1.0
    frame = pd.DataFrame(y, columns=[f"x{i}" for i in range(1, items + 1)])
    frame["school"] = school
    frame["region"] = school % 2
    frame["w"] = rng.uniform(0.5, 2.0, len(frame))
    frame["grade"] = rng.choice([5, 8], len(frame))
    return frame


def test_the_rank_the_caution_states_is_that_of_the_cluster_robust_covariance(hs_data):
    # The caution says the cluster-robust covariance 'can describe at most C - 1 independent directions': its rank,
    # checked with numpy's matrix_rank on the covariance the standard errors come from (12 clusters, 21 parameters:
    # rank at most 11; the sandwich's middle is a sum of C centred outer products, Cameron & Miller 2015, recalled
    # from memory).
    result = cfa_tool.fit(THREE_FACTORS, hs_data.assign(unit=np.arange(len(hs_data)) % 12), cluster="unit")
    covariance = result.parameter_covariance
    assert covariance.shape == (21, 21)
    assert np.linalg.matrix_rank(covariance, tol=1e-10 * np.abs(covariance).max()) <= 11
    few = _few(result)
    assert "at most 11 independent directions (one fewer than the clusters)" in few.explanation
    assert "Tests of many parameters at once" in few.explanation and "scaled chi-square test" in few.explanation
    assert "Each standard error on its own is less affected" in few.explanation


def test_the_advice_keeps_the_clusters(hs_data):
    # new-user s20 item 3: 'fit without --cluster' advised the worse analysis.
    many = cfa_tool.fit(THREE_FACTORS, hs_data.assign(unit=np.arange(len(hs_data)) % 12), cluster="unit")
    some = cfa_tool.fit(THREE_FACTORS, hs_data.assign(unit=np.arange(len(hs_data)) % 25), cluster="unit")
    for result in (many, some):
        advice = str(_few(result).advice)
        assert "without" not in advice and "cluster=" not in advice and "--cluster" not in advice
        assert advice.startswith("keep the clusters (leaving them out makes every standard error too small")
        assert "read the single standard errors and confidence intervals rather than the scaled test" in advice
        assert "thresholds" not in advice  # continuous items have none
    assert "tend to be too small" in _few(some).explanation


def test_an_ordinal_fit_is_advised_fewer_categories_and_its_paragraph_reads_as_prose():
    data = _schools(3, 12, 40)  # 12 schools against 6 parameters and 18 thresholds
    result = cfa_tool.fit("factor F: " + ", ".join(f"x{i}" for i in range(1, 7)), data, ordinal="all",
                          cluster="school", strata="region", weights="w")
    few = _few(result)
    assert "the 24 free parameters (6 of the model and 18 thresholds)" in few.explanation
    assert "rarely used answer categories merged mean fewer thresholds" in str(few.advice)
    text = methods_paragraph(result)
    assert "C_h" not in text and "C/(C - 1)" not in text and "mean little" not in text
    assert ("the variance between clusters within strata, each stratum's multiplied by its number of clusters over "
            "that number less one; Binder, 1983") in text
    assert "at most 11 independent directions" in text  # the caution, beside the design it doubts
    alone = cfa_tool.fit("factor F: " + ", ".join(f"x{i}" for i in range(1, 7)), data, ordinal="all",
                         cluster="school")
    assert "(multiplied by the number of clusters over that number less one; Binder, 1983)" in methods_paragraph(alone)


def test_ordinal_invariance_is_advised_the_clusters_it_takes():
    # new-user s20 item 4: ordinal invariance refused --cluster when the groups share clusters, so its advice sent
    # ordinal runs to the continuous route; since s21 it takes them (domains of one cluster sample), and the advice to
    # give them is the same for every estimator
    data = _schools(5, 60, 12, items=4)
    model = "factor F: x1, x2, x3, x4"
    domains = cfa_tool.invariance(model, data, "grade", ordinal="all", weights="w", cluster="school", strata="region")
    assert domains.steps[0].result.design.shared_clusters
    ordinal = cfa_tool.invariance(model, data, "grade", ordinal="all", weights="w", strata="region")
    (shared,) = [p for p in ordinal.steps[0].result.problems if p.kind is ProblemKind.GROUPS_SHARE_STRATA]
    advice = str(shared.advice)
    assert "give them with cluster=" in advice and "does not yet take" not in advice
    assert "give them with" in " ".join(report_text(invariance_report(ordinal)).replace("│", "").split())
    continuous = cfa_tool.invariance(model, data, "grade", weights="w", strata="region")
    (shared,) = [p for p in continuous.steps[0].result.problems if p.kind is ProblemKind.GROUPS_SHARE_STRATA]
    assert "give them with" in str(shared.advice)
    assert "C_h" not in invariance_paragraph(continuous, [s.level for s in continuous.steps])


def test_the_scores_report_notes_the_few_clusters_in_one_line():
    # clusters change no score: the caution on the fit's standard errors is not the scores' first box
    from cfa_tool.reporting.score_report import scores_notice

    data = _schools(3, 12, 40, ordinal=False)
    scored = cfa_tool.scores("factor F: " + ", ".join(f"x{i}" for i in range(1, 7)), data, cluster="school",
                             methods="item-mean")
    assert not [p for p in scored.fit.problems if p.kind is ProblemKind.FEW_CLUSTERS]
    notice = scores_notice(scored)
    assert notice is None or not any("clusters" in str(line) for line in notice.lines)
    (note,) = [n for n in scored.notes if "clusters" in str(n)]
    assert str(note).startswith("The fit's standard errors and test rest on only 12 clusters of 'school'")
    assert str(note).endswith("clusters change no score")
