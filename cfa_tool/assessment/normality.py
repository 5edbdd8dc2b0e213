"""Mardia's (1970) multivariate skewness and kurtosis with their tests, and the kurtosis of rows with gaps.

b1 = (1/N^2) sum_i sum_j (z_i' S^-1 z_j)^3, with N b1 / 6 ~ chi-square on p(p+1)(p+2)/6 df;
b2 = (1/N) sum_i (z_i' S^-1 z_i)^2, with (b2 - p(p+2)) / sqrt(8 p (p+2) / N) ~ N(0, 1)
under multivariate normality (S with divisor N; Mardia 1970, 1974).  Under frequency weights w_i (row i stands for
w_i rows) the sums run over the rows each counted w_i times, N = sum w_i: the tests of the data with every row
repeated by its weight (means and S weighted, b1 = (1/N^2) sum_ij w_i w_j (.)^3, b2 = (1/N) sum_i w_i (.)^2).

The double sum never holds an N x N or N x p^2 array at once.  With whitened rows y_i it is either
sum_abc T_abc^2 where T_abc = sum_i y_ia y_ib y_ic (N p^3 / 3 operations, as T is symmetric: one item a at a
time, the block U = T_a.. over b, c >= a, whose triples have smallest index a; by inclusion and exclusion the
ordered triples with smallest index a add 3 |U|^2 - 3 |U_a.|^2 + U_aa^2; for few items and many rows:
p^2 < 1.5 N) or the cubed Gram matrix Y Y' taken in blocks of rows small enough to stay in the processor's
cache, each pair of blocks once (N^2 p / 2 operations, for many items), whichever was timed faster for the shape.

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
times 2/N is the covariance of vech Sigma-hat.  With every row complete, c = N (p + 2) vech-trace(Sigma^-1),
c' H^-1 c = N^2 (p + 2)^2 p and V = 8 p (p + 2) / N: Mardia's test itself.  Under answers missing at random but not
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
    (``rows_with_gaps`` > 0, :func:`kurtosis_with_gaps`) the kurtosis alone, each row on the items it answered, and
    the skewness fields None (Mardia's skewness pairs rows on every item)."""
    skewness: float | None
    skewness_chi_square: float | None
    skewness_df: int | None
    skewness_p_value: float | None
    kurtosis: float
    kurtosis_expected: float
    kurtosis_z: float
    kurtosis_p_value: float
    rows_with_gaps: int = 0  # rows judged on the items they answered (0: every row judged was complete)

    def to_dict(self) -> dict:
        return dict(vars(self))


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
    return Normality(b1, chi, df, float(dist.chi2_sf(chi, df)), b2, expected, float(z), float(2 * dist.norm_sf(abs(z))))


def _sum_of_cubed_products(Y: np.ndarray, w: np.ndarray | None = None) -> float:
    """sum_ij (y_i' y_j)^3 (times w_i w_j with frequency weights ``w``), by the third-moment tensor or by blocks of
    the Gram matrix, whichever is cheaper."""
    n, p = Y.shape
    total = 0.0
    if p * p >= 1.5 * n:  # Gram blocks (pairs of row blocks, off-diagonal blocks counted twice): timed faster here
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
    for a in range(p):  # U = T_a.. over b, c >= a: the triples whose smallest index is a
        U = (columns[a:] * weighted[a]) @ Y[:, a:]
        total += 3.0 * float(np.vdot(U, U)) - 3.0 * float(U[0] @ U[0]) + float(U[0, 0]) ** 2
    return total


