"""Reliability and validity per factor, for the keyed sum of its items.

Scales score reverse-keyed items reversed before summing them (common practice: every scale
manual), so every coefficient here describes the keyed sum: item i enters with key k_i = -1 when it
is reversed and +1 otherwise.  Keys come from a 'reversed' statement in the model when there is one
(it then names every reverse-keyed item of the model), and otherwise from the signs of the
loadings: an item whose loading has the sign opposite to the majority of its factor's items (ties
broken by the sum of the standardized loadings) is reversed.  For a higher-order factor the signs
are those of the items' total effects through the factors below.

For a factor f and the items it reaches (directly, or through the factors below it), with G = L A
the total effects of factors on items, Phi the factor covariance matrix, Sigma the implied item
covariance, Theta the residual covariances and k the keys:

* omega = (sum_i k_i G_if)^2 Phi_ff / k'Sigma_I k: the share of the keyed sum's variance due to f
  (McDonald 1999); for a higher-order or general factor this is omega hierarchical (Zinbarg,
  Revelle, Yovel & Li 2005);
* omega total = 1 - k'Theta_I k / k'Sigma_I k: the share due to all factors;
* composite reliability (Joreskog 1971; Fornell & Larcker 1981) from standardized loadings l and
  residual variances e: (sum k l)^2 / ((sum k l)^2 + sum e);
* average variance extracted: sum l^2 / (sum l^2 + sum e) (Fornell & Larcker 1981), which keys do
  not change, and the Fornell-Larcker comparison sqrt(AVE) > |r| with every other factor;
* Cronbach's (1951) alpha from the sample covariances of the keyed items:
  n / (n - 1) (1 - sum s_ii / k'S k);
* the keyed sum score's mean (a reversed answer x counting as minimum + maximum - x, which needs the
  scale's range from the 'reversed' statement) and standard deviation, and each item's corrected
  item-total correlation, r(k_i x_i, sum of the other keyed items);
* the heterotrait-monotrait ratio of two factors (Henseler, Ringle & Sarstedt 2015): the mean
  correlation between their items over the geometric mean of the mean correlations within each,
  computed on the keyed items as the definition assumes (indicators coded in the direction of their
  construct); its absolute value is reported, so that two factors keyed in opposite directions get
  the same ratio as two keyed alike.
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import Enum

import numpy as np

from cfa_tool.model.implied import ModelMatrices


class Keying(Enum):
    """Where the keys of the items came from."""

    SIGNS = "loading signs"
    DECLARED = "declared"


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
    reversed: tuple[str, ...] = ()  # items reversed for the keyed sum
    keying: Keying = Keying.SIGNS
    sum_score_mean: float | None = None
    sum_score_sd: float | None = None
    item_total: tuple[float, ...] = ()  # corrected item-total correlations of the factor's own items (first-order)
    against_keying: tuple[str, ...] = ()  # declared keying contradicted by the loadings' signs

    def to_dict(self) -> dict:
        d = dict(vars(self))  # every field is a number, a word or a tuple of them, converted below
        d["items"] = list(self.items)
        d["reversed"] = list(self.reversed)
        d["keying"] = self.keying.value
        own = self.items[: len(self.item_total)]
        d["item_total"] = dict(zip(own, self.item_total))
        d["against_keying"] = list(self.against_keying)
        return d


@dataclass(frozen=True)
class Htmt:
    first: str
    second: str
    ratio: float | None  # None when the ratio is not defined for this pair
    why_missing: str = ""

    def to_dict(self) -> dict:
        out = dict(vars(self))
        out["why_missing"] = self.why_missing or None
        return out


def cronbach_alpha(S: np.ndarray, keys: np.ndarray | None = None) -> float:
    """Cronbach's (1951) alpha of the sum of items with covariance matrix S, each item multiplied by
    its key (+1, or -1 for a reversed item)."""
    n = len(S)
    if n < 2:
        return float("nan")
    total = S.sum() if keys is None else float(keys @ S @ keys)
    return float(n / (n - 1) * (1.0 - np.trace(S) / total))


def item_keys(loadings: np.ndarray, items: tuple[str, ...], declared: dict[str, tuple[float, float]] | None
              ) -> tuple[np.ndarray, np.ndarray]:
    """(keys, items whose loading contradicts the declared keying) for one factor's items.

    With a declaration its keys hold (-1 for a declared item); the factor's direction is then the
    majority of the keyed loadings, and an item whose keyed loading points the other way contradicts
    the declaration.  Without one, keys follow the majority sign of the loadings."""
    signs = np.where(loadings < 0, -1.0, 1.0)
    if declared is None:
        return signs * _majority(signs, loadings), np.zeros(len(items), dtype=bool)
    keys = np.array([-1.0 if x in declared else 1.0 for x in items])
    keyed = keys * signs
    direction = _majority(keyed, keys * loadings)
    return keys, (keyed != direction) & (loadings != 0)


def _majority(signs: np.ndarray, values: np.ndarray) -> float:
    vote = signs.sum()
    if vote == 0:
        vote = values.sum()
    return -1.0 if vote < 0 else 1.0


def reliability(mats: ModelMatrices, observed: tuple[str, ...], latent: tuple[str, ...], S: np.ndarray | None,
                means: np.ndarray | None = None, declared: dict[str, tuple[float, float]] | None = None,
                n_obs: int | None = None, sum_scores: bool = True,
                not_traits: frozenset[str] = frozenset()) -> tuple[list[FactorReliability], list[Htmt]]:
    """Per-factor coefficients and pairwise HTMT ratios of the keyed sums (see the module docstring).

    ``S``: the sample covariances (or, for ordinal items, polychoric correlations) for alpha, sum scores
    and HTMT; ``means``: the items' sample means, for the sum score's mean (None: not reported);
    ``declared``: the reverse-keyed items of a 'reversed' statement with their scales' (minimum,
    maximum), None to key by signs; ``n_obs``: the number of rows, for a standard deviation with
    divisor N - 1 (S has divisor N); ``sum_scores``: False when S does not describe the items as
    answered (ordinal items), so that sum scores and item-total correlations are not reported;
    ``not_traits``: method factors (wording, acquiescence), which get no coefficient, take no part in the
    Fornell-Larcker comparison and no HTMT pair (their loadings describe a way of answering, not a trait)."""
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
    keying = Keying.SIGNS if declared is None else Keying.DECLARED
    out = []
    ave_by_factor: dict[int, float] = {}
    own_keys: dict[int, tuple[np.ndarray, np.ndarray]] = {}
    for j, name in enumerate(latent):
        items = np.flatnonzero(reach[:, j] | direct[:, j])
        if len(items) == 0 or name in not_traits:
            continue
        names = tuple(observed[i] for i in items)
        keys, against = item_keys(G[items, j], names, declared)
        if j in higher:  # contradictions are reported once, for the factor the items load on directly
            against = np.zeros(len(items), dtype=bool)
        total = float(keys @ sigma[np.ix_(items, items)] @ keys)
        own = float((keys @ G[items, j]) ** 2 * phi[j, j])
        omega = own / total
        omega_total = 1.0 - float(keys @ theta[np.ix_(items, items)] @ keys) / total
        cr = ave = alpha = mean = sd = None
        item_total: tuple[float, ...] = ()
        if j not in higher:
            own_items = np.flatnonzero(direct[:, j])
            own_k = keys[np.searchsorted(items, own_items)]
            own_keys[j] = (own_items, own_k)
            lam = mats.L[own_items, j] * sd_lat[j] / sd_obs[own_items]
            err = np.diag(theta)[own_items] / sd_obs[own_items] ** 2
            keyed_sum = float(own_k @ lam)
            cr = float(keyed_sum**2 / (keyed_sum**2 + err.sum()))
            ave = float((lam**2).sum() / ((lam**2).sum() + err.sum()))
            ave_by_factor[j] = ave
            if S is not None:
                S_own = S[np.ix_(own_items, own_items)]
                alpha = cronbach_alpha(S_own, own_k)
                if sum_scores:
                    sd, item_total = _sum_score_spread(S_own, own_k, n_obs)
                if sum_scores and means is not None:
                    mean = _sum_score_mean(means[own_items], own_k, [observed[i] for i in own_items], declared)
        reversed_items = tuple(x for x, k in zip(names, keys) if k < 0)
        out.append([j, name, names, "higher-order" if j in higher else "first-order", omega, omega_total,
                    omega if j in higher else None, cr, ave, alpha, reversed_items, mean, sd, item_total,
                    tuple(x for x, bad in zip(names, against) if bad)])
    results = []
    for j, name, items, level, omega, omega_total, omega_h, cr, ave, alpha, rev, mean, sd, item_total, against in out:
        largest = holds = None
        others = [k for k in ave_by_factor if k != j]
        if ave is not None and others:
            largest = float(max(abs(corr_lat[j, k]) for k in others))
            holds = bool(np.sqrt(ave) > largest)
        results.append(FactorReliability(name, items, level, float(omega), float(omega_total), omega_h, cr, ave, alpha,
                                         largest, holds, rev, keying, mean, sd, item_total, against))
    htmt = []
    if S is not None:
        sd_items = np.sqrt(np.diag(S))
        R = S / np.outer(sd_items, sd_items)
        first_order = list(ave_by_factor)
        mono = {}  # mean keyed correlation among each factor's own items (each pair once: off-diagonal sum / count)
        for f in first_order:
            i, k = own_keys[f]
            if len(i) >= 2:
                R_ff = R[np.ix_(i, i)]
                mono[f] = float(k @ R_ff @ k - np.trace(R_ff)) / (len(i) * (len(i) - 1))
        for a_pos, a in enumerate(first_order):
            for b in first_order[a_pos + 1:]:
                (ia, ka), (ib, kb) = own_keys[a], own_keys[b]
                short = [latent[f] for f, i in ((a, ia), (b, ib)) if len(i) < 2]
                if short:
                    htmt.append(Htmt(latent[a], latent[b], None, f"{' and '.join(short)} "
                                     f"{'has' if len(short) == 1 else 'have'} fewer than two items of its own, so there "
                                     f"is no correlation within it to compare with"))
                    continue
                hetero = float(ka @ R[np.ix_(ia, ib)] @ kb) / (len(ia) * len(ib))
                mono_a, mono_b = mono[a], mono[b]
                if mono_a > 0 and mono_b > 0:
                    htmt.append(Htmt(latent[a], latent[b], float(abs(hetero) / np.sqrt(mono_a * mono_b))))
                else:
                    weak = [latent[f] for f, mono in ((a, mono_a), (b, mono_b)) if mono <= 0]
                    htmt.append(Htmt(latent[a], latent[b], None, f"the keyed items of {' and '.join(weak)} do not "
                                     f"correlate positively on average, so the ratio is not defined"))
    return results, htmt


def _sum_score_spread(S: np.ndarray, keys: np.ndarray, n_obs: int | None) -> tuple[float, tuple[float, ...]]:
    """(standard deviation of the keyed sum, corrected item-total correlations) from covariances S."""
    Sk = S @ keys
    total = float(keys @ Sk)
    sd = float(np.sqrt(total * (n_obs / (n_obs - 1) if n_obs and n_obs > 1 else 1.0)))
    if len(S) < 2:
        return sd, ()
    s_ii = np.diag(S)
    with_rest = keys * Sk - s_ii  # cov(k_i x_i, T - k_i x_i) with T the keyed sum
    rest = total - 2.0 * keys * Sk + s_ii  # var(T - k_i x_i)
    return sd, tuple(float(v) for v in with_rest / np.sqrt(np.maximum(s_ii * rest, 1e-300)))


def _sum_score_mean(means: np.ndarray, keys: np.ndarray, names: list[str],
                    declared: dict[str, tuple[float, float]] | None) -> float | None:
    """Mean of the keyed sum; None when an item is reversed without a declared scale range."""
    total = 0.0
    for mean, key, name in zip(means, keys, names):
        if key > 0:
            total += float(mean)
        elif declared is not None and name in declared:
            low, high = declared[name]
            total += low + high - float(mean)
        else:
            return None
    return total


def keying_warnings(factors: list[FactorReliability] | tuple, prefix: str = "") -> list[str]:
    """Where the declared keying contradicts the signs of the estimated loadings."""
    out = []
    for r in factors:
        if r.against_keying:
            names = ", ".join(f"'{x}'" for x in r.against_keying)
            out.append(f"{prefix}factor '{r.factor}': the loadings of {names} point the other way from what the "
                       f"'reversed' statement implies; check the keying and how the answers were coded")
    return out
