"""Does the structure hold in new data?  Calibrate on one sample, validate on another.

* loose replication: the same model refitted in the validation sample;
* the test of one solution in both samples: the two-sample model with every parameter of the covariance
  structure (loadings, error variances and covariances, factor variances and covariances) held equal across the
  samples, against the two samples fitted separately; the chi-square difference has q degrees of freedom, q the
  free parameters of the one-sample model's covariance structure (the likelihood-ratio test of equal covariance
  structures, Jöreskog 1971).  It replaces a check that fixed every parameter at its calibration estimate and
  tested the validation sample alone on p(p+1)/2 df: that check treats the calibration estimates as known, ignores
  their sampling error and rejects a true replication too often unless the calibration sample is much larger;
* the cross-validation index CVI = F(S_validation, Sigma_calibration) (Cudeck & Browne 1983), beside the CVI of
  the saturated model (Sigma = S_calibration) for scale; smaller is better.  It is descriptive: no test.
A split-half mode divides one data set at random (seeded) and runs both
directions (double cross-validation; Cudeck & Browne 1983).

The test of one solution with complete rows (normal-theory ML) needs no two-sample fit.  With the ML discrepancy
F(S, Sigma) = log|Sigma| + tr(S Sigma^-1) - log|S| - p (Jöreskog 1969) and the samples' covariance matrices S_g of
n_g rows (N = n_1 + n_2), the two-sample discrepancy with one Sigma for both is

    sum_g n_g F(S_g, Sigma) = sum_g n_g [log|Sigma| + tr(S_g Sigma^-1) - log|S_g| - p]
                            = N [log|Sigma| + tr(S_pooled Sigma^-1) - log|S_pooled| - p] + sum_g n_g (log|S_pooled| - log|S_g|)
                            = N F(S_pooled, Sigma) + sum_g n_g (log|S_pooled| - log|S_g|),

S_pooled = sum_g n_g S_g / N (tr is linear; add and subtract N log|S_pooled|).  The last sum does not depend on
Sigma, so the minimum over the model's Sigma is reached at the one-sample fit to S_pooled, Sigma_hat:
chi-square(equal) = N F(S_pooled, Sigma_hat) + sum_g n_g (log|S_pooled| - log|S_g|), on 2 p(p+1)/2 - q df; the
separate fits give chi-square(separate) = sum_g n_g F(S_g, Sigma_hat_g) on 2 (p(p+1)/2 - q) df; the difference is
on q df.  (The means are saturated in each sample, as the one-sample model leaves them.)

With a robust test asked for (``test='robust'``), the test of one solution is the scaled difference (Satorra &
Bentler 2001; their strictly positive version of 2010 when the 2001 correction is not positive) of the two samples
fitted together as two groups with and without the equalities, each with the robust test that suits its rows
(Satorra-Bentler for complete rows, Yuan-Bentler with full-information ML), as the invariance ladder compares its
steps: the likelihood-ratio difference assumes normal answers and rejects true replications of heavy-tailed ones
far too often.

Rows with gaps are kept as ``fit`` keeps them: a sample whose rows have gaps is fitted by full-information ML (its
saturated moments by EM, the answers assumed missing at random), and the test of one solution is the likelihood-
ratio difference of the two-sample full-information fit with every covariance-structure parameter held equal (the
intercepts free in each sample) and the two separate fits.  The cross-validation index of a validation sample with
gaps is its full-information discrepancy from the calibration covariance matrix, the means at their ML estimate
given that matrix (estimation.fiml.fixed_covariance_discrepancy), which without gaps is the discrepancy above; the
random halves are then halves of every row with an answer.  ``--incomplete-rows listwise`` uses the complete rows
instead.

Ordinal items (and continuous items beside them) are fitted as ``fit`` fits them: least squares on polychoric
(polyserial, Pearson) correlations, rows with gaps pairwise (the answers assumed missing completely at random).
The test of one solution is then the two-sample least-squares fit with the loadings, factor variances and
covariances and error covariances held equal (the thresholds free in each sample, so that the latent responses'
scales stay fixed in both, Wu & Estabrook 2016) against the two-sample fit without equalities, by the scale-shifted
adjusted difference (Asparouhov & Muthén 2006), as the invariance ladder compares its steps.  The cross-validation
index is the least-squares discrepancy of the validation sample's correlations from those the calibration
estimates imply, with the validation sample's weights (Cudeck & Browne 1983 define it for any discrepancy
function), beside that of the calibration sample's own correlations.  Every chi-square of such a replication is
the scale-shifted one.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from pathlib import Path

import numpy as np
import pandas as pd

from cfa_tool.numbers import count_text, counted, cut_list, user_number, word_list
from cfa_tool.data.halves import drawn_halves, few_clusters_words, half_phrase
from cfa_tool.model.parameters import one_group_only
from cfa_tool.pipeline.inputs import (_described, data_problems, few_category_notes, rows_named, keeps_rows_with_gaps, load_spec,
                                      make_options, odd_values_named, read_inputs_with_notes, refit_missing_handling, refuse_totals_rows,
                                      with_missing_reading)
from cfa_tool.assessment.admissibility import inadmissible_words
from cfa_tool.data.answer_words import coding_json, coding_record
from cfa_tool.data.matching import check_columns, chosen_columns
from cfa_tool.data.readers import sheet_of_each
from cfa_tool.data.kept_rows import row_of
from cfa_tool.data.groups import pooled
from cfa_tool.data.moments import SampleMoments, row_numbers, sample_moments
from cfa_tool import options as check
from cfa_tool.options import Option, own_keywords
from cfa_tool.errors import DataError, EstimationError, OptionError, estimation_of, printable
from cfa_tool.numerics.linalg import log_det_pd
from cfa_tool.numerics.threads import blas_threads_for
from cfa_tool.pipeline.continuous import (assess, estimate, fit_moments, full_information_instead, pairwise_instead,
                                          listwise_problem)
from cfa_tool.language.spec import Spec
from cfa_tool.method import DifferenceMethod, FitTest, MissingData, Weighting
from cfa_tool.note_parts import Text, joined
from cfa_tool.pipeline.results import FitResult, clean
from cfa_tool.views import Presentable
from cfa_tool.workflows.nesting import DifferenceTest, likelihood_ratio_difference, scaled_difference


@dataclass(frozen=True)
class SampleRows:
    """The rows of one sample: ``read`` from its data, ``analysed``, of those ``with_gaps`` (a missing answer on some
    model variable), ``left_out`` (the rest of those read: rows with gaps under listwise deletion, else rows answering
    none of the model's variables), and how rows with gaps were used (``missing``: full-information ML, pairwise
    present rows of ordinal items, or listwise deletion)."""

    read: int
    analysed: int
    with_gaps: int
    left_out: int
    missing: MissingData
    in_file: int | None = None  # the rows of the file before its row filters (None without a filter; set with the
    # files' filters, :func:`replicate`): ``read`` is then the rows the filters kept

    def to_dict(self) -> dict:
        return {"rows_read": self.read, "rows_analysed": self.analysed, "analysed_with_gaps": self.with_gaps,
                "rows_left_out": self.left_out, "rows_with_gaps_used_by": self.missing.value,
                "rows_in_file": self.in_file}


def sample_rows(moments, result: FitResult) -> SampleRows:
    """The :class:`SampleRows` of a sample's moments (SampleMoments: the analysed rows, gaps as NaN; OrdinalMoments:
    their answer codes, -1 for no answer) and the fit that used them."""
    codes = getattr(moments, "codes", None)
    if codes is not None:
        gaps = int((np.asarray(codes) < 0).any(axis=1).sum())
    else:
        gaps = int(np.isnan(moments.rows).any(axis=1).sum()) if moments.rows is not None else 0
    return SampleRows(moments.rows_read, moments.n_obs, gaps, moments.rows_read - moments.n_obs, result.method.missing)


@dataclass(frozen=True, eq=False)
class Replication(Presentable):
    """A model's fit in a calibration sample replicated in a validation sample."""
    calibration: str
    validation: str
    calibration_result: FitResult
    loose: FitResult
    #: the test of one solution in both samples (module docstring): the two-sample fit with every covariance-structure
    #: parameter held equal against the separate fits; its ``not_computed`` says why there is no p-value
    same_solution: DifferenceTest
    cvi: float
    cvi_saturated: float
    #: ordinal items: every chi-square is the scale-shifted adjusted one of the least-squares fit
    adjusted: bool = False
    #: values in the item columns of either data set that look like no answers (assessment.admissibility.Problem)
    data_problems: tuple = ()
    #: random halves of one file: which of its rows were split (None for two data sets)
    split: "SplitRows | None" = None
    #: what reading the data files did to them, as fit says it: the reader's notes and how the model's 'answers'
    #: statements coded answers recorded as words (data.answer_words), in the report's warnings and the JSON
    notes: tuple[str, ...] = ()
    #: the model's coding of answer words (data.answer_words.coding_record), as a fit's JSON keeps it
    answer_coding: tuple = ()
    #: the rows of the calibration and of the validation sample (SampleRows)
    rows: tuple = ()

    def to_dict(self) -> dict:
        """The JSON of ``replicate --json`` without its wrapper (tool, version, command, report): this
        replication as the one entry of ``replications`` (:meth:`Replications.to_dict`, the one builder)."""
        return Replications((self,)).to_dict()

    def entry(self) -> dict:
        """This replication's entry of ``replications`` in the JSON."""
        loose = self.loose.fit.to_dict() if self.loose.fit is not None else None

        def robust(result) -> dict | None:  # the adjusted figures the report shows for ordinal items
            return result.robust.to_dict() if self.adjusted and result.robust is not None else None

        return clean({
            "data_problems": [p.to_dict() for p in self.data_problems],
            "notes": [str(x) for x in self.notes],
            **({"answer_coding": coding_json(self.answer_coding)} if self.answer_coding else {}),
            "split": self.split.to_dict() if self.split is not None else None,
            "calibration": {"data": self.calibration, "n_obs": self.calibration_result.n_obs,
                            **({"rows": self.rows[0].to_dict()} if self.rows else {}),
                            "admissible": self.calibration_result.admissible,
                            "problems": [p.to_dict() for p in self.calibration_result.problems],
                            "fit": self.calibration_result.fit.to_dict(), "robust": robust(self.calibration_result)},
            "validation": {"data": self.validation, "n_obs": self.loose.n_obs,
                           **({"rows": self.rows[1].to_dict()} if self.rows else {})},
            "loose": {"fit": loose, "admissible": self.loose.admissible,
                      "problems": [p.to_dict() for p in self.loose.problems], "robust": robust(self.loose)},
            # renamed from "tight" (which held another statistic: the validation sample against the calibration
            # estimates taken as known), so that a reader of the old block fails instead of misreading this one
            "same_solution_test": self.same_solution.to_dict(),
            "cross_validation_index": self.cvi,
            "cross_validation_index_saturated": self.cvi_saturated,
        })


