"""The information matrix's rank check decides as its definition does: singular when the smallest eigenvalue of the
matrix scaled to unit diagonal is at most 1e-9 times the largest (computed here by numpy's eigvalsh, an independent
implementation), whatever shortcut the check takes first."""

from __future__ import annotations

import numpy as np
import pytest

from cfa_tool.assessment.identification import _clearly_full_rank, check_information_rank
from cfa_tool.errors import EstimationError
from cfa_tool.numerics.linalg import scaled_factor


def _with_eigenvalues(values: np.ndarray, seed: int) -> np.ndarray:
    Q, _ = np.linalg.qr(np.random.default_rng(seed).standard_normal((len(values), len(values))))
    A = (Q * values) @ Q.T
    return 0.5 * (A + A.T)


def _singular_by_definition(A: np.ndarray) -> bool:
    s = 1.0 / np.sqrt(np.diag(A))
    vals = np.linalg.eigvalsh(A * np.outer(s, s))
    return not vals[0] > 1e-9 * max(vals[-1], 1.0)


@pytest.mark.parametrize("smallest", [1.0, 1e-3, 1e-6, 1e-8, 1e-10, 1e-12, 0.0, -1e-3])
def test_rank_check_agrees_with_the_eigenvalues(smallest):
    for seed in range(5):
        values = np.concatenate([[smallest], np.random.default_rng(seed).uniform(0.5, 20.0, 11)])
        A = _with_eigenvalues(values, seed) * np.outer(np.arange(1, 13), np.arange(1, 13))  # unequal units
        labels = tuple(f"t{k}" for k in range(12))
        if _singular_by_definition(A):
            with pytest.raises(EstimationError):
                check_information_rank(A, labels)
        else:
            check_information_rank(A, labels)


def test_shortcut_claims_full_rank_only_when_the_eigenvalues_show_it():
    rng = np.random.default_rng(3)
    claimed = 0
    for trial in range(200):
        q = int(rng.integers(2, 40))
        values = np.exp(rng.uniform(np.log(1e-11), np.log(10.0), q))
        A = _with_eigenvalues(values, trial)
        s = 1.0 / np.sqrt(np.diag(A))
        N = A * np.outer(s, s)
        if _clearly_full_rank(scaled_factor(A)):  # the factor of A scaled to unit diagonal, N
            vals = np.linalg.eigvalsh(N)
            assert vals[0] > 1e-9 * max(vals[-1], 1.0)
            claimed += 1
    assert 10 < claimed < 190  # both answers occur among these matrices
