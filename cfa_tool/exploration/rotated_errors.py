"""Standard errors of rotated loadings and factor correlations by the delta method.

The rotated solution is the estimate of a correlation structure (``correlation_structure``)
whose parameters theta = (L, Phi) are identified by the rotation's first-order conditions
c(theta) = 0 (``rotation.stationarity``).  Its asymptotic covariance is the constrained
sandwich

    acov(theta) = P D'V Gamma V D P / N,   P = the upper-left block of [[D'V D, C'], [C, 0]]^-1,

with D = d rho / d theta', C = d c / d theta', V the weight of the extraction (maximum
likelihood: V_ab = W_ik W_jl + W_il W_jk with W the inverse implied correlation matrix;
least squares: the identity) and Gamma the asymptotic covariance of sqrt(N)(r - rho)
(normal theory for Pearson correlations, the polychoric one for ordinal items).  Bordering
the information with the rotation constraints is the method of Jennrich (1973, 1974), for
constrained estimators in general Aitchison & Silvey (1958) and Silvey (1959); the sandwich form follows Browne (1984),
and the correlation structure gives standard errors of standardized loadings (Cudeck 1989;
for rotated loadings Cudeck & O'Dell 1994).  C is obtained by central differences of the analytic criterion gradients.

Promax is not the optimum of a criterion: its standard errors follow from those of the
normalized varimax solution it starts from, through the derivatives (central differences) of
the promax transformation (the delta method).

No standard errors are given for a solution with a uniqueness at its bound (the structure's
unit diagonal no longer holds and the estimate is on the boundary), nor for unrotated
loadings of several factors (their orientation is not a rotation criterion's optimum).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.exploration import correlation_structure as cs
from cfa_tool.exploration.choices import ErrorsUnavailable, ExtractionMethod, RotationMethod
from cfa_tool.exploration.correlations import CorrelationInput
from cfa_tool.exploration.extraction import FactorSolution
from cfa_tool.exploration.rotation import RotatedSolution, promax_from_varimax, stationarity

_STEP = 1e-6  # central differences


@dataclass(frozen=True, eq=False)
class LoadingErrors:
    """Standard errors of the reported pattern loadings and factor correlations."""

    pattern: np.ndarray  # p x m (NaN when unavailable)
    factor_correlations: np.ndarray  # m x m, 0 on the diagonal and for orthogonal rotations
    covariance: np.ndarray | None  # of (pattern row by row, factor correlations below the diagonal)
    unavailable: ErrorsUnavailable | None = None
    normal_theory: bool = True  # Gamma from normal theory (Pearson) or from the polychoric correlations


def _unavailable(p: int, m: int, reason: ErrorsUnavailable, normal: bool) -> LoadingErrors:
    return LoadingErrors(np.full((p, m), np.nan), np.full((m, m), np.nan), None, reason, normal)


def _central_jacobian(function, theta: np.ndarray) -> np.ndarray:
    columns = []
    for k in range(len(theta)):
        up, down = theta.copy(), theta.copy()
        up[k] += _STEP
        down[k] -= _STEP
        columns.append((function(up) - function(down)) / (2.0 * _STEP))
    return np.column_stack(columns)


def constrained_covariance(data: CorrelationInput, method: ExtractionMethod, L: np.ndarray, Phi: np.ndarray,
                           oblique: bool, constraints=None) -> np.ndarray | None:
    """acov(theta) of the module's docstring, or None when the bordered matrix is singular.
    ``constraints(theta)`` returns c(theta); None for a solution without rotation (one factor)."""
    p, m = L.shape
    theta = cs.pack(L, Phi, oblique)
    delta = cs.jacobian(L, Phi, oblique)
    if method is ExtractionMethod.MAXIMUM_LIKELIHOOD:
        sigma = L @ Phi @ L.T
        sigma[np.diag_indices(p)] = 1.0
        VD = cs.weighted(delta, np.linalg.inv(sigma))
    else:
        VD = delta
    bread = delta.T @ VD
    meat = VD.T @ data.pair_covariance_times(VD)  # no matrix of the pairs by the pairs for Pearson input
    q = len(theta)
    if constraints is not None:
        C = _central_jacobian(constraints, theta)
        C = C / np.linalg.norm(C, axis=1, keepdims=True).clip(1e-300)
        r = C.shape[0]
        bordered = np.block([[bread, C.T], [C, np.zeros((r, r))]])
    else:
        bordered = bread
    if np.linalg.cond(bordered) > 1e12:
        return None
    P = np.linalg.inv(bordered)[:q, :q]
    acov = P @ meat @ P / data.n_obs
    return 0.5 * (acov + acov.T)


def loading_errors(data: CorrelationInput, solution: FactorSolution, rotated: RotatedSolution) -> LoadingErrors:
    """Standard errors of ``rotated`` (obtained from ``solution`` of ``data``)."""
    L, Phi = rotated.pattern, rotated.factor_correlations
    p, m = L.shape
    spec = rotated.spec
    normal = data.gamma is None
    if solution.at_bound:
        return _unavailable(p, m, ErrorsUnavailable.UNIQUENESS_AT_BOUND, normal)
    if m == 1:
        acov = constrained_covariance(data, solution.method, L, Phi, False)
    elif spec.method is RotationMethod.NONE:
        return _unavailable(p, m, ErrorsUnavailable.UNROTATED_SEVERAL_FACTORS, normal)
    elif spec.method is RotationMethod.PROMAX:
        acov = _promax_covariance(data, solution.method, rotated)
    else:
        criterion = spec.criterion()

        def constraints(theta):
            Lt, Pt = cs.unpack(theta, p, m, spec.oblique)
            return stationarity(Lt, Pt, criterion, spec.oblique, spec.row_normalization)

        acov = constrained_covariance(data, solution.method, L, Phi, spec.oblique, constraints)
    if acov is None:
        return _unavailable(p, m, ErrorsUnavailable.SINGULAR_INFORMATION, normal)
    se = np.sqrt(np.clip(np.diag(acov), 0.0, None))
    phi_se = np.zeros((m, m))
    oblique = spec.oblique and m > 1
    if oblique:
        k, l = np.tril_indices(m, -1)
        phi_se[k, l] = phi_se[l, k] = se[p * m:]
    return LoadingErrors(se[: p * m].reshape(p, m), phi_se, acov, None, normal)


def _promax_covariance(data: CorrelationInput, method: ExtractionMethod, rotated: RotatedSolution) -> np.ndarray | None:
    from cfa_tool.exploration.criteria import varimax

    V = rotated.promax_base
    p, m = V.shape
    criterion = varimax()

    def constraints(theta):
        return stationarity(theta.reshape(p, m), np.eye(m), criterion, False, True)

    base = constrained_covariance(data, method, V, np.eye(m), False, constraints)
    if base is None:
        return None
    order, signs = np.asarray(rotated.column_order), np.asarray(rotated.signs)
    power = rotated.spec.power

    def promax(theta):
        pattern, Phi, _ = promax_from_varimax(theta.reshape(p, m), power)
        pattern = (pattern * signs)[:, order]
        Phi = (Phi * np.outer(signs, signs))[np.ix_(order, order)]
        return cs.pack(pattern, Phi, True)

    J = _central_jacobian(promax, V.ravel())
    return J @ base @ J.T
