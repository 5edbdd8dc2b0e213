"""The fitting pipeline: Spec + SampleMoments -> FitResult.

Each step is a call into its own module; nothing here computes statistics
itself.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.assessment.admissibility import admissibility_warnings
from cfa_tool.assessment.fit_indices import fit_indices
from cfa_tool.assessment.identification import check_counting_rule, check_information_rank
from cfa_tool.assessment.modification import modification_indices
from cfa_tool.assessment.residuals import correlation_residuals
from cfa_tool.assessment.standardized import r_squared, standardize_entries
from cfa_tool.data.moments import SampleMoments
from cfa_tool.errors import OptionError
from cfa_tool.estimation.ml import NormalLikelihood
from cfa_tool.estimation.optimizer import minimise
from cfa_tool.inference.standard_errors import observed_information, parameter_covariance, wald_inference
from cfa_tool.language.checks import exogenous_factors
from cfa_tool.language.spec import Spec
from cfa_tool.model.implied import StructuredModel
from cfa_tool.model.parameters import build_parameter_table
from cfa_tool.model.starts import starting_values
from cfa_tool.results import DEFAULT_MI_THRESHOLD, DataSummary, EstimateRow, FitResult

ESTIMATOR = "maximum likelihood"
INFORMATION_CHOICES = ("expected", "observed")


@dataclass(frozen=True)
class FitOptions:
    information: str = "expected"
    mi_threshold: float = DEFAULT_MI_THRESHOLD
    mi_top: int | None = None
    max_iterations: int = 500

    def __post_init__(self) -> None:
        if self.information not in INFORMATION_CHOICES:
            raise OptionError(f"information must be one of {', '.join(INFORMATION_CHOICES)}, not '{self.information}'")
        if self.mi_top is not None and self.mi_top < 0:
            raise OptionError("the number of modification indices to show cannot be negative")
        if self.max_iterations < 1:
            raise OptionError("the iteration limit must be at least 1")


def fit_moments(spec: Spec, moments: SampleMoments, options: FitOptions = FitOptions()) -> FitResult:
    """Fit ``spec`` by normal-theory maximum likelihood to the sample moments."""
    table = build_parameter_table(spec)
    check_counting_rule(spec, table)
    if tuple(moments.names) != table.observed:
        order = [moments.names.index(n) for n in table.observed]
        S = moments.covariance[np.ix_(order, order)]
        means = moments.means[order]
    else:
        S, means = moments.covariance, moments.means
    model = StructuredModel(table)
    likelihood = NormalLikelihood(model, S)
    start = starting_values(table, S)
    opt = minimise(likelihood.evaluate, likelihood.value, start, table.lower, table.upper, options.max_iterations)
    theta = opt.theta
    n = moments.n_obs
    mats = model.matrices(theta)
    sigma = mats.implied_covariance()
    values = model.entry_values(theta)
    codes, rows, cols = table.entry_arrays()
    std_all, std_lv = standardize_entries(mats, codes, rows, cols, values)

    warnings: list[str] = []
    if moments.rows_dropped:
        warnings.append(
            f"{moments.rows_dropped} of {moments.rows_read} rows had a missing answer on a model variable and were left out "
            f"(listwise deletion); {n} rows were analysed"
        )
    fit = None
    inference = None
    mis: list = []
    if opt.converged:
        evaluation = likelihood.evaluate(theta)
        information = evaluation.information
        check_information_rank(information, table.free_labels)
        if options.information == "observed":
            information = observed_information(lambda t: likelihood.evaluate(t).gradient, theta)
        cov_theta = parameter_covariance(information, n)
        inference = wald_inference(values, model.J, cov_theta)
        fit = fit_indices(S, sigma, opt.value, n, table.n_free)
        mis = modification_indices(model, theta, S, n, exogenous_factors(spec))
        warnings.extend(admissibility_warnings(mats, table.observed, table.latent))
    else:
        warnings.append(f"the estimation did not converge ({opt.message}); no result from it should be interpreted")

    estimates = []
    nan = float("nan")
    for e, par in enumerate(table.parameters):
        if inference is not None:
            se, z, p = inference.se[e], inference.z[e], inference.p_value[e]
            ci = (inference.ci_low[e], inference.ci_high[e]) if par.free else (nan, nan)
        else:
            se = z = p = nan
            ci = (nan, nan)
        estimates.append(
            EstimateRow(
                kind=par.kind,
                variables=par.variables,
                free=par.free,
                estimate=float(values[e]),
                se=float(se),
                z=float(z),
                p_value=float(p),
                ci95=(float(ci[0]), float(ci[1])),
                standardized=float(std_all[e]),
                standardized_latent=float(std_lv[e]),
                origin=par.origin,
            )
        )
    sds = np.sqrt(np.diag(S))
    data = DataSummary(moments.source, moments.rows_read, moments.rows_dropped, n, table.observed,
                       tuple(float(v) for v in means), tuple(float(v) for v in sds))
    return FitResult(
        model_name=spec.title or spec.source,
        model_source=spec.source,
        model_text=spec.text,
        estimator=ESTIMATOR,
        converged=opt.converged,
        iterations=opt.iterations,
        message=opt.message,
        n_obs=n,
        data=data,
        observed=table.observed,
        latent=table.latent,
        fit=fit,
        estimates=tuple(estimates),
        modification_indices=tuple(mis),
        r_squared=dict(zip(table.observed, (float(v) for v in r_squared(mats)))),
        sample_covariance=S,
        implied_covariance=sigma,
        residual_correlations=correlation_residuals(S, sigma),
        warnings=tuple(warnings),
        mi_threshold=options.mi_threshold,
        mi_top=options.mi_top,
    )
