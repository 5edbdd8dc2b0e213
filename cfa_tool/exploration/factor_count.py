"""How many factors: parallel analysis, the minimum average partial test, and the fit of
solutions with 1, 2, ... factors; one recommendation with its reasons.

* Parallel analysis (Horn 1965): the eigenvalues of the correlation matrix are compared with
  those of correlation matrices of random normal data of the same size; a factor is kept while
  its eigenvalue exceeds the 95th percentile of the random ones at the same position (Glorfeld
  1995; Horn used the mean).  Two versions: principal-component eigenvalues (unit diagonal),
  and factor-analytic eigenvalues of the reduced matrix with squared multiple correlations on
  the diagonal (Humphreys & Ilgen 1969), each against random matrices treated alike.
  The random correlation matrices are drawn directly: the cross-products of N normal rows about
  their mean follow the Wishart distribution W_p(N - 1, I), drawn as T T' with T lower
  triangular, T_ii^2 ~ chi-square(N - i), T_ij ~ N(0, 1) (Bartlett 1933; see Anderson 2003,
  ch. 7), so that a replication costs p^3 rather than N p^2; all replications are
  decomposed in one batched call.  Seeded.  With ordinal items the observed eigenvalues are those
  of the polychoric correlations, whose sampling variability exceeds that of Pearson correlations
  of normal data, so the reference comes from the answers themselves: each item's column shuffled
  on its own (Buja & Eyuboglu 1992), which keeps its categories and thresholds and breaks every
  association, analysed by polychoric correlations as the data are (Garrido, Abad & Ponsoda 2013);
  the correlations of all pairs of all shuffled copies are estimated together
  (``data.polychoric.polychoric_tables``).  With continuous items beside ordinal ones the
  reference remains normal data; the result says which reference it used.
* Minimum average partial test (Velicer 1976): the average squared partial correlation after
  removing the first 0, 1, 2, ... principal components; the count at its minimum.  The revised
  test (Velicer, Eaton & Fava 2000) averages fourth powers instead.
* Fit of maximum-likelihood solutions with 1 to (largest count above + 2) factors: chi-square,
  degrees of freedom, RMSEA with its 90% interval, BIC (``extraction.solution_fit``).

Recommendation (a rule of this program): the median of the counts from parallel analysis of
components, parallel analysis of factors and the minimum average partial test, at least 1.
Parallel analysis and the minimum average partial test were the most accurate rules in the
comparison of Zwick & Velicer (1986); the revised test, the lowest BIC and the fewest factors
with close fit (RMSEA <= .05, a convention) are shown beside them.  These rules often disagree
in practice.  Notes (``CountNote``) mark: rules that disagree (any two counts differ); the first
eigenvalue not kept above the mean of the random ones (Horn's own criterion) in either version
of parallel analysis; no factor above chance (the median is 0; one factor is then extracted);
an RMSEA above .08 (a convention) or a uniqueness at its bound in the ML solution with the
recommended number of factors.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.errors import EstimationError
from cfa_tool.exploration.choices import CorrelationKind, CountNote, CountRule, ExtractionMethod, ParallelReference
from cfa_tool.exploration.correlations import CorrelationInput
from cfa_tool.exploration.extraction import FactorSolution, extract, largest_factor_count

PERCENTILE = 95.0  # Glorfeld (1995)
POOR_RMSEA = 0.08  # a convention (Browne & Cudeck 1993), not a law
CLOSE_RMSEA = 0.05  # a convention (Browne & Cudeck 1993)
_CHUNK_CELLS = 4_000_000  # random matrices per batch: about 32 MB of doubles


@dataclass(frozen=True, eq=False)
class ParallelAnalysis:
    """Horn's (1965) parallel analysis: observed eigenvalues against random ones."""
    replications: int
    seed: int
    percentile: float
    component_eigenvalues: np.ndarray  # of the correlation matrix, largest first
    component_reference: np.ndarray  # percentile of the random eigenvalues at each position
    component_reference_mean: np.ndarray
    component_exceeded: np.ndarray  # share of random eigenvalues below the observed one, by position
    factor_eigenvalues: np.ndarray  # of the reduced matrix (squared multiple correlations on the diagonal)
    factor_reference: np.ndarray
    factor_reference_mean: np.ndarray
    factor_exceeded: np.ndarray
    components: int  # count by the principal-component version
    factors: int  # count by the factor-analytic version
    reference: ParallelReference = ParallelReference.NORMAL  # where the random eigenvalues come from


@dataclass(frozen=True, eq=False)
class AveragePartial:
    """Average squared (and fourth-power) partial correlations after removing 0, 1, ... components."""

    squared: np.ndarray
    fourth_power: np.ndarray
    components: int  # argmin of squared (Velicer 1976)
    components_revised: int  # argmin of fourth_power (Velicer, Eaton & Fava 2000)


@dataclass(frozen=True)
class FitStep:
    """The solution with one number of factors."""
    factors: int
    solution: FactorSolution

    @property
    def improper(self) -> bool:
        return bool(self.solution.at_bound)


