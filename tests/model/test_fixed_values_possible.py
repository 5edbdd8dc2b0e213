"""A fit refuses, at the statement, fixed values that no population has (hostile tester s15, 05): fixed factor
correlations .95, .95 and -.50 were "valid" to check and failed to start in fit (exit 3, no line named); a fixed
covariance of 1.3 between factors of variance 1 ran, and its box called the user's own value a finding.  Correlations
fixed at 1 (factors merged, as a test of their distinctness does) stay possible: a singular matrix, not an impossible
one.  Check values: a covariance matrix is positive semi-definite, so every correlation lies within +/-1 and so do
the principal submatrices (Horn & Johnson 2013, Observation 7.1.2); the matrix of .95, .95 and -.50 has the
determinant 1 - (.95^2 + .95^2 + .50^2) + 2(.95)(.95)(-.50) = 1 - 2.055 - 0.9025 = -1.96 < 0 (by hand)."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.errors import ModelError
from tests.conftest import holzinger_swineford

THREE = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\nscale latent by variance\n"


def test_impossible_fixed_correlations_are_refused_at_fit():
    data = holzinger_swineford()
    text = (THREE + "fix covariance(visual, textual) = 0.95\nfix covariance(visual, speed) = 0.95\n"
            "fix covariance(textual, speed) = -0.5\n")
    assert np.linalg.det(np.array([[1, .95, .95], [.95, 1, -.5], [.95, -.5, 1]])) < 0
    with pytest.raises(ModelError, match=r"cannot hold together \(their matrix is not positive semi-definite\)") as npd:
        cfa_tool.fit(text, data)
    assert npd.value.location.line == 5  # the first statement of the set (re-check s15, R8: no line was named)
    with pytest.raises(ModelError, match=r"covariance\(visual, textual\) is fixed at 1.3, beyond") as raised:
        cfa_tool.fit(THREE + "fix covariance(visual, textual) = 1.3\n", data)
    assert raised.value.location.line == 5  # the statement's line


def test_correlations_fixed_at_one_still_fit():
    text = (THREE + "fix covariance(visual, textual) = 1\nfix covariance(visual, speed) = 1\n"
            "fix covariance(textual, speed) = 1\n")
    result = cfa_tool.fit(text, holzinger_swineford())
    assert result.converged and result.fit.df == 27  # 45 moments, 18 free parameters (9 loadings, 9 residuals)
