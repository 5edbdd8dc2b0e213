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

from dataclasses import asdict, dataclass

import numpy as np
from cfa_tool.numerics import distributions as dist

from cfa_tool.numerics.linalg import scaled_inverse
from cfa_tool.assessment.fit_indices import cfi_from, rmsea_from, rmsea_interval, tli_from
from cfa_tool.estimation.ml import NormalLikelihood
from cfa_tool.inference.design import GroupsMeat, groups_meat, moment_contributions, moment_covariance
from cfa_tool.method import FitTest
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
        d = asdict(self)
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
    """W = 1/2 D'(A (x) A) D for A = Sigma^-1, built element-wise."""
    I, J = vech_indices(len(sigma_inv))
    h = np.where(I == J, 0.5, 1.0)
    A = sigma_inv
    return np.outer(h, h) * (A[np.ix_(I, I)] * A[np.ix_(J, J)] + A[np.ix_(I, J)] * A[np.ix_(J, I)])


def asymptotic_covariance(rows: np.ndarray, with_means: bool, design=None) -> np.ndarray:
    """Gamma: covariance (divisor N) of the casewise moment contributions (Browne 1984), under the
    sampling design when one is given (see cfa_tool.inference.design)."""
    return moment_covariance(rows, design, with_means)


def _group_blocks(model: StructuredModel, theta: np.ndarray, likelihood: NormalLikelihood, g: int):
    """(Delta, V) of one group in the stacked (means, vech) layout."""
    sigma = model.implied(theta, g)
    sigma_inv = np.linalg.inv(sigma)
    d_sigma, d_mu = model.jacobian(theta, g)
    I, J = vech_indices(model.p)
    delta = d_sigma[:, I, J].T  # (p*, q)
    V = normal_weight(sigma_inv)
    if likelihood.groups[g].rows is None:
        raise ValueError("robust statistics need the raw data rows")
    if likelihood.means:
        delta = np.vstack([d_mu.T, delta])
        p = model.p
        V = np.block([[sigma_inv, np.zeros((p, V.shape[0]))], [np.zeros((V.shape[0], p)), V]])
    return delta, V


def moments_meat(likelihood: NormalLikelihood, with_means: bool) -> GroupsMeat:
    """Omega, the covariance of sqrt(N)(s_g - sigma_g) over the groups' moments under their design (Gamma_g / w_g
    in a group's own block; blocks between groups when they share clusters; cfa_tool.inference.design)."""
    groups = likelihood.groups
    return groups_meat([moment_contributions(g.rows, g.design, with_means) for g in groups], [g.design for g in groups])


@dataclass(frozen=True)
class MomentSandwich:
    """What the robust statistics of one fit share, made once at its estimates (:func:`moment_sandwich`): Omega of
    the groups' stacked moments (:func:`moments_meat`, with the means when the model has a mean structure) and each
    group's (Delta, V) (:func:`_group_blocks`).  The sandwich covariance and tr(U Omega) (:func:`robust_parts`), the
    baseline's tr(U Omega) (:func:`baseline_trace`) and the generalized score tests
    (assessment.robust_scores.robust_score_tests) read the same numbers."""

    omega: GroupsMeat
    blocks: tuple[tuple[np.ndarray, np.ndarray], ...]
    with_means: bool


def moment_sandwich(model: StructuredModel, theta: np.ndarray, likelihood: NormalLikelihood) -> MomentSandwich:
    """The :class:`MomentSandwich` of a complete-data fit at ``theta``."""
    return MomentSandwich(moments_meat(likelihood, likelihood.means),
                          tuple(_group_blocks(model, theta, likelihood, g) for g in range(len(likelihood.groups))),
                          likelihood.means)


def robust_parts(model: StructuredModel, theta: np.ndarray, likelihood: NormalLikelihood,
                 sandwich: MomentSandwich | None = None) -> tuple[np.ndarray, float]:
    """(robust covariance of theta, tr(U Omega)) of the groups' stacked moments, W = blockdiag(w_g V_g): the
    meat sum_gh w_g w_h Delta_g' V_g Omega_gh V_h Delta_h, whose blocks between groups are zero for independent
    samples (then sum_g w_g Delta_g' V_g Gamma_g V_g Delta_g); ``sandwich`` the fit's :func:`moment_sandwich` at
    ``theta`` (made here when not given)."""
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
        trace_vg += w * float(np.sum(V * omega.block(g)))
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
    here, without the means, when not given."""
    total = 0.0
    omega = moments_meat(likelihood, False) if sandwich is None else sandwich.omega
    for k, (g, w) in enumerate(zip(likelihood.groups, likelihood.weights)):
        p = len(g.covariance)
        d = np.diag(g.covariance)
        sigma_inv = np.diag(1.0 / d)
        I, J = vech_indices(p)
        V = normal_weight(sigma_inv)
        delta = (I == J)[:, None] * (I[:, None] == np.arange(p)[None, :])  # d vech(Sigma) / d sigma_ii
        delta = delta.astype(float)
        gamma = w * omega.block(k, p if sandwich is not None and sandwich.with_means else 0)
        VD = V @ delta
        bread = delta.T @ VD
        inv = np.linalg.inv(bread)
        total += float(np.sum(V * gamma)) - float(np.sum(inv * (VD.T @ gamma @ VD)))
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
    bad = [f"{what} scaling factor came out {value:.3g}" for what, value in (("the model's", c), ("the baseline "
           "model's", cb)) if not (value > 0 and np.isfinite(value))]
    if not bad:
        return ""
    what = (f"the {test.label} scaled test could not be computed" if not (c > 0 and np.isfinite(c)) else
            f"the robust CFI and TLI could not be computed (the {test.label} scaled test could)")
    return (f"{what}: {' and '.join(bad)}, and a scaling factor is an "
            f"estimated average of eigenvalues that must be positive; its estimate from these rows is not (heavy-tailed "
            f"answers in few rows, or answers missing in patterns that carry little information, can drive it below "
            f"zero)")
