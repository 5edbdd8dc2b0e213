"""Global fit indices, computed here and nowhere else for every estimator.

* chi-square = N F_min on df = p(p+1)/2 - q (Joreskog 1969);
* baseline (independence) model: chi-square = N (sum log s_ii - log|S|) on p(p-1)/2 df;
* CFI (Bentler 1990), TLI (Tucker & Lewis 1973);
* RMSEA = sqrt(max(chi2 - df, 0) / (df N)) (Steiger 1990) with its 90% interval
  from the noncentral chi-square and the test of close fit, H0: RMSEA <= .05
  (Browne & Cudeck 1993).  Browne & Cudeck write n = N - 1 because their
  statistic is (N - 1) F; ours is N F, so the noncentrality estimate is
  (chi2 - df) / N;
* SRMR: root mean square of (s_ij - sigma_ij) / sqrt(s_ii s_jj) over i <= j (Bentler 1995);
  with groups, the group-size weighted mean of the groups' values (common practice);
* with G groups the RMSEA is multiplied by sqrt(G) (Steiger 1998), and the
  baseline model has free means and variances in every group;
* log-likelihood of the normal model, AIC (Akaike 1974), BIC (Schwarz 1978) and
  sample-size-adjusted BIC (Sclove 1987), for maximum-likelihood fits.

Robust indices estimate the noncentrality as T - c df (Brosseau-Liard, Savalei & Li 2012;
Brosseau-Liard & Savalei 2014) and use the same formulas (:func:`cfi_from`, :func:`tli_from`,
:func:`rmsea_from`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.numerics import distributions as dist
from cfa_tool.numerics.linalg import log_det_pd, spd_inverse


@dataclass(frozen=True)
class FitGuide:
    """A fit index's guide value and the side of it on which a model is read as fitting."""

    value: float
    higher_fits: bool  # True: a value at least the guide fits (CFI, TLI); False: at most the guide (RMSEA, SRMR)

    def met_by(self, value: float) -> bool:
        """Whether ``value`` lies on the fitting side of the guide (the guide itself included)."""
        return value >= self.value if self.higher_fits else value <= self.value

    @property
    def relation(self) -> str:
        """How a fitting value stands to the guide: '>=' or '<='."""
        return ">=" if self.higher_fits else "<="

    @property
    def missed_side(self) -> str:
        """Where a value that misses the guide lies: 'below' or 'above'."""
        return "below" if self.higher_fits else "above"


#: The guide values the reports print beside the indices and the configural step of an invariance test is judged by
#: (Hu & Bentler 1999, as recalled; common practice, not laws): CFI and TLI at least .95, RMSEA at most .06, SRMR at
#: most .08.  Declared here once with their direction; reporting.numbers.fit_index_text prints a value beside its guide.
FIT_GUIDES = {"cfi": FitGuide(0.95, True), "tli": FitGuide(0.95, True), "rmsea": FitGuide(0.06, False),
              "srmr": FitGuide(0.08, False)}

#: Beyond these a model's fit is called poor and the report cautions first (common practice, conventions, not laws):
#: RMSEA above .10 (MacCallum, Browne & Sugawara 1996: .08-.10 mediocre, above .10 poor), CFI below .90 (the older
#: criterion of Bentler & Bonett 1980, recalled from memory).
POOR_FIT_BOUNDS = {"cfi": 0.90, "rmsea": 0.10}

#: Below this RMSEA of the baseline (independence) model the incremental indices CFI and TLI say little about a
#: model, whatever their values: the items correlate so weakly that no model can improve much on the baseline (Kenny,
#: Kaniskan & McCoach 2015, as recalled from memory; a rule of thumb, not a law).  The report cautions first.
UNINFORMATIVE_BASELINE_RMSEA = 0.158

