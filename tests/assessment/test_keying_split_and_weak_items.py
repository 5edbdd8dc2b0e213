"""Keyed sums that no majority or no loading size can key (assessment.reliability.item_keys, miskeyed).

1. A 'reversed' statement that the loadings contradict for exactly half of a factor's items (hostile s24b case 07):
   two of four items declared reversed that load with the other two.  The keyed sum adds two halves that cancel, so
   its omega (.00059), alpha (-.916) and their interval described no scale, yet they were printed, with a note only;
   one wrongly declared item withheld them with a caution first.  Now the same caution first, the same withholding in
   every view, the sum's mean and SD withheld too.  A balanced scale without the statement (keys by the loadings'
   signs) keeps its note (tests/pipeline/test_reverse_keyed_orientation.py).
2. A weak item (standardized loading below .20 in size, common practice's line of a negligible loading) has a sign
   that sampling error turns: it must neither be reversed in a sum keyed by the loadings' signs nor vote on the
   factor's direction, in the fit's reliability and in the scores' sums alike (words s24's closing note).
3. A balanced scale's halves are keyed and named in one order in every group (the model's), not by the sign of each
   group's sum of loadings.

Data: the bundled demo (a fictional transit agency's rider survey, simulated from a known population with every
loading positive: demo/make_demo_data.py), and data simulated here with fixed seeds from populations stated beside
them; the check values are the constructions (which items load which way, which are weak) and numpy's keyed sums."""

from __future__ import annotations

import json
import math

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.assessment.reliability_intervals import Coefficient, Withheld
from cfa_tool.reporting.json_report import to_json
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.tables import keying_sentence, reliability_table, sum_score_table
from cfa_tool.resources import resource_dir
from tests.conftest import simulate_cfa

# every loading of the demo's population is positive (demo/make_demo_data.py): short_wait and accurate_info declared
# reversed contradict the loadings of half of punctuality's items by construction
SPLIT = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
         "factor comfort: seat_available, clean, temperature, room_to_stand\n"
         "reversed short_wait, accurate_info on 1 to 5\n")


@pytest.fixture(scope="module")
def demo() -> pd.DataFrame:
    return pd.read_csv(resource_dir("demo") / "rider_survey.csv")


@pytest.fixture(scope="module")
def split_fit(demo):
    return cfa_tool.fit(SPLIT, demo)


def _flat(text) -> str:
    return " ".join(str(text).replace("\u2502", " ").split())


def test_half_the_items_against_the_declared_keying_is_a_caution_first(split_fit):
    (row,) = [r for r in split_fit.groups[0].reliability if r.factor == "punctuality"]
    assert row.evenly_split and abs(row.omega) < 0.01  # the case: the halves cancel (omega .00059 in case 07)
    kinds = [p.kind for p in split_fit.problems]
    assert ProblemKind.KEYING_AGAINST_LOADINGS in kinds and split_fit.admissible
    (caution,) = [p for p in split_fit.problems if p.kind is ProblemKind.KEYING_AGAINST_LOADINGS]
    said = _flat(caution.line())
    # both halves, in the model's order, each item with its standardized loading and its declared keying
    assert "Half of the items of factor 'punctuality' run against the other half as the model declares" in said
    assert "on_time ." in said and "short_wait ." in said and "accurate_info ." in said and "(declared reversed)" in said
    assert said.index("on_time") < said.index("short_wait") and "describe no scale" in said
    # said once: no note beside the caution
    assert not [w for w in split_fit.warnings if "half of its items" in str(w)]


