"""Invariance across many groups by the alignment method (Asparouhov & Muthén 2014).

Start from the configural model, fitted in every group with each factor's mean 0 and variance 1, whose
loadings lambda0 and intercepts nu0 are free in every group.  Any group factor mean alpha_g and variance
psi_g give the same fit, with aligned parameters

    lambda_gi = lambda0_gi / sqrt(psi_g),        nu_gi = nu0_gi - alpha_g lambda0_gi / sqrt(psi_g)

(Asparouhov & Muthén 2014, eq. 6-7).  Alignment chooses the alpha_g and psi_g that minimise the total
simplicity loss over all pairs of groups, for every item's loading and intercept,

    F = sum_i sum_{g<h} w_gh f(lambda_gi - lambda_hi) + sum_i sum_{g<h} w_gh f(nu_gi - nu_hi),
    f(x) = sqrt(sqrt(x^2 + eps)),  eps = 0.01,  w_gh = sqrt(N_g N_h)

(ibid., eq. 8-10): a loss that favours many equal parameters and a few large differences over many small
ones, as rotation criteria do.  Identification: the reference group's variance is 1 and, in the authors'
"fixed" variant, its mean is 0; in their "free" variant its mean is estimated too, which the loss
identifies only through non-invariant loadings (ibid., section on the free alignment; recalled from the
paper).  With each item measuring one factor the loss separates by factor, and each factor is aligned on
its own.

Here the variances enter as u_g = log psi_g (so psi_g > 0 without bounds), and the loss, its gradient
and its Hessian are analytic (chain rule through the aligned parameters; :func:`loss_gradient`,
:func:`loss_hessian`).  Standard errors of the aligned means, variances, loadings and intercepts follow
by the delta method from the configural estimates' covariance: the minimiser z(theta) of F is an
implicit function of the configural estimates theta, with dz/dtheta = -H_zz^-1 H_ztheta (implicit
function theorem), so Cov(z) = (dz/dtheta) Cov(theta) (dz/dtheta)'.

Non-invariant parameters are found by the authors' multiple pairwise test procedure (ibid., as recalled
from the paper): for each item and kind of parameter, Wald tests of every pair of groups' aligned values;
a starting set of groups whose values do not differ pairwise (grown greedily from the group with most
such partners); then repeatedly the groups whose value does not differ from the set's average form the
new set, until the set no longer changes.  The groups outside the final set are non-invariant for that
parameter.  More than about 25% non-invariant parameters makes the aligned means doubtful (the authors'
rule of thumb, recalled).  The trustworthiness check simulates data from the aligned solution (which
implies the configural model's moments), refits and realigns them, and reports the correlation of the
true and estimated group means, which the authors want at .98 or above (Muthén & Asparouhov 2014; a rule
of thumb, recalled).
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from functools import cached_property
from pathlib import Path

import numpy as np
import pandas as pd

from cfa_tool.assessment.admissibility import refuse_inadmissible_fit
from cfa_tool.assessment.directions import relative_direction
from cfa_tool.data.groups import reference_rule
from cfa_tool.data.renamed_columns import ColumnRenames
from cfa_tool import options as check
from cfa_tool.errors import EstimationError, ModelError, OptionError
from cfa_tool.language.names import written_group
from cfa_tool.language.spec import ScaleSetting, Spec
from cfa_tool.method import ALIGNMENT_FLAG_LEVEL, ALIGNMENT_TRIALS, ReferenceMean
from cfa_tool.numbers import word_list
from cfa_tool.numerics.plain import journal_decimal
from cfa_tool.numerics.distributions import correlation_null_sf
from cfa_tool.pipeline.results import FitResult, clean
from cfa_tool.views import Presentable

#: the constant of the component loss function (Asparouhov & Muthén 2014)
EPSILON = 0.01
#: more non-invariant loadings and intercepts than this share: the aligned means are doubtful (Asparouhov &
#: Muthén 2014, their rule of thumb, recalled)
CAUTION_SHARE = 0.25
#: the correlation of true and estimated means the Monte Carlo check should reach (Muthén & Asparouhov 2014,
#: a rule of thumb, recalled)
TRUSTED_CORRELATION = 0.98
#: the chance, at or above which the Monte Carlo check's correlations over so few groups are said to show little:
#: group means unrelated to the true ones reach :data:`TRUSTED_CORRELATION` with at least this probability (this
#: tool's rule: 3 to 5 groups, where it is .064, .010 and .0017; :func:`chance_trusted`)
FEW_GROUPS_CHANCE = 0.001


def chance_trusted(groups: int) -> float:
    """P(r >= TRUSTED_CORRELATION) for the correlation over ``groups`` pairs of values unrelated to each other
    (normal): how often the Monte Carlo check's correlation of true and estimated means over so few groups reaches the
    authors' figure by chance alone (numerics.distributions.correlation_null_sf; Fisher 1915)."""
    return float(correlation_null_sf(TRUSTED_CORRELATION, groups))
#: a Hessian of the loss whose smallest eigenvalue is below this share of its largest: the group means and
#: variances are barely determined by the loss (its minimum is flat in some direction)
FLAT_MINIMUM = 1e-7


# ---------------------------------------------------------------------------------------------------
# the component loss function and its derivatives


def simplicity_loss(x: np.ndarray, epsilon: float = EPSILON) -> np.ndarray:
    """f(x) = sqrt(sqrt(x^2 + eps)) (Asparouhov & Muthén 2014, eq. 10)."""
    return np.sqrt(np.sqrt(x * x + epsilon))


def simplicity_slope(x: np.ndarray, epsilon: float = EPSILON) -> np.ndarray:
    """f'(x) = x (x^2 + eps)^(-3/4) / 2."""
    return 0.5 * x * (x * x + epsilon) ** -0.75


def simplicity_curvature(x: np.ndarray, epsilon: float = EPSILON) -> np.ndarray:
    """f''(x) = (eps - x^2 / 2) (x^2 + eps)^(-7/4) / 2."""
    q = x * x + epsilon
    return 0.5 * (epsilon - 0.5 * x * x) * q ** -1.75


# ---------------------------------------------------------------------------------------------------
# one factor's alignment problem


