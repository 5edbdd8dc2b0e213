"""Fisher scoring with a backtracking line search and simple bounds.

Scoring uses the expected information as the Hessian (Lee & Jennrich 1979);
it converges only linearly when the model does not fit, so near the minimum
the steps switch to Newton's method with the observed Hessian (differences
of the analytic gradient), which converges quadratically.  Parameters at a
bound with the gradient pointing outwards are held there (a projected Newton
step, Bertsekas 1982).  If this stalls, a quasi-Newton method (L-BFGS-B) with
the analytic gradient continues from the best point.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

import numpy as np

from cfa_tool.estimation.linalg import difference_hessian, scaled_solve
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
    tolerance: float = 1e-14,
    gradient: Callable[[np.ndarray], np.ndarray] | None = None,
    newton_below: float = 1e-4,
    hessian: Callable[[np.ndarray], np.ndarray | None] | None = None,
) -> OptimizerResult:
    theta = np.clip(np.asarray(start, dtype=float), lower, upper)
    current = evaluate(theta)
    if current is None:
        return OptimizerResult(theta, np.inf, np.full_like(theta, np.nan), 0, False,
                               "the starting values imply a covariance matrix that is not positive definite")
    iterations = 0
    previous_decrement = np.inf
    hessian_usable = None
    bounded = bool(np.isfinite(lower).any() or np.isfinite(upper).any())
    unbounded = np.zeros(len(theta), dtype=bool), np.ones(len(theta), dtype=bool), np.arange(len(theta))

    def closed_form_hessian(theta, free_all, idx):
        """The closed-form Hessian over the free parameters, or None (a likelihood without one says so once)."""
        nonlocal hessian_usable
        full = hessian(theta)
        hessian_usable = full is not None
        return None if full is None else (full if free_all else full[np.ix_(idx, idx)])

    for iterations in range(1, max_iterations + 1):
        g = current.gradient
        if bounded:
            active = ((theta <= lower) & (g > 0)) | ((theta >= upper) & (g < 0))
            inactive = ~active
            idx = np.flatnonzero(inactive)
        else:  # no bounds (the usual case): no parameter can be held at one
            active, inactive, idx = unbounded
        free_all = len(idx) == len(theta)
        newton = None
        if (hessian is not None and hessian_usable is not False
                and NEAR_MINIMUM < previous_decrement < CLOSED_FORM_NEWTON_BELOW):
            # Newton's phase: the closed-form Hessian alone gives the step and its decrement
            observed = closed_form_hessian(theta, free_all, idx)
            if observed is not None:
                newton = _newton_from(observed, theta, g, idx)
        last_step = False
        if newton is not None:
            step = newton
            decrement = float(-g @ step) if free_all else float(-g[idx] @ step[idx])
            if decrement < tolerance:
                return OptimizerResult(theta, current.value, g, iterations - 1, True, "converged")
            # Newton's decrement falls quadratically, d_next ~ d^3 / d_prev^2: when that is far below the
            # tolerance, the full step ends the search without another solve to confirm it
            last_step = free_all and decrement**3 < 1e-2 * tolerance * previous_decrement**2
            previous_decrement = decrement
        else:
            step = np.zeros_like(theta)
            try:
                if free_all:
                    step = scaled_solve(current.information, -g)
                else:
                    step[inactive] = scaled_solve(current.information[np.ix_(inactive, inactive)], -g[inactive])
            except np.linalg.LinAlgError:
                break
            if not np.isfinite(step).all():
                break
            # Newton decrement g' H^-1 g: about twice the distance to the minimum of F, whatever the units
            decrement = float(-g @ step) if free_all else float(-g[inactive] @ step[inactive])
            if decrement < tolerance:
                return OptimizerResult(theta, current.value, g, iterations - 1, True, "converged")
            # scoring converges linearly when the model misfits: then switch to Newton near the minimum;
            # with a closed-form Hessian Newton is cheap enough to take as soon as it is safe
            slow = decrement > 0.05 * previous_decrement
            previous_decrement = decrement
            observed = None
            if hessian is not None and hessian_usable is not False and decrement < CLOSED_FORM_NEWTON_BELOW:
                observed = closed_form_hessian(theta, free_all, idx)
            if observed is None and gradient is not None and decrement < newton_below and slow:
                observed = difference_hessian(gradient, theta, central=False, base=g, indices=idx)
            if observed is not None:
                newton = _newton_from(observed, theta, g, idx)
                if newton is not None:
                    step = newton
        slope = float(g @ step)
        if slope >= 0:  # not a descent direction: fall back to steepest descent
            step = -np.where(active, 0.0, g)
            slope = float(g @ step)
        t = 1.0
        accepted = False
        for _ in range(40):
            trial = np.minimum(np.maximum(theta + t * step, lower), upper) if bounded else theta + t * step
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
        theta, current = trial, new
        if last_step and t == 1.0:
            return OptimizerResult(theta, current.value, current.gradient, iterations, True, "converged")
    return _quasi_newton(evaluate, value, theta, current, lower, upper, iterations, max_iterations)


CLOSED_FORM_NEWTON_BELOW = 1e-2
# below this decrement the next step most likely ends the search: the cheaper scoring solve checks it
NEAR_MINIMUM = 1e-8


def _newton_from(H: np.ndarray, theta: np.ndarray, g: np.ndarray, idx: np.ndarray) -> np.ndarray | None:
    """Newton step over the free parameters idx with observed Hessian H; None when H is not
    positive definite (then scoring continues)."""
    every = len(idx) == len(theta)
    try:
        delta = -scaled_solve(H, g if every else g[idx], positive_definite=True)
    except np.linalg.LinAlgError:
        return None
    if not np.isfinite(delta).all():
        return None
    if every:
        return delta
    step = np.zeros_like(theta)
    step[idx] = delta
    return step


def newton_decrement(ev: Evaluation, theta: np.ndarray, lower: np.ndarray, upper: np.ndarray) -> float:
    """g' H^-1 g over the parameters not held at a bound (about 2 (F - F_min))."""
    g = ev.gradient
    inactive = ~(((theta <= lower) & (g > 0)) | ((theta >= upper) & (g < 0)))
    if not inactive.any():
        return 0.0
    try:
        return float(g[inactive] @ scaled_solve(ev.information[np.ix_(inactive, inactive)], g[inactive]))
    except np.linalg.LinAlgError:
        return float("inf")


def _quasi_newton(evaluate, value, theta, current, lower, upper, iterations, max_iterations) -> OptimizerResult:
    from scipy.optimize import minimize  # the fallback is rare, and scipy.optimize is slow to import

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
    converged = newton_decrement(final, res.x, lower, upper) < 1e-10
    message = "converged" if converged else f"no convergence after {iterations + res.nit} iterations"
    return OptimizerResult(res.x, final.value, final.gradient, iterations + int(res.nit), converged, message)
