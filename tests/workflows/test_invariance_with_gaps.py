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

    from cfa_tool.workflows import invariance as ladder_module
    from cfa_tool.workflows.compare import compare

    original = ladder_module.scaled_difference_tests

    def negative_2001(restricted, general, restricted_name, general_name, c10, why=""):
        if c10 is None:
            general = dataclasses.replace(general, robust=dataclasses.replace(general.robust, scaling_factor=50.0))
        return original(restricted, general, restricted_name, general_name, c10, why)

    monkeypatch.setattr(ladder_module, "scaled_difference_tests", negative_2001)
    ladder = invariance(THREE_FACTORS, holes, "school", test="robust")
    metric = ladder.steps[1].versus_previous
    assert metric.method.value == "Satorra-Bentler 2010 strictly positive scaled difference"
    assert ("(Satorra & Bentler 2001); at the metric, scalar, and strict steps its correction was not positive, so "
            "the strictly positive version (Satorra & Bentler 2010) is given" in " ".join(ladder.summary().split()))
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
