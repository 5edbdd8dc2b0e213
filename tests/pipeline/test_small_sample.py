"""A fit of one group with fewer rows than its model's free parameters: a caution first; below a common rule of
thumb of 5 rows per parameter (Bentler & Chou 1987, recalled from memory; a convention, not a law): a note.  The count
of free parameters is by hand for the three-factor model of Holzinger & Swineford (1939): 6 free loadings, 9 residual
variances, 3 factor variances and 3 factor covariances = 21, whatever the estimator (the 9 item means that
full-information ML adds when a cell is missing are the items' saturated means, not parameters of the model)."""

from __future__ import annotations

import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind, sample_size_problems
from tests.conftest import THREE_FACTORS

ITEMS = [f"x{i}" for i in range(1, 10)]


def test_the_rule_by_hand():
    assert sample_size_problems((20,), (21,))[0][0].kind is ProblemKind.SMALL_SAMPLE
    assert sample_size_problems((21,), (21,))[0] == () and sample_size_problems((21,), (21,))[1]  # a note only
    assert sample_size_problems((104,), (21,))[0] == () and sample_size_problems((104,), (21,))[1]
    assert sample_size_problems((105,), (21,)) == ((), ())  # 5 x 21 = 105
    # groups by the same rule: a caution for the group below its parameters, one note naming those below 5 per parameter
    problems, notes = sample_size_problems((20, 21, 104, 105), (21, 21, 21, 21), ("a", "b", "c", "d"))
    assert [(p.kind, p.group) for p in problems] == [(ProblemKind.SMALL_GROUP, "a")]
    assert len(notes) == 1 and notes[0].startswith("groups b (21 rows for 21 parameters, 1.0 per parameter) and c (104 rows for 21 "
                                                   "parameters, 4.9 per parameter): fewer than 5 rows per free parameter")
    assert "rule of thumb" in notes[0] and "not a law" in notes[0] and "'d'" not in notes[0]


def test_one_missing_cell_does_not_change_the_count(hs_data):
    # 22 rows with one empty cell: full-information ML (9 item means added) counts the same 21 parameters as the
    # complete rows do, so a note, never the caution that 30 parameters (21 + 9 means) would give
    data = hs_data[ITEMS].iloc[140:162].copy()
    data.iloc[3, 4] = float("nan")
    result = cfa_tool.fit(THREE_FACTORS, data)
    assert result.method.missing.name == "FULL_INFORMATION"
    assert not any(p.kind is ProblemKind.SMALL_SAMPLE for p in result.problems)
    said = [w for w in result.warnings if str(w).startswith("22 rows for the 21 free parameters of the model (not counting "
                                                       "the 9 item means that full-information ML estimates beside "
                                                       "them), fewer than 5")]
    assert said and said[0] in cfa_tool.check(THREE_FACTORS, data).notes  # check says what the fit says


def test_fewer_rows_than_parameters_bring_a_caution_first(hs_data):
    result = cfa_tool.fit(THREE_FACTORS, hs_data[ITEMS].iloc[140:160])  # 20 rows whose fit converges, admissible
    assert result.fit.n_free_parameters == 21 and result.admissible
    first = result.problems[0]
    assert first.kind is ProblemKind.SMALL_SAMPLE and not first.kind.inadmissible and first.value == 20.0
    assert first.explanation.startswith("20 rows for the 21 free parameters of the model") and "rule of thumb" in first.explanation


@pytest.mark.parametrize("rows, noted", [(60, True), (301, False)])
def test_fewer_than_five_rows_per_parameter_bring_a_note(hs_data, rows, noted):
    result = cfa_tool.fit(THREE_FACTORS, hs_data[ITEMS].iloc[:rows])
    assert not any(p.kind is ProblemKind.SMALL_SAMPLE for p in result.problems)
    said = [w for w in result.warnings if "free parameters of the model, fewer than 5 per parameter" in w]
    assert bool(said) is noted
    if noted:
        assert said[0].startswith("60 rows for the 21 free parameters") and "rule of thumb" in said[0]


def test_workflows_that_fit_say_it_too(hs_data):
    from cfa_tool.workflows.compare import compare

    compared = compare(["factor f: x1..x9\n", THREE_FACTORS], hs_data[ITEMS].iloc[140:160])
    one, three = compared.results  # 18 and 21 free parameters for 20 rows: a note, and a caution first
    assert not any(p.kind is ProblemKind.SMALL_SAMPLE for p in one.problems)
    assert any(w.startswith("20 rows for the 18 free parameters") for w in one.warnings)
    assert three.problems[0].kind is ProblemKind.SMALL_SAMPLE


def test_compare_and_replicate_give_the_small_sample_caution_first(hs_data):
    """A hostile trial: a validation sample of 20 rows for 21 free parameters, and a comparison on those rows, were
    reported with no word on their size while fit opens with the caution; every view of them now opens with it.
    The 20 rows are population-exact (tests.conftest.exact_cfa_rows), so that the fits converge."""
    import numpy as np

    from cfa_tool.reporting.workflow_tables import comparison_report, replication_report
    from tests.conftest import exact_cfa_rows

    loadings = np.zeros((9, 3))
    for i in range(9):
        loadings[i, i // 3] = 0.8
    phi = np.array([[1, .4, .3], [.4, 1, .3], [.3, .3, 1]])
    small = exact_cfa_rows(loadings, phi, np.diag(np.full(9, .36)), 20, 5, ITEMS)
    replication = cfa_tool.replicate(THREE_FACTORS, hs_data[ITEMS], small)
    notice = replication_report(replication).notice
    assert notice is not None and any("loose refit" in line and "20 rows for the 21 free parameters" in line
                                      for line in notice.lines)
    one_factor = "factor g: x1, x2, x3, x4, x5, x6, x7, x8, x9\n"
    notice = comparison_report(cfa_tool.compare([THREE_FACTORS, one_factor], small)).notice
    assert notice is not None and any("20 rows for the 21 free parameters" in line for line in notice.lines)


def test_the_count_names_the_item_means_it_leaves_out(hs_data):
    # a new-user trial read "25 rows for the 33 free parameters" above a table of 48 free parameters: a
    # full-information fit adds the items' means, which the rule leaves out (one missing cell must not change the
    # count); the caution now names them, so that its count and the table's agree (21 + 9 = 30, Holzinger &
    # Swineford 1939 data, one cell emptied)
    rows = hs_data[ITEMS].iloc[:60].copy()
    rows.iloc[0, 0] = float("nan")
    result = cfa_tool.fit(THREE_FACTORS, rows)
    assert result.fit.n_free_parameters == 30
    said = [w for w in result.warnings if "free parameters of the model" in w]
    assert said[0].startswith("60 rows for the 21 free parameters of the model (not counting the 9 item means that "
                              "full-information ML estimates beside them), fewer than 5 per parameter")
    complete = cfa_tool.fit(THREE_FACTORS, hs_data[ITEMS].iloc[:60])
    assert not any("item means" in w for w in complete.warnings)
