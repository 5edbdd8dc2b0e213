"""Groups with fewer rows than their model's free parameters: a caution first in fit, invariance and check, and
check's row count of each group.  The parameter count is by hand for the three-factor model of Holzinger &
Swineford (1939) in the multi-group (configural) form: 6 free loadings, 9 residual variances, 3 factor variances,
3 factor covariances and 9 intercepts = 30 per group (factor means fixed at zero when intercepts are free)."""

from __future__ import annotations

import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.reporting import tables as T
from tests.conftest import THREE_FACTORS

ITEMS = [f"x{i}" for i in range(1, 10)]


@pytest.fixture(scope="module")
def three_schools(hs_data):
    data = hs_data.reset_index(drop=True)[ITEMS + ["school"]].copy()
    small = data.index[data.school == "Pasteur"][:28]
    data.loc[small, "school"] = "Annex"  # 28 rows, fewer than the 30 parameters of a group's model
    return data


def test_a_group_smaller_than_its_model_is_named_first(three_schools):
    result = cfa_tool.fit(THREE_FACTORS, three_schools, group="school")
    small = [p for p in result.problems if p.kind is ProblemKind.SMALL_GROUP]
    assert len(small) == 1 and small[0].group == "Annex" and small[0].value == 28.0
    assert "28 rows for the 30 free parameters of this group's model" in small[0].explanation
    assert "rule of thumb" in small[0].explanation and not small[0].kind.inadmissible
    # after the problems that make the solution not admissible, before every other caution
    first = [p for p in result.problems if p.kind.inadmissible]
    assert result.problems[len(first)] is small[0]
    assert str(T.problem_notice(result).lines[len(first)]).startswith('Group "Annex": 28 rows')
    # groups of 145 and 128 rows get no caution, nor does anything without groups
    assert not any(p.kind is ProblemKind.SMALL_GROUP for p in cfa_tool.fit(THREE_FACTORS, three_schools).problems)


def test_each_group_below_five_rows_per_parameter_gets_the_samples_note(three_schools):
    # the rule of the whole sample (a note below 5 rows per parameter, a common rule of thumb recalled from Bentler &
    # Chou 1987), applied to each group: Grant-White (145 rows) and Pasteur (128) are below 5 x 30 = 150
    counts = three_schools.school.value_counts()
    assert (counts["Grant-White"], counts["Pasteur"], counts["Annex"]) == (145, 128, 28)
    result = cfa_tool.fit(THREE_FACTORS, three_schools, group="school")
    said = [w for w in result.warnings if "rows per free parameter of the group's model" in w]
    assert len(said) == 1 and said[0].startswith(
        'groups "Grant-White" (145 rows for 30 parameters, 4.8 per parameter) and "Pasteur" (128 rows for 30 '
        'parameters, 4.2 per parameter): fewer than 5 rows')
    assert "Annex" not in said[0]  # its caution says more
    assert [n for n in cfa_tool.check(THREE_FACTORS, three_schools, group="school").notes if n == said[0]]


def test_check_lists_each_groups_rows_and_the_caution(three_schools):
    found = cfa_tool.check(THREE_FACTORS, three_schools, group="school")
    counts = three_schools.school.value_counts()
    assert dict(zip(found.groups, found.group_rows)) == {g: int(counts[g]) for g in found.groups}
    assert set(found.group_parameters) == {30}
    assert "Annex: 28 rows" in found.summary() and "30 free parameters in each group" in found.summary()
    assert [p.group for p in found.problems if p.kind is ProblemKind.SMALL_GROUP] == ["Annex"]


def test_invariance_names_the_small_group_first(three_schools):
    from cfa_tool.workflows.invariance import invariance

    result = invariance(THREE_FACTORS, three_schools, group="school")
    # the impossible solution it leads to first (problems of a solution come first; a new-user trial found a note on
    # the data above a negative variance), the small group right after it
    assert result.warnings[0].startswith("the configural model's solution is not admissible (a negative residual "
                                         "variance of x1")
    assert result.warnings[1].startswith('Group "Annex": 28 rows for the 30 free parameters')
    # and the groups below 5 rows per parameter of the configural model get the fit's note
    assert [n for n in result.notes if n.startswith('groups "Grant-White" (145 rows for 30 parameters, 4.8 per parameter) and')]


def test_a_fit_that_fails_in_a_small_group_says_so_first(hs_data):
    from cfa_tool.errors import EstimationError

    data = hs_data.reset_index(drop=True)[ITEMS + ["school"]].copy()
    data.loc[data.index[data.school == "Pasteur"][:29], "school"] = "Annex"  # 29 rows: the search does not converge
    with pytest.raises(EstimationError, match=r"^Group \"Annex\": 29 rows for the 30 free parameters.*did not converge"):
        cfa_tool.fit(THREE_FACTORS, data, group="school")
