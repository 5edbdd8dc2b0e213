"""Ordinal items in the workflows that refit many samples: the bootstrap, model-specific cutoffs and Monte
Carlo power.

Every sample, a bootstrap resample of the rows or a sample simulated from a population, gets its own
thresholds and polychoric correlations (two-step, Olsson 1979; :mod:`cfa_tool.data.polychoric`) and is refitted
by the fit's own least-squares estimator with its robust standard errors and scale-shifted adjusted test
(:func:`cfa_tool.pipeline.ordinal.fit_ordinal`).  Simulated ordinal answers are latent responses drawn from the
model-implied correlation matrix and cut at the thresholds (the latent-response formulation; Muthén 1984).
A sample whose answers cannot be analysed (an item left with one category; its correlations not positive
definite) is counted as failed, apart from the fits that did not converge.  A sample that lacks an answer category
(a bootstrap resample that drew no row giving a rare answer, a simulated sample that no latent response cut into
it) is fitted with the categories it holds, as any data set is, and kept: its correlations, loadings and fit
indices are those of the same latent responses cut more coarsely.  Its thresholds are each placed by the categories
below it (the threshold between answers c and c' is the one above the highest answer it holds up to c), so a
lacked category between others leaves the thresholds on its two sides one value, the boundary of the categories
it merged; only a threshold with no answer on one side (every category below it, or above it, lacked) has no
value in that sample (minus or plus infinity), and it is returned as NaN with the side it lacked
(:class:`Refit` ``lacked``), never dropped with the sample (bootstrap rule of session 23); a sample
whose answers could be analysed but whose fit could not start (a fixed covariance beyond the variances its
start gives, ImpossibleAtStart) or ended without an estimate (not identified, or a Heywood case without bound)
counts with those that did not converge, as the shared refit of continuous items counts a start it cannot make
(pipeline.continuous.replicate_fits), never as answers that could not be analysed; none is dropped silently.
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import Enum

import numpy as np
import pandas as pd

from cfa_tool.assessment.admissibility import inadmissible_words
from cfa_tool.assessment.reliability_intervals import keyed_values
from cfa_tool.data.polychoric import ordinal_moments
from cfa_tool.errors import CfaError
from cfa_tool.method import MissingData, Weighting
from cfa_tool.numerics.threads import blas_threads_for
from cfa_tool.pipeline.continuous import FitOptions
from cfa_tool.pipeline.ordinal import fit_ordinal
from cfa_tool.pipeline.results import FitResult
from cfa_tool.workflows.simulation import cut_at_thresholds, simulate_rows

#: refits keep estimates, standard errors and the test; reliability, diagnostics and score tests are not needed
REFIT_OPTIONS = FitOptions(diagnostics=False, modification_indices=False)


class Outcome(Enum):
    """What became of one sample (module docstring): fitted, its fit without an estimate, or its answers not
    analysable (thresholds and correlations)."""

    CONVERGED = "converged"
    NOT_CONVERGED = "did not converge"
    FAILED = "could not be analysed"


Key = tuple[str, tuple[str, ...]]  # (kind, variables) of an estimate row


@dataclass(frozen=True)
class OrdinalFitting:
    """How each sample is fitted: the model, the items (and which are continuous), the least-squares weighting,
    whether rows with gaps are kept (pairwise present rows), and the data's answer categories, by which a bootstrap
    resample's thresholds are placed and what it lacks is named (None for simulated samples, whose thresholds are
    not compared with the data's).  Every sample is fitted with the categories it holds (module docstring)."""

    spec: object
    names: tuple[str, ...]
    continuous: frozenset
    weighting: Weighting
    pairwise: bool = False
    levels: dict | None = None

    @classmethod
    def of_fit(cls, spec, result: FitResult, keep_levels: bool) -> "OrdinalFitting":
        """The fitting of an earlier one-group ordinal fit ``result`` of ``spec``."""
        ordinal = {x: tuple(v for v, _ in cats) for x, cats in zip(result.observed, result.data.categories) if cats}
        return cls(spec, tuple(result.observed), frozenset(x for x in result.observed if x not in ordinal),
                   result.method.weighting, result.method.missing is MissingData.PAIRWISE,
                   ordinal if keep_levels else None)

    def fit(self, rows: np.ndarray) -> FitResult | Outcome:
        """The least-squares fit of ``rows`` (columns in ``names`` order); :attr:`Outcome.FAILED` when the answers
        cannot be analysed, :attr:`Outcome.NOT_CONVERGED` when their fit could not start or ended without an
        estimate (module docstring)."""
        frame = pd.DataFrame(rows, columns=list(self.names))
        with blas_threads_for(len(self.names)):
            try:
                moments = ordinal_moments(frame, self.names, "<sample>", self.continuous, pairwise=self.pairwise)
            except CfaError:
                return Outcome.FAILED
            try:
                return fit_ordinal(self.spec, moments, REFIT_OPTIONS, self.weighting)
            except CfaError:  # ImpossibleAtStart, NotIdentified, UnboundedSolution: the answers were analysed
                return Outcome.NOT_CONVERGED


