"""A 'reversed' statement orients the factors it keys (model/parameters.py marker_of, model/starts.py).

Simulated data (seed 8123) with three traits that correlate positively by construction: f measured by a1..a4
with a1 worded against it, g by b1..b4 with b2 worded against it, h by c1..c3, every one worded against it.
The check values are the construction (signs of the population loadings and correlations) and the keyed
means computed by hand in the tests (a reversed answer counts as its negative)."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.tables import estimate_tables
from tests.conftest import simulate_cfa

STRUCTURE = "factor f: a1..a4\nfactor g: b1..b4\nfactor h: c1..c3\n"
KEYS = "reversed a1, b2, c1, c2, c3 on -9 to 9\n"
NAMES = ["a1", "a2", "a3", "a4", "b1", "b2", "b3", "b4", "c1", "c2", "c3"]
SIGNS = np.array([-1, 1, 1, 1, 1, -1, 1, 1, -1, -1, -1.0])


def keyed_answers():
    """The simulated answers of the module docstring (continuous, 800 rows)."""
    L = np.zeros((11, 3))
    L[0:4, 0], L[4:8, 1], L[8:11, 2] = 0.7, 0.7, 0.7
    L *= SIGNS[:, None]
    phi = np.array([[1, 0.5, 0.4], [0.5, 1, 0.3], [0.4, 0.3, 1]])
    return simulate_cfa(L, phi, np.diag(1 - (L**2).sum(axis=1)), 800, 8123, NAMES)


@pytest.fixture(scope="module")
def answers():
    return keyed_answers()


def _correlations(result, group=0):
    C = result.groups[group].latent_covariance
    d = np.sqrt(np.diag(C))
    return (C / np.outer(d, d))[:3, :3]


def keyed_means(data) -> np.ndarray:
    """(n, 3) each factor's keyed mean, by hand: each reversed answer turned around (its negative)."""
    keyed = data[NAMES] * SIGNS
    return np.column_stack([keyed[c].mean(axis=1) for c in (NAMES[0:4], NAMES[4:8], NAMES[8:11])])


def _keyed_mean_correlations(data):
    return np.corrcoef(keyed_means(data).T)


def test_a_reversed_first_item_is_passed_over_as_marker(answers):
    result = cfa_tool.fit(STRUCTURE + KEYS, answers)
    scales = {s.factor: s for s in result.description.scales}
    assert (scales["f"].marker, scales["f"].marker_loading, scales["f"].passed_over) == ("a2", 1.0, ("a1",))
    assert (scales["g"].marker, scales["g"].marker_loading, scales["g"].passed_over) == ("b1", 1.0, ())
    # every item of h declared reversed: h runs against its items, its first loading fixed at -1
    assert (scales["h"].marker, scales["h"].marker_loading) == ("c1", -1.0)
    by_hand = _keyed_mean_correlations(answers)
    fitted = _correlations(result)
    for i, j in ((0, 1), (0, 2), (1, 2)):
        # the factors point the way of their keyed means: positive, and above the keyed means' correlation
        # (which measurement error attenuates)
        assert 0 < by_hand[i, j] < fitted[i, j] < 1
    loadings = {r.variables: r.estimate for r in result.estimates if r.kind == "loading"}
    assert loadings[("f", "a1")] < 0 < loadings[("f", "a3")] and loadings[("h", "c2")] < 0
    assert not [w for w in result.warnings if "points" in w]
    titles = [t.title for t in estimate_tables(result)]  # the headings of the factors' blocks (and the JSON's report)
    assert "Factor f (scale: loading of a2 fixed at 1, not a1, declared reversed)" in titles
    assert "Factor h (scale: loading of c1 fixed at -1, as every item of h is declared reversed)" in titles
    words = methods_paragraph(result)
    assert "a1, declared reverse-keyed, was not taken as marker" in words
    assert "every item of h is declared reverse-keyed, so the loading of c1 was fixed to -1 instead" in words
    row = next(s for s in result.description.to_dict()["scales"] if s["factor"] == "f")  # compare's JSON
    assert row["marker"] == "a2" and row["reversed_items_passed_over"] == ["a1"] and row["marker_loading"] == 1.0


