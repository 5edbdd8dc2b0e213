"""The items' intraclass correlations and the design effect of a cluster sample (new-user trial s20, item 6: a school
sample could not be planned): the one-way ANOVA estimator checked by hand and against statsmodels' MixedLM, reported
by fit and check (status line and JSON), and used by power to give the rows and clusters a plan needs."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.cluster_similarity import design_effect, intraclass_correlations
from tests.conftest import run_cli


def test_the_anova_estimator_by_hand():
    # clusters {1, 2, 3} and {4, 5, 6}: means 2 and 5, grand mean 3.5; MSB = 3 (1.5^2 + 1.5^2) / 1 = 13.5,
    # MSW = (1 + 0 + 1 + 1 + 0 + 1) / 4 = 1, n0 = (6 - 18 / 6) / 1 = 3: ICC = (13.5 - 1) / (13.5 + 2 x 1) = 12.5 / 15.5
    # (the estimator of Snedecor & Cochran 1989 / Donner 1986, recalled from memory; arithmetic by hand)
    values = np.array([1, 2, 3, 4, 5, 6], dtype=float)
    np.testing.assert_allclose(intraclass_correlations(values, np.array(["a", "a", "a", "b", "b", "b"])),
                               [12.5 / 15.5], rtol=1e-12)
    # unequal clusters and a gap: {1, 3} and {2, 4, 6} (the 7 not answered): means 2 and 4, grand mean 3.2;
    # MSB = 2 (1.2^2) + 3 (0.8^2) = 4.8, MSW = (1 + 1 + 4 + 0 + 4) / 3 = 10 / 3, n0 = 5 - 13 / 5 = 2.4:
    # ICC = (4.8 - 10/3) / (4.8 + 1.4 x 10/3) (by hand)
    gappy = np.array([[1], [3], [2], [4], [6], [np.nan]])
    expected = (4.8 - 10 / 3) / (4.8 + 1.4 * 10 / 3)
    np.testing.assert_allclose(intraclass_correlations(gappy, np.array([0, 0, 1, 1, 1, 1])), [expected], rtol=1e-12)
    # Kish (1965), recalled from memory: deff = 1 + (m - 1) ICC
    assert design_effect(0.05, 41) == pytest.approx(3.0)


def test_the_anova_estimator_matches_restricted_maximum_likelihood_in_balanced_clusters():
    # In balanced clusters the REML variance components equal the ANOVA ones when positive (Searle, Casella &
    # McCulloch 1992, recalled from memory): statsmodels' MixedLM, a random intercept per cluster, fitted by REML.
    statsmodels = pytest.importorskip("statsmodels.formula.api")
    rng = np.random.default_rng(2026)
    cluster = np.repeat(np.arange(30), 8)
    y = rng.normal(size=30)[cluster] * 0.5 + rng.normal(size=len(cluster))
    frame = pd.DataFrame({"y": y, "cluster": cluster})
    fitted = statsmodels.mixedlm("y ~ 1", frame, groups=frame["cluster"]).fit(reml=True)
    between = float(fitted.cov_re.iloc[0, 0])
    reml = between / (between + fitted.scale)
    (anova,) = intraclass_correlations(y, cluster)
    assert anova == pytest.approx(reml, abs=1e-4)


def _schools(seed: int = 11) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    school = np.repeat(np.arange(40), 25)
    f = rng.normal(size=len(school)) + np.repeat(rng.normal(scale=0.5, size=40), 25)
    lam = np.array([.8, .7, .7, .6])
    y = f[:, None] * lam + rng.normal(size=(len(school), 4)) * np.sqrt(1 - lam ** 2)
    frame = pd.DataFrame(np.digitize(y, [-1.0, 0.0, 1.0]) + 1.0, columns=["x1", "x2", "x3", "x4"])
    frame.loc[rng.random(len(frame)) < 0.05, "x2"] = np.nan
    return frame.assign(school=[f"S{c:02d}" for c in school])


@pytest.mark.parametrize("ordinal", [None, "all"])
def test_fit_and_check_report_the_items_intraclass_correlations(ordinal):
    data = _schools()
    model = "factor F: x1, x2, x3, x4"
    answered = data["x2"].notna().to_numpy()
    expected = [intraclass_correlations(data[x].to_numpy()[answered] if x == "x2" else data[x].to_numpy(),
                                        data["school"].to_numpy()[answered] if x == "x2" else data["school"].to_numpy())[0]
                for x in ("x1", "x2", "x3", "x4")]
    for result in (cfa_tool.fit(model, data, cluster="school", ordinal=ordinal),
                   cfa_tool.check(model, data, cluster="school", ordinal=ordinal)):
        similarity = result.design.similarity if hasattr(result, "design") else result.sample_design.similarity
        np.testing.assert_allclose(similarity.intraclass, expected, rtol=1e-10)
        assert similarity.rows_per_cluster == pytest.approx(25.0)
        assert similarity.design_effect == pytest.approx(1 + 24 * np.median(expected))
    checked = cfa_tool.check(model, data, cluster="school", ordinal=ordinal)
    (note,) = [str(n) for n in checked.notes if "Intraclass correlations of the items" in str(n)]
    assert f"x1 {expected[0]:.2f}".replace("0.", ".") in note and "rows per cluster" in note  # each item's, for planning
    fitted = cfa_tool.fit(model, data, cluster="school", ordinal=ordinal)
    said = fitted.design.to_dict()["cluster_similarity"]
    assert said["median_intraclass_correlation"] == pytest.approx(np.median(expected))
    assert "median intraclass correlation of the items" in fitted.estimator and "rows per cluster" in fitted.estimator


def test_power_gives_the_rows_and_clusters_of_a_planned_cluster_sample(tmp_path, capsys):
    from cfa_tool.workflows.power import plan

    independent = plan(98)
    planned = plan(98, intraclass=0.05, cluster_size=41)
    assert planned.required_n == independent.required_n
    assert planned.clusters.design_effect == pytest.approx(3.0)  # 1 + 40 x .05 (Kish 1965, recalled)
    assert planned.clusters.rows == int(np.ceil(3.0 * independent.required_n - 1e-9))
    assert planned.clusters.clusters == int(np.ceil(planned.clusters.rows / 41 - 1e-9))
    given = plan(98, design_effect=2.0)
    assert given.clusters.rows == 2 * independent.required_n and given.clusters.clusters is None
    out = tmp_path / "power.json"
    code, _, _ = run_cli(["power", "--df", "98", "--design-effect", "2", "--cluster-size", "20", "--json", str(out)],
                         capsys)
    assert code == 0
    saved = json.loads(out.read_text())
    assert saved["clusters"]["clusters"] == int(np.ceil(2 * independent.required_n / 20 - 1e-9))
    for argv, words in ((["--cluster-size", "20"], "--cluster-size) alone gives no design effect"),
                        (["--intraclass", ".05"], "give --cluster-size too"),
                        (["--intraclass", ".05", "--design-effect", "2", "--cluster-size", "9"], "not both"),
                        (["--design-effect", "0.5"], "the design effect (--design-effect) must be at least 1")):
        code, _, err = run_cli(["power", "--df", "98"] + argv, capsys)
        assert code == 2 and words in err and len(err.strip().splitlines()) == 1, err


def test_the_weights_effective_n_is_named_as_theirs_and_the_designs_given_beside_it():
    """Kish's effective N of sampling weights is the weights' alone: with clusters, the design's is that over the
    clusters' design effect (new-user trial s28: 'Kish's effective N 2129.1' read as the sample's with a design effect
    of 3.7).  Check values: Kish (1965), recalled from memory: n_eff = (sum w)^2 / sum w^2, deff = 1 + (m - 1) ICC,
    the two design effects multiplied (Gabler, Haeder & Lahiri 1999, recalled from memory); the ICCs by the
    estimator checked above, with numpy."""
    from cfa_tool.reporting.paragraph import methods_paragraph

    data = _schools()
    w = np.exp(np.random.default_rng(5).normal(0, 0.4, len(data)))
    data = data.assign(w=w)
    model = "factor F: x1, x2, x3, x4"
    fitted = cfa_tool.fit(model, data, cluster="school", weights="w")
    kish = w.sum() ** 2 / (w ** 2).sum()
    answered = data["x2"].notna().to_numpy()
    iccs = [intraclass_correlations(data[x].to_numpy()[answered] if x == "x2" else data[x].to_numpy(),
                                    data["school"].to_numpy()[answered] if x == "x2" else data["school"].to_numpy())[0]
            for x in ("x1", "x2", "x3", "x4")]
    design = kish / (1 + 24 * np.median(iccs))
    assert f"Kish's effective N of the weights alone {kish:.1f}" in fitted.estimator
    assert f"effective N of the design about {round(design):,}, the weights' effective N over this design effect" \
        in fitted.estimator
    paragraph = " ".join(methods_paragraph(fitted).split())
    assert f"Kish's effective sample size of the weights alone {kish:.1f}" in paragraph
    assert f"an effective sample size of about {round(design):,} for the design as a whole" in paragraph
    alone = cfa_tool.fit(model, data, cluster="school")  # no weights: the rows over the design effect
    assert f"effective N of the design about {round(1000 / (1 + 24 * np.median(iccs))):,}, the rows over" \
        in alone.estimator
