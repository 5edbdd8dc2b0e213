"""Rotation of an unrotated solution A (p x m) to pattern loadings L and factor correlations Phi.

Gradient projection (Jennrich 2001 orthogonal, 2002 oblique; the algorithms as given by
Bernaards & Jennrich 2005):

* orthogonal: L = A T with T orthogonal; G = A' dQ/dL; the projected gradient is
  G_p = G - T sym(T'G); a step T - a G_p is taken back to the orthogonal matrices by its
  polar factor (U V' from the singular value decomposition);
* oblique: L = A (T')^-1 with unit-length columns of T, Phi = T'T;
  G = -(L' dQ/dL T^-1)'; G_p = G - T diag(1'(T o G)); a step is taken back by rescaling
  the columns of T - a G_p to unit length.

The step length a is halved until the criterion drops by at least a ||G_p||^2 / 2 (Armijo),
and doubled at the next iteration.  At a stationary point G_p = 0, which is equivalent to
L' dQ/dL symmetric (orthogonal) and Phi^-1 (dQ/dL)' L diagonal (oblique), the conditions
``stationarity`` evaluates.

Criteria with several local optima (geomin above all) are run from the unrotated start and
from random orthogonal starts (uniformly distributed: the Q factor of a Gaussian matrix with
the signs of R's diagonal; Stewart 1980; Mezzadri 2007), seeded; the lowest criterion is kept, and the
number of starts that reached it and the number of distinct optima found are reported.

Kaiser's (1958) row normalization (on request; by default for varimax and promax) rotates
the rows divided by the square roots of their communalities and scales them back.

Promax (Hendrickson & White 1964): varimax (normalized), then the least-squares
transformation U of the varimax loadings V towards the target V o |V|^(k-1), its columns
scaled so that the factor variances are 1: L = V U, Phi = (U'U)^-1; k = 4 by default
(common practice).  Promax is not a gradient-projection criterion.

Every solution is reported in one orientation: the sign of each factor makes most of its salient
pattern loadings (at least the draft's threshold, .30, in absolute value; common practice) positive;
where as many are negative as positive, their sum positive, and where none is salient, the sum of
all its loadings.  A factor of three positively worded items and two reverse-worded ones so points
the way of the three, which the sum of all loadings (small cross-loadings included) need not.  The
factors are ordered by their sums of squared pattern loadings, largest first.  The unrotated solution keeps the order of its eigenvalues;
target rotation keeps the target's order, and the sign of columns where the target specifies
a loading other than 0.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np

from cfa_tool.errors import OptionError
from cfa_tool.numbers import user_number
from cfa_tool.exploration import criteria
from cfa_tool.exploration.choices import RotationMethod
from cfa_tool.exploration.draft import DEFAULT_THRESHOLD

_ORTHOGONAL_ONLY = (RotationMethod.VARIMAX,)
_OBLIQUE_ONLY = (RotationMethod.QUARTIMIN, RotationMethod.OBLIMIN, RotationMethod.PROMAX)
DEFAULT_RANDOM_STARTS = {RotationMethod.GEOMIN: 20}  # other criteria: the unrotated start only
DEFAULT_EPSILON = 0.01  # geomin (Browne 2001; common practice)
DEFAULT_POWER = 4.0  # promax (common practice)
SAME_OPTIMUM = 1e-6  # relative difference of criterion values treated as the same optimum


@dataclass(frozen=True, eq=False)
class RotationSpec:
    """What rotation to apply.  Options left as None take the method's defaults; an option
    that does not apply to the method is an error (``checked``)."""

    method: RotationMethod = RotationMethod.QUARTIMIN
    oblique: bool | None = None  # None: the method's usual kind
    gamma: float | None = None  # oblimin's parameter (0: quartimin)
    epsilon: float | None = None  # geomin's constant
    power: float | None = None  # promax's exponent
    target: np.ndarray | None = None  # p x m, NaN where unspecified (target rotation)
    row_normalization: bool | None = None  # Kaiser (1958)
    random_starts: int | None = None  # in addition to the unrotated start
    seed: int | None = None  # of the random starts (None: 0; an exploration passes its own seed)
    tolerance: float = 1e-8  # on the norm of the projected gradient
    max_iterations: int = 20_000
    is_checked: bool = field(default=False, repr=False)  # set by ``checked``

    def checked(self, items: int | None = None, factors: int | None = None) -> "RotationSpec":
        """The spec with defaults filled in; OptionError for options that cannot apply.  With the
        numbers of items and factors, the target matrix's shape is checked too."""
        from cfa_tool import options

        if self.is_checked:
            if self.target is not None and items is not None and factors is not None:
                _check_target_shape(self.target, items, factors)
            return self
        method = options.choice(RotationMethod, self.method, "the rotation")
        name = method.value
        if method in _ORTHOGONAL_ONLY and self.oblique:
            raise OptionError(f"{name} is an orthogonal rotation; for correlated factors choose quartimin, oblimin, "
                              f"geomin, target or promax")
        if method in _OBLIQUE_ONLY and self.oblique is False:
            raise OptionError(f"{name} is an oblique rotation; for uncorrelated factors choose varimax, or geomin or "
                              f"target with uncorrelated factors")
        if method is RotationMethod.NONE and self.oblique is not None:
            raise OptionError("without rotation the factors are uncorrelated; correlated or uncorrelated factors cannot "
                              "be chosen")
        for value, label, owner in ((self.gamma, "gamma", RotationMethod.OBLIMIN),
                                    (self.epsilon, "epsilon", RotationMethod.GEOMIN),
                                    (self.power, "the power", RotationMethod.PROMAX),
                                    (self.target, "a target matrix", RotationMethod.TARGET)):
            if value is not None and method is not owner:
                raise OptionError(f"{label} applies to {owner.value} rotation only, not to {name}")
        if method in (RotationMethod.NONE, RotationMethod.PROMAX) and self.random_starts is not None:
            raise OptionError(f"random starts do not apply to {name}")
        if method is RotationMethod.NONE and self.row_normalization is not None:
            raise OptionError("row normalization applies to a rotation, and none was chosen")
        if method is RotationMethod.PROMAX and self.row_normalization is False:
            raise OptionError("promax starts from a normalized varimax rotation; row normalization cannot be turned off")
        gamma = options.real_number("oblimin's gamma", self.gamma, -100.0) if self.gamma is not None else 0.0
        if gamma > 0:
            raise OptionError(f"oblimin's gamma must be 0 or below, not {user_number(gamma)}: above 0 the criterion can have no "
                              f"minimum, and the factors drift towards perfect correlation (Jennrich 1979)")
        epsilon = (options.real_number("geomin's epsilon", self.epsilon, 0.0, 10.0, open_low=True)
                   if self.epsilon is not None else DEFAULT_EPSILON)
        power = options.real_number("promax's power", self.power, 1.0, 10.0, open_low=True) if self.power is not None \
            else DEFAULT_POWER
        starts = (options.whole_number("the number of random starts", self.random_starts, 0, 100_000)
                  if self.random_starts is not None else DEFAULT_RANDOM_STARTS.get(method, 0))
        target = None
        if method is RotationMethod.TARGET:
            if self.target is None:
                raise OptionError("target rotation needs a target matrix (loadings to aim at, unspecified ones as NaN)")
            target = np.array(self.target, dtype=float)
            if target.ndim != 2:
                raise OptionError("the target matrix must have one row per item and one column per factor")
            if items is not None and factors is not None:
                _check_target_shape(target, items, factors)
            if not np.isfinite(target).any() or np.isinf(target).any():
                raise OptionError("the target matrix must specify at least one loading, and only finite values")
        oblique = self.oblique
        if oblique is None:
            oblique = method not in _ORTHOGONAL_ONLY and method is not RotationMethod.NONE
        normalization = self.row_normalization
        if normalization is None:
            normalization = method in (RotationMethod.VARIMAX, RotationMethod.PROMAX)
        return replace(self, method=method, oblique=bool(oblique), gamma=gamma if method is RotationMethod.OBLIMIN else None,
                       epsilon=epsilon if method is RotationMethod.GEOMIN else None,
                       power=power if method is RotationMethod.PROMAX else None, target=target,
                       row_normalization=bool(normalization) if method is not RotationMethod.NONE else False,
                       random_starts=starts, seed=options.seed(0 if self.seed is None else self.seed),
                       tolerance=options.real_number("the rotation tolerance", self.tolerance, 0.0, 1.0, open_low=True),
                       max_iterations=options.whole_number("the rotation's iteration limit", self.max_iterations, 1,
                                                           options.MAX_ITERATIONS), is_checked=True)

    def criterion(self) -> criteria.Criterion | None:
        """The gradient-projection criterion of the (checked) spec; None for no rotation and promax."""
        method = self.method
        if method is RotationMethod.VARIMAX:
            return criteria.varimax()
        if method in (RotationMethod.QUARTIMIN, RotationMethod.OBLIMIN):
            return criteria.oblimin(self.gamma or 0.0)
        if method is RotationMethod.GEOMIN:
            return criteria.geomin(self.epsilon)
        if method is RotationMethod.TARGET:
            return criteria.target(self.target)
        return None