#: The one rule of TLI for every test (normal-theory, robust, adjusted): the index is not normed, neither cut at 1
#: nor at 0 (Tucker & Lewis 1973; Bentler 1990 calls it non-normed), so a value above 1 says the chi-square fell below
#: its degrees of freedom.  CFI is cut at 0 and 1 by its definition (Bentler 1990).  The fit table's note says so.
TLI_NOT_CUT = ("TLI is not cut at 1 (nor at 0), whatever the test: a value above 1 means that the chi-square fell below "
               "its degrees of freedom.")


def baseline_fits_words(fit, robust=None, paper: bool = False) -> str:
    """When the baseline (independence) model's chi-square of the test the report reads (``fit``: FitIndices;
    ``robust``: inference.robust.RobustFit or None, then its scaled or adjusted statistic) is at most its degrees of
    freedom, what that leaves of the incremental indices, in one wording for the caution every view opens with and
    the methods paragraph (``paper``: past tense), in plain words (s23): TLI is not defined (:func:`tli_from`: it
    would divide by at most 0; numbers-s21), and CFI is not defined either (0/0, the model's statistic being at most
    its df too) or is 0 (:func:`cfi_from`).  '' when the baseline's chi-square exceeds its df or was not computed."""
    base = fit.baseline_chi_square if robust is None else robust.baseline_chi_square_scaled
    df = fit.baseline_df
    if not (df > 0 and np.isfinite(base) and base <= df):
        return ""
    cfi = fit.cfi if robust is None else robust.cfi_robust
    index = "" if robust is None else "robust "
    statistic = "chi-square" if robust is None else robust.statistic()
    be = "was" if paper else "is"
    rest = (f"nor {be} the {index}CFI (its formula gives 0/0, the model's {statistic} being no larger than its "
            f"degrees of freedom either)" if not np.isfinite(cfi) else
            f"and the {index}CFI {be} 0 (the model misfits more than the baseline model, which itself fits)")
    return (f"the baseline model's {statistic} ({base:.2f}) {be} no larger than its degrees of freedom ({df}), so "
            f"the {index}TLI {be} not defined (its formula would divide by zero or less), {rest}")


@dataclass(frozen=True)
class IndicesOfOneTest:
    """The chi-square of one test and the indices built on it, with SRMR: the fields every set of fit figures has."""

    chi_square: float
    df: int
    p_value: float
    cfi: float
    tli: float
    rmsea: float
    rmsea_ci90: tuple[float, float]
    srmr: float


@dataclass(frozen=True)
class FitIndices(IndicesOfOneTest):
    """The normal-theory fit indices (the unadjusted chi-square and what is built on it).  With a robust, ordinal or
    design-based test (a fit's ``robust``) these are the figures every report marks "for reference only"; the ones to
    read are a fit's ``fit_to_read`` (:class:`IndicesToRead`)."""

    baseline_chi_square: float
    baseline_df: int
    n_free_parameters: int
    rmsea_p_close: float | None = None  # None: not computed (least-squares fits)
    log_likelihood: float | None = None  # None: least-squares fits have no likelihood
    aic: float | None = None
    bic: float | None = None
    sabic: float | None = None

    def to_dict(self) -> dict:
        d = dict(vars(self))  # every field is a number or a pair of numbers
        d["rmsea_ci90"] = list(self.rmsea_ci90)
        order = ("chi_square", "df", "p_value", "cfi", "tli", "rmsea", "rmsea_ci90", "rmsea_p_close", "srmr",
                 "log_likelihood", "aic", "bic", "sabic", "baseline_chi_square", "baseline_df", "n_free_parameters")
        return {k: d[k] for k in order}


