"""The one interface every estimator's discrepancy function implements.

An objective is a discrepancy F(theta) >= 0 between the data's statistics and those a model implies,
zero when the model reproduces them, summed over groups with weights N_g / N so that N F is the test
statistic.  Implemented by complete-data maximum likelihood (:mod:`cfa_tool.estimation.ml`),
full-information maximum likelihood (:mod:`cfa_tool.estimation.fiml`) and least squares for ordinal
items, one group or several (:mod:`cfa_tool.estimation.least_squares`).  The optimiser and the
search strategy use nothing else; ``tests/estimation/test_objective_contract.py`` checks every
implementation against this contract.
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import Enum
from typing import Protocol, runtime_checkable

import numpy as np

from cfa_tool.model.implied import StructuredModel


@dataclass(frozen=True)
class Evaluation:
    """An objective's value, gradient and expected information at one point."""
    value: float
    gradient: np.ndarray
    information: np.ndarray  # expected second derivatives of F (scoring's Hessian), symmetric positive semi-definite


class ScoreRoute(Enum):
    """How an objective gives the score tests (assessment.modification.score_tests) their candidates' scores and
    information."""

    #: from rank-two gathers, chunk by chunk (the objective's ``candidate_scores``; model/rank_two.py)
    RANK_TWO = "rank-two gathers"
    #: from the general (q, p, p) derivatives of the implied moments and the objective's information
    GENERAL = "general derivatives"


@runtime_checkable
class Objective(Protocol):
    model: StructuredModel
    score_route: ScoreRoute  # which route the score tests take with this objective
    n_total: int  # N, the rows over all groups
    weights: list[float]  # each group's share N_g / N
    n_statistics: int  # sample statistics the model reproduces (degrees of freedom = this - free parameters)

    def value(self, theta: np.ndarray) -> float:
        """F at theta (infinite where the model's implied moments are impossible)."""

    def group_discrepancy(self, theta: np.ndarray, g: int) -> float:
        """Group g's own F_g (F = sum_g weights[g] F_g)."""

    def evaluate(self, theta: np.ndarray) -> Evaluation | None:
        """Value, gradient and expected information (None outside the region where F is defined)."""

    def gradient(self, theta: np.ndarray) -> np.ndarray:
        """The gradient alone (cheaper than :meth:`evaluate` where the objective allows)."""

    def observed_hessian(self, theta: np.ndarray) -> np.ndarray | None:
        """Second derivatives of F in closed form, or None where the objective has no closed form."""