def _check_target_shape(target: np.ndarray, items: int, factors: int) -> None:
    if target.shape != (items, factors):
        raise OptionError(f"the target matrix must have one row per item and one column per factor ({items} x {factors}), "
                          f"not {target.shape[0]} x {target.shape[1]}")


@dataclass(frozen=True, eq=False)
class RotatedSolution:
    """Pattern loadings L = A M and factor correlations Phi = M^-1 M^-1' of an unrotated A."""

    spec: RotationSpec  # checked: every default filled in
    pattern: np.ndarray  # p x m
    factor_correlations: np.ndarray  # m x m (identity for orthogonal rotations)
    transformation: np.ndarray  # M (m x m), in the reported order and signs
    criterion_value: float  # at the reported solution (NaN for promax and no rotation)
    converged: bool
    iterations: int  # of the best start
    starts: int  # starts run (the unrotated one included)
    starts_at_best: int  # starts that reached the lowest criterion value
    distinct_optima: int  # different criterion values among converged starts
    #: promax only: the (normalized) varimax loadings it started from, and the order and signs applied after
    promax_base: np.ndarray | None = None
    column_order: tuple[int, ...] = ()
    signs: tuple[float, ...] = ()

    @property
    def oblique(self) -> bool:
        return self.spec.oblique

    @property
    def structure(self) -> np.ndarray:
        """Correlations of items with factors, L Phi."""
        return self.pattern @ self.factor_correlations


