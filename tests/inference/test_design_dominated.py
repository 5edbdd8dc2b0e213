"""A design-based covariance that one aberrant cluster dominates, and a design-based test whose scaling is extreme,
are said first (new-user trial s18: 30 careless rows made up one school of 40; the ordinal test's scale came out
.048 with a shift of 85.9 on 98 df, the Yuan-Bentler scaling factor 0.41, and nothing said so); the few-clusters
caution counts the thresholds an ordinal fit's design-based covariance carries beside the model's parameters.

The data are simulated here (40 schools of 30 students in 4 regions, a school-level factor), never the trial's."""

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.data.sample_design import DesignColumns, RowDesign, SampleDesign
from cfa_tool.inference.design import dominant_cluster
from cfa_tool.inference.robust import RobustFit
from cfa_tool.method import FitTest, WeightKind
from cfa_tool.pipeline.inputs import extreme_scaling
from cfa_tool.reporting.paragraph import methods_paragraph

ONE_FACTOR = "factor F: x1, x2, x3, x4, x5, x6"
ITEMS = [f"x{i}" for i in range(1, 7)]


def _schools(seed: int, aberrant: float | None, ordinal: bool, items: int = 6) -> pd.DataFrame:
    """40 schools of 30 rows, one factor with a school-level part; ``aberrant``: the value every item of school S07
    is given (a block of careless rows making up one school), None for none."""
    rng = np.random.default_rng(seed)
    school = np.repeat(np.arange(40), 30)
    f = rng.normal(size=len(school)) + np.repeat(rng.normal(scale=0.4, size=40), 30)
    lam = np.resize([.8, .7, .7, .6, .6, .5], items)
    y = f[:, None] * lam + rng.normal(size=(len(school), items)) * np.sqrt(1 - lam ** 2)
    if ordinal:
        y = np.digitize(y, [-1.5, -0.3, 1.0]) + 1.0
    if aberrant is not None:
        y[school == 7] = aberrant
    frame = pd.DataFrame(y, columns=[f"x{i}" for i in range(1, items + 1)])
    frame["school"] = [f"S{c:02d}" for c in school]
    frame["region"] = school % 4
    return frame


def _dominated(result):
    return [p for p in result.problems if p.kind is ProblemKind.DESIGN_DOMINATED]


def test_each_row_its_own_cluster_has_the_design_effect_of_sampling_with_replacement():
    # one row per cluster, one stratum: the linearization estimator is the with-replacement variance times
    # C/(C - 1) (Wolter 2007, on linearization; Kish 1965: the design effect of simple random sampling is 1), so
    # every statistic's design effect is C/(C - 1) and each cluster holds its row's part of the sum
    rng = np.random.default_rng(3)
    n = 50
    contributions = rng.normal(size=(n, 4))
    contributions -= contributions.mean(axis=0)
    design = RowDesign(np.ones(n), WeightKind.SAMPLING, clusters=np.arange(n), cluster_names=tuple(map(str, range(n))))
    found = dominant_cluster(contributions, design)
    assert found.clusters == n
    assert found.design_effect == pytest.approx(n / (n - 1), rel=1e-12)  # Wolter 2007; Kish 1965
    # the largest share is the row whose squared contributions, each over its statistic's variance, sum largest
    variance = (contributions ** 2).mean(axis=0)
    parts = (contributions ** 2 / variance).sum(axis=1)
    assert found.name == str(int(np.argmax(parts)))
    assert found.share == pytest.approx(parts.max() / parts.sum(), rel=1e-12)  # the definition: a part over the sum


def test_an_ordinal_fit_names_the_school_of_careless_rows_first_and_not_without_it():
    data = _schools(5, 1.0, ordinal=True)  # every row of school S07 answered 1 (the lowest answer) throughout
    result = cfa_tool.fit(ONE_FACTOR, data, ordinal="all", cluster="school", strata="region")
    [problem] = _dominated(result)
    assert "'S07' holds" in problem.explanation and "more than all the other clusters together" in problem.explanation
    assert problem.value > 0.5  # more than all the other 39 schools together (the rule of thumb the caution names)
    assert '"school != S07"' in str(problem.advice)  # the row filter that leaves the school out
    # a design caution: stated beside the design in the methods paragraph, in the first box of every view
    assert "'S07' holds" in str(methods_paragraph(result))
    clean = cfa_tool.fit(ONE_FACTOR, data, ordinal="all", cluster="school", strata="region", keep=["school != S07"])
    assert not _dominated(clean)
    assert not _dominated(cfa_tool.fit(ONE_FACTOR, _schools(5, None, ordinal=True), ordinal="all", cluster="school",
                                       strata="region"))


def test_a_maximum_likelihood_fit_names_the_school_of_careless_rows():
    data = _schools(6, -2.5, ordinal=False)  # the school's rows all at the bottom of every item
    [problem] = _dominated(cfa_tool.fit(ONE_FACTOR, data, cluster="school", strata="region"))
    assert "'S07' holds" in problem.explanation
    assert not _dominated(cfa_tool.fit(ONE_FACTOR, _schools(6, None, ordinal=False), cluster="school",
                                       strata="region"))


def _robust(c: float, scale=None, shift=None, df=98) -> RobustFit:
    nan = float("nan")
    return RobustFit(FitTest.SCALE_SHIFTED if scale is not None else FitTest.SATORRA_BENTLER, c, nan, df, nan, nan,
                     nan, nan, nan, nan, (nan, nan), scale=scale, shift=shift, design=True)


