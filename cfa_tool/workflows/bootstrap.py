"""Nonparametric bootstrap of a fit (Efron & Tibshirani 1993).

Rows are resampled with replacement and the model refitted, starting from the
original estimates.  Intervals: percentile, and bias-corrected and
accelerated (BCa; Efron 1987) with the acceleration from each row's empirical
influence on the estimates (the analytic form of the jackknife, so its cost
does not grow with N times the cost of a fit; see :func:`influence_values`).  The
Bollen-Stine (1992) p-value of the chi-square test resamples rows transformed
so that the model holds exactly, Y = (X - m) S^-1/2 Sigma^1/2 + m, and counts
the bootstrap chi-squares at least as large as the observed one.
Replications that do not converge are counted and reported, never dropped
silently.  Converged resamples whose solution is not admissible (a negative variance, an estimate held at a
bound...) are counted, named and kept in the intervals, and a fit that is not admissible is bootstrapped with its
problems first in every view: the interval of a negative error variance says whether zero lies within sampling
error of it or a misspecified model is the likelier cause (Chen, Bollen, Paxton, Curran & Kirby 2001; Kolenikov &
Bollen 2012), and intervals of the admissible resamples alone would condition the bootstrap distribution on
admissibility, putting that interval above zero whatever the data say.
Resamples are refitted together, in batches (pipeline.continuous.replicate_fits);
each resample's draw comes from its own seed, so the results do not depend on the batches or
the worker processes.

A full-information fit (rows with gaps) is bootstrapped by resampling the rows with their gaps (under a
design, whole clusters with their rows' weights) and refitting each resample by full-information ML (its
saturated model by EM), one at a time; BCa's influence values are each row's casewise score through the
observed Hessian (the analytic jackknife of the full-information estimate), weighted and summed within
clusters under a design.  The Bollen-Stine transformation of rows with gaps (Enders 2002; Savalei & Yuan 2009) is not built,
so the Bollen-Stine p-value is refused with that reason (and left out, with the reason in the report, when not
asked for).  A resample whose saturated model cannot be estimated (an item with fewer than two answers, a
pair of items no row answers both) is counted apart from those that did not converge.

Under a sampling design whole clusters are resampled (each row its own cluster
when none is given), independently within strata, and every row keeps its
weight (the cluster bootstrap; Field & Welsh 2007): every statistic above is
then the weighted one, the influence values are summed within clusters, and the
Bollen-Stine transformation uses the weighted means and covariance.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from pathlib import Path

import numpy as np
import pandas as pd

from cfa_tool.model.parameters import one_group_only
from cfa_tool.numerics import distributions as dist

from cfa_tool import options as check
from cfa_tool.data.moments import SampleMoments, numeric_columns, sample_moments
from cfa_tool.errors import DataError, EstimationError, OptionError
from cfa_tool.language.spec import Spec
from cfa_tool.assessment.admissibility import counted_problems, replicated_problems
from cfa_tool.pipeline.continuous import (FitOptions, fit_moments, model_structure, moments_from_rows, ordered_moments,
                                          replicate_fits)
from cfa_tool.data.sample_design import check_design, design_columns, design_summary, refuse_lone_strata
from cfa_tool.method import MissingData, WeightKind
from cfa_tool.data.matching import chosen_columns
from cfa_tool.pipeline.inputs import (_described, _fit_rows, converged, keeps_rows_with_gaps, design_test, moments_for, odd_values_named,
                                      refuse_large_robust_route,
                                      ordinal_model, read_inputs_with_notes, refit_missing_handling, with_design,
                                      with_odd_values, without_exploratory_blocks, rows_named)
from cfa_tool.pipeline.results import FitResult, clean
from cfa_tool.views import Presentable
from cfa_tool.workflows.parallel import REFITS_TOGETHER, refits_together, run_tasks


#: why an ordinal fit is not bootstrapped under a design (one message for the Python call and the command)
ORDINAL_DESIGN = "the bootstrap of ordinal items does not take a sampling design yet"
#: why a full-information fit has no Bollen-Stine p-value
BOLLEN_STINE_WITH_GAPS = ("the Bollen-Stine bootstrap resamples rows transformed so that the model holds exactly, and "
                          "that transformation of rows with gaps (Enders 2002; Savalei & Yuan 2009) is not built yet, so "
                          "it is not computed for a full-information fit")
#: why a just-identified fit has no Bollen-Stine p-value (the fit's report says the same: no fit to test)
BOLLEN_STINE_NO_DF = ("the model is just-identified (0 degrees of freedom): it reproduces the covariances exactly, so "
                      "there is no fit to test, and a p-value of its chi-square (zero up to rounding) would read "
                      "rounding noise")


@dataclass(frozen=True)
class BootInterval:
    """One parameter's bootstrap intervals and standard error."""
    kind: str
    variables: tuple[str, ...]
    scale: str  # "unstandardized" or "standardized"
    estimate: float
    percentile: tuple[float, float]
    bca: tuple[float, float]
    bootstrap_se: float
    #: converged resamples in which this threshold has no value because they hold no answer below it (``lacked_below``)
    #: or above it (``lacked_above``): its interval and standard error are then not available (NaN), never taken from
    #: the other resamples alone (workflows.ordinal_resampling: the bootstrap rule of session 23)
    lacked_below: int = 0
    lacked_above: int = 0

    @property
    def available(self) -> bool:
        """Whether the interval could be computed (every converged resample gave the parameter a value)."""
        return not (self.lacked_below or self.lacked_above)

    def to_dict(self) -> dict:
        out = {"kind": self.kind, "variables": list(self.variables), "scale": self.scale, "estimate": self.estimate,
               "percentile_ci95": list(self.percentile), "bca_ci95": list(self.bca), "bootstrap_se": self.bootstrap_se}
        if not self.available:
            out.update(interval_available=False, resamples_without_answer_below=self.lacked_below,
                       resamples_without_answer_above=self.lacked_above)
        return clean(out)