def random_orthogonal(m: int, rng: np.random.Generator) -> np.ndarray:
    """A uniformly distributed orthogonal matrix (Stewart 1980; Mezzadri 2007)."""
    Q, R = np.linalg.qr(rng.standard_normal((m, m)))
    return Q * np.where(np.diag(R) < 0, -1.0, 1.0)


def _gradient_projection(A: np.ndarray, criterion: criteria.Criterion, T: np.ndarray, tolerance: float,
                         max_iterations: int, oblique: bool) -> tuple[np.ndarray, float, int, bool]:
    """The gradient-projection iteration (see the module's docstring): (T, Q, iterations, converged).

    Near the optimum the criterion's decrease falls below its rounding error before the
    projected gradient reaches the tolerance; once even a unit step could not show a decrease
    (||G_p||^2 / 2 below the rounding error), a step is accepted when it changes the criterion
    by no more than rounding and makes the projected gradient smaller."""

    def evaluate(T):
        if oblique:
            Ti = np.linalg.inv(T)
            L = A @ Ti.T
            f, Gq = criterion.evaluate(L)
            return f, -(L.T @ Gq @ Ti).T
        f, Gq = criterion.evaluate(A @ T)
        return f, A.T @ Gq

    def project(T, G):
        if oblique:
            return G - T * np.sum(T * G, axis=0)
        M = T.T @ G
        return G - T @ (0.5 * (M + M.T))

    def retract(X):
        if oblique:
            return X / np.sqrt(np.sum(X * X, axis=0))
        U, _, Vt = np.linalg.svd(X)
        return U @ Vt

    f, G = evaluate(T)
    Gp = project(T, G)
    s = float(np.linalg.norm(Gp))
    step = 1.0
    for iteration in range(max_iterations):
        if s < tolerance:
            return T, f, iteration, True
        rounding = 64.0 * np.finfo(float).eps * (1.0 + abs(f))
        step *= 2.0
        for _ in range(40):
            Tt = retract(T - step * Gp)
            try:
                ft, Gt = evaluate(Tt)
            except np.linalg.LinAlgError:
                step *= 0.5
                continue
            if f - ft > 0.5 * s * s * step:
                Gpt = project(Tt, Gt)
                break
            if 0.5 * s * s <= rounding and abs(ft - f) <= rounding:  # decreases are lost in rounding
                Gpt = project(Tt, Gt)
                if np.linalg.norm(Gpt) < s:
                    break
            step *= 0.5
        else:
            return T, f, iteration, False
        T, f, G, Gp = Tt, ft, Gt, Gpt
        s = float(np.linalg.norm(Gp))
    return T, f, max_iterations, s < tolerance


