"""Mardia's (1970) multivariate skewness and kurtosis with their tests, and the kurtosis of rows with gaps.

b1 = (1/N^2) sum_i sum_j (z_i' S^-1 z_j)^3, with N b1 / 6 ~ chi-square on p(p+1)(p+2)/6 df;
b2 = (1/N) sum_i (z_i' S^-1 z_i)^2, with (b2 - p(p+2)) / sqrt(8 p (p+2) / N) ~ N(0, 1)
under multivariate normality (S with divisor N; Mardia 1970, 1974).  Under frequency weights w_i (row i stands for
w_i rows) the sums run over the rows each counted w_i times, N = sum w_i: the tests of the data with every row
repeated by its weight (means and S weighted, b1 = (1/N^2) sum_ij w_i w_j (.)^3, b2 = (1/N) sum_i w_i (.)^2).

The double sum never holds an N x N or N x p^2 array at once.  With whitened rows y_i it is either
sum_abc T_abc^2 where T_abc = sum_i y_ia y_ib y_ic (N p^3 / 6 multiply-adds, as T is symmetric: each unordered
triple a <= b <= c once, one middle index b at a time, the block M = T_.b. over a <= b <= c; an ordered triple of
three different items stands for 6 orders, of two for 3, so the block adds 6 |M|^2 - 3 |M_.b.(c = b)|^2
- 3 |M_.b.(a = b)|^2 + T_bbb^2; for few items and many rows: p^2 < 2 N) or the cubed Gram matrix Y Y' taken in
blocks of rows small enough to stay in the processor's cache, each pair of blocks once (N^2 p / 2 operations, for
many items), whichever was timed faster for the shape.

Rows with gaps (:func:`kurtosis_with_gaps`; Yuan, Lambert & Fouladi 2004, Mardia's multivariate kurtosis with
missing data, Multivariate Behavioral Research 39, 413-437 -- the journal, pages and the construction below are
recalled from memory, not checked against the paper's text): row i, answering p_i items, has its squared Mahalanobis
distance d_i^2 = (x_io - mu_o)' Sigma_oo^-1 (x_io - mu_o) on those items under the saturated (EM) means and
covariances, which under normality and answers missing completely at random (MCAR) has E d_i^4 = p_i (p_i + 2), so
    b = (1/N) sum_i d_i^4,    expected e = (1/N) sum_i p_i (p_i + 2),    z = (b - e) / sqrt(V).
V, b's variance under normality with mu and Sigma estimated, by the delta method (derived here, and checked by
simulation in tests/assessment/test_kurtosis_with_gaps.py): with h_i = d_i^4 - p_i (p_i + 2), whose expectation does
not depend on the moments, E dh_i/dtheta = -Cov(h_i, score_i), so that
    V = (1/N^2) [sum_i Var h_i - N g' I^-1 g] = (1/N^2) [sum_i 8 p_i (p_i + 2)(p_i + 3) - (8/N) c' H^-1 c],
Var h_i = E d^8 - (E d^4)^2 for chi-square(p_i); the mean's derivatives vanish by symmetry, and Sigma's are
E[d(d_i^4)] = -2 (p_i + 2) tr(Sigma_oo^-1 dSigma_oo) (as E[d^2 r r'] = (p + 2) Sigma for a normal r), so that c = vech-traces of sum_i (p_i + 2) A_i (A_i =
Sigma_oo^-1 embedded in p x p: c_jj = C_jj, c_jk = 2 C_jk) and H = sum_k (n_k / N) tr(A_k D_a A_k D_b), the
patterns-fixed information of -2/N log L in vech Sigma (estimation.fiml.moment_second_derivatives), whose inverse
times 2/N is the covariance of vech Sigma-hat; c' H^-1 c is found without H (:func:`information_quadratic`: conjugate
gradients on p x p matrices, where H's Cholesky factor took 2 s at 60 items).  With every row complete,
c = N (p + 2) vech-trace(Sigma^-1), c' H^-1 c = N^2 (p + 2)^2 p and V = 8 p (p + 2) / N: Mardia's test itself.  Under answers missing at random but not
completely at random the rows of each pattern are a selection on their answers, and e is then only approximately the
expectation (so the test, like Little's, reads the rows as missing completely at random).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.numerics import distributions as dist
from cfa_tool.numerics.linalg import cholesky_log_det, triangular_inverse


@dataclass(frozen=True)
class Normality:
    """Mardia's (1970) multivariate skewness and kurtosis, each with its test; of rows with gaps
    (``rows_with_gaps`` > 0, :func:`kurtosis_with_gaps`) the kurtosis of every row, each on the items it answered,
    the skewness fields None (Mardia's skewness pairs rows on every item), and beside it both of Mardia's tests of
    the ``complete_rows`` rows without a gap (``of_complete_rows``; None where they are p + 1 or fewer, or their
    covariance matrix is singular)."""
    skewness: float | None
    skewness_chi_square: float | None
    skewness_df: int | None
    skewness_p_value: float | None
    kurtosis: float
    kurtosis_expected: float
    kurtosis_z: float
    kurtosis_p_value: float
    rows_with_gaps: int = 0  # rows judged on the items they answered (0: every row judged was complete)
    complete_rows: int = 0  # how many of the rows judged are complete (every one of them without gaps)
    of_complete_rows: Normality | None = None  # of rows with gaps: Mardia's tests of the complete rows alone

    def to_dict(self) -> dict:
        out = dict(vars(self))
        if self.of_complete_rows is not None:
            out["of_complete_rows"] = self.of_complete_rows.to_dict()
        return out

    @property
    def relative_kurtosis(self) -> float:
        """Mardia's kurtosis over its value under normality, b2,p / p(p+2) (of rows with gaps b / e), known as the
        relative multivariate kurtosis (the name recalled from memory): 1 for normal answers, and under an elliptical
        distribution an estimate of 1 + kappa, the factor by which the normal-theory chi-square statistic is off
        (Browne 1984; Shapiro & Browne 1987; recalled from memory)."""
        return self.kurtosis / self.kurtosis_expected


#: Mardia's normalized kurtosis (z) beyond which the answers are read as departing from normality: normalized
#: estimates above 5 (Bentler 2006, recalled from memory; a rule of thumb, not a law)
NORMALIZED_KURTOSIS_BOUND = 5.0
#: how far the relative multivariate kurtosis (:attr:`Normality.relative_kurtosis`) lies from 1 before the departure
#: matters: under an elliptical distribution the normal-theory chi-square is about that ratio times its value under
#: normality (Browne 1984, recalled from memory), so a tenth or more off (a line of this tool, not a published cutoff)
RELATIVE_KURTOSIS_BOUND = 0.10


def departs_materially(n: Normality) -> bool:
    """Whether the answers' tails depart from normal ones enough to matter for normal-theory chi-square statistics
    and standard errors: Mardia's kurtosis (of rows with gaps, of every row on the items it answered) beyond
    :data:`NORMALIZED_KURTOSIS_BOUND` in z, so not chance, and at least :data:`RELATIVE_KURTOSIS_BOUND` from its
    normal value as a ratio, so not trivial with many rows, where a small z is easy to exceed.  Kurtosis decides,
    not skewness: it is kurtosis that moves the normal-theory chi-square (Curran, West & Finch 1996, recalled from
    memory)."""
    return (abs(n.kurtosis_z) > NORMALIZED_KURTOSIS_BOUND
            and abs(n.relative_kurtosis - 1.0) >= RELATIVE_KURTOSIS_BOUND)


BLOCK = 1 << 20  # numbers held at once by the blocked sums (8 MB)
GRAM_ROWS = 128  # rows per block of the Gram matrix: its blocks stay in the processor's cache (3x faster at p = 60
# and N = 1,000 than blocks of a thousand rows; process time, one BLAS thread)


@dataclass(frozen=True, eq=False)
class Whitened:
    """Rows whitened by their covariance matrix S = L L' (divisor N), shared by Mardia's tests and the case
    diagnostics: ``rows`` Y = Z L^-T for the centred rows Z (``centred``), so that y_i' y_j = z_i' S^-1 z_j;
    ``log_det`` log|S|; ``distances`` y_i' y_i, each row's squared Mahalanobis distance from the centroid."""

    rows: np.ndarray
    log_det: float
    distances: np.ndarray
    centred: np.ndarray


def whitened_rows(rows: np.ndarray, moments: tuple[np.ndarray, np.ndarray] | None = None,
                  factor: tuple[np.ndarray, float] | None = None) -> Whitened:
    """:class:`Whitened` of ``rows``; ``moments``: the rows' (mean, covariance with divisor N) when the caller has
    them (the fit's sample moments), and ``factor`` (Cholesky factor, log-determinant) of that covariance when the
    caller has made it (the likelihood's, numerics.linalg.sample_factor).  Y = Z L^-T for the Cholesky factor L, one
    product with the inverse of L (the centred rows Z are kept for the case diagnostics)."""
    mean, covariance = moments if moments is not None else (rows.mean(axis=0), None)
    Z = rows - mean
    found = factor if factor is not None and moments is not None else cholesky_log_det(
        Z.T @ Z / len(rows) if covariance is None else covariance)
    if found is None:
        raise np.linalg.LinAlgError("the covariance matrix of the rows is not positive definite")
    L, log_det = found
    inverse = triangular_inverse(L)
    if inverse is None:
        raise np.linalg.LinAlgError("the covariance matrix of the rows is not positive definite")
    Y = Z @ inverse.T
    return Whitened(Y, log_det, np.einsum("ij,ij->i", Y, Y), Z)


def _frequency_whitened(rows: np.ndarray, frequencies: np.ndarray) -> np.ndarray:
    """:func:`whitened_rows` of the rows repeated by their frequency weights, one row each: the weighted mean and
    covariance (divisor the sum of the weights)."""
    total = frequencies.sum()
    Z = rows - frequencies @ rows / total
    inverse = triangular_inverse(np.linalg.cholesky((Z * frequencies[:, None]).T @ Z / total))
    if inverse is None:
        raise np.linalg.LinAlgError("the weighted covariance matrix of the rows is not positive definite")
    return Z @ inverse.T


def mardia(rows: np.ndarray, whitened: Whitened | None = None,
           frequencies: np.ndarray | None = None) -> Normality:
    """Mardia's tests of ``rows``; ``whitened`` is :func:`whitened_rows` of them when the caller has it;
    ``frequencies``: frequency weights, each row counted as often as its weight (N their sum; ``whitened`` unused)."""
    p = rows.shape[1]
    if frequencies is not None:
        frequencies = np.asarray(frequencies, dtype=float)
        n = float(frequencies.sum())
        Y = _frequency_whitened(rows, frequencies)
        b1 = _sum_of_cubed_products(Y, frequencies) / (n * n)
        d2 = np.einsum("ij,ij->i", Y, Y)
        b2 = float(frequencies @ d2**2 / n)
    else:
        n = rows.shape[0]
        whitened = whitened_rows(rows) if whitened is None else whitened
        b1 = _sum_of_cubed_products(whitened.rows) / (n * n)
        b2 = float(np.add.reduce(whitened.distances**2) / n)  # numpy.mean's sum and quotient, without its wrapper
    df = p * (p + 1) * (p + 2) // 6
    chi = n * b1 / 6.0
    expected = p * (p + 2.0)
    z = (b2 - expected) / np.sqrt(8.0 * p * (p + 2.0) / n)
    # every row Mardia's tests read is complete: their number is the complete rows' (hostile s25b case 03: 0 was written)
    return Normality(b1, chi, df, float(dist.chi2_sf(chi, df)), b2, expected, float(z), float(2 * dist.norm_sf(abs(z))),
                     complete_rows=int(rows.shape[0]))


def _sum_of_cubed_products(Y: np.ndarray, w: np.ndarray | None = None) -> float:
    """sum_ij (y_i' y_j)^3 (times w_i w_j with frequency weights ``w``), by the third-moment tensor or by blocks of
    the Gram matrix, whichever is cheaper."""
    n, p = Y.shape
    total = 0.0
    if p * p >= 2.0 * n:  # Gram blocks (pairs of row blocks, off-diagonal blocks counted twice): timed faster here
        # (one BLAS thread: 300 rows of 30 items, 1,000 of 50 and 60; the triples faster at 1,000 rows of 40 items and
        # at 3,000 of 60, bench/README.md's twenty-seventh round)
        size = max(1, min(n, GRAM_ROWS, BLOCK // n))
        space = np.empty(size * n)  # every block's products in the same memory, taken once (fresh memory each time:
        # about a tenth slower at 60 items and N = 1,000)
        for start in range(0, n, size):
            stop = min(n, start + size)
            G = np.matmul(Y[start:stop], Y[start:].T, out=space[: (stop - start) * (n - start)].reshape(stop - start, -1))
            if w is None:  # the cubes summed in one pass, no array of them (a quarter faster at 60 items)
                total += 2.0 * float(np.einsum("ij,ij,ij->", G, G, G))
                D = G[:, : stop - start]
                total -= float(np.einsum("ij,ij,ij->", D, D, D))
                continue
            G *= G * G
            G *= w[start:stop, None] * w[None, start:]
            total += 2.0 * float(G.sum()) - float(G[:, : stop - start].sum())
        return total
    columns = np.ascontiguousarray(Y.T)
    weighted = columns if w is None else columns * w
    for b in range(p):  # M = T_.b. over a <= b <= c: the triples whose middle index is b, each once
        M = (columns[b:] * weighted[b]) @ Y[:, : b + 1]  # M[c - b, a] = T_abc
        total += (6.0 * float(np.vdot(M, M)) - 3.0 * float(M[0] @ M[0]) - 3.0 * float(M[:, b] @ M[:, b])
                  + float(M[0, b]) ** 2)
    return total


def kurtosis_with_gaps(rows: np.ndarray, moments: tuple[np.ndarray, np.ndarray] | None = None,
                       frequencies: np.ndarray | None = None) -> Normality:
    """Mardia's multivariate kurtosis of ``rows`` with gaps (NaN; every row answers some item), each row on the items
    it answered (Yuan, Lambert & Fouladi 2004; the formulas in the module docstring), with its z under normality;
    ``moments``: the rows' saturated (EM) mean and covariance when the caller has them (else estimated here);
    ``frequencies``: frequency weights, each row counted as often as its weight (N their sum).  With every row
    complete it is :func:`mardia`'s kurtosis test.  Raises LinAlgError where the covariance or the information is not
    positive definite, and EstimationError where the EM estimates cannot be found."""
    from cfa_tool.data.em import em_saturated
    from cfa_tool.data.patterns import (batch_members, group_patterns, inverse_quadratic_forms, pattern_data,
                                        pattern_inverses)

    rows = np.asarray(rows, dtype=float)
    n_rows, p = rows.shape
    w = np.ones(n_rows) if frequencies is None else np.asarray(frequencies, dtype=float)
    if moments is None:
        mean, sigma, _ = em_saturated(pattern_data(rows, None if frequencies is None else w))
    else:
        mean, sigma = moments
    observed = ~np.isnan(rows)
    distinct, index, _ = group_patterns(observed)
    inverses = pattern_inverses(sigma, distinct)
    if inverses is None:
        raise np.linalg.LinAlgError("the saturated covariance matrix is not positive definite")
    # each row's squared Mahalanobis distance on its answered items, every pattern's Sigma_oo^-1 in the Schur
    # complement's low-rank form (data.patterns.PatternInverses), as the case diagnostics take them: no stack of one
    # p x p matrix per pattern (speed-s25: 920 MB at 100 items of 1,500 rows, one pattern each)
    d2 = inverse_quadratic_forms(inverses, np.where(observed, rows - mean, 0.0), batch_members(inverses.batches, index))
    answered = observed.sum(axis=1).astype(float)
    n = float(w.sum())
    b = float(w @ d2**2 / n)
    expected = float(w @ (answered * (answered + 2.0)) / n)
    share = np.bincount(index, weights=w, minlength=len(distinct)) / n  # pi_k: each pattern's share of the rows
    estimation = 8.0 * n * information_quadratic(inverses, distinct, share, sigma)
    variance = (float(w @ (8.0 * answered * (answered + 2.0) * (answered + 3.0))) - estimation) / (n * n)
    z = (b - expected) / np.sqrt(variance) if variance > 0 else float("nan")
    if not np.isfinite(z):
        raise np.linalg.LinAlgError("the kurtosis has no finite z under normality at these moments")
    complete = observed.all(axis=1)
    whole = None
    if complete.sum() > p + 1 and not complete.all():  # Mardia's own tests of the complete rows, beside (s25)
        try:
            whole = mardia(rows[complete], frequencies=None if frequencies is None else w[complete])
        except np.linalg.LinAlgError:  # their covariance matrix is singular: said as not computed
            whole = None
    return Normality(None, None, None, None, b, expected, float(z), float(2 * dist.norm_sf(abs(z))),
                     int(np.count_nonzero(~complete)), int(np.count_nonzero(complete)), whole)


#: the conjugate gradients of :func:`information_quadratic` stop when the preconditioned residual's norm is this
#: share of the right side's (about the last digits of double precision), and accept no worse than the square root
#: of it where rounding stops them earlier
SOLVED = 1e-12


def information_quadratic(inverses, observed: np.ndarray, share: np.ndarray, sigma: np.ndarray) -> float:
    """tr(R X) for the symmetric X that solves H(X) = R, with H(X) = sum_k pi_k A_k X A_k the patterns-fixed
    information of the saturated covariances (in vech coordinates estimation.fiml.moment_second_derivatives's block of
    the covariances, so that c' H^-1 c with c = vech-traces of N R is N^2 tr(R X)) and R = sum_k pi_k (p_k + 2) A_k
    (:func:`kurtosis_with_gaps`'s estimation term); ``inverses``: data.patterns.PatternInverses of the patterns
    ``observed`` (A_k = Sigma_oo^-1 embedded), ``share``: pi_k, each pattern's share of the rows (summing to 1).

    No matrix of the covariances by the covariances is made (it was a Cholesky factor of p(p+1)/2 x p(p+1)/2, 2 s at
    60 items).  With L = Sigma^-1 and N_k = C_k = (L_mm)^-1 scattered on the items m pattern k misses,
    A_k = L - L N_k L (the partitioned inverse; Little & Rubin 2002, ch. 11), so that with Y = L X L
        H(X) = Y - Y Q L - L Q Y + L S L,   Q = sum_k pi_k N_k,   S = sum_k pi_k N_k Y N_k
    (S from each pattern's m x m block of Y): a few p x p products and each pattern's small blocks.  X solves
    H(X) = R by conjugate gradients (Hestenes & Stiefel 1952) in the trace inner product, H being self-adjoint and
    positive definite there, preconditioned by the inverse of H with every row complete, r -> Sigma r Sigma, and
    started at that case's exact solution X = (p + 2) Sigma: with every row complete it is the solution, and since
    0 <= A_k <= L the preconditioned operator's eigenvalues lie in [1 - (share of rows with gaps), 1], so few
    iterations suffice when few rows have gaps; at most p(p+1)/2, the dimension, in exact arithmetic.  Raises
    LinAlgError where H is not positive definite or the iterations do not converge."""
    from cfa_tool.data.patterns import weighted_inverse_sum

    L = inverses.precision
    p = L.shape[0]
    items = observed.sum(axis=1).astype(float)
    R = weighted_inverse_sum(inverses, observed, share * (items + 2.0))
    R = 0.5 * (R + R.T)
    Q = np.zeros((p, p))
    places = []
    for which, miss, C in inverses.batches:
        at = (miss[:, :, None], miss[:, None, :])
        weighted = C * share[which, None, None]
        np.add.at(Q, at, weighted)
        places.append((at, C, weighted))
    QL = Q @ L

    def information(X: np.ndarray) -> np.ndarray:
        Y = L @ X @ L
        S = np.zeros((p, p))
        for at, C, weighted in places:
            np.add.at(S, at, weighted @ Y[at] @ C)
        T = Y @ QL
        return Y - T - T.T + L @ S @ L

    X = (p + 2.0) * sigma
    r = R - information(X)
    z = sigma @ r @ sigma
    rz = float(np.vdot(r, z))
    reference = float(np.vdot(R, sigma @ R @ sigma))
    d = z
    for _ in range(p * (p + 1) // 2):
        if rz <= SOLVED**2 * reference:
            break
        Hd = information(d)
        curvature = float(np.vdot(d, Hd))
        if not curvature > 0:
            raise np.linalg.LinAlgError("the information of the saturated covariances is not positive definite")
        step = rz / curvature
        X = X + step * d
        r = r - step * Hd
        z = sigma @ r @ sigma
        rz, previous = float(np.vdot(r, z)), rz
        d = z + (rz / previous) * d
    if not rz <= SOLVED * reference:
        raise np.linalg.LinAlgError("the information of the saturated covariances could not be solved")
    return float(np.vdot(R, X))