@dataclass(frozen=True, eq=False)
class BootstrapResult(Presentable):
    """A fit and its bootstrap: intervals of every estimate and the Bollen-Stine p-value."""

    fit: FitResult
    replications: int
    converged: int
    seed: int
    intervals: tuple[BootInterval, ...]
    bollen_stine_p: float | None
    bollen_stine_converged: int | None
    #: resamples whose answers could not be analysed (ordinal items: an answer category lost; rows with gaps: an
    #: item's or a pair's answers too few for the saturated model), apart from those whose fit did not converge
    failed: int = 0
    #: why the Bollen-Stine p-value was not computed where a continuous fit's would be (None: it was, or was not
    #: asked for)
    bollen_stine_not_computed: str | None = None
    #: converged resamples whose solution is not admissible, as a single fit would judge it
    #: (assessment.admissibility.replicated_problems), kept in the intervals; their problems named with their counts
    inadmissible: int = 0
    inadmissible_named: str = ""
    #: ordinal items: the answer categories some converged resamples lacked, with how many lacked each
    #: (workflows.ordinal_resampling.LackedCategory)
    lacked: tuple = ()
    #: how many converged resamples lacked some answer category (each fitted with the categories it held, and kept)
    resamples_lacking: int = 0
    #: the intervals of the reliability coefficients the fit reports (assessment.reliability_intervals), each from
    #: the resamples' refits by the fit's own function, withheld where the fit withholds the coefficient
    reliability: tuple = ()

    def to_dict(self) -> dict:
        """The fit and, under "result", the bootstrap."""
        return {"fit": self.fit.to_dict(), "result": clean({
            "replications": self.replications, "converged": self.converged,
            "not_converged": self.replications - self.converged - self.failed, "failed": self.failed, "seed": self.seed,
            "bollen_stine_p_value": self.bollen_stine_p, "bollen_stine_converged": self.bollen_stine_converged,
            "bollen_stine_not_computed": self.bollen_stine_not_computed,
            "inadmissible": self.inadmissible, "inadmissible_problems": self.inadmissible_named,
            "resamples_lacking_a_category": self.resamples_lacking if self.lacked else None,
            "categories_lacked": [c.to_dict() for c in self.lacked] or None,
            "intervals": [i.to_dict() for i in self.intervals],
            "reliability_intervals": [i.to_dict() for i in self.reliability] or None})}


def _replicate(tasks: list) -> list:
    """(converged, values, standardized values, chi-square, failed, problems) of each task's resample, refitted
    together; failed: a resample of rows with gaps whose saturated model cannot be estimated; problems: why a
    converged resample's solution is not admissible, judged here in the worker as a single fit would judge it
    (assessment.admissibility.replicated_problems; empty: admissible, or not judged, as the Bollen-Stine resamples
    are not, whose task says ``judged`` false)."""
    spec, rows, names, _, start, design, gaps, judged, *keyed = tasks[0]
    keys = keyed[0] if keyed else None  # the keys of the fit's sums (fit_keys; None: each resample's signs)
    if design is None and not gaps:  # resamples of complete rows: their moments in one stacked computation
        samples = resampled_moments(rows, names, [task[3] for task in tasks])
    else:
        samples = []
        for _, rows, _, seed, _, design, *_ in tasks:
            try:
                samples.append(_resample(rows, names, seed, design, gaps))
            except (DataError, EstimationError):  # too few answers of an item or pair, or EM without convergence
                samples.append(None)
    fits = replicate_fits(spec, [m for m in samples if m is not None], start, fit_indices_wanted=False,
                          full_information=gaps)
    problems = iter(())
    converged = [f.theta for f in fits if f.converged]
    if judged and converged:
        table, model = model_structure(spec, None, gaps)
        problems = iter(replicated_problems(table, model, np.array(converged)))
    fits = iter(fits)
    out = []
    for m in samples:
        if m is None:
            out.append((False, None, None, float("nan"), True, (), None))
        else:
            fit = next(fits)
            found = next(problems, ()) if fit.converged else ()
            # each converged resample's reliability, by the fit's own function (Bollen-Stine resamples: not wanted)
            coefficients = (resample_reliability(spec, table, model, fit.theta,
                                                 ordered_moments(m, table.observed).covariance, keys)
                            if judged and fit.converged else None)
            out.append((fit.converged, fit.values, fit.standardized, fit.chi_square, False, found, coefficients))
    return out


def fit_keys(spec, result: FitResult) -> dict | None:
    """The reversed items of the fit's keyed sums, as the ``declared`` keys of assessment.reliability.reliability:
    the model's 'reversed' statement when it has one; else the items the fit's loadings' signs reversed (an empty
    dict when none), so that a resample whose weak loading changes sign still gives the reliability of the sum the
    fit scores, not of another (a bifactor model's specific factor: one resample keyed otherwise put alpha .3 below
    the others).  None, each resample then keyed by its own signs, only where an item is reversed in one factor's
    sum and not in another's (one key per item cannot hold both)."""
    if spec.reverse_keyed:
        return spec.reverse_keyed
    rows = result.groups[0].reliability if result.groups else ()
    turned = {x for r in rows for x in r.reversed}
    if any(x in turned and x not in r.reversed for r in rows for x in r.items):
        return None
    return {x: (float("nan"), float("nan")) for x in turned}


def resample_reliability(spec, table, model, theta: np.ndarray, covariance: np.ndarray, keys) -> dict:
    """The reliability coefficients of the fit at ``theta`` of a model (``table``, ``model``: its structure) to one
    group's sample ``covariance`` (in the table's order of items), computed as the fit computes them
    (assessment.reliability.reliability on the fitted matrices and the sample covariances, method factors left out)
    and read by assessment.reliability_intervals.coefficient_values; ``keys``: the reversed items of the fit's keyed
    sums (:func:`fit_keys`), held in every resample, so that each coefficient is of the sum the fit scores."""
    from cfa_tool.assessment.reliability import reliability
    from cfa_tool.assessment.reliability_intervals import coefficient_values

    with np.errstate(divide="ignore", invalid="ignore"):
        rows, _ = reliability(model.matrices(theta), table.observed, table.latent, covariance,
                              declared=keys, sum_scores=False,
                              not_traits=spec.method_factors | spec.exploratory_factors)
    return coefficient_values(rows)


def resampled_moments(rows: np.ndarray, names: tuple[str, ...], seeds: list[int]) -> list[SampleMoments]:
    """The moments of the resamples of complete ``rows`` drawn with ``seeds`` (each resample's rows drawn from
    its own seed, as :func:`_resample` draws them), computed together from how often each row is drawn: with
    counts c_r and the rows x_i centred at their mean, resample r's mean is m_r = sum_i c_ri x_i / N and its
    covariance (divisor N, as :func:`pipeline.continuous.moments_from_rows`) sum_i c_ri x_i x_i' / N - m_r m_r'
    -- products of each resample's counts with the rows and their cross products (N, p * p).  The moments carry no
    rows, as moments read from summary statistics do: a refit of complete rows uses only the moments."""
    n, p = rows.shape
    counts = np.zeros((len(seeds), n))
    for r, seed in enumerate(seeds):
        counts[r] = np.bincount(np.random.default_rng(seed).integers(0, n, n), minlength=n)
    centre = rows.mean(axis=0)
    centred = rows - centre
    # a stack of (1, N) products, one per resample: each resample's sums do not depend on the others in the
    # batch (one (R, N) product would be summed in blocks that depend on R)
    weights = counts[:, None, :]
    shifts = (weights @ centred)[:, 0] / n
    products = (centred[:, :, None] * centred[:, None, :]).reshape(n, p * p)
    covariances = ((weights @ products)[:, 0] / n).reshape(-1, p, p) - shifts[:, :, None] * shifts[:, None, :]
    means = centre + shifts
    return [SampleMoments(tuple(names), covariances[r], means[r], n, n, 0, "<replication>") for r in range(len(seeds))]


