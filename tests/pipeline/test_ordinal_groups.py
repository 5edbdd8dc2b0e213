"""Ordinal items in several groups (thresholds as parameters, their invariance) and score tests
(modification indices) for ordinal fits.

Checks against what the project did not write: the single-group least-squares fit on polychoric
correlations (a separate code path with the latent responses standardized) must reproduce the
configural model exactly, as the two parametrisations are equivalent (Millsap & Yun-Tein 2004);
the threshold-invariance model of items with three categories fits exactly as well as the
configural one (Wu & Estabrook 2016, who show it is an equivalent model); population values of
simulated data are recovered; robust score tests behave like chi-square(1) statistics under a
correct model (their defining property, Satorra 1989), and the adjusted difference tests give
uniform p-values under invariance (the defining property of a valid test).
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError, EstimationError, ModelError, OptionError
from cfa_tool.workflows.invariance import invariance
from cfa_tool.method import DifferenceMethod

MODEL = "factor f1: q1, q2, q3\nfactor f2: q4, q5, q6\nordinal q1..q6\n"
CUTS = (-1.2, -0.3, 0.5, 1.3)


def _draw(n: int, seed: int, cuts=CUTS, mean: float = 0.0, sd: float = 1.0, shift: dict | None = None,
          cross: float = 0.0, per_factor: int = 3) -> pd.DataFrame:
    """Items on two correlated factors (loadings .7 on the latent responses), cut into categories."""
    rng = np.random.default_rng(seed)
    p = 2 * per_factor
    L = np.zeros((p, 2))
    L[:per_factor, 0] = 0.7
    L[per_factor:, 1] = 0.7
    L[0, 1] = cross
    eta = mean + sd * rng.multivariate_normal([0, 0], [[1, 0.4], [0.4, 1]], n)
    x = eta @ L.T + rng.normal(size=(n, p)) * np.sqrt(1 - 0.49)
    cols = {}
    for j in range(p):
        cut = np.asarray(cuts, dtype=float) + np.asarray((shift or {}).get(j, 0.0))
        cols[f"q{j + 1}"] = np.searchsorted(cut, x[:, j]) + 1
    return pd.DataFrame(cols)


def _two_groups(a: pd.DataFrame, b: pd.DataFrame) -> pd.DataFrame:
    return pd.concat([a.assign(site="north"), b.assign(site="south")], ignore_index=True)


def test_configural_model_equals_the_separate_single_group_fits():
    a, b = _draw(600, 1), _draw(500, 2, mean=0.3)
    joint = cfa_tool.fit(MODEL, _two_groups(a, b), group="site")
    parts = [cfa_tool.fit(MODEL, d) for d in (a, b)]
    assert joint.converged and all(p.converged for p in parts)
    assert joint.fit.chi_square == pytest.approx(sum(p.fit.chi_square for p in parts), rel=1e-6)
    assert joint.fit.df == sum(p.fit.df for p in parts)
    for label, part in zip(("north", "south"), parts):
        mine = {r.variables: r.standardized for r in joint.estimates if r.group == label and r.kind == "loading"}
        theirs = {r.variables: r.standardized for r in part.estimates if r.kind == "loading"}
        for key, value in theirs.items():
            assert mine[key] == pytest.approx(value, abs=1e-4), (label, key)
    shares = [g.chi_square for g in joint.groups]
    assert sum(shares) == pytest.approx(joint.fit.chi_square, rel=1e-9)


def test_threshold_invariance_of_three_category_items_is_an_equivalent_model():
    # Wu & Estabrook (2016): with three categories, equal thresholds (with free intercepts and
    # residual variances in the second group) fit exactly as well as the configural model
    cuts = (-0.5, 0.6)
    data = _two_groups(_draw(700, 3, cuts), _draw(600, 4, cuts, mean=0.4, sd=1.2))
    configural = cfa_tool.fit(MODEL, data, group="site")
    equal = cfa_tool.fit(MODEL + "invariance thresholds\n", data, group="site")
    assert equal.converged
    assert equal.fit.df == configural.fit.df
    assert equal.fit.chi_square == pytest.approx(configural.fit.chi_square, rel=1e-5, abs=1e-6)
    # with four categories the same step has one testable restriction per item
    cuts = (-1.0, 0.0, 1.0)
    four = _two_groups(_draw(700, 3, cuts), _draw(600, 4, cuts, mean=0.4))
    assert (cfa_tool.fit(MODEL + "invariance thresholds\n", four, group="site").fit.df
            == cfa_tool.fit(MODEL, four, group="site").fit.df + 6)


def test_scalar_model_recovers_the_population_mean_and_variance():
    data = _two_groups(_draw(4000, 5), _draw(4000, 6, mean=0.5, sd=1.2))
    result = cfa_tool.fit(MODEL + "invariance scalar\nscale latent by variance\n", data, group="site")
    assert result.converged
    rows = {(r.kind, r.variables, r.group): r for r in result.estimates}
    for f in ("f1", "f2"):
        mean = rows[("mean", (f,), "south")]
        var = rows[("factor_variance", (f,), "south")]
        assert mean.free and abs(mean.estimate - 0.5) < 4 * mean.se, f
        assert var.free and abs(var.estimate - 1.44) < 4 * var.se, f
        assert not rows[("mean", (f,), "north")].free
    # the first group's latent responses carry the scale: intercept 0, residual variance 1
    assert rows[("intercept", ("q2",), "north")].estimate == 0.0
    assert rows[("residual_variance", ("q2",), "north")].estimate == 1.0
    assert rows[("residual_variance", ("q2",), "south")].free
    assert result.robust.p_value_scaled > 0.001


@pytest.mark.parametrize("case, shift, level, kind", [
    ("one threshold moves", {2: [0.0, 0.0, 0.0, 0.7]}, "thresholds", "threshold"),
    ("every threshold moves alike", {4: 0.5}, "scalar", "intercept"),
])
def test_invariance_ladder_finds_the_noninvariant_item(case, shift, level, kind):
    data = _two_groups(_draw(800, 4), _draw(800, 3, mean=0.3, shift=shift))
    result = invariance(MODEL, data, "site", partial="auto")
    assert [s.level for s in result.steps] == ["configural", "thresholds", "metric", "scalar", "strict"]
    item = f"q{list(shift)[0] + 1}"
    first = result.freed[0]
    assert (first.level, first.kind, first.variables) == (level, kind, (item,)), case
    assert all(s.result.converged for s in result.steps)


def test_invariance_ladder_holds_for_an_invariant_population():
    data = _two_groups(_draw(700, 11), _draw(700, 12, mean=0.3))
    result = invariance(MODEL, data, "site")
    for step in result.steps[1:]:
        assert step.versus_previous.df_difference > 0
        assert 0.0 <= step.versus_previous.p_value <= 1.0
    assert sum(not s.holds for s in result.steps) <= 1  # at alpha .05 a false alarm is possible, two are unlikely


def test_omitted_cross_loading_is_the_largest_score_test():
    model = "factor f1: q1..q4\nfactor f2: q5..q8\nordinal q1..q8\n"
    one = cfa_tool.fit(model, _draw(2000, 7, cross=0.35, per_factor=4))
    top = one.modification_indices[0]
    assert (top.kind, top.variables) == ("loading", ("f2", "q1"))
    assert top.index > 20 and top.expected_change > 0
    both = cfa_tool.fit(model, _two_groups(_draw(1500, 7, cross=0.35, per_factor=4), _draw(1500, 8, cross=0.35, per_factor=4)),
                        group="site")
    assert {(m.kind, m.variables) for m in both.modification_indices[:2]} == {("loading", ("f2", "q1"))}


def test_score_tests_behave_like_chi_square_one_under_a_correct_model():
    # the mean of a chi-square(1) statistic is 1; 60 replications give a standard error of about .18
    values = []
    for seed in range(60):
        result = cfa_tool.fit(MODEL, _draw(400, 100 + seed))
        mi = {(m.kind, m.variables): m.index for m in result.modification_indices}
        values.append(mi[("loading", ("f2", "q1"))])
    assert 0.6 < np.mean(values) < 1.5


def test_every_empty_category_of_every_group_is_named_in_one_message():
    # planted by construction: south never uses category 5 of q2 nor 1 of q5; east never uses 5 of q2 nor 1 of q3
    a, b, c = _draw(300, 1), _draw(300, 2), _draw(300, 3)
    b.loc[b.q2 == 5, "q2"] = 4
    b.loc[b.q5 == 1, "q5"] = 2
    c.loc[c.q2 == 5, "q2"] = 4
    c.loc[c.q3 == 1, "q3"] = 2
    data = pd.concat([a.assign(site="north"), b.assign(site="south"), c.assign(site="east")], ignore_index=True)
    with pytest.raises(DataError) as found:
        cfa_tool.fit(MODEL, data, group="site")
    message = str(found.value)
    assert "some categories of 3 ordinal items that other groups used" in message
    assert ("in group east of 'site': category 5 of 'q2', category 1 of 'q3'; "
            "in group south of 'site': category 5 of 'q2', category 1 of 'q5'") in message  # groups in their order
    # one recoding for every group, each empty category into its nearest one answered in every group
    for statement in ("join answers 4, 5 as 4 for q2", "join answers 1, 2 as 2 for q3", "join answers 1, 2 as 2 for q5"):
        assert f"'{statement}'" in message
    # leaving south and east out would leave north alone, with nothing to compare: not advised (hostile s25, 5)
    assert "leave those groups out" not in message and "--keep" not in message and "keep=" not in message
    # the joins it gives (as the data recoded by hand) let the fit run (no second round of messages)
    for x, (old, new) in {"q2": (5, 4), "q5": (1, 2), "q3": (1, 2)}.items():
        data.loc[data[x] == old, x] = new
    assert cfa_tool.fit(MODEL, data, group="site").converged


def test_errors_for_groups_with_ordinal_items():
    a, b = _draw(300, 1), _draw(300, 2)
    b.loc[b.q2 == 4, "q2"] = 3  # the south group never uses category 4 of q2
    with pytest.raises(DataError, match=r"group south of 'site'\): no one answered category 4 on ordinal item 'q2'"):
        cfa_tool.fit(MODEL, _two_groups(a, b), group="site")
    with pytest.raises(ModelError, match="can only be named in 'noninvariant'"):
        cfa_tool.fit(MODEL + "fix threshold(q1) = 0\n", _two_groups(a, _draw(300, 2)), group="site")
    with pytest.raises(ModelError, match="holding thresholds equal across groups applies to ordinal items"):
        cfa_tool.fit(MODEL.replace("ordinal q1..q6\n", "") + "invariance thresholds\n", _two_groups(a, _draw(300, 2)),
                     group="site")
    with pytest.raises(EstimationError, match=r"not identified.*mean\(f1\) \[south\]"):
        # a factor mean with free thresholds: any shift of the mean is matched by the thresholds
        cfa_tool.fit(MODEL + "in group south: free mean(f1)\n", _two_groups(a, _draw(300, 2)), group="site")
    with pytest.raises(ModelError, match="'q1' is not treated as ordinal"):
        cfa_tool.fit(MODEL.replace("ordinal q1..q6\n", "") + "invariance metric\nnoninvariant threshold(q1)\n",
                     _two_groups(a, _draw(300, 2)), group="site")


def test_command_line_invariance_with_ordinal_items(tmp_path):
    from cfa_tool.cli import main

    data = tmp_path / "answers.csv"
    _two_groups(_draw(500, 1), _draw(500, 2)).to_csv(data, index=False)
    model = tmp_path / "two.model"
    model.write_text(MODEL.replace("ordinal q1..q6\n", ""))
    out = tmp_path / "ladder.json"
    code = main(["invariance", str(model), "--data", str(data), "--group-column", "site", "--ordinal", "all", "--json", str(out)])
    assert code == 0
    import json

    steps = json.loads(out.read_text())["steps"]
    assert [s["level"] for s in steps] == ["configural", "thresholds", "metric", "scalar", "strict"]
    assert steps[2]["robust"]["chi_square_scaled"] > 0
    assert "Asparouhov & Muthén 2006" in steps[2]["versus_previous"]["method"]
    fitted = tmp_path / "fit.json"
    assert main(["fit", str(model), "--data", str(data), "--group-column", "site", "--ordinal", "all", "--json", str(fitted)]) == 0
    kinds = {e["kind"] for e in json.loads(fitted.read_text())["estimates"]}
    assert "threshold" in kinds


def test_adjusted_difference_tests_hold_their_level_under_invariance():
    # under an invariant population the p-values of a valid difference test are uniform: mean 1/2 and
    # about 5% below .05 (60 replications: the mean has a standard error of about .04)
    from dataclasses import replace

    from cfa_tool.pipeline.inputs import ordinal_groups
    from cfa_tool.pipeline.continuous import FitOptions
    from cfa_tool.language import parse_model
    from cfa_tool.pipeline.ordinal import estimate_ordinal_groups, ordinal_difference

    spec = parse_model(MODEL)
    p_values = {"thresholds": [], "metric": []}
    for rep in range(60):
        data = _two_groups(_draw(400, 1000 + rep), _draw(400, 2000 + rep, mean=0.3, sd=1.1))
        groups, _ = ordinal_groups(spec, data, "data", "site", None, set(spec.observed_names))
        fits = [estimate_ordinal_groups(replace(spec, invariant=classes), groups, FitOptions())
                for classes in ((), ("thresholds",), ("thresholds", "loadings"))]
        p_values["thresholds"].append(ordinal_difference(fits[1], fits[0]).scale_shifted_p)
        p_values["metric"].append(ordinal_difference(fits[2], fits[1]).scale_shifted_p)
    for step, values in p_values.items():
        values = np.asarray(values)
        assert 0.38 < values.mean() < 0.62, step
        assert (values < 0.05).mean() <= 0.12, step


TWO = 'name "two"\nfactor f1: q1..q4\nfactor f2: q5..q8\nordinal q1..q8\n'
ONE = 'name "one"\nfactor f: q1..q8\nordinal q1..q8\n'
ORTHOGONAL = 'name "orthogonal"\nfactor f2: q5..q8\nfactor f1: q1..q4\nuncorrelated f1, f2\nordinal q1..q8\n'


def test_compare_ordinal_models():
    from cfa_tool.workflows.compare import compare

    data = _draw(1500, 3, per_factor=4)
    comparison = compare([TWO, ONE, ORTHOGONAL], data)
    # each model's fit is the one 'fit' gives (one-group thresholds-and-correlations fit = the single-group estimator)
    for text, result in zip((TWO, ONE, ORTHOGONAL), comparison.results):
        alone = cfa_tool.fit(text, data)
        assert result.fit.chi_square == pytest.approx(alone.fit.chi_square, rel=1e-6)
        assert result.robust.chi_square_scaled == pytest.approx(alone.robust.chi_square_scaled, rel=1e-6)
    tests = {(t.restricted, t.general): t for t in comparison.tests}
    assert set(tests) == {("one", "two"), ("orthogonal", "two")}  # the second lists its items in another order
    assert all(t.df_difference == 1 and t.p_value < 1e-10 and t.method is DifferenceMethod.SCALE_SHIFTED for t in tests.values())
    assert [(n.first, n.second) for n in comparison.not_nested] == [("one", "orthogonal")]
    with pytest.raises(OptionError, match="same items"):
        compare([TWO, 'factor f: q1..q7\nordinal q1..q7\n'], data)


def test_compare_ordinal_difference_holds_its_level():
    from cfa_tool.workflows.compare import compare

    free = 'name "free"\nfactor f1: q1..q4\nfactor f2: q5..q8\nordinal q1..q8\nscale latent by variance\n'
    equal = free.replace('"free"', '"equal"') + "equal loading(f1, q1), loading(f1, q2), loading(f1, q3), loading(f1, q4)\n"
    p_values = np.array([compare([free, equal], _draw(400, 500 + rep, per_factor=4)).tests[0].p_value for rep in range(50)])
    assert 0.35 < p_values.mean() < 0.65  # uniform under the restriction, which holds in the population
    assert (p_values < 0.05).mean() <= 0.14


def test_command_line_compare_with_ordinal_items(tmp_path):
    import json

    from cfa_tool.cli import main

    data = tmp_path / "answers.csv"
    _draw(600, 5, per_factor=4).to_csv(data, index=False)
    paths = []
    for name, text in (("two", TWO), ("one", ONE)):
        path = tmp_path / f"{name}.model"
        path.write_text(text.replace("ordinal q1..q8\n", ""))
        paths.append(str(path))
    out = tmp_path / "compare.json"
    assert main(["compare", *paths, "--data", str(data), "--ordinal", "all", "--json", str(out)]) == 0
    report = json.loads(out.read_text())
    assert report["tests"][0]["restricted"] == "one" and report["models"][0]["robust"]["chi_square_scaled"] > 0
