"""One exploratory factor analysis from correlations to a draft model: the composition of the
steps that a command or an API call runs.

    CorrelationInput --count_factors--> FactorCount (when the number of factors is not given)
                     --extract--> FactorSolution --rotate--> RotatedSolution
                     --loading_errors--> LoadingErrors --draft_model--> DraftModel

Small matrices are computed with one BLAS thread (``cfa_tool.numerics.threads.blas_threads_for``): a
60 x 60 eigen decomposition takes about 1 ms on one thread and several times longer with two
threads on a busy machine.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from cfa_tool.exploration.choices import CorrelationKind, ExtractionMethod, RotationMethod
from cfa_tool.exploration.correlations import CorrelationInput
from cfa_tool.exploration.draft import DEFAULT_THRESHOLD, DraftModel, draft_model
from cfa_tool.exploration.extraction import FactorSolution, check_factor_count, extract
from cfa_tool.exploration.factor_count import FactorCount, count_factors
from cfa_tool.exploration.rotated_errors import LoadingErrors, loading_errors
from cfa_tool.exploration.rotation import RotatedSolution, RotationSpec, rotate


@dataclass(frozen=True, eq=False)
class ExploreSettings:
    """Choices of an exploration.  ``factors=None`` takes the recommended count."""

    factors: int | None = None
    extraction: ExtractionMethod = ExtractionMethod.MAXIMUM_LIKELIHOOD
    rotation: RotationSpec = RotationSpec()
    replications: int = 100  # random matrices of parallel analysis
    seed: int = 0  # of parallel analysis and of the rotation's random starts (unless the rotation has its own)
    count: bool | None = None  # run the factor-count rules; None: when the number of factors is not given
    standard_errors: bool = True
    threshold: float = DEFAULT_THRESHOLD  # of the draft model
    factor_names: tuple[str, ...] | None = None  # the factors' names (a target file's columns); None: placeholders


@dataclass(frozen=True, eq=False)
class Exploration:
    """An exploratory factor analysis: the factor count, the solution, its rotation and a draft model."""
    data: CorrelationInput
    settings: ExploreSettings  # as run: every choice filled in
    count: FactorCount | None
    solution: FactorSolution  # unrotated
    rotated: RotatedSolution
    errors: LoadingErrors | None
    draft: DraftModel

    @property
    def factors(self) -> int:
        return self.solution.factors

    @property
    def communalities(self) -> np.ndarray:
        return self.solution.communalities


def _checked(settings: ExploreSettings, p: int) -> ExploreSettings:
    from cfa_tool import options
    from cfa_tool.errors import OptionError

    extraction = options.choice(ExtractionMethod, settings.extraction, "the extraction")
    factors = None if settings.factors is None else check_factor_count(settings.factors, p)
    count = settings.count if settings.count is not None else factors is None
    if factors is None and not count:
        raise OptionError("without a number of factors the count rules must run; give the number of factors or let "
                          "the rules choose it")
    seed = options.seed(settings.seed)
    rotation = settings.rotation
    if rotation.seed is None:
        rotation = replace(rotation, seed=seed)
    return replace(settings, factors=factors, extraction=extraction, rotation=rotation.checked(),
                   replications=options.replications(settings.replications, minimum=2), seed=seed, count=bool(count),
                   standard_errors=bool(settings.standard_errors))


def describe(exploration_settings: ExploreSettings, data: CorrelationInput, factors: int) -> str:
    """One line naming what was done, for the draft model's first comment."""
    rotation = exploration_settings.rotation
    turned = ("no rotation" if rotation.method is RotationMethod.NONE
              else f"{rotation.method.value} rotation ({'oblique' if rotation.oblique else 'orthogonal'})")
    kind = {CorrelationKind.PEARSON: "Pearson", CorrelationKind.POLYCHORIC: "polychoric"}[data.kind]
    return (f"{exploration_settings.extraction.value} extraction of {factors} factor{'s' if factors != 1 else ''} "
            f"from the {kind} correlations of {data.p} items (N = {data.n_obs:,}), {turned}")


def explore_correlations(data: CorrelationInput, settings: ExploreSettings = ExploreSettings()) -> Exploration:
    """Count (when asked), extract, rotate, standard errors, draft model.  A solution of one factor is not rotated
    (``settings`` as returned say so), whatever rotation ``settings`` name: a rotation turns several factors."""
    from cfa_tool.numerics.threads import blas_threads_for

    settings = _checked(settings, data.p)
    with blas_threads_for(data.p):
        count = count_factors(data, settings.replications, settings.seed) if settings.count else None
        factors = settings.factors if settings.factors is not None else count.recommended
        settings = replace(settings, factors=factors)
        if factors == 1 and settings.rotation.method is not RotationMethod.NONE:
            # a rotation turns several factors: one factor's loadings are the same under every rotation, so the
            # settings as run say none (the report and the draft describe what was done)
            settings = replace(settings, rotation=RotationSpec(RotationMethod.NONE, seed=settings.seed).checked())
        fitted = count.fit_of(factors) if count is not None else None
        if fitted is not None and settings.extraction is ExtractionMethod.MAXIMUM_LIKELIHOOD:
            solution = fitted.solution
        else:
            solution = extract(data, factors, settings.extraction)
        rotated = rotate(solution.loadings, settings.rotation)
        errors = loading_errors(data, solution, rotated) if settings.standard_errors else None
    draft = draft_model(data.names, rotated.pattern, settings.threshold, data.ordinal, describe(settings, data, factors),
                        settings.factor_names, rotated.factor_correlations if rotated.oblique else None)
    return Exploration(data, settings, count, solution, rotated, errors, draft)