@dataclass(frozen=True)
class CountSuggestion:
    """The number of factors one rule suggests."""
    rule: CountRule
    factors: int | None  # None: the rule found no count within the range tried


@dataclass(frozen=True, eq=False)
class FactorCount:
    """Every rule's number of factors and the recommended one."""
    recommended: int
    suggestions: tuple[CountSuggestion, ...]  # every rule's count, the three combined ones first
    combined: tuple[CountRule, ...]  # the rules whose median is the recommendation
    notes: tuple[CountNote, ...]
    parallel: ParallelAnalysis
    average_partial: AveragePartial
    fits: tuple[FitStep, ...]

    def suggestion(self, rule: CountRule) -> int | None:
        return next(s.factors for s in self.suggestions if s.rule is rule)

    def fit_of(self, factors: int) -> FitStep | None:
        return next((f for f in self.fits if f.factors == factors), None)


def reduced(R: np.ndarray) -> np.ndarray:
    """R with the squared multiple correlations 1 - 1/(R^-1)_ii on the diagonal (also for stacks)."""
    smc = 1.0 - 1.0 / np.diagonal(np.linalg.inv(R), axis1=-2, axis2=-1)
    out = R.copy()
    idx = np.arange(R.shape[-1])
    out[..., idx, idx] = smc
    return out


def random_correlations(n_obs: int, p: int, count: int, rng: np.random.Generator) -> np.ndarray:
    """``count`` correlation matrices of N independent standard normal rows, through their
    Wishart(N - 1, I) cross-products drawn by the Bartlett decomposition."""
    T = np.zeros((count, p, p))
    rows, cols = np.tril_indices(p, -1)
    T[:, rows, cols] = rng.standard_normal((count, len(rows)))
    idx = np.arange(p)
    T[:, idx, idx] = np.sqrt(rng.chisquare(n_obs - 1 - idx, size=(count, p)))
    W = T @ T.transpose(0, 2, 1)
    d = 1.0 / np.sqrt(np.diagonal(W, axis1=1, axis2=2))
    return W * d[:, :, None] * d[:, None, :]


def permuted_polychoric(codes: np.ndarray, thresholds, count: int, rng: np.random.Generator) -> np.ndarray:
    """``count`` polychoric correlation matrices of the answers with each item's column shuffled on its own
    (Buja & Eyuboglu 1992; for ordinal items Garrido, Abad & Ponsoda 2013): the shuffle keeps every item's
    answers, so its thresholds, and breaks every association.  ``codes`` (N, p): category codes from 0, -1 for
    no answer (kept where they are in the column, so each pair keeps about its number of rows)."""
    from cfa_tool.data.polychoric import polychoric_tables

    n, p = codes.shape
    K = max(len(t) for t in thresholds) + 1
    padded = np.full((p, K - 1), np.inf)
    for j, t in enumerate(thresholds):
        padded[j, :len(t)] = t
    I, J = np.tril_indices(p, -1)
    out = np.empty((count, p, p))
    for r in range(count):
        shuffled = np.take_along_axis(codes, np.argsort(rng.random((n, p)), axis=0), axis=0)
        tables = np.empty((len(I), K, K))
        for k, (i, j) in enumerate(zip(I, J)):
            both = (shuffled[:, i] >= 0) & (shuffled[:, j] >= 0)
            tables[k] = np.bincount(shuffled[both, i] * K + shuffled[both, j], minlength=K * K).reshape(K, K)
        rho = polychoric_tables(tables, padded[I], padded[J])
        R = np.eye(p)
        R[I, J] = R[J, I] = rho
        out[r] = R
    return out


def _leading(observed: np.ndarray, reference: np.ndarray) -> int:
    above = observed > reference
    return int(np.argmin(above)) if not above.all() else len(observed)


