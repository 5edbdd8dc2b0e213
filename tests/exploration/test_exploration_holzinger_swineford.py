"""Exploratory factor analysis of Holzinger & Swineford (1939), x1..x9, N = 301, against the confirmatory fits.

* One factor: exploratory maximum likelihood is the one-factor confirmatory model, chi-square
  312.264 on 27 df (recalled from memory of widely published analyses; also asserted in
  tests/pipeline/test_holzinger_swineford_published.py), with the same log-likelihood, BIC, RMSEA and
  standardized loadings as ``cfa_tool.fit``.
* Three factors: an m-factor exploratory solution equals the confirmatory model in which m - 1
  items per factor ("anchors") have zero loadings on the other factors and the factor variances
  are 1, which has the same degrees of freedom and fit (Joreskog 1969).  Target rotation aimed at
  those zeros reaches them exactly, so its pattern and factor correlations are that model's
  standardized loadings and factor correlations.  The confirmatory fit starts from the
  exploratory values rounded to two decimals (from the default starts this nearly unidentified
  model stops at a saddle) and finds the minimum on its own.
"""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.data.moments import sample_moments
from cfa_tool.exploration import (ExploreSettings, Placement, RotationMethod, RotationSpec, explore_correlations,
                                  extract, from_sample_moments)
from tests.conftest import ONE_FACTOR

ITEMS = tuple(f"x{i}" for i in range(1, 10))

@pytest.fixture(autouse=True)
def _one_blas_thread():
    """Small matrices compute with one BLAS thread, as the tool does (cfa_tool.numerics.threads.blas_threads_for)."""
    from cfa_tool.numerics.threads import blas_threads_for

    with blas_threads_for(1):
        yield


@pytest.fixture(scope="module")
def hs_input(hs_data):
    return from_sample_moments(sample_moments(hs_data, ITEMS, "hs"))


def test_one_factor_equals_the_confirmatory_fit(hs_data, hs_input):
    ours = extract(hs_input, 1)
    assert ours.fit.chi_square == pytest.approx(312.264, abs=5e-4)  # recalled from memory
    assert ours.fit.df == 27
    cfa = cfa_tool.fit(ONE_FACTOR, hs_data)
    assert ours.fit.chi_square == pytest.approx(cfa.fit.chi_square, rel=1e-7)
    assert ours.fit.log_likelihood == pytest.approx(cfa.fit.log_likelihood, rel=1e-8)
    assert ours.fit.bic == pytest.approx(cfa.fit.bic, rel=1e-8)
    assert ours.fit.rmsea == pytest.approx(cfa.fit.rmsea, rel=1e-6)
    np.testing.assert_allclose(ours.fit.rmsea_ci90, cfa.fit.rmsea_ci90, rtol=1e-5)
    assert ours.fit.srmr == pytest.approx(cfa.fit.srmr, rel=1e-5)
    standardized = {r.variables[1]: r.standardized for r in cfa.estimates if r.kind == "loading"}
    np.testing.assert_allclose(ours.loadings[:, 0], [standardized[x] for x in ITEMS], atol=1e-5)


def test_three_factors_equal_the_confirmatory_model_with_anchor_items(hs_data, hs_input):
    anchors = {0: (3, 6), 1: (0, 6), 2: (0, 3)}  # visual: x4, x7 zero; textual: x1, x7; speed: x1, x4
    target = np.full((9, 3), np.nan)
    for k, rows in anchors.items():
        target[list(rows), k] = 0.0
    found = explore_correlations(hs_input, ExploreSettings(factors=3, rotation=RotationSpec(RotationMethod.TARGET,
                                                                                            target=target)))
    P, Phi = found.rotated.pattern, found.rotated.factor_correlations
    assert found.rotated.criterion_value < 1e-12
    names = ("visual", "textual", "speed")
    sd = np.sqrt(np.diag(np.cov(hs_data[list(ITEMS)].to_numpy(float).T, bias=True)))
    lines = [f"factor {f}: x1..x9" for f in names]
    lines.append("fix " + ", ".join(f"loading({names[k]}, x{i + 1})" for k, rows in anchors.items() for i in rows) + " = 0")
    lines.append("fix " + ", ".join(f"variance({f})" for f in names) + " = 1")
    lines += [f"start loading({names[k]}, x{i + 1}) = {P[i, k] * sd[i]:.2f}"
              for i in range(9) for k in range(3) if i not in anchors[k]]
    cfa = cfa_tool.fit("\n".join(lines) + "\n", hs_data)
    assert cfa.converged
    assert cfa.fit.df == found.solution.fit.df == 12
    assert found.solution.fit.chi_square == pytest.approx(cfa.fit.chi_square, rel=1e-6)
    loadings = {r.variables: r.standardized for r in cfa.estimates if r.kind == "loading"}
    expected = np.array([[loadings[(f, x)] for f in names] for x in ITEMS])
    np.testing.assert_allclose(P, expected, atol=1e-4)
    correlations = {r.variables: r.standardized for r in cfa.estimates if r.kind == "factor_covariance"}
    for (a, b), value in correlations.items():
        assert Phi[names.index(a), names.index(b)] == pytest.approx(value, abs=1e-4)