def gp_orthogonal(A: np.ndarray, criterion: criteria.Criterion, T: np.ndarray, tolerance: float = 1e-8,
                  max_iterations: int = 20_000) -> tuple[np.ndarray, float, int, bool]:
    """Gradient projection for orthogonal rotation (Jennrich 2001): (T, Q, iterations, converged)."""
    return _gradient_projection(A, criterion, T, tolerance, max_iterations, oblique=False)


def gp_oblique(A: np.ndarray, criterion: criteria.Criterion, T: np.ndarray, tolerance: float = 1e-8,
               max_iterations: int = 20_000) -> tuple[np.ndarray, float, int, bool]:
    """Gradient projection for oblique rotation (Jennrich 2002): (T, Q, iterations, converged)."""
    return _gradient_projection(A, criterion, T, tolerance, max_iterations, oblique=True)


def stationarity(L: np.ndarray, Phi: np.ndarray, criterion: criteria.Criterion, oblique: bool,
                 row_normalization: bool) -> np.ndarray:
    """The rotation's first-order conditions at (L, Phi), zero at a stationary point of the
    criterion: the off-diagonal elements of Phi^-1 (dQ/dL)' L (oblique, m(m-1) values) or of
    the skew-symmetric part of L' dQ/dL (orthogonal, m(m-1)/2 values); with row
    normalization, of the normalized rows."""
    if row_normalization:
        h = np.sqrt(np.einsum("ik,kl,il->i", L, Phi, L))
        L = L / np.where(h > 0, h, 1.0)[:, None]
    _, Gq = criterion.evaluate(L)
    m = L.shape[1]
    if oblique:
        M = np.linalg.solve(Phi, Gq.T @ L)
        return M[~np.eye(m, dtype=bool)]
    M = L.T @ Gq
    return (M - M.T)[np.tril_indices(m, -1)]


#: the orientation rule in a report's words (the note under the loadings)
ORIENTATION_RULE = (f"Signs: each factor is turned so that most of its loadings of {DEFAULT_THRESHOLD:.2f} or more (in "
                    f"absolute value) are positive (with as many negative, so that their sum is); negative loadings then "
                    f"mark the items worded against the factor's direction.").replace("0.", ".", 1)


def orientation_signs(pattern: np.ndarray, salient: float = DEFAULT_THRESHOLD) -> np.ndarray:
    """The sign (+1 or -1) of each factor that makes most of its salient loadings (``salient`` or more in absolute
    value) positive; ties by the sum of the salient loadings, then by the sum of all (the module's docstring)."""
    big = np.abs(pattern) >= salient
    keys = (np.sum(np.sign(pattern) * big, axis=0), np.sum(pattern * big, axis=0), pattern.sum(axis=0))
    signs = np.ones(pattern.shape[1])
    for j in range(pattern.shape[1]):
        deciding = next((float(k[j]) for k in keys if k[j] != 0), 0.0)
        signs[j] = -1.0 if deciding < 0 else 1.0
    return signs


