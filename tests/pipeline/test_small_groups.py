"""Groups with fewer rows than their model's free parameters: a caution first in fit, invariance and check, and
check's row count of each group.  The parameter count is by hand for the three-factor model of Holzinger &
Swineford (1939) in the multi-group (configural) form: 6 free loadings, 9 residual variances, 3 factor variances and
3 factor covariances = 21 per group, its 9 intercepts (factor means fixed at zero when intercepts are free) left out
as a one-group fit leaves out its item means (tests/pipeline/test_small_sample.py): the same rows are judged alike
as a sample and as a group (new-user trial s17)."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.reporting import tables as T
from tests.conftest import THREE_FACTORS

ITEMS = [f"x{i}" for i in range(1, 10)]


@pytest.fixture(scope="module")
def three_schools(hs_data):
    data = hs_data.reset_index(drop=True)[ITEMS + ["school"]].copy()
    small = data.index[data.school == "Pasteur"][20:40]
    data.loc[small, "school"] = "Annex"  # 20 rows, fewer than the 21 parameters of a group's model (rows whose fit
    # converges)
    return data


def test_a_group_smaller_than_its_model_is_named_first(three_schools):
    result = cfa_tool.fit(THREE_FACTORS, three_schools, group="school")
    small = [p for p in result.problems if p.kind is ProblemKind.SMALL_GROUP]
    assert len(small) == 1 and small[0].group == "Annex" and small[0].value == 20.0
    assert ("20 rows for the 21 free parameters of this group's model (not counting its 9 item intercepts)"
            in small[0].explanation)
    assert "rule of thumb" in small[0].explanation and not small[0].kind.inadmissible
    # after the problems that make the solution not admissible, before every other caution
    first = [p for p in result.problems if p.kind.inadmissible]
    assert result.problems[len(first)] is small[0]
    assert str(T.problem_notice(result).lines[len(first)]).startswith('Group Annex: 20 rows')
    # groups of 145 and 136 rows get no caution, nor does anything without groups
    assert not any(p.kind is ProblemKind.SMALL_GROUP for p in cfa_tool.fit(THREE_FACTORS, three_schools).problems)


def test_each_group_below_five_rows_per_parameter_gets_the_samples_note(hs_data):
    # the rule of the whole sample (a note below 5 rows per parameter, a common rule of thumb recalled from Bentler &
    # Chou 1987), applied to each group: 100 rows of Grant-White and 90 of Pasteur are below 5 x 21 = 105
    data = hs_data.reset_index(drop=True)[ITEMS + ["school"]]
    two = data.groupby("school").head(100)
    two = two.drop(two.index[two.school == "Pasteur"][90:])
    result = cfa_tool.fit(THREE_FACTORS, two, group="school")
    said = [w for w in result.warnings if "rows per free parameter of the group's model" in w]
    assert len(said) == 1 and said[0].startswith(
        'groups Grant-White (100 rows for 21 parameters, 4.7 per parameter) and Pasteur (90 rows for 21 '
        'parameters, 4.2 per parameter): fewer than 5 rows per free parameter of the group\'s model, not counting its '
        '9 item intercepts')
    assert [n for n in cfa_tool.check(THREE_FACTORS, two, group="school").notes if n == said[0]]


def test_the_same_rows_are_judged_alike_as_a_sample_and_as_a_group(hs_data):
    # new-user trial s17: invariance named a group of 311 rows below the rule (its intercepts counted: 66 parameters)
    # while a fit of 300 rows under the same model said nothing (its item means left out: 46); the 90 rows of
    # Pasteur are 90 / 21 = 4.2 per parameter alone, with a gap (full-information ML adds 9 item means), and as a group
    data = hs_data.reset_index(drop=True)[ITEMS + ["school"]]
    pasteur = data[data.school == "Pasteur"].iloc[:90]
    gap = pasteur[ITEMS].copy()
    gap.iloc[0, 0] = float("nan")
    alone = [w for w in cfa_tool.fit(THREE_FACTORS, gap).warnings if "per parameter" in w]
    assert alone and alone[0].startswith("90 rows for the 21 free parameters of the model (not counting the 9 item "
                                         "means that full-information ML estimates beside them)")
    grouped = pd.concat([pasteur, data[data.school == "Grant-White"]])
    said = [w for w in cfa_tool.fit(THREE_FACTORS, grouped, group="school").warnings if "per parameter" in w]
    assert said and said[0].startswith('group Pasteur (90 rows for 21 parameters, 4.2 per parameter)')


def test_check_lists_each_groups_rows_and_the_caution(three_schools):
    found = cfa_tool.check(THREE_FACTORS, three_schools, group="school")
    counts = three_schools.school.value_counts()
    assert dict(zip(found.groups, found.group_rows)) == {g: int(counts[g]) for g in found.groups}
    assert set(found.group_parameters) == {30}  # the model's free parameters, its 9 intercepts among them
    assert "Annex: 20 rows" in found.summary() and "30 free parameters in each group" in found.summary()
    assert [p.group for p in found.problems if p.kind is ProblemKind.SMALL_GROUP] == ["Annex"]


def test_invariance_names_the_small_group_first(three_schools):
    from cfa_tool.note_parts import RUNNING, said
    from cfa_tool.workflows.invariance import invariance

    result = invariance(THREE_FACTORS, three_schools, group="school")
    # the impossible solution it leads to first (problems of a solution come first; a new-user trial found a note on
    # the data above a negative variance), the small group right after it
    assert result.warnings[0].startswith("the configural model's solution is not admissible (a negative residual "
                                         "variance of x3")
    # (a Note: its advice's option a Command part, re-check s18)
    assert said(result.warnings[1], RUNNING).startswith('Group Annex: 20 rows for the 21 free parameters')
    # groups of 145 and 136 rows are above 5 rows per parameter of the configural model: no note
    assert not [n for n in result.notes if "rows per free parameter" in n]


def test_a_fit_that_fails_in_a_small_group_says_so_first(hs_data):
    from cfa_tool.errors import EstimationError

    data = hs_data.reset_index(drop=True)[ITEMS + ["school"]].copy()
    data.loc[data.index[data.school == "Pasteur"][:20], "school"] = "Annex"  # 20 rows: the search does not converge
    with pytest.raises(EstimationError, match=r"^Group Annex: 20 rows for the 21 free parameters.*did not converge"):
        cfa_tool.fit(THREE_FACTORS, data, group="school")