@pytest.mark.parametrize("scaling", ["variance", "effects"])
def test_other_scalings_point_the_way_of_the_keys(answers, scaling):
    marker = cfa_tool.fit(STRUCTURE + KEYS, answers)
    other = cfa_tool.fit(STRUCTURE + KEYS + f"scale latent by {scaling}\n", answers)
    # the same solution in another metric: the same chi-square and factor correlations
    assert other.fit.chi_square == pytest.approx(marker.fit.chi_square, rel=1e-6)
    assert _correlations(other) == pytest.approx(_correlations(marker), abs=1e-4)
    loadings = {r.variables: r.estimate for r in other.estimates if r.kind == "loading"}
    assert loadings[("f", "a1")] < 0 < loadings[("f", "a2")] and loadings[("h", "c1")] < 0
    if scaling == "effects":  # the keyed loadings average 1 (Little, Slegers & Card 2006, with keys)
        keyed = [loadings[("h", c)] * -1 for c in ("c1", "c2", "c3")]
        assert np.mean(keyed) == pytest.approx(1.0, abs=1e-9)
        assert "Factor f (scale: loadings average 1, with a1 (declared reversed) turned)" in [
            t.title for t in estimate_tables(other)]
        assert ("(Little, Slegers & Card, 2006), the loadings of a1, b2, c1, c2, and c3, declared reverse-keyed, "
                "counted with their signs turned") in " ".join(methods_paragraph(other).split())


def test_without_a_reversed_statement_a_marker_against_its_items_is_named(answers):
    result = cfa_tool.fit(STRUCTURE, answers)
    assert result.description.scales[0].marker == "a1"  # as before: the first item
    turned = [p.line() for p in result.problems if p.kind is ProblemKind.FACTOR_POINTS_AGAINST_ITEMS]
    # f only: its marker a1 loads against a2..a4; g's marker b1 is worded with the trait, and h's items all
    # point one way, so without the statement nothing in the data says that h is turned.  A caution of the solution,
    # first in every view and in the methods paragraph (hostile trial 7, H4: it was a note only)
    assert len(turned) == 1 and result.admissible
    assert "Factor 'f' points the way of a1, against most of its items (a2, a3, a4 load negatively)" in turned[0]
    assert "'reversed a1 on LOWEST to HIGHEST'" in turned[0]
    assert not [w for w in result.warnings if "points the way of" in w]  # said once
    assert "factor f pointing against its items" in methods_paragraph(result)


def test_a_user_fixed_reversed_marker_is_respected_with_a_caution(answers):
    result = cfa_tool.fit(STRUCTURE + KEYS + "fix loading(f, a1) = 1\n", answers)
    loadings = {r.variables: r.estimate for r in result.estimates if r.kind == "loading"}
    assert loadings[("f", "a1")] == 1.0 and loadings[("f", "a2")] < 0  # the model's fix holds
    assert [p for p in result.problems if p.kind is ProblemKind.FACTOR_POINTS_AGAINST_ITEMS
            and p.explanation.startswith("Factor 'f' points against its items")]


def test_groups_take_the_same_marker_in_every_group(answers):
    data = answers.assign(site=np.where(np.arange(len(answers)) % 2 == 0, "east", "west"))
    result = cfa_tool.fit(STRUCTURE + KEYS + "invariance scalar\n", data, group="site")
    assert result.description.group_scales == ()  # every group scaled alike
    assert {s.factor: s.marker for s in result.description.scales} == {"f": "a2", "g": "b1", "h": "c1"}
    for g in range(2):
        fitted = _correlations(result, g)
        assert fitted[0, 1] > 0 and fitted[0, 2] > 0 and fitted[1, 2] > 0


def test_a_higher_order_factor_is_oriented_by_its_keyed_first_order_factors(answers):
    result = cfa_tool.fit(STRUCTURE + KEYS + "factor top: f, g, h\n", answers)
    paths = {r.variables: r.standardized for r in result.estimates if r.kind == "loading" and r.variables[0] == "top"}
    assert min(paths.values()) > 0  # the traits correlate positively by construction
    assert result.description.scales[-1].marker == "f"