def align(pattern: np.ndarray, Phi: np.ndarray, sort: bool = True,
          fixed_sign: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """The reported orientation (see the module's docstring): (pattern, Phi, order, signs).
    Columns marked in ``fixed_sign`` keep their sign."""
    signs = orientation_signs(pattern)
    if fixed_sign is not None:
        signs = np.where(fixed_sign, 1.0, signs)
    P = pattern * signs
    order = np.argsort(-np.sum(P * P, axis=0), kind="stable") if sort else np.arange(pattern.shape[1])
    P = P[:, order]
    Phi = (Phi * np.outer(signs, signs))[np.ix_(order, order)]
    return P, Phi, order, signs


def rotate(A: np.ndarray, spec: RotationSpec | None = None) -> RotatedSolution:
    """Rotate the unrotated loadings A (p x m) as ``spec`` says."""
    A = np.asarray(A, dtype=float)
    p, m = A.shape
    spec = (spec or RotationSpec()).checked(p, m)
    method = spec.method
    if method is RotationMethod.NONE or m == 1:
        P, Phi, order, signs = align(A, np.eye(m), sort=False)
        transformation = np.diag(signs)[:, order]
        return RotatedSolution(spec, P, Phi, transformation, float("nan"), True, 0, 1, 1, 1, None, tuple(order.tolist()),
                               tuple(signs.tolist()))
    if method is RotationMethod.PROMAX:
        return _promax(A, spec)
    h = np.sqrt(np.sum(A * A, axis=1)) if spec.row_normalization else np.ones(p)
    An = A / np.where(h > 0, h, 1.0)[:, None]  # an item without common variance stays a row of zeros
    criterion = spec.criterion()
    rng = np.random.default_rng(spec.seed)
    starts = [np.eye(m)] + [random_orthogonal(m, rng) for _ in range(spec.random_starts)]
    runner = gp_oblique if spec.oblique else gp_orthogonal
    runs = [runner(An, criterion, T0, spec.tolerance, spec.max_iterations) for T0 in starts]
    values = np.array([r[1] for r in runs])
    best = int(np.argmin(values))
    T, f, iterations, converged = runs[best]
    scale = SAME_OPTIMUM * max(1.0, abs(f))
    at_best = int(np.sum(np.abs(values - f) <= scale))
    converged_values = np.sort([r[1] for r in runs if r[3]])
    distinct = int(1 + np.sum(np.diff(converged_values) > scale)) if len(converged_values) else 0
    M = np.linalg.inv(T).T if spec.oblique else T
    Phi = T.T @ T if spec.oblique else np.eye(m)
    if method is RotationMethod.TARGET:  # the target's columns keep their order, and their sign where it is specified
        specified = np.isfinite(spec.target) & (spec.target != 0)
        P, Phi, order, signs = align(A @ M, Phi, sort=False, fixed_sign=specified.any(axis=0))
    else:
        P, Phi, order, signs = align(A @ M, Phi)
    transformation = (M * signs)[:, order]
    return RotatedSolution(spec, P, Phi, transformation, float(f), bool(converged), int(iterations), len(starts), at_best,
                           distinct, None, tuple(order.tolist()), tuple(signs.tolist()))


def promax_from_varimax(V: np.ndarray, power: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(pattern, Phi, U) of promax from varimax loadings V (Hendrickson & White 1964), before alignment."""
    target = V * np.abs(V) ** (power - 1.0)
    U = np.linalg.solve(V.T @ V, V.T @ target)
    U = U * np.sqrt(np.diag(np.linalg.inv(U.T @ U)))
    return V @ U, np.linalg.inv(U.T @ U), U


def _promax(A: np.ndarray, spec: RotationSpec) -> RotatedSolution:
    base = rotate(A, RotationSpec(RotationMethod.VARIMAX, row_normalization=True, tolerance=spec.tolerance,
                                  max_iterations=spec.max_iterations))
    V = base.pattern
    pattern, Phi, U = promax_from_varimax(V, spec.power)
    Phi = 0.5 * (Phi + Phi.T)
    P, Phi, order, signs = align(pattern, Phi)
    transformation = ((base.transformation @ U) * signs)[:, order]
    return RotatedSolution(spec, P, Phi, transformation, float("nan"), base.converged, base.iterations, 1, 1, 1, V,
                           tuple(order.tolist()), tuple(signs.tolist()))