def _resample(rows: np.ndarray, names: tuple[str, ...], seed: int, design, gaps: bool = False):
    """One resample's moments (``gaps``: of rows with gaps, for a full-information refit); under a design
    sampling weights are rescaled to sum to the resample's rows with gaps, as the fit of those rows would
    rescale them (the estimates do not depend on it)."""
    rng = np.random.default_rng(seed)
    if design is None:
        return moments_from_rows(rows[rng.integers(0, len(rows), len(rows))], names, full_information=gaps)
    if design.kind is WeightKind.FREQUENCY and design.clusters is None:
        counts = expanded_counts(design, rng)
        kept = counts > 0
        return moments_from_rows(rows[kept], names, weights=counts[kept].astype(float), n_obs=int(counts.sum()),
                                 full_information=gaps, weight_kind=design.kind)
    picked = resampled_rows(design, rng)
    w = design.weights[picked]
    if design.kind is WeightKind.FREQUENCY:
        n_obs = int(round(w.sum()))
    else:
        n_obs = len(picked)
        if gaps:
            w = w * (len(w) / w.sum())
    return moments_from_rows(rows[picked], names, weights=w, n_obs=n_obs, full_information=gaps,
                             weight_kind=design.kind)


def sampling_units(design) -> list[list[np.ndarray]]:
    """The rows of each cluster (each row its own cluster without clusters), stratum by stratum."""
    n = len(design.weights)
    units = design.clusters if design.clusters is not None else np.arange(n)
    strata = design.strata if design.strata is not None else np.zeros(n, dtype=int)
    out = []
    for h in np.unique(strata):
        in_h = np.flatnonzero(strata == h)
        codes, inverse = np.unique(units[in_h], return_inverse=True)
        order = np.argsort(inverse.ravel(), kind="stable")
        bounds = np.searchsorted(inverse.ravel()[order], np.arange(len(codes) + 1))
        out.append([in_h[order[bounds[c]:bounds[c + 1]]] for c in range(len(codes))])
    return out


def expanded_counts(design, rng: np.random.Generator) -> np.ndarray:
    """How often each record is drawn when the rows its frequency weight stands for are resampled (within
    strata): a row of weight k is k rows, so a resample draws sum(k) rows from them, each with probability
    k / sum(k) per draw (a multinomial count per record), as resampling the expanded data would."""
    n = len(design.weights)
    strata = design.strata if design.strata is not None else np.zeros(n, dtype=int)
    counts = np.zeros(n, dtype=np.int64)
    for h in np.unique(strata):
        in_h = np.flatnonzero(strata == h)
        w = design.weights[in_h]
        total = int(round(w.sum()))
        counts[in_h] = rng.multinomial(total, w / w.sum())
    return counts


def resampled_rows(design, rng: np.random.Generator) -> np.ndarray:
    """Row indices of one cluster-bootstrap resample: in each stratum as many clusters as it has, drawn with
    replacement (with one row per cluster and no strata, the same draw as resampling rows)."""
    picked = []
    for clusters in sampling_units(design):
        for c in rng.integers(0, len(clusters), len(clusters)):
            picked.append(clusters[c])
    return np.concatenate(picked)


def influence_values(spec, rows: np.ndarray, names: tuple[str, ...], theta: np.ndarray,
                     design=None, full_information: bool | None = None) -> tuple[np.ndarray, np.ndarray]:
    """Each row's empirical influence on every table entry, unstandardized and fully standardized
    ((N, E) arrays).

    The ML estimate solves g(theta, s) = -2 D'W (s - sigma) = 0, the gradient of the discrepancy
    (Browne 1974), with D the derivatives of vech(Sigma), W = 1/2 D_p'(Sigma^-1 (x) Sigma^-1) D_p and
    s = vech(S).  g is linear in s, so by the implicit function theorem a change ds moves the
    estimate by H^-1 2 D'W ds, H the observed Hessian of the discrepancy (which, unlike the
    expected information, stays right when the model misfits).  Row i's influence puts
    vech(d_i d_i') - vech(S) for ds, d_i its deviation from the means (Hampel et al. 1986).
    Under a sampling design the moments are weighted, each row's influence is multiplied by its
    weight (rescaled to mean one) and the rows of a cluster are summed: one value per cluster.  A record
    of frequency weight k without clusters is k identical rows: its value is each row's influence, which
    :func:`acceleration` counts k times.
    Rows with gaps (``rows`` holding NaN), or a full-information fit of complete rows (``full_information``; None:
    whether ``rows`` have gaps), whose item means are parameters too: the full-information estimate's influence
    (:func:`full_information_influence`), under a design weighted and summed within clusters as above.
    Entries are affine in theta; standardized values follow by the chain rule, their
    derivatives taken by central differences of the closed-form standardization."""
    return _influences(spec, rows, names, theta, design, full_information)[:2]


def _influences(spec, rows: np.ndarray, names: tuple[str, ...], theta: np.ndarray, design=None,
                full_information: bool | None = None) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """:func:`influence_values`, and apart from them each row's (or cluster's) influence on the estimate theta
    (N, q) and on the sample covariances vech(S) (N, p*: with gaps, the saturated EM covariances,
    :func:`saturated_influence`), by which :func:`reliability_acceleration` follows the reliability."""
    from cfa_tool.assessment.standardized import standardize_entries
    from cfa_tool.pipeline.continuous import estimate

    w = design.weights if design is not None else None
    gaps = bool(np.isnan(rows).any()) if full_information is None else full_information
    options = FitOptions(diagnostics=False, missing=MissingData.FULL_INFORMATION if gaps else None)
    kind = design.kind if design is not None else WeightKind.SAMPLING
    moments = moments_from_rows(rows, names, weights=w, full_information=gaps, weight_kind=kind)
    est = estimate(spec, [(None, moments)], options, start=theta)
    model, table, theta = est.model, est.table, est.theta
    if gaps:
        influence_theta = full_information_influence(est.likelihood, theta)
        influence_moments = saturated_influence(rows, moments.means, moments.covariance, w)
        if design is not None and _row_counts(design) is None:  # weighted scores (weights rescaled to mean
            # one), summed within clusters; a frequency-weighted record without clusters keeps its rows' influence
            scale = (w * len(w) / w.sum())[:, None]
            influence_theta, influence_moments = influence_theta * scale, influence_moments * scale
            influence_theta, influence_moments = (
                np.vstack([x[rows_of].sum(axis=0) for clusters in sampling_units(design) for rows_of in clusters])
                for x in (influence_theta, influence_moments))
    else:
        influence_theta, influence_moments = _complete_row_influence(est, rows, w, design)
    codes, erows, ecols = table.entry_arrays()

    def standardized(t: np.ndarray) -> np.ndarray:
        return standardize_entries(model.matrices(t), codes, erows, ecols, model.entry_values(t))[0]

    d_std = theta_derivatives(standardized, theta)
    return influence_theta @ model.J.T, influence_theta @ d_std.T, influence_theta, influence_moments


