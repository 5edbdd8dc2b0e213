"""Ordinal items: thresholds, polychoric (and, beside continuous items, polyserial and
Pearson) correlations and their asymptotic covariance.

Two-step estimation (Olsson 1979): each item's thresholds from its cumulative
proportions, tau_c = Phi^-1(P(x <= c)); then each pair's correlation by
maximising the bivariate-normal likelihood of its contingency table with the
thresholds held fixed.  The asymptotic covariance matrix of the correlations
comes from their influence functions, corrected for the estimated thresholds
(Muthén 1984; Joreskog 1994):

    IF(rho)_n = I_rr^-1 (s_n - I_rt IF(tau)_n),   IF(tau_c)_n = (1{x_n <= c} - F_c) / phi(tau_c)

with s_n the case's score for rho and I the expected information of the pair's
likelihood; Gamma = mean of IF IF'.  A continuous item next to an ordinal one
gets a polyserial correlation (two-step, Olsson, Drasgow & Dorans 1982), whose
influence function is corrected in the same way for the thresholds and for the
continuous item's mean and standard deviation; two continuous items get the
Pearson correlation, IF = z_i z_j - r (z_i^2 + z_j^2) / 2.  With groups a continuous item's mean and
variance are statistics too, with IF = x - m and (x - m)^2 - s^2 (divisor N).

Under a sampling design every statistic is a pseudo-maximum-likelihood estimate: each row's
contribution to the proportions, the contingency tables, the moments and the likelihoods is
multiplied by its weight (Muthén & Satorra 1995; Asparouhov 2005), the expected derivatives
in the influence functions are weighted means, and the rows' influence functions are kept
(``OrdinalMoments.influence``) for the design-based covariance of
:func:`cfa_tool.inference.design.ordinal_design_covariance` (per-cluster sums within strata).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pandas as pd
from scipy import optimize
from scipy.special import ndtr  # the normal cdf over arrays in inner loops (numerics.distributions' rule)

from cfa_tool.numbers import counted, cut_list, user_number, word_list
from cfa_tool.numerics import distributions as dist
from cfa_tool.numerics.plain import journal_decimal

from cfa_tool.data.answer_words import CODED_BY_STATEMENT, answers_statement
from cfa_tool.language.spec import join_statement
from cfa_tool.data.descriptives import rare_answer_limit
from cfa_tool.data.kept_rows import row_of
from cfa_tool.data.moments import numeric_columns, row_numbers
from cfa_tool.data.odd_values import code_like
from cfa_tool.data.non_answers import advice_codes
from cfa_tool.data.sample_design import DesignColumns, RowDesign, row_design
from cfa_tool.errors import DataError, RowDataError, printable
from cfa_tool.options import Option
from cfa_tool.method import WeightKind
from cfa_tool.numerics.bivariate import BIG, bivariate_cdf, bivariate_pdf

MAX_CATEGORIES = 15


@dataclass(frozen=True, eq=False)
class OrdinalMoments:
    """Ordinal items' thresholds, polychoric correlations and their asymptotic covariance."""
    names: tuple[str, ...]
    n_obs: int
    rows_read: int
    rows_dropped: int
    source: str
    categories: tuple[tuple[float, ...], ...]
    thresholds: tuple[np.ndarray, ...]
    correlations: np.ndarray
    gamma: np.ndarray  # asymptotic covariance of sqrt(N)(r - rho), pairs in np.tril_indices(p, -1) order
    codes: np.ndarray = field(repr=False)
    means: np.ndarray = field(repr=False, default=None)  # of the items' scores as given
    sds: np.ndarray = field(repr=False, default=None)
    continuous: frozenset = frozenset()
    #: asymptotic covariance of sqrt(N)(s - sigma) for s = (all thresholds, then the correlations)
    joint_gamma: np.ndarray | None = field(repr=False, default=None)
    #: with pairwise present rows: rows answering both items (diagonal: each item); None with listwise deletion
    pair_counts: np.ndarray | None = field(repr=False, default=None)
    #: under a sampling design: each analysed row's weight, cluster and stratum, and the rows' joint influence
    #: functions (the covariance then follows from them by the design, and is None until it does)
    design: RowDesign | None = field(repr=False, default=None)
    influence: np.ndarray | None = field(repr=False, default=None)
    #: beside continuous items: asymptotic covariance of sqrt(N)(s - sigma) for s = (all thresholds, the continuous
    #: items' means, their variances, then the correlations): the statistics of a fit in several groups
    mixed_gamma: np.ndarray | None = field(repr=False, default=None)
    #: under clusters or strata: the variances of (all thresholds, then the correlations) with the rows taken as
    #: independent (weights applied), the diagonal the least-squares weights come from (None: diag(joint_gamma))
    weight_variances: np.ndarray | None = field(repr=False, default=None)
    #: under clusters: the cluster holding the largest share of the statistics' design effect (DominantCluster)
    dominant_cluster: object | None = field(repr=False, default=None)
    #: groups that share clusters (domains of one cluster sample): the covariance of every group's statistics
    #: (thresholds, then correlations) stacked over the groups, N/N_g Gamma_g in group g's own block and the blocks
    #: between groups from the clusters they share (inference.design.ordinal_domains); the same matrix in every
    #: group's moments; None for one group or independent groups
    domains_gamma: np.ndarray | None = field(repr=False, default=None)
    #: the rows read that answered none of the items, which pairwise present rows leave out too: of the rows
    #: listwise deletion leaves out, those its caution's advice does not promise to keep
    unanswered: int = 0

    @property
    def pairwise(self) -> bool:
        return self.pair_counts is not None

    @property
    def gaps(self) -> bool:
        """Whether some analysed row missed an answer (pairwise present rows with gaps)."""
        return self.pair_counts is not None and bool((self.pair_counts < len(self.codes)).any())

    @property
    def stacked_thresholds(self) -> np.ndarray:
        return np.concatenate([np.asarray(t, dtype=float) for t in self.thresholds]) if self.thresholds else np.zeros(0)

    @property
    def pairs(self) -> tuple[np.ndarray, np.ndarray]:
        return np.tril_indices(len(self.names), -1)

    @property
    def continuous_positions(self) -> np.ndarray:
        """Positions (in ``names``) of the continuous items analysed beside the ordinal ones."""
        return np.array([j for j, x in enumerate(self.names) if x in self.continuous], dtype=int)

    def statistics(self) -> tuple[np.ndarray, np.ndarray]:
        """(s, Gamma): the statistics a least-squares fit with thresholds as parameters uses, thresholds, then
        (beside continuous items) their means and variances (divisor N), then the correlations, and the
        asymptotic covariance of sqrt(N)(s - sigma)."""
        c = self.continuous_positions
        parts = [self.stacked_thresholds]
        if len(c):
            parts += [self.means[c], self.sds[c] ** 2]
        parts.append(self.correlations[self.pairs])
        return np.concatenate(parts), self.mixed_gamma if len(c) else self.joint_gamma


def _extended(tau: np.ndarray) -> np.ndarray:
    return np.concatenate([[-np.inf], tau, [np.inf]])


