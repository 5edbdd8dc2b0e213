"""The shortcuts of assessment/reliability.py give what the rules they stand for give, to the bit:

* ``item_keys`` without a 'reversed' statement and with no loading below zero returns at once what the sign rule
  computes (the rule is written out here as the module's docstring states it: the signs of the loadings, each
  factor's majority, ties broken by the sum of its loadings);
* the loadings' pattern is laid out once per pattern (``_pattern_layout``): two models of the same item and factor
  names but different patterns never share a layout, and a result read from the kept layout is the one computed
  with the layout made anew.
"""

from __future__ import annotations

import numpy as np
import pytest

from cfa_tool.assessment import reliability as R
from cfa_tool.model.implied import ModelMatrices


def sign_rule(G: np.ndarray, member: np.ndarray):
    """The keys by the signs of the loadings, written out (module docstring of assessment/reliability.py)."""
    signs = np.where(G < 0, -1.0, 1.0)
    vote, tie_break = (signs * member).sum(axis=0), (G * member).sum(axis=0)
    direction = np.where(np.where(vote == 0, tie_break, vote) < 0, -1.0, 1.0)
    return signs * direction * member, direction, (vote == 0) & member.any(axis=0)


def same_bits(a: np.ndarray, b: np.ndarray) -> bool:
    return a.dtype == b.dtype and a.shape == b.shape and a.tobytes() == b.tobytes()


@pytest.mark.parametrize("seed", range(40))
def test_keys_of_loadings_none_below_zero_are_the_sign_rules(seed):
    rng = np.random.default_rng(seed)
    p, m = rng.integers(1, 12), rng.integers(1, 5)
    member = rng.random((p, m)) < 0.5
    member[:, rng.integers(m)] = False  # a factor that reaches no item
    G = np.where(rng.random((p, m)) < 0.8, rng.random((p, m)), 0.0) * member
    if seed % 5 == 0:
        G[0, 0] = np.nan  # NaN is not below zero either
    for got, expected in zip(R.item_keys(G, member, tuple(f"x{i}" for i in range(p)), None), sign_rule(G, member)):
        assert same_bits(got, expected)


def test_keys_with_a_loading_below_zero_still_follow_the_rule():
    G = np.array([[0.7, 0.0], [-0.6, 0.0], [0.5, 0.0], [0.0, -0.4], [0.0, -0.3]])
    member = G != 0
    K, direction, split = R.item_keys(G, member, ("a", "b", "c", "d", "e"), None)
    assert K[:, 0].tolist() == [1.0, -1.0, 1.0, 0.0, 0.0]  # 'b' reversed: against the majority of its factor
    assert K[3:, 1].tolist() == [1.0, 1.0] and direction.tolist() == [1.0, -1.0] and not split.any()
    for got, expected in zip((K, direction, split), sign_rule(G, member)):
        assert same_bits(got, expected)


def matrices(L: np.ndarray) -> ModelMatrices:
    p, m = L.shape
    P = np.full((m, m), 0.3) + 0.7 * np.eye(m)
    T = np.diag(1.0 - (L @ P * L).sum(axis=1) + 0.2)
    return ModelMatrices(L, np.zeros((m, m)), P, T, np.zeros(p), np.zeros(m))


def plain(out) -> list:
    factors, htmt = out
    return [repr(r) for r in factors] + [repr(h) for h in htmt]