def parallel_analysis(data: CorrelationInput, replications: int = 100, seed: int = 0,
                      percentile: float = PERCENTILE) -> ParallelAnalysis:
    """Parallel analysis (module docstring) with ``replications`` random matrices."""
    from cfa_tool import options

    replications = options.replications(replications, minimum=2)
    seed = options.seed(seed)
    percentile = options.real_number("the percentile", percentile, 0.0, 100.0, open_low=True, open_high=True)
    R, p, n = data.correlations, data.p, data.n_obs
    rng = np.random.default_rng(seed)
    chunk = max(1, _CHUNK_CELLS // (p * p))
    shuffled = data.codes is not None and data.thresholds is not None
    pc, fa = [], []
    for start in range(0, replications, chunk):
        count = min(chunk, replications - start)
        batch = (permuted_polychoric(data.codes, data.thresholds, count, rng) if shuffled else
                 random_correlations(n, p, count, rng))
        pc.append(np.linalg.eigvalsh(batch)[:, ::-1])
        fa.append(np.linalg.eigvalsh(reduced(batch))[:, ::-1])
    pc, fa = np.vstack(pc), np.vstack(fa)
    observed_pc = np.linalg.eigvalsh(R)[::-1]
    observed_fa = np.linalg.eigvalsh(reduced(R))[::-1]
    ref_pc, ref_fa = np.percentile(pc, percentile, axis=0), np.percentile(fa, percentile, axis=0)
    return ParallelAnalysis(replications, seed, percentile, observed_pc, ref_pc, pc.mean(axis=0),
                            (pc < observed_pc).mean(axis=0), observed_fa, ref_fa, fa.mean(axis=0),
                            (fa < observed_fa).mean(axis=0), _leading(observed_pc, ref_pc), _leading(observed_fa, ref_fa),
                            ParallelReference.SHUFFLED if shuffled else ParallelReference.NORMAL)


def average_partial(R: np.ndarray) -> AveragePartial:
    """The minimum average partial test and its revised form (module docstring)."""
    p = len(R)
    values, vectors = np.linalg.eigh(R)
    A = vectors[:, ::-1] * np.sqrt(np.clip(values[::-1], 0.0, None))
    off = ~np.eye(p, dtype=bool)
    squared, fourth = np.empty(p - 1), np.empty(p - 1)
    C = R.copy()
    for m in range(p - 1):
        if m:
            C -= np.outer(A[:, m - 1], A[:, m - 1])
        d = 1.0 / np.sqrt(np.diag(C))
        partial2 = (C * np.outer(d, d))[off] ** 2
        squared[m] = partial2.mean()
        fourth[m] = (partial2 * partial2).mean()
    return AveragePartial(squared, fourth, int(np.argmin(squared)), int(np.argmin(fourth)))


def fit_sequence(data: CorrelationInput, largest: int) -> tuple[FitStep, ...]:
    """Maximum-likelihood solutions with 1 .. ``largest`` factors (fewer when the degrees of freedom run out)."""
    top = min(largest, largest_factor_count(data.p))
    steps = []
    for m in range(1, top + 1):
        try:
            steps.append(FitStep(m, extract(data, m, ExtractionMethod.MAXIMUM_LIKELIHOOD)))
        except EstimationError:
            break
    return tuple(steps)


def count_factors(data: CorrelationInput, replications: int = 100, seed: int = 0) -> FactorCount:
    """Every rule's count and the recommendation (module docstring)."""
    parallel = parallel_analysis(data, replications, seed)
    partial = average_partial(data.correlations)
    combined = (CountRule.PARALLEL_COMPONENTS, CountRule.PARALLEL_FACTORS, CountRule.AVERAGE_PARTIAL)
    counts = {CountRule.PARALLEL_COMPONENTS: parallel.components, CountRule.PARALLEL_FACTORS: parallel.factors,
              CountRule.AVERAGE_PARTIAL: partial.components,
              CountRule.AVERAGE_PARTIAL_REVISED: partial.components_revised}
    median = int(np.median([counts[r] for r in combined]))
    recommended = max(1, median)
    fits = fit_sequence(data, max(max(counts.values()), recommended) + 2)
    proper = [f for f in fits if f.solution.fit.df > 0]
    if data.kind is CorrelationKind.PEARSON and proper:
        counts[CountRule.LOWEST_BIC] = min(proper, key=lambda f: f.solution.fit.bic).factors
    else:
        counts[CountRule.LOWEST_BIC] = None
    close = [f.factors for f in proper if f.solution.fit.rmsea <= CLOSE_RMSEA]
    counts[CountRule.CLOSE_FIT] = close[0] if close else None
    notes = []
    if len({v for v in counts.values() if v is not None}) > 1:
        notes.append(CountNote.RULES_DISAGREE)
    nxt = recommended  # position of the first factor not kept (0-based)
    if nxt < data.p:
        if (parallel.component_eigenvalues[nxt] > parallel.component_reference[nxt]
                or parallel.factor_eigenvalues[nxt] > parallel.factor_reference[nxt]):
            notes.append(CountNote.NEXT_EIGENVALUE_ABOVE_CHANCE)  # one series counts another factor
        elif (parallel.component_eigenvalues[nxt] > parallel.component_reference_mean[nxt]
              or parallel.factor_eigenvalues[nxt] > parallel.factor_reference_mean[nxt]):
            notes.append(CountNote.NEXT_EIGENVALUE_BORDERLINE)
    if median == 0:
        notes.append(CountNote.NO_FACTOR_ABOVE_CHANCE)
    at = next((f for f in fits if f.factors == recommended), None)
    if at is not None:
        if at.solution.fit.df > 0 and at.solution.fit.rmsea > POOR_RMSEA:
            notes.append(CountNote.POOR_FIT_AT_RECOMMENDED)
        if at.improper:
            notes.append(CountNote.IMPROPER_AT_RECOMMENDED)
    order = combined + (CountRule.AVERAGE_PARTIAL_REVISED, CountRule.LOWEST_BIC, CountRule.CLOSE_FIT)
    return FactorCount(recommended, tuple(CountSuggestion(r, counts[r]) for r in order), combined, tuple(notes),
                       parallel, partial, fits)