def cell_probabilities(ti: np.ndarray, tj: np.ndarray, rho: float) -> np.ndarray:
    a, b = _extended(ti), _extended(tj)
    F = bivariate_cdf(a[:, None], b[None, :], rho)
    return np.clip(F[1:, 1:] - F[:-1, 1:] - F[1:, :-1] + F[:-1, :-1], 1e-300, None)


def _rho_derivative(ti, tj, rho) -> np.ndarray:
    a, b = _extended(ti), _extended(tj)
    f = bivariate_pdf(a[:, None], b[None, :], rho)
    f[~np.isfinite(a), :] = 0.0
    f[:, ~np.isfinite(b)] = 0.0
    return f[1:, 1:] - f[:-1, 1:] - f[1:, :-1] + f[:-1, :-1]


def _threshold_derivative(ti, tj, rho) -> np.ndarray:
    """d pi_ab / d tau_i,c for every threshold c of item i: shape (len(ti), Ki, Kj)."""
    b = _extended(tj)
    s = np.sqrt(1.0 - rho**2)
    out = np.zeros((len(ti), len(ti) + 1, len(tj) + 1))
    for c, t in enumerate(ti):
        cond = ndtr((b - rho * t) / s)
        strip = dist.norm_pdf(t) * (cond[1:] - cond[:-1])  # d/dt of P(x <= t, b_k < y <= b_k+1)
        out[c, c, :] += strip  # cell a = c has upper limit tau_c
        out[c, c + 1, :] -= strip  # cell a = c + 1 has lower limit tau_c
    return out


def _average(x: np.ndarray, w: np.ndarray | None) -> float:
    """The mean of ``x``, weighted by ``w`` when weights are given."""
    return float(np.mean(x)) if w is None else float(w @ x / w.sum())


def _moments(x: np.ndarray, w: np.ndarray | None) -> tuple[float, float]:
    """Mean and standard deviation (divisor N, or the sum of the weights) of ``x``."""
    if w is None:
        return float(x.mean()), float(x.std())
    mean = _average(x, w)
    return mean, float(np.sqrt(_average((x - mean) ** 2, w)))


RHO_BOUND = 0.999  # the search for a correlation stays inside (-0.999, 0.999)


def polychoric_tables(tables: np.ndarray, ti: np.ndarray, tj: np.ndarray, iterations: int = 100,
                      tolerance: float = 1e-9) -> np.ndarray:
    """The polychoric correlations of many contingency tables at once, thresholds held at ``ti``, ``tj``
    (the two-step estimator of Olsson 1979): Fisher scoring on rho for every table
    together, d pi_ab / d rho being the bivariate normal density at the cell's corners (Plackett 1954),
    safeguarded by bisection: the sign of each table's score narrows a bracket of its maximum, and a step that
    would leave the bracket goes to its middle instead (Newton's method with bisection, Press et al. 2007, rtsafe),
    so that a step overshooting a steep likelihood cannot carry the search to the wrong bound.
    ``tables`` (B, K, L) of counts; ``ti`` (B, K - 1), ``tj`` (B, L - 1) of thresholds, items with fewer
    categories padded with +inf (their extra cells have probability 0 and count 0)."""
    tables = np.asarray(tables, dtype=float)
    ti, tj = np.asarray(ti, float), np.asarray(tj, float)
    B, K, L = tables.shape
    a, b = ti[:, :, None], tj[:, None, :]  # the inner corners; the outer ones follow from one variable
    F = np.zeros((B, K + 1, L + 1))
    F[:, K, 1:L] = ndtr(np.clip(tj, -BIG, BIG))
    F[:, 1:K, L] = ndtr(np.clip(ti, -BIG, BIG))
    F[:, K, L] = 1.0
    f = np.zeros((B, K + 1, L + 1))
    inner = np.isfinite(a) & np.isfinite(b)
    used = tables > 0
    n = tables.sum(axis=(1, 2))
    rho = np.zeros(B)
    low, high = np.full(B, -RHO_BOUND), np.full(B, RHO_BOUND)  # each table's bracket of the maximum
    for _ in range(iterations):
        r = rho[:, None, None]
        F[:, 1:K, 1:L] = bivariate_cdf(a, b, r)
        P = np.clip(F[:, 1:, 1:] - F[:, :-1, 1:] - F[:, 1:, :-1] + F[:, :-1, :-1], 1e-300, None)
        f[:, 1:K, 1:L] = np.where(inner, bivariate_pdf(a, b, r), 0.0)
        dP = f[:, 1:, 1:] - f[:, :-1, 1:] - f[:, 1:, :-1] + f[:, :-1, :-1]
        gradient = np.sum(np.where(used, tables * dP / P, 0.0), axis=(1, 2))
        information = n * np.sum(np.where(P > 1e-290, dP**2 / P, 0.0), axis=(1, 2))
        low = np.where(gradient > 0, rho, low)
        high = np.where(gradient < 0, rho, high)
        proposal = rho + gradient / np.maximum(information, 1e-12)
        outside = ~((proposal > low) & (proposal < high))
        new = np.where(outside, (low + high) / 2, proposal)
        step, rho = new - rho, new
        if np.all(np.abs(step) < tolerance):
            break
    return rho


def _pair_correlations(codes: np.ndarray, present: np.ndarray, thresholds: list, categories: list,
                       rows_i: np.ndarray, cols_j: np.ndarray, w: np.ndarray | None) -> np.ndarray:
    """The polychoric correlation of every pair (i, j) of two ordinal items (NaN for pairs with a continuous
    item), all by one call of :func:`polychoric_tables`: each pair's table of (weighted) counts over the rows
    that answered both, the thresholds padded with +inf to the largest number of categories."""
    out = np.full(len(rows_i), np.nan)
    ordinal = np.array([len(c) > 0 for c in categories])
    which = np.flatnonzero(ordinal[rows_i] & ordinal[cols_j])
    if not len(which):
        return out
    K = max(len(c) for c in categories)
    padded = np.full((len(categories), K - 1), np.inf)
    for j, t in enumerate(thresholds):
        padded[j, :len(t)] = t
    I, J = rows_i[which], cols_j[which]
    tables = np.empty((len(which), K, K))
    for k, (i, j) in enumerate(zip(I, J)):
        both = present[:, i] & present[:, j]
        tables[k] = np.bincount(codes[both, i] * K + codes[both, j], weights=None if w is None else w[both],
                                minlength=K * K).reshape(K, K)
    out[which] = polychoric_tables(tables, padded[I], padded[J])
    return out


def _polyserial_scores(z: np.ndarray, codes: np.ndarray, tau: np.ndarray, rho: float) -> np.ndarray:
    """d log L_n / d rho for each case, L_n = Phi((t_up - rho z) / s) - Phi((t_low - rho z) / s), s = sqrt(1 - rho^2)."""
    t = _extended(tau)
    s = np.sqrt(1.0 - rho**2)
    up, low = t[codes + 1], t[codes]
    a, b = (up - rho * z) / s, (low - rho * z) / s
    prob = np.clip(ndtr(a) - ndtr(b), 1e-300, None)

    def d(tt, arg):  # d/d rho of (tt - rho z) / s, zero for infinite limits
        out = (-z * s + (tt - rho * z) * rho / s) / s**2
        return np.where(np.isfinite(tt), out, 0.0)

    return (dist.norm_pdf(a) * d(up, a) - dist.norm_pdf(b) * d(low, b)) / prob