def test_draft_model_is_ready_for_a_confirmatory_fit(hs_data, hs_input):
    found = explore_correlations(hs_input, ExploreSettings(replications=50, seed=3))
    assert found.count is not None and found.factors == found.count.recommended
    result = cfa_tool.fit(found.draft.text, hs_data)
    assert result.converged
    placed = {p.item for p in found.draft.placements
              if p.placement is Placement.ON_FACTOR and found.draft.written[p.factor]}
    assert set(result.observed) == placed
    assert set(result.latent) == {name for name, w in zip(found.draft.factor_names, found.draft.written) if w}
    # x9 loads on both the visual and the speed factor: the best-known cross-loading of these data
    # (recalled from memory; the largest modification index in test_holzinger_swineford_published.py)
    x9 = next(p for p in found.draft.placements if p.item == "x9")
    assert x9.placement is Placement.SEVERAL_LOADINGS
    lines = found.draft.text.splitlines()
    assert any(line.startswith("#") and "x9" in line for line in lines)
    assert not any("x9" in line for line in lines if not line.startswith("#"))
    # with x9 undecided the speed factor keeps two items (x7, x8): left as a comment, since a factor of two items
    # often fails as inadmissible on new data (exploration.draft)
    speed = [p for p in found.draft.placements if p.item in ("x7", "x8")]
    assert all(p.placement is Placement.ON_FACTOR and not found.draft.written[p.factor] for p in speed)
    assert any(line.startswith("#") and "fewer than 3" in line for line in lines)


def test_explore_on_too_few_rows_says_so_first(hs_data):
    """Hostile tester s11 case 03: explore wrote a 3-factor solution of 12 items on 15 rows without a word on the
    sample size.  The rule is fit's (assessment.admissibility.sample_size_problems: fewer rows than free parameters a
    caution, fewer than 5 per parameter a note; a rule of thumb, Bentler & Chou 1987, recalled from memory).  The free
    parameters of an exploratory model: 9 items and 3 factors leave 12 degrees of freedom of 45 moments (Lawley &
    Maxwell 1971, ((p - m)^2 - (p + m)) / 2), so 33; one factor leaves 27 df (the published one-factor chi-square's,
    recalled from memory above), so 18."""
    from cfa_tool.workflows.explore import exploratory_parameters

    assert exploratory_parameters(9, 3) == 45 - ((9 - 3) ** 2 - (9 + 3)) // 2 == 33
    assert exploratory_parameters(9, 1) == 45 - 27 == 18
    few = cfa_tool.explore(hs_data[list(ITEMS)].iloc[:15], factors=3)
    assert few.exploration.data.n_obs == 15
    assert few.problems()[0].startswith("15 rows for the 33 free parameters of the model"), few.problems()
    assert "Bentler & Chou 1987" in few.problems()[0] and "a convention, not a law" in few.problems()[0]
    some = cfa_tool.explore(hs_data[list(ITEMS)].iloc[:60], factors=3)  # 60 rows: at least 33, fewer than 5 * 33
    assert not any("free parameters" in p for p in some.problems())
    assert any(str(n).startswith("60 rows for the 33 free parameters of the model, fewer than 5 per parameter")
               for n in some.notes), some.notes
    full = cfa_tool.explore(hs_data[list(ITEMS)], factors=3)  # 301 rows: more than 5 * 33
    assert not any("free parameters" in p for p in full.problems() + list(full.notes))
