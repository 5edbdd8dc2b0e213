"""Cluster and stratum ids that differ only in upper and lower case ('School A', 'school a') are named first, as group
labels are (pipeline.inputs.group_case_problems): they stay apart, since only the user knows whether they are one
cluster, but a school split in two understates the clustering, so the researcher must be told."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind

MODEL = "factor f: y1, y2, y3, y4\n"


@pytest.fixture(scope="module")
def schools() -> pd.DataFrame:
    """400 simulated rows (seed 8) in 40 schools; every third row of school 's0' to 's9' written 'S0' ... 'S9'."""
    rng = np.random.default_rng(8)
    f = rng.normal(size=400)
    frame = pd.DataFrame({f"y{j}": np.round(0.8 * f + rng.normal(scale=0.6, size=400), 3) for j in range(1, 5)})
    school = np.array([f"s{i % 40}" for i in range(400)], dtype=object)
    frame["school_ok"] = school.copy()
    upper = (np.arange(400) % 3 == 0) & (np.arange(400) % 40 < 10)
    school[upper] = np.char.upper(school[upper].astype(str))
    frame["school"] = school
    frame["region"] = np.where(np.arange(400) % 40 < 20, "east", "west")
    frame["region_cased"] = frame["region"].where(np.arange(400) % 2 == 0, frame["region"].str.capitalize())
    return frame


def _case_problems(result) -> list:
    return [p for p in result.problems if p.kind is ProblemKind.DESIGN_LABELS_BY_CASE]


def test_cluster_ids_differing_in_case_are_named_first(schools):
    fitted = cfa_tool.fit(MODEL, schools, cluster="school")
    assert fitted.design.clusters == 50  # 40 schools, 10 of them split in two: counted by the rule of the fixture
    first = fitted.problems[0]
    assert first.kind is ProblemKind.DESIGN_LABELS_BY_CASE and not first.kind.inadmissible
    assert first.explanation.startswith("In the cluster column 'school', labels that differ only in upper and lower "
                                        "case are analysed as different clusters: 'S0' (")
    assert "and 5 more such sets" in first.explanation  # ten sets, five named
    assert "if they are one cluster, recode the column" in first.advice
    assert not _case_problems(cfa_tool.fit(MODEL, schools, cluster="school_ok"))


def test_strata_and_every_command_with_a_design(schools):
    checked = cfa_tool.check(MODEL, schools, cluster="school_ok", strata="region_cased")
    said = [p for p in _case_problems(checked) if "strata column 'region_cased'" in p.explanation]
    assert said and "analysed as different strata: 'East' (100 rows) and 'east' (100 rows)" in said[0].explanation
    compared = cfa_tool.compare([MODEL, MODEL + "equal loading(f, y1), loading(f, y2)\n"], schools, cluster="school")
    assert any(p.kind is ProblemKind.DESIGN_LABELS_BY_CASE for p in compared.problems)