def polyserial_pair(z: np.ndarray, codes: np.ndarray, tau: np.ndarray, w: np.ndarray | None = None) -> float:
    """The polyserial correlation maximising the (``w``-weighted) likelihood of the ordinal item given ``z``."""
    t = _extended(tau)

    def negative(rho):
        s = np.sqrt(1.0 - rho**2)
        prob = ndtr((t[codes + 1] - rho * z) / s) - ndtr((t[codes] - rho * z) / s)
        log = np.log(np.clip(prob, 1e-300, None))
        return -float(np.sum(log) if w is None else w @ log)

    return float(optimize.minimize_scalar(negative, bounds=(-RHO_BOUND, RHO_BOUND), method="bounded", options={"xatol": 1e-10}).x)


def _polyserial_parts(x: np.ndarray, codes: np.ndarray, tau: np.ndarray, rho: float,
                      w: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray, float, np.ndarray]:
    """The parts of a polyserial correlation's influence function on the rows ``x``, ``codes`` it was
    estimated from: the case's score s, the correction m for the continuous item's mean and SD (estimated on
    the same rows), the expected information I_rr and the cross-information I_rt with each threshold, so that
    IF = (s - IF(tau) I_rt - m) / I_rr.  The expected derivatives of the score are averaged over the rows by
    central differences (weighted means under a sampling design, weights ``w``)."""
    mean, sd = _moments(x, w)
    z = (x - mean) / sd
    score = _polyserial_scores(z, codes, tau, rho)
    h = 1e-5
    info_rr = -_average(_polyserial_scores(z, codes, tau, rho + h) - _polyserial_scores(z, codes, tau, rho - h), w) / (2 * h)
    info_rt = np.zeros(len(tau))
    for c in range(len(tau)):
        up, down = tau.copy(), tau.copy()
        up[c] += h
        down[c] -= h
        info_rt[c] = -_average(_polyserial_scores(z, codes, up, rho) - _polyserial_scores(z, codes, down, rho), w) / (2 * h)
    info_mu = -_average(_polyserial_scores((x - mean - h) / sd, codes, tau, rho)
                       - _polyserial_scores((x - mean + h) / sd, codes, tau, rho), w) / (2 * h)
    info_sd = -_average(_polyserial_scores((x - mean) / (sd + h), codes, tau, rho)
                       - _polyserial_scores((x - mean) / (sd - h), codes, tau, rho), w) / (2 * h)
    moments_correction = info_mu * (x - mean) + info_sd * ((x - mean) ** 2 - sd**2) / (2 * sd)
    return score, moments_correction, float(info_rr), info_rt


