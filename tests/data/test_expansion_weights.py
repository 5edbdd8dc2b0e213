"""Frequency weights that make N far larger than the rows (survey expansion weights given as counts: 480 rows counted
as 569,744) are named first in every view, pointing to sampling weights; ordinary counts are not."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.data.sample_design import EXPANSION_RATIO

MODEL = "factor f: y1, y2, y3, y4\n"


@pytest.fixture(scope="module")
def weighted() -> pd.DataFrame:
    """240 simulated rows (seed 29) in two districts; 'persons' as expansion weights (800 to 1599 persons a row),
    'count' as counts of 1 to 3 identical rows."""
    rng = np.random.default_rng(29)
    f = rng.normal(size=240)
    frame = pd.DataFrame({f"y{j}": np.round(0.8 * f + rng.normal(scale=0.6, size=240), 3) for j in range(1, 5)})
    frame["district"] = np.where(np.arange(240) % 2 == 0, "north", "south")
    frame["persons"] = rng.integers(800, 1600, size=240)
    frame["count"] = rng.integers(1, 4, size=240)
    return frame


def _large(result) -> list:
    return [p for p in result.problems if p.kind is ProblemKind.FREQUENCY_WEIGHTS_LARGE]


def test_expansion_weights_as_counts_are_named_first(weighted):
    fitted = cfa_tool.fit(MODEL, weighted, weights="persons", weight_kind="frequency")
    total = int(weighted["persons"].sum())
    assert fitted.n_obs == total > EXPANSION_RATIO * len(weighted)
    first = fitted.problems[0]
    assert first.kind is ProblemKind.FREQUENCY_WEIGHTS_LARGE and not first.kind.inadmissible
    assert first.explanation.startswith(f"The frequency weights in 'persons' count {total:,} rows from the 240 rows "
                                        f"analysed ({total / 240:,.0f} per row on average)")
    assert "rule of thumb" in first.explanation
    assert "leave out weight_kind='frequency'" in first.advice and "sampling weights by default" in first.advice
    # the sampling reading the advice points to: N is the rows, and no such caution
    sampled = cfa_tool.fit(MODEL, weighted, weights="persons")
    assert sampled.n_obs == 240 and not _large(sampled)


def test_ordinary_counts_and_every_command(weighted):
    assert not _large(cfa_tool.fit(MODEL, weighted, weights="count", weight_kind="frequency"))
    assert _large(cfa_tool.check(MODEL, weighted, weights="persons", weight_kind="frequency"))
    compared = cfa_tool.compare([MODEL, MODEL + "equal loading(f, y2), loading(f, y3)\n"], weighted,
                                weights="persons", weight_kind="frequency")
    assert all(_large(r) for r in compared.results)  # a design's cautions are each model's, as too few clusters are
    ladder = cfa_tool.invariance(MODEL, weighted, group="district", weights="persons", weight_kind="frequency")
    shown = " ".join(ladder.summary().split())
    assert "The frequency weights in 'persons' count" in shown.split("Measurement invariance")[0]  # in the notice first