def test_an_extreme_design_based_scaling_is_said_with_its_rule():
    # the trial's ordinal test: scale .048, shift 85.9 on 98 df: (98 - 85.9)^2 / 98 = 1.49 effective df
    # (Satorra & Bentler 1994's adjusted df, d = tr(UG)^2 / tr((UG)^2), written in the scale and shift)
    text = extreme_scaling(_robust(2.57, 0.048, 85.9))
    assert "about 1.5 degrees of freedom" in text and "a rule of thumb of this tool" in text
    assert extreme_scaling(_robust(0.66, 0.62, 61.1)) == ""  # 18.8 of 98 effective df: not degenerate
    # the trial's Yuan-Bentler scaling factor 0.41: the scaled statistic 2.4 times the unscaled one
    assert "scaling factor is 0.41" in extreme_scaling(_robust(0.41))
    assert extreme_scaling(_robust(1.14)) == ""


def test_the_few_clusters_caution_counts_the_thresholds():
    design = SampleDesign(DesignColumns(cluster="school_id"), 1200, None, None, 40, None)
    # the trial: 40 clusters against 22 parameters of the model and 48 thresholds (16 items of 4 answers)
    text = design.caution(22, 48)
    assert "no more than the 70 free parameters (22 of the model and 48 thresholds)" in text
    assert design.caution(22) is None  # 40 clusters, 22 parameters: enough by the rule (common practice: 30-50)


def test_an_ordinal_fit_counts_its_thresholds_against_the_clusters():
    data = _schools(7, None, ordinal=True, items=12)  # 12 parameters and 36 thresholds against 40 schools
    result = cfa_tool.fit("factor F: " + ", ".join(f"x{i}" for i in range(1, 13)), data, ordinal="all",
                          cluster="school")
    [few] = [p for p in result.problems if p.kind is ProblemKind.FEW_CLUSTERS]
    assert "the 48 free parameters (12 of the model and 36 thresholds)" in few.explanation


def test_check_counts_the_thresholds_as_the_fit_does():
    data = _schools(7, None, ordinal=True, items=12)
    model = "factor F: " + ", ".join(f"x{i}" for i in range(1, 13))
    checked = cfa_tool.check(model, data, ordinal="all", cluster="school")
    [few] = [p for p in checked.problems if p.kind is ProblemKind.FEW_CLUSTERS]
    assert "the 48 free parameters (12 of the model and 36 thresholds)" in few.explanation  # as the fit above


def test_compare_says_it_too():
    data = _schools(6, -2.5, ordinal=False)
    comparison = cfa_tool.compare([ONE_FACTOR, "factor F: x1, x2, x3\nfactor G: x4, x5, x6"], data, cluster="school",
                                  strata="region")
    assert all("'S07' holds" in _dominated(r)[0].explanation for r in comparison.results)


def test_every_step_of_an_invariance_ladder_says_it_too():
    data = _schools(6, -2.5, ordinal=False).assign(sex=lambda d: np.tile(["girl", "boy"], len(d) // 2))
    ladder = cfa_tool.invariance(ONE_FACTOR, data, group="sex", cluster="school", strata="region")
    assert all("'S07' holds" in _dominated(step.result)[0].explanation for step in ladder.steps)


def test_the_fit_table_recommends_no_test_the_design_caution_discredits():
    # re-check s18 (r01): with the dominated design's caution first, the table still called the scaled chi-square
    # 'the test to read for these data'
    from cfa_tool.reporting.tables import fit_table

    dominated = cfa_tool.fit(ONE_FACTOR, _schools(6, -2.5, ordinal=False), cluster="school", strata="region")
    plain = cfa_tool.fit(ONE_FACTOR, _schools(6, None, ordinal=False), cluster="school", strata="region")
    guides = {name: [row[2] for row in fit_table(r).rows if row[0].startswith("Scaled chi-square")][0]
              for name, r in (("dominated", dominated), ("plain", plain))}
    assert guides == {"dominated": "says little here: see the caution first", "plain": "the test to read for these data"}


def test_each_models_own_design_caution_is_said_of_that_model():
    # re-check s18 (r02): compare said the four-factor model's extreme scaling factor (0.407) of the one-factor model
    # too ('...; One factor too'), whose factor was 0.651
    from types import SimpleNamespace

    from cfa_tool.assessment.admissibility import Problem
    from cfa_tool.reporting.paragraph import _design_sentences
    from cfa_tool.reporting.workflow_tables import _design_caution_lines

    def model(name, free, factor):
        caution = Problem(ProblemKind.DESIGN_DOMINATED, (), factor, f"The design-based scaling factor is {factor}.",
                          "see the docs.")
        return SimpleNamespace(model_name=name, fit=SimpleNamespace(n_free_parameters=free), problems=(caution,),
                               design=None)

    four, one = model("four factors", 54, 0.407), model("one factor", 48, 0.651)
    lines = " ".join(map(str, _design_caution_lines([("Four factors", four), ("One factor", one)])))
    assert "Four factors (the model with the most free parameters): The design-based scaling factor is 0.407" in lines
    assert "One factor: The design-based scaling factor is 0.651" in lines and "too" not in lines
    same = model("one factor", 48, 0.407)
    # the same caution of both: said once, as before
    assert _design_caution_lines([("Four factors", four), ("One factor", same)]) == [
        "The design-based scaling factor is 0.407. What to try: see the docs."]
    assert _design_sentences([four, one]) == []  # no design to state: the fake results carry none