def ordinal_moments(frame: pd.DataFrame, names: tuple[str, ...], source: str,
                    continuous: frozenset[str] = frozenset(), levels: dict[str, tuple[float, ...]] | None = None,
                    where: str = "", pairwise: bool = False, design: DesignColumns | None = None) -> OrdinalMoments:
    """Thresholds and correlations of ordinal items (and of any ``continuous`` items beside them).

    ``levels``: the categories every group must use (with groups, so that thresholds
    compare); ``where`` names the group in messages.

    ``pairwise``: rows with missing answers are kept (pairwise present): each item's thresholds (and a
    continuous item's mean and SD) come from the rows that answered it, each correlation from the rows
    that answered both items.  The asymptotic covariance is then that of the stacked estimating
    equations (each statistic's casewise score is zero on rows that cannot inform it; the M-estimation
    sandwich, e.g. Stefanski & Boos 2002), which for a statistic estimated on N_s of the N rows scales
    its casewise influence by N / N_s; without gaps it is the complete-data one exactly.  Otherwise
    only the complete rows are used (listwise deletion).

    ``design``: the sampling design's columns (checked by :func:`cfa_tool.data.sample_design.check_design`):
    every statistic is weighted (pseudo-maximum likelihood, Muthén & Satorra 1995), N is the sum of the
    weights with frequency weights, and the rows' influence functions are returned for the design-based
    covariance instead of the covariance (a statistic on a part of the rows scales its influence by the
    weight of all rows over the weight of that part)."""
    values = numeric_columns(frame, names, source)
    check_whole_answers(values, frame, names, source, continuous, where)
    answered = ~np.isnan(values)
    keep = answered.any(axis=1) if pairwise else answered.all(axis=1)
    data = values[keep]
    present = answered[keep]
    n, p = data.shape
    rows_design = row_design(frame, design, keep) if design is not None else None
    w = rows_design.weights if rows_design is not None else None
    total = n if w is None else float(w.sum())

    def weight_of(rows: np.ndarray) -> float:
        """The weight of the rows ``rows`` (a mask): their number without a design."""
        return int(rows.sum()) if w is None else float(w[rows].sum())

    if n <= p:
        from cfa_tool.data.kept_rows import too_few_rows

        raise DataError(f"{source}{where}: " + too_few_rows(frame, n, p, f"{'some' if pairwise else 'every'} item",
                                                         "item", f"their correlations need more rows than items "
                                                         f"({p + 1} or more)"))
    pair_counts = present.T.astype(np.int64) @ present.astype(np.int64)  # rows answering both items (diagonal: each)
    if pairwise and (pair_counts < 2).any():
        alone = np.flatnonzero(pair_counts.diagonal() < 2)  # an item hardly answered is named before its pairs
        i, j = (alone[0], alone[0]) if len(alone) else np.argwhere(pair_counts < 2)[0]
        which = (f"item '{printable(names[i])}'" if i == j
                 else f"both '{printable(names[i])}' and '{printable(names[j])}'")
        from cfa_tool.data.kept_rows import rows_described

        raise DataError(f"{source}{where}: {int(pair_counts[i, j])} of {rows_described(frame)} answered {which}, so "
                        f"{'its thresholds' if i == j else 'their correlation'} cannot be estimated; drop an item or "
                        f"collect more answers")
    codes = np.where(present, 0, -1)  # -1: no answer
    categories, thresholds, threshold_if = [], [], []
    rare: list[tuple[str, float, int]] = []  # (item, category, rows): categories too rare to place a threshold well
    mean_if, variance_if = [], []  # of the continuous items' means and variances (divisor N)
    if present.all() and w is None:  # the complete-data formulas, so that a fit without gaps is the listwise one to the last digit
        means, sds = data.mean(axis=0), data.std(axis=0)
    else:
        means, sds = np.array([_moments(data[present[:, j], j], None if w is None else w[present[:, j]])
                               for j in range(p)]).T
    z_all = (data - means) / np.where(sds > 0, sds, 1.0)

    def standardized(column: int, rows: np.ndarray, other: int) -> np.ndarray:
        """A continuous item standardized on the rows of a pair (by its own mean and SD there)."""
        if rows.all():
            return z_all[:, column]
        x = data[rows, column]
        mean, sd = _moments(x, None if w is None else w[rows])
        if sd == 0:
            raise DataError(f"{source}{where}: column '{printable(names[column])}' has the same value in every row that "
                            f"also answered '{printable(names[other])}', so their correlation cannot be estimated")
        return (x - mean) / sd

    for j, name in enumerate(names):
        rows_j = present[:, j]
        x = data[rows_j, j]
        n_j = weight_of(rows_j)
        if name in continuous:
            if sds[j] == 0:
                raise DataError(f"{source}{where}: column '{printable(name)}' has the same value in every row used")
            deviation = np.zeros(n)
            deviation[rows_j] = x - means[j]
            mean_if.append((n / n_j) * deviation)
            variance_if.append(np.where(rows_j, (n / n_j) * (deviation**2 - sds[j] ** 2), 0.0))
            categories.append(())
            thresholds.append(np.zeros(0))
            threshold_if.append(np.zeros((n, 0)))
            continue
        seen = np.unique(x)
        if levels is not None:
            item_levels = np.asarray(levels[name], dtype=float)
            empty = [v for v in item_levels if v not in seen]
            if empty:
                raise _empty_categories_error(source, {where: {name: empty}}, {name: seen},
                                              frame.attrs.get(CODED_BY_STATEMENT, {}), given=frame)
        else:
            item_levels = seen
        refused = category_count_refusal(source, where, name, item_levels)
        if refused is not None:
            raise DataError(refused)
        levels_j = item_levels
        codes[rows_j, j] = np.searchsorted(levels_j, x)
        counts = np.bincount(codes[rows_j, j], weights=None if w is None else w[rows_j], minlength=len(levels_j))
        rows_each = counts if w is None else np.bincount(codes[rows_j, j], minlength=len(levels_j))
        rare.extend((name, float(v), int(c)) for v, c in zip(levels_j, rows_each)
                    if c < rare_answer_limit(int(rows_j.sum())))
        cumulative = np.cumsum(counts)[:-1] / n_j
        tau = dist.norm_ppf(cumulative)
        categories.append(tuple(float(v) for v in levels_j))
        thresholds.append(tau)
        below = (codes[rows_j, j][:, None] <= np.arange(len(tau))[None, :]).astype(float)
        item_if = np.zeros((n, len(tau)))
        item_if[rows_j] = (total / n_j) * (below - cumulative[None, :]) / dist.norm_pdf(tau)[None, :]
        threshold_if.append(item_if)
    _refuse_large_covariance(source + where, sum(len(t) for t in thresholds) + 2 * len(mean_if), p)
    rows_i, cols_j = np.tril_indices(p, -1)
    R = np.eye(p)
    polychoric = _pair_correlations(codes, present, thresholds, categories, rows_i, cols_j, w)
    influence = np.zeros((n, len(rows_i)))
    for k, (i, j) in enumerate(zip(rows_i, cols_j)):
        both = present[:, i] & present[:, j]
        scale = total / weight_of(both)  # 1 without gaps
        w_both = None if w is None else w[both]
        ci, cj = names[i] in continuous, names[j] in continuous
        if ci and cj:
            zi, zj = standardized(i, both, j), standardized(j, both, i)
            r = _average(zi * zj, w_both)
            R[i, j] = R[j, i] = r
            influence[both, k] = scale * (zi * zj - r * (zi**2 + zj**2) / 2)
            continue
        if ci or cj:
            c, o = (i, j) if ci else (j, i)
            x = data[both, c]
            rho = polyserial_pair(standardized(c, both, o), codes[both, o], thresholds[o], w_both)
            R[i, j] = R[j, i] = rho
            score_o, moments_correction, info_rr, info_rt = _polyserial_parts(x, codes[both, o], thresholds[o], rho,
                                                                                w_both)
            score, correction = np.zeros(n), np.zeros(n)
            score[both] = scale * score_o
            for c_ in range(len(info_rt)):
                correction += info_rt[c_] * threshold_if[o][:, c_]
            correction[both] += scale * moments_correction
            influence[:, k] = (score - correction) / info_rr
            continue
        ci_codes, cj_codes = codes[both, i], codes[both, j]
        rho = polychoric[k]
        R[i, j] = R[j, i] = rho
        pi = cell_probabilities(thresholds[i], thresholds[j], rho)
        d_rho = _rho_derivative(thresholds[i], thresholds[j], rho)
        info_rr = float(np.sum(d_rho**2 / pi))
        score = np.zeros(n)
        score[both] = scale * d_rho[ci_codes, cj_codes] / pi[ci_codes, cj_codes]
        correction = np.zeros(n)
        for item, other, d_tau in ((i, j, _threshold_derivative(thresholds[i], thresholds[j], rho)),
                                   (j, i, _threshold_derivative(thresholds[j], thresholds[i], rho).transpose(0, 2, 1))):
            info_rt = np.einsum("ab,cab->c", d_rho / pi, d_tau)
            correction += threshold_if[item] @ info_rt
        influence[:, k] = (score - correction) / info_rr
    joint = np.hstack(threshold_if + [influence])
    joint_gamma = gamma = mixed_gamma = None  # under a design, from the influence functions by the design (inference layer)
    if rows_design is None:
        joint_gamma = joint.T @ joint / n
        k = joint.shape[1] - influence.shape[1]
        gamma = joint_gamma[k:, k:]
        if mean_if:  # the same influence functions, with those of the continuous items' means and variances
            mixed = np.hstack(threshold_if + [np.column_stack(mean_if), np.column_stack(variance_if), influence])
            mixed_gamma = mixed.T @ mixed / n
    sparse = _sparse_pair_words(frame, keep, present, names, pair_counts) if pairwise else None
    near = np.abs(R - np.eye(p)) > NEAR_DUPLICATE
    if near.any():
        i, j = np.argwhere(np.tril(near, -1))[0]
        if sparse is not None and sparse.pair == {names[i], names[j]}:  # two rows agreeing are no near duplicates
            raise DataError(f"{source}{where}: items '{printable(names[j])}' and '{printable(names[i])}' correlate "
                            f"{near_one(R[i, j])}, yet {sparse.words}, which says nothing of answers given alike"
                            f"{sparse.remedy(bool(where))}")
        pair_rare = [r for r in rare if r[0] in (names[i], names[j])]
        both = present[:, i] & present[:, j]
        plain = (np.corrcoef(data[both, i], data[both, j])[0, 1] if both.sum() > 2 and data[both, i].std() > 0
                 and data[both, j].std() > 0 else 1.0)  # the answers' own (Pearson) correlation
        if pair_rare and abs(plain) < SPARSE_PAIR_PLAIN:  # a correlation near +/-1 from a sparse table is no sign of the same answers (hostile s23, 02:
            # two unrelated items of 98% one answer, Pearson r -.01, 'drop one of them')
            raise DataError(f"{source}{where}: items '{printable(names[j])}' and '{printable(names[i])}' correlate "
                            f"{near_one(R[i, j])}, yet categories of theirs are answered by very few rows: "
                            f"{_rare_listed(pair_rare)}, so their table says nothing of answers given alike and the "
                            f"correlation matrix is singular; {_rare_remedy(pair_rare, names, categories)}"
                            + (f"; or leave this group out with a row filter ({Option.KEEP})" if where else ""))
        raise DataError(f"{source}{where}: items '{printable(names[j])}' and '{printable(names[i])}' correlate "
                        f"{near_one(R[i, j])}: they give (nearly) the same answers, so one adds nothing and the correlation "
                        f"matrix is singular; drop one of them")
    if np.linalg.eigvalsh(R)[0] <= 1e-8 and sparse is not None:  # the likely cause: a pair's correlation from few rows
        raise DataError(f"{source}{where}: the polychoric correlation matrix is not positive definite: "
                        f"{sparse.words}, and need not fit with the other correlations, each from other rows"
                        f"{sparse.remedy(bool(where))}")
    if np.linalg.eigvalsh(R)[0] <= 1e-8 and pairwise and not present.all() and not rare:
        raise DataError(_pairs_apart_words(source, where, R, present, names))
    if np.linalg.eigvalsh(R)[0] <= 1e-8:
        complete = int(present.all(axis=1).sum())
        gaps = pairwise and not present.all() and complete > p  # listwise deletion keeps enough rows to work
        raise DataError(f"{source}{where}: the polychoric correlation matrix is not positive definite; "
                        + (f"categories answered by very few rows: {_rare_listed(rare)} ({_rare_remedy(rare, names, categories)}"
                           + (f"; or leave this group out with a row filter ({Option.KEEP})" if where else "") + ")"
                           if rare else
                           "some items may be near duplicates or some categories nearly empty")
                        + ("; with missing answers, correlations from different rows need not fit together "
                           f"({Option.INCOMPLETE_ROWS.given('listwise')} uses the {complete:,} complete rows only)"
                           if gaps else ""))
    n_obs = int(round(total)) if design is not None and design.kind is WeightKind.FREQUENCY else n
    return OrdinalMoments(tuple(names), n_obs, len(frame), len(frame) - n, source, tuple(categories), tuple(thresholds),
                          R, gamma, codes, means, sds, frozenset(continuous), joint_gamma,
                          pair_counts if pairwise else None, rows_design,
                          joint if rows_design is not None else None, mixed_gamma,
                          unanswered=int((~answered.any(axis=1)).sum()))


