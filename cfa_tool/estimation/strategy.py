"""How an estimation proceeds, for every estimator.

1. The optimiser (:func:`cfa_tool.estimation.optimizer.minimise`) runs from the start values.
2. If it fails and some factor takes its scale from a marker or from effects coding, the same
   model with every such factor scaled by its variance instead (an equivalent parameterisation
   with the same minimum, :mod:`cfa_tool.model.rescale`) is estimated from its own start values.
   Under variance scaling a loading can change sign freely; under marker scaling the factor must
   first shrink to nothing, which a search from the wrong side cannot do.
3. Its solution is turned back into the original scaling and the optimiser runs there once more
   to confirm the minimum (usually one or two Newton steps).

All three share the iteration limit in force.  The first search leaves a quarter of the limit for
the other two and ends early when it stalls, since the restart is the better use of the time; if
the restart fails too, the first search continues with whatever is left of the limit.
"""

from __future__ import annotations

from dataclasses import dataclass
from dataclasses import replace as dc_replace
from enum import Enum
from typing import Callable

import numpy as np

from cfa_tool.estimation.objective import Objective
from cfa_tool.estimation.optimizer import OptimizerResult, Outcome, minimise
from cfa_tool.model.implied import StructuredModel
from cfa_tool.model.parameters import ParameterTable
from cfa_tool.model.rescale import Unscalable, convert, same_entries


@dataclass(frozen=True)
class Alternative:
    """The equivalent variance-scaled problem: its table, model, objective and start values."""

    table: ParameterTable
    model: StructuredModel
    objective: Objective
    start: np.ndarray


class Restart(Enum):
    """What the restart from the variance-scaled problem did."""

    NOT_TRIED = "not tried"  # not needed, not possible (no marker or effects scaling), or no iterations left
    CONVERGED = "converged"  # and the result was turned back and confirmed
    FAILED = "failed"  # the variance-scaled search did not converge either
    UNSCALABLE = "unscalable"  # it converged, but a marker's loading (or an effects-coded sum) is about zero there
    NOT_CONFIRMED = "not confirmed"  # it converged, but the search in the original scaling did not


@dataclass(frozen=True)
class Search:
    """The end of an estimation: the optimiser's result in the model's own scaling (on failure, that of
    the last search in that scaling), with the iterations of all searches, and what the restart did."""

    result: OptimizerResult
    restart: Restart = Restart.NOT_TRIED
    unscalable: Unscalable | None = None

    @property
    def converged(self) -> bool:
        return self.result.converged


def search(objective: Objective, table: ParameterTable, start: np.ndarray, max_iterations: int,
           alternative: Callable[[], Alternative | None] | None = None) -> Search:
    """Minimise ``objective`` over ``table``'s parameters from ``start`` (steps 1-3 of the module docstring;
    ``alternative`` builds the variance-scaled problem when it is needed, or gives None when there is none)."""
    if not table.scaled_by_loadings:
        alternative = None
    first_limit = max_iterations if alternative is None else max(1, max_iterations - max_iterations // 4)
    first = _minimise(objective, table, start, first_limit, stop_when_stalled=alternative is not None)
    if first.converged or alternative is None:
        return Search(first)
    used = first.iterations
    alt = alternative() if used < max_iterations else None
    if alt is None or not same_entries(table, alt.table):
        if used >= max_iterations:
            return Search(first)
        # nothing to restart from: the first search continues with what is left of the limit
        more = _minimise(objective, table, first.theta, max_iterations - used)
        return Search(dc_replace(more, iterations=used + more.iterations))
    second = _minimise(alt.objective, alt.table, alt.start, max_iterations - used)
    used += second.iterations
    if second.converged:
        back = convert(table, alt.model, second.theta)
        if isinstance(back, Unscalable):
            return Search(dc_replace(first, iterations=used), Restart.UNSCALABLE, back)
        if used < max_iterations:
            third = _minimise(objective, table, back, max_iterations - used)
            used += third.iterations
            if third.converged:
                return Search(dc_replace(third, iterations=used), Restart.CONVERGED)
        return Search(dc_replace(first, iterations=used), Restart.NOT_CONFIRMED)
    final = first
    if first.outcome is Outcome.ITERATION_LIMIT and used < max_iterations:
        # the first search was cut short to leave room for the restart: it gets the iterations left
        final = _minimise(objective, table, first.theta, max_iterations - used)
        used += final.iterations
        if final.converged:
            return Search(dc_replace(final, iterations=used))
    return Search(dc_replace(final, iterations=used), Restart.FAILED)


def _minimise(objective: Objective, table: ParameterTable, start: np.ndarray, limit: int,
              stop_when_stalled: bool = False) -> OptimizerResult:
    return minimise(objective.evaluate, objective.value, start, table.lower, table.upper, limit,
                    gradient=objective.gradient, hessian=objective.observed_hessian, stop_when_stalled=stop_when_stalled)
