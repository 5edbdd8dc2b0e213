"""Reliability and validity per factor, for the keyed sum of its items.

Scales score reverse-keyed items reversed before summing them (common practice: every scale
manual), so every coefficient here describes the keyed sum: item i enters with key k_i = -1 when it
is reversed and +1 otherwise.  Keys come from a 'reversed' statement in the model when there is one
(it then names every reverse-keyed item of the model), and otherwise from the signs of the
loadings: an item whose loading has the sign opposite to the majority of its factor's items (ties
broken by the factor's first item in the model's order, whose half keeps its answers as given) is
reversed; a weak item (standardized loading below .20 in size, common practice) neither votes nor is
reversed, since sampling error alone turns the sign of a loading that small.  For a higher-order
factor the signs are those of the items' total effects through the factors below.

For a factor f and the items it reaches (directly, or through the factors below it), with G = L A
the total effects of factors on items, Phi the factor covariance matrix, Sigma the implied item
covariance, Theta the residual covariances and k the keys:

* omega = (sum_i k_i C_if)^2 / (Phi_ff k'Sigma_I k), with C = L Phi the items' covariances with the factors: the
  share of the keyed sum's variance that f accounts for, Var(E[X | f]) / Var(X), the squared correlation of the sum
  with f.  For items that measure f alone (through f and the factors below it) C_if = G_if Phi_ff, which gives
  McDonald's (1999) (sum_i k_i G_if)^2 Phi_ff / k'Sigma_I k; for a higher-order or general factor this is omega
  hierarchical (Zinbarg, Revelle, Yovel & Li 2005).  An item that also loads on another factor correlated with f
  brings its covariance with f through that factor, so that omega never exceeds omega total (hostile trial s22:
  an item reversed in f's sum for a cross-loading of -.07 gave omega .86 beside omega total .66, the sum's
  covariance with the other factor counted as f's);
* omega total = 1 - k'Theta_I k / k'Sigma_I k: the share due to all factors;
* in a bifactor model (assessment/method_factors.bifactor_parts) the same two formulas give, for the general factor,
  omega hierarchical and omega total of the keyed sum of all its items, and for a specific factor, over its own
  items, omega hierarchical subscale (the share of the keyed subscale sum's variance due to the specific factor
  alone) and omega subscale (due to the general and the specific factor together; Rodriguez, Reise & Haviland
  2016).  Composite reliability, whose denominator leaves out the other factor of the same items, describes no
  score there and is not given; a general factor and its specific factors share their items, so whether they are
  distinct is no question for the Fornell-Larcker comparison or HTMT, and they are not compared;
* composite reliability (Joreskog 1971; Fornell & Larcker 1981) from standardized loadings l and
  residual variances e: (sum k l)^2 / ((sum k l)^2 + sum e);
* average variance extracted: sum l^2 / (sum l^2 + sum e) (Fornell & Larcker 1981), which keys do
  not change, and the Fornell-Larcker comparison sqrt(AVE) > |r| with every other factor;
* a factor with one item of its own gets none of these: with one indicator the factor's share of the item's
  variance is whatever its fixed error variance makes it (Bollen 1989, ch. 7), an assumption, not evidence;
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

import math
from collections.abc import Collection, Mapping, Sequence
from dataclasses import dataclass, replace
from enum import Enum
from functools import lru_cache

import numpy as np

from cfa_tool.assessment.method_factors import SMALL_LOADING, bifactor_parts, uncorrelated_pairs
from cfa_tool.language.names import reference_text, written_group
from cfa_tool.model.description import FactorScale
from cfa_tool.model.implied import ModelMatrices
from cfa_tool.note_parts import Command, Note, Text
from cfa_tool.numbers import word_list
from cfa_tool.numerics.plain import PLAIN_TYPES, clean


class BifactorPart(Enum):
    """The part a factor plays in a bifactor structure (assessment/method_factors.bifactor_parts)."""

    GENERAL = "general factor"
    SPECIFIC = "specific factor"


class Keying(Enum):
    """Where the keys of the items came from."""

    SIGNS = "loading signs"
    DECLARED = "declared"


@dataclass(frozen=True)
class FactorReliability:
    """One factor's reliability and validity figures (omega, composite reliability, AVE, alpha)."""
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
    # ordinal items: the reliability of the keyed sum of the answers' codes (Green & Yang 2009;
    # assessment/ordinal_reliability.py), beside the coefficients above, which describe the latent responses
    observed_sum_omega: float | None = None
    # the factor points against the keyed direction of its items: most items not declared reversed load
    # negatively (a 'reversed' statement), or, without one, most items load against the marker's fixed sign
    points_against: bool = False
    # half of the factor's items load each way: no majority gives its direction
    evenly_split: bool = False
    # a bifactor model's general or specific factor (None otherwise), with the factors that share its items in that
    # structure (a general factor's specific factors; a specific factor's general factor)
    bifactor: BifactorPart | None = None
    shares_items_with: tuple[str, ...] = ()
    #: the delta-method standard error of omega from the estimates' covariance (Raykov 2002;
    #: assessment.reliability_intervals.with_omega_errors), None where not computed
    omega_se: float | None = None
    #: the factor's weak items (item_keys, weak_loadings): their signs key nothing, so they count on neither side of
    #: the factor's majority (nor of a split) and, without a 'reversed' statement, are left as answered
    weak: tuple[str, ...] = ()
    #: ... of them (keys by the loadings' signs), those whose loading runs against the factor's direction: left as
    #: answered only because they are weak (what the keying note says beside 'none is reversed')
    weak_against: tuple[str, ...] = ()

    def to_dict(self) -> dict:
        d = dict(vars(self))  # every field is a number, a word or a tuple of them, converted below
        for flag in ("points_against", "evenly_split", "weak", "weak_against"):
            if not getattr(self, flag):
                del d[flag]  # written only when it warns
        if self.bifactor is None:  # written only for a bifactor model, so that other models' results stay as they were
            del d["bifactor"], d["shares_items_with"]
        else:
            d["bifactor"] = self.bifactor.value
            d["shares_items_with"] = list(self.shares_items_with)
        d["items"] = list(self.items)
        d["reversed"] = list(self.reversed)
        d["keying"] = self.keying.value
        own = self.items[: len(self.item_total)]
        d["item_total"] = dict(zip(own, self.item_total))
        d["against_keying"] = list(self.against_keying)
        for flag in ("weak", "weak_against"):
            if flag in d:
                d[flag] = list(d[flag])
        return d