#: an item whose share in the eigenvector of the smallest eigenvalue of a correlation matrix is at least this (in
#: size) is named among those whose correlations do not fit together (a rule of this project)
NOT_FITTING_SHARE = 0.3


def _pairs_apart_words(source: str, where: str, R: np.ndarray, present: np.ndarray, names) -> str:
    """The refusal of a polychoric correlation matrix that is not positive definite with gaps in the rows (pairwise
    present rows), no category of which is rare: the correlations of the items that the eigenvector of its smallest
    eigenvalue weighs (:data:`NOT_FITTING_SHARE`) come from rows that answered each pair, which need not be the same
    rows, so together they need not describe any population; named with the rows that answered all of them
    together, and listwise deletion advised only where it keeps more complete rows than items (hostile trial s25,
    finding 7: with no complete row the message blamed near duplicates and empty categories, and named no item)."""
    values, vectors = np.linalg.eigh(R)
    weights = np.abs(vectors[:, 0])
    named = [j for j in np.argsort(-weights) if weights[j] >= NOT_FITTING_SHARE] or list(np.argsort(-weights)[:3])
    named = sorted(named[:6])
    together = int(present[:, named].all(axis=1).sum())
    complete = int(present.all(axis=1).sum())
    p = len(names)
    items = word_list([f"'{printable(names[j])}'" for j in named])
    rows = ("no row answered all of them" if together == 0 else
            f"only {counted(together, 'row')} answered all of them")
    pairs = "; ".join(f"'{printable(names[a])}' and '{printable(names[b])}' {journal_decimal(R[a, b], digits=2)} "
                      f"({counted(int((present[:, a] & present[:, b]).sum()), 'row')})"
                      for k, a in enumerate(named) for b in named[k + 1:])
    few = "no row" if complete == 0 else f"only {counted(complete, 'row')}"
    way = (f"; {Option.INCOMPLETE_ROWS.given('listwise')} uses the {complete:,} complete rows only" if complete > p else
           f"; {few} answered every item, too few to analyse the complete rows alone, so leave one of those items out "
           f"of the model, or gather rows that answer them together")
    return (f"{source}{where}: the polychoric correlation matrix is not positive definite: the correlations of {items} "
            f"come from the rows that answered each pair ({pairs}), and {rows}, so together they need not fit "
            f"(no population has these correlations at once){way}")


def _refuse_large_covariance(source: str, per_item: int, p: int) -> None:
    """Refuse in one line (EstimationError, exit 3), before the correlations are estimated, statistics whose
    asymptotic covariance (``joint_gamma``, or beside continuous items ``mixed_gamma``, or under a design the
    covariance from the rows' influence functions: k x k, k the ``per_item`` thresholds (and continuous items' means
    and variances) and the p(p-1)/2 correlations) would exceed the one limit of :mod:`cfa_tool.numerics.sizes`:
    at 200 items with four answers 20,500 x 20,500, 3.1 GiB, which ran out of time and memory (robust-s20)."""
    from cfa_tool.errors import EstimationError
    from cfa_tool.numerics import sizes

    pairs = p * (p - 1) // 2
    k = per_item + pairs
    if sizes.fits(k):
        return
    share = per_item / p
    raise EstimationError(
        f"{source}: the {p} items' {per_item:,} thresholds and {pairs:,} correlations are {k:,} statistics, and the "
        f"covariance of their estimates, which the weights, standard errors and tests of ordinal items come from, is a "
        f"{k:,} x {k:,} matrix of {sizes.too_large_words(k, lambda n: round(n * share) + n * (n - 1) // 2)}; fit "
        f"the items in smaller sets")


@dataclass(frozen=True)
class _SparsePair:
    """The pair of ordinal items answered together by the fewest rows, when fewer than
    data.moments.FEW_TOGETHER_SHARE of the rows analysed answer it (pairwise present rows): its words in a refusal."""

    pair: set
    words: str
    first: str
    second: str

    def remedy(self, in_group: bool) -> str:
        """What works: one item out, the group out, or rows that answer both (listwise deletion would keep at most
        the few rows that answer both, so it is not offered)."""
        group = f", leave this group out with a row filter ({Option.KEEP})" if in_group else ""
        return (f". What to try: take '{self.first}' or '{self.second}' out of the model{group}, or analyse rows "
                f"that answer both")


