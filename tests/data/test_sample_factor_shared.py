"""The sample covariance matrix factorised once: the checks of the moments (data.moments) make its Cholesky factor,
and the complete-data likelihood reads that one (numerics.linalg.sample_factor_of) for log|S| and the whitened rows,
never a stale one for moments replaced by others.  The factor itself is checked against numpy's Cholesky
decomposition (L L' = S, the definition: Golub & Van Loan 2013, sec. 4.2)."""

from dataclasses import replace

import numpy as np
import pandas as pd
import pytest

from cfa_tool.data.moments import sample_moments
from cfa_tool.errors import DataError
from cfa_tool.estimation.ml import NormalLikelihood
from cfa_tool.language.parser import parse_model
from cfa_tool.pipeline.continuous import model_structure, ordered_moments


def _rows(seed: int = 4, n: int = 300) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    trait = rng.normal(size=(n, 1))
    return pd.DataFrame(trait + rng.normal(scale=0.8, size=(n, 4)), columns=["a", "b", "c", "d"])


def _likelihood(moments):
    spec = parse_model("factor f: a, b, c, d\n")
    _, model = model_structure(spec, None, False)
    return NormalLikelihood(model, [ordered_moments(moments, ("a", "b", "c", "d"))])


def test_the_likelihood_reads_the_factor_the_checks_made():
    moments = sample_moments(_rows(), ("a", "b", "c", "d"), "invented.csv")
    S, L, log_det = moments.factor
    assert S is moments.covariance
    np.testing.assert_allclose(L, np.linalg.cholesky(S), rtol=1e-13, atol=0)  # numpy's decomposition
    assert log_det == pytest.approx(np.linalg.slogdet(S)[1], rel=1e-13)
    likelihood = _likelihood(moments)
    assert likelihood.sample_factors[0][0] is L and likelihood.logdet_S[0] == log_det  # the one factorisation


def test_moments_replaced_by_others_are_factorised_anew():
    moments = sample_moments(_rows(), ("a", "b", "c", "d"), "invented.csv")
    other = sample_moments(_rows(seed=9), ("a", "b", "c", "d"), "invented.csv")
    swapped = replace(moments, covariance=other.covariance)  # the checks' factor is of another matrix now
    likelihood = _likelihood(swapped)
    assert likelihood.sample_factors[0][0] is not moments.factor[1]
    np.testing.assert_allclose(likelihood.sample_factors[0][0], np.linalg.cholesky(other.covariance), rtol=1e-13)


def test_an_exact_combination_is_still_named():
    data = _rows()
    data["d"] = data["a"] + data["b"]  # invented: d the sum of two others in every row
    with pytest.raises(DataError, match="exact linear combinations of each other"):
        sample_moments(data, ("a", "b", "c", "d"), "invented.csv")
