"""How good the scores are: determinacy, reliability, correlations, and sum scores beside them.

For complete answers and a linear score s = alpha + W'(x - mu) of factors F (weights from
:mod:`cfa_tool.scoring.weights`), with C = Cov(x, eta) = L Phi:

* Cov(s) = W' Sigma W and Cov(s, eta_F) = W' C_F;
* the correlation of each score with its factor, corr(s_k, eta_k) = (W'C)_kk / sqrt((W'Sigma W)_kk Phi_kk),
  is Grice's (2001) validity coefficient; for regression scores it is the factor score
  determinacy rho_k = sqrt((Phi L' Sigma^-1 L Phi)_kk / Phi_kk) (Grice 2001, after Guttman 1955),
  and 2 rho^2 - 1 is the smallest correlation two equally valid sets of scores can have (Guttman 1955);
* the reliability of a method's scores is the squared correlation of the score with its factor
  (Beauducel 2011, as recalled from memory; for Bartlett scores it equals Phi_kk / Var(s_k), the share of the score's variance
  that is the factor's);
* the correlations among each method's scores, beside the factors' correlations (Grice 2001 compares them:
  regression scores overstate them, Bartlett scores too as a rule, correlation-preserving scores keep them).

Precision of one person's score (:class:`Precision`), in the factor's units and in its standard deviations: the
standard error SE, the root mean squared error of the score about its factor with every item answered; a 95%
band of +/- 1.96 SE about the score (a normal approximation); and the smallest difference between two people's
scores that exceeds chance at the 5% level, 1.96 sqrt(2) SE, the standard error of the difference of two
independent errors (Gulliksen 1950; recalled from memory, common practice).

Precision of a person's item sum (or mean: the sum divided by the number of items): the standard error of
measurement SEM = SD sqrt(1 - omega) (Lord & Novick 1968), SD the keyed sum's standard deviation under the fitted
model and omega its reliability, with the same band and smallest real difference as a factor score's.  A row that
answered a of the J items: the SEM of the sum of those items by the same formula (their SD and omega under the
model), times J/a for the prorated sum and divided by a for the mean (:func:`answered_sum_sems`).

Sum scores of ordinal items: the same keyed sums of the answers' codes, with the reliability of Green & Yang (2009)
from the thresholds, loadings and factor covariances (:mod:`cfa_tool.assessment.ordinal_reliability`).

Sum scores: the unit-weighted sum of the items that measure a factor (directly or through the
factors below it), each reverse-keyed item (negative total loading) reversed (its sign flipped), with
omega of the sum (McDonald 1999): omega = (k'C_f)^2 / (Phi_ff k'Sigma k) for keys k and the items' covariances
with the factors C = L Phi ((k'G_f)^2 Phi_ff / k'Sigma k, G = L A, where the items measure the factor alone), by the
formula and keys of the fit's reliability (:func:`cfa_tool.assessment.reliability.keyed_omega`,
:func:`cfa_tool.assessment.reliability.sum_keys`).
Each person's item sum and mean, prorated from the answered items: :mod:`cfa_tool.scoring.item_sums`.
"""

from __future__ import annotations

from collections.abc import Collection, Sequence
from dataclasses import dataclass

import numpy as np

from cfa_tool.assessment.ordinal_reliability import (due_to_factor, observed_sum_factor_correlation,
                                                      observed_sum_reliability)
from cfa_tool.assessment.reliability import keyed_omega, sum_keys
from cfa_tool.numerics.plain import clean
from cfa_tool.scoring.methods import DETERMINACY_CAUTION, ITEM_METHODS, LINEAR_METHODS, ScoreMethod
from cfa_tool.scoring.model import OrdinalScoringModel, ScoringModel, checked_covariance
from cfa_tool.scoring.weights import pattern_weights


def _correlation(cov: np.ndarray) -> np.ndarray:
    sd = np.sqrt(np.clip(np.diag(cov), 0.0, None))
    with np.errstate(invalid="ignore", divide="ignore"):
        return cov / np.outer(sd, sd)