@dataclass(frozen=True, eq=False)
class Replications(Presentable):
    """The replications of one run: one (new data) or two (random halves, each way)."""

    replications: tuple[Replication, ...]

    def to_dict(self) -> dict:
        return {"replications": [r.entry() for r in self.replications]}


def discrepancy(S: np.ndarray, sigma: np.ndarray) -> float:
    """ML discrepancy F(S, Sigma) = log|Sigma| + tr(S Sigma^-1) - log|S| - p."""
    return float(log_det_pd(sigma) + np.trace(np.linalg.solve(sigma, S)) - log_det_pd(S) - len(S))


def _moments(spec: Spec, frame: pd.DataFrame, source: str, missing=None) -> SampleMoments:
    """The sample's moments, rows with gaps handled as fit handles them (``missing`` as given to the command)."""
    check_columns(spec, [str(c) for c in frame.columns], source)
    handling, _ = refit_missing_handling(frame, spec.observed_names, missing)
    return sample_moments(frame, spec.observed_names, source, missing=handling)


def _has_gaps(moments: SampleMoments) -> bool:
    return moments.rows is not None and bool(np.isnan(moments.rows).any())


#: the classes of parameters held equal across the two samples by the test of one solution: every parameter of the
#: covariance structure (language.spec.INVARIANCE_CLASSES); intercepts (and the thresholds of ordinal items) stay free
SAME_SOLUTION_CLASSES = ("loadings", "residuals", "variances", "covariances")
#: the two models the test of one solution compares (DifferenceTest.restricted, .general)
ONE_SOLUTION = "one solution for both samples"
OWN_SOLUTIONS = "each sample its own solution"


def _one_solution_spec(spec: Spec) -> Spec:
    """``spec`` with every covariance-structure parameter held equal across groups."""
    return replace(spec, invariant=SAME_SOLUTION_CLASSES, noninvariant=())


def _not_tested(why: Text) -> DifferenceTest:
    nan = float("nan")
    return DifferenceTest(ONE_SOLUTION, OWN_SOLUTIONS, nan, 0, nan, DifferenceMethod.LIKELIHOOD_RATIO, nan, nan, why)


#: the two-sample model with one solution, as :func:`_impossible` names it
JOINT = "two-sample model with one solution"


def _samples(cal: FitResult, loose: FitResult) -> tuple:
    return (("calibration sample", cal), ("validation sample", loose))


def _impossible(named) -> DifferenceTest | None:
    """The test of one solution not computed when a solution it compares is not admissible (``named``: (what,
    FitResult) pairs): a hostile trial found it read off a validation refit with negative residual variances and a
    two-sample model with a residual correlation of -5, stated plainly.  None when every solution is admissible."""
    bad = [what for what, r in named if r is not None and r.converged and not r.admissible]
    if not bad:
        return None
    # the problems themselves are named where each solution is reported; the two-sample model's here
    joint = [f" ({'; '.join(inadmissible_words(r.problems))})" for what, r in named if what == JOINT and what in bad]
    whose = (f"the {bad[0]}'s solution is" if len(bad) == 1 else
             f"the solutions of the {' and of the '.join(bad)} are")
    return _not_tested(f"{whose} not admissible{''.join(joint)}, and a test between impossible solutions cannot show "
                       f"whether the samples share one")


def _likelihood_ratio(chi_equal: float, df_equal: int, separate: tuple[FitResult, FitResult]) -> DifferenceTest:
    """The likelihood-ratio difference of the two-sample fit with one solution (``chi_equal`` on ``df_equal``)
    and the two separate fits (their chi-squares and df add up: each against its own saturated model)."""
    return likelihood_ratio_difference(chi_equal, df_equal, sum(r.fit.chi_square for r in separate),
                                       sum(r.fit.df for r in separate), ONE_SOLUTION, OWN_SOLUTIONS)


