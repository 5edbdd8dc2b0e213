"""The ordinal invariance ladder's partial search at the strict step: freeing an item's residual variance.

Under Wu & Estabrook's (2016) identification a later group's residual variance of an ordinal item with two or more
thresholds is a free parameter once its thresholds are held equal, and strict invariance fixes it at the first group's
1; with one threshold it is free only while the item's intercept and loadings are held equal.  The population here is
set by this file (not computed by the project): two groups of 900 rows, items loading .7 on two factors correlated .4,
cut at the same thresholds, except that in the second group q2's latent response is shifted by .8 (every threshold
alike: an intercept difference) and its residual standard deviation doubled (a residual variance difference)."""

from __future__ import annotations

import numpy as np
import pandas as pd

from cfa_tool.assessment.modification import ModificationIndex
from cfa_tool.language.parser import parse_model
from cfa_tool.language.spec import ParameterRef
from cfa_tool.workflows.invariance import _buildable_first, invariance

MODEL = "factor f1: q1, q2, q3\nfactor f2: q4, q5, q6\nordinal q1..q6\n"
CUTS = np.array([-1.2, -0.3, 0.5, 1.3])


def _draw(rng, n, shift=0.0, noise=1.0, cuts=CUTS) -> pd.DataFrame:
    L = np.zeros((6, 2))
    L[:3, 0], L[3:, 1] = 0.7, 0.7
    eta = rng.multivariate_normal([0, 0], [[1, 0.4], [0.4, 1]], n)
    e = rng.normal(size=(n, 6)) * np.sqrt(0.51)
    e[:, 1] *= noise
    x = eta @ L.T + e
    x[:, 1] += shift
    return pd.DataFrame(np.column_stack([np.searchsorted(cuts, x[:, j]) + 1 for j in range(6)]).astype(float),
                        columns=[f"q{j + 1}" for j in range(6)])


def test_the_search_frees_a_residual_variance_after_the_intercept_and_the_report_is_built():
    # before the fix the described model took every ordinal item as having one threshold, so q2's freed residual
    # variance (free for an item with four thresholds) was said to set a scale, and the run stopped with an error
    # pointing at line 1 of the model
    rng = np.random.default_rng(5)
    data = pd.concat([_draw(rng, 900).assign(site="north"), _draw(rng, 900, 0.8, 2.0).assign(site="south")],
                     ignore_index=True)
    result = invariance(MODEL, data, "site", partial="auto")
    freed = [(f.level, f.kind, f.variables) for f in result.freed]
    assert ("scalar", "intercept", ("q2",)) in freed
    assert ("strict", "residual_variance", ("q2",)) in freed
    strict = result.steps[-1]
    assert strict.level == "strict" and strict.holds
    rows = {(p.kind, p.variables, p.group): p for p in strict.result.estimates}
    assert rows[("residual_variance", ("q2",), "south")].free
    assert rows[("residual_variance", ("q2",), "north")].estimate == 1.0


def test_a_freeing_the_model_cannot_take_is_not_proposed():
    # q2 has one threshold (two answers) and its intercept already differs: its residual variance in the second group
    # is then fixed (Wu & Estabrook 2016), so a score test of it names nothing the search could free
    spec = parse_model(MODEL)
    exempt = [ParameterRef("intercept", ("q2",), None)]
    pinned = ModificationIndex("residual_variance", ("q2",), 30.0, 0.5, 0.5, "south")
    other = ModificationIndex("residual_variance", ("q5",), 9.0, 0.3, 0.3, "south")
    counts = {"q1": 4, "q2": 1, "q3": 4, "q4": 4, "q5": 4, "q6": 4}
    classes = ("thresholds", "loadings", "intercepts", "residuals")
    kept = _buildable_first((pinned, other), spec, classes, exempt, ("north", "south"), counts)
    assert kept == (other,)
    counts["q2"] = 4  # with four thresholds the same freeing is a free parameter: kept
    kept = _buildable_first((pinned, other), spec, classes, exempt, ("north", "south"), counts)
    assert kept == (pinned, other)


def test_a_plain_fit_and_a_comparison_declaring_the_same_freeing_are_described():
    # the same freeing declared in a model file ('noninvariant intercept(q2), variance(q2)' with 'invariance strict')
    # stopped a plain fit and a comparison with the same error at the description of the model fitted: they passed
    # the ordinal items' names alone, read as one threshold each (review of s13's ordinal fix: its neighbours)
    import cfa_tool
    from cfa_tool.reporting.paragraph import methods_paragraph

    rng = np.random.default_rng(5)
    data = pd.concat([_draw(rng, 900).assign(site="north"), _draw(rng, 900, 0.8, 2.0).assign(site="south")],
                     ignore_index=True)
    declared = MODEL + "invariance strict\nnoninvariant intercept(q2), variance(q2)\n"
    fitted = cfa_tool.fit(declared, data, group="site")
    rows = {(p.kind, p.variables, p.group): p for p in fitted.estimates}
    assert rows[("residual_variance", ("q2",), "south")].free and not rows[("residual_variance", ("q3",), "south")].free
    assert "except the intercept of q2 and the residual variance of q2" in " ".join(methods_paragraph(fitted).split())
    compared = cfa_tool.compare([declared, MODEL + "invariance strict\n"], data, group="site")
    assert len(compared.results) == 2


def test_a_search_whose_candidates_the_model_cannot_free_says_so(monkeypatch):
    # review s13: when the filter of freeings the model can take dropped every candidate, the search said that one
    # loading and one intercept per factor must stay equal (or that no test was significant), which was not why it
    # stopped.  Holzinger & Swineford (1939) by school: the scalar step fails (x3's intercept, a significant test);
    # with every candidate taken as one the model cannot free, the stop names that reason.
    import cfa_tool.workflows.invariance as ladder
    from tests.conftest import THREE_FACTORS, holzinger_swineford

    monkeypatch.setattr(ladder, "_buildable_first", lambda culprits, *args: ())
    result = invariance(THREE_FACTORS, holzinger_swineford(), "school", partial="auto")
    scalar = next(s for s in result.steps if s.level == "scalar")
    assert not scalar.holds and scalar.stopped == ladder.STOP_PINNED
    assert any(ladder.STOP_PINNED in w for w in result.warnings)
