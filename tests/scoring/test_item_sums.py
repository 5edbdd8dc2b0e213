"""Item sums and means (scoring.item_sums, methods item-sum and item-mean) against arithmetic the project did not write.

Check values and their sources:
* the sums and means of a hand-made frame with reversed items and gaps, against pandas' own row means and counts
  (DataFrame.mean / count skip missing cells) and the reversal of scale manuals, lowest + highest - x (common
  practice); prorating: the mean of the answered keyed items times the number of items, when at least the stated
  share was answered (common practice, 'the half rule', recalled from memory);
* omega of a factor's keyed sum against McDonald's (1999) formula computed here with numpy from the fitted loadings,
  factor variance and residual variances: (sum k_i lambda_i)^2 phi / ((sum k_i lambda_i)^2 phi + sum theta_i) for
  items that load on that factor alone with uncorrelated residuals;
* in a large simulation, the squared correlation of the item sum with the true factor against that omega (for a
  unit-weighted sum of items of one factor, omega is that squared correlation in the population: McDonald 1999),
  within four standard errors of a squared correlation (Fisher's large-sample variance of r, (1 - rho^2)^2 / N).
"""

from __future__ import annotations

from types import SimpleNamespace

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from cfa_tool.scoring.item_sums import ItemSumRule, item_sums
from cfa_tool.scoring.methods import Unscored

#: a hand-made frame: factor f on a1..a4 (a3 reversed), g on b1..b3 (b2 reversed) and a4 (a cross-loading item)
FRAME = pd.DataFrame({
    "a1": [1, 2, np.nan, 4, np.nan, 5, np.nan],
    "a2": [2, 3, 4, np.nan, np.nan, 5, np.nan],
    "a3": [5, 1, 2, 3, np.nan, 1, np.nan],
    "a4": [3, 3, np.nan, np.nan, 2, 4, np.nan],
    "b1": [1, np.nan, 2, 3, 4, 5, np.nan],
    "b2": [4, 4, np.nan, np.nan, 1, 2, np.nan],
    "b3": [2, 5, 3, np.nan, np.nan, 1, np.nan],
}, dtype=float)
ITEMS = list(FRAME.columns)
F_ITEMS, G_ITEMS = ["a1", "a2", "a3", "a4"], ["b1", "b2", "b3", "a4"]
REVERSED = {"a3": (1.0, 5.0), "b2": (1.0, 5.0)}


def _keys() -> np.ndarray:
    keys = np.zeros((len(ITEMS), 2))
    for f, items in enumerate((F_ITEMS, G_ITEMS)):
        for x in items:
            keys[ITEMS.index(x), f] = -1.0 if x in REVERSED else 1.0
    return keys


def _by_pandas(items: list[str], share: float) -> tuple[pd.Series, pd.Series]:
    keyed = FRAME[items].copy()
    for x, (low, high) in REVERSED.items():
        if x in keyed:
            keyed[x] = low + high - keyed[x]
    mean = keyed.mean(axis=1, skipna=True)
    enough = keyed.count(axis=1) >= np.ceil(share * len(items))
    mean = mean.where(enough)
    return mean * len(items), mean