def answered_distances(rows: np.ndarray, patterns: tuple[np.ndarray, np.ndarray], mean: np.ndarray,
                       sigma: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Each row's squared Mahalanobis distance on its answered items under (mean, sigma), and log|Sigma_oo| of its
    answered items; ``patterns``: (distinct patterns, pattern of each row).  Sigma_oo^-1 of every pattern comes
    batched from the precision matrix (data.patterns.embedded_inverse, as the full-information likelihood has it),
    read for :data:`BLOCK` numbers of rows at a time (every row's p x p at once was 0.7 GB at 100,000 rows of 30 items)."""
    from cfa_tool.data.patterns import embedded_inverse  # (fits of complete rows do not load it)

    distinct, index = patterns
    found = embedded_inverse(sigma, distinct)
    if found is None:
        raise np.linalg.LinAlgError("an implied covariance matrix of answered items is not positive definite")
    A, log_det = found
    dev = np.where(np.isnan(rows), 0.0, rows - mean)
    n, p = dev.shape
    size = max(1, BLOCK // max(1, p * p))
    distances = np.empty(n)
    for start in range(0, n, size):
        part = slice(start, start + size)
        distances[part] = np.einsum("ij,ijk,ik->i", dev[part], A[index[part]], dev[part])
    return distances, log_det[index]


def kurtosis_with_gaps(rows: np.ndarray, moments: tuple[np.ndarray, np.ndarray] | None = None,
                       frequencies: np.ndarray | None = None) -> Normality:
    """Mardia's multivariate kurtosis of ``rows`` with gaps (NaN; every row answers some item), each row on the items
    it answered (Yuan, Lambert & Fouladi 2004; the formulas in the module docstring), with its z under normality;
    ``moments``: the rows' saturated (EM) mean and covariance when the caller has them (else estimated here);
    ``frequencies``: frequency weights, each row counted as often as its weight (N their sum).  With every row
    complete it is :func:`mardia`'s kurtosis test.  Raises LinAlgError where the covariance or the information is not
    positive definite, EstimationError where the EM estimates cannot be found, and ValueError where the information
    would exceed the largest matrix the tool makes (numerics.sizes)."""
    from cfa_tool.data.em import em_saturated
    from cfa_tool.data.patterns import embedded_inverse, group_patterns, pattern_data
    from cfa_tool.estimation.fiml import moment_second_derivatives
    from cfa_tool.inference.robust import vech_indices
    from cfa_tool.numerics import sizes
    from cfa_tool.numerics.linalg import scaled_solve

    rows = np.asarray(rows, dtype=float)
    n_rows, p = rows.shape
    if not sizes.fits(p + p * (p + 1) // 2):
        raise ValueError(f"the information of {p} items' covariances exceeds the largest matrix this tool makes")
    w = np.ones(n_rows) if frequencies is None else np.asarray(frequencies, dtype=float)
    if moments is None:
        mean, sigma, _ = em_saturated(pattern_data(rows, None if frequencies is None else w))
    else:
        mean, sigma = moments
    observed = ~np.isnan(rows)
    distinct, index, _ = group_patterns(observed)
    d2, _ = answered_distances(rows, (distinct, index), mean, sigma)
    answered = observed.sum(axis=1).astype(float)
    n = float(w.sum())
    b = float(w @ d2**2 / n)
    expected = float(w @ (answered * (answered + 2.0)) / n)
    found = embedded_inverse(sigma, distinct)
    if found is None:
        raise np.linalg.LinAlgError("the saturated covariance matrix is not positive definite")
    A = found[0]
    counts = np.bincount(index, weights=w, minlength=len(distinct))  # rows (sums of weights) in each pattern
    items = distinct.sum(axis=1).astype(float)
    C = np.tensordot(counts * (items + 2.0), A, axes=1)  # sum_i (p_i + 2) A_i
    I, J = vech_indices(p)
    c = np.where(I == J, 1.0, 2.0) * C[I, J]  # tr(C D_a) for the vech directions
    H = moment_second_derivatives(A, counts / n, I, J)[p:, p:]
    estimation = float(c @ scaled_solve(H, c, positive_definite=True)) * 8.0 / n
    variance = (float(w @ (8.0 * answered * (answered + 2.0) * (answered + 3.0))) - estimation) / (n * n)
    z = (b - expected) / np.sqrt(variance) if variance > 0 else float("nan")
    if not np.isfinite(z):
        raise np.linalg.LinAlgError("the kurtosis has no finite z under normality at these moments")
    return Normality(None, None, None, None, b, expected, float(z), float(2 * dist.norm_sf(abs(z))),
                     int(np.count_nonzero(~observed.all(axis=1))))