def test_its_reliability_is_withheld_in_every_view(split_fit):
    words = _flat(methods_paragraph(split_fit))
    assert "omega (McDonald, 1999) was .77 [.73, .80] for comfort" in words and ".00059" not in words
    assert "reliability is not reported here" in words
    table = reliability_table(split_fit)
    (row,) = [r for r in table.rows if r[0] == "punctuality"]
    assert set(row[2:]) == {"withheld"}
    import json

    saved = json.loads(to_json(split_fit))
    (factor,) = [f for f in saved["reliability"]["factors"] if f["factor"] == "punctuality"]
    for key in ("omega", "omega_total", "alpha", "composite_reliability", "sum_score_mean", "sum_score_sd"):
        assert factor[key] is None
    assert "describes no scale" in factor["withheld"]
    # the keyed sum's mean and SD too; its item-rest r, the evidence, stays
    sums = sum_score_table(split_fit)
    (row,) = [r for r in sums.rows if r[0] == "punctuality"]
    assert row[3:5] == ("withheld", "withheld") and row[5].startswith("-")
    assert "Mean and SD withheld for punctuality" in _flat(sums.note)


def test_the_bootstrap_withholds_it_too(demo):
    boot = cfa_tool.bootstrap(SPLIT, demo, replications=10, seed=3, bollen_stine=False)
    found = [i for i in boot.reliability if i.factor == "punctuality"]
    assert found and all(i.withheld is Withheld.KEYING for i in found)
    assert all(i.to_dict()["estimate"] is None for i in found)
    assert any(i.available for i in boot.reliability if i.factor == "comfort" and i.coefficient is Coefficient.OMEGA)


def test_the_scores_withhold_it_too(demo):
    result = cfa_tool.scores(SPLIT, demo, methods="item-sum")
    sums = {s.factor: s for s in result.quality[0].sums}
    assert math.isnan(sums["punctuality"].omega) and sums["comfort"].omega > 0.5
    # nor its correlation with the factor or its SD, which the fit withholds too (the JSON gave them)
    assert math.isnan(sums["punctuality"].validity) and math.isnan(sums["punctuality"].sd)
    assert sums["comfort"].validity > 0.8 and sums["comfort"].sd > 0


def _weak_item_answers() -> pd.DataFrame:
    """Two factors correlating .4; a1..a4 load .7, a5 -.05 (a weak item, by construction), b1..b4 .7 (invented)."""
    L = np.zeros((9, 2))
    L[:5, 0] = [0.7, 0.7, 0.7, 0.7, -0.05]
    L[5:, 1] = 0.7
    names = ["a1", "a2", "a3", "a4", "a5", "b1", "b2", "b3", "b4"]
    return simulate_cfa(L, np.array([[1.0, 0.4], [0.4, 1.0]]), np.diag(1.0 - (L**2).sum(axis=1)), 500, 2512, names)


def test_a_weak_item_is_not_reversed_by_its_sign_in_the_fit_and_the_scores():
    data = _weak_item_answers()
    model = "factor a: a1..a5\nfactor b: b1..b4\n"
    result = cfa_tool.scores(model, data, methods="item-sum")
    fit = result.fit
    [a5] = [e.standardized for e in fit.estimates if e.kind == "loading" and e.variables == ("a", "a5")]
    assert -0.2 < a5 < 0  # the case: weak, and its sign below zero
    (row,) = [r for r in fit.groups[0].reliability if r.factor == "a"]
    assert row.reversed == () and not row.points_against
    sums = {s.factor: s for s in result.quality[0].sums}
    assert sums["a"].reversed_items == ()
    # the scores' keyed sum is the plain sum of a1..a5 (numpy), and its omega the fit's
    np.testing.assert_allclose(result.table["a_item_sum"].to_numpy(),
                               data[["a1", "a2", "a3", "a4", "a5"]].sum(axis=1).to_numpy(), rtol=1e-12)
    assert sums["a"].omega == pytest.approx(row.omega, rel=1e-10)


