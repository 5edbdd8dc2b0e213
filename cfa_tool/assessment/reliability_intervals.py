"""Intervals for the reliability a fit reports: which coefficients each factor has, read from the fit's own
reliability rows (:func:`cfa_tool.assessment.reliability.reliability`), so that a bootstrap resample's coefficients
come from its refit by the same function and the same reading (one rule, no second formula), and which the fit
withholds, with the reason.

* omega of a first-order factor's keyed sum (McDonald 1999); omega hierarchical of a higher-order factor or of a
  bifactor model's general factor (Zinbarg, Revelle, Yovel & Li 2005); omega hierarchical subscale of a bifactor
  model's specific factor (Rodriguez, Reise & Haviland 2016); Cronbach's (1951) alpha of a first-order factor's keyed
  items; for ordinal items the omega of the keyed sum of the answers' codes (Green & Yang 2009) beside the
  latent-response coefficients.
* withheld, as the fit withholds them: a factor whose loadings contradict the declared keying
  (:func:`cfa_tool.assessment.reliability.miskeyed`: its keyed sum adds items that run against each other, and the
  fit's paragraph and scores give it no coefficient), and a factor with one item of its own (its coefficients only
  restate the error variance the model had to fix; Bollen 1989, ch. 7).  A solution that is not admissible (a
  Heywood case) has its every coefficient marked not interpretable, as the fit's reliability table marks it.

The bootstrap's intervals of these coefficients (percentile; bias-corrected and accelerated, Efron 1987, where the
bootstrap gives them for the estimates) are recommended for omega and alpha by Kelley & Pornprasertmanit (2016).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from enum import Enum

from cfa_tool.assessment.reliability import BifactorPart, FactorReliability, miskeyed
from cfa_tool.numerics.plain import clean


class Coefficient(Enum):
    """A reliability coefficient a fit reports for a factor (module docstring)."""

    OMEGA = "omega"
    OMEGA_HIERARCHICAL = "omega hierarchical"
    OMEGA_SUBSCALE = "omega hierarchical subscale"
    SUM_OMEGA = "omega of the answers' sum"
    ALPHA = "alpha"


class Withheld(Enum):
    """Why a factor's reliability is withheld (module docstring); the value is the reason in words."""

    KEYING = ("its loadings contradict the keying the model declares, so its keyed sum adds items that run against "
              "each other and describes no scale (see the problems at the top)")
    ONE_ITEM = ("it has one item of its own, whose reliability is whatever the error variance the model fixes makes it "
                "(Bollen 1989, ch. 7)")


def withheld(row: FactorReliability) -> Withheld | None:
    """Why the fit withholds the reliability of ``row``'s factor, or None."""
    if miskeyed(row):
        return Withheld.KEYING
    if row.level == "first-order" and not math.isfinite(row.omega) and not math.isfinite(row.omega_total):
        return Withheld.ONE_ITEM  # the fit's rule: NaN omega and omega total for a factor of one item
    return None


def _omega_kind(row: FactorReliability) -> Coefficient:
    if row.level == "higher-order" or row.bifactor is BifactorPart.GENERAL:
        return Coefficient.OMEGA_HIERARCHICAL
    if row.bifactor is BifactorPart.SPECIFIC:
        return Coefficient.OMEGA_SUBSCALE
    return Coefficient.OMEGA


def coefficients(row: FactorReliability) -> tuple[tuple[Coefficient, float], ...]:
    """The coefficients the fit reports for ``row``'s factor with their values, in the order of its reliability
    table: the omega of the answers' sum (ordinal items), omega (hierarchical, or hierarchical subscale, as the
    factor's part makes it), alpha (first-order factors)."""
    out = []
    if row.observed_sum_omega is not None:
        out.append((Coefficient.SUM_OMEGA, float(row.observed_sum_omega)))
    out.append((_omega_kind(row), float(row.omega)))
    if row.alpha is not None:
        out.append((Coefficient.ALPHA, float(row.alpha)))
    return tuple(out)


Key = tuple[str, Coefficient]  # (factor, coefficient)


def coefficient_values(rows) -> dict[Key, float]:
    """Every coefficient of every factor of one fit's reliability ``rows`` (withheld ones too: the report withholds
    them), by (factor, coefficient): what each bootstrap resample's refit gives back."""
    return {(r.factor, c): v for r in rows for c, v in coefficients(r)}


def keyed_values(rows) -> tuple[tuple[str, Coefficient, float, tuple[str, ...]], ...]:
    """(factor, coefficient, value, the items reversed in the factor's keyed sum) of every coefficient of one fit's
    reliability ``rows``: what a refit whose keys come from its own loadings' signs (an ordinal resample) gives back,
    so that a coefficient of a sum keyed otherwise than the fit's is told apart (:func:`of_fit_sums`)."""
    return tuple((r.factor, c, v, tuple(r.reversed)) for r in rows for c, v in coefficients(r))


def of_fit_sums(values, fit_rows) -> dict[Key, float]:
    """:func:`keyed_values` of a refit read against the fit's reliability ``fit_rows``: each coefficient's value where
    the refit keyed the factor's sum as the fit did, NaN where its loadings' signs reversed other items (the
    coefficient of another sum, not a value of the fit's)."""
    keyed = {r.factor: tuple(r.reversed) for r in fit_rows}
    return {(f, c): (v if keyed.get(f) == reversed_ else float("nan")) for f, c, v, reversed_ in values}


@dataclass(frozen=True)
class ReliabilityInterval:
    """One coefficient's bootstrap intervals (95%) and standard error, or why it has none."""

    factor: str
    coefficient: Coefficient
    estimate: float
    percentile: tuple[float, float]
    bca: tuple[float, float]
    bootstrap_se: float
    #: why the fit withholds this factor's reliability (then no interval either)
    withheld: Withheld | None = None
    #: converged resamples in which the coefficient had no finite value: the interval is then not available, never
    #: taken from the other resamples alone
    without_value: int = 0
    #: the intervals' method(s) whose bounds cannot be given for this coefficient, and why ('' when all are given)
    bca_not_given: str = ""

    @property
    def available(self) -> bool:
        """Whether the interval was computed (the coefficient not withheld, and finite in every converged resample)."""
        return self.withheld is None and not self.without_value

    def to_dict(self) -> dict:
        out = {"factor": self.factor, "coefficient": self.coefficient.value, "estimate": self.estimate,
               "percentile_ci95": list(self.percentile), "bca_ci95": list(self.bca),
               "bootstrap_se": self.bootstrap_se}
        if self.withheld is not None:
            out.update(interval_available=False, withheld=self.withheld.value)
        elif self.without_value:
            out.update(interval_available=False, resamples_without_value=self.without_value)
        if self.bca_not_given:
            out["bca_not_given"] = self.bca_not_given
        return clean(out)