def _names(values: tuple) -> list:
    """A tuple of names as the JSON's list (clean's for anything but text)."""
    out = list(values)
    return out if all(type(v) is str for v in out) else clean(out)


def factor_dicts(factors) -> list[dict]:
    """The rows as JSON: what ``clean(r.to_dict())`` (numerics.plain.clean) gives for each FactorReliability, built in
    one pass over its fields, in their order: finite Python floats and plain values as they are, NaN and infinities
    None, names as lists, the flags only when they warn, the bifactor fields only in a bifactor structure."""
    out = []
    for r in factors:
        d = {}
        for key, value in vars(r).items():
            kind = type(value)
            if kind is float:
                d[key] = value if value - value == 0.0 else None
            elif key in _NAMES:
                d[key] = _names(value)
            elif key == "keying":
                d[key] = value.value
            elif key == "item_total":
                totals = dict(zip(r.items[: len(value)], value))
                plain = all(type(v) is float and v - v == 0.0 for v in value)
                d[key] = totals if plain else clean(totals)
            elif key in _WEAK:
                if value:
                    d[key] = _names(value)
            elif key in _FLAGS:
                if value:
                    d[key] = value if kind in PLAIN_TYPES else clean(value)
            elif key == "bifactor":
                if value is not None:
                    d[key], d["shares_items_with"] = value.value, _names(r.shares_items_with)
            elif key == "shares_items_with":
                continue
            else:
                d[key] = value if kind in PLAIN_TYPES else clean(value)
        out.append(d)
    return out


_NAMES = frozenset(("items", "reversed", "against_keying"))
_FLAGS = frozenset(("points_against", "evenly_split"))
#: the size below which a standardized loading is weak (assessment.method_factors.SMALL_LOADING), as words write it
WEAK_LINE = f"{SMALL_LOADING:.2f}".removeprefix("0")
_WEAK = frozenset(("weak", "weak_against"))  # written, as lists, only when the factor has such items


@dataclass(frozen=True)
class Htmt:
    """The heterotrait-monotrait ratio of one pair of factors (Henseler, Ringle & Sarstedt 2015)."""
    first: str
    second: str
    ratio: float | None  # None when the ratio is not defined for this pair
    why_missing: str = ""

    def to_dict(self) -> dict:
        out = dict(vars(self))
        out["why_missing"] = self.why_missing or None
        return out


