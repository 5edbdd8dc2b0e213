"""Fisher scoring with a backtracking line search and simple bounds.

Scoring uses the expected information as the Hessian (Lee & Jennrich 1979);
parameters at a bound with the gradient pointing outwards are held there
(a projected Newton step, Bertsekas 1982).  If scoring stalls, a quasi-Newton
method (L-BFGS-B) with the analytic gradient continues from the best point.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

import numpy as np
from scipy.optimize import minimize

from cfa_tool.estimation.ml import Evaluation


@dataclass(frozen=True)
class OptimizerResult:
    theta: np.ndarray
    value: float
    gradient: np.ndarray
    iterations: int
    converged: bool
    message: str


def minimise(
    evaluate: Callable[[np.ndarray], Evaluation | None],
    value: Callable[[np.ndarray], float],
    start: np.ndarray,
    lower: np.ndarray,
    upper: np.ndarray,
    max_iterations: int = 500,
    tolerance: float = 1e-9,
) -> OptimizerResult:
    theta = np.clip(np.asarray(start, dtype=float), lower, upper)
    current = evaluate(theta)
    if current is None:
        return OptimizerResult(theta, np.inf, np.full_like(theta, np.nan), 0, False,
                               "the starting values imply a covariance matrix that is not positive definite")
    iterations = 0
    for iterations in range(1, max_iterations + 1):
        g = current.gradient
        at_lower = (theta <= lower) & (g > 0)
        at_upper = (theta >= upper) & (g < 0)
        active = at_lower | at_upper
        projected = np.where(active, 0.0, g)
        if np.max(np.abs(projected), initial=0.0) < tolerance:
            return OptimizerResult(theta, current.value, g, iterations - 1, True, "converged")
        step = np.zeros_like(theta)
        inactive = ~active
        H = current.information[np.ix_(inactive, inactive)]
        try:
            step[inactive] = -np.linalg.solve(H + 1e-10 * np.eye(len(H)) * max(1.0, np.trace(H) / max(len(H), 1)), g[inactive])
        except np.linalg.LinAlgError:
            step[inactive] = -g[inactive]
        if not np.all(np.isfinite(step)):
            break
        slope = float(g @ step)
        if slope >= 0:  # not a descent direction: fall back to steepest descent
            step = -projected
            slope = float(g @ step)
        t = 1.0
        accepted = False
        for _ in range(40):
            trial = np.clip(theta + t * step, lower, upper)
            f = value(trial)
            if np.isfinite(f) and f <= current.value + 1e-4 * t * slope:
                accepted = True
                break
            t *= 0.5
        if not accepted:
            break
        new = evaluate(trial)
        if new is None:
            break
        small_change = abs(current.value - new.value) <= 1e-15 * max(1.0, abs(new.value))
        theta, current = trial, new
        if small_change and np.max(np.abs(np.where(active, 0.0, new.gradient)), initial=0.0) < 1e-6:
            return OptimizerResult(theta, current.value, current.gradient, iterations, True, "converged")
    return _quasi_newton(evaluate, value, theta, current, lower, upper, iterations, max_iterations)


def _quasi_newton(evaluate, value, theta, current, lower, upper, iterations, max_iterations) -> OptimizerResult:
    def fun(x):
        ev = evaluate(x)
        if ev is None:
            return 1e10, np.zeros_like(x)
        return ev.value, ev.gradient

    bounds = [(None if not np.isfinite(lo) else lo, None if not np.isfinite(hi) else hi) for lo, hi in zip(lower, upper)]
    res = minimize(fun, theta, jac=True, method="L-BFGS-B", bounds=bounds,
                   options={"maxiter": 5 * max_iterations, "gtol": 1e-8, "ftol": 1e-15})
    final = evaluate(res.x)
    if final is None:
        return OptimizerResult(theta, current.value, current.gradient, iterations, False,
                               "the estimates left the region where the implied covariance matrix is positive definite")
    g = final.gradient
    projected = np.where(((res.x <= lower) & (g > 0)) | ((res.x >= upper) & (g < 0)), 0.0, g)
    converged = bool(np.max(np.abs(projected), initial=0.0) < 1e-5)
    message = "converged" if converged else f"no convergence after {iterations + res.nit} iterations"
    return OptimizerResult(res.x, final.value, g, iterations + int(res.nit), converged, message)
