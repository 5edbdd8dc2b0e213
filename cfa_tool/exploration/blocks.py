"""Rotation of the exploratory blocks of a fitted confirmatory model (exploratory structural equation
modelling; Asparouhov & Muthén 2009).

A block's factors are fitted in the rotational identification of exploratory factor analysis
(factor variances 1, factors uncorrelated, the j-th factor's loadings on the block's first j - 1
items fixed at 0; see ``language.spec.ExploratoryBlock``).  Its loadings are then rotated as an
exploratory solution is (``exploration.rotation``, gradient projection): the unrotated loadings A
are standardized by the items' model-implied standard deviations (1 for the latent responses of
ordinal items, whose residual variances are 1 minus their common variances; Muthén 1984) (so that the rotation does not
depend on the items' units, as an exploratory analysis of correlations does), the rotation gives
the transformation M, and

    standardized pattern  L* = D^-1 A M,   pattern L = A M,
    factor correlations   Phi* = M^-1 M^-1'  (identity for an orthogonal rotation),
    with another factor g  cov(f*, g) = M^-1 cov(f, g), with another block's rotated factors
                           cov(f*, g*) = M^-1 cov(f, g) M_g^-1'  (the rotated factors have variance 1).

The chi-square, degrees of freedom and modification indices of the model do not depend on the
rotation: every rotation of A gives the same implied moments.

Standard errors by the delta method: the covariance of the rotated quantities is J acov(theta) J'
with J the total derivative of the rotated quantities with respect to the free parameters theta.
The rotation T(theta) is defined implicitly by the rotation's first-order conditions
F(T, theta) = 0 (``rotation.stationarity``, with unit-length columns of T for oblique and T'T = I for
orthogonal rotations), so by implicit differentiation dT/dtheta = -F_T^-1 F_theta; the partial
derivatives F_T, F_theta and those of the rotated quantities in theta and T are central
differences of these smooth, explicit functions (step 1e-6).  This is the delta method for
rotated loadings of Jennrich (1973), as Asparouhov & Muthén (2009) apply it to a model's blocks.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool import options
from cfa_tool.exploration.choices import BlockErrors, FactorNaming, RotationMethod
from cfa_tool.exploration.rotation import RotatedSolution, RotationSpec, rotate, stationarity
from cfa_tool.numerics.plain import clean

_STEP = 1e-6  # central differences


@dataclass(frozen=True, eq=False)
class RotatedBlock:
    """One exploratory block of a fitted model, rotated, with delta-method standard errors."""

    factors: tuple[str, ...]  # the names as written: the k-th to the rotated factor its anchor (the k-th item) loads on most
    items: tuple[str, ...]
    rotation: RotationMethod
    oblique: bool
    pattern: np.ndarray  # items x factors, in the items' units
    pattern_se: np.ndarray
    standardized: np.ndarray  # items x factors, by the items' model-implied standard deviations
    standardized_se: np.ndarray
    correlations: np.ndarray  # factors x factors
    correlations_se: np.ndarray
    other_factors: tuple[str, ...]  # every other factor of the model (other blocks' factors rotated)
    other_correlations: np.ndarray  # factors x other factors
    other_correlations_se: np.ndarray
    names_by: FactorNaming  # how the names were given to the rotated factors
    errors: BlockErrors  # where the standard errors come from, or why there are none
    criterion_value: float
    converged: bool
    starts: int
    starts_at_best: int
    target: np.ndarray | None = None  # items x factors: 0 where aimed, NaN where free

    def to_dict(self) -> dict:
        return clean({
            "factors": list(self.factors), "items": list(self.items), "rotation": self.rotation.value,
            "oblique": self.oblique, "names_by": self.names_by.value, "pattern": self.pattern.tolist(), "pattern_se": self.pattern_se.tolist(),
            "standardized": self.standardized.tolist(), "standardized_se": self.standardized_se.tolist(),
            "factor_correlations": self.correlations.tolist(), "factor_correlations_se": self.correlations_se.tolist(),
            "other_factors": list(self.other_factors), "other_correlations": self.other_correlations.tolist(),
            "other_correlations_se": self.other_correlations_se.tolist(), "criterion": self.criterion_value,
            "rotation_converged": self.converged, "starts": self.starts, "starts_at_best": self.starts_at_best,
            "standard_errors": self.errors.value,
            "target": self.target.tolist() if self.target is not None else None,
        })


def block_rotation_spec(block) -> RotationSpec:
    """The rotation a block names, checked (defaults of ``exploration.rotation``)."""
    method = options.choice(RotationMethod, block.rotation.text, "the rotation")
    target = np.array(block.target_matrix(), dtype=float) if method is RotationMethod.TARGET else None
    return RotationSpec(method, target=target).checked(len(block.items), len(block.factors))


class _Layout:
    """Where a block's pieces sit in the model's matrices."""

    def __init__(self, model, block, unit_variance: frozenset[str] = frozenset()):
        table = model.table
        self.model = model
        self.rows = np.array([table.observed.index(x) for x in block.item_names])
        self.cols = np.array([table.latent.index(f) for f in block.factor_names])
        # items whose model-implied variance is 1 by the fit's identification (the latent responses of ordinal
        # items, and items analysed in the correlation metric beside them): their residual variance is 1 minus
        # their common variance, not the 1 the fitted matrices hold
        self.unit = np.array([x in unit_variance for x in block.item_names], dtype=bool)

    def pieces(self, theta: np.ndarray):
        """(A, D): unrotated loadings and the items' model-implied SDs."""
        mats = self.model.matrices(theta)
        A = mats.L[np.ix_(self.rows, self.cols)]
        sd = np.where(self.unit, 1.0, np.sqrt(np.diag(mats.implied_covariance())[self.rows]))
        return A, sd


