"""A parameter set apart in one group ('in group east: noninvariant intercept(x2)', twentieth session) in the
invariance ladder, fit's methods paragraph and compare.  The ladder holds it in force from the step that holds its
class equal, names its group in the report, the JSON and the methods paragraph ("set apart from the other groups',
which were held equal among themselves", the one rule in each view's tense), and computes the latent mean differences with it; compare counts it (one degree of
freedom against the full scalar model, one more for the exemption in every group).

Data: an invented three-site survey simulated with a fixed seed, in which the only difference in measurement is the
intercept of x2 at site east (0.7 higher); the factor's population means are 0 (audit), 0.4 (east) and -0.2 (north).
Degrees of freedom are counted by hand: 3 x (4 + 10) = 42 moments; the scalar model with every intercept held equal
has 24 free parameters (3 loadings, 4 intercepts, 3 factor variances, 12 residual variances, 2 means), df 18."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.workflow_tables import invariance_report
from cfa_tool.workflows.invariance import invariance

MODEL = "factor f: x1, x2, x3, x4\nin group east: noninvariant intercept(x2)\n"


def _sites(seed: int = 11, north_x3: float = 0.0) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    nu, lam = np.array([3.0, 2.5, 3.2, 2.8]), np.array([1.0, 0.8, 0.9, 0.7])
    frames = []
    for label, mean, sd in (("audit", 0.0, 1.0), ("east", 0.4, 0.9), ("north", -0.2, 1.1)):
        shift = np.array([0.0, 0.7 if label == "east" else 0.0, north_x3 if label == "north" else 0.0, 0.0])
        eta = rng.normal(mean, sd, size=250)
        frame = pd.DataFrame(nu + shift + np.outer(eta, lam) + rng.normal(0, 0.6, size=(250, 4)),
                             columns=["x1", "x2", "x3", "x4"])
        frame["site"] = label
        frames.append(frame)
    return pd.concat(frames, ignore_index=True)


@pytest.fixture(scope="module")
def ladders():
    data = _sites()
    return data, invariance(MODEL, data, group="site"), invariance(MODEL.splitlines()[0], data, group="site")


def test_the_ladder_holds_the_declaration_from_the_scalar_step_on(ladders):
    _, declared, plain = ladders
    steps = {s.level: s for s in declared.steps}
    assert [s.declared for s in declared.steps[:2]] == [(), ()]
    assert [(r.kind, r.names, r.group) for r in steps["scalar"].declared] == [("intercept", ("x2",), "east")]
    assert steps["strict"].declared == steps["scalar"].declared
    assert steps["scalar"].result.fit.df == 18 - 1  # one intercept more than the full scalar model (counted by hand)
    assert {s.level: s.result.fit.df for s in plain.steps}["scalar"] == 18
    # the simulated difference is in that intercept alone: the full scalar step fails, the partial one holds
    assert not {s.level: s.holds for s in plain.steps}["scalar"]
    assert steps["scalar"].holds
    # the scalar step is the model fit fits with the statement under 'invariance scalar'
    fitted = cfa_tool.fit("factor f: x1, x2, x3, x4\ninvariance scalar\nin group east: noninvariant intercept(x2)\n",
                          ladders[0], group="site")
    assert fitted.fit.chi_square == pytest.approx(steps["scalar"].result.fit.chi_square, rel=1e-6)


def test_latent_mean_differences_are_computed_with_it(ladders):
    _, declared, _ = ladders
    by_group = {x.group: x for x in declared.latent_differences}
    # the simulation's population values (0.4 and -0.2 from audit's 0), within three standard errors
    assert abs(by_group["east"].mean - 0.4) < 3 * by_group["east"].se
    assert abs(by_group["north"].mean + 0.2) < 3 * by_group["north"].se


def test_the_report_the_json_and_the_methods_paragraph_name_its_group(ladders):
    _, declared, _ = ladders
    report = invariance_report(declared)
    text = " ".join(" ".join(map(str, report.notes)).split())
    assert ("Partial invariance declared in the model file: the intercept of x2 in group east (from the scalar "
            "step) is set apart from the other groups', which are held equal among themselves.") in text
    paragraph = " ".join(report.paragraph.split())
    assert ("Scalar invariance, partial with the intercept of x2 in group east set apart from the other groups', "
            "which were held equal among themselves, held") in paragraph
    steps = json.loads(json.dumps(declared.to_dict()))["steps"]
    assert steps[2]["declared_not_equal"] == [{"kind": "intercept", "variables": ["x2"], "group": "east"}]


def test_fits_methods_paragraph_names_it_beside_an_exemption_in_every_group(ladders):
    data = ladders[0]
    result = cfa_tool.fit("factor f: x1, x2, x3, x4\ninvariance scalar\nnoninvariant intercept(x3)\n"
                          "in group east: noninvariant intercept(x2)\n", data, group="site")
    assert ("Loadings and intercepts were held equal across groups, except the intercept of x3. The intercept of x2 "
            "in group east was set apart from the other groups', which were held equal among themselves.") in " ".join(
        methods_paragraph(result).split())
    described = result.description.to_dict()["noninvariant"]
    assert {"kind": "intercept", "variables": ["x2"], "group": "east"} in described


def test_compare_counts_it(ladders):
    data = ladders[0]
    scalar = "factor f: x1, x2, x3, x4\ninvariance scalar\n"
    result = cfa_tool.compare([scalar, scalar + "in group east: noninvariant intercept(x2)\n",
                               scalar + "noninvariant intercept(x2)\n"], data, group="site")
    df = {(t.restricted, t.general): t.df_difference for t in result.tests}
    first, second, third = result.names
    assert df[(first, second)] == 1 and df[(second, third)] == 1 and df[(first, third)] == 2


def test_a_declaration_a_later_step_refuses_is_an_error_before_any_fit(ladders):
    """Every intercept of f set apart in east leaves east's mean of f without an origin at the scalar step: refused at
    the statement before the configural model is fitted (the ladder's progress never starts), not after two steps."""
    from cfa_tool.errors import ModelError

    calls = []
    with pytest.raises(ModelError, match=r"m\.cfa:2:74: these statements set apart every intercept of the indicators "
                                         r"of 'f' that was held equal in group east"):
        invariance(cfa_tool.parse_model("factor f: x1, x2, x3, x4\nin group east: noninvariant intercept(x1), "
                                        "intercept(x2), intercept(x3), intercept(x4)\n", "m.cfa"),
                   ladders[0], group="site", progress=lambda *step: calls.append(step))
    assert calls == []


def test_the_advice_after_a_failed_step_names_the_statement_for_that_group(ladders):
    """The full scalar step fails on the intercept of x2 at east; the advice names both declarations, the one for
    every group and the one for that group alone."""
    _, _, plain = ladders
    text = " ".join(" ".join(map(str, invariance_report(plain).notes)).split())
    assert ("declare each in the model file ('noninvariant intercept(x2)', or in group east alone: 'in group east: "
            "noninvariant intercept(x2)')") in text


def test_a_failed_partial_step_names_the_declaration_last_its_clause_closed():
    """The ladder's paragraph says the declaration by the one rule (paragraph.set_apart_words: a clause 'which were
    held equal among themselves'), last in the sentence of a step that failed before the search freed another
    parameter, so that the clause does not run into 'and every other equality' (s23; before: in brackets, first).
    Data: the same sites with the intercept of x3 also 0.8 higher at north (invented; fixed seed), which the search
    frees."""
    result = invariance(MODEL, _sites(north_x3=0.8), group="site", partial="auto")
    assert [(f.kind, f.variables) for f in result.freed] == [("intercept", ("x3",))]  # the difference simulated
    paragraph = " ".join(invariance_report(result).paragraph.split())
    assert ("Scalar invariance did not hold with every other equality and the intercept of x2 in group east set apart "
            "from the other groups', which were held equal among themselves (\u03c7\u00b2(") in paragraph
    assert ("Strict invariance, partial with the intercept of x3 (freed at the scalar step) still free and the "
            "intercept of x2 in group east set apart from the other groups', which were held equal among themselves, "
            "held") in paragraph
