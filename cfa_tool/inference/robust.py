"""Corrections for non-normal data with complete rows.

With s the sample moments (means when the model has a mean structure, and
vech(S)), Gamma the asymptotic covariance of sqrt(N)(s - sigma) estimated
from fourth-order moments (Browne 1984), V the normal-theory weight
blockdiag(Sigma^-1, W), W = 1/2 D'(Sigma^-1 (x) Sigma^-1) D, and Delta the
derivatives of the implied moments:

* robust (sandwich) covariance of the estimates:
  (D'VD)^-1 D'V Gamma V D (D'VD)^-1 / N  (Browne 1984; Satorra & Bentler 1994);
* scaling factor c = tr(U Gamma) / df with U = V - V D (D'VD)^-1 D'V, and the
  scaled statistic T / c (Satorra & Bentler 1994);
* robust RMSEA, CFI and TLI estimate noncentrality as T - c df
  (Brosseau-Liard, Savalei & Li 2012; Brosseau-Liard & Savalei 2014).

With groups, every block is weighted by the group's share of N; groups that share clusters (domains of one
cluster sample) have a joint Gamma whose blocks between groups are not zero (cfa_tool.inference.design).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from cfa_tool.numerics import distributions as dist

from cfa_tool.numerics.linalg import scaled_inverse
from cfa_tool.assessment.fit_indices import cfi_from, rmsea_from, rmsea_interval, tli_from
from cfa_tool.estimation.ml import NormalLikelihood
from cfa_tool.inference.design import GroupsMeat, groups_meat, moment_contributions, moment_covariance
from cfa_tool.method import FitTest
from cfa_tool.numbers import rounded_number, word_list
from cfa_tool.model.implied import StructuredModel


@dataclass(frozen=True)
class RobustFit:
    """A corrected test statistic with the robust fit indices computed from it."""

    test: FitTest  # which correction
    scaling_factor: float
    chi_square_scaled: float
    df: int
    p_value_scaled: float
    baseline_scaling_factor: float
    baseline_chi_square_scaled: float
    cfi_robust: float
    tli_robust: float
    rmsea_robust: float
    rmsea_robust_ci90: tuple[float, float]
    # the scale-shifted form (Asparouhov & Muthén 2010): statistic = scale * chi-square + shift (None otherwise)
    scale: float | None = None
    shift: float | None = None
    #: the scaling comes from the design-based covariance of a sampling design (pipeline.inputs.with_design)
    design: bool = False
    #: why the scaled statistic could not be computed (empty: it was): a scaling factor that is not positive
    #: (:func:`robust_fit`), whose statistic, p-value and robust indices are then NaN and the reports say why
    not_computed: str = ""

    @property
    def label(self) -> str:
        """The statistic's name in tables and notes (method.FitTest.design_label)."""
        return self.test.design_label(self.design)

    def statistic(self, plural: bool = False) -> str:
        """The statistic in running text: 'Yuan-Bentler statistic', or under a design 'design-based statistic
        (Yuan-Bentler scaling)'."""
        noun = "statistics" if plural else "statistic"
        return (f"design-based {noun} ({self.test.label} scaling)" if self.design and self.label != self.test.label
                else f"{self.test.label} {noun}")

    @property
    def pieces(self) -> tuple[tuple[str, float], ...]:
        """(name, value) of what turns the chi-square into the statistic, named as ``test.pieces`` names them."""
        values = (self.scale, self.shift) if self.test is FitTest.SCALE_SHIFTED else (self.scaling_factor,)
        return tuple(zip(self.test.pieces, values))

    def to_dict(self) -> dict:
        d = dict(vars(self))  # the fields in order (asdict's, without its deep copies of numbers and the enum)
        del d["test"]
        if self.scale is None:
            del d["scale"], d["shift"]
        else:  # the statistic is scale x chi-square + shift: the mean-adjusted scaling tr(U Gamma) / df is no piece of
            # it (difference tests use it), so it is named for what it is; the baseline's serves no statistic: left out
            d["mean_adjusted_scaling"] = d.pop("scaling_factor")
            del d["baseline_scaling_factor"]
        d["rmsea_robust_ci90"] = list(self.rmsea_robust_ci90)
        if not self.not_computed:
            del d["not_computed"]
        return {"method": self.label, **d}


