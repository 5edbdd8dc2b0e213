"""Model-specific fit-index cutoffs by simulation, in the manner of McNeish & Wolf's
dynamic fit indices (2023).

Two populations share the fitted model's estimates: one is the model itself;
the other adds a misspecification of known size that the model leaves out --
for models with two or more factors, a cross-loading (standardized size equal
to the model's smallest standardized loading, on the item whose own loading is
smallest, towards the factor most correlated with its own); for one-factor
models, a residual correlation of .30 between the first two items.  Samples of
the user's size are drawn from each and fitted with the user's model.  A
cutoff separates the two at 95% when 95% of misspecified samples are beyond it
and 95% of correct samples are not (likewise at 90%).  The choice of
misspecification is this tool's reading of the method, and the cutoffs hold
for that misspecification only.

With gaps in the data (a full-information fit) the missing-data pattern is carried over: each simulated
sample takes, row by row, the gaps of a row drawn at random from the data's rows (the observed patterns
resampled, so missing completely at random with the data's pattern frequencies), and is fitted by
full-information ML as the data were; the report says so.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from functools import partial
from pathlib import Path

import numpy as np
import pandas as pd

from cfa_tool import options as check
from cfa_tool.model.parameters import one_group_only
from cfa_tool.numerics.linalg import log_det_pd
from cfa_tool.numerics.plain import journal_decimal
from cfa_tool.data.moments import sample_moments
from cfa_tool.errors import DataError, EstimationError, OptionError
from cfa_tool.method import MissingData
from cfa_tool.assessment.admissibility import counted_problems, refuse_inadmissible_fit, replicated_problems
from cfa_tool.pipeline.continuous import FitOptions, fit_moments, model_structure, moments_from_rows, replicate_fits
from cfa_tool.pipeline.inputs import (_fit_rows, converged, keeps_rows_with_gaps, odd_values_named, ordinal_model, read_inputs_with_notes,
                                      refit_missing_handling, with_odd_values, rows_named)
from cfa_tool.language.spec import Spec
from cfa_tool.model.implied import StructuredModel
from cfa_tool.model.parameters import build_parameter_table
from cfa_tool.pipeline.results import FitResult, clean
from cfa_tool.views import Presentable
from cfa_tool.workflows.parallel import REFITS_TOGETHER, refits_together, run_tasks
from cfa_tool.workflows.simulation import simulate_rows

LEVELS = (0.95, 0.90)
INDICES = ("cfi", "rmsea", "srmr")


@dataclass(frozen=True)
class Cutoff:
    """One fit index's simulated cutoff at one level."""
    index: str
    level: float
    cutoff: float | None  # None: the distributions overlap too much at this level
    observed: float
    beyond: bool | None  # the observed value is on the misspecified side of the cutoff
    # where no cutoff exists at this N: the smallest simulated N at which one does, and the smallest
    # simulated multiple of the misspecification that would give one at this N (None: not within the search)
    separating_n: int | None = None
    separating_size: float | None = None

    def to_dict(self) -> dict:
        return clean(dict(self.__dict__))


