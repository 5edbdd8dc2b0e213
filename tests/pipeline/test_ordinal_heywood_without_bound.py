"""A Heywood case of ordinal items gets one verdict from every command that fits it: the estimates, not admissible, the
negative residual variance shown first (re-check s17, finding 1; before, compare, a fit with groups and invariance
said "the estimates grow without bound ... no estimate or test can be given" of a model fit estimated).

With residual variances held at 1 (thresholds as parameters; Wu & Estabrook 2016), an item whose correlations ask for
a negative residual variance in the correlation metric has loadings and factor variances that grow without bound: that
metric cannot reach the solution, only approach it.  Where the residual variance at 1 only sets the latent response's
scale, the latent response at variance 1 (the correlation metric of a one-group fit; Muthén & Asparouhov 2002) is the
same model, and there the minimum is a point the search reaches.  The data are simulated here (seed 1): two factors of
three items, x1 correlating .8 with x2 and x3 while x2 and x3 correlate .5 (.8 * .8 / .5 = 1.28 > 1: one factor
explaining them asks for a loading of x1 above 1, by the one-factor identity r12 r13 / r23 = lambda1^2 of three
indicators, Bollen 1989, ch. 7), cut into five categories."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest
from scipy.optimize import minimize

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.cli import main
from cfa_tool.data.polychoric import ordinal_moments
from tests.heywood_data import ITEMS, heywood_draws

MODEL = "factor a: x1, x2, x3\nfactor b: y1, y2, y3\n"


@pytest.fixture(scope="module")
def answers() -> pd.DataFrame:
    rng = np.random.default_rng(1)
    frame = pd.DataFrame(np.digitize(heywood_draws(rng), [-1.5, -.5, .5, 1.5]) + 1, columns=ITEMS)
    frame["g"] = np.where(rng.random(400) < .5, "a", "b")
    return frame


def _residual(result, item: str, group: str | None = None) -> float:
    return next(r.estimate for r in result.estimates
                if r.kind == "residual_variance" and r.variables == (item,) and r.group == group)


def _independent_minimum(frame: pd.DataFrame) -> tuple[float, float]:
    """The diagonally weighted least-squares problem of Muthén, du Toit & Spisic (1997) in the correlation metric,
    written from the formulas alone: the 15 polychoric correlations r, weights 1 / diag(Gamma), model correlations
    (L Phi L')_ij of two factors with markers x1 and y1 (no residual variance enters a correlation below the
    diagonal), minimised by scipy.optimize.minimize (BFGS) without bounds.  Returns (N F at the minimum, x1's
    residual variance 1 - Phi_aa)."""
    moments = ordinal_moments(frame[ITEMS], tuple(ITEMS), "simulated")
    pairs = np.tril_indices(6, -1)
    r, w = moments.correlations[pairs], 1.0 / np.diag(moments.gamma)

    def discrepancy(x):
        L = np.zeros((6, 2))
        L[[0, 1, 2], 0] = [1.0, x[0], x[1]]
        L[[3, 4, 5], 1] = [1.0, x[2], x[3]]
        phi = np.array([[x[4], x[6]], [x[6], x[5]]])
        e = r - (L @ phi @ L.T)[pairs]
        return float(e @ (w * e))

    found = minimize(discrepancy, np.array([.8, .8, .8, .8, .5, .5, .2]), method="BFGS", options={"gtol": 1e-11})
    return moments.n_obs * found.fun, 1.0 - found.x[4]


def test_one_group_fit_is_the_independent_minimum_with_the_residual_shown(answers):
    result = cfa_tool.fit(MODEL, answers, ordinal="all")
    kinds = [p.kind for p in result.problems]
    assert ProblemKind.NEGATIVE_RESIDUAL_VARIANCE in kinds and ProblemKind.UNBOUNDED_HEYWOOD not in kinds
    statistic, x1 = _independent_minimum(answers)
    assert x1 < 0  # the minimum itself asks for it: not a point on the way to infinity
    assert result.fit.chi_square == pytest.approx(statistic, rel=1e-6)
    assert _residual(result, "x1") == pytest.approx(x1, abs=1e-5)


def test_a_fit_with_groups_estimates_it_as_each_groups_own_fit_does(answers):
    both = cfa_tool.fit(MODEL, answers, ordinal="all", group="g")
    assert both.converged
    kinds = [p.kind for p in both.problems]
    assert ProblemKind.NEGATIVE_RESIDUAL_VARIANCE in kinds and ProblemKind.UNBOUNDED_HEYWOOD not in kinds
    # the configural model is each group's model on its own rows: its residual variances in the correlation metric
    # are those of the one-group fits of the same rows (Wu & Estabrook 2016: the configural model is the groups'
    # separate models)
    for label in ("a", "b"):
        alone = cfa_tool.fit(MODEL, answers[answers.g == label], ordinal="all")
        for item in ("x1", "x2", "y1"):
            std = next(r.standardized for r in both.estimates
                       if r.kind == "residual_variance" and r.variables == (item,) and r.group == label)
            assert std == pytest.approx(_residual(alone, item), abs=1e-5)
    assert min(_residual(both, "x1", label) for label in ("a", "b")) < 0
    assert any("held at variance 1" in str(w) for w in both.warnings)


def test_compare_estimates_it_as_fit_does(answers, tmp_path, capsys):
    answers.to_csv(tmp_path / "h.csv", index=False)
    (tmp_path / "hey.cfa").write_text(MODEL)
    (tmp_path / "one.cfa").write_text("factor a: x1, x2, x3, y1, y2, y3\n")
    code = main(["compare", str(tmp_path / "hey.cfa"), str(tmp_path / "one.cfa"), "--data", str(tmp_path / "h.csv"),
                 "--ordinal", "all", "--json", str(tmp_path / "c.json")])
    out = " ".join(capsys.readouterr().out.replace("┃", " ").split())
    assert code == 0
    assert "could not be estimated" not in out and "grow without bound" not in out
    assert "The solution of hey is not admissible (a negative residual variance of x1" in out
    models = json.loads((tmp_path / "c.json").read_text())["models"]
    assert ProblemKind.NEGATIVE_RESIDUAL_VARIANCE.value in [p["kind"] for p in models[0]["problems"]]
    for text, model in zip((MODEL, "factor a: x1, x2, x3, y1, y2, y3\n"), models):
        alone = cfa_tool.fit(text, answers, ordinal="all")
        assert model["fit"]["chi_square"] == pytest.approx(alone.fit.chi_square, rel=1e-7)
        assert model["robust"]["chi_square_scaled"] == pytest.approx(alone.robust.chi_square_scaled, rel=1e-7)
        assert model["fit"]["n_free_parameters"] == alone.fit.n_free_parameters


def test_the_ladders_differences_read_both_models_in_one_metric(answers):
    # the invariance ladder's difference test finds the general model's derivatives from the restricted model's
    # matrix entries; where one of the two holds x1's latent response at variance 1 and the other does not, they must
    # be read in the restricted model's metric.  Checked against the other route to the same statistic, the general
    # model fitted to the restricted model's implied thresholds and correlations (Bentler & Satorra 2010), which
    # reads each model in its own metric: the two agree (with the general model read in its own metric instead, the
    # first difference was 15.38 against 11.38)
    from dataclasses import replace

    from cfa_tool.data.groups import split_ordinal_moments
    from cfa_tool.language import parse_model
    from cfa_tool.pipeline.continuous import FitOptions
    from cfa_tool.pipeline.ordinal import estimate_ordinal_groups, ordinal_difference
    from cfa_tool.workflows.invariance import ORDINAL_LEVELS
    from cfa_tool.workflows.ordinal_compare import _general_at_restricted

    groups, _ = split_ordinal_moments(answers, "g", tuple(ITEMS), "simulated")
    spec = parse_model(MODEL)
    steps = [estimate_ordinal_groups(replace(spec, invariant=tuple(classes)), groups, FitOptions())
             for _, classes, _ in ORDINAL_LEVELS[:4]]
    held = [s.objective.unit_variances is not None for s in steps]
    assert held[0] and not held[1] and held[2]  # configural and metric held at variance 1, thresholds not
    for general, restricted in zip(steps, steps[1:]):
        ladder = ordinal_difference(restricted, general)
        opt, target, order = _general_at_restricted(restricted, general)
        assert opt.value < 1e-3  # reproduces them (the search of one step ends at its iteration limit, 7e-5 away)
        back = np.empty_like(order)
        back[order] = np.arange(len(order))
        columns = np.concatenate([g * len(order) + back for g in range(2)])
        route = ordinal_difference(restricted, general, target.stacked(opt.theta)[0][:, columns])
        assert ladder.df == route.df
        assert ladder.scale_shifted == pytest.approx(route.scale_shifted, rel=0.01)


def test_invariance_reports_the_steps_it_estimates_and_names_the_one_it_cannot(answers):
    # configural to scalar reach x1's negative residual variance in group b (the configural one is that of group b's
    # own fit); the strict step holds residual variances equal across groups, a constraint and not a choice of scale,
    # so it keeps residual variances of 1, whose estimates grow without bound: that step could not be estimated, said
    # so first with its reason, and the ladder stops there with the steps before it reported (before: exit 3, nothing)
    from cfa_tool.workflows.invariance import invariance

    found = invariance(MODEL, answers, "g", ordinal="all")
    levels = [s.level for s in found.steps]
    assert levels == ["configural", "thresholds", "metric", "scalar", "strict"]
    configural = found.steps[0].result
    alone = cfa_tool.fit(MODEL, answers[answers.g == "b"], ordinal="all")
    std = next(r.standardized for r in configural.estimates
               if r.kind == "residual_variance" and r.variables == ("x1",) and r.group == "b")
    assert std == pytest.approx(_residual(alone, "x1"), abs=1e-5) and std < 0
    assert all(s.result.converged for s in found.steps[:4]) and not found.steps[4].result.converged
    assert ProblemKind.UNBOUNDED_HEYWOOD in {p.kind for p in found.steps[4].result.problems}
    # the configural model's impossible solution first (re-check s18), then the step that could not be estimated
    assert str(found.warnings[0]).startswith("the configural model's solution is not admissible")
    first = next(str(w) for w in found.warnings if str(w).startswith("the strict model"))
    assert first.startswith("the strict model could not be estimated: the solution is not admissible")
    assert "Heywood" in first and "did not converge" not in first


def test_scoring_reads_a_held_latent_response_in_its_metric(answers):
    # a latent response held at variance 1 scores with the residual variance the fit reports (1 minus its common
    # variance), not the 1 its table fixes: the scoring model's latent response has variance 1 (the diagonal of
    # Sigma = L Phi L' + Theta); group a, where x1's residual variance stays positive (group b's is negative, which
    # scoring refuses)
    from cfa_tool.data.groups import split_ordinal_moments
    from cfa_tool.language import parse_model
    from cfa_tool.pipeline.continuous import FitOptions
    from cfa_tool.pipeline.ordinal import estimate_ordinal_groups
    from cfa_tool.scoring.model import group_ordinal_model

    groups, _ = split_ordinal_moments(answers, "g", tuple(ITEMS), "simulated")
    est = estimate_ordinal_groups(parse_model(MODEL), groups, FitOptions())
    held = est.objective.unit_variances
    assert held is not None and held[0][0]  # x1 in group a
    base = group_ordinal_model(est.model, est.theta, 0, "a", groups[0][1].categories, held[0]).base
    variance = np.diag(base.loadings @ base.factor_covariance @ base.loadings.T + base.residual_covariance)
    assert variance[0] == pytest.approx(1.0)
    reported = est.objective.unit_variance_matrices(est.theta, 0).T[0, 0]
    assert base.residual_covariance[0, 0] == pytest.approx(reported) and 0 < reported < 1


def test_a_saved_fit_with_held_latent_responses_is_read_in_its_metric(answers):
    # the saved estimates of a fit with groups carry x1's residual variances as 1 minus its common variance where the
    # fit held its latent response at variance 1: read back on the model, they are that fit (not "another scale"),
    # and the latent responses are held again; a residual variance that is neither 1 nor that is another model's
    from cfa_tool.errors import EstimationError, OptionError
    from cfa_tool.language import parse_model
    from cfa_tool.model.saved_estimates import saved_rows
    from cfa_tool.workflows.factor_scores import ordinal_models_of_estimates

    both = cfa_tool.fit(MODEL, answers, ordinal="all", group="g")
    rows = [{"kind": r.kind, "variables": list(r.variables), "group": r.group, "estimate": r.estimate}
            for r in both.estimates]
    labels = ("a", "b")
    # read as that fit: group b's x1 then has its negative residual variance, which scoring refuses (with the 1 of
    # the table it would have scored without a word)
    with pytest.raises(EstimationError, match="residual variance of zero or less"):
        ordinal_models_of_estimates(parse_model(MODEL), saved_rows(rows, "f.json"), both.data, labels, "f.json")
    at = next(i for i, r in enumerate(rows) if r["kind"] == "residual_variance" and r["variables"] == ["x1"]
              and r["group"] == "a")
    rows[at]["estimate"] += 0.05
    with pytest.raises(OptionError, match="is not of the model"):
        ordinal_models_of_estimates(parse_model(MODEL), saved_rows(rows, "f.json"), both.data, labels, "f.json")