def vech_indices(p: int) -> tuple[np.ndarray, np.ndarray]:
    """Row and column of each element of vech (lower triangle, column by column)."""
    cols, rows = np.triu_indices(p)  # (j, i) with i >= j, ordered by column j
    return rows, cols


def normal_weight(sigma_inv: np.ndarray) -> np.ndarray:
    """W = 1/2 D'(A (x) A) D for A = Sigma^-1, built element-wise: a p* x p* matrix (p* = p(p+1)/2), for small p
    only; :class:`NormalWeight` applies it without forming it."""
    I, J = vech_indices(len(sigma_inv))
    h = np.where(I == J, 0.5, 1.0)
    A = sigma_inv
    return np.outer(h, h) * (A[np.ix_(I, I)] * A[np.ix_(J, J)] + A[np.ix_(I, J)] * A[np.ix_(J, I)])


#: the entries of the p x p matrices one step of :meth:`NormalWeight.__matmul__` holds (2 MB each of its arrays)
_CHUNK_ENTRIES = 1 << 18


@dataclass(frozen=True)
class NormalWeight:
    """V = blockdiag(Sigma^-1, W) of the stacked (means, vech) layout (the means' block when ``with_means``), W =
    1/2 D'(A (x) A) D, A = Sigma^-1, applied as ``V @ X`` without forming the p* x p* matrix W: W vech(X) =
    h o vech(A X A) for symmetric X, h 1 off the diagonal and 1/2 on it (Browne 1974, the Kronecker form of the
    normal-theory weight), so V times k columns costs k products of p x p matrices: faster than the product with
    the formed V (:func:`normal_weight`, :meth:`dense`) from 9 items on (0.04 against 0.3 ms at 9 items, 54 against
    445 ms at 60, robust-s20), and V itself, 3 GiB at 200 items, is never made."""

    sigma_inv: np.ndarray
    with_means: bool

    @property
    def size(self) -> int:
        """The rows of V: the moments (means first when ``with_means``)."""
        p = len(self.sigma_inv)
        return p * (p + 1) // 2 + (p if self.with_means else 0)

    def dense(self) -> np.ndarray:
        """V as a matrix (size x size)."""
        W = normal_weight(self.sigma_inv)
        if not self.with_means:
            return W
        p = len(self.sigma_inv)
        return np.block([[self.sigma_inv, np.zeros((p, len(W)))], [np.zeros((len(W), p)), W]])

    def entries(self, rows: np.ndarray, columns: np.ndarray) -> np.ndarray:
        """V[rows][:, columns] from Sigma^-1 alone: A's entries in the means' block, h_ij h_kl (A_ik A_jl +
        A_il A_jk) in the covariances' (:func:`normal_weight`), zero between them."""
        A = self.sigma_inv
        p = len(A)
        start = p if self.with_means else 0
        I, J = vech_indices(p)
        h = np.where(I == J, 0.5, 1.0)
        rows, columns = np.asarray(rows), np.asarray(columns)
        out = np.zeros((len(rows), len(columns)))
        mr, mc = rows < start, columns < start
        out[np.ix_(mr, mc)] = A[np.ix_(rows[mr], columns[mc])]
        r, c = rows[~mr] - start, columns[~mc] - start
        i, j, k, l = I[r][:, None], J[r][:, None], I[c][None, :], J[c][None, :]
        out[np.ix_(~mr, ~mc)] = np.outer(h[r], h[c]) * (A[i, k] * A[j, l] + A[i, l] * A[j, k])
        return out

    def __matmul__(self, X: np.ndarray) -> np.ndarray:
        X = np.asarray(X, dtype=float)
        if X.ndim == 1:
            return (self @ X[:, None])[:, 0]
        return self.kronecker_product(X)

    def kronecker_product(self, X: np.ndarray) -> np.ndarray:
        """V X for X (size x m) through the Kronecker form (class docstring), in steps of a few megabytes."""
        A = self.sigma_inv
        p = len(A)
        I, J = vech_indices(p)
        h = np.where(I == J, 0.5, 1.0)
        start = p if self.with_means else 0
        out = np.empty(X.shape)
        if self.with_means:
            out[:p] = A @ X[:p]
        step = max(1, _CHUNK_ENTRIES // (p * p))
        for first in range(0, X.shape[1], step):
            part = X[start:, first:first + step].T  # (m, p*): each a vech
            M = np.zeros((len(part), p, p))
            M[:, I, J] = part
            M[:, J, I] = part
            T = (M.reshape(-1, p) @ A).reshape(-1, p, p)  # X_k A, whose transpose is A X_k
            R = (np.ascontiguousarray(T.transpose(0, 2, 1)).reshape(-1, p) @ A).reshape(-1, p, p)  # A X_k A
            out[start:, first:first + step] = (R[:, I, J] * h).T
        return out

    def rows_times(self, rows: np.ndarray, design) -> np.ndarray:
        """The rows' moment contributions (inference.design.moment_contributions, the means' part when
        ``with_means``) times V, from the rows: the contributions of the rows times A, whose covariances' part
        vech(A z z' A) is, with its variances halved, W vech(z z') (class docstring; the centring is linear) --
        n x p* numbers, no p x p product."""
        p = len(self.sigma_inv)
        D = moment_contributions(rows @ self.sigma_inv, design, self.with_means)
        I, J = vech_indices(p)
        D[:, (p if self.with_means else 0) + np.flatnonzero(I == J)] *= 0.5
        return D


def asymptotic_covariance(rows: np.ndarray, with_means: bool, design=None) -> np.ndarray:
    """Gamma: covariance (divisor N) of the casewise moment contributions (Browne 1984), under the
    sampling design when one is given (see cfa_tool.inference.design)."""
    return moment_covariance(rows, design, with_means)


def _group_blocks(model: StructuredModel, theta: np.ndarray, likelihood: NormalLikelihood, g: int):
    """(Delta, V) of one group in the stacked (means, vech) layout, V a :class:`NormalWeight`."""
    sigma = model.implied(theta, g)
    sigma_inv = np.linalg.inv(sigma)
    d_sigma, d_mu = model.jacobian(theta, g)
    I, J = vech_indices(model.p)
    delta = d_sigma[:, I, J].T  # (p*, q)
    if likelihood.groups[g].rows is None:
        raise ValueError("robust statistics need the raw data rows")
    if likelihood.means:
        delta = np.vstack([d_mu.T, delta])
    return delta, NormalWeight(sigma_inv, likelihood.means)


def moments_meat(likelihood: NormalLikelihood, with_means: bool, weights: list | None = None) -> GroupsMeat:
    """Omega, the covariance of sqrt(N)(s_g - sigma_g) over the groups' moments under their design (Gamma_g / w_g
    in a group's own block; blocks between groups when they share clusters; cfa_tool.inference.design), held as
    the sampling units' sums; ``weights``: each group's :class:`NormalWeight` (its means' part as ``with_means``),
    whose units' sums are then those of the contributions times V_g (the units' sums z V of Omega's, for
    tr(V Omega) = sum_u f_u z_u' V z_u / N)."""
    groups = likelihood.groups
    if weights is None:
        contributions = [moment_contributions(g.rows, g.design, with_means) for g in groups]
    else:
        contributions = [V.rows_times(g.rows, g.design) for g, V in zip(groups, weights)]
    return groups_meat(contributions, [g.design for g in groups])


@dataclass(frozen=True)
class MomentSandwich:
    """What the robust statistics of one fit share, made once at its estimates (:func:`moment_sandwich`): Omega of
    the groups' stacked moments (:func:`moments_meat`, with the means when the model has a mean structure), each
    group's (Delta, V) (:func:`_group_blocks`, V a :class:`NormalWeight`), the units' sums times V and the traces
    tr(V_g Omega_gg).  The
    sandwich covariance and tr(U Omega) (:func:`robust_parts`), the baseline's tr(U Omega) (:func:`baseline_trace`)
    and the generalized score tests (assessment.robust_scores.robust_score_tests) read the same numbers; none of
    them forms a matrix of the moments by the moments (p* x p*, 3 GiB at 200 items: hostile s19, case 11)."""

    omega: GroupsMeat
    blocks: tuple[tuple[np.ndarray, NormalWeight], ...]
    with_means: bool
    traces: tuple[float, ...]
    #: Omega's units' sums times each group's V (:func:`moments_meat` with the weights): z_u V
    weighted: GroupsMeat


def moment_sandwich(model: StructuredModel, theta: np.ndarray, likelihood: NormalLikelihood) -> MomentSandwich:
    """The :class:`MomentSandwich` of a complete-data fit at ``theta``."""
    blocks = tuple(_group_blocks(model, theta, likelihood, g) for g in range(len(likelihood.groups)))
    omega = moments_meat(likelihood, likelihood.means)
    weighted = moments_meat(likelihood, likelihood.means, [V for _, V in blocks])
    traces = tuple(omega.trace_with(weighted, g) for g in range(len(blocks)))
    return MomentSandwich(omega, blocks, likelihood.means, traces, weighted)


def robust_parts(model: StructuredModel, theta: np.ndarray, likelihood: NormalLikelihood,
                 sandwich: MomentSandwich | None = None) -> tuple[np.ndarray, float]:
    """(robust covariance of theta, tr(U Omega)) of the groups' stacked moments, W = blockdiag(w_g V_g): the
    meat sum_gh w_g w_h Delta_g' V_g Omega_gh V_h Delta_h, whose blocks between groups are zero for independent
    samples (then sum_g w_g Delta_g' V_g Gamma_g V_g Delta_g), and tr(U Omega) = sum_g w_g tr(V_g Omega_gg) -
    tr(bread^-1 meat); ``sandwich`` the fit's :func:`moment_sandwich` at ``theta`` (made here when not given)."""
    q = len(theta)
    bread = np.zeros((q, q))
    trace_vg = 0.0
    if sandwich is None:
        sandwich = moment_sandwich(model, theta, likelihood)
    omega = sandwich.omega
    weighted = []
    for g, w in enumerate(likelihood.weights):
        delta, V = sandwich.blocks[g]
        VD = V @ delta
        bread += w * delta.T @ VD
        weighted.append(w * VD)
        trace_vg += w * sandwich.traces[g]
    meat = omega.middle(weighted)
    inv = scaled_inverse(bread)
    cov = inv @ meat @ inv / likelihood.n_total
    trace_ug = trace_vg - float(np.sum(inv * meat))
    return cov, trace_ug


def baseline_trace(likelihood: NormalLikelihood, sandwich: MomentSandwich | None = None) -> float:
    """tr(U Omega) of the independence model (diagonal Sigma = diag S; means saturated): its parameters are each
    group's own, so only the groups' own blocks of Omega enter, and of them the covariances' part (a saturated
    mean is its own moment: its rows and columns leave tr(U Omega) unchanged).  ``sandwich`` the fit's
    :func:`moment_sandwich`, whose Omega holds that part (after the means' rows when the model has a mean
    structure: the moments' contributions are centred column by column, so the part is the same numbers); made
    here, without the means, when not given.  With A = diag(1/d) V is diagonal, v = 1/(d_i d_j) for a covariance
    and 1/(2 d_i^2) for a variance, and Delta picks the variances, which the model fits exactly: tr(U Omega) =
    sum v o diag(Omega) - sum of the variances' part, that is the covariances' v o diag(Omega), from the diagonal
    of Omega only (no p* x p* matrix)."""
    total = 0.0
    omega = moments_meat(likelihood, False) if sandwich is None else sandwich.omega
    for k, (g, w) in enumerate(zip(likelihood.groups, likelihood.weights)):
        p = len(g.covariance)
        d = np.diag(g.covariance)
        I, J = vech_indices(p)
        off = I != J
        start = p if sandwich is not None and sandwich.with_means else 0
        diagonal = omega.block_diagonal(k, start)
        total += w * float(np.sum(diagonal[off] / (d[I[off]] * d[J[off]])))
    return total


def robust_fit(chi_square: float, df: int, trace_ug: float, base_chi: float, base_df: int, base_trace: float,
               n_obs: int, n_groups: int, test: FitTest = FitTest.SATORRA_BENTLER) -> RobustFit:
    """Scaled statistic T / c, c = tr(U Gamma) / df, and robust indices from the noncentrality T - c df
    (Brosseau-Liard, Savalei & Li 2012; Brosseau-Liard & Savalei 2014).  tr(U Gamma) is a trace of a product of
    estimated matrices, and nothing keeps the estimate positive (with rows with gaps the bread is the observed
    information, and heavy-tailed answers in a few hundred rows can drive it to or below zero: re-check s17); a
    scaling factor (of the model's or the baseline model's statistic) that is not positive scales nothing, so the
    statistic, its p-value and the robust indices that need it are NaN and ``not_computed`` says why."""
    c = trace_ug / df if df > 0 else float("nan")
    cb = base_trace / base_df
    not_computed = _not_positive(c, cb, test) if df > 0 else ""
    usable = df > 0 and c > 0 and np.isfinite(c)
    scaled = chi_square / c if usable else float("nan")
    lam = max(chi_square - c * df, 0.0) if usable else float("nan")
    lam_b = max(base_chi - cb * base_df, 0.0) if cb > 0 and np.isfinite(cb) else float("nan")
    low, high = rmsea_interval(scaled, df, n_obs, n_groups) if usable else (float("nan"), float("nan"))
    scale = np.sqrt(c) if usable else float("nan")
    return RobustFit(
        test=test,
        scaling_factor=float(c),
        chi_square_scaled=float(scaled),
        df=df,
        p_value_scaled=float(dist.chi2_sf(scaled, df)) if df > 0 else float("nan"),
        baseline_scaling_factor=float(cb),
        baseline_chi_square_scaled=float(base_chi / cb) if cb > 0 and np.isfinite(cb) else float("nan"),
        cfi_robust=cfi_from(lam, lam_b) if np.isfinite(lam) and np.isfinite(lam_b) else float("nan"),
        # not cut at 0, as the normal-theory TLI is not (fit_indices.TLI_NOT_CUT)
        tli_robust=tli_from(chi_square - c * df, df, base_chi - cb * base_df, base_df)
        if np.isfinite(lam) and np.isfinite(lam_b) else float("nan"),
        rmsea_robust=rmsea_from(lam, df, n_obs, n_groups),
        rmsea_robust_ci90=(float(low * scale), float(high * scale)),
        not_computed=not_computed,
    )


def _not_positive(c: float, cb: float, test: FitTest) -> str:
    """Why a scaled statistic cannot be computed from scaling factors ``c`` (the model's) and ``cb`` (the baseline
    model's), in a researcher's words; empty when both are positive."""
    bad = [f"{what} scaling factor " + (f"came out {rounded_number(value)}" if np.isfinite(value) else
                                         "had no finite value")  # never 'came out nan'
           for what, value in (("the model's", c), ("the baseline model's", cb)) if not (value > 0 and np.isfinite(value))]
    if not bad:
        return ""
    what = (f"the {test.label} scaled test could not be computed" if not (c > 0 and np.isfinite(c)) else
            f"the robust CFI and TLI could not be computed (the {test.label} scaled test could)")
    return (f"{what}: {word_list(bad)}, and a scaling factor is an "
            f"estimated average of eigenvalues that must be positive; its estimate from these rows is not (heavy-tailed "
            f"answers in few rows, or answers missing in patterns that carry little information, can drive it below "
            f"zero)")