def test_weak_items_do_not_split_a_factor_against_the_declared_keying():
    # a1, a2 load .7, a3 and a4 -.08 (weak, by construction); b2 of the other factor is declared reversed, so the
    # model keys by its statement: the weak items' signs made a tie of two against two, which is a contradiction of
    # the declared keying; without their votes the keying holds and the reliability is given (invented population)
    L = np.zeros((7, 2))
    L[:4, 0] = [0.7, 0.7, -0.08, -0.08]
    L[4:, 1] = [0.7, -0.7, 0.7]
    names = ["a1", "a2", "a3", "a4", "b1", "b2", "b3"]
    data = simulate_cfa(L, np.array([[1.0, 0.3], [0.3, 1.0]]), np.diag(1.0 - (L**2).sum(axis=1)), 500, 2513, names)
    fit = cfa_tool.fit("factor a: a1..a4\nfactor b: b1..b3\nreversed b2 on -9 to 9\n", data)
    weak = [e.standardized for e in fit.estimates if e.kind == "loading" and e.variables in (("a", "a3"), ("a", "a4"))]
    assert all(-0.2 < v < 0 for v in weak)  # the case: both weak, both below zero
    row = next(r for r in fit.groups[0].reliability if r.factor == "a")
    assert not row.evenly_split and row.against_keying == ()
    assert not [p for p in fit.problems if p.kind is ProblemKind.KEYING_AGAINST_LOADINGS]
    assert not [w for w in fit.warnings if "half of its items" in str(w)]
    # the population's omega of the sum keyed as declared (every key +1), by McDonald's (1999) formula with numpy:
    # (sum lambda)^2 / ((sum lambda)^2 + sum theta) = 1.24^2 / (1.24^2 + 3.007) = .34; the fit's within sampling error
    lam = L[:4, 0]
    population = lam.sum() ** 2 / (lam.sum() ** 2 + (1.0 - lam**2).sum())
    assert row.omega == pytest.approx(population, abs=0.1)


def test_a_balanced_scale_is_keyed_in_one_order_in_every_group():
    # loadings .7 with signs -, +, -, + in three groups (invented); the sign of each group's sum of loadings varies
    L = np.array([[-0.7], [0.7], [-0.7], [0.7]])
    frames = []
    for seed, label in ((31, "east"), (32, "west"), (33, "north")):
        frame = simulate_cfa(L, np.eye(1), np.diag(np.full(4, 0.51)), 600, seed, ["d1", "d2", "d3", "d4"])
        frames.append(frame.assign(site=label))
    result = cfa_tool.fit("factor k: d1..d4\n", pd.concat(frames, ignore_index=True), group="site")
    assert {g.reliability[0].reversed for g in result.groups} == {("d2", "d4")}
    said = [str(w) for w in result.warnings if "half of its items load each way" in str(w)]
    # said once, for every group (s26: it was said three times, word for word, each after its group's label)
    assert len(said) == 1 and said[0].startswith("in every group, factor 'k': half of its items load each way "
                                                 "(d1 and d3 against d2 and d4)")


def test_a_weak_item_counts_on_neither_side_of_a_split_factor():
    # hostile s25b case 01: w (population loading .03, weak by construction) listed first, x3, x4 loading -.7 and
    # x1, x2 .7 (invented); the note called 3 against 2 'half each way' by counting w among the halves
    L = np.array([[0.03], [-0.7], [0.7], [-0.7], [0.7]])
    data = simulate_cfa(L, np.eye(1), np.diag(1.0 - (L**2).ravel()), 500, 2525, ["w", "x3", "x1", "x4", "x2"])
    fit = cfa_tool.fit("factor f: w, x3, x1, x4, x2\nscale latent by variance\n", data)
    [w] = [e.standardized for e in fit.estimates if e.kind == "loading" and e.variables == ("f", "w")]
    assert abs(w) < 0.2  # the case: weak
    (row,) = fit.groups[0].reliability
    assert row.evenly_split
    # the tie is broken by the first item not weak (x3): its half kept as answered, the other reversed, w kept
    assert row.reversed == ("x1", "x2")
    said = [_flat(w) for w in fit.warnings if "half of its items load each way" in str(w)]
    assert len(said) == 1
    assert "(x3 and x4 against x1 and x2; w, of standardized loading below .20 in size, loads too weakly to count on " \
           "either side)" in said[0]
    assert "(w, x3, x4 against" not in said[0]
    assert "opposite to the half that holds its first item not weak" in _flat(keying_sentence(fit.groups[0].reliability))
    assert row.weak == ("w",) and json.loads(to_json(fit))["reliability"]["factors"][0]["weak"] == ["w"]