def theta_derivatives(function, theta: np.ndarray) -> np.ndarray:
    """The derivatives of a vector ``function`` of theta in each parameter by central differences (steps 1e-6 of
    each parameter's size, at least 1e-6): (outputs, q)."""
    step = 1e-6 * np.maximum(1.0, np.abs(theta))
    if not len(theta):  # every parameter fixed: no derivatives, but their shape (outputs, 0) for the products after
        return np.zeros((len(function(theta)), 0))
    columns = []
    for k in range(len(theta)):
        up, down = theta.copy(), theta.copy()
        up[k] += step[k]
        down[k] -= step[k]
        columns.append((function(up) - function(down)) / (2 * step[k]))
    return np.array(columns).T


def saturated_influence(rows: np.ndarray, mean: np.ndarray, covariance: np.ndarray,
                        weights: np.ndarray | None = None) -> np.ndarray:
    """Each row's empirical influence on the saturated (EM) covariances of rows with gaps, vech(S) (N, p*).

    The saturated estimate psi = (mu, vech Sigma) minimises sum_i w_i f_i, f_i = log|Sigma_oo| + r_i' Sigma_oo^-1 r_i
    the casewise discrepancy (Arbuckle 1996) with r_i = x_i,o - mu_o, whose gradient is dF_i/dmu = -2 u_i and
    dF_i/dSigma = A_i - u_i u_i' (A_i = Sigma_oo^-1 embedded in p x p, u_i = A_i r_i; the form of
    :func:`full_information_influence`), an entry off the diagonal of vech counting both of its places.  By the
    implicit function theorem row i's influence is -H^-1 g_i, H = sum_i w_i dg_i/dpsi taken by central differences
    of the summed gradient (Hampel et al. 1986), of which the Sigma part is returned; ``weights``: the rows'
    weights (the caller weights and sums the influence within clusters, as it does the estimates')."""
    from cfa_tool.inference.robust import vech_indices

    n, p = rows.shape
    I, J = vech_indices(p)
    seen = ~np.isnan(rows)
    patterns, index = np.unique(seen, axis=0, return_inverse=True)
    index = index.ravel()
    w = np.ones(n) if weights is None else np.asarray(weights, dtype=float)
    both = np.where(I != J, 2.0, 1.0)

    members = [np.flatnonzero(index == k) for k in range(len(patterns))]
    centred = np.where(seen, rows, 0.0)

    def scores(mu: np.ndarray, sigma: np.ndarray) -> np.ndarray:
        u = np.empty((n, p))
        A_vech = np.empty((len(patterns), len(I)))
        for k, o in enumerate(patterns):  # pattern by pattern: no (N, p, p) stack
            A = np.zeros((p, p))
            A[np.ix_(o, o)] = np.linalg.inv(sigma[np.ix_(o, o)])
            u[members[k]] = (centred[members[k]] - np.where(o, mu, 0.0)) @ A
            A_vech[k] = A[I, J]
        return np.hstack([-2.0 * u, (A_vech[index] - u[:, I] * u[:, J]) * both])

    psi = len(I) + p
    hessian = np.empty((psi, psi))
    for k in range(psi):
        h = 1e-6 * max(1.0, float(abs(mean[k])) if k < p else float(abs(covariance[I[k - p], J[k - p]])))
        sums = []
        for sign in (1.0, -1.0):
            mu, sigma = mean.astype(float).copy(), covariance.astype(float).copy()
            if k < p:
                mu[k] += sign * h
            else:
                i, j = I[k - p], J[k - p]
                sigma[i, j] += sign * h
                if i != j:
                    sigma[j, i] += sign * h
            sums.append(w @ scores(mu, sigma))
        hessian[:, k] = (sums[0] - sums[1]) / (2 * h)
    # on the scale of an influence function (H the mean Hessian), as the complete rows' vech(d d') - vech(S)
    influence = -w.sum() * np.linalg.solve((hessian + hessian.T) / 2, scores(mean, covariance).T).T
    return influence[:, p:]


def full_information_influence(likelihood, theta: np.ndarray) -> np.ndarray:
    """Each row's empirical influence on the full-information estimate (N, q).

    The estimate solves sum_i g_i(theta) = 0, g_i the gradient of row i's term of the casewise
    discrepancy f_i = log|Sigma_oo| + r_i' Sigma_oo^-1 r_i (r_i = x_i,o - mu_o; Arbuckle 1996):
    dF_i/dSigma = A_i - u_i u_i' and dF_i/dmu = -2 u_i, with A_i = Sigma_oo^-1 embedded in p x p and
    u_i = A_i r_i (the row-by-row form of estimation.fiml's gradient).  By the implicit function
    theorem row i's influence is -H^-1 g_i, H the observed Hessian of the discrepancy (Hampel et al.
    1986); the jackknife's leave-one-out differences approximate it (Efron & Tibshirani 1993, ch. 11)."""
    from cfa_tool.data.patterns import embedded_inverse
    from cfa_tool.inference.standard_errors import observed_information
    from cfa_tool.numerics.linalg import scaled_inverse

    [data] = likelihood.patterns
    model = likelihood.model
    mats = model.matrices(theta)
    A, _ = embedded_inverse(mats.implied_covariance(), data.observed)
    rows = data.rows
    resid = np.where(np.isnan(rows), 0.0, rows - mats.implied_mean())
    u = (A[data.index] @ resid[:, :, None])[:, :, 0]
    d_sigma, d_mu = model.jacobian(theta, 0)
    q, p = len(theta), model.p
    flat = d_sigma.reshape(q, p * p)
    per_pattern = A.reshape(len(A), p * p) @ flat.T  # (P, q): the A_i part, shared by a pattern's rows
    outer = np.einsum("ni,qij,nj->nq", u, d_sigma, u)  # u_i' D_a u_i
    scores = per_pattern[data.index] - outer - 2.0 * u @ d_mu.T
    hessian = likelihood.observed_hessian(theta)
    if hessian is None:
        hessian = observed_information(likelihood.gradient, theta, central=True)
    return -scores @ scaled_inverse(hessian)