@dataclass(frozen=True, eq=False)
class CutoffResult(Presentable):
    """A fit and the fit-index cutoffs simulated for its model and sample size."""

    fit: FitResult
    misspecification: str
    replications: int
    converged_correct: int
    converged_misspecified: int
    seed: int
    n_obs: int
    cutoffs: tuple[Cutoff, ...]
    misspecification_size: float = float("nan")  # standardized size of what is left out
    #: ordinal items: share of the samples from the fitted model that its adjusted test rejected at .05
    correct_rejected: float | None = None
    #: rows with gaps: how many data rows' missing-data patterns the simulated samples took their gaps from
    #: (None: complete rows were simulated)
    pattern_rows: int | None = None
    #: converged samples whose solution is not admissible as a single fit would judge it, of the fitted model and of
    #: the misspecified one: (count, their problems named with their counts) each (assessment.admissibility.
    #: counted_problems); they stay in the distributions the cutoffs come from
    inadmissible: tuple[tuple[int, str], tuple[int, str]] = ((0, ""), (0, ""))
    #: converged samples of the fitted model and of the misspecified one whose CFI has no value (both noncentralities
    #: at most 0, so CFI is 0/0: the baseline model fits the sample no worse than the model): the CFI cutoffs come
    #: from the other samples, and the report says how many were left out (a CFI of 0/0 is no value to rank)
    without_cfi: tuple[int, int] = (0, 0)
    #: ordinal items: converged samples of the fitted model and of the misspecified one that lacked an answer category
    #: (fitted with the categories they held and kept: workflows.ordinal_resampling), and the categories the fitted
    #: model's samples lacked with their counts (ordinal_resampling.LackedCategory)
    lacking: tuple[int, int] = (0, 0)
    lacked: tuple = ()

    @property
    def statistic(self) -> str:
        """Which statistic the CFI and RMSEA come from (of the fit and of every simulated sample alike)."""
        return self.fit.robust.test.label if self.fit.method.ordinal else "the maximum-likelihood chi-square"

    def to_dict(self) -> dict:
        """The fit and, under "result", the cutoffs."""
        return {"fit": self.fit.to_dict(), "result": clean({
            "misspecification": self.misspecification, "replications": self.replications,
            "converged_correct": self.converged_correct, "converged_misspecified": self.converged_misspecified,
            "seed": self.seed, "n_obs": self.n_obs, "misspecification_size": self.misspecification_size,
            "indices_from": self.statistic, "correct_model_rejected": self.correct_rejected,
            "missing_data_patterns_from_rows": self.pattern_rows,
            "inadmissible_correct": self.inadmissible[0][0], "inadmissible_misspecified": self.inadmissible[1][0],
            "inadmissible_problems_correct": self.inadmissible[0][1],
            "inadmissible_problems_misspecified": self.inadmissible[1][1],
            "cfi_not_defined_correct": self.without_cfi[0], "cfi_not_defined_misspecified": self.without_cfi[1],
            **({"lacking_a_category_correct": self.lacking[0], "lacking_a_category_misspecified": self.lacking[1],
                "categories_lacked_correct": [c.to_dict() for c in self.lacked]} if any(self.lacking) else {}),
            "cutoffs": [c.to_dict() for c in self.cutoffs]})}


def _replicate(tasks: list) -> list:
    """(converged, CFI, RMSEA, SRMR, free parameters) of each task's simulated data set, fitted together; with the data's
    missing-data patterns (an (R, p) mask of answered items, or None), each sample takes the gaps of rows drawn
    from them and is fitted by full-information ML (a sample whose saturated model cannot be estimated counts as
    not converged)."""
    spec, _, names, _, _, start, patterns, mean = tasks[0]
    if patterns is None:
        samples = [moments_from_rows(simulate_rows(sigma, n, np.random.default_rng(seed)), names)
                   for _, sigma, _, n, seed, _, _, _ in tasks]
        return [(fit.converged, fit.cfi, fit.rmsea, fit.srmr, fit.theta) for fit in replicate_fits(spec, samples, start)]
    out = []
    for _, sigma, _, n, seed, _, _, _ in tasks:
        rng = np.random.default_rng(seed)
        rows = carried_gaps(simulate_rows(sigma, n, rng, mean), patterns, rng)
        try:
            sample = moments_from_rows(rows, names, full_information=True)
        except (DataError, EstimationError):  # an item or a pair of items without enough answers
            out.append((False, np.nan, np.nan, np.nan, None))
            continue
        [fit] = replicate_fits(spec, [sample], start, full_information=True)
        out.append((fit.converged, fit.cfi, fit.rmsea, fit.srmr, fit.theta))
    return out


def carried_gaps(rows: np.ndarray, patterns: np.ndarray, rng: np.random.Generator) -> np.ndarray:
    """``rows`` (complete, simulated) with the gaps of data rows drawn at random with replacement: row i takes
    the missing-data pattern of a random row of ``patterns`` (rows x items, True where answered)."""
    out = rows.copy()
    out[~patterns[rng.integers(0, len(patterns), len(rows))]] = np.nan
    return out


N_STEPS = (2, 4, 8, 16)  # multiples of N tried when no cutoff exists at the data's N
SIZE_STEPS = (1.5, 2.0, 3.0)  # multiples of the misspecification tried at the data's N


