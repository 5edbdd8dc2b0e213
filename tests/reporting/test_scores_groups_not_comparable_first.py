"""Scores of several groups whose factor means the model fixes at zero in every group cannot be compared across the
groups: the report says so as a caution first in its box, and never advises comparing groups there (new-user trial
s21: ranking employees of three departments for a programme, the warning stood among the data notes while the box
above it advised 'use the scores to compare groups and for research', three times)."""

from __future__ import annotations

import numpy as np

from cfa_tool.note_parts import WORDS, said
from tests.conftest import THREE_FACTORS, holzinger_swineford


def test_the_box_says_first_that_the_groups_scores_cannot_be_compared():
    import cfa_tool
    from cfa_tool.assessment.admissibility import ProblemKind
    from cfa_tool.reporting.score_report import scores_report

    data = holzinger_swineford()
    result = cfa_tool.scores(THREE_FACTORS, data, group="school", methods=("regression", "bartlett"))
    # the fact the caution states: each school's written scores average 0 (pandas' group means), whatever the
    # schools' factor means, which the scalar model below finds apart
    by_school = result.table.filter(like="_regression").groupby(data["school"].to_numpy()).mean()
    assert np.abs(by_school.to_numpy()).max() < 0.05
    report = scores_report(result)
    lines = [str(x) for x in report.notice.lines]
    assert report.notice.heading == "Check before using these scores"
    assert lines[0].startswith("The scores of different groups cannot be compared: the model fixes every factor's "
                               "mean at zero in every group")
    assert "'invariance scalar' in the model file" in lines[0]
    # the precision cautions under it advise no comparison of the groups, and are one per school, methods listed
    precision = [x for x in lines if "decisions about individuals usually need" in x]
    assert len(precision) == 2
    assert all("regression scores: " in x and "Bartlett scores: " in x for x in precision)
    assert not any("compare groups" in x for x in lines)
    assert all(x.endswith("use the scores for research within each group, not to compare the groups (the caution "
                          "above) nor for decisions about one person.") for x in precision)
    # not among the notes any more, and the Word file's words name no statement of the model file
    assert not any("cannot be compared" in str(x) for x in report.notes + tuple(report.warnings))
    problem = result.fit.problems[0]
    assert problem.kind is ProblemKind.SCORES_NOT_COMPARABLE_ACROSS_GROUPS
    assert "invariance scalar" not in said(problem.advice, WORDS) and "scalar invariance" in said(problem.advice, WORDS)

    # with 'invariance scalar' the means are estimated: no such caution, and the advice to compare the fit's groups
    # stands (other groups and units only once invariance across them is tested: new-user trial s22)
    scalar = cfa_tool.scores(THREE_FACTORS + "invariance scalar\n", data, group="school")
    assert not any(p.kind is ProblemKind.SCORES_NOT_COMPARABLE_ACROSS_GROUPS for p in scalar.fit.problems)
    lines = [str(x) for x in scores_report(scalar).notice.lines]
    assert any("use the scores for research and to compare the groups of this fit under the loadings and intercepts "
               "the model holds equal across them, not for decisions about one person" in x for x in lines)


def test_item_sums_alone_are_not_said_to_be_centred():
    """Item sums and means are sums of the answers, not centred in each group: the caution is the factor scores'."""
    import cfa_tool
    from cfa_tool.assessment.admissibility import ProblemKind

    data = holzinger_swineford()
    sums = cfa_tool.scores(THREE_FACTORS, data, group="school", methods=("item-mean",))
    assert not any(p.kind is ProblemKind.SCORES_NOT_COMPARABLE_ACROSS_GROUPS for p in sums.fit.problems)
    both = cfa_tool.scores(THREE_FACTORS, data, group="school", methods=("item-mean", "regression"))
    assert both.fit.problems[0].explanation.startswith("The factor scores of different groups cannot be compared")