def _complete_row_influence(est, rows: np.ndarray, w: np.ndarray | None, design) -> tuple[np.ndarray, np.ndarray]:
    """Each complete row's (or cluster's) influence on the ML estimate (N, q), and on the sample covariances
    vech(S) (N, p*: vech(d_i d_i') - vech(S), weighted and summed within clusters alike); see
    :func:`influence_values`."""
    from cfa_tool.numerics.linalg import scaled_inverse
    from cfa_tool.inference.robust import NormalWeight, vech_indices

    model, theta = est.model, est.theta
    sigma = model.implied(theta)
    I, J = vech_indices(len(sigma))
    d_sigma, _ = model.jacobian(theta, 0)
    delta = d_sigma[:, I, J].T  # (p*, q)
    WD = NormalWeight(np.linalg.inv(sigma), False) @ delta  # W applied in its Kronecker form: no p* x p* matrix
    if w is None:
        dev = rows - rows.mean(axis=0)
        U = dev[:, I] * dev[:, J]
        U -= U.mean(axis=0)
    else:
        dev = rows - w @ rows / w.sum()
        U = dev[:, I] * dev[:, J]
        U = U - w @ U / w.sum()
        if _row_counts(design) is None:  # weighted (rescaled to mean one) and summed within clusters; a
            # frequency-weighted record without clusters keeps each of its rows' influence
            U = U * (w * len(w) / w.sum())[:, None]
            U = np.vstack([U[rows_of].sum(axis=0) for clusters in sampling_units(design) for rows_of in clusters])
    hessian = est.likelihood.observed_hessian(theta)
    if hessian is None:
        hessian = 2.0 * (delta.T @ WD)
    return 2.0 * U @ WD @ scaled_inverse(hessian), U  # (N, q); the Hessian is symmetric


def acceleration(influence: np.ndarray, counts: np.ndarray | None = None,
                 strata: np.ndarray | None = None) -> np.ndarray:
    """BCa acceleration of each column of influence values: sum U^3 / (6 (sum U^2)^(3/2))
    (Efron 1987; Efron & Tibshirani 1993, ch. 14, with the jackknife's differences replaced by
    the empirical influence, which they approximate).  ``counts``: how many rows each line of ``influence``
    stands for (frequency weights), each counted that often in the sums, as the expanded rows would be.
    ``strata``: the stratum of each line, when the resamples draw within strata: U is then centred within its
    stratum, the stratified influence values l_hj = (n_h / n) U_hj of Davison & Hinkley (1997, sec. 3.7), whose
    acceleration sum_h n_h^-3 sum_j l_hj^3 / (6 (sum_h n_h^-2 sum_j l_hj^2)^(3/2)) (sec. 5.3) is the sum above."""
    c = np.ones(len(influence)) if counts is None else np.asarray(counts, dtype=float)
    if strata is None:
        U = influence - c @ influence / c.sum()
    else:  # each stratum's (count-weighted) mean taken out: a resample keeps every stratum's share of the rows
        codes, index = np.unique(np.asarray(strata), return_inverse=True)
        index = index.ravel()
        sums = np.zeros((len(codes), influence.shape[1]))
        np.add.at(sums, index, c[:, None] * influence)
        U = influence - (sums / np.bincount(index, weights=c, minlength=len(codes))[:, None])[index]
    denominator = 6.0 * (c @ U**2) ** 1.5
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(denominator > 0, c @ U**3 / np.where(denominator > 0, denominator, 1.0), 0.0)


def unit_strata(design) -> np.ndarray | None:
    """The stratum of each line of :func:`influence_values` under ``design`` (each record's when records are the
    lines, :func:`_row_counts`; else each sampling unit's, in the order of :func:`sampling_units`), or None without
    strata."""
    if design is None or design.strata is None:
        return None
    if _row_counts(design) is not None:
        return design.strata
    units = sampling_units(design)
    return np.repeat(np.unique(design.strata), [len(clusters) for clusters in units])


def _row_counts(design) -> np.ndarray | None:
    """How many rows each record stands for when the bootstrap resamples rows, not records: frequency weights
    without clusters (None otherwise: each record, or each cluster, is one unit of the resampling)."""
    if design is not None and design.kind is WeightKind.FREQUENCY and design.clusters is None:
        return design.weights
    return None


def bootstrap_options(replications: int, seed: int, workers: int | None, scheduler: str | None = None
                      ) -> tuple[int, int]:
    """The bootstrap's options checked (at least 10 resamples; local workers not beside a scheduler)."""
    check.workers(workers, scheduler)
    return check.replications(replications, minimum=10), check.seed(seed)


def bollen_stine_rows(rows: np.ndarray, sigma: np.ndarray, weights: np.ndarray | None = None) -> np.ndarray:
    """Rows transformed to have the model-implied covariance matrix exactly (Bollen & Stine 1992); with
    ``weights``, their weighted covariance."""
    from scipy import linalg  # its matrix square root, for Bollen-Stine only: ~80 ms of import off a bootstrap's start

    w = np.ones(len(rows)) if weights is None else weights
    mean = w @ rows / w.sum()
    dev = rows - mean
    S = (dev * w[:, None]).T @ dev / w.sum()
    transform = np.real(linalg.inv(linalg.sqrtm(S)) @ linalg.sqrtm(sigma))
    return dev @ transform + mean


#: why BCa intervals asked for cannot be given for ordinal items (the report of an ordinal bootstrap says it too:
#: reporting.workflow_tables.ORDINAL_BOOTSTRAP)
BCA_ORDINAL = ("BCa intervals take their acceleration from each row's influence on the maximum likelihood estimates "
               "of continuous items, which has no counterpart for ordinal answers fitted by least squares, so they "
               "cannot be given here; leave out bca=True (the percentile intervals are given)")