def test_a_weak_item_loading_against_its_factor_is_said_to_be_left_as_answered():
    # hostile s25b case 02 (words): a5 loads -.05 in the population (weak by construction), so it is left as answered;
    # the note said 'Every item loads in its factor's direction' beside the paragraph's '1 negative'
    data = _weak_item_answers()
    fit = cfa_tool.fit("factor a: a1..a5\nfactor b: b1..b4\n", data)
    rows = fit.groups[0].reliability
    (a,) = [r for r in rows if r.factor == "a"]
    assert a.reversed == ()
    said = _flat(keying_sentence(rows))
    assert "Every item loads in its factor's direction" not in said
    assert "No item is reversed for scoring. Left as answered although they load against their factor's other " \
           "items, because too weakly (standardized loading below .20 in size) for the sign to key them: a: a5." in said
    assert "(1 negative)" in _flat(methods_paragraph(fit))  # the paragraph's count, which the note now agrees with
    assert a.weak_against == ("a5",)


def test_a_balanced_scale_differing_between_groups_names_the_groups_where_it_holds():
    # two groups balanced (signs -, +, -, +) and one not (-, +, +, +; invented populations, loadings .7): the caution
    # names the two groups once, not the third
    frames = []
    for seed, label, signs in ((41, "east", [-1, 1, -1, 1]), (42, "west", [-1, 1, -1, 1]), (43, "north", [-1, 1, 1, 1])):
        L = 0.7 * np.array(signs, float)[:, None]
        frames.append(simulate_cfa(L, np.eye(1), np.diag(np.full(4, 0.51)), 600, seed, ["d1", "d2", "d3", "d4"])
                      .assign(site=label))
    result = cfa_tool.fit("factor k: d1..d4\n", pd.concat(frames, ignore_index=True), group="site")
    said = [str(w) for w in result.warnings if "load each way" in str(w)]
    assert len(said) == 1 and said[0].startswith("in groups east and west, factor 'k': half of its items load each way")
    assert "north" not in said[0]


def _balanced(signs_and_sizes, seed=51, n=800):
    L = np.array(signs_and_sizes, float)[:, None]
    return simulate_cfa(L, np.eye(1), np.diag(1.0 - (L**2).ravel()), n, seed, ["d1", "d2", "d3", "d4"])


def test_what_sets_a_balanced_factors_direction_is_said_for_its_scaling():
    # invented population: d1, d2 load .5 and .55, d3, d4 -.85 and -.9 (no majority; the second half the stronger)
    rows = _balanced([0.5, 0.55, -0.85, -0.9])

    def said(model: str) -> str:
        result = cfa_tool.fit(model, rows)
        (w,) = [str(w) for w in result.warnings if "load each way" in str(w)]
        return w, {e.variables[1]: e.estimate for e in result.estimates if e.kind == "loading"}

    marker, _ = said("factor k: d1..d4\n")
    assert "its direction follows its marker (d1)" in marker
    # under variance scaling there is no marker (s26: the caution said its direction followed one): the estimation
    # starts with the majority of the items, on a tie the larger sum of the loadings, pointing up
    # (model.starts._orientation), and so the stronger half of the population (d3, d4) loads positively
    variance, loadings = said("factor k: d1..d4\nscale latent by variance\n")
    assert "follows its marker" not in variance
    assert "no marker sets its direction (its variance is fixed at 1), so the estimation takes the way its more " \
           "strongly loading half points" in variance
    assert loadings["d3"] > 0 and loadings["d4"] > 0 and loadings["d1"] < 0 and loadings["d2"] < 0
    effects, loadings = said("factor k: d1..d4\nscale latent by effects\n")
    assert "its direction follows the sum of its loadings, which effects coding holds positive" in effects
    assert sum(loadings.values()) == pytest.approx(4.0)  # effects coding: the loadings average 1 (Little et al. 2006)