def misspecified_covariance(spec: Spec, result: FitResult, scale: float = 1.0,
                            matrices=None) -> tuple[np.ndarray, str, float]:
    """The misspecified population's covariance, what is left out, and its standardized size; ``matrices``: the
    fitted model's matrices when they are not those of ``spec`` at ``result.theta`` (ordinal items)."""
    if matrices is None:
        means = result.method.missing is MissingData.FULL_INFORMATION  # its theta holds the items' intercepts
        matrices = StructuredModel(build_parameter_table(spec, mean_structure=means)).matrices(result.theta)
    mats = matrices
    L = mats.L.copy()
    T = mats.T.copy()
    phi = mats.latent_covariance()
    sigma = mats.implied_covariance()
    sd_obs, sd_lat = np.sqrt(np.diag(sigma)), np.sqrt(np.diag(phi))
    std = L * sd_lat[None, :] / sd_obs[:, None]
    first_order = [j for j in range(L.shape[1]) if np.any(L[:, j] != 0)]
    names, factors = result.observed, result.latent
    if len(first_order) >= 2:
        primary = np.abs(std[:, first_order]).max(axis=1)
        own = [first_order[int(np.argmax(np.abs(std[i, first_order])))] for i in range(len(names))]
        size = float(primary.min())
        item = int(np.argmin(primary))
        corr = phi / np.outer(sd_lat, sd_lat)
        others = [j for j in first_order if j != own[item] and L[item, j] == 0]
        if not others:
            raise OptionError("every item already loads on every factor; there is no cross-loading to leave out")
        target = max(others, key=lambda j: abs(corr[own[item], j]))
        size *= scale
        L[item, target] = size * sd_obs[item] / sd_lat[target]
        what = f"a cross-loading of {journal_decimal(size, digits=2)} (standardized) of {names[item]} on {factors[target]}"
    else:
        if len(names) < 2:
            raise OptionError("a model with one item has nothing to misspecify")
        r = size = min(0.30 * scale, 0.95)
        T[0, 1] = T[1, 0] = r * np.sqrt(T[0, 0] * T[1, 1])
        what = f"a residual correlation of {journal_decimal(r, digits=2)} between {names[0]} and {names[1]}"
    G = L @ mats.A
    wrong = G @ mats.P @ G.T + T
    if log_det_pd(wrong) is None:  # not positive definite, or not finite
        raise ValueError("not positive definite")
    return wrong, what, size


def cutoff_options(replications: int, seed: int, workers: int | None, scheduler: str | None = None) -> tuple[int, int]:
    """The options checked (at least 20 samples per population; local workers not beside a scheduler)."""
    check.workers(workers, scheduler)
    return check.replications(replications, minimum=20), check.seed(seed)