def _sparse_pair_words(frame: pd.DataFrame, keep: np.ndarray, present: np.ndarray, names: tuple[str, ...],
                       pair_counts: np.ndarray) -> _SparsePair | None:
    """The pair of items fewest of the rows analysed (``present``: those rows x items, answered or not; ``keep``:
    which rows of ``frame`` they are) answer together, when fewer than data.moments.FEW_TOGETHER_SHARE of them do
    (re-check s17, N2: 2 of a group's 230 rows answered both items of a pair, and the refusal blamed nearly empty
    categories and offered listwise deletion, which leaves those 2 rows); None otherwise."""
    from cfa_tool.data.kept_rows import row_naming, rows_listed
    from cfa_tool.data.moments import pairs_answered_together

    found = pairs_answered_together(present, names)
    if not found:
        return None
    a, b, both = found[0]
    i, j = names.index(a), names.index(b)
    rows = row_numbers(frame)[keep][present[:, i] & present[:, j]]
    more = f" ({len(found) - 1} more such pair{'s' if len(found) > 2 else ''})" if len(found) > 1 else ""
    first, second = printable(a), printable(b)
    words = (f"only {both} ({rows_listed(rows, naming=row_naming(frame))}) of the {len(present):,} rows analysed "
             f"answer both '{first}' and '{second}'{more}, so their correlation rests on those rows (fewer than a "
             f"tenth of the rows: a rule of thumb of this project)")
    return _SparsePair({a, b}, words, first, second)


def category_count_refusal(source: str, where: str, name: str, levels) -> str | None:
    """Why the ordinal item ``name`` with the categories ``levels`` cannot be fitted (a single category, or more than
    :data:`MAX_CATEGORIES`), with its place; None when its number of categories can be."""
    if len(levels) < 2:
        return f"{source}{where}: ordinal item '{name}' has a single category ({user_number(levels[0])}); it needs at least two"
    if len(levels) > MAX_CATEGORIES:
        return (f"{source}{where}: ordinal item '{name}' has {len(levels)} categories; with more than "
                f"{MAX_CATEGORIES} treat it as continuous")
    return None


#: what to do with categories answered by very few rows (the refusals of a singular polychoric matrix)
def _rare_remedy(rare: list[tuple[str, float, int]], names, categories) -> str:
    """What to do with categories answered by very few rows (the refusals of a singular polychoric matrix): the
    'join answers' statements that join them with their neighbours towards the middle of the item's scale
    (data.answer_counts.joins_of_marked, the rule of the cautions, written so that they parse), or leave the item
    out."""
    from cfa_tool.data.answer_counts import joined_statements, joins_of_marked

    joins: dict[tuple, list[str]] = {}
    for name in dict.fromkeys(r[0] for r in rare):
        marked = {value: rows for item, value, rows in rare if item == name}
        for join in joins_of_marked(categories[list(names).index(name)], set(marked), marked):
            joins.setdefault(join, []).append(name)
    statements = "; ".join(f"'{s}'" for s in joined_statements(joins))
    join = (f"join such a category with its neighbour by a 'join answers' statement in the model file "
            f"({statements}), which analyses them as one category; or " if statements else
            "join such a category with its neighbour by a 'join answers' statement in the model file where the item "
            "has other categories answered by more rows; or ")
    return join + "leave the item out"


def _rare_listed(rare: list[tuple[str, float, int]]) -> str:
    """The rare categories of the ordinal items, by item ('clean' 4 (1 row))."""
    return cut_list(rare, 6, lambda r: f"'{printable(r[0])}' {user_number(r[1])} ({counted(r[2], 'row')})")


NEAR_DUPLICATE = 0.995  # a correlation this close to 1 in size means two items answer alike (the search stops at .999)
#: a pair whose polychoric correlation is near +/-1 while categories of theirs are rare and the answers' own (Pearson)
#: correlation is below this in size is a sparse table, not two items answering alike (a rule of this project: true
#: near duplicates of ordinal items correlate well above it as numbers too)
SPARSE_PAIR_PLAIN = 0.8


def near_one(r: float) -> str:
    """A polychoric or polyserial correlation near +/-1 in a message, as the reports print correlations (no leading
    zero; on its side of :data:`NEAR_DUPLICATE`): '.9962', or 'about 1' where the search stopped at its bound
    (:data:`RHO_BOUND`), beyond which the estimate may lie; '0.9990' was printed, the bound to four decimals, a value
    the estimate never had (the s20 closing note)."""
    if abs(r) >= RHO_BOUND - 1e-6:  # a bounded search ends within its tolerance of the bound
        return (f"about {'-' if r < 0 else ''}1 (the estimate stopped at the search's bound of "
                f"{'-' if r < 0 else ''}{journal_decimal(RHO_BOUND)})")
    return journal_decimal(r, NEAR_DUPLICATE if r > 0 else -NEAR_DUPLICATE)


def check_whole_answers(values: np.ndarray, frame: pd.DataFrame, names: tuple[str, ...], source: str,
                        continuous: frozenset[str] = frozenset(), where: str = "") -> None:
    """The answers of an ordinal item are category codes, whole numbers: a fractional answer (2.5, a typing
    error or an average) would otherwise become a category of its own, with a threshold of its own."""
    fractional = ~np.isnan(values) & (values != np.round(values))
    if continuous:
        fractional[:, [j for j, name in enumerate(names) if name in continuous]] = False
    if not fractional.any():
        return
    row, j = np.argwhere(fractional)[0]  # the first row that has one
    others = int(fractional[:, j].sum()) - 1
    more = f" (and {others} other fractional {'answer' if others == 1 else 'answers'})" if others else ""
    number = int(row_numbers(frame)[row])
    raise RowDataError(f"{source}{where}: ordinal item '{printable(names[j])}' has the answer {user_number(values[row, j])} in "
                       f"{row_of(frame, number)}{more}; the answers of an ordinal item are category codes (whole numbers): "
                       f"correct the value, or analyse the item as continuous", number)


@dataclass(frozen=True)
class EmptyCategoryCosts:
    """How much of the data each way past empty categories in groups keeps, to offer those that keep the most first:
    the answers each changes or leaves out (the groups' rows left out, the answers recoded into their nearest
    category in every group, the items' answers dropped from the model), and the row filters that leave those
    groups out (None where a group's filter cannot be written)."""

    rows_left_out: int
    answers_left_out: int
    answers_recoded: int
    answers_dropped: int
    filters: tuple[str | None, ...]
    #: the groups the row filters keep, counted by applying them (data.filters.apply_filters, the one filter code) to
    #: the groups' rows: leaving groups out is advised only when at least two groups stay to be compared (hostile
    #: trial s25, finding 5: "--keep 'g != north' --keep 'g != south'" left out every row)
    groups_kept: int = 2
    #: the answers that undoing a shift of codes between groups moves (data.shifted_scales)
    answers_moved: int = 0