def _transformation(T: np.ndarray, rotated: RotatedSolution) -> np.ndarray:
    """M of the reported solution from the gradient-projection matrix T (order and signs as reported)."""
    M = np.linalg.inv(T).T if rotated.oblique else T
    return (M * np.asarray(rotated.signs))[:, list(rotated.column_order)]


def _conditions(T: np.ndarray, As: np.ndarray, spec: RotationSpec) -> np.ndarray:
    """F(T, A) = 0 at the rotation: the criterion's first-order conditions and T's own constraints."""
    m = T.shape[0]
    criterion = spec.criterion()
    if spec.oblique:
        L, Phi = As @ np.linalg.inv(T).T, T.T @ T
        return np.concatenate([stationarity(L, Phi, criterion, True, spec.row_normalization), np.sum(T * T, axis=0) - 1])
    rows, cols = np.triu_indices(m)
    return np.concatenate([stationarity(As @ T, np.eye(m), criterion, False, spec.row_normalization),
                           (T.T @ T - np.eye(m))[rows, cols]])


def _names_by_anchor(pattern: np.ndarray, spec: RotationSpec) -> tuple[np.ndarray, np.ndarray]:
    """(columns, signs): the rotated factor that takes the k-th name, and its sign.

    The k-th factor of the block is anchored by the block's k-th item (the echelon zeros), so the k-th name
    goes to the rotated factor on which the k-th item loads most: an assignment of the names to the factors
    maximizing the sum of the anchors' absolute loadings (the linear assignment problem; Kuhn 1955, solved
    by scipy.optimize.linear_sum_assignment), each factor reflected so that its anchor loads positively.  A
    target rotation keeps its columns: the names follow the target."""
    from scipy.optimize import linear_sum_assignment

    m = pattern.shape[1]
    if spec.method is RotationMethod.TARGET or m < 2:
        return np.arange(m), np.ones(m)
    _, columns = linear_sum_assignment(-np.abs(pattern[:m, :]))
    signs = np.where(pattern[np.arange(m), columns] < 0, -1.0, 1.0)
    return columns, signs


def _central(function, x: np.ndarray) -> np.ndarray:
    columns = []
    for k in range(x.size):
        up, down = x.copy(), x.copy()
        up.flat[k] += _STEP
        down.flat[k] -= _STEP
        columns.append((np.ravel(function(up)) - np.ravel(function(down))) / (2.0 * _STEP))
    return np.column_stack(columns)


@dataclass(frozen=True, eq=False)
class _Orientation:
    """One block's rotation at the estimates: the gradient-projection matrix T, the naming of its columns and
    dT/dtheta (None when it cannot be computed; zeros when the block is not rotated)."""

    layout: _Layout
    spec: RotationSpec
    rotated: RotatedSolution
    T: np.ndarray
    keep: np.ndarray
    flips: np.ndarray
    dT: np.ndarray | None
    errors: BlockErrors

    @property
    def fixed(self) -> bool:
        return self.spec.method is RotationMethod.NONE or self.T.shape[0] == 1

    def transformation(self, T: np.ndarray) -> np.ndarray:
        """M of the reported, named solution from T."""
        return _transformation(T, self.rotated)[:, self.keep] * self.flips


def _orient(layout: _Layout, spec: RotationSpec, theta: np.ndarray, acov: np.ndarray | None) -> _Orientation:
    A, sd = layout.pieces(theta)[:2]
    m = A.shape[1]
    rotated = rotate(A / sd[:, None], spec)
    M = rotated.transformation
    # the gradient-projection matrix T of the reported solution, before its columns were ordered and signed
    order = np.asarray(rotated.column_order)
    unordered = np.empty_like(M)
    unordered[:, order] = M
    M0 = unordered / np.asarray(rotated.signs)
    T = np.linalg.inv(M0).T if rotated.oblique else M0
    keep, flips = _names_by_anchor(rotated.pattern, spec)
    if acov is None:
        return _Orientation(layout, spec, rotated, T, keep, flips, None, BlockErrors.NO_PARAMETER_COVARIANCE)
    if spec.method is RotationMethod.NONE or m == 1:
        return _Orientation(layout, spec, rotated, T, keep, flips, np.zeros((m * m, theta.size)), BlockErrors.DELTA_METHOD)

    def standardized(th):
        A_, sd_ = layout.pieces(th)[:2]
        return A_ / sd_[:, None]

    As = standardized(theta)
    F_T = _central(lambda t: _conditions(t.reshape(m, m), As, spec), T.ravel())
    if not np.linalg.cond(F_T) < 1e12:
        return _Orientation(layout, spec, rotated, T, keep, flips, None, BlockErrors.SINGULAR_ROTATION)
    F_theta = _central(lambda th: _conditions(T, standardized(th), spec), theta)
    dT = -np.linalg.solve(F_T, F_theta)
    return _Orientation(layout, spec, rotated, T, keep, flips, dT, BlockErrors.DELTA_METHOD)


