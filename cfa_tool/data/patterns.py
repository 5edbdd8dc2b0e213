"""Missing-data patterns: rows grouped by which variables they answered."""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np


@dataclass(frozen=True)
class PatternData:
    """Sufficient statistics of each missing-data pattern (observed parts embedded in p-space, zeros elsewhere).

    With row weights every statistic is weighted: counts are sums of weights, means and scatter weighted
    means, so that every formula written for counts holds for the weighted likelihood (Asparouhov 2005)."""

    observed: np.ndarray  # (P, p) bool
    counts: np.ndarray  # (P,) rows in each pattern (the sum of their weights)
    means: np.ndarray  # (P, p) mean of the observed values
    index: np.ndarray  # pattern of each row
    rows: np.ndarray  # the rows themselves (NaN where missing)
    weights: np.ndarray | None = None  # weight of each row (None: every row weighs one)

    @cached_property
    def scatter(self) -> np.ndarray:
        """(P, p, p) covariance of each pattern's observed values about their own mean, divisor count: a stack of one
        p x p matrix per pattern, made on first use (the routes that take the patterns' matrices whole: the robust
        routes' information in the moments; the likelihood itself sums over the rows), within the one limit of
        :mod:`cfa_tool.numerics.sizes` (:func:`refuse_large_patterns`)."""
        P, p = self.observed.shape
        refuse_large_patterns(P, p, p)
        mask = ~np.isnan(self.rows)
        w = self.row_weights
        order = np.argsort(self.index, kind="stable")
        starts = np.searchsorted(self.index[order], np.arange(P))
        centred = np.where(mask, np.where(mask, self.rows, 0.0) - self.means[self.index], 0.0)[order]
        scatter = _scatter(centred, w[order], starts)
        scatter /= self.counts[:, None, None]
        return scatter

    @property
    def n_obs(self) -> int:
        return int(round(float(self.counts.sum())))

    @property
    def row_weights(self) -> np.ndarray:
        return np.ones(len(self.rows)) if self.weights is None else self.weights


