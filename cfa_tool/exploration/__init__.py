"""Exploratory factor analysis: how many factors, extraction, rotation, standard errors of
rotated loadings, and a draft model in this program's model language.

Pure functions on a :class:`CorrelationInput` (built from ``SampleMoments`` or
``OrdinalMoments``); :func:`explore_correlations` runs them in order.  Nothing here reads files
or formats reports.
"""

from importlib import import_module

# each public name and the module that defines it, imported when the name is first used (a fit's report needs
# only the vocabulary in choices, and importing every module here would add to the start of every command)
_HOMES = {
    **dict.fromkeys(("Exploration", "ExploreSettings", "explore_correlations"), "analysis"),
    **dict.fromkeys(("CorrelationKind", "CountNote", "CountRule", "ErrorsUnavailable", "ExtractionMethod", "FitStatistic",
                     "Placement", "RotationMethod"), "choices"),
    **dict.fromkeys(("CorrelationInput", "from_correlations", "from_covariance", "from_ordinal_moments",
                     "from_sample_moments"), "correlations"),
    **dict.fromkeys(("DraftModel", "draft_model"), "draft"),
    **dict.fromkeys(("FactorSolution", "SolutionFit", "extract"), "extraction"),
    **dict.fromkeys(("FactorCount", "average_partial", "count_factors", "parallel_analysis"), "factor_count"),
    **dict.fromkeys(("LoadingErrors", "loading_errors"), "loading_errors"),
    **dict.fromkeys(("RotatedSolution", "RotationSpec", "rotate"), "rotation"),
}


def __getattr__(name: str):
    home = _HOMES.get(name)
    if home is None:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    value = getattr(import_module(f"{__name__}.{home}"), name)
    globals()[name] = value
    return value


__all__ = [
    "CorrelationInput", "CorrelationKind", "CountNote", "CountRule", "DraftModel", "ErrorsUnavailable", "Exploration",
    "ExploreSettings", "ExtractionMethod", "FactorCount", "FactorSolution", "FitStatistic", "LoadingErrors", "Placement",
    "RotatedSolution", "RotationMethod", "RotationSpec", "SolutionFit", "average_partial",
    "count_factors", "draft_model", "explore_correlations", "extract", "from_correlations", "from_covariance",
    "from_ordinal_moments", "from_sample_moments", "loading_errors", "parallel_analysis", "rotate",
]