def fit_cutoffs(spec: Spec, result: FitResult, replications: int = 200, seed: int = 1, workers: int | None = None,
                scheduler: str | None = None, progress=None, patterns: np.ndarray | None = None) -> CutoffResult:
    """The cutoffs of a converged single-group fit; ``patterns``: for a full-information fit, the (rows, items)
    mask of the answers of the data's rows (in the order of ``result.observed``), whose gaps the simulated
    samples take."""
    if result.multigroup or not result.converged or result.fit is None:
        raise OptionError("model-specific cutoffs need a converged single-group fit")
    if result.fit.df == 0:  # it reproduces any data: every sample's CFI is 1 and its SRMR 0, misspecified or not
        raise OptionError(f"{spec.source}: the model has no degrees of freedom (as many free parameters as "
                          f"statistics), so it reproduces any data and has no fit to judge: no sample size or cutoff "
                          f"can tell it from a misspecified one; cutoffs apply to a model with degrees of freedom")
    # the samples are drawn from the fitted model: an impossible solution is no population (the rule of
    # power-simulation and simulate for a saved fit, in the same words)
    refuse_inadmissible_fit(result.problems, f"{spec.source} fitted to {result.data.source}",
                            "it cannot serve as a population",
                            remedy="simulate its cutoffs")
    replications, seed = cutoff_options(replications, seed, workers, scheduler)
    n = result.n_obs
    seeds = np.random.SeedSequence(seed)
    if result.method.ordinal:
        misspecify = partial(_latent_response_misspecified, spec, result)
        sample = _ordinal_sampler(spec, result, replications, seeds, workers, scheduler, progress)
        observed = {"cfi": result.robust.cfi_robust, "rmsea": result.robust.rmsea_robust, "srmr": result.fit.srmr}
    else:
        full_information = result.method.missing is MissingData.FULL_INFORMATION
        if full_information != (patterns is not None):
            raise OptionError("the cutoffs of a full-information fit carry the data's missing-data patterns over, so "
                              "they need them (patterns: the rows' answered items), and only such a fit takes them; "
                              "cutoffs(model, data) finds them")
        misspecify = partial(misspecified_covariance, spec, result)
        sample = _sampler(spec, result, replications, seeds, workers, scheduler, progress, patterns)
        observed = {"cfi": result.fit.cfi, "rmsea": result.fit.rmsea, "srmr": result.fit.srmr}
    wrong, what, size = misspecify()
    (correct, judged_correct, lacked_correct), (mis, judged_mis, lacked_mis) = (sample(result.implied_covariance, n, True),
                                                                                sample(wrong, n, True))
    if len(correct) < 10 or len(mis) < 10:
        raise OptionError("too few simulated fits converged to set cutoffs")
    found = _cutoffs(correct, mis)
    # where no cutoff exists, find (by simulating, not by formula) the N, or the size of the
    # misspecification, at which one would: the researcher learns what these data can detect
    separating_n: dict[tuple[str, float], int] = {}
    separating_size: dict[tuple[str, float], float] = {}
    for multiple in N_STEPS:
        if all(key in separating_n or cut is not None for key, cut in found.items()):
            break
        bigger = multiple * n
        more = _cutoffs(sample(result.implied_covariance, bigger)[0], sample(wrong, bigger)[0])
        for key, cut in more.items():
            if found[key] is None and cut is not None:
                separating_n.setdefault(key, bigger)
    for multiple in SIZE_STEPS:
        if all(key in separating_size or cut is not None for key, cut in found.items()):
            break
        try:
            stronger, _, _ = misspecify(multiple)
        except ValueError:  # the stronger misspecification is not a possible population
            break
        more = _cutoffs(correct, sample(stronger, n)[0])
        for key, cut in more.items():
            if found[key] is None and cut is not None:
                separating_size.setdefault(key, multiple * size)
    cutoffs = []
    for (index, level), cut in found.items():
        beyond = None
        if cut is not None and np.isfinite(observed[index]):  # a CFI of 0/0 lies on neither side
            beyond = bool(observed[index] < cut) if index == "cfi" else bool(observed[index] > cut)
        cutoffs.append(Cutoff(index, level, cut, float(observed[index]), beyond,
                              separating_n.get((index, level)), separating_size.get((index, level))))
    # ordinal items: the share of correct samples the fit's adjusted test rejects at .05 (its nominal rate)
    rejected = float(np.mean(correct[:, len(INDICES)] < 0.05)) if correct.shape[1] > len(INDICES) else None
    return CutoffResult(fit=result, misspecification=what, replications=replications, converged_correct=len(correct),
                        converged_misspecified=len(mis), seed=seed, n_obs=n, cutoffs=tuple(cutoffs),
                        misspecification_size=size, correct_rejected=rejected,
                        pattern_rows=len(patterns) if patterns is not None else None,
                        inadmissible=(counted_problems(judged_correct), counted_problems(judged_mis)),
                        without_cfi=(_without(correct, "cfi"), _without(mis, "cfi")),
                        lacking=(lacked_correct[0], lacked_mis[0]), lacked=lacked_correct[1])


def _without(draws: np.ndarray, index: str) -> int:
    """How many of the simulated samples ``draws`` (rows: the :data:`INDICES` of each) have no value of ``index``."""
    return int(np.sum(~np.isfinite(draws[:, INDICES.index(index)])))


