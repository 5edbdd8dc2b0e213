"""The invariance ladder keeps rows with gaps as 'fit' does (full-information ML, the default when answers are
missing), and drops them only when asked.  Found in use: 30% of a data set's rows were left out of every step
without a word, which changed whether the configural model held.  The check value is the multi-group fit of
the same data by 'fit' (the configural model is that fit; Holzinger & Swineford 1939, by school)."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.method import MissingData
from cfa_tool.workflows.invariance import invariance
from tests.conftest import THREE_FACTORS, holzinger_swineford


@pytest.fixture(scope="module")
def holes():
    data = holzinger_swineford()[["school", *[f"x{i}" for i in range(1, 10)]]].copy()
    rng = np.random.default_rng(4)
    for column in ("x2", "x5", "x9"):
        data.loc[rng.random(len(data)) < 0.1, column] = np.nan
    return data


def test_the_configural_step_is_the_full_information_group_fit(holes):
    ladder = invariance(THREE_FACTORS, holes, "school")
    configural = ladder.steps[0].result
    grouped = cfa_tool.fit(THREE_FACTORS, holes, group="school")
    assert grouped.method.missing is MissingData.FULL_INFORMATION
    assert configural.method.missing is MissingData.FULL_INFORMATION and configural.n_obs == len(holes)
    assert configural.fit.chi_square == pytest.approx(grouped.fit.chi_square, rel=1e-6)
    # how rows with gaps were used is a note, beside the cautions (new-user trial: notes sat in the caution box)
    assert any("full-information ML" in w for w in ladder.notes)
    assert not any("full-information ML" in w for w in ladder.warnings)


def test_listwise_only_when_asked(holes):
    ladder = invariance(THREE_FACTORS, holes, "school", missing="listwise")
    complete = holes.dropna()
    assert ladder.steps[0].result.n_obs == len(complete)
    grouped = cfa_tool.fit(THREE_FACTORS, complete, group="school")
    assert ladder.steps[0].result.fit.chi_square == pytest.approx(grouped.fit.chi_square, rel=1e-6)


def test_a_step_whose_2001_correction_is_not_positive_reads_the_strictly_positive_version(holes, monkeypatch):
    # Satorra & Bentler (2010): the 2001 scaled difference can have a correction <= 0 in small samples; the step
    # then reads the strictly positive version, not the unscaled likelihood-ratio difference.  The 2001 factor is
    # forced negative here; the 2010 figure must be the one compare gives for the same pair of models (whose
    # full-information factor is checked against a hand computation in test_compare_and_replicate.py)
    import dataclasses

    from cfa_tool.workflows import nesting as ladder_module  # the ladder's scaled differences: nesting.scaled_difference
    from cfa_tool.workflows.compare import compare

    original = ladder_module.scaled_difference_tests

    def negative_2001(restricted, general, restricted_name, general_name, c10, why="", **positive):
        if c10 is None:
            general = dataclasses.replace(general, robust=dataclasses.replace(general.robust, scaling_factor=50.0))
        return original(restricted, general, restricted_name, general_name, c10, why, **positive)

    monkeypatch.setattr(ladder_module, "scaled_difference_tests", negative_2001)
    ladder = invariance(THREE_FACTORS, holes, "school", test="robust")
    metric = ladder.steps[1].versus_previous
    assert metric.method.value == "Satorra-Bentler 2010 strictly positive scaled difference"
    assert ("(Satorra & Bentler 2001); at the metric, scalar, and strict steps the scaled difference's correction was "
            "not positive, so the strictly positive version (Satorra & Bentler 2010) is given" in " ".join(ladder.summary().split()))
    monkeypatch.undo()
    pair = compare([THREE_FACTORS + "invariance metric\n", THREE_FACTORS], holes, group="school", test="robust")
    (expected,) = [t for t in pair.tests if t.method is metric.method]
    assert metric.chi_square_difference == pytest.approx(expected.chi_square_difference, rel=1e-8)
    assert metric.df_difference == expected.df_difference == 6
    # equalities across groups are what the change-in-fit guides were set for (Cheung & Rensvold 2002): cited
    from cfa_tool.reporting.workflow_tables import comparison_report

    assert pair.change_guides_apply
    assert ("were read against conventional guides (Cheung & Rensvold, 2002; Chen, 2007)"
            in comparison_report(pair).paragraph)


def test_rows_left_out_listwise_are_said_first_as_fit_says_them(holes):
    # a new-user trial: 328 of 847 rows (39%) were left out listwise and invariance said only "519 rows analysed";
    # fit says it, with a caution when the share is large.  The counts are the data's own (pandas, by school).
    ladder = invariance(THREE_FACTORS, holes, "school", missing="listwise")
    grouped = cfa_tool.fit(THREE_FACTORS, holes, group="school", missing="listwise")
    for school, rows in holes.groupby("school"):
        dropped = int(rows.isna().any(axis=1).sum())
        assert dropped > 0.05 * len(rows)  # the share over which fit cautions (LISTWISE_WARNING_SHARE)
        # the group named by the one rule of group names (language.names.written_group: one-word labels bare; s24:
        # these lines quoted them in single quotes)
        line = (f"Listwise deletion left out {dropped} of {len(rows)} rows in group {school} "
                f"({100 * dropped / len(rows):.0f}%) because they miss an answer on a model variable")
        assert any(str(w).startswith(line) for w in ladder.warnings), ladder.warnings
        assert any(p.explanation.startswith(line) for p in grouped.problems)  # the same words as fit's
    # first among the cautions about the ladder's steps (only the data's own cautions come before it)
    assert str(ladder.warnings[0]).startswith("Listwise deletion left out")
    # a small share is a note, as in fit
    few = holzinger_swineford()[["school", *[f"x{i}" for i in range(1, 10)]]].copy()
    few.loc[[3, 200], "x4"] = np.nan  # one row of each school (rows 3 and 200 are in different schools)
    assert few.loc[[3, 200], "school"].nunique() == 2
    ladder = invariance(THREE_FACTORS, few, "school", missing="listwise")
    assert not any("left out" in w for w in ladder.warnings)
    assert sum("had a missing answer on a model variable and were left out (listwise deletion)" in n
               for n in ladder.notes) == 2


def test_ordinal_rows_left_out_listwise_are_a_caution_naming_pairwise_rows(holes):
    # ordinal items: the rows are kept by pairwise present rows unless listwise is asked for, and the caution says so
    data = holes.copy()
    for column in [f"x{i}" for i in range(1, 10)]:
        data[column] = np.digitize(data[column], np.nanquantile(data[column], [0.25, 0.5, 0.75])).astype(float)
        data.loc[holes[column].isna(), column] = np.nan
    ladder = invariance(THREE_FACTORS, data, "school", ordinal="all", missing="listwise")
    assert str(ladder.warnings[0]).startswith("Listwise deletion left out")
    assert "pairwise present rows (the default for ordinal items" in ladder.warnings[0]


def test_rows_without_a_group_label_are_counted_as_fit_counts_them(holes):
    # a methods reviewer's reading of the ladder's paragraph: it gave the rows left out for gaps out of the rows with a
    # group label only, and said nothing of the rows without one; fit gives both out of every row read
    from cfa_tool.reporting.paragraph import methods_paragraph

    data = holes.copy()
    data.loc[data.index[:7], "school"] = np.nan
    ladder = invariance(THREE_FACTORS, data, "school", missing="listwise")
    grouped = cfa_tool.fit(THREE_FACTORS, data, group="school", missing="listwise")
    configural = ladder.steps[0].result
    labelled = data.dropna(subset=["school"])
    dropped = int(labelled.isna().any(axis=1).sum())  # counted by pandas
    assert (configural.data.rows_read, configural.data.without_group) == (len(data), 7)
    assert configural.data.rows_dropped == grouped.data.rows_dropped == dropped + 7
    text = " ".join(ladder.summary().split())
    assert (f"the {len(data) - dropped - 7} complete rows were analysed and {dropped} of {len(data)} rows with missing "
            f"answers excluded listwise, which assumes that answers are missing completely at random" in text)
    assert f"7 of {len(data)} rows had no value of school, the group column, and were left out" in text
    assert f"7 of {len(data)} rows had no value of school, the group column," in methods_paragraph(grouped)


def test_ordinal_rows_per_pair_are_given_for_each_group(holes):
    # a new user's finding: the ladder gave the rows per pair of items over all rows only ('462 to 637'), never per
    # group, where the polychoric correlations are computed; each group's range counted here by pandas
    data = holes.copy()
    items = [f"x{i}" for i in range(1, 10)]
    for column in items:
        data[column] = np.digitize(data[column], np.nanquantile(data[column], [0.25, 0.5, 0.75])).astype(float)
        data.loc[holes[column].isna(), column] = np.nan
    ladder = invariance(THREE_FACTORS, data, "school", ordinal="all")
    expected = {}
    for school, rows in data.groupby("school"):
        answered = rows[items].notna().to_numpy(dtype=int)
        together = (answered.T @ answered)[np.triu_indices(len(items), 1)]
        expected[school] = (int(together.min()), int(together.max()))
    saved = ladder.to_dict()["data"]["rows_per_pair"]
    assert {g["group"]: (g["fewest"], g["most"]) for g in saved["groups"]} == expected
    answered = data[items].notna().to_numpy(dtype=int)
    together = (answered.T @ answered)[np.triu_indices(len(items), 1)]
    assert (saved["all_groups"]["fewest"], saved["all_groups"]["most"]) == (together.min(), together.max())
    text = " ".join(ladder.summary().split())  # the methods paragraph of the ladder
    school = sorted(expected)  # Grant-White and Pasteur, one word each: named as prose names groups (s20)
    assert (f'rows per pair over the groups and {expected[school[0]][0]} to {expected[school[0]][1]} in group '
            f'{school[0]} and {expected[school[1]][0]} to {expected[school[1]][1]} in group {school[1]}') in text