def group_patterns(observed: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(distinct patterns (P, p) bool, pattern of each row, rows in each pattern) of an (n, p) mask of
    answered items, patterns in the order of ``np.unique(observed, axis=0)``.

    Each row is packed into bytes, first item in the highest bit, so byte order is the rows'
    lexicographic order; sorting those keys is some hundred times faster than ``np.unique`` over
    rows (28 s for a million rows of 30 items).
    """
    n, p = observed.shape
    if n == 0:
        return np.zeros((0, p), dtype=bool), np.zeros(0, dtype=np.intp), np.zeros(0, dtype=np.intp)
    packed = np.packbits(observed, axis=1)
    if packed.shape[1] <= 8:
        wide = np.zeros((n, 8), dtype=np.uint8)
        wide[:, : packed.shape[1]] = packed
        keys = wide.view(">u8").ravel()
    else:
        keys = np.ascontiguousarray(packed).view(np.dtype((np.void, packed.shape[1]))).ravel()
    _, first, index, counts = np.unique(keys, return_index=True, return_inverse=True, return_counts=True)
    return observed[first], index.ravel(), counts


def missing_groups(observed: np.ndarray):
    """(rows, their missing columns as a (rows, m) array) for each number m > 0 of missing answers, from an
    (n, p) mask of answered items: the batches in which conditional means and covariances are computed."""
    p = observed.shape[1]
    n_missing = p - observed.sum(axis=1)
    for m in np.unique(n_missing):
        if m == 0:
            continue
        which = np.flatnonzero(n_missing == m)
        yield which, np.nonzero(~observed[which])[1].reshape(len(which), m)


def pattern_data(rows: np.ndarray, weights: np.ndarray | None = None) -> PatternData:
    """Group rows by pattern; rows with nothing observed must be removed beforehand.  With ``weights``
    (one per row, positive) counts, means and scatter are weighted."""
    mask = ~np.isnan(rows)
    patterns, index, counts = group_patterns(mask)
    P, p = patterns.shape
    filled = np.where(mask, rows, 0.0)
    if weights is not None:
        counts = np.bincount(index, weights=weights, minlength=P)
    w = np.ones(len(rows)) if weights is None else weights
    # sums over the rows of each pattern: rows sorted by pattern, each pattern's run added up at once
    order = np.argsort(index, kind="stable")
    starts = np.searchsorted(index[order], np.arange(P))
    means = np.add.reduceat((filled * w[:, None])[order], starts, axis=0) / counts[:, None]
    return PatternData(patterns, counts, means, index, rows, weights)


#: the most bytes of the rows' outer products :func:`_scatter` makes at once
OUTER_BYTES = 1 << 26


def _scatter(centred: np.ndarray, w: np.ndarray, starts: np.ndarray) -> np.ndarray:
    """sum over each pattern's rows of w_i c_i c_i' (rows sorted by pattern, the patterns' first rows at
    ``starts``): the outer products of the rows of a run of patterns added up at once, at most :data:`OUTER_BYTES`
    of them (at 200 items a row's is 0.3 MB: every row's at once was 0.6 GB at 2,000 rows), and a pattern of more
    rows than that by one matrix product."""
    n, p = centred.shape
    P = len(starts)
    stops = np.append(starts[1:], n)
    scatter = np.empty((P, p, p))
    limit = max(1, OUTER_BYTES // (8 * p * p))  # rows whose outer products are made at once
    first = 0
    while first < P:
        r0, r1 = starts[first], stops[first]
        if r1 - r0 > limit:
            rows = centred[r0:r1]
            scatter[first] = (rows * w[r0:r1, None]).T @ rows
            first += 1
            continue
        last = max(first + 1, int(np.searchsorted(stops, r0 + limit, side="right")))
        rows = centred[r0:stops[last - 1]]
        weighted = rows * w[r0:stops[last - 1], None]
        single = stops[first:last] - starts[first:last] == 1
        if single.all():  # a pattern a row (gaps at random): each its own outer product, nothing to add
            np.multiply(weighted[:, :, None], rows[:, None, :], out=scatter[first:last])
        else:  # the patterns of one row written, those of several added up (the same sums as over the whole run)
            at = starts[first:last][single] - r0
            scatter[first:last][single] = weighted[at][:, :, None] * rows[at][:, None, :]
            several = np.flatnonzero(~single) + first
            taken = np.concatenate([np.arange(starts[k], stops[k]) for k in several]) - r0
            outer = weighted[taken][:, :, None] * rows[taken][:, None, :]
            sizes = stops[several] - starts[several]
            scatter[several] = np.add.reduceat(outer, np.concatenate([[0], np.cumsum(sizes)[:-1]]), axis=0)
        first = last
    return scatter


def refuse_large_patterns(patterns: int, side: int, items: int) -> None:
    """Refuse, with a one-line EstimationError naming the size and what to do, full-information ML whose stacks of
    one side x side matrix per pattern of missing answers would exceed the one limit of a matrix of
    :mod:`cfa_tool.numerics.sizes`, before any is made.  What a fit holds (speed-s24, bench/fiml_patterns.py): its
    search keeps every pattern's inverse in the low-rank form of :class:`PatternInverses` and makes V' A_k V a chunk
    of at most :data:`CHUNK_BYTES` at a time, and the case diagnostics and Little's test read the same low-rank form
    (speed-s25), so the stacks a fit makes whole are the inverses of Mardia's kurtosis of rows with gaps
    (assessment.normality.kurtosis_with_gaps: at 100 items and 1,500 rows the default fit's traced peak, 919 MB) and,
    on the robust routes, the scatter, A_k, A_k T_k A_k and T_k (about five at once).  Before, every evaluation held
    several such stacks and the search's V' A_k V, wider still: 7-8.5 times a stack, 1.13 GB at 100 items.
    ``side``: the columns of the rows, ``items``: the items (and missing-data helpers) of the rows."""
    from cfa_tool.errors import EstimationError
    from cfa_tool.numerics import sizes
    from cfa_tool.options import Option

    if sizes.stack_fits(patterns, side):
        return
    raise EstimationError(
        f"full-information ML holds one matrix of the {items} analysed columns by themselves for each pattern of "
        f"missing answers (which columns a row answered) in its test of multivariate kurtosis and its robust routes, "
        f"up to five such stacks at once; the {patterns:,} patterns of "
        f"these rows make each stack {patterns:,} matrices of {side} x {side}, "
        f"{sizes.stack_too_large_words(patterns, side)}; "
        f"fit the items in smaller sets, or keep only the complete rows ({Option.INCOMPLETE_ROWS.given('listwise')}) "
        f"when enough rows have no gaps")


def embedded_inverse(sigma: np.ndarray, observed: np.ndarray, missing: list | None = None
                     ) -> tuple[np.ndarray, np.ndarray] | None:
    """For each pattern, Sigma_oo^-1 embedded in p x p (zeros outside) and log|Sigma_oo|.

    From the full precision matrix L = Sigma^-1 by the Schur complement:
    Sigma_oo^-1 = L_oo - L_om (L_mm)^-1 L_mo and |Sigma_oo| = |Sigma| |L_mm|, so each
    pattern needs only the inverse of its small missing block; patterns with the
    same number of missing items are handled in one batch.  ``missing``: the batches
    (``list(missing_groups(observed))``), when the caller keeps them for many calls.
    """
    logdet_sigma = _log_determinant(sigma)
    if logdet_sigma is None:
        return None
    try:
        return _schur_inverses(sigma, observed, logdet_sigma, missing)
    except np.linalg.LinAlgError:  # numerically singular although its Cholesky factor exists
        return None


def _log_determinant(sigma: np.ndarray) -> float | None:
    """log|Sigma| from its Cholesky factor, None if Sigma is not positive definite."""
    try:
        chol = np.linalg.cholesky(sigma)
    except np.linalg.LinAlgError:
        return None
    if np.any(np.diag(chol) <= 0):
        return None
    return 2.0 * float(np.sum(np.log(np.diag(chol))))


def _schur_inverses(sigma: np.ndarray, observed: np.ndarray, logdet_sigma: float, missing: list | None = None
                    ) -> tuple[np.ndarray, np.ndarray] | None:
    P, p = observed.shape
    precision = np.linalg.inv(sigma)
    precision = 0.5 * (precision + precision.T)
    A = np.broadcast_to(precision, (P, p, p)).copy()
    logdet = np.full(P, logdet_sigma)
    for which, miss in missing_groups(observed) if missing is None else missing:  # batched by the number missing
        block = precision[miss[:, :, None], miss[:, None, :]]  # (k, m, m) = L_mm
        try:
            block_chol = np.linalg.cholesky(block)
        except np.linalg.LinAlgError:
            return None
        logdet[which] += 2.0 * np.sum(np.log(np.diagonal(block_chol, axis1=1, axis2=2)), axis=1)
        side = precision[miss]  # (k, m, p) = L_m.
        A[which] -= np.swapaxes(side, 1, 2) @ np.linalg.solve(block, side)
    outer = observed[:, :, None] & observed[:, None, :]
    return np.where(outer, A, 0.0), logdet


@dataclass(frozen=True)
class PatternInverses:
    """Every pattern's Sigma_oo^-1 in the low-rank form of the Schur complement, never as a stack of p x p matrices:
    with L = Sigma^-1 and C_k = (L_mm)^-1 for the items m pattern k misses,
        Sigma_oo^-1 = L_oo - L_om C_k L_mo,   log|Sigma_oo| = log|Sigma| + log|L_mm|
    (the partitioned inverse; Little & Rubin 2002, ch. 11, as :func:`embedded_inverse`), so that a product with a
    pattern's inverse costs p^2 once for all patterns and p m a pattern, and V' A_k V is V' L V less a rank-m term.
    ``batches``: (patterns, their missing columns (k, m), C_k (k, m, m)) for each number m > 0 of missing items."""

    precision: np.ndarray  # (p, p) L = Sigma^-1, symmetrised
    logdet: np.ndarray  # (P,) log|Sigma_oo|
    batches: tuple  # ((patterns, missing columns, C), ...)


def pattern_inverses(sigma: np.ndarray, observed: np.ndarray, missing: list | None = None) -> PatternInverses | None:
    """The patterns' inverses of :class:`PatternInverses` (None if Sigma or some Sigma_oo is not positive definite);
    ``missing`` as :func:`embedded_inverse` takes it."""
    logdet_sigma = _log_determinant(sigma)
    if logdet_sigma is None:
        return None
    logdet = np.full(len(observed), logdet_sigma)
    try:
        precision = np.linalg.inv(sigma)
        precision = 0.5 * (precision + precision.T)
        batches = []
        for which, miss in missing_groups(observed) if missing is None else missing:
            block = precision[miss[:, :, None], miss[:, None, :]]  # (k, m, m) = L_mm
            block_chol = np.linalg.cholesky(block)
            logdet[which] += 2.0 * np.sum(np.log(np.diagonal(block_chol, axis1=1, axis2=2)), axis=1)
            batches.append((which, miss, np.linalg.inv(block)))
    except np.linalg.LinAlgError:  # numerically singular although its Cholesky factor exists
        return None
    return PatternInverses(precision, logdet, tuple(batches))


def batch_members(inverses_batches: list, pattern_of: np.ndarray) -> list[tuple[np.ndarray, np.ndarray]]:
    """For each batch of :func:`missing_groups` (``inverses_batches``: its (patterns, missing columns) pairs), the rows
    whose pattern (``pattern_of``) it holds and each one's place in the batch: fixed by the data, found once."""
    out = []
    for which, *_ in inverses_batches:
        rows = np.flatnonzero(np.isin(pattern_of, which))
        out.append((rows, np.searchsorted(which, pattern_of[rows])))
    return out


def applied_inverses(inverses: PatternInverses, x: np.ndarray, members: list, observed: np.ndarray) -> np.ndarray:
    """A_k x for each row x of ``x`` (zeros where its pattern k misses; ``observed``: each row's answered items),
    A_k = Sigma_oo^-1 embedded in p x p (:class:`PatternInverses`; ``members``: :func:`batch_members` of the rows):
    x L, less (L_.m C_k (L x)_m) for rows with gaps, np^2 + n m p where the embedded stack took n m p^2 to make."""
    L = inverses.precision
    v = x @ L
    u = v.copy()
    for (_, miss, C), (rows, at) in zip(inverses.batches, members):
        if not len(rows):
            continue
        cols = miss[at]  # (n_b, m) each row's missing columns
        z = (C[at] @ v[rows[:, None], cols][:, :, None])[:, :, 0]
        u[rows] -= np.einsum("rk,rkp->rp", z, L[cols])
    return np.where(observed, u, 0.0)


def inverse_quadratic_forms(inverses: PatternInverses, x: np.ndarray, members: list) -> np.ndarray:
    """x_i' A_k x_i for each row x_i of ``x`` (zeros on the items its pattern k misses), A_k = Sigma_oo^-1 embedded
    (:class:`PatternInverses`; ``members``: :func:`batch_members` of the rows): with v = x L, x' L x less
    v_m' C_k v_m, since x is zero on m, so that (L x)_m = L_mo x_o and x_o' Sigma_oo^-1 x_o = x_o' L_oo x_o -
    x_o' L_om C_k L_mo x_o (the partitioned inverse; Little & Rubin 2002, ch. 11).  n p^2 + n m^2 for n rows, where
    the embedded stack took a p x p matrix a pattern to hold and n p^2 to read: the squared Mahalanobis distances of
    rows on their answered items (the case diagnostics) and of the patterns' means (Little's test)."""
    v = x @ inverses.precision
    d = np.einsum("ij,ij->i", x, v)
    for (_, miss, C), (rows, at) in zip(inverses.batches, members):
        if not len(rows):
            continue
        z = v[rows[:, None], miss[at]]  # (n_b, m) (L x)_m of each row
        d[rows] -= np.einsum("ri,rij,rj->r", z, C[at], z)
    return d


def weighted_inverse_sum(inverses: PatternInverses, observed: np.ndarray, w: np.ndarray) -> np.ndarray:
    """sum_k w_k A_k (A_k = Sigma_oo^-1 embedded, :class:`PatternInverses`) from L restricted to each pattern's
    answered pairs, less each pattern's side' C_k side with side = L_m. on its answered columns: one matrix product
    over the patterns' (pattern, missing item) pairs, no stack of p x p matrices."""
    L = inverses.precision
    p = L.shape[0]
    total = L * ((observed * w[:, None]).T @ observed.astype(float))
    for which, miss, C in inverses.batches:
        side = L[miss] * observed[which][:, None, :]  # (k, m, p) L_m. on the answered columns
        total -= (side * w[which, None, None]).reshape(-1, p).T @ (C @ side).reshape(-1, p)
    return total


#: the most bytes of one chunk of the patterns' V' A_k V (:class:`PatternBases`)
CHUNK_BYTES = 1 << 25


class PatternBases:
    """V' A_k V of every pattern (A_k = Sigma_oo^-1 embedded, :class:`PatternInverses`), made a chunk of patterns at
    a time and never all at once: V' L V - R_k' C_k R_k with R_k = (L V)_m, p^2 r once and m r (m + r) a pattern,
    where V' A_k V from the embedded A_k took p r (p + r) a pattern (the rows and columns A_k leaves at zero come out
    zero to rounding).  A chunk holds at most :data:`CHUNK_BYTES` (32 MiB): the whole stack was 173 MB at 100 items and
    1,500 rows with gaps everywhere, and held with several others of its size.  Iterating gives the patterns' matrices
    one by one in the patterns' order; :meth:`chunks` gives (first pattern, stop, their stack) (the score tests);
    :attr:`factors`, the rank-m form in which the information and the Hessian take their sums."""

    def __init__(self, inverses: PatternInverses, V: np.ndarray):
        self.inverses = inverses
        self.LV = inverses.precision @ V
        K0 = V.T @ self.LV
        self.K0 = 0.5 * (K0 + K0.T)
        self.patterns = len(inverses.logdet)
        r = V.shape[1]
        self.step = max(1, CHUNK_BYTES // (8 * r * r))

    @cached_property
    def factors(self) -> tuple:
        """(patterns, F) for each batch of the inverses (the patterns missing m > 0 items), F of shape (k, m, r) with
        R_k' C_k R_k = F_k' F_k (F_k = H_k' R_k, C_k = H_k H_k' by Cholesky), so that K_k = K0 - F_k' F_k: the
        rank-m form of the patterns' V' A_k V in which the sums over the patterns are taken
        (estimation.fiml.low_rank_trace_sum and its neighbours), m r a pattern to hold."""
        return tuple((which, np.swapaxes(np.linalg.cholesky(C), 1, 2) @ self.LV[miss])
                     for which, miss, C in self.inverses.batches)

    def chunks(self):
        for start in range(0, self.patterns, self.step):
            stop = min(self.patterns, start + self.step)
            K = np.broadcast_to(self.K0, (stop - start,) + self.K0.shape).copy()
            for which, miss, C in self.inverses.batches:
                lo, hi = np.searchsorted(which, (start, stop))
                if lo == hi:
                    continue
                R = self.LV[miss[lo:hi]]  # (k, m, r)
                K[which[lo:hi] - start] -= np.swapaxes(R, 1, 2) @ (C[lo:hi] @ R)
            yield start, stop, K

    def __iter__(self):
        for *_, K in self.chunks():
            yield from K