def pooled_chi_square(spec: Spec, samples: tuple[SampleMoments, SampleMoments],
                      options) -> tuple[float, int | None, FitResult]:
    """(chi-square, df, fit to S_pooled) of the two-sample model with one covariance structure for complete rows:
    N F(S_pooled, Sigma_hat) + sum_g n_g (log|S_pooled| - log|S_g|), Sigma_hat the one-sample fit to S_pooled
    (derived in the module docstring), on 2 p(p+1)/2 - q df.  A fit to S_pooled that did not converge has no
    Sigma_hat and no df: (NaN, None, that fit), whose message says why."""
    names = samples[0].names
    ordered = [_in_order(m, names) for m in samples]
    N = sum(m.n_obs for m in ordered)
    S, means = pooled(ordered)  # the means are not used by the covariance structure
    fit = fit_moments(spec, SampleMoments(names, S, means, N, N, 0, "the two samples pooled"), options)
    if not fit.converged:  # no estimates and no fit indices to read (fit.fit is None)
        return float("nan"), None, fit
    order = [fit.observed.index(x) for x in names]
    log_det = log_det_pd(S)
    chi = N * discrepancy(S, fit.implied_covariance[np.ix_(order, order)]) + \
        float(sum(m.n_obs * (log_det - log_det_pd(m.covariance)) for m in ordered))
    moments = len(names) * (len(names) + 1) // 2
    return chi, 2 * moments - (moments - fit.fit.df), fit


def _in_order(moments: SampleMoments, names: tuple[str, ...]) -> SampleMoments:
    """A sample's covariance matrix and means with its variables in the order of ``names``."""
    if tuple(moments.names) == tuple(names):
        return moments
    order = [moments.names.index(x) for x in names]
    return replace(moments, names=tuple(names), covariance=moments.covariance[np.ix_(order, order)],
                   means=moments.means[order], rows=None)


def _same_solution(spec: Spec, calibration: SampleMoments, validation: SampleMoments, cal: FitResult,
                   loose: FitResult, options: dict) -> DifferenceTest:
    """The test of one solution in both samples (module docstring): in closed form for complete rows fitted by ML;
    else (rows with gaps, or full-information ML asked for) the two-sample full-information fit with every
    covariance-structure parameter held equal."""
    if not (cal.converged and loose.converged):
        return _not_tested("the model did not converge in the validation sample, so the two samples' own solutions "
                           "are not at hand")
    plain = not (_has_gaps(calibration) or _has_gaps(validation)) and cal.method.missing is not \
        MissingData.FULL_INFORMATION and loose.method.missing is not MissingData.FULL_INFORMATION
    if make_options(options).test is not FitTest.NORMAL:
        # review s11: a plain likelihood-ratio difference rejects true replications of non-normal answers far too
        # often (28 of 30 with heavy tails): with a robust test asked for, the scaled difference
        return _scaled_same_solution(spec, calibration, validation, options, plain)
    if plain:
        fit_options = replace(make_options({**options, "missing": MissingData.LISTWISE}), diagnostics=False)
        with estimation_of("the two samples pooled"):
            chi, df, pooled = pooled_chi_square(spec, (calibration, validation), fit_options)
        if not pooled.converged:
            return _not_tested("the model did not converge in the two samples pooled (" + pooled.message + ")")
        return _impossible(((JOINT, pooled),)) or _likelihood_ratio(chi, df, (cal, loose))
    fit_options = replace(make_options({**options, "missing": MissingData.FULL_INFORMATION}), diagnostics=False)
    with estimation_of("the two samples with one solution"):
        both = fit_moments(_one_solution_spec(spec), [("calibration", calibration), ("validation", validation)],
                           fit_options, "sample")
    if not both.converged:
        return _not_tested("the two-sample model with one solution did not converge (" + both.message + ")")
    return _impossible(((JOINT, both),)) or _likelihood_ratio(both.fit.chi_square, both.fit.df, (cal, loose))


def _scaled_same_solution(spec: Spec, calibration: SampleMoments, validation: SampleMoments, options: dict,
                          complete: bool) -> DifferenceTest:
    """The test of one solution with a robust test asked for: the two samples fitted together as two groups, with
    every covariance-structure parameter held equal and without equalities (each sample its own solution, whose
    chi-square and df are those of the separate fits), each with the robust test that suits its rows (Satorra-Bentler
    for ``complete`` rows, else Yuan-Bentler with full-information ML), compared by the scaled difference
    (Satorra & Bentler 2001; their strictly positive version of 2010 when the 2001 correction is not positive) as the
    invariance ladder compares its steps (workflows.nesting.scaled_difference)."""
    missing = MissingData.LISTWISE if complete else MissingData.FULL_INFORMATION
    fit_options = replace(make_options({**options, "missing": missing}), diagnostics=False)
    groups = [("calibration", calibration), ("validation", validation)]
    fits = []
    for name, model in ((OWN_SOLUTIONS, spec), (ONE_SOLUTION, _one_solution_spec(spec))):
        with estimation_of(f"the two samples, {name}"), blas_threads_for(len(spec.observed_names)):
            est = estimate(model, groups, fit_options)
            fits.append((est, assess(model, groups, est, fit_options, "sample")))
    (own_est, own), (one_est, one) = fits
    if not (own.converged and one.converged):
        return _not_tested("the two-sample fit with the robust test did not converge ("
                           + joined([name + ": " + r.message for name, r in ((OWN_SOLUTIONS, own), (ONE_SOLUTION, one))
                                     if not r.converged], "; ") + ")")
    impossible = _impossible(((JOINT, one),))
    if impossible is not None:
        return impossible
    # as the likelihood-ratio test of one solution, no change in fit indices: the test is what is read
    return replace(scaled_difference(one, own, own_est, ONE_SOLUTION, OWN_SOLUTIONS, one_est), delta_cfi=float("nan"),
                   delta_rmsea=float("nan"))


def replicate_moments(spec: Spec, calibration: SampleMoments, validation: SampleMoments,
                      same_solution: DifferenceTest | None = None, **options) -> Replication:
    """The replication of continuous items; a sample whose rows have gaps (moments by EM) is fitted by
    full-information ML, and so is the two-sample model of the test of one solution (``same_solution``: that
    test made already, for the same two samples the other way round)."""

    def fit_options(moments: SampleMoments):
        missing = MissingData.FULL_INFORMATION if _has_gaps(moments) else MissingData.LISTWISE
        # the reliability too, so that keys the loadings contradict are a problem of each sample's solution, first in
        # every view as in fit (hostile s22: replicate alone was silent)
        return replace(make_options({**options, "missing": options.get("missing") or missing}), diagnostics=False,
                       reliability=True)

    with estimation_of(f"calibration sample {calibration.source}"):
        cal = fit_moments(spec, calibration, fit_options(calibration))
    if not cal.converged:
        raise EstimationError(f"the model did not converge in the calibration sample {calibration.source}: {cal.message}")
    with estimation_of(f"validation sample {validation.source}"):
        loose = fit_moments(spec, validation, fit_options(validation))
    cal, loose = _described(cal, spec, None), _described(loose, spec, None)  # the methods paragraph's model
    order = [validation.names.index(n) for n in cal.observed]
    S_val = validation.covariance[np.ix_(order, order)]
    sigma_cal = cal.implied_covariance
    if _has_gaps(validation):
        from cfa_tool.data.patterns import pattern_data
        from cfa_tool.estimation.fiml import fixed_covariance_discrepancy

        rows = pattern_data(validation.rows[:, order])
        saturated = (validation.means[order], S_val)
        F = fixed_covariance_discrepancy(rows, sigma_cal, saturated)
        F_saturated = fixed_covariance_discrepancy(rows, cal.sample_covariance, saturated)
    else:
        F, F_saturated = discrepancy(S_val, sigma_cal), discrepancy(S_val, cal.sample_covariance)
    test = same_solution or _impossible(_samples(cal, loose)) or _same_solution(spec, calibration, validation, cal,
                                                                                 loose, options)
    return Replication(calibration.source, validation.source, cal, loose, test, F, F_saturated,
                       data_problems=_tails((calibration, validation), cal, loose, test),
                       rows=(sample_rows(calibration, cal), sample_rows(validation, loose)))