def _rotated_block(k: int, orientations: list[_Orientation], block, theta: np.ndarray,
                   acov: np.ndarray | None) -> RotatedBlock:
    """Block k's rotated loadings, factor correlations and correlations with every other factor of the model
    (the other blocks' factors rotated too): with W the identity but for each block's M^-1 on its factors,
    the rotated factors' covariances are W Phi W' (Phi: the fitted factor covariances)."""
    own = orientations[k]
    layout, spec, rotated = own.layout, own.spec, own.rotated
    model = layout.model
    latent = model.table.latent
    cols = layout.cols
    others = tuple(g for g in latent if g not in block.factor_names)
    other_cols = np.array([latent.index(g) for g in others], dtype=int)
    p, m = len(layout.rows), len(cols)

    def outputs(theta_: np.ndarray, Ts: list[np.ndarray]) -> np.ndarray:
        A_, sd_ = layout.pieces(theta_)[:2]
        phi = model.matrices(theta_).latent_covariance()
        W = np.eye(len(latent))
        for o, T_ in zip(orientations, Ts):
            W[np.ix_(o.layout.cols, o.layout.cols)] = np.linalg.inv(o.transformation(T_))
        psi = W @ phi @ W.T
        pattern = A_ @ own.transformation(Ts[k])
        sd_all = np.sqrt(np.clip(np.diag(psi), 1e-300, None))
        other = psi[np.ix_(cols, other_cols)] / np.outer(sd_all[cols], sd_all[other_cols])
        return np.concatenate([pattern.ravel(), (pattern / sd_[:, None]).ravel(), psi[np.ix_(cols, cols)].ravel(),
                               other.ravel()])

    Ts = [o.T for o in orientations]
    values = outputs(theta, Ts)
    sizes = [p * m, p * m, m * m, m * len(others)]
    errors = own.errors
    se_all = np.full_like(values, np.nan)
    if acov is not None:
        J = _central(lambda th: outputs(th, Ts), theta)
        lost = np.zeros(values.size, dtype=bool)
        for b, o in enumerate(orientations):
            if o.fixed:
                continue

            def moved(t, b=b):
                changed = list(Ts)
                changed[b] = t.reshape(o.T.shape)
                return outputs(theta, changed)

            G = _central(moved, o.T.ravel())
            if o.dT is None:
                lost |= np.any(np.abs(G) > 1e-9, axis=1)
            else:
                J = J + G @ o.dT
        se_all = np.sqrt(np.clip(np.einsum("ij,jk,ik->i", J, acov, J), 0.0, None))
        se_all[lost] = np.nan
    pieces = np.split(values, np.cumsum(sizes)[:-1])
    se = np.split(se_all, np.cumsum(sizes)[:-1])
    phi_se = se[2].reshape(m, m)
    phi_se[np.diag_indices(m)] = 0.0
    if not spec.oblique:
        phi_se[:] = 0.0
    return RotatedBlock(
        factors=tuple(block.factor_names), items=block.item_names, rotation=spec.method, oblique=bool(spec.oblique),
        pattern=pieces[0].reshape(p, m), pattern_se=se[0].reshape(p, m),
        standardized=pieces[1].reshape(p, m), standardized_se=se[1].reshape(p, m),
        correlations=pieces[2].reshape(m, m), correlations_se=phi_se,
        other_factors=others, other_correlations=pieces[3].reshape(m, len(others)),
        other_correlations_se=se[3].reshape(m, len(others)), errors=errors,
        criterion_value=rotated.criterion_value, converged=rotated.converged, starts=rotated.starts,
        starts_at_best=rotated.starts_at_best, target=spec.target,
        names_by=(FactorNaming.ONE_FACTOR if m == 1 else FactorNaming.TARGET if spec.method is RotationMethod.TARGET
                  else FactorNaming.ANCHOR_ITEMS))


def rotate_blocks(model, spec, theta: np.ndarray | None, acov: np.ndarray | None,
                  unit_variance: frozenset[str] = frozenset()) -> tuple[RotatedBlock, ...]:
    """Every exploratory block of ``spec`` (a fitted single-group model), rotated, with delta-method standard
    errors (``acov``: the covariance of theta, None for none); none without estimates.  ``unit_variance``: the
    items whose model-implied variance is 1 (ordinal items' latent responses)."""
    if theta is None or not spec.exploratory:
        return ()
    orientations = [_orient(_Layout(model, block, unit_variance), block_rotation_spec(block), theta, acov)
                    for block in spec.exploratory]
    return tuple(_rotated_block(k, orientations, block, theta, acov) for k, block in enumerate(spec.exploratory))