def bootstrap_fit(result: FitResult, spec, rows: np.ndarray, replications: int = 1000, seed: int = 1,
                  bollen_stine: bool | None = None, bca: bool | None = None, workers: int | None = None,
                  scheduler: str | None = None, progress=None, design=None) -> BootstrapResult:
    """Bootstrap a converged single-group fit of ``rows`` (columns in the model's order; with gaps for a
    full-information fit, each resample then refitted so); ``design``
    the rows' data.sample_design.RowDesign, if any (clusters resampled, weights kept).  ``bollen_stine``: the
    Bollen-Stine p-value (None: where it applies, that is for continuous items).  A fit of ordinal items is
    bootstrapped by refitting each resample with its own thresholds and polychoric correlations (``rows`` then
    hold the answers, with gaps where the fit kept them), with percentile intervals only.  ``bca``: BCa intervals
    beside the percentile ones (None: where they apply, that is for continuous items; asked for with ordinal items,
    an error, never dropped silently)."""
    from cfa_tool import options as check

    bollen_stine, bca = check.yes_or_no("bollen_stine", bollen_stine, True), check.yes_or_no("bca", bca, True)
    if result.multigroup:
        raise OptionError("the bootstrap works on single-group fits")
    if not result.converged:
        raise OptionError("the model did not converge, so there is nothing to bootstrap")
    replications, seed = bootstrap_options(replications, seed, workers, scheduler)
    if result.method.ordinal:
        if design is not None:
            raise OptionError(f"{ORDINAL_DESIGN}; leave out the design")
        if bollen_stine is True:
            raise OptionError("the Bollen-Stine bootstrap of the test transforms continuous rows so that the model "
                              "holds exactly, which has no counterpart for ordinal answers; leave it out")
        if bca is True:
            raise OptionError(BCA_ORDINAL)
        return _bootstrap_ordinal(result, spec, rows, replications, seed, workers, scheduler, progress)
    bca = bca is not False  # where they apply (continuous items), BCa intervals unless left out
    gaps = result.method.missing is MissingData.FULL_INFORMATION
    not_computed = None
    if result.fit.df == 0:  # nothing to test (as the fit says); before the gaps, whose reason would not be the first
        if bollen_stine is True:
            raise OptionError(f"{BOLLEN_STINE_NO_DF}; leave it out")
        not_computed = BOLLEN_STINE_NO_DF if bollen_stine is None else None
        bollen_stine = False
    if gaps and bollen_stine is not False:
        if bollen_stine is True:
            raise OptionError(f"{BOLLEN_STINE_WITH_GAPS}; leave it out, or bootstrap the complete rows "
                              f"({check.Option.INCOMPLETE_ROWS.given('listwise')})")
        if bollen_stine is None:
            not_computed = BOLLEN_STINE_WITH_GAPS
        bollen_stine = False
    moments_rows = rows
    names = result.observed
    start = result.theta
    seeds = np.random.SeedSequence(seed).generate_state(2 * replications)
    keys = fit_keys(spec, result)
    tasks = [(spec, moments_rows, names, int(s), start, design, gaps, True, keys) for s in seeds[:replications]]
    draws = run_tasks(_replicate, tasks, workers, scheduler, progress, refits_together(REFITS_TOGETHER, len(start)),
                      batched=True)
    ok = [d for d in draws if d[0]]
    if len(ok) < 2:
        raise EstimationError(f"{len(ok)} of {replications} bootstrap resamples could be fitted, too few for intervals; "
                              f"the model is too fragile for these data (check for Heywood cases, or use more rows)")
    values = np.array([d[1] for d in ok])
    standardized = np.array([d[2] for d in ok])
    accel_values = accel_std = None
    if bca:
        influence, influence_std, influence_theta, influence_moments = _influences(spec, moments_rows, names, start,
                                                                                   design, gaps)
        counts, strata = _row_counts(design), unit_strata(design)
        accel_values, accel_std = acceleration(influence, counts, strata), acceleration(influence_std, counts, strata)
    intervals = _intervals(result, values, standardized, accel_values, accel_std)
    accel_reliability = None
    if bca:
        accel_reliability = reliability_acceleration(spec, moments_rows, names, start, design, gaps, influence_theta,
                                                     influence_moments, result)
    reliability_intervals = _reliability_intervals(result, [d[6] for d in ok], accel_reliability)
    p_bs = converged_bs = None
    if bollen_stine is not False:
        transformed = bollen_stine_rows(moments_rows, result.implied_covariance,
                                        design.weights if design is not None else None)
        btasks = [(spec, transformed, names, int(s), start, design, False, False) for s in seeds[replications:]]
        bdraws = [d for d in run_tasks(_replicate, btasks, workers, scheduler, progress,
                                         refits_together(REFITS_TOGETHER, len(start)), batched=True)
                  if d[0]]
        converged_bs = len(bdraws)
        if bdraws:
            p_bs = float(np.mean([d[3] >= result.fit.chi_square for d in bdraws]))
    count, named = counted_problems(d[5] for d in ok)  # as each worker judged its resamples
    return BootstrapResult(fit=result, replications=replications, converged=len(ok), seed=seed,
                           intervals=intervals, bollen_stine_p=p_bs, bollen_stine_converged=converged_bs,
                           failed=sum(d[4] for d in draws), bollen_stine_not_computed=not_computed,
                           inadmissible=count, inadmissible_named=named, reliability=reliability_intervals)


def _bootstrap_ordinal(result: FitResult, spec, values: np.ndarray, replications: int, seed: int, workers, scheduler,
                       progress) -> BootstrapResult:
    """The bootstrap of a one-group ordinal fit (:mod:`cfa_tool.workflows.ordinal_resampling`): percentile intervals
    only.  A resample lacking an answer category is fitted with those it holds and kept; a threshold with no answer on
    one side of it there has no value, and its interval is not available (with the count of such resamples), never
    taken from the other resamples alone, which would condition it on the rare answer being drawn (hostile s22: such
    an interval ended at the estimate); every other interval comes from all converged resamples.  BCa's acceleration comes from the influence of each row on the ML estimates, which has no counterpart
    here, and the Bollen-Stine transformation of continuous rows has none for ordinal answers: the test stays the
    fit's adjusted one."""
    from cfa_tool.workflows.ordinal_resampling import OrdinalFitting, Outcome, analysed_rows, lacked_categories, resample

    fitting = OrdinalFitting.of_fit(spec, result, keep_levels=True)
    rows = analysed_rows(fitting, values)
    keys = tuple((r.kind, r.variables) for r in result.estimates)
    states = np.random.SeedSequence(seed).generate_state(replications)
    draws = run_tasks(resample, [(fitting, rows, int(s), keys) for s in states], workers, scheduler, progress)
    ok = [d for d in draws if d.converged]
    if len(ok) < 2:
        raise EstimationError(f"{len(ok)} of {replications} bootstrap resamples could be fitted, too few for intervals; "
                              f"the model is too fragile for these data (check for Heywood cases, rare answer "
                              f"categories, or use more rows)")
    lacked = np.array([d.lacked or (0,) * len(keys) for d in ok])
    intervals = _intervals(result, np.array([d.values for d in ok]), np.array([d.standardized for d in ok]),
                           lacked=lacked)
    from cfa_tool.assessment.reliability_intervals import of_fit_sums

    fit_rows = result.groups[0].reliability if result.groups else ()  # each resample keyed by its own loadings' signs:
    # a coefficient of a sum keyed otherwise than the fit's has no value there (assessment.reliability_intervals)
    reliability_intervals = _reliability_intervals(result, [of_fit_sums(d.reliability, fit_rows) for d in ok])
    count, named = counted_problems(d.problems for d in ok)  # as each resample's fit judged itself
    lacking, lacked_each = lacked_categories(ok, result.observed)
    return BootstrapResult(fit=result, replications=replications, converged=len(ok), seed=seed, intervals=intervals,
                           bollen_stine_p=None, bollen_stine_converged=None,
                           failed=sum(d.outcome is Outcome.FAILED for d in draws), inadmissible=count,
                           inadmissible_named=named, resamples_lacking=lacking, lacked=lacked_each,
                           reliability=reliability_intervals)