def _tails(samples: tuple[SampleMoments, SampleMoments], cal: FitResult, loose: FitResult,
           test: DifferenceTest) -> tuple:
    """The caution on answers far from normal under normal-theory fits, as fit gives it (assessment.admissibility
    .non_normal_problems), of each sample judged by its own rows (Mardia 1970; of rows with gaps, each on the items
    it answered: workflows.nesting.heavy_tailed_groups), each named by its source (a half by its letter, which both
    directions of a split share; two data frames by their parts as well), with what heavy tails do to the
    test of one solution, a likelihood-ratio difference (nesting.tails_said_once; fixleft s26: replicate said
    nothing of tails that fit, compare and invariance caution on).  None under the robust test."""
    from cfa_tool.assessment.admissibility import non_normal_problems
    from cfa_tool.workflows.nesting import heavy_tailed_groups, rejects, tails_said_once

    if cal.robust is not None or loose.robust is not None or cal.method.ordinal:
        return ()
    decided = "the rejection of one solution by its test" if rejects(test) else None
    alike = samples[0].source == samples[1].source  # two data frames: named by their parts
    found: list = []
    for moments, role in zip(samples, ("calibration", "validation")):
        heavy, _, judged = heavy_tailed_groups([moments], None)
        where = f" in the {role} sample ({moments.source})" if alike else f" in {moments.source}"
        problems = non_normal_problems(judged, None, cal.method, where)
        found += tails_said_once(heavy, judged, problems, decided)[1]
    return tuple(found)


def replicate_ordinal(spec: Spec, calibration, validation, method: Weighting | str = Weighting.DIAGONAL,
                      together: list | None = None, **options) -> Replication:
    """The replication of a model with ordinal items from each sample's OrdinalMoments (module docstring);
    ``together``: the two samples' moments as groups on shared answer categories (:func:`_two_samples`), which the
    test of one solution fits, or a reason (str) why they could not be computed."""
    from cfa_tool.pipeline.ordinal import correlations_in_order, fit_ordinal

    fit_options = replace(make_options(options), diagnostics=False, reliability=True)  # keying problems, as above
    with estimation_of(f"calibration sample {calibration.source}"):
        cal = fit_ordinal(spec, calibration, fit_options, method)
    if not cal.converged:
        raise EstimationError(f"the model did not converge in the calibration sample {calibration.source}: {cal.message}")
    with estimation_of(f"validation sample {validation.source}"):
        loose = fit_ordinal(spec, validation, fit_options, method)
    cal, loose = _described(cal, spec, None), _described(loose, spec, None)  # the methods paragraph's model
    pairs = np.tril_indices(len(cal.observed), -1)
    r, gamma = correlations_in_order(validation, cal.observed)
    weights = 1.0 / np.diag(gamma) if Weighting.parse(method, "the ordinal estimator") is Weighting.DIAGONAL \
        else np.ones(len(pairs[0]))

    def discrepancy_of(rho: np.ndarray) -> float:
        e = r[pairs] - rho[pairs]
        return float(e @ (weights * e))

    test = _impossible(_samples(cal, loose)) or _same_ordinal_solution(spec, together, loose, fit_options, method)
    return Replication(calibration.source, validation.source, cal, loose, test, discrepancy_of(cal.implied_covariance),
                       discrepancy_of(cal.sample_covariance), adjusted=True,
                       rows=(sample_rows(calibration, cal), sample_rows(validation, loose)))


def _same_ordinal_solution(spec: Spec, groups: list | str | None, loose: FitResult, fit_options,
                           method) -> DifferenceTest:
    """The scale-shifted difference of the two-sample least-squares fits with and without one solution, the
    thresholds free in each sample (module docstring); ``groups``: the two samples' moments (or why they are
    not at hand)."""
    from cfa_tool.pipeline.ordinal import estimate_ordinal_groups, ordinal_difference
    from cfa_tool.workflows.ordinal_compare import difference_record

    if not loose.converged:
        return _not_tested("the model did not converge in the validation sample, so the two samples' own solutions "
                           "are not at hand")
    if not isinstance(groups, list):
        return _not_tested(groups or "the two samples' rows were not given together")
    with estimation_of("the two samples, each its own solution"):
        own = estimate_ordinal_groups(spec, groups, fit_options, method)
    with estimation_of("the two samples with one solution"):
        one = estimate_ordinal_groups(_one_solution_spec(spec), groups, fit_options, method)
    if not (own.converged and one.converged):
        return _not_tested("the two-sample least-squares fit did not converge")
    return difference_record(ordinal_difference(one, own), ONE_SOLUTION, OWN_SOLUTIONS, None, None)


def _ordinal_moments(spec: Spec, frame: pd.DataFrame, source: str, ordinal_items: set[str], pairwise: bool):
    from cfa_tool.data.polychoric import ordinal_moments

    check_columns(spec, [str(c) for c in frame.columns], source)
    continuous = frozenset(x for x in spec.observed_names if x not in ordinal_items)
    return ordinal_moments(frame, spec.observed_names, source, continuous, pairwise=pairwise)


#: the column that tells the two samples apart in :func:`_two_samples` (a name no file's column can have)
SAMPLE_COLUMN = "\x00sample"


def _two_samples(spec: Spec, frames: tuple[pd.DataFrame, pd.DataFrame], source: str, ordinal_items: set[str],
                 pairwise: bool) -> list | str:
    """The ordinal moments of the two samples as two groups on shared answer categories (data.groups, as the
    invariance ladder computes them), or why they cannot be: an answer category that one sample lacks leaves its
    threshold without an estimate there."""
    from cfa_tool.data.groups import split_ordinal_moments

    names = list(spec.observed_names)
    both = pd.concat([frame[names].assign(**{SAMPLE_COLUMN: label})
                      for frame, label in zip(frames, ("calibration", "validation"))], ignore_index=True)
    continuous = frozenset(x for x in names if x not in ordinal_items)
    try:
        groups, _ = split_ordinal_moments(both, SAMPLE_COLUMN, spec.observed_names, source, "calibration", pairwise,
                                          None, continuous)
    except DataError:  # an answer category of an ordinal item missing from one sample: named here, in the paragraph's
        # words (the error's own named the internal sample column and advised a row filter: hostile s22)
        return (f"an answer category of an ordinal item is missing from one sample, so the two samples' thresholds "
                f"cannot be estimated side by side: {_categories_apart(frames, [x for x in names if x in ordinal_items])}")
    return groups


def _categories_apart(frames: tuple[pd.DataFrame, pd.DataFrame], items: list[str]) -> str:
    """Which answer categories of the ordinal ``items`` one of the two samples has and the other lacks, in words
    ('category 1 of short_wait, given by 1 row of the calibration sample, none of the validation sample')."""
    found = []
    for item in items:
        counts = [frame[item].value_counts() for frame in frames]
        for k, (mine, other) in enumerate((counts, counts[::-1])):
            for value in sorted(set(mine.index) - set(other.index)):
                found.append(f"category {user_number(float(value))} of {printable(item)}, given by "
                             f"{counted(int(mine[value]), 'row')} of the {('calibration', 'validation')[k]} sample, "
                             f"none of the {('validation', 'calibration')[k]} sample")
    return cut_list(found, 3, sep="; ", lead="; and ") or "the samples' answer categories differ"