def _latent_response_misspecified(spec: Spec, result: FitResult, scale: float = 1.0) -> tuple[np.ndarray, str, float]:
    """The misspecified population of an ordinal fit, as a correlation matrix of latent responses: the fitted
    matrices with each latent response's residual variance making its variance 1, the misspecification added,
    and the responses standardized again, so that cut at the fitted thresholds every item keeps its answer
    proportions and only the correlations carry the misspecification."""
    from cfa_tool.pipeline.ordinal import ordinal_spec, unit_variance_matrices

    model = StructuredModel(build_parameter_table(ordinal_spec(spec)[0]))
    wrong, what, size = misspecified_covariance(spec, result, scale, unit_variance_matrices(model.matrices(result.theta)))
    sd = np.sqrt(np.diag(wrong))
    return wrong / np.outer(sd, sd), what, size


def _ordinal_sampler(spec: Spec, result: FitResult, replications: int, seeds: np.random.SeedSequence, workers,
                     scheduler, progress):
    """As :func:`_sampler` for a fit of ordinal items: latent responses cut at the fitted thresholds, each sample
    fitted by the fit's least squares; per converged sample its adjusted CFI and RMSEA, its SRMR and the adjusted
    test's p-value (the same statistics the fit reports); and how many lacked an answer category, with the categories
    lacked (ordinal_resampling.lacked_categories: those samples are kept, as the bootstrap keeps its resamples)."""
    from cfa_tool.workflows.ordinal_resampling import OrdinalFitting, fit_thresholds, lacked_categories, simulated_fit

    fitting = OrdinalFitting.of_fit(spec, result, keep_levels=False)
    thresholds = fit_thresholds(result)

    def sample(sigma: np.ndarray, n: int, judge: bool = False) -> np.ndarray:
        # ``judge`` as for _sampler's: here each sample's fit judges itself in its worker, at no extra cost
        states = seeds.spawn(1)[0].generate_state(replications)
        tasks = [(fitting, sigma, thresholds, n, int(s), ()) for s in states]
        draws = [d for d in run_tasks(simulated_fit, tasks, workers, scheduler, progress) if d.converged]
        return (np.array([(d.cfi, d.rmsea, d.srmr, d.p_value) for d in draws]).reshape(-1, len(INDICES) + 1),
                [d.problems for d in draws],  # as each sample's fit judged itself
                lacked_categories(draws, fitting.names))

    return sample


def _sampler(spec: Spec, result: FitResult, replications: int, seeds: np.random.SeedSequence, workers, scheduler, progress,
             patterns: np.ndarray | None = None):
    """A function (population covariance, N) -> the fit indices of the converged simulated samples, and why each
    of them is not admissible (assessment.admissibility.replicated_problems; empty: admissible);
    each call draws fresh seeds from the one seed sequence, so the whole run repeats exactly.  With
    ``patterns`` the samples take the data's gaps (see :func:`_replicate`), centred at the fitted means."""
    mean = result.groups[0].implied_mean if patterns is not None else None
    table, model = model_structure(spec, None, patterns is not None)

    def sample(sigma: np.ndarray, n: int, judge: bool = False) -> tuple[np.ndarray, tuple[tuple[str, ...], ...], tuple]:
        """``judge``: also say why each sample is not admissible (only the samples the report counts: () else); the
        third element, the samples lacking an answer category, has none (continuous items)."""
        states = seeds.spawn(1)[0].generate_state(replications)
        tasks = [(spec, sigma, result.observed, n, int(s), result.theta, patterns, mean) for s in states]
        draws = [d for d in run_tasks(_replicate, tasks, workers, scheduler, progress,
                                      refits_together(REFITS_TOGETHER, len(result.theta)), batched=True) if d[0]]
        judged = replicated_problems(table, model, np.array([d[4] for d in draws])) if draws and judge else ()
        return np.array([d[1:4] for d in draws]).reshape(-1, len(INDICES)), judged, (0, ())

    return sample