def test_a_kept_layout_gives_what_a_new_one_gives_and_patterns_never_share_one():
    names, factors = tuple(f"x{i}" for i in range(6)), ("f", "g")
    simple = np.zeros((6, 2))
    simple[:3, 0], simple[3:, 1] = [0.7, 0.6, 0.5], [0.8, 0.7, 0.6]
    crossed = simple.copy()
    crossed[2, 1] = 0.3  # the same names, another pattern: x2 loads on both factors
    S = matrices(simple).implied_covariance() + 0.01 * np.eye(6)
    results = {}
    for name, L in (("simple", simple), ("crossed", crossed)):
        R._pattern_layout.cache_clear()
        new = plain(R.reliability(matrices(L), names, factors, S, np.zeros(6), n_obs=500))
        kept = plain(R.reliability(matrices(L), names, factors, S, np.zeros(6), n_obs=500))
        assert kept == new
        results[name] = new
    # both patterns now in the cache, read alternately
    for name, L in (("simple", simple), ("crossed", crossed), ("simple", simple)):
        assert plain(R.reliability(matrices(L), names, factors, S, np.zeros(6), n_obs=500)) == results[name]
    assert results["simple"] != results["crossed"]
    assert R.reliability(matrices(crossed), names, factors, S)[0][1].items == ("x2", "x3", "x4", "x5")


def test_factor_rows_as_json_are_clean_of_their_dictionaries():
    """factor_dicts gives what numerics.plain.clean(r.to_dict()) gives, key order and types included."""
    nan, inf = float("nan"), float("inf")
    rows = [
        R.FactorReliability("visual", ("x1", "x2", "x3"), "first-order", 0.61, 0.62, None, 0.63, 0.37, 0.63, 0.46, True,
                            sum_score_mean=14.5, sum_score_sd=3.1, item_total=(0.4, 0.5, 0.45)),
        R.FactorReliability("g", ("x1", "x2", "x4"), "higher-order", nan, inf, -inf, None, None, None, None, None,
                            ("x2",), R.Keying.DECLARED, None, None, (), ("x1",), np.float64(0.71),
                            points_against=True, evenly_split=True),
        R.FactorReliability("s", ("x1", "x2"), "first-order", np.float64(0.5), 0.6, 0.5, None, 0.4, nan, -inf, False,
                            item_total=(np.float64(0.3), nan), bifactor=R.BifactorPart.SPECIFIC,
                            shares_items_with=("g",)),
        R.FactorReliability("one", ("x9",), "first-order", nan, nan, None, None, None, None, None, None),
    ]
    from cfa_tool.numerics.plain import clean

    expected = [clean(r.to_dict()) for r in rows]
    got = R.factor_dicts(rows)
    assert [list(d) for d in got] == [list(d) for d in expected]
    for g, e in zip(got, expected):
        for key in e:
            assert type(g[key]) is type(e[key]) and repr(g[key]) == repr(e[key]), key


def test_clean_list_is_clean_of_the_list():
    from cfa_tool.numerics.plain import clean, clean_list

    nan, inf = float("nan"), float("inf")
    for values in [(), (1.5, 2.5), (1.5, nan), (inf, 2.0), (1, 2, 3), ("a", "b"), (1.5, 2), (2, 1.5), (np.float64(1.5),),
                   (1.5, np.float64(2.5)), (np.int64(3), 4), (None, 1.5), (True, 2.0), (1e308, 1e308)]:
        got, expected = clean_list(values), clean(list(values))
        assert [(type(v), repr(v)) for v in got] == [(type(v), repr(v)) for v in expected], values


def test_the_data_block_is_clean_of_its_dictionary():
    """DataSummary.to_dict cleans each value as clean() of the whole dictionary would (NaN, numpy numbers)."""
    from cfa_tool.numerics.plain import clean
    from cfa_tool.pipeline.results import DataSummary

    summary = DataSummary("file.csv", 10, np.int64(2), 8, ("a", "b"), (1.5, float("nan")), (np.float64(0.5), 0.7),
                          (8, 7), (0.1, float("inf")), (0.2, 0.3), ranges=((1.0, 5.0), (1, 5)))
    d = summary.to_dict()
    assert list(d) == ["source", "rows_read", "rows_dropped", "n_obs", "variables", "means", "sds", "sd_divisor",
                       "answered", "skewness", "excess_kurtosis", "answer_ranges"]
    assert repr(d) == repr(clean(d)) and type(d["rows_dropped"]) is int and d["means"] == [1.5, None]
    assert d["skewness"] == [0.1, None] and type(d["sds"][0]) is float and d["answer_ranges"]["b"] == [1, 5]