def _costs(values: list[np.ndarray], wheres: list[str], filters: list[str | None], names: tuple[str, ...],
           found: dict[str, dict[str, list[float]]], shifted=(), frames: list[pd.DataFrame] | None = None
           ) -> EmptyCategoryCosts:
    """:class:`EmptyCategoryCosts` of the empty categories ``found`` (by group ``where``), from each group's
    ``values`` (the rows analysed); ``shifted``: items on shifted codes in some groups (data.shifted_scales), whose
    recoding moves their answers in those groups instead of merging categories."""
    empty: dict[str, set] = {}
    for by_item in found.values():
        for name, categories in by_item.items():
            empty.setdefault(name, set()).update(categories)
    columns = [names.index(name) for name in empty]
    left = [v for v, where in zip(values, wheres) if where in found]
    moved = {s.item: set(s.shifted_groups()) for s in shifted}
    chosen = tuple(f for f, where in zip(filters, wheres) if where in found)
    return EmptyCategoryCosts(
        sum(len(v) for v in left), sum(int((~np.isnan(v)).sum()) for v in left),
        sum(int(np.isin(v[:, names.index(name)], list(categories)).sum()) for v in values
            for name, categories in empty.items()),
        sum(int((~np.isnan(v[:, columns])).sum()) for v in values), chosen,
        _groups_kept(frames, chosen) if frames is not None and all(chosen) else len(wheres) - len(found),
        sum(int((~np.isnan(v[:, names.index(name)])).sum()) for v, where in zip(values, wheres)
            for name, groups in moved.items() if _group_words(where) in groups))


def _groups_kept(frames: list[pd.DataFrame], filters) -> int:
    """How many of the groups (each group's rows: ``frames``) keep a row under the row filters ``filters``, applied
    by the one filter code (data.filters.apply_filters) to the groups' rows together; 0 when no row is left."""
    from cfa_tool.data.filters import apply_filters, parse_filter
    from cfa_tool.errors import UserInputError

    try:
        kept, _, _ = apply_filters(pd.concat(frames), [parse_filter(f) for f in filters], "the rows")
    except UserInputError:  # no row left (or a filter that cannot be applied): no group to compare
        return 0
    return sum(bool(frame.index.isin(kept.index).any()) for frame in frames)


def _group_words(where: str) -> str:
    """A group's ' (group 'north' of district)' as a sentence names it: "group 'north' of district"."""
    return where.replace(" (", "", 1).rstrip(")")


def empty_categories_in_groups(frames: list[pd.DataFrame], wheres: list[str], names: tuple[str, ...], source: str,
                               levels: dict[str, tuple[float, ...]], pairwise: bool = False,
                               continuous: frozenset[str] = frozenset(),
                               filters: list[str | None] | None = None) -> None:
    """A :class:`DataError` naming, in one message, every group (``wheres``: ' (group ...)' of each frame) and
    ordinal item in which some of the categories ``levels`` that other groups used were answered by no one, among
    the rows analysed (every answer with ``pairwise``, the complete rows otherwise); nothing when every group used
    every category.  ``filters``: the row filter that leaves out each group (data.groups.leaving_out); with them the
    ways past the empty categories are offered by how much of the data they keep, the exact filter given."""
    found: dict[str, dict[str, list[float]]] = {}
    answered_everywhere: dict[str, set] = {}
    analysed = []
    for frame, where in zip(frames, wheres):
        values = numeric_columns(frame, names, source)
        if not pairwise:
            values = values[~np.isnan(values).any(axis=1)]
        analysed.append(values)
        for j, name in enumerate(names):
            if name in continuous:
                continue
            column = values[:, j]
            seen = {float(v) for v in np.unique(column[~np.isnan(column)])}
            answered_everywhere[name] = seen if name not in answered_everywhere else answered_everywhere[name] & seen
            empty = [v for v in levels[name] if v not in seen]
            if empty and seen:
                found.setdefault(where, {})[name] = empty
    if found:
        from cfa_tool.data.shifted_scales import shifted_scales

        empty_items = {name for by_item in found.values() for name in by_item}
        shifted = tuple(s for s in shifted_scales(names, [(_group_words(where), v) for v, where in zip(analysed, wheres)])
                        if s.item in empty_items)  # 0 to 4 in one group, 1 to 5 in another: undone, not merged
        costs = _costs(analysed, wheres, filters, names, found, shifted, frames) if filters is not None else None
        raise _empty_categories_error(source, found, {name: np.array(sorted(v)) for name, v in answered_everywhere.items()},
                                      frames[0].attrs.get(CODED_BY_STATEMENT, {}) if frames else {}, costs,
                                      frames[0] if frames else None, shifted, len(wheres) - len(found))