@pytest.mark.parametrize("share", [0.5, 0.75, 1.0, 0.25])
def test_sums_and_means_match_pandas_arithmetic(share):
    lowest = np.array([REVERSED.get(x, (np.nan, np.nan))[0] for x in ITEMS])
    highest = np.array([REVERSED.get(x, (np.nan, np.nan))[1] for x in ITEMS])
    found = item_sums(FRAME.to_numpy(), _keys(), lowest, highest, [None, None], ("f", "g"), ItemSumRule(share))
    for f, items in enumerate((F_ITEMS, G_ITEMS)):
        sums, means = _by_pandas(items, share)
        np.testing.assert_allclose(found.sums[:, f], sums.to_numpy(), rtol=1e-12, equal_nan=True)
        np.testing.assert_allclose(found.means[:, f], means.to_numpy(), rtol=1e-12, equal_nan=True)
        answered = FRAME[items].count(axis=1)
        complete = answered == len(items)
        # a complete row's sum is its plain keyed sum, nothing prorated
        plain = FRAME[items].assign(**{x: 6 - FRAME[x] for x in REVERSED if x in items}).sum(axis=1)
        np.testing.assert_allclose(found.sums[complete.to_numpy(), f], plain[complete].to_numpy())
        enough = answered >= np.ceil(share * len(items))
        assert found.prorated[f] == int((enough & ~complete & (answered > 0)).sum())
        # the per-row counts and the prorated rows, held once for the standard errors of measurement (re-read s14:
        # they were counted here and again in the workflow), against pandas' count of answered cells
        np.testing.assert_array_equal(found.answered[:, f], answered.to_numpy())
        np.testing.assert_array_equal(found.prorated_rows[:, f], (enough & ~complete & (answered > 0)).to_numpy())
        few = int((~enough & (answered > 0) & FRAME.notna().any(axis=1)).sum())
        assert found.unscored.get(Unscored.TOO_FEW_ITEMS_ANSWERED, np.zeros(2))[f] == few
    assert found.unscored[Unscored.NO_ANSWERS].tolist() == [1, 1]  # the last row answered nothing


def test_a_factor_not_summed_is_empty_with_its_reason():
    lowest = np.array([REVERSED.get(x, (np.nan, np.nan))[0] for x in ITEMS])
    highest = np.array([REVERSED.get(x, (np.nan, np.nan))[1] for x in ITEMS])
    found = item_sums(FRAME.to_numpy(), _keys(), lowest, highest, [None, Unscored.NOT_ITEMS_ALONE], ("f", "g"))
    assert np.isnan(found.sums[:, 1]).all()
    assert found.unscored[Unscored.NOT_ITEMS_ALONE].tolist() == [0, 6]  # the six rows with an answer
    with pytest.raises(ValueError, match="no answer scale"):
        item_sums(FRAME.to_numpy(), _keys(), np.full(7, np.nan), np.full(7, np.nan), [None, None], ("f", "g"))


@pytest.mark.parametrize("share", [0.0, -0.5, 1.5, "half", True])
def test_the_least_share_is_a_number_above_zero_and_at_most_one(share):
    with pytest.raises(ValueError):
        ItemSumRule(share)


def test_the_least_items_round_up():
    assert [ItemSumRule(0.5).least_items(k) for k in (1, 2, 3, 4, 5)] == [1, 1, 2, 2, 3]
    assert ItemSumRule(1.0).least_items(7) == 7 and ItemSumRule(0.01).least_items(3) == 1


# ------------------------------------------------------------------ omega against the formula, and in a simulation

HS_MODEL = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"


def test_omega_of_the_sum_is_mcdonalds_formula_from_the_loadings():
    from tests.conftest import DATASETS

    data = pd.read_csv(DATASETS / "holzinger_swineford_1939.csv", index_col=0)
    result = cfa_tool.scores(HS_MODEL, data, methods="item-sum")
    loading, variance, residual = {}, {}, {}
    for row in result.fit.estimates:
        if row.kind == "loading":
            loading[row.variables] = row.estimate
        elif row.kind == "factor_variance":
            variance[row.variables[0]] = row.estimate
        elif row.kind == "residual_variance":
            residual[row.variables[0]] = row.estimate
    summary = result.item_sums[0]
    for factor, items, omega in zip(summary.factors, summary.items, summary.omega):
        lam = sum(loading[(factor, x)] for x in items)
        common = lam**2 * variance[factor]
        assert omega == pytest.approx(common / (common + sum(residual[x] for x in items)), rel=1e-9)
    # the sums written are the plain sums of the rows (HS has no gaps)
    for factor, items in zip(summary.factors, summary.items):
        np.testing.assert_allclose(result.table[f"{factor}_item_sum"].to_numpy(), data[list(items)].sum(axis=1))