def _ordinal_setup(spec: Spec, ordinal, ordinal_estimator, options: dict,
                   own: tuple[str, ...]) -> tuple[Spec, set[str], Weighting | None, bool]:
    """(the model as ``fit`` reads it with its ordinal items, those items, their estimator, whether rows with gaps
    are kept), as ``fit`` reads them (pipeline.inputs.ordinal_model), so that the model is checked after them; the
    fit options checked first (an unknown keyword named with the near ones of the public function's keywords
    ``own``)."""
    from cfa_tool.pipeline.inputs import check_ordinal_options, ordinal_estimator_option, ordinal_model

    fit_options = make_options(options, own)
    spec, items = ordinal_model(spec, ordinal)
    method = ordinal_estimator_option(ordinal_estimator, items)
    pairwise = check_ordinal_options(fit_options) if items else False
    return spec, items, method if items else None, pairwise


def _same_categories(calibration, validation, frame: pd.DataFrame) -> None:
    """An error when an ordinal item of the validation sample has an answer category the calibration sample never
    had: the two samples' answer scales differ, so the calibration's thresholds and the cross-validation index cannot carry
    over (as scores of other data refuse such an answer, workflows.factor_scores._check_categories)."""
    for name, seen, cats in zip(validation.names, calibration.categories, validation.categories):
        new = [c for c in cats if c not in set(seen)]
        if not seen or not new:
            continue
        column = pd.to_numeric(frame[name], errors="coerce").to_numpy(dtype=float)
        where = np.isin(column, new)
        first = int(row_numbers(frame)[np.argmax(where)])
        raise DataError(f"{validation.source}: ordinal item '{printable(name)}' has the answer"
                        f"{'s' if len(new) > 1 else ''} {', '.join(f'{user_number(c)}' for c in new)} ({int(where.sum())} rows, the "
                        f"first in {row_of(frame, first)}), which the calibration sample {calibration.source} never had (its "
                        f"categories: {', '.join(f'{user_number(c)}' for c in seen)}); the two samples' answer scales differ, so "
                        f"the calibration estimates cannot be carried over: recode the answers alike in both files or "
                        f"leave those rows out")


def _workbook(source) -> bool:
    """Whether ``source`` is a path of an Excel workbook."""
    from cfa_tool.data.readers import EXCEL_SUFFIXES

    return isinstance(source, (str, Path)) and Path(source).suffix.lower() in EXCEL_SUFFIXES


def _same_file(first, second) -> bool:
    import os

    if isinstance(first, pd.DataFrame) or isinstance(second, pd.DataFrame):
        return first is second
    try:
        return os.path.samefile(first, second)
    except (OSError, TypeError, ValueError):
        return False


def _not_the_same_rows(spec: Spec, first: pd.DataFrame, second: pd.DataFrame, first_source: str,
                       second_source: str) -> None:
    """An error when a fifth or more of one file's rows (on the model's variables) are among the other's: a copy under
    another name, or a validation file that contains calibration rows, is not new data.  Files whose rows repeat
    (few items, few answer categories: equal rows are then common by chance) are judged only when at least 90%
    of the smaller file's rows are distinct."""
    columns = list(spec.observed_names)

    def rows_of(frame: pd.DataFrame) -> list[bytes]:
        values = frame[columns].apply(pd.to_numeric, errors="coerce").to_numpy(float)
        return [row.tobytes() for row in np.where(np.isnan(values), np.inf, values)]  # gaps compared as gaps

    a, b = rows_of(first), rows_of(second)
    small, large = (a, b) if len(a) <= len(b) else (b, a)
    if not small or len(set(small)) < 0.9 * len(small):
        return
    within = set(large)
    shared = sum(row in within for row in small)
    if shared >= SHARED_ROWS * len(small):
        inside = first_source if small is a else second_source
        raise OptionError((f"the calibration data ({first_source}) and the validation data ({second_source}) hold the "
                           f"same rows" if shared == len(a) == len(b) else
                           f"{'every row' if shared == len(small) else f'{count_text(shared)} of the {count_text(len(small))} rows'} of {inside} "
                           f"(on the model's variables) {'is' if shared == len(small) else 'are'} also in the other file")
                          + f"; replication checks the model in new data ({_one_file_instead()})")


def _one_file_instead() -> str:
    """The other way to check a model with one file, as the caller asks for it."""
    return (f"or give one file as {Option.DATA} to split it in two random halves"
            if check.interface() is check.Interface.COMMAND_LINE else "or split one data set in two random halves with split_half")


#: the share of one file's (mostly distinct) rows found in the other beyond which the two are not separate samples
SHARED_ROWS = 0.2


