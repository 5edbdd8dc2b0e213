"""Fisher scoring with a backtracking line search and simple bounds.

Scoring uses the expected information as the Hessian (Lee & Jennrich 1979);
it converges only linearly when the model does not fit, so near the minimum
the steps switch to Newton's method with the observed Hessian (differences
of the analytic gradient), which converges quadratically.  A Newton step is
taken only where the Hessian is positive definite, so every step is a descent
direction, and every step is shortened until the discrepancy falls by at least
a fixed share of the decrease its direction promises (Armijo 1966): from any
start the discrepancy decreases at every iteration (Nocedal & Wright 2006,
ch. 3, give the convergence theory).  Parameters at a bound with the gradient
pointing outwards are held there (a projected Newton step, Bertsekas 1982).
If no step along the chosen direction lowers the discrepancy, a quasi-Newton
method (L-BFGS-B) with the analytic gradient continues from the best point.

Every iteration of either method counts against one limit, so the number of
iterations reported never exceeds the limit in force.

A search can also fail by running off: the steps the line search accepts keep
shrinking while the decrease the information matrix promises stays large,
typically because some parameters grow without bound (a factor whose marker
points the other way from where the search went).  ``stop_when_stalled`` ends
such a search early, so that the caller can restart from an equivalent
parameterisation (:mod:`cfa_tool.estimation.strategy`); the parameters that
grew, shrank towards zero or swung back and forth over the last iterations are
reported with every failure.
"""

from __future__ import annotations

from collections import deque
from dataclasses import dataclass
from enum import Enum
from typing import Callable

import numpy as np

from cfa_tool.numerics.linalg import difference_hessian, scaled_solve
from cfa_tool.estimation.objective import Evaluation


class Outcome(Enum):
    """How a search ended."""

    CONVERGED = "converged"
    ITERATION_LIMIT = "iteration limit"  # the limit in force was used up
    STALLED = "stalled"  # accepted steps kept shrinking far from a minimum
    NO_DECREASE = "no decrease"  # no step along any descent direction lowered the discrepancy
    LEFT_REGION = "left region"  # the estimates reached points where an implied matrix is not positive definite
    BAD_START = "bad start"  # the start values imply a matrix that is not positive definite


@dataclass(frozen=True)
class Drift:
    """Parameters (indices into theta) that misbehaved over the last iterations of a failed search."""

    growing: tuple[int, ...] = ()
    shrinking: tuple[int, ...] = ()  # towards zero
    oscillating: tuple[int, ...] = ()

    def __bool__(self) -> bool:
        return bool(self.growing or self.shrinking or self.oscillating)


@dataclass(frozen=True)
class OptimizerResult:
    """Where a search ended: the estimates, the objective there and how the search ended."""
    theta: np.ndarray
    value: float
    gradient: np.ndarray
    iterations: int
    outcome: Outcome
    drift: Drift = Drift()

    @property
    def converged(self) -> bool:
        return self.outcome is Outcome.CONVERGED