def _intervals(result: FitResult, values: np.ndarray, standardized: np.ndarray, accel_values: np.ndarray | None = None,
               accel_std: np.ndarray | None = None, lacked: np.ndarray | None = None) -> tuple[BootInterval, ...]:
    """The intervals of every free estimate (and of every loading's standardized value) from the draws (one row per
    converged resample, one column per estimate row of ``result``); BCa ones where accelerations are given.
    ``lacked`` (same shape, ordinal items): -1 or 1 where a resample held no answer below or above a threshold, which
    then has no value there; such a threshold's interval is not available, with those counts."""
    intervals = []
    nan2 = (float("nan"), float("nan"))
    for e, row in enumerate(result.estimates):
        if not row.free and row.kind != "loading":
            continue
        if lacked is not None and lacked[:, e].any():
            below, above = int(np.sum(lacked[:, e] < 0)), int(np.sum(lacked[:, e] > 0))
            intervals.append(BootInterval(row.kind, row.variables, "unstandardized", row.estimate, nan2, nan2,
                                          float("nan"), below, above))
            continue
        for scale, draws_e, point, accel in (
            ("unstandardized", values[:, e], row.estimate, None if accel_values is None else accel_values[e]),
            ("standardized", standardized[:, e], row.standardized, None if accel_std is None else accel_std[e]),
        ):
            if scale == "unstandardized" and not row.free:
                continue
            if scale == "standardized" and row.kind == "threshold":  # on the latent response's scale already
                continue
            if not np.isfinite(draws_e).all() or np.ptp(draws_e) <= 1e-10 * max(1.0, float(np.abs(draws_e).max())):
                continue  # a value fixed by the scaling (a standardized factor variance of 1, up to rounding)
            intervals.append(BootInterval(row.kind, row.variables, scale, point, _percentile(draws_e),
                                          _bca(draws_e, point, accel) if accel is not None else (np.nan, np.nan),
                                          float(np.std(draws_e, ddof=1))))
    return tuple(intervals)


def reliability_acceleration(spec, rows: np.ndarray, names: tuple[str, ...], theta: np.ndarray, design, gaps: bool,
                             influence_theta: np.ndarray, influence_moments: np.ndarray,
                             result: FitResult) -> dict:
    """BCa acceleration of each reliability coefficient of the fit (assessment.reliability_intervals):
    {(factor, coefficient): a}.

    A coefficient is a function of the estimates theta (omega: of the fitted loadings, factor covariances and
    residual variances) and of the sample covariances S (alpha), computed by the fit's own function
    (:func:`resample_reliability`); each row's influence on it is by the chain rule its influence on theta
    (:func:`influence_values`) times the coefficient's derivatives in theta, plus its influence on vech(S) times
    the derivatives in S (Hampel et al. 1986; with gaps S is the saturated EM covariance matrix,
    :func:`saturated_influence`), the derivatives taken by central differences of that function."""
    from cfa_tool.assessment.reliability_intervals import coefficient_values
    from cfa_tool.inference.robust import vech_indices

    table, model = model_structure(spec, None, gaps)
    keys = list(coefficient_values(result.groups[0].reliability))
    if not keys:
        return {}
    S = np.asarray(result.groups[0].sample_covariance, dtype=float)
    held = fit_keys(spec, result)

    def values(t: np.ndarray, cov: np.ndarray) -> np.ndarray:
        found = resample_reliability(spec, table, model, t, cov, held)
        return np.array([found.get(k, np.nan) for k in keys])

    d_theta = theta_derivatives(lambda t: values(t, S), theta).T
    p = len(S)
    I, J = vech_indices(p)  # the order of _complete_row_influence's vech(S)
    d_moments = np.empty((len(I), len(keys)))
    h = 1e-6 * max(1.0, float(np.abs(S).max()))
    for k, (i, j) in enumerate(zip(I.tolist(), J.tolist())):
        up, down = S.copy(), S.copy()
        up[i, j] += h
        down[i, j] -= h
        if i != j:
            up[j, i] += h
            down[j, i] -= h
        d_moments[k] = (values(theta, up) - values(theta, down)) / (2 * h)
    influence = influence_theta @ d_theta + influence_moments @ d_moments
    with np.errstate(invalid="ignore"):
        accel = acceleration(influence, _row_counts(design), unit_strata(design))
    return dict(zip(keys, accel.tolist()))


def _reliability_intervals(result: FitResult, draws: list[dict], accel: dict | None = None) -> tuple:
    """The bootstrap intervals of every reliability coefficient of the fit (assessment.reliability_intervals) from
    each converged resample's coefficients (``draws``: :func:`resample_reliability`'s dictionaries), by the
    percentile method and, where ``accel`` gives the acceleration, BCa (:func:`_bca`), as the estimates' intervals
    are made.  A coefficient the fit withholds has none, with
    the reason; one that some resample gave no finite value has none either, with that count, never taken from the
    other resamples alone."""
    from cfa_tool.assessment.reliability_intervals import ReliabilityInterval, coefficients, withheld

    if result.multigroup or not result.groups:
        return ()
    nan2 = (float("nan"), float("nan"))
    accel = accel or {}
    out = []
    for row in result.groups[0].reliability:
        why = withheld(row)
        for coefficient, estimate in coefficients(row):
            key = (row.factor, coefficient)
            if why is not None:
                out.append(ReliabilityInterval(row.factor, coefficient, estimate, nan2, nan2, float("nan"), why))
                continue
            values = np.array([d.get(key, np.nan) for d in draws], dtype=float)
            lacking = int(np.sum(~np.isfinite(values)))
            if lacking or not len(values):
                out.append(ReliabilityInterval(row.factor, coefficient, estimate, nan2, nan2, float("nan"),
                                               without_value=lacking))
                continue
            a = accel.get(key)
            bca = _bca(values, estimate, a) if a is not None and math.isfinite(estimate) else nan2
            out.append(ReliabilityInterval(row.factor, coefficient, estimate, _percentile(values), bca,
                                           float(np.std(values, ddof=1))))
    return tuple(out)