def replicate(model: str | Path | Spec, calibration: pd.DataFrame | str | Path, validation: pd.DataFrame | str | Path,
              ordinal: str | list[str] | None = None, ordinal_estimator: str | None = None, missing: str | None = None,
              sheet: str | None = None, missing_codes: tuple[float, ...] = (), names_row: int | None = None,
              validation_names_row: int | None = None, first_data_row: int | None = None,
              validation_first_data_row: int | None = None, keep: tuple[str, ...] | list[str] = (),
              rename=None, validation_rename=None, id_column: str | None = None,
              validation_sheet: str | None = None, **options) -> Replication:
    """Calibrate on one data set, validate on another.  ``ordinal``, ``ordinal_estimator``: ordinal items and
    their least-squares estimator, as for ``fit`` (an 'ordinal' statement in the model declares them too);
    ``missing_codes`` apply to both files, as for ``fit``; ``sheet`` to those of the two that are Excel workbooks
    (a calibration workbook with a CSV validation file), an error when neither is one, and ``validation_sheet`` to the
    validation workbook alone (two sheets of one workbook may be the two samples).  The row of column names is
    each file's own: ``names_row`` that of the calibration file, ``validation_names_row`` that of the validation
    file (a workbook with question texts above the item codes beside a plain CSV file), and so is the row where its
    data start (``first_data_row``, ``validation_first_data_row``).  ``keep``: row filters ('Finished = True'),
    applied to each file, as for ``fit``; each file's notes say how many rows they kept.  So are the columns read under new names:
    ``rename`` those of the calibration file, ``validation_rename`` those of the validation file ({'SL3r': 'SL3_r'}:
    a follow-up sample's file that names an item differently).  ``id_column``: the column of each file that names
    its rows (never analysed), beside the row numbers of the cautions about rows, as for ``fit``."""
    spec, ordinal_items, method, pairwise = _ordinal_setup(load_spec(model), ordinal, ordinal_estimator,
                                                           options if missing is None else {**options, "missing": missing},
                                                           REPLICATE_KEYWORDS)
    one_group_only(spec, "replication fits one group's model in each sample")
    sheets = sheet_of_each((calibration, validation), sheet)
    if validation_sheet is not None:  # the validation workbook's own sheet (new-user trial s23: one sheet per wave)
        sheets = (sheets[0], sheet_of_each((validation,), validation_sheet, Option.VALIDATION_SHEET)[0])
    if _same_file(calibration, validation) and validation_sheet is not None and sheets[0] == sheets[1]:
        raise OptionError(f"{Option.SHEET} and {Option.VALIDATION_SHEET} name the same sheet of one workbook "
                          f"('{sheets[0]}'); replication checks the model in new data: name the other sample's sheet")
    if _same_file(calibration, validation) and validation_sheet is None:
        raise OptionError("the calibration and the validation data are the same file; replication checks the model in "
                          f"new data ({_one_file_instead()}"
                          + (f"; or give the sheets of one workbook: {Option.SHEET} and {Option.VALIDATION_SHEET})"
                             if sheets[0] is not None or _workbook(calibration) else ")"))
    # each file read as fit reads its data (row filters, declared scales, answer words, codes as labels, values
    # that look like no answers): a hostile trial found replicate analysing answers beyond a declared scale that fit
    # refuses; the row filters apply to each file, their notes naming it
    gaps = keeps_rows_with_gaps(missing)  # a half of halves of the complete rows only when they are left out
    ids = (id_column,) if isinstance(id_column, str) else ()
    from cfa_tool.data.joined_answers import held_across

    with held_across(spec):  # a code joined where either file holds it: the rows of both are analysed together
        read, notes = zip(read_inputs_with_notes(spec, calibration, sheets[0], missing_codes, keep, ids,
                                                 names_row=names_row, first_data_row=first_data_row,
                                                 name_the_file=True, rename=rename,
                                                 chosen=chosen_columns(id_column=id_column), keeps_gaps=gaps)[1:],
                          read_inputs_with_notes(spec, validation, sheets[1], missing_codes, keep, ids,
                                                 names_row=validation_names_row,
                                                 names_option=Option.VALIDATION_NAMES_ROW,
                                                 first_data_row=validation_first_data_row, name_the_file=True,
                                                 rename=validation_rename, rename_option=Option.VALIDATION_RENAME,
                                                 chosen=chosen_columns(id_column=id_column), keeps_gaps=gaps)[1:])
    named = [rows_named(each, id_column, spec.observed_names) for each in read]  # each file's ids and their column
    (cal_frame, cal_source), (val_frame, val_source) = [(loaded.frame, loaded.source) for loaded in read]
    _not_the_same_rows(spec, cal_frame, val_frame, cal_source, val_source)
    for each in read:  # a totals row in either file is refused (the estimation failures name the first file's)
        refuse_totals_rows(each)
    with odd_values_named(next((s for s in read if s.odd_values), read[0])):
        if ordinal_items:
            cal_moments = _ordinal_moments(spec, cal_frame, cal_source, ordinal_items, pairwise)
            val_moments = _ordinal_moments(spec, val_frame, val_source, ordinal_items, pairwise)
            _same_categories(cal_moments, val_moments, val_frame)
            together = _two_samples(spec, (cal_frame, val_frame), f"{cal_source} and {val_source}", ordinal_items,
                                    pairwise)
            result = replicate_ordinal(spec, cal_moments, val_moments, method, together, **options)
        else:
            result = replicate_moments(spec, _moments(spec, cal_frame, cal_source, missing),
                                       _moments(spec, val_frame, val_source, missing), **options)
    left_out = tuple(p for r, source in ((result.calibration_result, cal_source), (result.loose, val_source))
                     for p in _left_out(r.data.rows_dropped, r.data.rows_read, source, r.method.missing, ordinal_items))
    # each file's row filters kept with its fit (the methods paragraph names them) and its cautions naming the file:
    # the two files' range restrictions read alike, and one left out as a repeat, without it
    found = tuple(dict.fromkeys(p for s, which, r, (ids_of, by) in zip(read, ("calibration", "validation"),
                                                                       (result.calibration_result, result.loose), named)
                                for p in data_problems(s, spec, ids=ids_of, where=f" on the {which} data ({s.source})",
                                                       listwise=r.method.missing is MissingData.LISTWISE,
                                                       id_column=by, takes_design=False)))
    found += _same_people(named, id_column, read)
    # what each file read as no answer, as fit keeps it (with_missing_reading, the filters too): the paragraph names it
    cal, loose = (with_missing_reading(result.calibration_result, read[0], missing_codes),
                  with_missing_reading(result.loose, read[1], missing_codes))
    # the methods paragraph describes both samples from the calibration's data: an item is said to be read as numbers
    # only when both files held numbers alone (hostile s23b: the validation file's words were said to be numbers)
    both = tuple(x for x in cal.data.numbers_only if x in loose.data.numbers_only)
    if both != cal.data.numbers_only:
        cal = replace(cal, data=replace(cal.data, numbers_only=both))
    rows = tuple(replace(r, in_file=fitted.data.rows_in_file) for r, fitted in zip(result.rows, (cal, loose)))
    # continuous items of few answer categories or piled up at one end: fit's note, of both samples' answers (hostile
    # s25b case 05: fit, compare, invariance, scores and bootstrap named them, replicate did not)
    few = () if ordinal_items else tuple(few_category_notes(pd.concat([cal_frame, val_frame], ignore_index=True),
                                                            spec.observed_names))
    return replace(result, calibration_result=cal, loose=loose, rows=rows,
                   data_problems=found + left_out + result.data_problems,  # the samples' tails last, as fit's
                   notes=tuple(dict.fromkeys([n for file_notes in notes for n in file_notes] + list(few))),
                   answer_coding=coding_record(spec))


#: the keywords of :func:`replicate` besides the fit options it passes on (an unknown keyword's near names,
#: make_options), read from its signature once
REPLICATE_KEYWORDS = own_keywords(replicate)


def _same_people(named, id_column: str | None, read) -> tuple:
    """A caution when the validation file holds ids of the calibration file (``named``: each file's data-row number
    -> id, with ``id_column`` given; a file's row names, which number rows alike in any two files, are not read so):
    the same people in both samples (new-user trial s23: a second wave of one staff taken as new data, nothing said).
    A replication on them tests the solution's stability over time, not that it holds in other people, and the test
    of one solution for both samples takes them for independent samples."""
    from cfa_tool.assessment.admissibility import Problem, ProblemKind
    from cfa_tool.errors import clipped
    from cfa_tool.numbers import count_text

    if not isinstance(id_column, str) or any(by is None for _, by in named):
        return ()
    calibration = set(named[0][0].values())
    validation = list(dict.fromkeys(named[1][0].values()))
    shared = [v for v in validation if v in calibration]
    if not shared:
        return ()
    return (Problem(ProblemKind.REPEATED_IDS, (), float(len(shared)),
                    f"{count_text(len(shared))} of the {count_text(len(validation))} ids of the validation data "
                    f"({read[1].source}) are ids of the calibration data ({read[0].source}) too, such as "
                    f"'{clipped(str(shared[0]), 40)}': the same people in both samples? A replication on the "
                    f"calibration's people tests whether the solution is stable over time, not whether it holds in "
                    f"other people, and the test of one solution for both samples takes them for independent "
                    f"samples, which the same people are not.",
                    "replicate on a sample of other people; for the same people at two times, test invariance over "
                    "time with one model of both times side by side, their loadings and intercepts held equal across "
                    "the times."),)


def _left_out(dropped: int, read: int, source: str, missing, ordinal_items) -> tuple:
    """The caution on the rows of ``source`` that listwise deletion left out (pipeline.continuous.listwise_problem,
    as fit gives it) when ``missing`` is listwise; () otherwise or for few rows."""
    if missing is not MissingData.LISTWISE or not dropped:
        return ()
    found = listwise_problem(dropped, read, f" of {source}",
                             pairwise_instead() if ordinal_items else full_information_instead())
    return (found,) if found is not None else ()