STALL_WINDOW = 10  # iterations over which a stall is judged
STALL_SHARE = 0.01  # a stall: the discrepancy fell by less than this share of the decrease the steps promised
TRAIL = 12  # iterates kept for the diagnosis of a failure


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
    stop_when_stalled: bool = False,
) -> OptimizerResult:
    """Minimise ``value`` from ``start`` within ``max_iterations`` iterations (of scoring, Newton and
    quasi-Newton steps together).  ``evaluate`` gives the value, gradient and expected information
    (None outside the region where the objective is defined), ``gradient`` the gradient alone and
    ``hessian`` the observed Hessian in closed form, when the objective has them.  A stalled search
    ends with :attr:`Outcome.STALLED` when ``stop_when_stalled``, and moves to the quasi-Newton
    method otherwise."""
    theta = np.minimum(np.maximum(np.asarray(start, dtype=float), lower), upper)
    initial = theta
    current = evaluate(theta)
    if current is None:
        return OptimizerResult(theta, np.inf, np.full_like(theta, np.nan), 0, Outcome.BAD_START)
    iterations = 0
    previous_decrement = np.inf
    hessian_usable = None
    bounded = bool(np.isfinite(lower).any() or np.isfinite(upper).any())
    unbounded = np.zeros(len(theta), dtype=bool), np.ones(len(theta), dtype=bool), np.arange(len(theta))
    trail = deque([theta], maxlen=TRAIL)  # accepted points (never changed in place)
    promised = deque(maxlen=STALL_WINDOW)  # decrease each accepted step's quadratic model promised
    achieved = deque(maxlen=STALL_WINDOW)  # and the decrease it gave

    def closed_form_hessian(theta, free_all, idx):
        """The closed-form Hessian over the free parameters, or None (a likelihood without one says so once)."""
        nonlocal hessian_usable
        full = hessian(theta)
        hessian_usable = full is not None
        return None if full is None else (full if free_all else full[np.ix_(idx, idx)])

    def failed(outcome: Outcome) -> OptimizerResult:
        return OptimizerResult(theta, current.value, current.gradient, iterations, outcome, drift(trail, initial))

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
                return OptimizerResult(theta, current.value, g, iterations - 1, Outcome.CONVERGED)
            # Newton's decrement falls quadratically, d_next ~ d^3 / d_prev^2: when that is far below the
            # tolerance, the full step ends the search without another solve to confirm it
            last_step = free_all and decrement**3 < 1e-2 * tolerance * previous_decrement**2
            previous_decrement = decrement
        else:
            try:
                if free_all:
                    step = scaled_solve(current.information, -g)
                else:
                    step = np.zeros_like(theta)
                    step[inactive] = scaled_solve(current.information[np.ix_(inactive, inactive)], -g[inactive])
            except np.linalg.LinAlgError:
                break
            if not np.isfinite(step).all():
                break
            # Newton decrement g' H^-1 g: about twice the distance to the minimum of F, whatever the units
            decrement = float(-g @ step) if free_all else float(-g[inactive] @ step[inactive])
            # a decrement below zero (beyond rounding) comes from an information that is singular there, not from a
            # minimum: the line search takes the gradient's direction instead (newuser-s23: a start where two
            # higher-order factors over two factors each are uncorrelated, 'converged' at the start, value 1.3)
            if -tolerance < decrement < tolerance:
                return OptimizerResult(theta, current.value, g, iterations - 1, Outcome.CONVERGED)
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
        trial, t, slope = _line_search(value, theta, current.value, g, step, active, lower, upper, bounded)
        if trial is None and newton is not None:  # the Hessian's model misled: a gradient step in the information's units
            step = -np.where(active, 0.0, g) / np.maximum(np.abs(np.diagonal(current.information)), 1e-12)
            trial, t, slope = _line_search(value, theta, current.value, g, step, active, lower, upper, bounded)
        if trial is None:
            break
        new = evaluate(trial)
        if new is None:
            break
        promised.append(-0.5 * slope)  # what the full step promised
        achieved.append(current.value - new.value)
        theta, current = trial, new
        trail.append(theta)
        if last_step and t == 1.0:
            return OptimizerResult(theta, current.value, current.gradient, iterations, Outcome.CONVERGED)
        if len(promised) == STALL_WINDOW and sum(promised) > 1e-8 and sum(achieved) < STALL_SHARE * sum(promised):
            if stop_when_stalled:
                return failed(Outcome.STALLED)
            break
    else:
        return failed(Outcome.ITERATION_LIMIT)
    return _quasi_newton(evaluate, value, gradient, theta, current, lower, upper, iterations, max_iterations, trail,
                         initial)


CLOSED_FORM_NEWTON_BELOW = 1e-2
# below this decrement the next step most likely ends the search: the cheaper scoring solve checks it
NEAR_MINIMUM = 1e-8


def _line_search(value, theta, f0, g, step, active, lower, upper, bounded) -> tuple[np.ndarray | None, float, float]:
    """Backtracking until the Armijo condition holds: (trial point, step length, slope of the direction
    taken), or (None, 0, 0)."""
    slope = float(g @ step)
    if slope >= 0:  # not a descent direction: fall back to steepest descent
        step = -np.where(active, 0.0, g)
        slope = float(g @ step)
    t = 1.0
    for _ in range(40):
        trial = np.minimum(np.maximum(theta + t * step, lower), upper) if bounded else theta + t * step
        f = value(trial)
        if np.isfinite(f) and f <= f0 + 1e-4 * t * slope:
            return trial, t, slope
        t *= 0.5
    return None, 0.0, 0.0


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