@dataclass(frozen=True)
class Refit:
    """What a worker sends back about one sample: its outcome, the estimate, standardized value and standard error
    of each asked-for estimate row, and the fit's adjusted indices and p-value."""

    outcome: Outcome
    values: np.ndarray
    standardized: np.ndarray
    se: np.ndarray
    #: the answer categories of the data (the fit's) that this sample lacks, as (item, category) pairs
    lost: tuple[tuple[str, float], ...] = ()
    #: per asked-for estimate row, -1 for a threshold with no answer below it in this sample, 1 for one with none
    #: above it (its value NaN), 0 otherwise; empty when nothing was lacked
    lacked: tuple[int, ...] = ()
    cfi: float = float("nan")
    rmsea: float = float("nan")
    srmr: float = float("nan")
    p_value: float = float("nan")
    #: why the refit's solution is not admissible, as the fit judged itself (its inadmissible problems in the words
    #: of assessment.admissibility.replicated_problem_words; empty: admissible)
    problems: tuple[str, ...] = ()
    #: the refit's reliability coefficients with the items reversed in each factor's keyed sum, read from its own
    #: reliability rows (assessment.reliability_intervals.keyed_values), for the bootstrap's intervals of them
    reliability: tuple = ()

    @property
    def converged(self) -> bool:
        return self.outcome is Outcome.CONVERGED


def lost_categories(result: FitResult, levels: dict[str, tuple[float, ...]]) -> tuple[tuple[str, float], ...]:
    """The categories ``levels`` (item -> the data's answer categories) that the sample fitted in ``result`` lacks,
    as (item, category) pairs in the items' order."""
    held = dict(zip(result.observed, result.data.categories))
    return tuple((item, float(v)) for item, cats in levels.items()
                 for v in cats if v not in {c for c, _ in held.get(item, ())})


def threshold_place(item_levels: tuple[float, ...], held: tuple[float, ...], step: int) -> tuple[int, int]:
    """Where threshold ``step`` (1-based: between the data's answers ``item_levels[step - 1]`` and
    ``item_levels[step]``) lies among the thresholds of a sample holding the answers ``held`` (sorted): (its step
    there, 0) when the sample holds answers on both of its sides, the threshold above the highest answer it holds
    up to ``item_levels[step - 1]``; (0, -1) when it holds none below it, (0, 1) when none above it (no value: the
    proportion below it is 0 or 1)."""
    below = int(np.searchsorted(np.asarray(held, dtype=float), item_levels[step - 1], side="right"))
    if below == 0:
        return 0, -1
    if below == len(held):
        return 0, 1
    return below, 0