def split_half(model: str | Path | Spec, data: pd.DataFrame | str | Path, seed: int = 1,
               ordinal: str | list[str] | None = None, ordinal_estimator: str | None = None, missing: str | None = None,
               sheet: str | None = None, missing_codes: tuple[float, ...] = (), names_row: int | None = None,
               first_data_row: int | None = None, keep: tuple[str, ...] | list[str] = (), rename=None,
               cluster: str | None = None, strata: str | None = None, id_column: str | None = None,
               **options) -> tuple[Replication, Replication]:
    """Random halves A and B (seeded) of the rows analysed (with continuous items and gaps, every row with an
    answer, as fit keeps them; else the complete rows): calibrate on A and validate on B, then the reverse.
    ``keep``: row filters ('Finished = True'), applied before the split, as for ``fit``: the halves are drawn from
    the rows they keep.  ``cluster``: a column naming each row's cluster (household, school): the halves are drawn
    cluster by cluster, whole clusters to each half, so that the halves are independent samples of clusters;
    ``strata``: a column naming each row's stratum, the halves drawn within each stratum (its clusters, or its rows
    without ``cluster``; data.halves.draw_cluster_halves).  The fits within each half still take its rows as
    independent, and the reports say so.  ``id_column``: the column that names each row (never analysed), beside the
    row numbers of the cautions about rows, as for ``fit``."""
    seed = check.seed(seed)
    design = _split_design(cluster, strata)
    spec, ordinal_items, method, pairwise = _ordinal_setup(load_spec(model), ordinal, ordinal_estimator,
                                                           options if missing is None else {**options, "missing": missing},
                                                           SPLIT_HALF_KEYWORDS)
    one_group_only(spec, "replication fits one group's model in each sample")
    _, loaded, notes = read_inputs_with_notes(spec, data, sheet, missing_codes, keep,
                                              (id_column,) if isinstance(id_column, str) else (), names_row=names_row,
                                              first_data_row=first_data_row, rename=rename,
                                              chosen=chosen_columns(id_column=id_column, design=design),
                                              keeps_gaps=keeps_rows_with_gaps(missing))  # as fit reads it
    frame, source = loaded.frame, loaded.source
    # continuous items of few answer categories or piled up at one end: fit's note, of the rows read (hostile s25b
    # case 05)
    notes = tuple(dict.fromkeys(list(notes) + ([] if ordinal_items else few_category_notes(frame, spec.observed_names))))
    with odd_values_named(loaded):
        pair, halves, units, labels = _split_half(spec, frame, source, seed, ordinal_items, method, missing, pairwise, design,
                                          **options)
    split = pair[0].calibration_result.n_obs + pair[0].loose.n_obs
    rows = SplitRows(split, len(frame), split < len(frame.dropna(subset=list(spec.observed_names), how="all")),
                     *halves, filters=loaded.row_filters,
                     rows_in_file=len(loaded.read_frame) if loaded.read_frame is not None else None,
                     cluster=cluster, strata=strata, units=units, labels=labels, seed=seed,
                     unit_column=_unit_column(frame, spec, id_column) if cluster is None else None)
    # the rows left out before the split (the halves hold complete rows only): fit's caution, after the data's
    from cfa_tool.pipeline.column_codes import column_code_problems

    # (a cluster or strata column the halves are drawn by that keeps a no-answer code: one cluster of its rows)
    ids, named_by = rows_named(loaded, id_column, spec.observed_names)
    # halves of a handful of clusters first: they are those clusters, not random halves (hostile s24b)
    from cfa_tool.pipeline.row_filter_cautions import few_clusters_problems

    problems = few_clusters_problems(units, cluster, False, strata) + tuple(dict.fromkeys(data_problems(loaded, spec, ids=ids, listwise=rows.complete_only, id_column=named_by,
                                                                      takes_design=False, halves=cluster is None)
                                   + column_code_problems(loaded, None, design))) + _left_out(
        len(frame) - split, len(frame), source, MissingData.LISTWISE if rows.complete_only else None, ordinal_items)
    # what the file read as no answer kept with each half's fit, as fit keeps it (with_missing_reading; the filters,
    # which chose the rows before the split, are the split's: SplitRows names them)
    unfiltered = replace(loaded, row_filters=())
    return tuple(replace(rep, calibration_result=with_missing_reading(rep.calibration_result, unfiltered, missing_codes),
                         loose=with_missing_reading(rep.loose, unfiltered, missing_codes),
                         data_problems=problems + rep.data_problems,
                         split=rows, notes=notes, answer_coding=coding_record(spec))
                 for rep in pair)


#: the keywords of :func:`split_half` besides the fit options it passes on (an unknown keyword's near names,
#: make_options), read from its signature once
SPLIT_HALF_KEYWORDS = own_keywords(split_half)


def _unit_column(frame, spec, id_column: str | None) -> str | None:
    """The column named for units of many rows (teams, schools: data.column_roles.unit_id_column, the one rule of
    the data's caution on them), outside the items and the id; None without one."""
    from cfa_tool.data.column_roles import unit_id_column

    found = unit_id_column(frame, {id_column, *spec.observed_names})
    return found[0] if found is not None else None


