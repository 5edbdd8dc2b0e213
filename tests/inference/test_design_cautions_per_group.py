"""Cautions of a sampling design judged per group when the groups are independent samples (re-check s16, N8 and N4):
a group of 3 clusters beside one of 182 (185 in all) exited 0 with no caution, its cluster-robust standard errors
far too small; a group whose weights count its 230 rows as 1.5 (Kish's effective sample size) got none either,
because the sample's own effective size (251.5) was judged.  Kish's effective sample size is computed here with
numpy, (sum w)^2 / sum w^2 (Kish 1965)."""

from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from cfa_tool import fit
from cfa_tool.assessment.admissibility import ProblemKind

ROOT = Path(__file__).resolve().parents[2]
MODEL = ROOT / "models" / "rider_three_factors.cfa"


@pytest.fixture(scope="module")
def rows():
    return pd.read_csv(ROOT / "demo" / "rider_survey.csv")


def test_a_group_of_few_clusters_is_a_caution(rows):
    data = rows.copy()
    data["hh"] = np.where(data.district == "north", np.arange(len(data)) // 2, 10_000 + np.arange(len(data)) % 3)
    assert data.groupby("district").hh.nunique().to_dict() == {"north": 182, "south": 3}
    result = fit(MODEL, data, group="district", cluster="hh")
    (few,) = [p for p in result.problems if p.kind is ProblemKind.FEW_CLUSTERS]
    assert "in group south (3)" in str(few.explanation)  # the one rule of group names (s23: quoted alone here)
    assert few.value == 3  # the group's clusters, not the sample's 185


def test_enough_clusters_in_every_group_say_nothing(rows):
    data = rows.copy()
    data["hh"] = data["district"].astype(str) + (data.groupby("district").cumcount() // 2).astype(str)
    result = fit(MODEL, data, group="district", cluster="hh")
    assert not [p for p in result.problems if p.kind is ProblemKind.FEW_CLUSTERS]


def test_weights_uneven_within_one_group_are_a_caution(rows):
    data = rows.copy()
    w = np.ones(len(data))
    south = np.flatnonzero((data.district == "south").to_numpy())
    w[south] = 0.001
    w[south[0]] = 1.0
    data["w"] = w
    kish = {g: part.w.sum() ** 2 / (part.w ** 2).sum() for g, part in data.groupby("district")}
    assert kish["south"] < 2 and w.sum() ** 2 / (w ** 2).sum() > 0.5 * len(w)  # the sample's own size says nothing
    result = fit(MODEL, data, group="district", weights="w")
    (uneven,) = [p for p in result.problems if p.kind is ProblemKind.SMALL_EFFECTIVE_SAMPLE]
    assert (f"within a group (group south: its {len(south)} rows count as about {kish['south']:.1f}"
            in str(uneven.explanation))  # the group named by the one rule of group names (s23: quoted alone here)
    assert uneven.value == round(kish["south"], 1)  # the group's, not the sample's


@pytest.mark.parametrize("layout", ["constant within groups", "uneven in one group"])
def test_the_effective_sample_of_groups_is_the_sum_of_their_own(rows, layout):
    """Hostile tester s25: sampling weights are rescaled within each group, so the rows count as the sum of each
    group's own Kish size, (sum w)^2 / sum w^2 (Kish 1965) computed here by numpy; the raw weights over the file gave
    433.3 for weights 2 and 1 by group (whose fit is the unweighted one: 480), and a false first caution that 480
    rows count as about 63 (they count as 279: 250 + 29.3)."""
    data = rows.copy()
    north = (data.district == "north").to_numpy()
    if layout == "constant within groups":
        data["w"] = np.where(north, 2.0, 1.0)
    else:
        w = np.ones(len(data))
        w[np.flatnonzero(~north)[:10]] = 30.0
        data["w"] = w
    expected = sum(part.w.sum() ** 2 / (part.w ** 2).sum() for _, part in data.groupby("district"))
    result = fit(MODEL, data, group="district", weights="w")
    assert result.design.effective_n == pytest.approx(expected, rel=1e-12)
    assert result.to_dict()["design"]["effective_sample_size"] == pytest.approx(expected, rel=1e-12)
    uneven = [p for p in result.problems if p.kind is ProblemKind.SMALL_EFFECTIVE_SAMPLE]
    if layout == "constant within groups":
        assert expected == pytest.approx(len(data)) and not uneven
        plain = fit(MODEL, data, group="district")
        assert result.fit.chi_square == pytest.approx(plain.fit.chi_square, rel=1e-10)
    else:  # the group's own caution, not the sample's
        (caution,) = uneven
        assert "within a group (group south" in str(caution.explanation)