def _percentile(draws: np.ndarray) -> tuple[float, float]:
    low, high = np.percentile(draws, [2.5, 97.5])
    return float(low), float(high)


def _bca(draws: np.ndarray, point: float, a: float, level: float = 0.95) -> tuple[float, float]:
    """Efron (1987): z0 from the share of draws below the estimate, ``a`` the acceleration."""
    share = np.mean(draws < point) + 0.5 * np.mean(draws == point)
    if share <= 0 or share >= 1 or not np.isfinite(a):
        return (float("nan"), float("nan"))
    z0 = dist.norm_ppf(share)
    out = []
    for q in ((1 - level) / 2, (1 + level) / 2):
        z = dist.norm_ppf(q)
        adjusted = dist.norm_cdf(z0 + (z0 + z) / (1 - a * (z0 + z)))
        out.append(float(np.percentile(draws, 100 * adjusted)))
    return out[0], out[1]


def bootstrap(model: str | Path | Spec, data: pd.DataFrame | str | Path, replications: int = 1000, seed: int = 1,
              bollen_stine: bool | None = None, bca: bool | None = None, workers: int | None = None, scheduler: str | None = None,
              progress=None, sheet: str | None = None, names_row: int | None = None, first_data_row: int | None = None, missing_codes: tuple[float, ...] = (),
              keep: tuple[str, ...] | list[str] = (), rename=None, weights: str | None = None, cluster: str | None = None,
              strata: str | None = None, weight_kind: str | None = None, ordinal: str | list[str] | None = None,
              ordinal_estimator: str | None = None, missing: str | None = None, id_column: str | None = None,
              max_iterations: int = check.ITERATION_LIMIT):
    """Fit the model, then bootstrap it: the result holds the fit (``.fit``) and its bootstrap.  A sampling design (``weights``,
    ``cluster``, ``strata``, ``weight_kind``, as for ``fit``) weights the fit and every resample, and the
    resamples draw whole clusters within strata.  Ordinal items (an 'ordinal' statement, or ``ordinal`` and
    ``ordinal_estimator`` as for ``fit``) are fitted by least squares, and each resample is refitted so, with
    percentile intervals only (``bca``: BCa intervals too, None where they apply: for continuous items; asked for
    with ordinal items, an error).  ``id_column``: the column that names each row (never analysed), beside the row numbers of the cautions about
    rows, as for ``fit``; ``max_iterations``: the iteration limit of the fit to the data, as for ``fit`` (each
    resample's refit starts from its estimates)."""
    replications, seed = bootstrap_options(replications, seed, workers, scheduler)
    design = design_columns(weights, cluster, strata, weight_kind)
    spec, loaded, notes = read_inputs_with_notes(model, data, sheet, missing_codes, keep,
                                                 (id_column,) if isinstance(id_column, str) else (),
                                                 names_row=names_row, first_data_row=first_data_row,
                                                 rename=rename, chosen=chosen_columns(id_column=id_column, design=design),
                                                 keeps_gaps=keeps_rows_with_gaps(missing))
    frame, source = loaded.frame, loaded.source
    ids, named_by = rows_named(loaded, id_column, spec.observed_names)
    spec, ordinal_items = ordinal_model(spec, ordinal)  # the model as fit reads it, before it is checked
    one_group_only(spec, "the bootstrap resamples one group's rows")
    without_exploratory_blocks(spec, "bootstrap", "it resamples the parameters, and a block's rotated loadings are "
                                                  "not among them")
    if ordinal_items or ordinal_estimator is not None:
        if design is not None:
            raise OptionError(f"{ORDINAL_DESIGN}, so the {design.names[0][0]} column '{design.names[0][1]}' cannot "
                              f"apply; leave out the design")
        # the rows as fit takes them: every answer (pairwise present rows) by default, the complete rows with
        # missing='listwise' (a half of halves drawn from the complete rows is read so: data.halves.half_kept), in
        # the fit and in every resample (ordinal_resampling.analysed_rows); full-information ML refused as fit does
        with odd_values_named(loaded):  # values that look like no answers: named first when the fit fails
            result = with_odd_values(_fit_rows(spec, loaded, notes, None, None, FitOptions(missing=missing, max_iterations=max_iterations),
                                               ordinal,
                                               ordinal_estimator), loaded, None, spec, None, ids, named_by)
        return bootstrap_fit(result, spec, numeric_columns(frame, result.observed, source), replications, seed,
                             bollen_stine, bca, workers, scheduler, progress)
    if design is not None:
        frame, design_notes = check_design(frame, design, spec.observed_names, None, source)
        notes = list(notes) + design_notes
    handling, missing_notes = refit_missing_handling(frame, spec.observed_names, missing)
    notes = missing_notes + list(notes)
    options = FitOptions(missing=handling, max_iterations=max_iterations)
    if design is not None:
        options = design_test(options, design)
        refuse_large_robust_route(spec, options, design)  # before the moments and the fit
        [(_, moments)], _ = moments_for(spec, frame, source, missing=handling, design=design)
        refuse_lone_strata(moments.design, design, source, "the resamples would draw that one again and again, "
                           "so its stratum would add no variation")
    else:
        moments = sample_moments(frame, spec.observed_names, source, missing=handling)
    with odd_values_named(loaded):  # values that look like no answers: named first when the fit fails
        # described as fit describes it: the report's cautions on the model (a just-identified higher-order part) too
        result = _described(converged(fit_moments(spec, moments, options)), spec, None)
    result = replace(result, warnings=tuple(notes) + result.warnings)  # what reading and the row filters did
    if design is not None:
        result = with_design(result, design_summary(frame, design, [moments]), [moments])
    result = with_odd_values(result, loaded, None, spec, design, ids, named_by)
    order = [moments.names.index(n) for n in result.observed]
    return bootstrap_fit(result, spec, moments.rows[:, order], replications, seed, bollen_stine, bca, workers, scheduler,
                         progress, moments.design)