@dataclass(frozen=True)
class SplitRows:
    """Which rows of one file were split into random halves: ``split`` of ``in_file``; ``complete_only``: rows with
    missing answers were left out before the split (the halves hold complete rows)."""

    split: int
    in_file: int
    complete_only: bool
    #: the row numbers (as the file numbers them, a data frame's index labels: data.moments.row_numbers) of half A and
    #: of half B
    half_a: tuple[int, ...] = field(default=(), repr=False)
    half_b: tuple[int, ...] = field(default=(), repr=False)
    #: the row filters (data.filters.RowFilter) that chose the ``in_file`` rows before the split, and the rows the file
    #: held before them (None without filters)
    filters: tuple = ()
    rows_in_file: int | None = None
    #: the columns the halves were drawn by (data.halves.draw_cluster_halves): whole clusters of ``cluster`` to each
    #: half, within each stratum of ``strata``; both None: row by row
    cluster: str | None = None
    strata: str | None = None
    #: the clusters (the strata's rows without clusters) in half A and in half B; () when drawn row by row
    units: tuple[int, ...] = ()
    #: each row's number, cluster and stratum as read ('' for a column not given), when drawn by them: what a halves
    #: file records to draw the halves again (data.halves.DrawnBy)
    labels: tuple[tuple[int, str, str], ...] = field(default=(), repr=False)
    #: the seed the halves were drawn with (None where not known)
    seed: int | None = None
    #: drawn row by row, the column named for teams, schools or other units of many rows (data.column_roles
    #: .unit_id_column), by which the split sentence offers to draw them cluster by cluster (--cluster school)
    unit_column: str | None = None

    def to_dict(self) -> dict:
        out = {"rows_split": self.split, "rows_in_file": self.in_file, "complete_rows_only": self.complete_only,
               "drawn": self.drawn_phrase, "cluster_column": self.cluster, "strata_column": self.strata,
               "clusters_per_half": list(self.units) if self.cluster is not None else None}
        if self.filters:
            out.update(rows_kept_by_filters=self.in_file, rows_in_file=self.rows_in_file,
                       row_filters=[f.text for f in self.filters])
        return out

    def drawn_by(self):
        """The columns and labels the halves were drawn by, for a halves file (data.halves.DrawnBy); None when drawn
        row by row."""
        from cfa_tool.data.halves import DrawnBy

        if self.cluster is None and self.strata is None:
            return None
        return DrawnBy(self.cluster, self.strata, {row: (c, h) for row, c, h in self.labels})

    @property
    def few_clusters(self) -> bool:
        """Drawn cluster by cluster from a handful of clusters in a half (data.halves.few_clusters_words): the halves
        are those clusters rather than samples of them, which every view says first (hostile s24b)."""
        return self.cluster is not None and bool(few_clusters_words(self.units))

    @property
    def halves_words(self) -> str:
        """The halves as the title and the methods paragraph name them: 'two random halves', or, drawn from a
        handful of clusters, 'two halves of only 2 clusters of district' (they are those clusters)."""
        if not self.few_clusters:
            return "two random halves"
        return f"two halves of only {counted(sum(self.units), 'cluster')} of {self.cluster}"

    def clusters_in(self, k: int) -> tuple[str, ...]:
        """The clusters in half ``k`` (0: half A), by their labels as read, in the rows' order."""
        rows = set(self.half_a if k == 0 else self.half_b)
        return tuple(dict.fromkeys(c for row, c, _ in self.labels if row in rows))

    def _which_clusters(self) -> str:
        """'district south to half A and north to half B': the clusters of each half by name, when they are few
        ('' else, or without their labels)."""
        if not self.few_clusters or not self.labels:
            return ""
        named = [word_list(names) for names in (self.clusters_in(0), self.clusters_in(1))]
        return f"{named[0]} to {half_phrase(False, 0)} and {named[1]} to {half_phrase(False, 1)}"

    @property
    def drawn_phrase(self) -> str:
        """How the halves were drawn, after 'two random halves, ' in a methods paragraph: 'drawn row by row', 'drawn
        cluster by cluster (whole clusters of school to each half, within the strata of region)'; from a handful of
        clusters, which went to which half ('whole clusters of district to each half by a random draw: south to half
        A and north to half B')."""
        within = f"within the strata of {self.strata}"
        if self.cluster is not None:
            which = self._which_clusters()
            return (f"drawn cluster by cluster (whole clusters of {self.cluster} to each half"
                    + (f", {within}" if self.strata is not None else "")
                    + (f", by a random draw: {which})" if which else ")"))
        return "drawn row by row" + (f" {within}" if self.strata is not None else "")

    def _clusters_per_half(self) -> str:
        return f"{counted(self.units[0], 'cluster')} in {half_phrase(False, 0)}, {self.units[1]} in {half_phrase(False, 1)}"

    def independence_sentence(self) -> str:
        """What halves drawn by cluster still assume, a sentence of the methods paragraph ('' for halves drawn row by
        row, whose phrase says so)."""
        if self.cluster is None:
            return ""
        few = few_clusters_words(self.units, past=True)
        samples = (", so the halves were independent samples of clusters" if not few else "")  # (else: those clusters)
        return (f"Every row of a cluster was in one half ({self._clusters_per_half()}){samples}{few}; within each half "
                f"the rows were taken as independent, so the test of one solution is too liberal if rows of one "
                f"cluster answer alike.")

    def how_drawn(self) -> str:
        """How the halves were drawn and what that means for rows that come in clusters, in the words of the split
        sentence of the report (and of the methods paragraph's caveat)."""
        if self.cluster is None:
            words = self.ROW_BY_ROW
            if self.strata is not None:
                words = words.replace("drawn row by row", f"drawn row by row within each stratum of {self.strata}", 1)
            return words
        within = f" within each stratum of {self.strata}" if self.strata is not None else ""
        few = few_clusters_words(self.units)  # a handful of clusters: the halves are those clusters (hostile s24b)
        return (f"the halves are drawn cluster by cluster{within}: every row of a cluster of {self.cluster} is in one "
                f"half ({self._clusters_per_half()})"
                + (few if few else ", so the halves are independent samples of clusters")
                + "; within each half the fits, the test of one solution and the cross-validation index still take the "
                  "rows as independent, so the test's p-value comes out too small when rows of one cluster answer alike")

    def split_words(self) -> str:
        """'split at random into two halves', or, drawn from a handful of clusters, what was done instead: 'split into
        two halves by their clusters of district, drawn at random: south to half A and north to half B'."""
        if not self.few_clusters:
            return "split at random into two halves"
        which = self._which_clusters()
        return (f"split into two halves by their {counted(sum(self.units), 'cluster')} of {self.cluster}, drawn at "
                f"random" + (f": {which}" if which else ""))

    #: how random halves are drawn, and what that means for rows that come in clusters (new-user trial s16: halves
    #: split households without a word); the split sentence of the report and the methods paragraph say it
    ROW_BY_ROW = ("the halves are drawn row by row, so rows of one household, school or other cluster can fall in both "
                  "halves, which then look more alike than independent samples would, and the test of one solution and "
                  "the cross-validation index take the rows as independent; with such data, draw the halves cluster by "
                  "cluster from the column that names each row's cluster")

    def kept_words(self) -> str:
        """' kept by the row filter 'Finished = True' (of the 900 rows in the file)': the rows the filters chose
        before the split ('' without filters)."""
        if not self.filters:
            return ""
        from cfa_tool.data.filters import kept_by_words

        return f" kept by {kept_by_words(self.filters)} (of the {count_text(self.rows_in_file)} rows in the file)"


def _half_source(source: str, k: int, seed: int) -> str:
    """A half's data as its fit names them: 'data.csv (half A, seed 1)' (data.halves.REPLICATE_NAMES)."""
    return f"{source} ({half_phrase(False, k)}, seed {seed})"


def _split_design(cluster: str | None, strata: str | None):
    """The design columns the halves are drawn by (data.sample_design.DesignColumns without weights), or None."""
    from cfa_tool.data.sample_design import DesignColumns

    for name, value in (("cluster", cluster), ("strata", strata)):
        if value is not None and (not isinstance(value, str) or not value.strip()):
            raise OptionError(f"{name} must name a column of the data, not {value!r}")
    return DesignColumns(None, cluster, strata) if cluster is not None or strata is not None else None


def _split_half(spec: Spec, frame: pd.DataFrame, source: str, seed: int, ordinal_items, method, missing,
                pairwise: bool = False, design=None, **options
                ) -> tuple[tuple[Replication, Replication], tuple, tuple[int, ...], tuple]:
    """The halves of the rows fit would analyse: with gaps kept (full-information ML, or ordinal items' pairwise
    rows), every row with an answer; else the complete rows; drawn by the clusters within the strata of ``design``
    when given (data.halves.drawn_halves).  Also the row numbers of halves A and B, the clusters in each and each row's
    cluster and stratum (data.halves.drawn_halves)."""
    handling = MissingData.LISTWISE
    if not ordinal_items:
        handling, _ = refit_missing_handling(frame, spec.observed_names, missing)
    if handling is MissingData.FULL_INFORMATION or (ordinal_items and pairwise):
        complete = frame.dropna(subset=list(spec.observed_names), how="all")
        kind = "rows with answers"
    else:
        complete = frame.dropna(subset=list(spec.observed_names))
        kind = "complete rows"
    if len(complete) < 4 * len(spec.observed_names):
        raise DataError(f"{source}: {len(complete)} {kind} are too few to split into two halves for "
                        f"{len(spec.observed_names)} variables")
    # half A takes the odd row, as explore's does: the one rule of every split (data.halves.drawn_halves)
    first, second, units, drawn = drawn_halves(
        complete, design.cluster if design is not None else None, design.strata if design is not None else None,
        spec.observed_names, source, seed, "split the file into two samples by hand and give them as calibration and "
                                           "validation samples")
    labels = tuple((row, c, h) for row, (c, h) in drawn.labels.items()) if drawn is not None else ()
    a = complete.iloc[first]
    b = complete.iloc[second]
    rows = (tuple(int(v) for v in row_numbers(a)), tuple(int(v) for v in row_numbers(b)))
    if ordinal_items:
        ma = _ordinal_moments(spec, a, _half_source(source, 0, seed), ordinal_items, pairwise)
        mb = _ordinal_moments(spec, b, _half_source(source, 1, seed), ordinal_items, pairwise)
        first = replicate_ordinal(spec, ma, mb, method, _two_samples(spec, (a, b), source, ordinal_items, pairwise),
                                  **options)
        # one test of one solution for both directions: the same two halves (not fitted twice)
        second = replace(replicate_ordinal(spec, mb, ma, method, "", **options), same_solution=first.same_solution)
        return (first, second), rows, units, labels
    ma = sample_moments(a, spec.observed_names, _half_source(source, 0, seed), missing=handling)
    mb = sample_moments(b, spec.observed_names, _half_source(source, 1, seed), missing=handling)

    first = replicate_moments(spec, ma, mb, **options)
    # one test of one solution for both directions: the same two halves (not fitted twice)
    return (first, replicate_moments(spec, mb, ma, first.same_solution, **options)), rows, units, labels