@dataclass(frozen=True)
class MethodQuality:
    """One method's scores of one group, from the model (complete answers)."""

    method: ScoreMethod
    factors: tuple[str, ...]
    validity: tuple[float, ...]  # correlation of each score with its factor (Grice 2001); NaN where not scored
    reliability: tuple[float, ...]  # its square (Beauducel 2011)
    root_mean_squared_error: tuple[float, ...]  # of the score about its factor
    score_correlations: np.ndarray  # (m, m) correlations among the scores

    def to_dict(self) -> dict:
        return clean({"method": self.method.value, "factors": list(self.factors), "validity": list(self.validity),
                      "reliability": list(self.reliability),
                      "root_mean_squared_error": list(self.root_mean_squared_error),
                      "score_correlations": self.score_correlations.tolist()})


@dataclass(frozen=True)
class SumScore:
    """The keyed unit-weighted sum of one factor's items with every item answered: its reliability and spread under
    the fitted model, computed once (:func:`sum_quality`, :func:`ordinal_sum_quality`) and read by every table that
    shows them (the sums' table, the item sums' column of the quality table, their precision)."""

    factor: str
    items: tuple[str, ...]
    reversed_items: tuple[str, ...]  # reverse-keyed (negative total loading): their sign is flipped in the sum
    #: McDonald (1999) of the keyed sum (Green & Yang 2009 for ordinal answers' codes); NaN for a sum of one item,
    #: whose reliability restates the error variance the model fixes (Bollen 1989, ch. 7), as the fit's reliability
    omega: float
    validity: float  # correlation of the sum with the factor
    variance: float = float("nan")  # of the keyed sum under the fitted model (k'Sigma k; Green & Yang 2009, eq. 19)

    @property
    def sd(self) -> float:
        """The keyed sum's standard deviation under the fitted model."""
        return float(np.sqrt(self.variance)) if self.variance >= 0 else float("nan")

    def to_dict(self) -> dict:
        return clean({"factor": self.factor, "items": list(self.items), "reversed_items": list(self.reversed_items),
                      "omega": self.omega, "validity": self.validity, "sd": self.sd})


#: the normal quantile of a two-sided 95% band
Z95 = 1.959963984540054


@dataclass(frozen=True)
class Precision:
    """How precise one person's score of one factor is (module docstring), for one method."""

    factor: str
    method: ScoreMethod
    scale_sd: float  # the standard deviation of the score's scale: the factor's, or an item sum's or mean's
    reliability: float  # of the method's scores
    standard_error: float  # root mean squared error of the score about its factor (an item sum's: its SEM)
    band: float  # half-width of the 95% band, Z95 * SE
    smallest_difference: float  # Z95 * sqrt(2) * SE

    @classmethod
    def of(cls, factor: str, method: ScoreMethod, scale_sd: float, reliability: float,
           standard_error: float) -> Precision:
        """The band and the smallest real difference from the standard error (module docstring: Gulliksen 1950)."""
        se = float(standard_error)
        return cls(factor, method, float(scale_sd), float(reliability), se, Z95 * se, Z95 * np.sqrt(2.0) * se)

    @property
    def band_in_sd(self) -> float:
        return self.band / self.scale_sd

    @property
    def smallest_difference_in_sd(self) -> float:
        return self.smallest_difference / self.scale_sd

    def to_dict(self) -> dict:
        return clean({"factor": self.factor, "method": self.method.value, "scale_sd": self.scale_sd,
                      "reliability": self.reliability, "standard_error": self.standard_error, "band_95": self.band,
                      "band_95_in_sd": self.band_in_sd, "smallest_difference": self.smallest_difference,
                      "smallest_difference_in_sd": self.smallest_difference_in_sd})


@dataclass(frozen=True)
class ScoreQuality:
    """Quality of each method's scores for one group (population values under the fitted model)."""

    group: str | None
    factors: tuple[str, ...]
    determinacy: tuple[float, ...]  # Grice (2001)
    low_determinacy: tuple[bool, ...]  # below DETERMINACY_CAUTION
    factor_correlations: np.ndarray  # (m, m)
    methods: tuple[MethodQuality, ...]
    sums: tuple[SumScore, ...]
    # each method's Precision of each scored factor, methods in the order of ``methods``; the same field as the
    # ordinal items' quality (workflows.factor_scores.OrdinalQuality), read the one way by :func:`precision_of`
    precision: tuple[Precision, ...] = ()

    def method(self, method: ScoreMethod) -> MethodQuality:
        return next(q for q in self.methods if q.method is method)

    def to_dict(self) -> dict:
        return clean({"group": self.group, "factors": list(self.factors), "determinacy": list(self.determinacy),
                      "low_determinacy": list(self.low_determinacy), "determinacy_caution": DETERMINACY_CAUTION,
                      "factor_correlations": self.factor_correlations.tolist(),
                      "methods": [q.to_dict() for q in self.methods], "sums": [s.to_dict() for s in self.sums],
                      "precision": [p.to_dict() for p in self.precision]})


