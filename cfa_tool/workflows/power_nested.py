"""The power of the chi-square difference test between a model and a model nested in it (two factors against
the one factor that merges them, say), by Monte Carlo simulation beside the noncentral chi-square approximation.

Each simulated data set is fitted by both models; the likelihood-ratio difference T_R - T_G is referred to the
chi-square distribution with df_R - df_G degrees of freedom (Steiger, Shapiro & Browne 1985), as ``compare`` refers
it, and the share of converged pairs with p < alpha is the difference test's power.  Its approximation (Satorra &
Saris 1985): the nested model fitted to the population covariance matrix leaves a minimum discrepancy F_R (the
larger model reproduces the population exactly), and at N rows the difference follows the noncentral chi-square
with df_R - df_G degrees of freedom and noncentrality N F_R (this tool's statistic is N F; Satorra & Saris write
(N - 1) F for theirs), so power = P(chi2(df, N F_R) > chi2_(1 - alpha)(df)).  The nesting is judged by the one rule
``compare`` uses (workflows.nesting.is_nested: the larger model fitted to the nested model's implied moments
reproduces them; Bentler & Satorra 2010), here at the population.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from cfa_tool.errors import ModelError, OptionError, printable
from cfa_tool.language.spec import Spec
from cfa_tool.numerics import distributions as dist
from cfa_tool.options import Option


@dataclass(frozen=True)
class NestedPlan:
    """A model nested in the simulated one, as the population judges it: its name and file, the degrees of freedom
    of the difference, the minimum discrepancy F it leaves at the population (0: the restriction holds there), its
    estimates at the population (the start of each replication's fit), and what it fixes on the boundary of the
    larger model's space (workflows.nesting.boundary_of, in words)."""
    name: str
    source: str
    spec: Spec
    df_difference: int
    discrepancy: float
    start: np.ndarray
    boundary: tuple[str, ...] = ()

    def noncentrality(self, n_obs: int) -> float:
        """N F (Satorra & Saris 1985, with this tool's statistic N F)."""
        return n_obs * self.discrepancy


@dataclass(frozen=True)
class DifferencePower:
    """The difference test's power at one sample size: simulated (the share of the ``pairs`` of converged fits of
    both models whose difference had p < alpha) and approximated (the noncentral chi-square)."""
    n_obs: int
    pairs: int  # replications in which both models converged
    rejected: float  # their share with p < alpha
    approximate: float  # Satorra & Saris (1985)
    noncentrality: float
    mean_difference: float  # the mean chi-square difference over the pairs (its expectation: df + noncentrality)

    @property
    def monte_carlo_se(self) -> float:
        """sqrt(p (1 - p) / R): the simulated share's Monte Carlo standard error."""
        return math.sqrt(self.rejected * (1 - self.rejected) / self.pairs) if self.pairs else float("nan")

    def to_dict(self) -> dict:
        return {"n_obs": self.n_obs, "pairs_converged": self.pairs, "power": self.rejected,
                "monte_carlo_se": self.monte_carlo_se, "approximate_power": self.approximate,
                "noncentrality": self.noncentrality, "mean_chi_square_difference": self.mean_difference}


def approximate_power(discrepancy: float, df: int, n_obs: int, alpha: float) -> float:
    """The power of the chi-square difference test at ``n_obs`` rows by the noncentral chi-square with
    noncentrality ``n_obs`` x ``discrepancy`` (Satorra & Saris 1985)."""
    return float(dist.ncx2_sf(dist.chi2_ppf(1 - alpha, df), df, n_obs * max(discrepancy, 0.0)))


def difference_power(plan: NestedPlan, n_obs: int, alpha: float, pairs: list[tuple[float, float]]) -> DifferencePower:
    """The difference test's power at ``n_obs`` from the (general, nested) chi-squares of the ``pairs`` of converged
    fits, beside its approximation."""
    diffs = np.array([nested - general for general, nested in pairs], dtype=float)
    rejected = float(np.mean(dist.chi2_sf(diffs, plan.df_difference) < alpha)) if len(diffs) else float("nan")
    return DifferencePower(n_obs, len(diffs), rejected, approximate_power(plan.discrepancy, plan.df_difference,
                                                                          n_obs, alpha),
                           plan.noncentrality(n_obs), float(diffs.mean()) if len(diffs) else float("nan"))


def nested_plan(spec: Spec, nested: str | Path | Spec, population) -> NestedPlan:
    """The model ``nested`` (a model file, model text or parsed model) judged against ``spec`` at its ``population``
    (workflows.simulation.Population, continuous items): refused in one line when it cannot apply (groups, an
    exploratory block, ordinal items, other items than the simulated model's, or not nested in it by compare's
    rule), else its plan."""
    from cfa_tool.model.parameters import group_statement
    from cfa_tool.pipeline.inputs import load_spec, without_exploratory_blocks
    from cfa_tool.workflows.nesting import boundary_of, is_nested

    rival = load_spec(nested)
    where = f"the nested model ({Option.NESTED_MODEL})"
    statement = group_statement(rival)
    if statement is not None:
        raise OptionError(f"{where} has {statement}, which needs groups; the difference test's power is simulated "
                          f"for one group")
    rival = without_exploratory_blocks(rival, "power-simulation",
                                       "the nested model must name each factor's items for its fit to be compared")
    if population.ordinal_items or rival.ordinal:
        raise OptionError(f"{where} applies to continuous items only so far: the adjusted difference test of ordinal "
                          f"items is not simulated; leave out {Option.CATEGORIES} and the 'ordinal' statements, or "
                          f"{Option.NESTED_MODEL}")
    ours, theirs = set(spec.observed_names), set(rival.observed_names)
    if ours != theirs:
        only = [f"{', '.join(sorted(a - b)[:5])} only in {whose}" for a, b, whose in
                ((ours, theirs, "the simulated model"), (theirs, ours, "the nested model")) if a - b]
        raise OptionError(f"{where} and the simulated model use different items ({'; '.join(only)}), so no "
                          f"difference test compares them; give a nested model of the same items")
    general, restricted = _population_fit(spec, population, "the simulated model"), \
        _population_fit(rival, population, "the nested model")
    if restricted.fit.df < general.fit.df:  # the two given the other way round
        raise OptionError(f"{where} has fewer degrees of freedom ({restricted.fit.df}) than the simulated model "
                          f"({general.fit.df}), so it is not a restricted form of it; give the more restricted model "
                          f"as {Option.NESTED_MODEL} and simulate from the other")
    nested_ok, reason, _ = is_nested(restricted, spec, general)
    if not nested_ok:
        raise OptionError(f"{where} is not nested in the simulated model ({reason}), so their chi-square difference "
                          f"is no test; give a restricted form of the model (two of its factors merged into one, say)")
    name = rival.title or Path(rival.source).stem or "nested model"
    boundary = boundary_of(rival, restricted, spec, general)
    return NestedPlan(name, rival.source, rival, int(restricted.fit.df - general.fit.df),
                      max(restricted.fit.chi_square / restricted.n_obs, 0.0), np.asarray(restricted.theta, dtype=float),
                      boundary.parts)


#: the N of the population's moments fitted by :func:`_population_fit`: the discrepancy F does not depend on it
POPULATION_N = 100_000


def _population_fit(spec: Spec, population, which: str):
    """``spec`` fitted by maximum likelihood to the population covariance matrix."""
    from cfa_tool.data.moments import SampleMoments
    from cfa_tool.errors import EstimationError
    from cfa_tool.pipeline.continuous import FitOptions, fit_moments

    p = len(population.observed)
    moments = SampleMoments(tuple(population.observed), population.sigma, np.zeros(p), POPULATION_N, POPULATION_N, 0,
                            "population")
    try:
        found = fit_moments(spec, moments, FitOptions(diagnostics=False, modification_indices=False))
    except (EstimationError, ModelError) as failure:
        raise OptionError(f"{which} could not be fitted to the population covariance matrix: "
                          f"{printable(str(failure))}") from None
    if not found.converged:
        raise OptionError(f"{which} did not converge when fitted to the population covariance matrix, so its "
                          f"population discrepancy is unknown; check its statements and the population values")
    return found
