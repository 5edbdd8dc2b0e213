"""Which problems are cautions on a solution that is admissible but needs care in reading, said first by every view of
several solutions (a comparison, a ladder, a replication) as fit says them first, is declared once with each kind
(ProblemKind.solution_caution): the reports' list (reporting.workflow_tables.SOLUTION_CAUTIONS) is read from the
declarations, so that a new kind of such a caution cannot be left out of it (s23's closing note: the list was kept by
hand, and a kind added later, the weak marker, had to be added to it in a merge)."""

from __future__ import annotations

from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.reporting.workflow_tables import SOLUTION_CAUTIONS


def test_every_kind_declares_whether_it_is_a_solution_caution():
    assert all(isinstance(kind.solution_caution, bool) for kind in ProblemKind)
    assert set(SOLUTION_CAUTIONS) == {kind for kind in ProblemKind if kind.solution_caution}
    # a caution, not an impossible solution (those come first by their own rule, assessment.admissibility.solution_first)
    assert not any(kind.inadmissible for kind in SOLUTION_CAUTIONS)


def test_the_kinds_the_reports_named_by_hand_are_declared():
    # the list of s23 (fixinv-s23, with the weak marker added at the merge)
    assert {ProblemKind.WEAK_METHOD_FACTOR, ProblemKind.STANDARDIZED_LOADING_ABOVE_ONE,
            ProblemKind.FACTORS_HARDLY_DISTINCT, ProblemKind.SMALL_SAMPLE, ProblemKind.KEYING_AGAINST_LOADINGS,
            ProblemKind.FACTOR_POINTS_AGAINST_ITEMS, ProblemKind.WEAK_MARKER,
            ProblemKind.SCALED_TEST_NOT_COMPUTED} == set(SOLUTION_CAUTIONS)
    # cautions on the data, the design or the fit's reading are said by their own rules, not among these
    assert not {ProblemKind.POOR_FIT, ProblemKind.UNINFORMATIVE_BASELINE, ProblemKind.SMALL_GROUP,
                ProblemKind.ROWS_LEFT_OUT} & set(SOLUTION_CAUTIONS)