def precision_of(quality, method: ScoreMethod) -> tuple[Precision, ...]:
    """The :class:`Precision` of each factor scored by ``method`` that one group's quality holds (continuous items'
    :class:`ScoreQuality` or the ordinal items' quality, whose one method is the posterior mean)."""
    return tuple(p for p in quality.precision if p.method is method)


def method_precision(quality: MethodQuality, factor_sd) -> tuple[Precision, ...]:
    """Each scored factor's :class:`Precision` for one linear method from its root mean squared error about the
    factor (module docstring: Gulliksen 1950); ``factor_sd``: sqrt(Phi_kk) per factor."""
    return tuple(Precision.of(f, quality.method, sd, rel, se)
                 for f, sd, rel, se in zip(quality.factors, factor_sd, quality.reliability,
                                           quality.root_mean_squared_error)
                 if np.isfinite(se) and np.isfinite(rel))


def determinacy(model: ScoringModel) -> np.ndarray:
    """rho_k = sqrt((Phi L' Sigma^-1 L Phi)_kk / Phi_kk) (Grice 2001)."""
    sigma = checked_covariance(model)
    C = model.item_factor_covariance
    explained = np.einsum("pk,pk->k", C, np.linalg.solve(sigma, C))
    return np.sqrt(np.clip(explained / np.diag(model.factor_covariance), 0.0, None))


def method_quality(model: ScoringModel, methods: tuple[ScoreMethod, ...] = LINEAR_METHODS) -> tuple[MethodQuality, ...]:
    """Validity, reliability, error and score correlations of each linear method (complete answers)."""
    sigma = checked_covariance(model)
    everything = np.ones((1, model.p), dtype=bool)
    weights = pattern_weights(model, everything, tuple(methods))
    phi_diag = np.diag(model.factor_covariance)
    out = []
    for method in methods:
        pw = weights[method]
        W = np.nan_to_num(pw.weights[0])
        scored = ~np.isnan(pw.weights[0]).any(axis=0)
        cov = W.T @ sigma @ W
        cross = np.diag(W.T @ model.item_factor_covariance)
        with np.errstate(invalid="ignore", divide="ignore"):
            validity = np.where(scored, cross / np.sqrt(np.diag(cov) * phi_diag), np.nan)
        corr = _correlation(cov)
        corr[~scored, :] = np.nan
        corr[:, ~scored] = np.nan
        rmse = np.sqrt(np.clip(np.diagonal(pw.mean_squared_error[0]), 0.0, None))
        out.append(MethodQuality(method, model.factors, tuple(float(v) for v in validity),
                                 tuple(float(v) ** 2 for v in validity), tuple(float(v) for v in rmse), corr))
    return tuple(out)


def model_keys(model: ScoringModel, declared: Collection[str] | None = None) -> np.ndarray:
    """(p, m) the keys of a scoring model's sums: :func:`cfa_tool.assessment.reliability.sum_keys` (the one reading
    of the keys of the fit's sums, which the fit's reliability and its omega's delta method use) of its matrices
    (``declared``: the items of the model's 'reversed' statement, None without one)."""
    return sum_keys(model.loadings, model.total_loadings, model.factor_covariance, model.implied_covariance,
                    model.items, declared)


def _keyed_variances(sigma: np.ndarray, keys: np.ndarray) -> np.ndarray:
    """k'Sigma k of each column of keys (p, m): the variance of each factor's keyed sum under the model."""
    return np.einsum("ij,ij->j", keys, sigma @ keys)


def _one_item_omega(omega: float, items: Sequence) -> float:
    """``omega``, or NaN for a sum of one item: with one indicator the factor's share of its variance is whatever the
    fixed error variance makes it (Bollen 1989, ch. 7), the rule of the fit's reliability
    (assessment.reliability), so the scores' tables show no coefficient the fit's table withholds."""
    return float("nan") if len(items) == 1 else float(omega)


