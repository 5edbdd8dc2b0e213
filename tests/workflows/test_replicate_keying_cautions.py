"""replicate puts the keying cautions first as fit does (hostile trial s22: fit, scores, compare, bootstrap, cutoffs
and invariance said that a factor points against its items; replicate alone was silent, its loadings -.71, -.61,
-.54 in the tables).  Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed),
on_time recoded 6 - x, so that punctuality's loadings turn negative but on_time's."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.resources import resource_dir


@pytest.fixture(scope="module")
def turned() -> pd.DataFrame:
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    data["on_time"] = 6 - data["on_time"]
    return data


MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text()


@pytest.mark.parametrize("ordinal", [None, "all"])
def test_each_samples_solution_says_the_factor_points_against_its_items(turned, ordinal):
    fitted = cfa_tool.fit(MODEL, turned, ordinal=ordinal)
    assert ProblemKind.FACTOR_POINTS_AGAINST_ITEMS in {p.kind for p in fitted.problems}  # the setup: fit says it
    rep = cfa_tool.replicate(MODEL, turned.iloc[::2], turned.iloc[1::2], ordinal=ordinal)
    for solution in (rep.calibration_result, rep.loose):
        assert ProblemKind.FACTOR_POINTS_AGAINST_ITEMS in {p.kind for p in solution.problems}
    assert "points the way of on_time" in " ".join(rep.summary(width=200).split())


def test_a_category_in_one_sample_only_is_named_in_the_papers_words():
    # hostile s22: the paragraph pasted the reader's error, naming the internal sample column and advising a row
    # filter (--keep, in the Word file too) to drop a random half
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    rare = data.index[data["short_wait"] == 1]
    data.loc[rare[1:], "short_wait"] = 2  # category 1 of short_wait given by one row
    model = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
             "factor comfort: seat_available, clean, temperature, room_to_stand\n")
    first, second = data.iloc[:240], data.iloc[240:]
    holder = "calibration" if rare[0] < 240 else "validation"
    rep = cfa_tool.replicate(model, first, second, ordinal=["on_time", "short_wait", "accurate_info", "easy_transfer"])
    why = str(rep.same_solution.not_computed)
    assert f"category 1 of short_wait, given by 1 row of the {holder} sample" in why
    text = rep.summary(width=200)
    assert "\x00" not in text and "--keep" not in text and "row filter" not in text