def _empty_categories_error(source: str, found: dict[str, dict[str, list[float]]], seen: dict,
                            coded: dict | None = None, costs: EmptyCategoryCosts | None = None,
                            given=None, shifted=(), others: int = 2) -> DataError:
    """The one message of every empty category: ``found`` maps each group's ' (group ...)' to its items' empty
    categories, ``seen`` each item's categories answered in every group (what an empty one is recoded as), ``coded``
    the items whose answers are words an 'answers' statement coded (data.answer_words.CODED_BY_STATEMENT): for
    them the model file itself can merge the empty category into the nearest one answered, with a statement of the
    item's own that gives their words one code; answers recorded as codes are joined by 'join answers' statements
    of the model file (data.joined_answers); ``given``: the rows read, which know the codes of no answer the
    run gave already, kept in the advice to add a code (data.non_answers.advice_codes); ``shifted``: items whose
    answers lie on shifted codes in some groups (data.shifted_scales: 0 to 4 in one, 1 to 5 in another), for which
    the advice undoes the shift instead of merging categories (hostile trial s25, finding 4)."""
    coded = coded or {}
    moved = {s.item: s for s in shifted}
    # leaving the groups out is a way only when two groups stay to be compared (``others``: the groups without an
    # empty category; with costs, those the row filters keep, counted by the filter code)
    can_leave = (costs.groups_kept if costs is not None else others) >= 2
    items: dict[str, list[float]] = {}  # each item's empty categories in any group
    for by_item in found.values():
        for name, empty in by_item.items():
            items.setdefault(name, [])
            items[name] = sorted(set(items[name]) | set(empty))
    # an item answered alike by a whole group has one category in common (or none): merged into it, the item would be
    # constant in every group (hostile tester s15), so only dropping it or leaving the group out remains
    mergeable = {name: empty for name, empty in items.items() if len(seen[name]) > 1}
    constant = [name for name in items if len(seen[name]) <= 1]
    worded = {name: empty for name, empty in mergeable.items()
              if any(word is not None for word, _, _ in coded.get(name, ())) and name not in moved}
    beyond = sorted({v for name, empty in items.items() for v in empty if name not in worded and name not in moved  # a word's code is real
                     and len(seen[name]) and (v < min(seen[name]) or v > max(seen[name])) and code_like(v)})  # a code?
    codes = [f"{user_number(v)}" for v in beyond]
    first = (f"if {word_list(codes)} {'is' if len(codes) == 1 else 'are'} not a real answer (a typing "
             f"error or a code for no answer), give {advice_codes(given, beyond)}; if real, "
             if codes else "")
    one_item, one_group = len(items) == 1, len(found) == 1
    if one_group and one_item:
        (where, by_item), = found.items()
        (name, empty), = by_item.items()
        said = f"{source}{where}: no one answered {_categories(empty)} on ordinal item '{printable(name)}', which other groups used"
    else:
        listed = "; ".join(f"in{where.replace(' (', ' ', 1).rstrip(')')}: " + ", ".join(
            f"{_categories(empty)} of '{printable(name)}'" for name, empty in by_item.items()) for where, by_item in found.items())
        said = (f"{source}: no one answered some categories of {len(items)} ordinal items that other groups used ({listed})"
                if not one_item else
                f"{source}: no one answered some categories of ordinal item '{printable(next(iter(items)))}' that other "
                f"groups used ({listed})")
    ways = []
    if worded:
        statements = "; ".join(_merging_statement(coded[name], empty, seen[name], name) for name, empty in worded.items())
        ways.append(f"the answers of {_quoted(worded)} are words, so the model file can give an empty category's words "
                    f"the code of the nearest category answered, in every group, with a statement of "
                    f"{'the item' if len(worded) == 1 else 'each item'}'s own (the report then says which words share "
                    f"a code): {statements}")
    # an item on shifted codes in some groups (0 to 4 against 1 to 5): its empty categories are the ends of the
    # shift, so undoing it comes first, before merging its categories (hostile trial s25, finding 4)
    undo = (f"{'; '.join(m.ranges_words() for m in moved.values())}, as one answer scale coded on shifted codes "
            f"would: if the groups' codes differ, undo the shift in a copy of the data file "
            f"({'; '.join(m.undoing_words() for m in moved.values())}), which merges no category") if moved else ""
    recoded = {name: empty for name, empty in mergeable.items() if name not in worded}
    alike = (f"{_quoted(constant)} {'has' if len(constant) == 1 else 'have'} at most one answer that every group "
             f"gave, so merging {'its' if len(constant) == 1 else 'their'} categories would leave "
             f"{'it' if len(constant) == 1 else 'them'} with one answer everywhere") if constant else ""
    if recoded:
        joins = "; ".join(f"'{statement}'" for name, empty in recoded.items()
                          for statement in _joining_statements(empty, seen[name], name))
        ways.append(f"{first}{'if the codes are alike in every group, ' if undo else ''}join each empty category "
                    f"with its nearest category answered, in every group, by a statement of the model file: {joins}")
    elif first:
        ways.append(first.removesuffix("; if real, "))
    drop = f"drop {'the item' if one_item else 'those items'} from the model"
    group = "this group" if one_group else "those groups"
    why = f" ({alike})" if alike else ""  # items one group answered alike: merging would not help them
    left_out = f", or leave {group} out with a row filter ({Option.KEEP})" if can_leave else ""
    if costs is None:
        if not ways and not undo:
            return DataError(f"{said}; thresholds cannot be compared across groups with an empty category, and "
                             f"{alike}: {drop}{left_out}")
        return DataError(f"{said}; thresholds cannot be compared across groups with an empty category. The tool does "
                         f"not merge categories on its own{why}: {'; '.join(([undo] if undo else []) + ways)}; or "
                         f"{drop}{left_out}")
    leave = (f"leave {group} out with {Option.KEEP.given([printable(f) for f in costs.filters])}"
             if all(costs.filters) else f"leave {group} out with a row filter ({Option.KEEP})")
    # (answers changed or left out, a code that may mean no answer first, words)
    offered = [(costs.answers_recoded, not first, " ".join(ways) if len(ways) == 1 else
                f"{ways[0]} (and {'; and '.join(ways[1:])})", f" ({_answers(costs.answers_recoded)} recoded)")] if ways else []
    offered += [(costs.answers_left_out, True, leave,
                 f" ({costs.rows_left_out:,} row{'' if costs.rows_left_out == 1 else 's'}, "
                 f"{_answers(costs.answers_left_out)} left out)")] if can_leave else []
    offered += [(costs.answers_dropped, True, drop, f" ({_answers(costs.answers_dropped)} left out)")]
    offered.sort(key=lambda way: (way[1], way[0]))  # stable: recoding first where they keep as much
    if undo:  # first: a coding slip is checked before any category is merged or any answer left out
        offered.insert(0, (costs.answers_moved, False, undo, f" ({_answers(costs.answers_moved)} recoded)"))
    listed = [f"{text}{cost}" for _, _, text, cost in offered]
    if len(listed) == 1:
        return DataError(f"{said}; thresholds cannot be compared across groups with an empty category, and "
                         f"{alike or 'no other way keeps two groups to compare'}: {listed[0]}")
    return DataError(f"{said}; thresholds cannot be compared across groups with an empty category. The tool does not "
                     f"merge categories on its own{why}; the ways that keep the most answers first: "
                     f"{word_list(listed, 'or', sep='; ')}")


def _answers(n: int) -> str:
    return f"{n:,} answer{'' if n == 1 else 's'}"


def _quoted(names) -> str:
    shown = [f"'{printable(name)}'" for name in names]
    return word_list(shown)


def _merging_statement(answers, empty, seen, name: str) -> str:
    """The 'answers' statement of item ``name`` alone that codes its words as ``answers`` (word, number, code) do,
    but the words of each ``empty`` category as its nearest category ``seen`` (:func:`_nearest`)."""
    empty = set(float(v) for v in empty)
    merged = [(word, number, _nearest(code, seen) if float(code) in empty else code) for word, number, code in answers]
    return answers_statement(merged, (name,))


def _nearest(value: float, seen) -> float:
    """The category answered nearest ``value`` (the one towards the middle of the scale when two are as near)."""
    seen = np.asarray(seen, dtype=float)
    middle = (seen.min() + seen.max()) / 2
    return float(min(seen, key=lambda s: (abs(s - value), abs(s - middle))))


def _joining_statements(empty, seen, name: str) -> list[str]:
    """The 'join answers' statements of item ``name`` that join each ``empty`` category with its nearest category
    answered in every group (:func:`_nearest`), those joined into one category in one statement
    (language.spec.join_statement, the one writer: 'join answers 1, 2 as 2 for q2')."""
    into: dict[float, list[float]] = {}
    for v in empty:
        into.setdefault(_nearest(v, seen), []).append(float(v))
    return [join_statement([*values, target], target, (name,)) for target, values in into.items()]


def _categories(values) -> str:
    text = [f"{user_number(v)}" for v in values]
    return f"category {text[0]}" if len(text) == 1 else "categories " + word_list(text)


def shared_levels(frames: list[pd.DataFrame], names: tuple[str, ...], source: str, pairwise: bool = False,
                  continuous: frozenset[str] = frozenset()) -> dict[str, tuple[float, ...]]:
    """The categories of each ordinal item over all groups (each group must then use every one), among the
    rows analysed: every answer with ``pairwise``, the complete rows otherwise (``continuous`` items: not checked
    for whole-number answers; their values are not categories)."""
    seen: dict[str, set] = {name: set() for name in names}
    for frame in frames:
        values = numeric_columns(frame, names, source)
        check_whole_answers(values, frame, names, source, continuous)
        if not pairwise:
            values = values[~np.isnan(values).any(axis=1)]  # the rows listwise deletion keeps
        for j, name in enumerate(names):
            column = values[:, j]
            seen[name].update(float(v) for v in np.unique(column[~np.isnan(column)]))
    return {name: tuple(sorted(v)) for name, v in seen.items()}