@dataclass(frozen=True)
class IndicesToRead(IndicesOfOneTest):
    """The fit figures a report tells researchers to read: those of the robust (scaled or adjusted) test when the fit
    has one, the normal-theory ones otherwise; SRMR is the same in both.  ``test`` is the test's option word
    ('normal', 'satorra-bentler', 'yuan-bentler', 'scale-shifted')."""

    test: str

    @classmethod
    def of(cls, fit: FitIndices, robust=None) -> "IndicesToRead":
        """From the normal-theory indices and the robust fit (inference.robust.RobustFit, or None)."""
        if robust is None:
            return cls(fit.chi_square, fit.df, fit.p_value, fit.cfi, fit.tli, fit.rmsea, fit.rmsea_ci90, fit.srmr,
                       "normal")
        return cls(robust.chi_square_scaled, robust.df, robust.p_value_scaled, robust.cfi_robust, robust.tli_robust,
                   robust.rmsea_robust, robust.rmsea_robust_ci90, fit.srmr, robust.test.value)

    def to_dict(self) -> dict:
        return {"test": self.test, **vars(self), "rmsea_ci90": list(self.rmsea_ci90)}


def chi_square_p(chi_square: float, df: int) -> float:
    if df <= 0:
        return float("nan")
    return float(dist.chi2_sf(chi_square, df))


def noncentrality_bound(chi_square: float, df: int, probability: float, central_cdf: float | None = None) -> float:
    """lambda such that P(chi2_df(lambda) <= chi_square) = probability: 0 when even lambda = 0 gives less (no
    lambda does: the cdf falls as lambda grows), infinity at probability 0 (the cdf's limit), NaN for a chi-square
    that is NaN or infinite; Newton's root of :func:`numerics.distributions.ncx2_noncentrality`.  ``central_cdf`` is
    P(chi2_df <= chi_square) when the caller has it."""
    if central_cdf is None:
        central_cdf = float(dist.chi2_cdf(chi_square, df))
    if central_cdf < probability:
        return 0.0
    return dist.ncx2_noncentrality(chi_square, df, probability, central_cdf)


def rmsea_interval(chi_square: float, df: int, n_obs: int, groups: int = 1, level: float = 0.90,
                   p_value: float | None = None) -> tuple[float, float]:
    """The RMSEA's interval from the noncentral chi-square (Browne & Cudeck 1993), times sqrt(G) with G groups;
    ``p_value``: P(chi2_df > chi_square) when the caller has it (the central cdf, 1 minus it, only decides whether a
    bound is 0)."""
    if df <= 0:
        return (float("nan"), float("nan"))
    tail = (1.0 - level) / 2.0
    central = float(dist.chi2_cdf(chi_square, df)) if p_value is None else 1.0 - p_value
    lam_low = noncentrality_bound(chi_square, df, 1.0 - tail, central)
    lam_high = noncentrality_bound(chi_square, df, tail, central)
    scale = df * n_obs
    root = np.sqrt(groups)
    return (float(np.sqrt(lam_low / scale) * root), float(np.sqrt(lam_high / scale) * root))


def rmsea_close_fit_p(chi_square: float, df: int, n_obs: int, groups: int = 1, close: float = 0.05) -> float:
    """p of the test of close fit, H0: RMSEA <= ``close`` (Browne & Cudeck 1993; with G groups the RMSEA
    carries sqrt(G), so the bound on the per-group scale is close / sqrt(G))."""
    if df <= 0:
        return float("nan")
    lam0 = (close / np.sqrt(groups)) ** 2 * df * n_obs
    return float(dist.ncx2_sf(chi_square, df, lam0))


def rmsea_from(noncentrality: float, df: int, n_obs: int, groups: int = 1) -> float:
    """sqrt(lambda / (df N)) times sqrt(G) (Steiger 1990, 1998), lambda the estimated noncentrality."""
    if df <= 0:
        return float("nan")
    return float(np.sqrt(max(noncentrality, 0.0) / (df * n_obs)) * np.sqrt(groups))


def rmsea_value(chi_square: float, df: int, n_obs: int, groups: int = 1) -> float:
    return rmsea_from(chi_square - df, df, n_obs, groups)


