"""The replicated solutions of a bootstrap, a power simulation or simulated cutoffs are judged by the rule a single fit
is judged by (assessment.admissibility.solution_problems); a stacked screen clears, all at once, the rows that rule
can find nothing in, and only the others are judged one at a time.  The screen must never clear a row the rule
would name a problem in: checked here on thousands of perturbed solutions of models with residual covariances, a
cross-loading, a bound and two groups, each row's words compared with the rule applied row by row, and every
cleared row checked against scipy's eigenvalues (an implementation the package does not use for this)."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import linalg

import cfa_tool
from cfa_tool.assessment.admissibility import (could_have_problems, inadmissible_words, replicated_problems,
                                               solution_problems)
from cfa_tool.pipeline.inputs import read_inputs_with_notes
from cfa_tool.pipeline.continuous import model_structure

PLAIN = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
MODELS = {
    "three factors": PLAIN,
    "residual covariances (a Heywood case at the estimates)": PLAIN + "covary x7, x8\ncovary x8, x9\n",
    "a cross-loading": PLAIN.replace("x7, x8, x9", "x7, x8, x9, x1"),
    "a bound": PLAIN + "bound loading(visual, x2) <= 0.3\n",
    "one factor": "factor g: x1, x2, x3, x4, x5, x6\n",
}


def _one_at_a_time(table, model, thetas, standardized_loadings=True):
    """The rule of a single fit applied to each row (what replicated_problems did before the screen)."""
    out = []
    for theta in thetas:
        mats = [model.matrices(theta, g) for g in range(table.n_groups)]
        with np.errstate(all="ignore"):
            out.append(inadmissible_words(solution_problems(table, mats, theta, None, True, "", 0, standardized_loadings)))
    return tuple(out)


def _perturbed(theta: np.ndarray, seed: int) -> np.ndarray:
    """2,000 solutions around ``theta``: small and large relative changes, so that some rows leave the admissible
    region (negative variances, correlations beyond one, standardized loadings above one) and most do not."""
    rng = np.random.default_rng(seed)
    scales = np.repeat([0.05, 0.2, 0.5, 1.0], 500)[:, None]
    out = theta * (1 + scales * rng.standard_normal((2000, len(theta))))
    out[:10] = theta  # the estimates themselves
    out[10, 0] = np.nan  # a row that is not finite
    return out


@pytest.mark.parametrize("name", sorted(MODELS))
def test_the_screen_clears_only_rows_the_single_fit_rule_finds_nothing_in(name, hs_data):
    text = MODELS[name]
    result = cfa_tool.fit(text, hs_data)
    spec, _, _ = read_inputs_with_notes(text, hs_data, None, (), ())
    table, model = model_structure(spec, None, False)
    thetas = _perturbed(result.theta, seed=len(name))
    expected = _one_at_a_time(table, model, thetas)
    assert replicated_problems(table, model, thetas) == expected
    assert replicated_problems(table, model, thetas, standardized_loadings=False) == _one_at_a_time(
        table, model, thetas, standardized_loadings=False)
    flagged = could_have_problems(table, model, thetas)
    assert not any(expected[r] for r in np.flatnonzero(~flagged))
    # floors of this test's own design (not outside values): the perturbations must put problems in some rows,
    # and around admissible estimates a screen that cleared almost nothing would save nothing
    assert sum(1 for words in expected if words) > 20  # the perturbed rows do hold problems
    if not expected[0]:  # estimates that are admissible: the screen clears many rows around them
        assert np.mean(~flagged) > 0.3
    for theta in thetas[~flagged][:200]:  # cleared rows are positive definite by an outside computation
        mats = model.matrices(theta)
        phi = mats.latent_covariance()
        assert (np.diag(mats.T) > 0).all() and linalg.eigvalsh(phi)[0] > 0 and linalg.eigvalsh(mats.T)[0] > 0


def test_the_screen_judges_each_group_of_a_model_of_two(hs_data):
    result = cfa_tool.fit(PLAIN, hs_data, group="school")
    spec, _, _ = read_inputs_with_notes(PLAIN, hs_data, None, (), ())
    table, model = model_structure(spec, result.groups, True)
    assert table.n_groups == 2 and table.n_free == len(result.theta)
    thetas = _perturbed(result.theta, seed=5)
    expected = _one_at_a_time(table, model, thetas)
    assert replicated_problems(table, model, thetas) == expected
    assert any(" in group " in w for words in expected for w in words)


def test_the_bootstrap_counts_the_same_inadmissible_resamples(hs_data, monkeypatch):
    # a model whose estimates lie at a Heywood case: most of its resamples are not admissible; they are counted and
    # named as when every resample is judged one at a time: the converged resamples the bootstrap judged (recorded
    # as it judges them) judged again with the screen made to flag every row give each resample the same words, and
    # the bootstrap's count is that of the resamples with words
    from cfa_tool.assessment import admissibility
    from cfa_tool.workflows import bootstrap as bootstrap_workflow

    text = MODELS["residual covariances (a Heywood case at the estimates)"]
    judged = []

    def recorded(table, model, thetas, *args):
        found = replicated_problems(table, model, thetas, *args)
        judged.append((table, model, np.array(thetas), args, found))
        return found

    monkeypatch.setattr(bootstrap_workflow, "replicated_problems", recorded)
    screened = cfa_tool.bootstrap(text, hs_data, replications=200, seed=3, bca=False, bollen_stine=False, workers=1)
    assert judged and sum(len(thetas) for _, _, thetas, _, _ in judged) == screened.converged
    monkeypatch.setattr(admissibility, "could_have_problems", lambda table, model, thetas, *a: np.ones(len(thetas), bool))
    for table, model, thetas, args, found in judged:
        assert replicated_problems(table, model, thetas, *args) == found
    assert 0 < screened.inadmissible < screened.converged
    assert screened.inadmissible == sum(1 for *_, found in judged for words in found if words)
    assert "negative residual variance (the residual variance of x9)" in screened.inadmissible_named