def sum_quality(model: ScoringModel, declared: Collection[str] | None = None) -> tuple[SumScore, ...]:
    """Omega (McDonald 1999), validity and variance k'Sigma k of each factor's keyed sum (keys: :func:`model_keys`)."""
    sigma = checked_covariance(model)
    keys = model_keys(model, declared)
    phi, C = model.factor_covariance, model.item_factor_covariance
    variances = _keyed_variances(sigma, keys)
    with np.errstate(invalid="ignore", divide="ignore"):
        omegas = keyed_omega(keys, C, np.diag(phi), variances)  # the fit's reliability's formula
    out = []
    for f, name in enumerate(model.factors):
        k = keys[:, f]
        if not k.any():
            continue
        variance, omega = float(variances[f]), float(omegas[f])
        validity = float(k @ C[:, f] / np.sqrt(variance * phi[f, f]))
        items = tuple(model.items[i] for i in np.flatnonzero(k))
        reversed_items = tuple(model.items[i] for i in np.flatnonzero(k < 0))
        out.append(SumScore(name, items, reversed_items, _one_item_omega(omega, items), validity, variance))
    return tuple(out)


def _ordinal_sum_items(model: OrdinalScoringModel, keys: np.ndarray) -> np.ndarray | None:
    """The items of one factor's keyed sum of ordinal answers (``keys``: its column of :func:`model_keys`); None when
    it has none, or takes in a continuous item beside the ordinal ones (whose codes are no answers to a threshold
    model, so that the sum's reliability and spread under the model are not known)."""
    idx = np.flatnonzero(keys)
    return None if not len(idx) or any(not len(model.thresholds[i]) for i in idx) else idx


def item_sum_precision(sums: Sequence[SumScore], methods: Sequence[ScoreMethod]) -> tuple[Precision, ...]:
    """The :class:`Precision` of each keyed sum's item sum and item mean among ``methods``, from the sum's standard
    deviation SD under the model and its reliability omega (:class:`SumScore`, the one value every table reads): the
    standard error of measurement SEM = SD sqrt(1 - omega) (Lord & Novick 1968; every psychometrics handbook), with
    its band and smallest real difference by the rule of factor scores (Gulliksen 1950); a mean's are the sum's
    divided by its number of items.  Sums without a finite SD or omega are left out."""
    out = []
    for method in (m for m in methods if m in ITEM_METHODS):
        for s in sums:
            sd, omega = s.sd, s.omega
            if not (np.isfinite(sd) and np.isfinite(omega)):
                continue
            scale = sd / (len(s.items) if method is ScoreMethod.ITEM_MEAN else 1)
            out.append(Precision.of(s.factor, method, scale, omega, scale * np.sqrt(max(1.0 - omega, 0.0))))
    return tuple(out)


def ordinal_sum_quality(model: OrdinalScoringModel, declared: Collection[str] | None = None) -> tuple[SumScore, ...]:
    """Each factor's keyed sum of ordinal answers with its reliability and variance (Green & Yang 2009); sums that
    would take in a continuous item beside the ordinal ones are left out: the model gives the spread of a sum of
    answers' codes from the thresholds, not of such a mixture (a keyed factor without a SumScore here is one, which
    the item sums' summary reads as such).  Validity: the sum's correlation with its factor under the model
    (assessment.ordinal_reliability)."""
    base = model.base
    sigma = checked_covariance(base)
    keys = model_keys(base, declared)
    phi, C = base.factor_covariance, base.item_factor_covariance
    mean = base.implied_mean  # nu + L alpha (G alpha counted a higher-order factor's mean twice)
    out = []
    for f, name in enumerate(base.factors):
        idx = _ordinal_sum_items(model, keys[:, f])
        if idx is None:
            continue
        omega, variance = _ordinal_sum_parts(model, sigma, mean, idx, f, keys[:, f])
        taus, steps = [model.thresholds[i] for i in idx], [np.diff(model.categories[i]) for i in idx]
        validity = observed_sum_factor_correlation(taus, steps, mean[idx], sigma[np.ix_(idx, idx)], C[idx, f],
                                                   phi[f, f], keys[idx, f])
        items = tuple(base.items[i] for i in idx)
        out.append(SumScore(name, items, tuple(base.items[i] for i in idx if keys[i, f] < 0),
                            _one_item_omega(omega, items), validity, variance))
    return tuple(out)