def test_squared_correlation_of_the_sum_with_the_true_factor_is_omega():
    rng = np.random.default_rng(20261204)
    n = 20000
    eta = rng.normal(size=n)
    loadings = np.array([0.8, 0.7, -0.6, 0.5, 0.4])  # the third item worded against the trait
    x = 3.0 + eta[:, None] * loadings + rng.normal(size=(n, 5)) * np.sqrt([0.36, 0.51, 0.64, 0.75, 0.84])
    frame = pd.DataFrame(x, columns=[f"y{i}" for i in range(1, 6)])
    result = cfa_tool.scores("factor f: y1, y2, y3, y4, y5\n", frame, methods=["item-sum", "item-mean"])
    summary = result.item_sums[0]
    assert [r.item for r in summary.reversals] == ["y3"]  # keyed by the sign of its loading
    total = result.table["f_item_sum"].to_numpy()
    r = np.corrcoef(total, eta)[0, 1]
    omega = summary.omega[0]
    population = 3.0**2 / (3.0**2 + 3.1)  # (sum |lambda|)^2 / ((sum |lambda|)^2 + sum theta), McDonald 1999
    se = 2 * r * (1 - r**2) / np.sqrt(n)  # of r^2, by the delta method on Fisher's variance of r
    assert abs(r**2 - omega) < 4 * se and abs(omega - population) < 4 * se, (r**2, omega, population)
    np.testing.assert_allclose(result.table["f_item_mean"].to_numpy() * 5, total)
    # its reversal used the lowest and highest value of y3 in the data, and the report cautions so, first
    low, high = frame["y3"].min(), frame["y3"].max()
    assert (summary.reversals[0].lowest, summary.reversals[0].highest) == (low, high)
    np.testing.assert_allclose(total, frame[["y1", "y2", "y4", "y5"]].sum(axis=1) + low + high - frame["y3"])
    from cfa_tool.reporting.score_report import scores_report

    assert any("reverse y3" in w for w in scores_report(result).warnings)
    assert "reverse y3" in result.summary(width=200).split("Quality of the scores")[0]


def test_rows_as_read_must_keep_the_filtered_rows():
    from cfa_tool.workflows.factor_scores import _rows_as_read

    frame = pd.DataFrame({"a": [1.0, 2.0]}, index=[1, 3])
    with pytest.raises(AssertionError, match="rows the filters left out would be written as blank rows"):
        _rows_as_read(SimpleNamespace(frame=frame, read_frame=None, row_filters=("a > 0",)))
    with pytest.raises(AssertionError, match="must hold every row the row filters kept"):
        _rows_as_read(SimpleNamespace(frame=frame, read_frame=frame.iloc[:1], row_filters=("a > 0",)))
    read = pd.DataFrame({"a": [1.0, 0.0, 2.0]}, index=[1, 2, 3])
    assert _rows_as_read(SimpleNamespace(frame=frame, read_frame=read, row_filters=("a > 0",))) is read
    assert _rows_as_read(SimpleNamespace(frame=frame, read_frame=None, row_filters=())) is frame


def test_least_answered_cannot_apply_without_item_sums():
    from tests.conftest import DATASETS

    with pytest.raises(OptionError, match="cannot apply"):
        cfa_tool.scores(HS_MODEL, DATASETS / "holzinger_swineford_1939.csv", least_answered=0.75)


def test_an_item_on_two_factors_counts_in_both_sums_and_the_report_says_so():
    from tests.conftest import DATASETS

    from cfa_tool.reporting.score_report import scores_report

    data = pd.read_csv(DATASETS / "holzinger_swineford_1939.csv", index_col=0)
    model = "factor visual: x1, x2, x3, x9\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
    result = cfa_tool.scores(model, data, methods="item-sum")
    np.testing.assert_allclose(result.table["visual_item_sum"], data[["x1", "x2", "x3", "x9"]].sum(axis=1))
    np.testing.assert_allclose(result.table["speed_item_sum"], data[["x7", "x8", "x9"]].sum(axis=1))
    assert result.item_sums[0].shared == (("x9", ("visual", "speed")),)
    notes = " ".join(map(str, scores_report(result).notes))
    assert "Items counted in the item sum of each factor they load on: x9 (visual, speed)" in notes