def _quasi_newton(evaluate, value, gradient, theta, current, lower, upper, iterations, max_iterations, trail,
                  initial) -> OptimizerResult:
    """L-BFGS-B from the best point, with the iterations left of the limit."""
    left = max_iterations - iterations
    if left <= 0:
        return OptimizerResult(theta, current.value, current.gradient, iterations, Outcome.ITERATION_LIMIT,
                               drift(trail, initial))
    from scipy.optimize import minimize  # the fallback is rare, and scipy.optimize is slow to import

    def fun(x):
        if gradient is not None:  # the gradient alone, without the information matrix
            f = value(x)
            return (f, gradient(x)) if np.isfinite(f) else (1e10, np.zeros_like(x))
        ev = evaluate(x)
        if ev is None:
            return 1e10, np.zeros_like(x)
        return ev.value, ev.gradient

    path = list(trail)

    def remember(x):
        path.append(np.array(x))

    bounds = [(None if not np.isfinite(lo) else lo, None if not np.isfinite(hi) else hi) for lo, hi in zip(lower, upper)]
    res = minimize(fun, theta, jac=True, method="L-BFGS-B", bounds=bounds, callback=remember,
                   options={"maxiter": left, "gtol": 1e-8, "ftol": 1e-15})
    used = iterations + min(int(res.nit), left)
    final = evaluate(res.x)
    if final is None:
        return OptimizerResult(theta, current.value, current.gradient, used, Outcome.LEFT_REGION,
                               drift(deque(path, maxlen=TRAIL), initial))
    if newton_decrement(final, res.x, lower, upper) < 1e-10:
        return OptimizerResult(res.x, final.value, final.gradient, used, Outcome.CONVERGED)
    outcome = Outcome.ITERATION_LIMIT if used >= max_iterations else Outcome.NO_DECREASE
    return OptimizerResult(res.x, final.value, final.gradient, used, outcome, drift(deque(path, maxlen=TRAIL), initial))


def drift(trail, initial: np.ndarray) -> Drift:
    """Which parameters misbehaved over the last iterates ``trail`` of a search that began at ``initial``.

    Growing: at least ten times its start (or its typical size) and moving away from zero in most of the
    last steps.  Shrinking: below a twentieth of its start and moving towards zero in most of them.
    Oscillating: its steps change direction in most of the last steps while the net movement is under a
    quarter of the distance travelled.  At most four of each, the largest first."""
    points = np.array(trail)
    if len(points) < 4:
        return Drift()
    last = points[-1]
    steps = np.diff(points, axis=0)
    size = np.abs(initial)
    floor = 0.1 * max(float(np.median(size)), 1e-3)
    scale = np.maximum(size, floor)
    outward = (np.sign(steps) == np.sign(points[1:])) & (steps != 0)
    growth = np.abs(last) / scale
    growing = (growth > 10.0) & (outward.mean(axis=0) >= 0.8)
    inward = (np.sign(steps) == -np.sign(points[:-1])) & (steps != 0)
    shrinking = (size > floor) & (np.abs(last) < 0.05 * size) & (inward.mean(axis=0) >= 0.8)
    travelled = np.abs(steps).sum(axis=0)
    flips = (np.sign(steps[1:]) * np.sign(steps[:-1]) < 0).mean(axis=0)
    oscillating = ((flips >= 0.6) & (np.abs(last - points[0]) < 0.25 * travelled)
                   & (travelled > 1e-3 * (np.abs(last) + floor)) & ~growing & ~shrinking)

    def largest(mask: np.ndarray, key: np.ndarray) -> tuple[int, ...]:
        found = np.flatnonzero(mask)
        return tuple(int(k) for k in found[np.argsort(-key[found])][:4])

    return Drift(largest(growing, growth), largest(shrinking, size / np.maximum(np.abs(last), 1e-300)),
                 largest(oscillating, travelled / scale))