def _cutoffs(correct: np.ndarray, mis: np.ndarray) -> dict[tuple[str, float], float | None]:
    """Each index's cutoff at each level, or None where the two distributions overlap too much: a cutoff
    exists when the level's share of misspecified samples lies beyond it and the same share of correct
    ones does not.  Each index's distributions hold the samples where it has a value (a CFI of 0/0 has none:
    :attr:`CutoffResult.without_cfi`), at least 10 of each model (one such sample had left the CFI's cutoffs
    unset, as if the distributions overlapped)."""
    out: dict[tuple[str, float], float | None] = {}
    for k, index in enumerate(INDICES):
        right, wrong = correct[:, k], mis[:, k]
        right, wrong = right[np.isfinite(right)], wrong[np.isfinite(wrong)]
        for level in LEVELS:
            if len(right) < 10 or len(wrong) < 10:
                out[(index, level)] = None
                continue
            if index == "cfi":  # misspecified samples have low CFI
                cut = float(np.quantile(wrong, level))
                ok = np.quantile(right, 1 - level) >= cut
            else:
                cut = float(np.quantile(wrong, 1 - level))
                ok = np.quantile(right, level) <= cut
            out[(index, level)] = cut if ok else None
    return out


def cutoffs(model: str | Path | Spec, data: pd.DataFrame | str | Path, replications: int = 200, seed: int = 1,
            workers: int | None = None, scheduler: str | None = None, progress=None, sheet: str | None = None, names_row: int | None = None, first_data_row: int | None = None,
            missing_codes: tuple[float, ...] = (), keep: tuple[str, ...] | list[str] = (), rename=None,
            ordinal: str | list[str] | None = None, ordinal_estimator: str | None = None, missing: str | None = None,
            id_column: str | None = None, max_iterations: int = check.ITERATION_LIMIT):
    """Fit the model, then simulate model-specific fit-index cutoffs: the result holds the fit (``.fit``) and the
    cutoffs.  Ordinal items (an 'ordinal' statement, or ``ordinal`` and ``ordinal_estimator`` as for ``fit``) are
    fitted by least squares, the samples are simulated as ordinal answers and fitted so, and the cutoffs are of
    the adjusted indices the fit reports.  ``id_column``: the column that names each row (never analysed), beside the row numbers of the cautions about
    rows, as for ``fit``; ``max_iterations``: the iteration limit of the fit to the data, as for ``fit`` (each
    simulated sample's fit starts from its estimates)."""
    from cfa_tool.data.matching import chosen_columns

    replications, seed = cutoff_options(replications, seed, workers, scheduler)
    spec, loaded, notes = read_inputs_with_notes(model, data, sheet, missing_codes, keep,
                                                 (id_column,) if isinstance(id_column, str) else (),
                                                 names_row=names_row, first_data_row=first_data_row, rename=rename,
                                                 chosen=chosen_columns(id_column=id_column),
                                                 keeps_gaps=keeps_rows_with_gaps(missing))
    frame, source = loaded.frame, loaded.source
    ids, named_by = rows_named(loaded, id_column, spec.observed_names)
    spec, ordinal_items = ordinal_model(spec, ordinal)  # the model as fit reads it, before it is checked
    one_group_only(spec, "the cutoffs are simulated for one group's model")
    if ordinal_items or ordinal_estimator is not None:
        with odd_values_named(loaded):  # values that look like no answers: named first when the fit fails
            # the rows as fit takes them: pairwise present rows by default, the complete rows with missing='listwise'
            # (given before, it was left unused), full-information ML refused as fit refuses it
            result = _fit_rows(spec, loaded, notes, None, None, FitOptions(missing=missing, max_iterations=max_iterations),
                               ordinal, ordinal_estimator)
        return fit_cutoffs(spec, with_odd_values(result, loaded, None, spec, None, ids, named_by), replications, seed,
                           workers, scheduler, progress)
    handling, missing_notes = refit_missing_handling(frame, spec.observed_names, missing)
    moments = sample_moments(frame, spec.observed_names, source, missing=handling)
    with odd_values_named(loaded):  # values that look like no answers: named first when the fit fails
        result = converged(fit_moments(spec, moments, FitOptions(missing=handling, max_iterations=max_iterations)))
    result = replace(result, warnings=tuple(missing_notes) + tuple(notes) + result.warnings)  # reading, filters
    patterns = None
    if handling is MissingData.FULL_INFORMATION:
        patterns = ~np.isnan(moments.rows[:, [moments.names.index(n) for n in result.observed]])
    return fit_cutoffs(spec, with_odd_values(result, loaded, None, spec, None, ids, named_by), replications, seed,
                       workers, scheduler, progress,
                       patterns)