@dataclass(frozen=True, eq=False)
class FactorProblem:
    """One factor's configural loadings and intercepts, (groups, items), the reference group first.

    The point z holds the free group means, then the free log variances: every group's log variance but
    the reference group's, every group's mean but the reference group's unless its mean is estimated."""

    loadings: np.ndarray
    intercepts: np.ndarray
    sizes: np.ndarray
    free_reference_mean: bool = False
    epsilon: float = EPSILON

    @property
    def groups(self) -> int:
        return self.loadings.shape[0]

    @cached_property
    def weights(self) -> np.ndarray:
        """sqrt(N_g N_h) with a zero diagonal (Asparouhov & Muthén 2014, eq. 9)."""
        n = np.asarray(self.sizes, dtype=float)
        w = np.sqrt(np.outer(n, n))
        np.fill_diagonal(w, 0.0)
        return w

    @cached_property
    def free(self) -> np.ndarray:
        """Which of the 2G values (means, then log variances) the point z holds."""
        mask = np.ones(2 * self.groups, dtype=bool)
        mask[self.groups] = False
        mask[0] = self.free_reference_mean
        return mask

    def full(self, z: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(means, log variances) of every group."""
        values = np.zeros(2 * self.groups)
        values[self.free] = z
        return values[: self.groups], values[self.groups :]


def aligned_parameters(problem: FactorProblem, means: np.ndarray, log_variances: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Aligned loadings lambda0 / sqrt(psi) and intercepts nu0 - alpha lambda0 / sqrt(psi), (groups, items)."""
    loadings = problem.loadings * np.exp(-0.5 * log_variances)[:, None]
    return loadings, problem.intercepts - means[:, None] * loadings


def _differences(values: np.ndarray) -> np.ndarray:
    """values[g, i] - values[h, i] as (g, h, i)."""
    return values[:, None, :] - values[None, :, :]


def alignment_loss(problem: FactorProblem, z: np.ndarray) -> float:
    """The total simplicity loss F at z (each pair of groups counted once)."""
    loadings, intercepts = aligned_parameters(problem, *problem.full(z))
    w = problem.weights
    return float(sum(0.5 * np.einsum("gh,ghi->", w, simplicity_loss(_differences(p), problem.epsilon))
                     for p in (loadings, intercepts)))


def _slopes(problem: FactorProblem, values: np.ndarray) -> np.ndarray:
    """dF/dp_gi = sum_h w_gh f'(p_gi - p_hi) for aligned values p (f' is odd, so each pair enters once)."""
    return np.einsum("gh,ghi->gi", problem.weights, simplicity_slope(_differences(values), problem.epsilon))


def _local_derivatives(problem: FactorProblem, means: np.ndarray, loadings: np.ndarray):
    """Derivatives of each aligned loading and intercept by its own group's (mean, log variance): (g, i, 2)."""
    zero = np.zeros_like(loadings)
    by_point_loading = np.stack([zero, -0.5 * loadings], axis=-1)
    by_point_intercept = np.stack([-loadings, 0.5 * means[:, None] * loadings], axis=-1)
    return by_point_loading, by_point_intercept


def loss_gradient(problem: FactorProblem, z: np.ndarray) -> np.ndarray:
    """dF/dz, by the chain rule through the aligned parameters."""
    means, log_variances = problem.full(z)
    loadings, intercepts = aligned_parameters(problem, means, log_variances)
    d_loading, d_intercept = _local_derivatives(problem, means, loadings)
    full = (np.einsum("gi,git->tg", _slopes(problem, loadings), d_loading)
            + np.einsum("gi,git->tg", _slopes(problem, intercepts), d_intercept)).reshape(-1)
    return full[problem.free]


def _second_by_values(problem: FactorProblem, values: np.ndarray) -> np.ndarray:
    """d2F/dp_gi dp_hi for each item, (g, h, i): -w_gh f''(p_gi - p_hi) off the diagonal, their negative sum on it."""
    curvature = problem.weights[:, :, None] * simplicity_curvature(_differences(values), problem.epsilon)
    out = -curvature
    g = np.arange(problem.groups)
    out[g, g, :] += curvature.sum(axis=1)
    return out


def _hessian_parts(problem: FactorProblem, z: np.ndarray):
    means, log_variances = problem.full(z)
    loadings, intercepts = aligned_parameters(problem, means, log_variances)
    d_loading, d_intercept = _local_derivatives(problem, means, loadings)
    return (means, log_variances, loadings, (loadings, d_loading, _slopes(problem, loadings), _second_by_values(problem, loadings)),
            (intercepts, d_intercept, _slopes(problem, intercepts), _second_by_values(problem, intercepts)))


def loss_hessian(problem: FactorProblem, z: np.ndarray) -> np.ndarray:
    """d2F/dz dz': the curvature of the loss through the aligned parameters plus its slope times their own
    second derivatives (d2 lambda/du2 = lambda/4; d2 nu/dalpha du = lambda/2, d2 nu/du2 = -alpha lambda/4).

    The first part is sum_i (dp_i/dz)' C_i (dp_i/dz) with C_i the curvature by the aligned values of item i; an
    aligned loading moves with its group's u only (by -lambda/2), an intercept with its group's alpha (by -lambda)
    and u (by alpha lambda / 2), so with K = sum_i C_i * lambda_i lambda_i' (of loadings, and of intercepts):
    d2F/dalpha dalpha' = K_nu, d2F/dalpha du' = -K_nu alpha'/2, d2F/du du' = K_lambda/4 + alpha alpha' * K_nu/4."""
    means, _, loadings, (_, _, sl, ll), (_, _, sn, nn) = _hessian_parts(problem, z)
    G = problem.groups
    pairs = loadings[:, None, :] * loadings[None, :, :]
    by_loadings, by_intercepts = (ll * pairs).sum(-1), (nn * pairs).sum(-1)
    full = np.empty((2 * G, 2 * G))
    full[:G, :G] = by_intercepts
    full[:G, G:] = -0.5 * by_intercepts * means[None, :]
    full[G:, :G] = full[:G, G:].T
    full[G:, G:] = 0.25 * by_loadings + 0.25 * by_intercepts * np.outer(means, means)
    g = np.arange(G)
    full[G + g, G + g] += (sl * loadings).sum(1) / 4 - (sn * means[:, None] * loadings).sum(1) / 4
    full[g, G + g] += (sn * loadings).sum(1) / 2
    full[G + g, g] += (sn * loadings).sum(1) / 2
    return full[np.ix_(problem.free, problem.free)]


def loss_cross_derivatives(problem: FactorProblem, z: np.ndarray) -> np.ndarray:
    """d2F/dz dtheta' for the configural estimates theta laid out by group, then (loadings, intercepts), then
    item: (free z, G * 2 * I)."""
    means, log_variances, loadings, (_, dl, sl, ll), (_, dn, sn, nn) = _hessian_parts(problem, z)
    G, I = problem.loadings.shape
    scale = np.exp(-0.5 * log_variances)[:, None] * np.ones((1, I))  # d lambda / d lambda0
    # derivatives of the aligned values by their own configural estimates (lambda0, nu0): (g, i, 2)
    by_theta_loading = np.stack([scale, np.zeros_like(scale)], axis=-1)
    by_theta_intercept = np.stack([-means[:, None] * scale, np.ones_like(scale)], axis=-1)
    cross = (np.einsum("ghi,git,hik->tghki", ll, dl, by_theta_loading)
             + np.einsum("ghi,git,hik->tghki", nn, dn, by_theta_intercept))
    # the slope times the second derivatives of an aligned value by its group's point and its own estimate:
    # d2 lambda / du dlambda0 = -s/2; d2 nu / dalpha dlambda0 = -s, d2 nu / du dlambda0 = alpha s / 2 (s = psi^-1/2)
    g = np.arange(G)
    cross[1, g, g, 0, :] += -0.5 * sl * scale + 0.5 * sn * means[:, None] * scale
    cross[0, g, g, 0, :] += -sn * scale
    return cross.reshape(2 * G, G * 2 * I)[problem.free]


# ---------------------------------------------------------------------------------------------------
# the minimum


@dataclass(frozen=True)
class Minimum:
    """Where the alignment loss's search ended."""
    z: np.ndarray
    loss: float
    converged: bool
    iterations: int
    flat: bool  # the Hessian at the minimum is (nearly) singular or not positive definite


def starting_points(problem: FactorProblem) -> list[np.ndarray]:
    """The configural point (means 0, variances 1) and one from item-wise ratios to the reference group:
    psi_g from the median ratio of loadings, alpha_g from the median intercept difference over the loading."""
    zero = np.zeros(int(problem.free.sum()))
    with np.errstate(all="ignore"):
        ratio = np.median(problem.loadings / problem.loadings[:1], axis=1)
        scale = np.where(np.isfinite(ratio) & (ratio > 0), ratio, 1.0)
        loadings = problem.loadings / scale[:, None]
        means = np.median((problem.intercepts - problem.intercepts[:1]) / loadings, axis=1)
    means = np.where(np.isfinite(means), means, 0.0)
    guess = np.concatenate([means, 2 * np.log(scale)])[problem.free]
    return [zero, guess]


def minimise(problem: FactorProblem, max_iterations: int = 500, starts: list[np.ndarray] | None = None) -> Minimum:
    """The smallest of the minima reached from ``starts`` (default :func:`starting_points`) by Newton's method with
    the analytic gradient and Hessian, its steps from conjugate gradients that stop at negative curvature, and a
    line search (scipy's Newton-CG)."""
    from scipy.optimize import minimize

    best = None
    # the loss scaled to about one per pair of groups and item: the minimiser is the same, the tolerance meaningful
    scale = 1.0 / max(problem.weights.sum() * problem.loadings.shape[1], 1e-300)
    for start in starting_points(problem) if starts is None else starts:
        found = minimize(lambda z: scale * alignment_loss(problem, z), start,
                         jac=lambda z: scale * loss_gradient(problem, z), hess=lambda z: scale * loss_hessian(problem, z),
                         method="Newton-CG", options={"xtol": 1e-10, "maxiter": max_iterations})
        if best is None or found.fun < best.fun:
            best = found
    z = np.asarray(best.x, dtype=float)
    gradient = scale * loss_gradient(problem, z)
    converged = bool(np.all(np.isfinite(z)) and np.max(np.abs(gradient), initial=0.0) < 1e-6)
    hessian = loss_hessian(problem, z) if z.size and np.all(np.isfinite(z)) else np.eye(max(z.size, 1))
    eigen = np.linalg.eigvalsh(hessian) if np.all(np.isfinite(hessian)) else np.zeros(1)
    flat = bool(eigen[0] <= FLAT_MINIMUM * max(eigen[-1], 1e-300))
    return Minimum(z, alignment_loss(problem, z), converged, int(best.nit), flat)


# ---------------------------------------------------------------------------------------------------
# standard errors by the delta method


def _sandwich(rows: np.ndarray, blocks: np.ndarray) -> np.ndarray:
    """rows V rows' for V block-diagonal by group: ``rows`` (..., G, 2I), ``blocks`` (G, 2I, 2I) -> (..., ...)."""
    flat = rows.reshape(-1, *blocks.shape[:2])
    left = np.einsum("rgj,gjl->rgl", flat, blocks)
    return np.einsum("rgl,sgl->rs", left, flat)


@dataclass(frozen=True)
class AlignedSolution:
    """Every group's aligned mean and log variance with their covariance, and the aligned loadings and
    intercepts (groups, items) with, per item, the covariance of their values across groups."""

    means: np.ndarray
    log_variances: np.ndarray
    point_covariance: np.ndarray  # (2G, 2G): means, then log variances
    loadings: np.ndarray
    intercepts: np.ndarray
    loading_covariance: np.ndarray  # (I, G, G)
    intercept_covariance: np.ndarray  # (I, G, G)

    @property
    def variances(self) -> np.ndarray:
        return np.exp(self.log_variances)

    @property
    def mean_se(self) -> np.ndarray:
        G = len(self.means)
        return np.sqrt(np.clip(np.diag(self.point_covariance)[:G], 0, None))

    @property
    def variance_se(self) -> np.ndarray:
        """By the delta method from the log variance: se(psi) = psi se(log psi)."""
        G = len(self.means)
        return self.variances * np.sqrt(np.clip(np.diag(self.point_covariance)[G:], 0, None))


def aligned_solution(problem: FactorProblem, z: np.ndarray, blocks: np.ndarray) -> AlignedSolution:
    """The aligned values at z with delta-method covariances; ``blocks`` (G, 2I, 2I) is the covariance of each
    group's configural (loadings, intercepts) (groups are independent in the configural model)."""
    G, I = problem.loadings.shape
    means, log_variances = problem.full(z)
    loadings, intercepts = aligned_parameters(problem, means, log_variances)
    by_theta = np.zeros((2 * G, G * 2 * I))
    if z.size:
        try:
            by_theta[problem.free] = -np.linalg.solve(loss_hessian(problem, z), loss_cross_derivatives(problem, z))
        except np.linalg.LinAlgError:
            by_theta[:] = np.nan
    point = by_theta.reshape(2, G, G, 2 * I)
    d_loading, d_intercept = _local_derivatives(problem, means, loadings)
    scale = np.exp(-0.5 * log_variances)[:, None] * np.ones((1, I))
    covariances = []
    for d_point, own in ((d_loading, (scale, np.zeros_like(scale))), (d_intercept, (-means[:, None] * scale, np.ones_like(scale)))):
        rows = np.einsum("ait,tagj->iagj", d_point, point)  # (I, G, G, 2I): item, aligned group, estimate's group, estimate
        g, i = np.meshgrid(np.arange(G), np.arange(I), indexing="ij")
        for k in range(2):
            rows[i, g, g, k * I + i] += own[k]
        covariances.append(np.stack([_sandwich(rows[item], blocks) for item in range(I)]))
    return AlignedSolution(means, log_variances, _sandwich(point.reshape(2 * G, G, 2 * I), blocks), loadings, intercepts,
                           covariances[0], covariances[1])


# ---------------------------------------------------------------------------------------------------
# flagging non-invariant parameters


def _two_sided_p(z: np.ndarray) -> np.ndarray:
    from cfa_tool.numerics.distributions import norm_sf

    return 2 * norm_sf(np.abs(z))


def invariant_set(values: np.ndarray, covariance: np.ndarray, level: float, max_rounds: int = 100) -> np.ndarray:
    """The groups (a boolean mask) whose aligned value of one parameter agrees, by the multiple pairwise test
    procedure (Asparouhov & Muthén 2014, as recalled): Wald tests of every pair at ``level``; a starting set
    grown greedily from the group that agrees with most others, adding groups that agree with every member;
    then, until the set repeats, the new set is every group whose value does not differ from the set's
    average (the test's variance from the full covariance of the values)."""
    G = len(values)
    variances = np.diag(covariance)
    with np.errstate(all="ignore"):
        spread = variances[:, None] + variances[None, :] - 2 * covariance
        z = (values[:, None] - values[None, :]) / np.sqrt(np.clip(spread, 1e-300, None))
    agree = _two_sided_p(z) >= level
    np.fill_diagonal(agree, True)
    order = np.argsort(-agree.sum(axis=1), kind="stable")
    members = np.zeros(G, dtype=bool)
    for g in order:
        if agree[g, members].all():
            members[g] = True
    seen = []
    for _ in range(max_rounds):
        weights = members / members.sum()
        contrast = np.eye(G) - weights[None, :]  # each group minus the set's average
        with np.errstate(all="ignore"):
            sd = np.sqrt(np.clip(np.einsum("ga,ab,gb->g", contrast, covariance, contrast), 1e-300, None))
            new = _two_sided_p((contrast @ values) / sd) >= level
        if not new.any() or any((new == old).all() for old in seen + [members]):
            return new if new.any() else members
        seen.append(members)
        members = new
    return members


# ---------------------------------------------------------------------------------------------------
# results


@dataclass(frozen=True)
class AlignedGroup:
    """One factor's aligned mean and variance in one group."""

    factor: str
    group: str
    rows: int
    mean: float
    mean_se: float
    variance: float
    variance_se: float

    def to_dict(self) -> dict:
        return clean({"factor": self.factor, "group": self.group, "rows": self.rows, "mean": self.mean,
                      "mean_se": self.mean_se, "variance": self.variance, "variance_se": self.variance_se})


@dataclass(frozen=True)
class AlignedParameter:
    """One item's loading or intercept in one group: configural, aligned, and whether it is invariant."""

    factor: str
    item: str
    kind: str  # "loading" or "intercept"
    group: str
    configural: float
    aligned: float
    se: float
    invariant: bool

    def to_dict(self) -> dict:
        return clean({"factor": self.factor, "item": self.item, "kind": self.kind, "group": self.group,
                      "configural": self.configural, "aligned": self.aligned, "se": self.se,
                      "invariant": self.invariant})


def counted_flags(parameters) -> list[tuple[AlignedParameter, bool]]:
    """Each parameter with whether it counts as non-invariant: as flagged, except that with two groups a loading or
    intercept flagged in one differs between the two, so it counts in both (which of two groups 'differs' is no
    finding: a new-user trial read 'group B 7% non-invariant' beside 'group A 0%')."""
    if len({p.group for p in parameters}) != 2:
        return [(p, not p.invariant) for p in parameters]
    differ = {(p.item, p.kind) for p in parameters if not p.invariant}
    return [(p, (p.item, p.kind) in differ) for p in parameters]


@dataclass(frozen=True)
class ParameterInvariance:
    """One item's loading or intercept across groups: the groups where it agrees and their average value."""

    factor: str
    item: str
    kind: str
    value: float  # average aligned value in the invariant groups
    invariant_groups: tuple[str, ...]
    noninvariant_groups: tuple[str, ...]

    def to_dict(self) -> dict:
        return clean({"factor": self.factor, "item": self.item, "kind": self.kind, "invariant_value": self.value,
                      "invariant_groups": list(self.invariant_groups),
                      "noninvariant_groups": list(self.noninvariant_groups)})


@dataclass(frozen=True)
class FactorAlignment:
    """One factor aligned across the groups."""
    factor: str
    items: tuple[str, ...]
    loss: float  # the total simplicity loss at the minimum, with the weights sqrt(N_g N_h)
    converged: bool
    iterations: int
    groups: tuple[AlignedGroup, ...]
    parameters: tuple[AlignedParameter, ...]
    invariance: tuple[ParameterInvariance, ...]

    @property
    def noninvariant_share(self) -> float:
        return float(np.mean([flag for _, flag in counted_flags(self.parameters)]))

    def to_dict(self) -> dict:
        return clean({"factor": self.factor, "items": list(self.items), "loss": self.loss, "converged": self.converged,
                      "iterations": self.iterations,
                      "noninvariant_share": self.noninvariant_share, "groups": [g.to_dict() for g in self.groups],
                      "parameters": [p.to_dict() for p in self.parameters],
                      "invariance": [p.to_dict() for p in self.invariance]})


@dataclass(frozen=True)
class FactorCheck:
    """One factor's results over the Monte Carlo trials: correlations of true and estimated group values."""

    factor: str
    mean_correlation: float  # average over trials
    lowest_mean_correlation: float
    variance_correlation: float
    lowest_variance_correlation: float
    mean_error: float  # root mean square of estimated minus true means, over groups and trials

    @property
    def trusted(self) -> bool | None:
        """Whether the means' correlation reaches the authors' .98; None where it is not defined."""
        return bool(self.mean_correlation >= TRUSTED_CORRELATION) if np.isfinite(self.mean_correlation) else None

    def to_dict(self) -> dict:
        return clean({"factor": self.factor, "mean_correlation": self.mean_correlation,
                      "lowest_mean_correlation": self.lowest_mean_correlation,
                      "variance_correlation": self.variance_correlation,
                      "lowest_variance_correlation": self.lowest_variance_correlation,
                      "root_mean_square_error_of_means": self.mean_error, "trusted": self.trusted})


@dataclass(frozen=True)
class TrustCheck:
    """The Monte Carlo check of the aligned means."""
    trials: int
    completed: int  # trials whose every group converged
    seed: int
    factors: tuple[FactorCheck, ...]

    def to_dict(self) -> dict:
        return {"trials": self.trials, "completed": self.completed, "seed": self.seed,
                "threshold": TRUSTED_CORRELATION, "factors": [f.to_dict() for f in self.factors]}


@dataclass(frozen=True, eq=False)
class AlignmentResult(Presentable):
    """Group means and variances across many groups by alignment."""
    configural: FitResult
    group_column: str
    groups: tuple[str, ...]  # the reference group first
    sizes: tuple[int, ...]
    reference_mean: ReferenceMean
    flag_level: float
    factors: tuple[FactorAlignment, ...]
    check: TrustCheck | None
    warnings: tuple[str, ...]  # cautions about the aligned means, shown first
    notes: tuple[str, ...] = ()  # what else the reader should know (groups turned round, the estimated reference mean)
    reference_rule: object = None  # why the first group is the reference (data.groups.ReferenceRule)

    @property
    def reference_group(self) -> str:
        return self.groups[0]

    @property
    def noninvariant_share(self) -> float:
        """Of every loading and intercept in every group (with two groups, as :func:`counted_flags` counts them)."""
        return float(np.mean([flag for f in self.factors for _, flag in self._flagged(f)]))

    def _flagged(self, f: FactorAlignment) -> list[tuple[AlignedParameter, bool]]:
        return counted_flags(f.parameters)

    def item_shares(self) -> list[tuple[str, str, float]]:
        """(factor, item, share of the item's loadings and intercepts over groups that are non-invariant)."""
        out = []
        for f in self.factors:
            flagged = self._flagged(f)
            for item in f.items:
                out.append((f.factor, item, float(np.mean([flag for p, flag in flagged if p.item == item]))))
        return out

    def group_shares(self, factor: str | None = None) -> list[tuple[str, float]]:
        """(group, share of its loadings and intercepts that are non-invariant) over every factor's items, or over
        ``factor``'s only."""
        flagged = [pair for f in self.factors if factor is None or f.factor == factor for pair in self._flagged(f)]
        return [(g, float(np.mean([flag for p, flag in flagged if p.group == g]))) for g in self.groups]

    def to_dict(self) -> dict:
        return {
            "warnings": [str(w) for w in self.warnings],
            "notes": [str(x) for x in self.notes],
            "method": "alignment (Asparouhov & Muthén 2014)",
            "group_column": self.group_column,
            "groups": [{"group": g, "rows": n} for g, n in zip(self.groups, self.sizes)],
            "reference_group": self.reference_group,
            "reference_group_chosen_by": self.reference_rule.value if self.reference_rule is not None else None,
            "reference_mean": {"name": self.reference_mean.value, "description": self.reference_mean.phrase},
            "standard_errors": STANDARD_ERRORS,
            "flagging": {"level": self.flag_level, "procedure": FLAGGING},
            "noninvariant_share": self.noninvariant_share,
            "noninvariant_share_by_item": [clean({"factor": f, "item": i, "share": s}) for f, i, s in self.item_shares()],
            "noninvariant_share_by_group": [clean({"group": g, "share": s}) for g, s in self.group_shares()],
            "factors": [f.to_dict() for f in self.factors],
            "trust_check": self.check.to_dict() if self.check is not None else None,
            "configural": self.configural.to_dict(),
        }


STANDARD_ERRORS = ("delta method from the covariance of the configural estimates, through the implicit function "
                   "of the alignment's minimum (the loss's Hessian and cross-derivatives)")
FLAGGING = ("pairwise Wald tests of the aligned values at the level given, a starting set of groups that agree pairwise, "
            "then repeated tests of each group against the set's average until the set no longer changes "
            "(after Asparouhov & Muthén 2014)")


# ---------------------------------------------------------------------------------------------------
# the workflow


@dataclass(frozen=True)
class _Layout:
    """Where each factor's configural loadings and intercepts sit in theta, per group."""

    factors: tuple[str, ...]
    items: tuple[tuple[str, ...], ...]  # per factor
    loading_index: tuple[np.ndarray, ...]  # per factor: (G, I) theta indices
    intercept_index: tuple[np.ndarray, ...]


def align(model: str | Path | Spec, data: pd.DataFrame | str | Path, group: str, *, reference_group: str | None = None,
          reference_mean: str | ReferenceMean = ReferenceMean.ZERO, flag_level: float = ALIGNMENT_FLAG_LEVEL,
          trials: int = ALIGNMENT_TRIALS, seed: int = 1, sheet: str | None = None, names_row: int | None = None, first_data_row: int | None = None, missing_codes: tuple[float, ...] = (),
          keep: tuple[str, ...] | list[str] = (), rename: ColumnRenames = None, missing: str | None = None,
          max_iterations: int = check.ITERATION_LIMIT, id_column: str | None = None) -> AlignmentResult:
    """Group factor means and variances under approximate invariance by alignment (Asparouhov & Muthén 2014),
    from the configural model fitted with every factor's mean 0 and variance 1 in every group.

    ``reference_mean``: 'zero' (the reference group's means 0, variances 1) or 'estimated' (its means free too);
    ``flag_level``: level of the tests that flag non-invariant loadings and intercepts; ``trials``: Monte Carlo
    replications of the trustworthiness check (0 leaves it out), with ``seed``.  ``id_column``: the column that names each row (never analysed), beside the row numbers of the cautions about
    rows, as for ``fit``."""
    from cfa_tool.numerics.threads import blas_threads_for
    from cfa_tool.data.matching import chosen_columns
    from cfa_tool.pipeline.inputs import (analysed_odd_values, continuous_only, keeps_rows_with_gaps, odd_values_named,
                                          read_inputs_with_notes, rows_named,
                                          with_odd_values)

    if not isinstance(group, str):
        raise OptionError(f"alignment needs a group column, given by its name (text), not {type(group).__name__}")
    variant = ReferenceMean.parse(reference_mean, "the reference group's mean")
    flag_level = check.probability("the level of the tests that flag non-invariant parameters", flag_level)
    trials = check.whole_number("the number of Monte Carlo trials", trials, 0, check.MAX_REPLICATIONS)
    seed = check.seed(seed)
    spec, loaded, notes = read_inputs_with_notes(model, data, sheet, missing_codes, keep,
                                                 (id_column,) if isinstance(id_column, str) else (),
                                                 names_row=names_row, first_data_row=first_data_row,
                                                 rename=rename, chosen=chosen_columns(group, id_column),
                                                 keeps_gaps=keeps_rows_with_gaps(missing))
    frame, source = loaded.frame, loaded.source
    ids, named_by = rows_named(loaded, id_column, spec.observed_names, group)
    notes = list(notes)
    spec = configural_spec(continuous_only(spec, "align"))
    loaded = analysed_odd_values(loaded, spec, group)  # values that look like no answers: named first
    with blas_threads_for(len(spec.observed_names)), odd_values_named(loaded):  # one thread: small matrices (numerics.threads)
        result = _align(spec, frame, source, group, reference_group, variant, flag_level, trials, seed, missing,
                        max_iterations, notes)
    result = replace(result, configural=with_odd_values(result.configural, loaded, group, spec, None, ids, named_by))
    if not loaded.row_filters:
        return result
    data = replace(result.configural.data, row_filters=loaded.row_filters, rows_in_file=len(loaded.read_frame))
    return replace(result, configural=replace(result.configural, data=data))


def _align(spec: Spec, frame: pd.DataFrame, source: str, group: str, reference_group: str | None,
           variant: ReferenceMean, flag_level: float, trials: int, seed: int, missing: str | None,
           max_iterations: int, notes: list[str]) -> AlignmentResult:
    from cfa_tool.pipeline.continuous import FitOptions, assess, estimate
    from cfa_tool.pipeline.inputs import choose_missing_handling, moments_for

    options, missing_notes = choose_missing_handling(FitOptions(max_iterations=max_iterations, diagnostics=False,
                                                                modification_indices=False, missing=missing),
                                                     frame, spec.observed_names, group)
    groups, group_notes = moments_for(spec, frame, source, group, reference_group, options.missing)
    labels = tuple(label for label, _ in groups)
    est = estimate(spec, groups, options, start=configural_start(spec, groups, options))
    if not est.converged:
        raise EstimationError(f"the configural model (every factor's mean 0 and variance 1 in every group) did not "
                              f"converge: {est.message}")
    configural = assess(spec, groups, est, options, group_column=group)
    configural = replace(configural, warnings=tuple(missing_notes + group_notes) + configural.warnings)
    layout = _layout(spec, est.table)
    sizes = np.array([m.n_obs for _, m in groups], dtype=float)
    theta, covariance = est.theta, configural.parameter_covariance
    factors = []
    for f, name in enumerate(layout.factors):
        loadings, intercepts = theta[layout.loading_index[f]], theta[layout.intercept_index[f]]
        index = np.concatenate([layout.loading_index[f], layout.intercept_index[f]], axis=1)  # (G, 2I)
        blocks = np.stack([covariance[np.ix_(row, row)] for row in index])
        signs = orientation(loadings)
        if (signs < 0).any():
            turned = [written_group(labels[g], labels) for g in np.flatnonzero(signs < 0)]  # the one rule of each
            notes.append(f"the configural solution has factor {name} turned round (its loadings negative) in group"
                         f"{'s' if len(turned) > 1 else ''} {word_list(turned)}; it was turned back (loadings "
                         f"and factor reversed), which leaves the model unchanged")
        loadings, blocks = loadings * signs[:, None], _reflect_blocks(blocks, signs)
        problem = FactorProblem(loadings, intercepts, sizes, variant is ReferenceMean.ESTIMATED)
        factors.append(_factor_result(name, layout.items[f], labels, sizes, problem, blocks, flag_level,
                                      max_iterations))
    trust = None
    if trials:
        # the check draws samples from the aligned solution: an impossible one is no population (the rule of cutoffs,
        # simulate and power-simulation, in the same words; hostile tester s15)
        refuse_inadmissible_fit(configural.problems, f"{spec.source} fitted to {source}",
                                "the Monte Carlo check cannot draw samples from it",
                                remedy=f"run the check, or leave the check out ({check.option_in_both('--trials 0', 'trials=0')})")
        trust = trust_check(spec, est, layout, sizes.astype(int), variant, factors, trials, seed, max_iterations)
    if len(labels) == 2:
        notes.append("alignment is made for many groups; with two groups, the invariance command tests scalar "
                     "invariance directly and gives the latent mean difference when it holds")
    if variant is ReferenceMean.ESTIMATED:
        notes += [f"the reference group's mean of {f.factor} is estimated from the non-invariance of the loadings "
                  f"alone (standard error {f.groups[0].mean_se:.3f}); when it is poorly determined, the reference "
                  f"mean of zero gives the better comparison (the method's authors' advice, recalled)" for f in factors]
    result = AlignmentResult(configural, group, labels, tuple(int(n) for n in sizes), variant, flag_level,
                             tuple(factors), trust, (), tuple(notes), reference_rule(frame, group, reference_group))
    return replace(result, warnings=tuple(_cautions(result)))


def configural_start(spec: Spec, groups: list, options) -> np.ndarray | None:
    """Start values of the configural model from each group fitted on its own: the configural model's groups share
    no parameter, so its estimates are the groups' own, and the fit of all groups at once (whose information matrix
    grows with the square of the number of groups) then needs a step or two.  None when a group's own fit fails (the
    joint fit then starts from its usual values)."""
    from cfa_tool.method import MissingData
    from cfa_tool.pipeline.continuous import estimate, model_structure

    # the table the joint fit builds (cfa_tool.pipeline.continuous.estimate)
    table, _ = model_structure(spec, tuple(label for label, _ in groups), options.missing is MissingData.FULL_INFORMATION)
    position = {(p.group, p.kind, p.variables): p.terms[0][0] for p in table.parameters if p.free}
    start = np.full(table.n_free, np.nan)
    for g, (_, moments) in enumerate(groups):
        own = estimate(spec, [(None, moments)], options)
        if not own.converged:
            return None
        for p in own.table.parameters:
            if p.free:
                start[position[(g, p.kind, p.variables)]] = own.theta[p.terms[0][0]]
        if not own.table.mean_structure:  # complete rows: the intercepts of a saturated mean structure are the means
            for x, mean in zip(moments.names, moments.means):
                start[position[(g, "intercept", (x,))]] = mean
    return start if np.all(np.isfinite(start)) else None


def configural_spec(spec: Spec) -> Spec:
    """The model as alignment starts from it: every factor scaled by its variance (1 in every group, with means
    0), and no equality across groups."""
    if spec.invariant or spec.invariance_level is not None:
        where = spec.equalities_location
        raise ModelError("alignment starts from the configural model, with nothing held equal across groups; remove "
                         "'invariance' and 'equal across groups' statements from the model file", where,
                         spec.source_line(where))
    for factor in spec.factors:
        inner = [i for i in factor.indicators if i.text in spec.factor_names]
        if inner:
            raise ModelError(f"alignment here needs factors measured by items, and '{factor.name.text}' is measured by "
                             f"the factor '{inner[0].text}'", inner[0].location, spec.source_line(inner[0].location))
    seen: dict[str, str] = {}
    for factor in spec.factors:
        for item in factor.indicators:
            if item.text in seen:
                raise ModelError(f"alignment here needs each item to measure one factor, and '{item.text}' measures "
                                 f"'{seen[item.text]}' and '{factor.name.text}'", item.location,
                                 spec.source_line(item.location))
            seen[item.text] = factor.name.text
    if spec.scaling:  # an option that cannot apply is an error, as the other statements here are
        where = spec.scaling[0].location
        raise ModelError("alignment scales every factor by its variance (1 and mean 0 in every group of the configural "
                         "model) and reports the groups' means and variances on the reference group's scale, so a "
                         "'scale' statement cannot apply; remove it", where, spec.source_line(where))
    settings = [r for s in spec.fixed for r in s.refs] + list(spec.freed) + [r for refs in spec.equal for r in refs]
    for ref in settings:
        if ref.group is not None:  # the pooled start and every group's configural fit share one model
            raise ModelError(f"alignment fits the same configural model in every group, so a statement for one group "
                             f"cannot apply; remove '{ref}'", ref.location, spec.source_line(ref.location))
    for ref in settings:
        if ref.kind in ("loading", "intercept", "mean") or (ref.kind == "variance" and ref.names[0] in spec.factor_names):
            raise ModelError(f"alignment starts from the configural model with every loading and intercept free in every "
                             f"group and each factor's variance 1 and mean 0; remove the statement on {ref}",
                             ref.location, spec.source_line(ref.location))
    location = spec.factors[0].name.location
    return replace(spec, scaling=(ScaleSetting((), "variance", location),))


def _layout(spec: Spec, table) -> _Layout:
    """theta indices of every group's loadings and intercepts; each must be free and its own (not fixed, not tied to
    another parameter), and each factor's variance fixed at 1 and mean at 0, as alignment needs."""
    by_key = {(p.group, p.kind, p.variables): p for p in table.parameters}
    counts = np.zeros(table.n_free, dtype=int)
    for p in table.parameters:
        for index, _ in p.terms:
            counts[index] += 1
    factors, items, loading_index, intercept_index = [], [], [], []
    for factor in spec.factors:
        name = factor.name.text
        names = tuple(i.text for i in factor.indicators)
        for g in range(table.n_groups):
            for key in [("factor_variance", (name,)), ("mean", (name,))]:
                p = by_key[(g, *key)]
                wanted = 1.0 if key[0] == "factor_variance" else 0.0
                if p.free or p.offset != wanted:
                    raise OptionError(f"alignment starts from every factor's variance 1 and mean 0 in every group, and the "
                                      f"model sets the {key[0].replace('factor_', '')} of {name} in group "
                                      f"{written_group(table.groups[g], table.groups)} otherwise; remove the statement "
                                      f"that sets it")
        rows = []
        for kind, variables in (("loading", lambda x: (name, x)), ("intercept", lambda x: (x,))):
            index = np.empty((table.n_groups, len(names)), dtype=int)
            for g in range(table.n_groups):
                for i, x in enumerate(names):
                    p = by_key[(g, kind, variables(x))]
                    if len(p.terms) != 1 or p.terms[0][1] != 1.0 or p.offset != 0.0 or counts[p.terms[0][0]] != 1:
                        raise OptionError(f"alignment needs every loading and intercept free in every group, and the model "
                                          f"fixes or ties {p.label} (group {written_group(table.groups[g], table.groups)}); "
                                          f"remove that statement")
                    index[g, i] = p.terms[0][0]
            rows.append(index)
        factors.append(name)
        items.append(names)
        loading_index.append(rows[0])
        intercept_index.append(rows[1])
    return _Layout(tuple(factors), tuple(items), tuple(loading_index), tuple(intercept_index))


def orientation(loadings: np.ndarray) -> np.ndarray:
    """+1 or -1 per group: -1 where the group's loadings point against the reference group's (a factor fixed by its
    variance has no sign of its own, so a configural fit may return it reversed in some groups), by the one rule of a
    factor's direction relative to another solution's (assessment.directions.relative_direction)."""
    return np.array([relative_direction(loadings[0], row) for row in loadings])


def _reflect_blocks(blocks: np.ndarray, signs: np.ndarray) -> np.ndarray:
    """The configural covariance blocks after reversing the loadings (not the intercepts) of the groups with sign -1."""
    I = blocks.shape[1] // 2
    d = np.concatenate([np.repeat(signs[:, None], I, axis=1), np.ones((len(signs), I))], axis=1)
    return blocks * d[:, :, None] * d[:, None, :]


def _factor_result(name: str, items: tuple[str, ...], labels: tuple[str, ...], sizes: np.ndarray, problem: FactorProblem,
                   blocks: np.ndarray, level: float, max_iterations: int) -> FactorAlignment:
    found = minimise(problem, max_iterations)
    solution = aligned_solution(problem, found.z, blocks)
    if found.flat or not (np.all(np.isfinite(solution.point_covariance)) and np.all(np.isfinite(solution.means))):
        raise EstimationError(f"the alignment of {name} has no determined minimum (the loss is flat in some direction, "
                              f"so its means and variances are not determined by the loadings and intercepts)"
                              + ("; with an estimated reference mean, this happens when the loadings are invariant: "
                                 "use the reference mean of zero" if problem.free_reference_mean else ""))
    groups = tuple(AlignedGroup(name, labels[g], int(sizes[g]), float(solution.means[g]), float(solution.mean_se[g]),
                                float(solution.variances[g]), float(solution.variance_se[g])) for g in range(len(labels)))
    parameters, invariance = [], []
    for kind, configural, aligned, covariance in (("loading", problem.loadings, solution.loadings, solution.loading_covariance),
                                                  ("intercept", problem.intercepts, solution.intercepts,
                                                   solution.intercept_covariance)):
        for i, item in enumerate(items):
            members = invariant_set(aligned[:, i], covariance[i], level)
            invariance.append(ParameterInvariance(name, item, kind, float(aligned[members, i].mean()),
                                                  tuple(labels[g] for g in np.flatnonzero(members)),
                                                  tuple(labels[g] for g in np.flatnonzero(~members))))
            se = np.sqrt(np.clip(np.diag(covariance[i]), 0, None))
            parameters += [AlignedParameter(name, item, kind, labels[g], float(configural[g, i]), float(aligned[g, i]),
                                            float(se[g]), bool(members[g])) for g in range(len(labels))]
    return FactorAlignment(name, items, found.loss, found.converged, found.iterations, groups,
                           tuple(parameters), tuple(invariance))


# ---------------------------------------------------------------------------------------------------
# the Monte Carlo check


def trust_check(spec: Spec, est, layout: _Layout, sizes: np.ndarray, variant: ReferenceMean,
                aligned: list[FactorAlignment], trials: int, seed: int, max_iterations: int) -> TrustCheck:
    """Simulate every group's rows from the aligned solution (which implies the configural model's moments), fit
    the configural model again (its groups share nothing, so each group is fitted on its own, starting from its
    estimates, with the items' sample means as intercepts: the maximum-likelihood estimates of a saturated mean
    structure), align (starting from the true values), and compare the estimated group means and variances with
    the aligned ones taken as true."""
    from cfa_tool.estimation.ml import SingularMoments
    from cfa_tool.model.parameters import ImpossibleAtStart
    from cfa_tool.pipeline.continuous import FitOptions, estimate, model_structure, moments_from_rows

    table, model, theta = est.table, est.model, est.theta
    truth = [(np.array([g.mean for g in f.groups]), np.log([g.variance for g in f.groups])) for f in aligned]
    moments = [(model.matrices(theta, g).implied_mean(), model.matrices(theta, g).implied_covariance())
               for g in range(table.n_groups)]
    own_table, _ = model_structure(spec, None, False)  # the table of one group's fit on complete rows
    position = {(p.group, p.kind, p.variables): p.terms[0][0] for p in table.parameters if p.free}
    starts = []
    for g in range(table.n_groups):
        start = np.empty(own_table.n_free)
        for p in own_table.parameters:
            if p.free:
                start[p.terms[0][0]] = theta[position[(g, p.kind, p.variables)]]
        starts.append(start)
    observed = table.observed
    positions = [[observed.index(x) for x in items] for items in layout.items]
    options = FitOptions(max_iterations=max_iterations, diagnostics=False, modification_indices=False, missing="listwise")
    rng = np.random.default_rng(seed)
    correlations: list[list[tuple[float, float, np.ndarray]]] = [[] for _ in layout.factors]
    completed = 0
    for _ in range(trials):
        loadings = np.empty((table.n_groups, len(observed), len(table.latent)))
        intercepts = np.empty((table.n_groups, len(observed)))
        ok = True
        for g, (mean, cov) in enumerate(moments):
            rows = rng.standard_normal((int(sizes[g]), len(observed))) @ np.linalg.cholesky(cov).T + mean
            try:
                fitted = estimate(spec, [(None, moments_from_rows(rows, observed))], options, start=starts[g])
            except (SingularMoments, ImpossibleAtStart):  # rows whose covariance is singular, or whose variances leave
                # a fixed covariance impossible at the start: a failed trial, as the shared refit counts them
                # (pipeline.continuous.replicate_fits); the other groups' rows are drawn all the same, so that the
                # trials after it draw what they drew before
                ok = False
                continue
            ok = ok and fitted.converged
            loadings[g] = fitted.model.matrices(fitted.theta).L
            intercepts[g] = rows.mean(axis=0)
        if not ok:
            continue
        completed += 1
        for f, name in enumerate(layout.factors):
            columns = table.latent.index(name)
            lam = loadings[:, positions[f], columns]
            problem = FactorProblem(lam * orientation(lam)[:, None], intercepts[:, positions[f]], sizes,
                                    variant is ReferenceMean.ESTIMATED)
            true_means, true_log_variances = truth[f]
            start = np.concatenate([true_means, true_log_variances])[problem.free]
            means, log_variances = problem.full(minimise(problem, max_iterations, [start]).z)
            correlations[f].append((_correlation(true_means, means),
                                    _correlation(np.exp(true_log_variances), np.exp(log_variances)), means - true_means))
    factors = []
    for f, name in enumerate(layout.factors):
        if not correlations[f]:
            factors.append(FactorCheck(name, *([float("nan")] * 5)))
            continue
        r_mean, r_var = (np.array([c[k] for c in correlations[f]]) for k in (0, 1))
        errors = np.concatenate([c[2] for c in correlations[f]])
        factors.append(FactorCheck(name, *_average_and_lowest(r_mean), *_average_and_lowest(r_var),
                                   float(np.sqrt(np.mean(errors ** 2)))))
    return TrustCheck(trials, completed, seed, tuple(factors))


def _average_and_lowest(values: np.ndarray) -> tuple[float, float]:
    """Over the trials where the correlation is defined (nan, nan when it never is)."""
    values = values[np.isfinite(values)]
    return (float(np.mean(values)), float(np.min(values))) if values.size else (float("nan"), float("nan"))


def _correlation(a: np.ndarray, b: np.ndarray) -> float:
    """Pearson's r over groups; not defined (nan) for fewer than three groups (two points always correlate +/-1) or
    values that do not vary."""
    if len(a) < 3 or np.std(a) <= 1e-12 or np.std(b) <= 1e-12:
        return float("nan")
    return float(np.corrcoef(a, b)[0, 1])


# ---------------------------------------------------------------------------------------------------
# cautions


def _cautions(result: AlignmentResult) -> list[str]:
    out = []
    for f in result.factors:
        if not f.converged:
            out.append(f"the alignment of {f.factor} did not reach a minimum of the loss (its gradient is not zero); its "
                       f"aligned means and variances are not reliable")
        share = f.noninvariant_share
        if share > CAUTION_SHARE:
            out.append(f"{100 * share:.0f}% of the loadings and intercepts of {f.factor} are flagged as non-invariant, "
                       f"more than about {100 * CAUTION_SHARE:.0f}%, the share up to which the method's authors found "
                       f"aligned means trustworthy (Asparouhov & Muthén 2014, their rule of thumb): read its aligned "
                       f"means with caution and weigh the Monte Carlo check")
    if result.check is not None:
        for c in result.check.factors:
            if c.trusted is False:
                out.append(f"in the Monte Carlo check the estimated means of {c.factor} correlate {journal_decimal(c.mean_correlation)} "
                           f"on average with the true ones, below the {journal_decimal(TRUSTED_CORRELATION, digits=2)} the method's authors ask "
                           f"for (a rule of thumb): its aligned means may not order the groups reliably")
        by_name = {f.factor: f for f in result.factors}
        for c in result.check.factors:
            ses = [g.mean_se for g in by_name[c.factor].groups if np.isfinite(g.mean_se) and g.mean_se > 0]
            if ses and np.isfinite(c.mean_error) and c.mean_error > 1.5 * float(np.sqrt(np.mean(np.square(ses)))):
                # the delta method assumes a loss that is locally quadratic; a flat or many-valleyed loss spreads the
                # aligned means further than their standard errors say
                out.append(f"in the Monte Carlo check the aligned means of {c.factor} miss the true ones by "
                           f"{c.mean_error:.2f} (root mean square), more than their standard errors (about "
                           f"{float(np.sqrt(np.mean(np.square(ses)))):.2f}) suggest: the standard errors understate the "
                           f"uncertainty of these means; read the Monte Carlo figure instead")
        if result.check.completed < result.check.trials:
            out.append(f"{result.check.trials - result.check.completed} of the {result.check.trials} Monte Carlo trials "
                       f"had a group whose configural model did not converge and were left out")
    return out