def test_a_method_factor_has_no_item_sum():
    from tests.assessment.test_method_factors import METHOD, TRAITS, _data

    result = cfa_tool.scores(TRAITS + METHOD, _data(0.4), methods="item-mean")
    assert result.table["m_item_mean"].isna().all() and result.table["a_item_mean"].notna().all()
    assert result.item_sums[0].not_summed == (("m", Unscored.NOT_A_TRAIT),)
    assert result.item_sums[0].factors == ("a", "b")
    counts = {r: c for r, m, c in result.unscored}
    assert counts[Unscored.NOT_A_TRAIT.value] == (0, 0, len(result.table))


def test_a_reversed_item_coded_by_an_answers_statement_is_reversed_on_its_codes():
    from tests.commands.test_cli import DATA, MODEL

    frame = pd.read_csv(DATA)
    frame["short_wait"] = (6 - frame["short_wait"]).clip(lower=2)  # worded against the trait; nobody answered 1
    words = {1: "Never", 2: "Rarely", 3: "Sometimes", 4: "Often", 5: "Always"}
    frame["short_wait"] = frame["short_wait"].map(words)
    model = (MODEL.read_text(encoding="utf-8")
             + '\nanswers "Never" = 1, "Rarely" = 2, "Sometimes" = 3, "Often" = 4, "Always" = 5 for short_wait\n')
    result = cfa_tool.scores(model, frame, methods="item-sum")
    (reversal,) = result.item_sums[0].reversals
    # the coding's scale, 1 to 5, not the answers given (2 to 5)
    assert (reversal.item, reversal.lowest, reversal.highest, reversal.source.name) == ("short_wait", 1.0, 5.0, "CODED")
    codes = frame["short_wait"].map({w: k for k, w in words.items()})
    keyed = frame[["on_time", "accurate_info", "easy_transfer"]].assign(short_wait=1 + 5 - codes)
    expected = (keyed.mean(axis=1) * 4).where(keyed.count(axis=1) >= 2)  # the demo file has a few gaps
    np.testing.assert_allclose(result.table["punctuality_item_sum"], expected, equal_nan=True)


def test_a_reversed_item_without_any_scale_is_refused_naming_the_statement_to_write():
    from cfa_tool.language.parser import parse_model
    from cfa_tool.scoring.model import ScoringModel
    from cfa_tool.workflows.factor_scores import _item_parts

    spec = parse_model("factor f: y1, y2, y3\n")
    model = ScoringModel(("y1", "y2", "y3"), ("f",), np.array([[0.8], [-0.6], [0.7]]), np.eye(1), np.zeros(1),
                         np.zeros(3), np.diag([0.36, 0.64, 0.51]))
    no_ranges = SimpleNamespace(variables=("y1", "y2", "y3"), ranges=())  # e.g. a saved fit that kept none
    with pytest.raises(OptionError, match=r"reverses 'y2'.*'reversed y2 on LOWEST to HIGHEST'"):
        _item_parts(model, spec, no_ranges, (), ItemSumRule())
    from cfa_tool.scoring.quality import SumScore

    given = SumScore("f", ("y1", "y2", "y3"), ("y2",), 0.7, 0.9, 4.0)  # the sums' quality is passed in, not computed
    parts = _item_parts(model, spec, SimpleNamespace(variables=("y1", "y2", "y3"), ranges=((1, 5), (2, 6), (1, 5))),
                        (given,), ItemSumRule())
    assert (parts.lowest[1], parts.highest[1]) == (2.0, 6.0) and parts.summary.omega == (0.7,)
    assert parts.summary.sums == (given,)