def _ordinal_sum_parts(model: OrdinalScoringModel, sigma: np.ndarray, mean: np.ndarray, idx: np.ndarray, f: int,
                       keys: np.ndarray) -> tuple[float, float]:
    """(omega, variance) of the keyed sum of the answers' codes of the ordinal items ``idx`` for factor ``f``
    (Green & Yang 2009; ``sigma``, ``mean``: the latent responses' implied covariance and means)."""
    base = model.base
    taus, steps = [model.thresholds[i] for i in idx], [np.diff(model.categories[i]) for i in idx]
    return observed_sum_reliability(taus, steps, mean[idx], sigma[np.ix_(idx, idx)],
                                    due_to_factor(base.item_factor_covariance[idx, f], base.factor_covariance[f, f]),
                                    keys[idx])


def answered_sum_sems(model: ScoringModel | OrdinalScoringModel, sums: Sequence[SumScore], keys: np.ndarray,
                      answered: np.ndarray) -> dict[str, np.ndarray]:
    """factor -> (n,) the standard error of measurement of each row's keyed sum of the items of the factor it answered
    (``answered`` (n, p): whether each row answered each item; ``keys`` (p, m): :func:`model_keys`), for the factors of
    ``sums`` that have an omega: SEM = SD_A sqrt(1 - omega_A) (Lord & Novick 1968), SD_A the spread under the fitted
    model of the sum of the answered items A and omega_A its reliability (McDonald 1999 from the fitted loadings,
    Green & Yang 2009 for ordinal answers' codes), computed once per pattern of answered items; NaN for a row that
    answered none of them.  With every item answered it is the SEM of :func:`item_sum_precision`, from the
    :class:`SumScore`'s own SD and omega; a prorated sum, J/a times the sum of the a answered items, has J/a times
    it, and an item mean 1/a times it."""
    ordinal = isinstance(model, OrdinalScoringModel)
    base = model.base if ordinal else model
    sigma = checked_covariance(base)
    mean = base.intercepts + base.total_loadings @ base.factor_means
    C, phi = base.item_factor_covariance, np.diag(base.factor_covariance)
    answered = np.asarray(answered, dtype=bool)
    out = {}
    for s in sums:
        if not np.isfinite(s.omega):
            continue
        f = base.factors.index(s.factor)
        member = np.flatnonzero(keys[:, f])
        patterns, which = np.unique(answered[:, member], axis=0, return_inverse=True)
        found = np.full(len(patterns), np.nan)
        for k, pattern in enumerate(patterns):
            idx = member[pattern]
            if not len(idx):
                continue
            if pattern.all():  # every item answered: the keyed sum's own figures, computed once (SumScore)
                found[k] = s.sd * np.sqrt(max(1.0 - s.omega, 0.0))
                continue
            if ordinal:
                omega, variance = _ordinal_sum_parts(model, sigma, mean, idx, f, keys[:, f])
            else:
                k_a = keys[idx, f]
                variance = float(k_a @ sigma[np.ix_(idx, idx)] @ k_a)
                omega = float(keyed_omega(k_a[:, None], C[idx, f][:, None], phi[f:f + 1], np.array([variance]))[0])
            found[k] = np.sqrt(max(variance * (1.0 - omega), 0.0))
        out[s.factor] = found[np.ravel(which)]
    return out


def score_quality(model: ScoringModel, methods: tuple[ScoreMethod, ...] = LINEAR_METHODS,
                  declared: Collection[str] | None = None, sums: tuple[SumScore, ...] | None = None) -> ScoreQuality:
    """Everything :class:`ScoreQuality` holds, for one group (``declared``: the items of the model's 'reversed'
    statement, None without one; ``sums``: the group's :func:`sum_quality` when already computed)."""
    rho = determinacy(model)
    qualities = method_quality(model, methods)
    factor_sd = np.sqrt(np.clip(np.diag(model.factor_covariance), 0.0, None))
    return ScoreQuality(model.group, model.factors, tuple(float(v) for v in rho),
                        tuple(bool(v < DETERMINACY_CAUTION) for v in rho), _correlation(model.factor_covariance),
                        qualities, sum_quality(model, declared) if sums is None else sums,
                        tuple(p for q in qualities for p in method_precision(q, factor_sd)))