def _refit(result: FitResult | Outcome, keys: tuple[Key, ...], levels: dict | None = None) -> Refit:
    """What a worker sends back of one sample's fit ``result``; ``levels``: the answer categories of the data (a
    bootstrap resample) or of the population (a simulated sample, answers 1..k), by which what the sample lacks is
    named and its asked-for thresholds are placed (:func:`threshold_place`)."""
    nan = np.full(len(keys), np.nan)
    if isinstance(result, Outcome):
        return Refit(result, nan, nan, nan)
    if not result.converged or result.fit is None or result.robust is None:
        return Refit(Outcome.NOT_CONVERGED, nan, nan, nan)
    rows = {(r.kind, r.variables): r for r in result.estimates}
    lost = lost_categories(result, levels) if levels is not None else ()
    lacked = [0] * len(keys)
    if lost:
        held = {x: tuple(c for c, _ in cats) for x, cats in zip(result.observed, result.data.categories)}
        found = []
        for k, (kind, variables) in enumerate(keys):
            if kind == "threshold" and variables[0] in levels:
                step, lacked[k] = threshold_place(levels[variables[0]], held[variables[0]], int(variables[1]))
                found.append(rows.get((kind, (variables[0], str(step)))) if not lacked[k] else None)
            else:
                found.append(rows.get((kind, variables)))
    else:
        found = [rows.get(k) for k in keys]
    if any(r is None and not side for r, side in zip(found, lacked)):  # an item with fewer categories than the
        # population's (a simulated sample, whose thresholds are not asked for by place): no such threshold
        return Refit(Outcome.FAILED, nan, nan, nan)

    def of(name: str) -> np.ndarray:
        return np.array([np.nan if r is None else getattr(r, name) for r in found])

    return Refit(Outcome.CONVERGED, of("estimate"), of("standardized"), of("se"), lost,
                 tuple(lacked) if any(lacked) else (), result.robust.cfi_robust, result.robust.rmsea_robust,
                 result.fit.srmr, result.robust.p_value_scaled,
                 inadmissible_words(result.problems),
                 keyed_values(result.groups[0].reliability) if result.groups else ())


@dataclass(frozen=True)
class LackedCategory:
    """An answer category of an ordinal item that some converged samples lacked (none of their rows gave it): those
    samples were fitted with the categories they held and kept (module docstring)."""
    item: str
    category: float
    samples: int

    def to_dict(self) -> dict:
        return {"item": self.item, "category": self.category, "samples": self.samples}


def lacked_categories(refits, observed: tuple[str, ...]) -> tuple[int, tuple[LackedCategory, ...]]:
    """How many of the converged ``refits`` lacked some answer category, and each category lacked (in the order of
    the items ``observed`` and of their answers) with how many lacked it: which item lost which category, sample by
    sample, counted."""
    lost: dict[tuple[str, float], int] = {}
    lacking = 0
    for refit in refits:
        if refit.converged and refit.lost:
            lacking += 1
            for pair in refit.lost:
                lost[pair] = lost.get(pair, 0) + 1
    order = {x: k for k, x in enumerate(observed)}
    return lacking, tuple(LackedCategory(x, v, n) for (x, v), n in sorted(lost.items(),
                                                                      key=lambda kv: (order[kv[0][0]], kv[0][1])))


def resample(task) -> Refit:
    """One bootstrap resample: rows drawn with replacement, thresholds and correlations recomputed, refitted."""
    fitting, rows, seed, keys = task
    rng = np.random.default_rng(seed)
    return _refit(fitting.fit(rows[rng.integers(0, len(rows), len(rows))]), keys, fitting.levels)


def simulated_fit(task) -> Refit:
    """One simulated sample of ``n`` rows: latent responses from ``sigma``, ordinal items cut at ``thresholds``."""
    fitting, sigma, thresholds, n, seed, keys = task
    latent = simulate_rows(sigma, n, np.random.default_rng(seed))
    # the answers 1..k the thresholds cut (simulation.cut_at_thresholds), by which a sample's lacked ones are named
    answers = {x: tuple(float(c) for c in range(1, len(t) + 2)) for x, t in thresholds.items()}
    return _refit(fitting.fit(cut_at_thresholds(latent, sigma, fitting.names, thresholds)), keys, answers)


def analysed_rows(fitting: OrdinalFitting, values: np.ndarray) -> np.ndarray:
    """The rows the fit analysed: those with any answer (pairwise present rows) or the complete ones (listwise)."""
    answered = ~np.isnan(values)
    return values[answered.any(axis=1) if fitting.pairwise else answered.all(axis=1)]


def fit_thresholds(result: FitResult) -> dict[str, np.ndarray]:
    """Each ordinal item's thresholds in a one-group ordinal fit (its first-step estimates)."""
    out: dict[str, list[float]] = {}
    for row in result.estimates:
        if row.kind == "threshold":
            out.setdefault(row.variables[0], []).append(row.estimate)
    return {x: np.asarray(t, dtype=float) for x, t in out.items()}