def cfi_from(noncentrality: float, baseline_noncentrality: float) -> float:
    """1 - lambda / max(lambda, lambda_baseline, 0) (Bentler 1990); not defined (NaN) when both noncentralities are
    at most 0, 0/0: the baseline model then fits as well as the model, and the index compares nothing (hostile
    s19: noise printed CFI 1.000 beside its guide)."""
    num = max(noncentrality, 0.0)
    den = max(noncentrality, baseline_noncentrality, 0.0)
    return float("nan") if den == 0 else float(1.0 - num / den)


def cfi_value(chi_square: float, df: int, base_chi: float, base_df: int) -> float:
    """CFI from the two tests (:func:`cfi_from`); not defined (NaN) for a model of 0 df, whose chi-square is 0 by
    construction, as its TLI and RMSEA are not: a CFI of 1 there tests nothing (hostile s20: replicate, compare and
    invariance printed 1.000, and a 'loose replication' at 1.000, for a just-identified model)."""
    if df <= 0:
        return float("nan")
    return cfi_from(chi_square - df, base_chi - base_df)


def tli_from(noncentrality: float, df: int, baseline_noncentrality: float, base_df: int) -> float:
    """1 - (lambda / df) / (lambda_baseline / df_baseline) (Tucker & Lewis 1973), the noncentralities as estimated,
    not cut at 0: TLI is not normed (:data:`TLI_NOT_CUT`), whichever test it is computed from.  Not defined (NaN)
    when the baseline model's noncentrality is at most 0 (its chi-square at most its df): the index then divides by
    nothing or by less than nothing, and the baseline model it compares with fits (the s20 closing note: TLI -.772
    printed beside a CFI not defined)."""
    if df <= 0 or base_df <= 0 or not baseline_noncentrality > 0:
        return float("nan")
    return float(1.0 - (noncentrality / df) / (baseline_noncentrality / base_df))


def tli_value(chi_square: float, df: int, base_chi: float, base_df: int) -> float:
    """(chi2_b / df_b - chi2 / df) / (chi2_b / df_b - 1), the same index as :func:`tli_from` written with
    the statistics, and not defined where it is not (chi2_b / df_b at most 1)."""
    if df <= 0 or base_df <= 0:
        return float("nan")
    base_ratio = base_chi / base_df
    if not base_ratio > 1.0:
        return float("nan")
    return float((base_ratio - chi_square / df) / (base_ratio - 1.0))


def srmr_value(S: np.ndarray, sigma: np.ndarray, correlations: bool = False) -> float:
    """One group's SRMR: residuals of the correlation metric over i <= j (Bentler 1995); with
    ``correlations`` (ordinal items: S a matrix of polychoric correlations, whose diagonal is 1 by
    definition and carries no information) the mean is over the off-diagonal correlations i < j only."""
    inv_sd = 1.0 / np.sqrt(S.diagonal())
    resid = (S - sigma) * (inv_sd[:, None] * inv_sd)
    squares = resid * resid
    p = len(S)
    if correlations:
        return float(np.sqrt((squares.sum() - squares.diagonal().sum()) / (p * (p - 1)))) if p > 1 else 0.0
    # the mean over i <= j: half the off-diagonal squares plus the diagonal ones
    return float(np.sqrt((squares.sum() + squares.diagonal().sum()) / (p * (p + 1))))


def srmr(groups: list[tuple[np.ndarray, np.ndarray, int]], correlations: bool = False) -> tuple[float, list[float]]:
    """(overall SRMR, each group's) from each group's (S, Sigma, N_g): with groups, the group-size
    weighted mean (common practice); ``correlations`` as for :func:`srmr_value`."""
    values = [srmr_value(S, sigma, correlations) for S, sigma, _ in groups]
    n = sum(g[2] for g in groups)
    return float(sum(g[2] / n * v for g, v in zip(groups, values))), values