def test_ordinal_items_are_oriented_alike(answers):
    cut = answers.apply(lambda x: np.digitize(x, [-1.0, -0.3, 0.3, 1.0]) + 1)
    result = cfa_tool.fit(STRUCTURE + KEYS, cut, ordinal="all")
    fitted = _correlations(result)
    assert fitted[0, 1] > 0 and fitted[0, 2] > 0 and fitted[1, 2] > 0


def test_a_factor_whose_items_split_evenly_is_named():
    # re-check 6: two of four items worded each way and no 'reversed' statement: no majority says which way the
    # factor points, so it got no caution and the keying note called two items 'opposite to most items'
    # (invented population: loadings .7 with signs -, +, -, +)
    L = np.array([[-0.7], [0.7], [-0.7], [0.7]])
    rows = simulate_cfa(L, np.eye(1), np.diag(np.full(4, 0.51)), 600, 31, ["d1", "d2", "d3", "d4"])
    result = cfa_tool.fit("factor k: d1..d4\n", rows)
    said = [w for w in result.warnings if "half of its items load each way" in w]
    assert len(said) == 1 and "factor 'k': half of its items load each way" in said[0]
    # the statement apart (note_parts.Command): the terminal gives it, a manuscript says it in words
    assert "declare the items worded against the trait as scored in reverse with 'reversed" in said[0]
    (r,) = [r for r in result.groups[0].reliability if r.factor == "k"]
    assert r.evenly_split and r.to_dict()["evenly_split"] is True
    text = " ".join(result.summary().split())
    assert "where half of a factor's items load each way, opposite to the half that holds its first item" in text
    # declared keys settle it: no caution
    # the tie is broken by the factor's first item (the model's order), which only orders the keys: whichever the sign
    # of the sum of the loadings (samples until both signs have occurred), a split factor is
    # named as split, never as pointing against its items (a new numpy's draws gave a negative sum, and the split
    # factor was called turned), and the half without d1 is the one reversed (s25: the sum's sign chose the half)
    sums = set()
    for seed in range(31, 61):  # until both signs have occurred (the draws differ between machines)
        if len(sums) == 2:
            break
        sample = simulate_cfa(L, np.eye(1), np.diag(np.full(4, 0.51)), 600, seed, ["d1", "d2", "d3", "d4"])
        each = cfa_tool.fit("factor k: d1..d4\n", sample)
        sums.add(sum(e.estimate for e in each.estimates if e.kind == "loading") > 0)
        assert not any(p.kind is ProblemKind.FACTOR_POINTS_AGAINST_ITEMS for p in each.problems)
        assert any("half of its items load each way (d1 and d3 against d2 and d4)" in w for w in each.warnings)
        assert each.groups[0].reliability[0].reversed == ("d2", "d4")
    assert sums == {True, False}
    keyed = cfa_tool.fit("factor k: d1..d4\nreversed d1, d3 on -9 to 9\n", rows)
    assert not any("half of its items" in w for w in keyed.warnings)
    assert "evenly_split" not in next(r for r in keyed.groups[0].reliability if r.factor == "k").to_dict()


def test_several_split_factors_share_one_caution_that_names_each_ones_halves():
    # a fifty-item inventory with five such factors gave five six-line cautions, each with the same advice, at the
    # top of every view: one caution names every factor and its two halves, with the advice once (invented
    # population: loadings .7 with signs -, +, -, + on each of two uncorrelated factors)
    L = np.zeros((8, 2))
    L[:4, 0] = L[4:, 1] = [-0.7, 0.7, -0.7, 0.7]
    names = ["d1", "d2", "d3", "d4", "e1", "e2", "e3", "e4"]
    rows = simulate_cfa(L, np.eye(2), np.diag(np.full(8, 0.51)), 800, 31, names)
    result = cfa_tool.fit("factor k: d1..d4\nfactor m: e1..e4\n", rows)
    said = [str(w) for w in result.warnings if "load each way" in w]  # a Note (its statement apart) as said
    assert len(said) == 1 and said[0].startswith("factors 'k' and 'm': half of each one's items load each way")
    for r in result.groups[0].reliability:
        rest = [x for x in r.items if x not in r.reversed]
        assert f"{r.factor}: {' and '.join(rest)} against {' and '.join(r.reversed)}" in said[0]  # two items each
    assert said[0].count("declare the items worded against the trait") == 1
