"""Global fit indices for a maximum-likelihood fit.

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
  sample-size-adjusted BIC (Sclove 1987).
"""

from __future__ import annotations

from dataclasses import asdict, dataclass

import numpy as np

from cfa_tool.numerics import distributions as dist
from cfa_tool.numerics.linalg import log_det_pd, spd_inverse


@dataclass(frozen=True)
class FitIndices:
    chi_square: float
    df: int
    p_value: float
    cfi: float
    tli: float
    rmsea: float
    rmsea_ci90: tuple[float, float]
    rmsea_p_close: float
    srmr: float
    log_likelihood: float
    aic: float
    bic: float
    sabic: float
    baseline_chi_square: float
    baseline_df: int
    n_free_parameters: int

    def to_dict(self) -> dict:
        d = asdict(self)
        d["rmsea_ci90"] = list(self.rmsea_ci90)
        return d


def chi_square_p(chi_square: float, df: int) -> float:
    if df <= 0:
        return float("nan")
    return float(dist.chi2_sf(chi_square, df))


def noncentrality_bound(chi_square: float, df: int, probability: float, central_cdf: float | None = None) -> float:
    """lambda such that P(chi2_df(lambda) <= chi_square) = probability (0 if none); ``central_cdf`` is
    P(chi2_df <= chi_square) when the caller has it."""
    if central_cdf is None:
        central_cdf = float(dist.chi2_cdf(chi_square, df))
    f = lambda lam: dist.ncx2_cdf(chi_square, df, lam) - probability if lam > 0 else central_cdf - probability
    if f(0.0) < 0:
        return 0.0
    direct = dist.ncx2_noncentrality(chi_square, df, probability)  # the inverse in closed numerical form
    if np.isfinite(direct) and direct >= 0 and abs(f(direct)) < 1e-9:
        return float(direct)
    from scipy.optimize import brentq  # only when the direct inverse fails: scipy.optimize is slow to import

    hi = max(1.0, chi_square)
    while f(hi) > 0:
        hi *= 2.0
        if hi > 1e8:
            return float("nan")
    return float(brentq(f, 0.0, hi, xtol=1e-10))


def rmsea_interval(chi_square: float, df: int, n_obs: int, level: float = 0.90) -> tuple[float, float]:
    if df <= 0:
        return (float("nan"), float("nan"))
    tail = (1.0 - level) / 2.0
    central = float(dist.chi2_cdf(chi_square, df))
    lam_low = noncentrality_bound(chi_square, df, 1.0 - tail, central)
    lam_high = noncentrality_bound(chi_square, df, tail, central)
    scale = df * n_obs
    return (float(np.sqrt(lam_low / scale)), float(np.sqrt(lam_high / scale)))


def rmsea_close_fit_p(chi_square: float, df: int, n_obs: int, close: float = 0.05) -> float:
    if df <= 0:
        return float("nan")
    lam0 = close**2 * df * n_obs
    return float(dist.ncx2_sf(chi_square, df, lam0))


def rmsea_value(chi_square: float, df: int, n_obs: int) -> float:
    if df <= 0:
        return float("nan")
    return float(np.sqrt(max(chi_square - df, 0.0) / (df * n_obs)))


def cfi_value(chi_square: float, df: int, base_chi: float, base_df: int) -> float:
    num = max(chi_square - df, 0.0)
    den = max(chi_square - df, base_chi - base_df, 0.0)
    return 1.0 if den == 0 else float(1.0 - num / den)


def tli_value(chi_square: float, df: int, base_chi: float, base_df: int) -> float:
    if df <= 0 or base_df <= 0:
        return float("nan")
    base_ratio = base_chi / base_df
    if base_ratio == 1.0:
        return float("nan")
    return float((base_ratio - chi_square / df) / (base_ratio - 1.0))