def normal_log_likelihood(S: np.ndarray, sigma: np.ndarray, n_obs: int, mean_dev: np.ndarray | None = None,
                          inverse: tuple[np.ndarray, float] | None = None) -> float:
    """Log-likelihood of the normal model, divisor-N S; means saturated unless ``mean_dev`` (m - mu) is given.
    ``inverse``: (Sigma^-1, log|Sigma|) when the caller has them (the estimation's factorisation at the estimates)."""
    p = S.shape[0]
    found = spd_inverse(sigma) if inverse is None else inverse
    if found is None:
        return float("nan")
    inverse, logdet = found
    trace = float(np.vdot(inverse, S))
    if mean_dev is not None:
        trace += float(mean_dev @ inverse @ mean_dev)
    return float(-0.5 * n_obs * (p * np.log(2 * np.pi) + logdet + trace))


def baseline_chi_square(S: np.ndarray, n_obs: int, log_det: float | None = None) -> tuple[float, int]:
    """The independence model's chi-square N (sum log s_ii - log|S|) and its df; ``log_det``: log|S| when the caller
    has it."""
    p = S.shape[0]
    logdet = log_det_pd(S) if log_det is None else log_det
    if logdet is None:
        logdet = np.linalg.slogdet(S)[1]
    return float(n_obs * (np.log(S.diagonal()).sum() - logdet)), p * (p - 1) // 2


def normal_theory_parts(groups: list[tuple[np.ndarray, np.ndarray, int, np.ndarray | None]],
                        known: list[tuple[tuple[np.ndarray, float] | None, float]] | None = None) -> tuple[float, int, float]:
    """(baseline chi-square, its df, log-likelihood) of complete-data ML from each group's
    (S, Sigma, N_g, m - mu or None without a mean structure); ``known``: each group's ((Sigma^-1, log|Sigma|),
    log|S|) when the estimation has factorised both already (the same numbers, not computed again)."""
    base_chi, base_df, loglik = 0.0, 0, 0.0
    for g, (S, sigma, n, dev) in enumerate(groups):
        inverse, log_det_s = known[g] if known is not None else (None, None)
        c, d = baseline_chi_square(S, n, log_det_s)
        base_chi += c
        base_df += d
        loglik += normal_log_likelihood(S, sigma, n, dev, inverse)
    return base_chi, base_df, loglik


def fit_indices(*, chi_square: float, df: int, baseline_chi_square: float, baseline_df: int, n_obs: int,
                n_free: int, srmr: float, groups: int = 1, log_likelihood: float | None = None,
                close_fit_test: bool = True) -> FitIndices:
    """Every global index from the test statistic, the baseline model's and the SRMR; with
    ``log_likelihood`` (maximum likelihood) also the information criteria.  ``close_fit_test``
    adds the p of the test of close fit."""
    chi = max(float(chi_square), 0.0)  # rounding can leave a just-identified model a hair below zero
    p_value = chi_square_p(chi, df)
    low, high = rmsea_interval(chi, df, n_obs, groups, p_value=p_value)
    criteria = {}
    if log_likelihood is not None:
        criteria = dict(log_likelihood=log_likelihood, aic=-2 * log_likelihood + 2 * n_free,
                        bic=float(-2 * log_likelihood + n_free * np.log(n_obs)),
                        sabic=float(-2 * log_likelihood + n_free * np.log((n_obs + 2) / 24.0)))
    return FitIndices(
        chi_square=chi,
        df=df,
        p_value=p_value,
        cfi=cfi_value(chi, df, baseline_chi_square, baseline_df),
        tli=tli_value(chi, df, baseline_chi_square, baseline_df),
        rmsea=rmsea_value(chi, df, n_obs, groups),
        rmsea_ci90=(low, high),
        srmr=float(srmr),
        baseline_chi_square=baseline_chi_square,
        baseline_df=baseline_df,
        n_free_parameters=n_free,
        rmsea_p_close=rmsea_close_fit_p(chi, df, n_obs, groups) if close_fit_test else None,
        **criteria,
    )
