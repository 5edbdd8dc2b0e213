"""Reliability and validity per factor.

For a factor f and the items it reaches (directly, or through the factors below
it), with G = L A the total effects of factors on items, Phi the factor
covariance matrix, Sigma the implied item covariance and Theta the residual
covariances:

* omega = (sum_i G_if)^2 Phi_ff / 1'Sigma_I 1: the share of the item sum's
  variance due to f (McDonald 1999); for a higher-order or general factor this
  is omega hierarchical (Zinbarg, Revelle, Yovel & Li 2005);
* omega total = 1 - 1'Theta_I 1 / 1'Sigma_I 1: the share due to all factors;
* composite reliability (Joreskog 1971; Fornell & Larcker 1981) from
  standardized loadings l and residual variances e: (sum l)^2 / ((sum l)^2 + sum e);
* average variance extracted: sum l^2 / (sum l^2 + sum e) (Fornell & Larcker 1981),
  and the Fornell-Larcker comparison sqrt(AVE) > |r| with every other factor;
* Cronbach's (1951) alpha from the sample covariances:
  k / (k - 1) (1 - sum s_ii / 1'S 1);
* the heterotrait-monotrait ratio of two factors (Henseler, Ringle & Sarstedt
  2015): mean correlation between their items over the geometric mean of the
  mean correlations within each.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass

import numpy as np

from cfa_tool.model.implied import ModelMatrices


@dataclass(frozen=True)
class FactorReliability:
    factor: str
    items: tuple[str, ...]
    level: str  # "first-order" or "higher-order"
    omega: float
    omega_total: float
    omega_hierarchical: float | None
    composite_reliability: float | None
    average_variance_extracted: float | None
    alpha: float | None
    largest_correlation: float | None
    fornell_larcker_holds: bool | None

    def to_dict(self) -> dict:
        d = asdict(self)
        d["items"] = list(self.items)
        return d


@dataclass(frozen=True)
class Htmt:
    first: str
    second: str
    ratio: float

    def to_dict(self) -> dict:
        return asdict(self)


def cronbach_alpha(S: np.ndarray) -> float:
    k = len(S)
    if k < 2:
        return float("nan")
    return float(k / (k - 1) * (1.0 - np.trace(S) / S.sum()))


def reliability(mats: ModelMatrices, observed: tuple[str, ...], latent: tuple[str, ...], S: np.ndarray | None
                ) -> tuple[list[FactorReliability], list[Htmt]]:
    p, m = mats.L.shape
    G = mats.L @ mats.A
    phi = mats.latent_covariance()
    sigma = mats.implied_covariance()
    theta = mats.T
    reach = np.abs(G) > 1e-12
    direct = np.abs(mats.L) > 0
    higher = [j for j in range(m) if np.abs(mats.B[:, j]).sum() > 0]
    sd_lat = np.sqrt(np.clip(np.diag(phi), 1e-300, None))
    sd_obs = np.sqrt(np.clip(np.diag(sigma), 1e-300, None))
    corr_lat = phi / np.outer(sd_lat, sd_lat)
    out = []
    ave_by_factor: dict[int, float] = {}
    for j, name in enumerate(latent):
        items = np.flatnonzero(reach[:, j] | direct[:, j])
        if len(items) == 0:
            continue
        one = np.ones(len(items))
        total = float(one @ sigma[np.ix_(items, items)] @ one)
        own = float(G[items, j].sum() ** 2 * phi[j, j])
        omega = own / total
        omega_total = 1.0 - float(one @ theta[np.ix_(items, items)] @ one) / total
        cr = ave = alpha = None
        if j not in higher:
            own_items = np.flatnonzero(direct[:, j])
            lam = mats.L[own_items, j] * sd_lat[j] / sd_obs[own_items]
            err = np.diag(theta)[own_items] / sd_obs[own_items] ** 2
            cr = float(lam.sum() ** 2 / (lam.sum() ** 2 + err.sum()))
            ave = float((lam**2).sum() / ((lam**2).sum() + err.sum()))
            ave_by_factor[j] = ave
            if S is not None:
                alpha = cronbach_alpha(S[np.ix_(own_items, own_items)])
        out.append([j, name, tuple(observed[i] for i in items), "higher-order" if j in higher else "first-order",
                    omega, omega_total, omega if j in higher else None, cr, ave, alpha])
    results = []
    for j, name, items, level, omega, omega_total, omega_h, cr, ave, alpha in out:
        largest = holds = None
        others = [k for k in ave_by_factor if k != j]
        if ave is not None and others:
            largest = float(max(abs(corr_lat[j, k]) for k in others))
            holds = bool(np.sqrt(ave) > largest)
        results.append(FactorReliability(name, items, level, float(omega), float(omega_total), omega_h, cr, ave, alpha,
                                         largest, holds))
    htmt = []
    if S is not None:
        sd = np.sqrt(np.diag(S))
        R = S / np.outer(sd, sd)
        first = [j for j in ave_by_factor]
        for a_pos, a in enumerate(first):
            for b in first[a_pos + 1:]:
                ia, ib = np.flatnonzero(direct[:, a]), np.flatnonzero(direct[:, b])
                if len(ia) < 2 or len(ib) < 2:
                    continue
                hetero = R[np.ix_(ia, ib)].mean()
                mono_a = R[np.ix_(ia, ia)][np.triu_indices(len(ia), 1)].mean()
                mono_b = R[np.ix_(ib, ib)][np.triu_indices(len(ib), 1)].mean()
                if mono_a > 0 and mono_b > 0:
                    htmt.append(Htmt(latent[a], latent[b], float(hetero / np.sqrt(mono_a * mono_b))))
    return results, htmt