def srmr_value(S: np.ndarray, sigma: np.ndarray) -> float:
    inv_sd = 1.0 / np.sqrt(S.diagonal())
    resid = (S - sigma) * (inv_sd[:, None] * inv_sd)
    squares = resid * resid
    p = len(S)  # the mean over i <= j: half the off-diagonal squares plus the diagonal ones
    return float(np.sqrt((squares.sum() + squares.diagonal().sum()) / (p * (p + 1))))


def normal_log_likelihood(S: np.ndarray, sigma: np.ndarray, n_obs: int, mean_dev: np.ndarray | None = None) -> float:
    """Log-likelihood of the normal model, divisor-N S; means saturated unless ``mean_dev`` (m - mu) is given."""
    p = S.shape[0]
    found = spd_inverse(sigma)
    if found is None:
        return float("nan")
    inverse, logdet = found
    trace = float(np.vdot(inverse, S))
    if mean_dev is not None:
        trace += float(mean_dev @ inverse @ mean_dev)
    return float(-0.5 * n_obs * (p * np.log(2 * np.pi) + logdet + trace))


def baseline_chi_square(S: np.ndarray, n_obs: int) -> tuple[float, int]:
    p = S.shape[0]
    logdet = log_det_pd(S)
    if logdet is None:
        logdet = np.linalg.slogdet(S)[1]
    return float(n_obs * (np.log(S.diagonal()).sum() - logdet)), p * (p - 1) // 2


def fit_indices(groups: list[tuple[np.ndarray, np.ndarray, int, np.ndarray | None]], discrepancy: float, n_free: int,
                mean_structure: bool = False, log_likelihood: float | None = None,
                baseline: tuple[float, int] | None = None, group_srmr: list[float] | None = None) -> FitIndices:
    """Fit indices from each group's (S, Sigma, N_g, m - mu or None) and the minimised discrepancy.

    With incomplete data, S and m are the saturated (EM) estimates, and the caller gives the
    casewise log-likelihood and the baseline chi-square, which the moments alone do not determine.
    ``group_srmr``: each group's SRMR, when the caller has computed them.
    """
    G = len(groups)
    p = groups[0][0].shape[0]
    n_obs = sum(g[2] for g in groups)
    moments = G * (p * (p + 1) // 2 + (p if mean_structure else 0))
    df = moments - n_free
    chi = max(float(n_obs * discrepancy), 0.0)  # rounding can leave a just-identified model a hair below zero
    base_chi = 0.0
    base_df = 0
    loglik = 0.0
    srmr = 0.0
    for g, (S, sigma, n, dev) in enumerate(groups):
        c, d = baseline_chi_square(S, n)
        base_chi += c
        base_df += d
        loglik += normal_log_likelihood(S, sigma, n, dev if mean_structure else None)
        srmr += n / n_obs * (srmr_value(S, sigma) if group_srmr is None else group_srmr[g])
    if log_likelihood is not None:
        loglik = log_likelihood
    if baseline is not None:
        base_chi, base_df = baseline
    rmsea = rmsea_value(chi, df, n_obs) * np.sqrt(G)
    low, high = rmsea_interval(chi, df, n_obs)
    return FitIndices(
        chi_square=chi,
        df=df,
        p_value=chi_square_p(chi, df),
        cfi=cfi_value(chi, df, base_chi, base_df),
        tli=tli_value(chi, df, base_chi, base_df),
        rmsea=float(rmsea),
        rmsea_ci90=(float(low * np.sqrt(G)), float(high * np.sqrt(G))),
        rmsea_p_close=rmsea_close_fit_p(chi, df, n_obs, close=0.05 / np.sqrt(G)),
        srmr=float(srmr),
        log_likelihood=loglik,
        aic=-2 * loglik + 2 * n_free,
        bic=float(-2 * loglik + n_free * np.log(n_obs)),
        sabic=float(-2 * loglik + n_free * np.log((n_obs + 2) / 24.0)),
        baseline_chi_square=base_chi,
        baseline_df=base_df,
        n_free_parameters=n_free,
    )