def item_keys(G: np.ndarray, member: np.ndarray, observed: tuple[str, ...], declared: Collection[str] | None,
              standardized: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The one rule that keys the items of every keyed sum (reliability here, sum scores in scoring/quality.py, both
    through :func:`sum_keys` or :func:`reliability`): (K, direction, split).  K (p, m): item i's key for factor j, 0
    where ``member`` (the items that measure j, directly or through the factors below it) is False.

    With a 'reversed' statement (``declared``: the items it names) the keys are the declaration's: -1 for a
    declared item, +1 otherwise, whatever the loadings' signs.  Without one they follow the signs of the total
    loadings G: an item whose loading has the sign opposite to most of its factor's items is reversed.
    ``direction`` (m): +1 where the factor points the keyed way (most keyed items load positively), -1 where it
    points against its keys; ``split`` (m): True where half of a factor's items point each way, so that no majority
    gives its direction: the tie is then broken by the factor's first item in the model's order (of those that are
    not weak), whose half keeps its answers as given, so that every group of a fit, and every sample, keys and lists
    the halves alike (s25: a tie broken by the sum of the loadings reversed d1, d3 in one group and d2, d4 in
    another).

    ``standardized`` (p, m): the standardized total loadings, which mark the weak items (:func:`weak_loadings`): the
    sign of a loading that small says nothing of how the item is keyed (sampling error alone turns it), so a weak item
    takes no part in the majority or the tie-break, and without a 'reversed' statement it keeps its answers as given
    (key +1) whatever its sign (words s24: a weak item's sign reversed it in the keyed sums).  None: no item weak."""
    below = G < 0
    if declared is None and not below.any():  # no loading below zero (the usual case): what the rule below gives
        # then, to the bit, without its arithmetic: every sign +1, so K is the members times 1.0, a factor's vote is its
        # count of items (a factor reaching none: a vote of 0), every factor points the keyed way and none is split
        m = member.shape[1]
        return member.astype(float), np.ones(m), np.zeros(m, dtype=bool)
    weak = None if standardized is None else weak_loadings(standardized, member)
    signs = np.where(below, -1.0, 1.0)
    if weak is not None and weak.any():
        signs = np.where(weak, 1.0, signs)  # a weak item's sign: as answered
    keys = (np.ones((len(observed), 1)) if declared is None else
            np.array([-1.0 if x in declared else 1.0 for x in observed])[:, None])
    voting = member if weak is None else member & ~weak
    keyed = keys * signs * voting  # +1 or -1 where an item votes, 0 elsewhere
    vote = keyed.sum(axis=0)
    # the tie-break: the keyed sign of each factor's first voting item (0 for a factor with none)
    first = np.argmax(voting, axis=0)
    tie_break = np.where(voting.any(axis=0), keyed[first, np.arange(keyed.shape[1])], 0.0)
    direction = np.where(np.where(vote == 0, tie_break, vote) < 0, -1.0, 1.0)  # each factor's majority
    if declared is None:
        K = np.where(weak, 1.0, signs * direction) * member if weak is not None else signs * direction * member
    else:
        K = keys * member
    return K, direction, (vote == 0) & voting.any(axis=0)


def weak_loadings(standardized: np.ndarray, member: np.ndarray) -> np.ndarray:
    """(p, m) the weak items of each factor: a standardized loading (or total effect) below
    assessment.method_factors.SMALL_LOADING in size (common practice's line of a negligible loading) on a factor some
    other item of which is not below it (a factor whose every loading is small is a weak factor, not weak items): the
    rule of assessment.markers.weak_items, on the fitted matrices."""
    size = np.abs(standardized)
    weak = member & (size < SMALL_LOADING)
    return weak & (member & (size >= SMALL_LOADING)).any(axis=0)


def standardized_effects(G: np.ndarray, factor_variances: np.ndarray, item_variances: np.ndarray) -> np.ndarray:
    """The standardized total loadings G_ij sd(eta_j) / sd(x_i), for :func:`item_keys`' weak items."""
    with np.errstate(divide="ignore", invalid="ignore"):
        return G * np.sqrt(np.maximum(factor_variances, 0.0)) / np.sqrt(np.maximum(item_variances, 0.0))[:, None]


def sum_keys(L: np.ndarray, G: np.ndarray, factor_covariance: np.ndarray, implied_covariance: np.ndarray,
             observed: tuple[str, ...], declared: Collection[str] | None) -> np.ndarray:
    """(p, m) the keys of every factor's keyed sum from fitted matrices (direct loadings L, total loadings G = L A,
    the factors' covariance Phi and the items' implied covariance Sigma): +1 or -1 for the items that measure each
    factor (directly or through the factors below it), 0 for the others, by :func:`item_keys` (``declared``: the items
    of the model's 'reversed' statement, None without one).  The one reading of the keys of the fit's sums, which
    the fit's reliability (:func:`reliability`), the delta method of its omega (assessment.reliability_intervals)
    and the scores' sums (scoring/quality.py, scoring/item_sums.py) share."""
    member = (np.abs(G) > 1e-12) | (L != 0)
    return item_keys(G, member, observed, declared,
                     standardized_effects(G, np.diagonal(factor_covariance), np.diagonal(implied_covariance)))[0]


def keyed_omega(K: np.ndarray, C: np.ndarray, factor_variances: np.ndarray, sum_variances: np.ndarray) -> np.ndarray:
    """The one formula of a keyed sum's omega, per factor (column): (sum_i k_i C_if)^2 / (Phi_ff k'Sigma k), the share
    of the sum's variance its factor accounts for (McDonald 1999's (sum_i k_i G_if)^2 Phi_ff / k'Sigma k where the
    items measure the factor alone; module docstring), for keys K (p, m), the items' covariances with the factors
    C = L Phi (p, m), the factors' variances Phi_ff (m) and the keyed sums' variances k'Sigma k (m), which the callers
    need for more than omega."""
    return np.einsum("ij,ij->j", K, C) ** 2 / (factor_variances * sum_variances)


def cronbach_alpha(S: np.ndarray, keys: np.ndarray | None = None) -> float:
    """Cronbach's (1951) alpha of the sum of items with covariance matrix S, each item multiplied by
    its key (+1, or -1 for a reversed item)."""
    n = len(S)
    if n < 2:
        return float("nan")
    total = S.sum() if keys is None else float(keys @ S @ keys)
    return float(n / (n - 1) * (1.0 - np.trace(S) / total))


@dataclass(frozen=True, eq=False)
class _Layout:
    """What :func:`reliability` reads from the loadings' pattern alone (which items each factor reaches and which load
    on it directly, which factors are higher-order): the same for every fit of a model, so it is made once per pattern
    (:func:`_layout`).  Arrays are read-only."""

    counts: np.ndarray  # items loading directly on each factor
    counts_l: list[int]
    several: np.ndarray  # counts > 1
    alpha_ratio: np.ndarray  # counts / (counts - 1) (1 for fewer than two items), alpha's factor n / (n - 1)
    pairs: np.ndarray  # counts (counts - 1): the ordered pairs of a factor's own items
    higher_l: list[bool]
    first_order: list[int]  # factors reaching items, not higher-order, not method factors
    compared: np.ndarray  # (m, m): factor j is compared with first-order factor k (outside bifactor structures)
    compared_l: list[bool]
    member_l: list[list[int]]  # per factor, the items it reaches
    direct_l: list[list[int]]  # per factor, the items loading on it directly
    names: tuple[tuple[str, ...], ...]  # per factor, the names of the items it reaches
    cross_loading: bool  # some item loads on two factors that are not higher-order (a bifactor structure is possible)


def _layout(direct: np.ndarray, member: np.ndarray, higher: np.ndarray, observed: tuple[str, ...],
            latent: tuple[str, ...], not_traits: frozenset[str]) -> _Layout:
    """:class:`_Layout` of a pattern, made once per pattern (the arrays' bytes, with the names, are the key)."""
    same = member is direct
    return _pattern_layout(direct.shape, direct.tobytes(), None if same else member.tobytes(), higher.tobytes(),
                           observed, latent, not_traits)


@lru_cache(maxsize=64)
def _pattern_layout(shape: tuple[int, int], direct_bytes: bytes, member_bytes: bytes | None, higher_bytes: bytes,
                    observed: tuple[str, ...], latent: tuple[str, ...], not_traits: frozenset[str]) -> _Layout:
    p, m = shape
    direct = np.frombuffer(direct_bytes, dtype=bool).reshape(p, m)
    member = direct if member_bytes is None else np.frombuffer(member_bytes, dtype=bool).reshape(p, m)
    higher = np.frombuffer(higher_bytes, dtype=bool)
    counts = direct.sum(axis=0)
    reached, higher_l = member.any(axis=0).tolist(), higher.tolist()
    first_order = [j for j in range(m) if reached[j] and not higher_l[j] and latent[j] not in not_traits]
    others = np.zeros(m, dtype=bool)
    others[first_order] = True
    compared = others[None, :] & ~np.eye(m, dtype=bool)
    member_l = [c.nonzero()[0].tolist() for c in member.T]
    direct_l = member_l if member_bytes is None else [c.nonzero()[0].tolist() for c in direct.T]
    arrays = dict(counts=counts, several=counts > 1, alpha_ratio=counts / np.maximum(counts - 1, 1),
                  pairs=counts * (counts - 1), compared=compared)
    for a in arrays.values():
        a.setflags(write=False)
    return _Layout(counts_l=counts.tolist(), higher_l=higher_l, first_order=first_order,
                   compared_l=compared.any(axis=1).tolist(), member_l=member_l, direct_l=direct_l,
                   names=tuple(tuple([observed[i] for i in items]) for items in member_l),
                   cross_loading=bool((direct[:, ~higher] if higher.any() else direct).sum(axis=1).max() > 1),
                   **arrays)


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
    L, G = mats.L, mats.G
    phi = mats.latent_covariance()
    sigma = mats.implied_covariance()
    theta = mats.T
    # every factor at once: columns of keys K (item i's key for factor j, 0 for items f does not reach) and of
    # K restricted to each first-order factor's own items; the sums of the module docstring are then columns of
    # K' X K and K' x for the matrices X and vectors x involved
    direct = np.abs(L) > 0
    if mats.has_paths:
        member = (np.abs(G) > 1e-12) | direct
        higher = np.abs(mats.B).sum(axis=0) > 0
    else:  # G is L (so every item the loadings reach is one of direct's) and B is zero: no higher-order factor
        member, higher = direct, np.zeros(m, dtype=bool)
    # the standardized total loadings mark the weak items, whose signs key nothing (item_keys); needed only where some
    # loading is below zero or keys are declared (the usual fit has neither: no arithmetic spent)
    standardized = (standardized_effects(G, phi.diagonal(), sigma.diagonal())
                    if declared is not None or (G < 0).any() else None)
    K, direction, split = item_keys(G, member, observed, declared, standardized)
    weak = None if standardized is None else weak_loadings(standardized, member)
    if weak is not None and not weak.any():
        weak = None
    weak_l = None if weak is None else weak.T.tolist()
    # a weak item whose sign runs against its factor's direction: left as answered only because it is weak
    weak_against_l = (None if weak is None or declared is not None else
                      (weak & (np.where(G < 0, -1.0, 1.0) != direction)).T.tolist())
    layout = _layout(direct, member, higher, observed, latent, not_traits)
    first_order, compared = layout.first_order, layout.compared
    if declared is None:
        against = None
    else:
        # contradictions are reported once, for the factor the items load on directly
        against = member & (K * np.where(G < 0, -1.0, 1.0) != direction) & (G != 0) & ~higher
    # one errstate for every quotient below: 0 / 0 for higher-order factors (which have no composite reliability or
    # AVE), NaN comparisons for them (and a negative AVE: no Fornell-Larcker comparison holds), a factor of one item
    with np.errstate(divide="ignore", invalid="ignore"):
        totals = np.einsum("ij,ij->j", K, sigma @ K)
        omega = keyed_omega(K, mats.item_factor_covariance(), phi.diagonal(), totals)
        omega_total = 1.0 - np.einsum("ij,ij->j", K, theta @ K) / totals
        sd_lat = np.sqrt(np.maximum(phi.diagonal(), 1e-300))
        sd_obs = np.sqrt(np.maximum(sigma.diagonal(), 1e-300))
        corr_lat = phi / (sd_lat[:, None] * sd_lat)
        Kd = K if member is direct else K * direct  # keys of each first-order factor's own items (K itself, zeros
        # and their signs too, when the factors reach only the items loading on them)
        lam = L * sd_lat / sd_obs[:, None]  # standardized loadings (0 where an item does not load)
        err = direct.T.astype(float) @ (theta.diagonal() / sd_obs**2)  # standardized residual variances, summed
        keyed_sum = np.einsum("ij,ij->j", Kd, lam)
        lam_squares = (lam**2).sum(axis=0)
        cr = keyed_sum**2 / (keyed_sum**2 + err)
        ave = lam_squares / (lam_squares + err)
        general, shared = (_bifactor(direct, corr_lat, higher, observed, latent, not_traits) if layout.cross_loading
                           else (set(), {}))  # no item on two factors: no bifactor structure (the usual case)
        # per factor, as lists read in the loop below: the largest |correlation| with another first-order factor
        # (-inf with none) and whether sqrt(AVE) exceeds it (Fornell-Larcker); a bifactor model's general and
        # specific factors are not compared (the module docstring)
        apart = None  # a general factor and its specific ones (none outside bifactor models)
        compared_l = layout.compared_l
        if shared:
            apart = np.zeros((m, m), dtype=bool)
            index = {name: j for j, name in enumerate(latent)}
            for a, sharing in shared.items():
                apart[index[a], [index[b] for b in sharing]] = True
            compared = compared & ~apart
            compared_l = compared.any(axis=1).tolist()
        largest_a = np.where(compared, np.abs(corr_lat), -np.inf).max(axis=1)
        largest_l, holds_l = largest_a.tolist(), (np.sqrt(ave) > largest_a).tolist()
        if S is not None:
            SK = S @ Kd
            keyed_totals = np.einsum("ij,ij->j", Kd, SK)  # k'S k over each factor's own items
            s_ii = S.diagonal()
            alpha = np.where(layout.several, layout.alpha_ratio * (1.0 - direct.T @ s_ii / keyed_totals), np.nan)
            # the keyed sum's SD and each item's corrected item-total correlation (_sum_score_spread), every factor
            sd_l = np.sqrt(keyed_totals * (n_obs / (n_obs - 1) if n_obs and n_obs > 1 else 1.0)).tolist()
            with_rest = K * SK - s_ii[:, None]  # cov(k_i x_i, T - k_i x_i) with T the keyed sum
            rest = keyed_totals - 2.0 * K * SK + s_ii[:, None]  # var(T - k_i x_i)
            item_total_l = (with_rest / np.sqrt(np.maximum(s_ii[:, None] * rest, 1e-300))).T.tolist()
            alpha_l, means_l = alpha.tolist(), means.tolist() if means is not None else None
            # HTMT: the keyed correlations k_a' R k_b of every pair of factors, and the mean keyed correlation within
            # each factor (each pair of its items once)
            sd_items = np.sqrt(s_ii)
            R = S / (sd_items[:, None] * sd_items)
            keyed_r = Kd.T @ R @ Kd
            mono_l = ((keyed_r.diagonal() - direct.T @ R.diagonal()) / layout.pairs).tolist()
            keyed_r_l = keyed_r.tolist()
    keying = Keying.SIGNS if declared is None else Keying.DECLARED
    member_l, direct_l, higher_l, counts_l = layout.member_l, layout.direct_l, layout.higher_l, layout.counts_l
    negative = (K < 0).T.tolist()  # by factor, then item
    against_l = against.T.tolist() if against is not None else None
    omega_l, omega_total_l, cr_l, ave_l = omega.tolist(), omega_total.tolist(), cr.tolist(), ave.tolist()
    # a factor split evenly has no majority to point against (its tie-break only orders the keys)
    turned_l, tied_l = ((direction < 0) & ~split).tolist(), split.tolist()
    reported_sums = S is not None and sum_scores
    results = []
    for j, name in enumerate(latent):
        items = member_l[j]
        if not items or name in not_traits:
            continue
        names = layout.names[j]
        turned_j = negative[j]
        reversed_items = tuple([observed[i] for i in items if turned_j[i]])
        against_items = () if against_l is None else tuple([observed[i] for i in items if against_l[j][i]])
        turned, tied = turned_l[j], tied_l[j]
        faint = () if weak_l is None else tuple([observed[i] for i in items if weak_l[j][i]])
        faint_against = () if weak_against_l is None else tuple([observed[i] for i in items if weak_against_l[j][i]])
        if higher_l[j]:
            results.append(FactorReliability(name, names, "higher-order", omega_l[j], omega_total_l[j], omega_l[j],
                                             None, None, None, None, None, reversed_items, keying, None, None, (),
                                             against_items, points_against=turned, evenly_split=tied,
                                             weak=faint, weak_against=faint_against))
            continue
        alpha_j = mean = sd = None
        item_total: tuple[float, ...] = ()
        if S is not None:
            alpha_j = alpha_l[j]
        if reported_sums:
            own_items = direct_l[j]
            sd = sd_l[j]
            if len(own_items) > 1:
                row = item_total_l[j]
                item_total = tuple([row[i] for i in own_items])
            if means_l is not None:
                mean = _sum_score_mean(means_l, turned_j, own_items, observed, declared)
        if counts_l[j] == 1:  # one item: its coefficients only restate the error variance the model had to fix
            results.append(FactorReliability(name, names, "first-order", float("nan"), float("nan"), None, None, None,
                                             None, None, None, reversed_items, keying, mean, sd, item_total,
                                             against_items, weak=faint, weak_against=faint_against))
            continue
        largest = holds = None
        if compared_l[j]:  # another first-order factor to compare with
            largest, holds = largest_l[j], holds_l[j]
        part = (None if name not in shared else BifactorPart.GENERAL if name in general else BifactorPart.SPECIFIC)
        results.append(FactorReliability(name, names, "first-order", omega_l[j], omega_total_l[j],
                                         omega_l[j] if part is BifactorPart.GENERAL else None,
                                         None if part is not None else cr_l[j], ave_l[j], alpha_j, largest, holds,
                                         reversed_items, keying, mean, sd, item_total, against_items,
                                         points_against=turned, evenly_split=tied, bifactor=part,
                                         shares_items_with=shared.get(name, ()), weak=faint,
                                         weak_against=faint_against))
    htmt = []
    if S is not None:
        for a_pos, a in enumerate(first_order):
            for b in first_order[a_pos + 1:]:
                if apart is not None and apart[a, b]:  # a general factor and one of its specific factors (the module
                    continue  # docstring)
                short = [latent[f] for f in (a, b) if counts_l[f] < 2]
                if short:
                    htmt.append(Htmt(latent[a], latent[b], None, f"{word_list(short)} "
                                     f"{'has' if len(short) == 1 else 'have'} fewer than two items of its own, so there "
                                     f"is no correlation within it to compare with"))
                    continue
                hetero = keyed_r_l[a][b] / (counts_l[a] * counts_l[b])
                mono_a, mono_b = mono_l[a], mono_l[b]
                if mono_a > 0 and mono_b > 0:
                    htmt.append(Htmt(latent[a], latent[b], abs(hetero) / math.sqrt(mono_a * mono_b)))
                else:
                    weak = [latent[f] for f, value in ((a, mono_a), (b, mono_b)) if value <= 0]
                    htmt.append(Htmt(latent[a], latent[b], None, f"the keyed items of {word_list(weak)} do not "
                                     f"correlate positively on average, so the ratio is not defined"))
    return results, htmt


def _bifactor(direct: np.ndarray, corr_lat: np.ndarray, higher: np.ndarray, observed: tuple[str, ...],
              latent: tuple[str, ...], not_traits: frozenset[str]) -> tuple[set[str], dict[str, tuple[str, ...]]]:
    """(general factors, the factors sharing items with each factor of a bifactor structure) by the one rule of
    assessment/method_factors.bifactor_parts, from the loadings' pattern and the factors' zero correlations."""
    m = len(latent)
    higher = np.asarray(higher, dtype=bool)
    if (direct[:, ~higher] if higher.any() else direct).sum(axis=1).max() < 2:
        return set(), {}  # no item on two factors: no bifactor structure (the usual case, at once)
    loadings = {latent[j]: {observed[i] for i in np.nonzero(direct[:, j])[0]} for j in range(m) if not higher[j]}
    parts = bifactor_parts(loadings, not_traits, uncorrelated_pairs(latent, corr_lat))
    shared: dict[str, tuple[str, ...]] = dict(parts)
    for general, specific in parts.items():
        for f in specific:
            shared[f] = shared.get(f, ()) + (general,)
    return set(parts), shared


def _sum_score_mean(means: list[float], reversed_: list[bool], items: list[int], observed: tuple[str, ...],
                    declared: dict[str, tuple[float, float]] | None) -> float | None:
    """Mean of the keyed sum of ``items`` (positions among ``observed``; ``means`` and ``reversed_`` by position), a
    reversed item's answers counting as minimum + maximum - x; None when an item is reversed without a declared scale
    range."""
    total = 0.0
    for i in items:
        if not reversed_[i]:
            total += means[i]
        elif declared is not None and observed[i] in declared:
            low, high = declared[observed[i]]
            total += low + high - means[i]
        else:
            return None
    return total


#: the model file's statement of reverse-keyed items, apart from the words (note_parts.Command): the program's user
#: edits the model file, a manuscript's reader does not
REVERSED_STATEMENT = " (its 'reversed' statement)"
#: ... and how a 'reversed' statement declares items, as advice to the program's user gives it
DECLARE_REVERSED = " with 'reversed ... on LOWEST to HIGHEST'"


def keying_warnings(factors: list[FactorReliability] | tuple, prefix: str = "",
                    scales: Mapping[str, FactorScale] | None = None) -> list[Text]:
    """Notes on factors half of whose items load each way (no majority tells which way they point).  Where the
    declared keying contradicts the loadings' signs, and factors that point against their items, are problems of
    the solution, first in every view (:func:`keying_problems`).  ``scales``: how each factor's scale is set
    (model.description.FactorScale), which decides its direction (the marker, its loadings' sum under effects
    coding, the start of the estimation under variance scaling); none: the marker."""
    split = _split(factors)
    return [_split_warning(split, prefix, scales or {})] if split else []  # one caution for all: the same advice


def group_keying_warnings(per_group: Sequence[tuple[str, Sequence[FactorReliability]]],
                          scales: Mapping[str, FactorScale] | None = None) -> list[Text]:
    """:func:`keying_warnings` of a fit of several groups (``per_group``: each group's label and its factors), each
    caution said once: for every group where it holds alike ('in every group, factor 'f': half of its items load each
    way ...'), else naming the groups where it holds as said ('in groups north and south, ...'), one caution for each
    way it differs (s26: a balanced scale's caution was repeated, word for word, once per group)."""
    labels = [label for label, _ in per_group]
    said: dict[Note, list[str]] = {}
    for label, factors in per_group:
        split = _split(factors)
        if split:
            said.setdefault(_split_warning(split, "", scales or {}), []).append(label)
    out: list[Text] = []
    for note, groups in said.items():
        where = ("in every group, " if len(groups) == len(labels) else
                 f"in group{'s' if len(groups) > 1 else ''} {word_list(written_group(g, labels) for g in groups)}, ")
        out.append(Note((where,) + note.parts))
    return out


def _split(factors) -> list[FactorReliability]:
    return [r for r in factors if r.evenly_split and not r.points_against and r.keying is not Keying.DECLARED]


def miskeyed(r: FactorReliability) -> bool:
    """Whether the loadings of some of the factor's items contradict the keying a 'reversed' statement declares
    (``against_keying``: the items whose keyed loadings run against most of the factor's items, judged by their signs
    relative to the others, the marker's too).  Whichever way the factor points: the items are the same in every
    order of the factor's items (hostile s23: with the item coded the other way listed first, as the marker, the
    factor pointed its way and the contradiction went unnamed, its omega .35 printed).  Half each way against a
    declared keying is a contradiction too, the plainest: the keyed sum adds two halves that cancel, whichever of
    them is keyed wrongly (hostile s24b case 07: two of four items declared reversed that load with the others gave
    omega .00059 and alpha -.916 in the paragraph and the table, with a note only, where one such item withheld them
    with a caution first).  A balanced scale without a 'reversed' statement (keys by the loadings' signs) is keyed
    as its loadings run and contradicts nothing: its caution is of the factor's direction (:func:`keying_warnings`)."""
    return bool(r.against_keying) and (not r.evenly_split or r.keying is Keying.DECLARED)


#: why a factor's reliability coefficients are withheld where its loadings contradict the declared keying
#: (:func:`miskeyed`): said by the report's table and written into the JSON beside the coefficients it withholds
WITHHELD_BECAUSE = ("its loadings contradict the keying the model declares, so its keyed sum adds items that run "
                    "against each other and describes no scale")
#: the figures of a factor's keyed sum that such a keying withholds (FactorReliability's fields): its coefficients,
#: and its mean and standard deviation (the item-total correlations, the evidence of the contradiction, stay)
WITHHELD_COEFFICIENTS = ("omega", "omega_total", "omega_hierarchical", "composite_reliability", "alpha",
                         "observed_sum_omega", "sum_score_mean", "sum_score_sd")


def withheld_sums(problems) -> frozenset[tuple[str | None, str]]:
    """(group label, None with one group; factor) of each keyed sum whose reliability a fit withholds because its
    loadings contradict the declared keying (:func:`miskeyed`), read from the fit's problems (``problems``: its
    assessment.admissibility.Problem values, saved or not), so that what uses the fit's sums (scores) withholds the
    same ones (hostile s23: the scores' first box called comfort's sum 'no scale' and then quoted its omega .35)."""
    from cfa_tool.assessment.admissibility import ProblemKind
    from cfa_tool.language.names import read_reference

    return frozenset((p.group, read_reference(label)[1][0]) for p in problems
                     if p.kind is ProblemKind.KEYING_AGAINST_LOADINGS for label in p.parameters[:1])


def _miskeyed_warning(r: FactorReliability, standardized=None) -> tuple[Note, Note]:
    """(what is wrong, what to try) for a factor whose loadings contradict the declared keying (:func:`miskeyed`):
    its keyed sum adds items that run against each other, so its omega and alpha describe no scale.  The model
    file's statement apart (note_parts.Command): a manuscript says it in words.  ``standardized``: each item's
    standardized loading on the factor, by item (None: not said), the evidence, said beside the items it judges
    (s24: the caution did not say what its judgement rested on)."""
    if r.evenly_split:
        return _split_against_declared(r, standardized)
    declared = [x for x in r.against_keying if x in r.reversed]  # declared reversed, loading with the others
    undeclared = [x for x in r.against_keying if x not in r.reversed]  # loading against the others, not declared
    said = "; ".join(part for part in (
        f"{', '.join(declared)} {'is' if len(declared) == 1 else 'are'} declared reversed but load"
        f"{'s' if len(declared) == 1 else ''} the way of the factor's other items" if declared else "",
        f"{', '.join(undeclared)} load{'s' if len(undeclared) == 1 else ''} against the factor's other items but "
        f"{'is' if len(undeclared) == 1 else 'are'} not declared reversed" if undeclared else "") if part)
    turned = ""
    if r.points_against:  # the factor points the way of those items (its marker among them), against the others
        others = [x for x in r.items if x not in r.against_keying and x not in r.reversed]
        lower = (f"{', '.join(others)} load{'s' if len(others) == 1 else ''} negatively, so a higher '{r.factor}' "
                 f"means lower answers on {'it' if len(others) == 1 else 'them'}" if others else
                 f"a higher '{r.factor}' means less of what its other items ask")
        turned = (f" The factor points the way of {', '.join(r.against_keying)} too: {lower}, and its correlations, "
                  f"mean differences and scores read the wrong way.")
    evidence = ""
    if standardized:
        from cfa_tool.assessment.method_factors import loading_size

        def shown(x: str) -> str:
            v = standardized.get(x, math.nan)
            return "" if not math.isfinite(v) else f"{'-' if v < 0 else ''}{loading_size(abs(v))}"

        def listed(items) -> str:
            return ", ".join(f"{x} {shown(x)}" for x in items)

        plain = [x for x in r.items if x not in r.against_keying and x not in r.reversed and shown(x)]
        as_declared = [x for x in r.items if x not in r.against_keying and x in r.reversed and shown(x)]
        if all(shown(x) for x in r.against_keying) and (plain or as_declared):
            evidence = (f" (standardized loadings: {listed(r.against_keying)}; of the other items "
                        + "; ".join(part for part in (listed(plain), f"declared reversed: {listed(as_declared)}"
                                                      if as_declared else "") if part) + ")")
    return (Note((f"The loadings of {', '.join(repr(x) for x in r.against_keying)} on factor '{r.factor}' point the "
                  f"other way from the keying the model declares", Command(REVERSED_STATEMENT),
                  f": {said}{evidence}; the factor's keyed sum adds items that run against each other, so its reliability "
                  f"(omega, alpha) and its sum scores describe no scale.{turned}")),
            Note(("check the declared keying", Command(REVERSED_STATEMENT), " for a typing error (an item named in "
                  "place of another) and how the answers were coded, then fit again"
                  + ("; with the keying right, the automatic marker, an item not declared reversed, orients the "
                     "factor." if r.points_against else "."))))


def _split_against_declared(r: FactorReliability, standardized=None) -> tuple[Note, Note]:
    """(what is wrong, what to try) for a factor half of whose items, keyed as a 'reversed' statement declares, run
    against the other half (``evenly_split`` with declared keys, :func:`miskeyed`): both halves named in the model's
    order, each item with its standardized loading (``standardized``, by item; None: not said) and whether it is
    declared reversed, since no majority tells which half is keyed wrongly (hostile s24b case 07)."""
    from cfa_tool.assessment.method_factors import loading_size

    def shown(x: str) -> str:
        v = (standardized or {}).get(x, math.nan)
        size = f" {'-' if v < 0 else ''}{loading_size(abs(v))}" if math.isfinite(v) else ""
        return f"{x}{size}{' (declared reversed)' if x in r.reversed else ''}"

    against = [x for x in r.items if x in r.against_keying]
    weak = {x for x, v in (standardized or {}).items() if math.isfinite(v) and abs(v) < SMALL_LOADING}
    other = [x for x in r.items if x not in r.against_keying and x not in weak]
    halves = [other, against] if other and r.items.index(other[0]) < r.items.index(against[0]) else [against, other]
    loadings = " (standardized loadings)" if standardized else ""
    return (Note((f"Half of the items of factor '{r.factor}' run against the other half as the model declares their "
                  f"keying", Command(REVERSED_STATEMENT), f": keyed as declared, {', '.join(map(shown, halves[0]))} "
                  f"run one way and {', '.join(map(shown, halves[1]))} the other{loadings}, so no majority tells which "
                  f"half is keyed wrongly; the factor's keyed sum adds two halves that cancel, so its reliability "
                  f"(omega, alpha) and its sum scores describe no scale.")),
            Note(("check which of these items are worded against the trait, the declared keying",
                  Command(REVERSED_STATEMENT), " for a typing error (an item named in place of another, or one left "
                  "out) and how the answers were coded, then fit again.")))


def _split_warning(split: list[FactorReliability], prefix: str, scales: Mapping[str, FactorScale]) -> Note:
    """The caution for the factors half of whose items load each way (``evenly_split``) with no 'reversed'
    statement: one sentence for all of them, each factor's two halves named, and what decides the way each points
    (:func:`_direction_words`: the marker, or what takes its place under another scaling)."""
    def halves(r: FactorReliability) -> str:
        """The two halves, weak items on neither side (item_keys: their signs key nothing), named after them."""
        kept = word_list(x for x in r.items if x not in r.reversed and x not in r.weak)
        weak = (f"; {word_list(r.weak)}, of standardized loading{'' if len(r.weak) == 1 else 's'} below {WEAK_LINE} "
                f"in size, load{'s' if len(r.weak) == 1 else ''} too weakly to count on either side" if r.weak else "")
        return f"{kept} against {word_list(r.reversed)}{weak}"

    if len(split) == 1:
        r = split[0]
        return Note((f"{prefix}factor '{r.factor}': half of its items load each way ({halves(r)}), so the data "
                     f"cannot tell which way it points: {_direction_words([scales.get(r.factor)])}, and its "
                     f"correlations, mean differences and scores may read the wrong way; declare the items worded "
                     f"against the trait as scored in reverse", Command(DECLARE_REVERSED), ", which orients the "
                     "factor by its other items and keys the sums"))
    named = word_list(f"'{r.factor}'" for r in split)
    return Note((f"{prefix}factors {named}: half of each one's items load each way "
                 f"({'; '.join(f'{r.factor}: {halves(r)}' for r in split)}), so the data cannot tell which way each "
                 f"points: {_direction_words([scales.get(r.factor) for r in split])}, and its correlations, mean "
                 f"differences and scores may read the wrong way; declare the items worded against the trait as "
                 f"scored in reverse", Command(DECLARE_REVERSED), ", which orients each factor by its other items and "
                 "keys the sums"))


def _direction_words(scales: Sequence[FactorScale | None]) -> str:
    """What decides the way a factor without a majority of its items points ('its direction follows its marker,
    x1'), by how its scale is set (``scales``: one per factor named, None where not known: a marker).  A marker's
    sign gives the direction; effects coding holds the loadings' sum positive; under variance scaling no value the
    model fixes does, and the estimation keeps the way its start takes: the majority of the items, on a tie the
    larger sum of the loadings (model.starts._orientation), so the half that loads more strongly points up.  Several
    factors: each one's (s26: 'its direction follows its marker' was said of factors scaled by their variance)."""
    methods = {s.method if s is not None else "marker" for s in scales}
    one = len(scales) == 1
    if methods == {"marker"}:
        marker = scales[0].marker if one and scales[0] is not None else None
        return "its direction follows its marker" + (f" ({marker})" if marker else "") if one else \
            "each one's direction follows its marker"
    if methods == {"variance"}:
        return ("no marker sets its direction (its variance is fixed at 1), so the estimation takes the way its more "
                "strongly loading half points" if one else
                "no marker sets their directions (their variances are fixed at 1), so the estimation takes the way "
                "each one's more strongly loading half points")
    if methods == {"effects"}:
        return ("its direction follows the sum of its loadings, which effects coding holds positive" if one else
                "each one's direction follows the sum of its loadings, which effects coding holds positive")
    return ("its direction follows how the model sets its scale, not the data" if one else
            "each one's direction follows how the model sets its scale, not the data")


def _turned_warning(r: FactorReliability) -> tuple[str, Text]:
    """(what is wrong, what to try) for a factor that points against its items (``points_against``); the model
    file's statements apart from the advice's words (note_parts.Command)."""
    with_keys = [x for x in r.items if x not in r.reversed]  # the items whose answers rise with the factor
    if r.keying is Keying.DECLARED:
        return (f"Factor '{r.factor}' points against its items: the items not declared reversed load negatively, so "
                f"a higher '{r.factor}' means less of what they ask, and its correlations, mean differences and scores "
                f"read the wrong way.",
                Note(("fix the loading of an item not declared reversed at 1 as its marker (the automatic marker "
                      "does so; where the factor's variance sets its scale, start those items' loadings above 0), or "
                      "check the keying the model declares", Command(REVERSED_STATEMENT), ".")))
    if not r.reversed:  # every item loads negatively: no item to name, the factor itself is turned (hostile s23)
        return (f"Every item of factor '{r.factor}' loads negatively ({', '.join(r.items)}), so the factor points "
                f"against all of them: a higher '{r.factor}' means lower answers on every item, and its correlations, "
                f"mean differences and scores read the wrong way. A factor's direction is arbitrary (turned round it "
                f"fits the data the same), so this one was turned by its scale: a marker's loading fixed below 0, or "
                f"start values below 0.",
                Note(("turn it round: fix its marker's loading at 1 rather than below 0, or, where its variance sets "
                      "its scale, start its loadings above 0 (the automatic start values do); the fit stays the "
                      "same.",)))
    few = ", ".join(r.reversed)
    one = len(r.reversed) == 1
    return (f"Factor '{r.factor}' points the way of {few}, against most of its items ({', '.join(with_keys)} load "
            f"negatively), so a higher '{r.factor}' means lower answers on most of its items.",
            Note((f"if {few} {'is' if one else 'are'} worded against the trait, declare {'it' if one else 'them'} "
                  f"as scored in reverse", Command(f" with 'reversed {few} on LOWEST to HIGHEST'"), ", which orients "
                  "the factor by its other items and keys the sums.")))


def apart_from_weak_markers(rows, weak) -> tuple[FactorReliability, ...]:
    """One group's reliability rows with the factors' weak markers and weak items (``weak``: assessment.markers
    .WeakMarker or WeakItem of that group, each with its factor and item) taken out of ``against_keying``: the sign of
    a loading that small says nothing of how the item is keyed (a random-answer item as the marker, hostile s23; a weak
    item of either sign, s24); the marker's own caution and the weak item's note say what the evidence is."""
    if not weak:
        return tuple(rows)
    faint = {(w.factor, w.item) for w in weak}
    return tuple(replace(r, against_keying=tuple(x for x in r.against_keying if (r.factor, x) not in faint))
                 if any((r.factor, x) in faint for x in r.against_keying) else r for r in rows)


def keying_problems(groups, weak=(), estimates=()) -> list:
    """A caution, first in every view, for each factor of each group (``groups``: GroupResult, with their
    reliability rows) whose loadings contradict the keying a 'reversed' statement declares (new-user trial s17: a
    typing error in the statement gave omega .14 in a paste-ready paragraph, the contradiction only among the notes),
    or that points against its items; and for each factor whose marker hardly measures it (``weak``:
    assessment.markers.WeakMarker), whose caution says too where that marker turns the factor against its items, in
    place of advice to declare it reversed (hostile s23; the keyed sums never reverse it for its sign: item_keys)."""
    from cfa_tool.assessment.admissibility import Problem, ProblemKind
    from cfa_tool.assessment.markers import weak_marker_problem

    several = len(groups) > 1
    out = []
    for g in groups:
        label = g.label if several else None
        rows = {r.factor: r for r in g.reliability}
        marked = set()
        for w in weak:
            if w.group is not None and w.group != g.label:  # one group: its rows carry no label
                continue
            r = rows.get(w.factor)
            turned = r is not None and r.points_against and not miskeyed(r)
            out.append(weak_marker_problem(w, several, tuple(x for x in r.items if x != w.item and x not in r.reversed)
                                           if turned else ()))
            marked.add(w.factor)
        for r in g.reliability:
            if miskeyed(r):
                explanation, advice = _miskeyed_warning(r, {e.variables[1]: e.standardized for e in estimates
                                                            if e.kind == "loading" and e.variables[0] == r.factor
                                                            and e.group == g.label})
                out.append(Problem(ProblemKind.KEYING_AGAINST_LOADINGS,
                                   tuple(reference_text("loading", (r.factor, x)) for x in r.against_keying), None,
                                   explanation, advice, label))
            elif r.points_against and r.factor not in marked:
                explanation, advice = _turned_warning(r)
                out.append(Problem(ProblemKind.FACTOR_POINTS_AGAINST_ITEMS,
                                   (reference_text("factor_variance", (r.factor,)),), None, explanation, advice, label))
    return out
