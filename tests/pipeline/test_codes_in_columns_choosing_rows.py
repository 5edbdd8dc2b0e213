"""A no-answer code in a column that chooses or groups the rows (a row filter's column, a cluster, strata or group
column) is kept as a value, since codes of no answer apply to the model's items only (docs/data-files.md); the
reports say so first, naming the column, the value and how many of the rows analysed hold it (hostile trial s18,
finding 3: --keep 'age <= 30' kept 40 rows coded -99 as 'age at most 30', a cluster of -99 became one cluster of 60
rows, and with --missing-codes -99 a note said that no cell held -99).  The rule of a code 'far outside' the other
values is the screening rule of the items and missing-data helpers (data.odd_values, the project's own rule)."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind

TWO = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
       "factor comfort: seat_available, clean, temperature, room_to_stand\n")


@pytest.fixture(scope="module")
def with_age(rider_demo):
    data = rider_demo.copy()
    data["age"] = np.random.default_rng(2).integers(18, 80, len(data)).astype(float)
    data.loc[:39, "age"] = -99  # 40 rows coded -99 (no answer), which every filter 'age <= ...' meets
    data["school"] = np.arange(len(data)) % 40 + 1.0  # 40 clusters of 12 rows
    data.loc[:59, "school"] = -99  # 60 rows without a school: one 'cluster' of 60
    return data


def _codes(result) -> list[str]:
    return [str(p.explanation) for p in result.problems if p.kind is ProblemKind.CODE_KEPT_AS_VALUE]


def test_a_row_filter_that_keeps_rows_coded_minus_99_is_cautioned_first(with_age):
    result = cfa_tool.fit(TWO, with_age, keep=["age <= 30"])
    kept = int(((with_age["age"] <= 30)).sum())  # the 40 rows of -99 and the ages 18 to 30
    [said] = [c for c in _codes(result) if "'age'" in c]
    assert f"holds -99 in 40 of the {kept} rows analysed" in said
    assert "far outside its other values (18 to 30)" in said and "kept those 40 rows as meeting it" in said
    # first, before the solution's own (beside the caution on the column of schools not taken for clusters)
    first = [p for p in result.problems if p.kind is not ProblemKind.UNIT_ROWS_AS_INDEPENDENT][0]
    assert first.kind is ProblemKind.CODE_KEPT_AS_VALUE
    assert "age != -99" in str(first.advice)


def test_a_code_given_with_missing_codes_is_named_where_it_stays_a_value(with_age):
    result = cfa_tool.fit(TWO, with_age, keep=["age <= 30"], missing_codes=[-99])
    [said] = [c for c in _codes(result) if "'age'" in c]
    assert "a value given as a code of no answer" in said and "applies to the model's items only" in said
    notes = " ".join(str(w) for w in result.warnings)
    # the note counts what it looked at: no item cell holds -99, while 'age' does (said in the next note)
    assert "no cell of numbers holds" not in notes and "no cell of the items holds any of the codes" in notes


def test_a_cluster_of_rows_coded_minus_99_is_cautioned(with_age):
    result = cfa_tool.fit(TWO, with_age, cluster="school")
    [said] = [c for c in _codes(result) if "'school'" in c]
    assert "The cluster column 'school'" in said and f"holds -99 in 60 of the {len(with_age)} rows analysed" in said
    assert "those 60 rows are analysed as one cluster" in said


def test_ordinary_filter_and_cluster_columns_say_nothing(with_age):
    data = with_age.copy()
    data["age"] = np.random.default_rng(3).integers(18, 80, len(data)).astype(float)
    data["school"] = np.arange(len(data)) % 40 + 1.0
    result = cfa_tool.fit(TWO, data, keep=["age <= 30"], cluster="school")
    assert not _codes(result)


def test_replicate_s_halves_drawn_by_such_a_cluster_column_say_it(with_age, rider_model):
    from cfa_tool.workflows.replication import split_half

    pair = split_half(rider_model, with_age, seed=2, cluster="school")
    said = [str(p.explanation) for p in pair[0].data_problems if p.kind is ProblemKind.CODE_KEPT_AS_VALUE]
    assert any("The cluster column 'school'" in s and "holds -99 in 60 of the 480 rows analysed" in s for s in said)


def test_ids_numbered_through_the_items_codes_are_no_codes_of_their_own_column(with_age):
    """Depots or schools numbered 1 to 40 hold the items' codes of no answer 8 and 9 as ids: no caution first that
    advises to leave two whole clusters out (new-user trial s28, finding 1), as a cluster, strata or group column, and
    as a row filter's column, whose filter keeps its 8s and 9s as what they are; the note on the codes other columns
    keep still names them.  A code beside the column's values (-9 beside 1 to 40) is still cautioned."""
    data = with_age.copy()
    data["age"] = np.random.default_rng(3).integers(18, 80, len(data)).astype(float)
    data["school"] = np.arange(len(data)) % 40 + 1.0  # 1 to 40, an unbroken run
    data["wave"] = np.arange(len(data)) % 10 + 1.0  # 1 to 10
    result = cfa_tool.fit(TWO, data, cluster="school", strata="wave", missing_codes=[8, 9])
    assert not _codes(result)
    notes = " ".join(str(w) for w in result.warnings)
    assert "'school' holds 8 in 12 rows" in notes and "'wave' holds 9 in 48 rows" in notes  # 480 / 40, 480 / 10
    assert "school != 8" not in notes  # no advice to leave a school out
    assert not _codes(cfa_tool.fit(TWO, data, keep=["school <= 20"], missing_codes=[8, 9]))
    data.loc[:59, "school"] = -9  # beside the schools 1 to 40, not among them: named, as given
    [said] = _codes(cfa_tool.fit(TWO, data, cluster="school", missing_codes=[-9, 8, 9]))
    assert "holds -9 in 60 of the 480 rows analysed" in said and "a value given as a code of no answer" in said
