"""Exploratory factor analysis: how many factors, extraction, rotation, standard errors of
rotated loadings, and a draft model in this program's model language.

Pure functions on a :class:`CorrelationInput` (built from ``SampleMoments`` or
``OrdinalMoments``); :func:`explore_correlations` runs them in order.  Nothing here reads files
or formats reports.

The names below load their module on first use: a fit's report needs only the vocabulary in
``exploration.choices``, and importing every module of the package would add to each start of the command.
"""

from __future__ import annotations

import importlib

# public name -> the module of this package that holds it
_HOME = {
    **dict.fromkeys(("Exploration", "ExploreSettings", "explore_correlations"), "analysis"),
    **dict.fromkeys(("CorrelationKind", "CountNote", "CountRule", "ErrorsUnavailable", "ExtractionMethod", "FitStatistic",
                     "Placement", "RotationMethod"), "choices"),
    **dict.fromkeys(("CorrelationInput", "from_correlations", "from_covariance", "from_ordinal_moments",
                     "from_sample_moments"), "correlations"),
    **dict.fromkeys(("DraftModel", "draft_model"), "draft"),
    **dict.fromkeys(("FactorSolution", "SolutionFit", "extract"), "extraction"),
    **dict.fromkeys(("FactorCount", "average_partial", "count_factors", "parallel_analysis"), "factor_count"),
    **dict.fromkeys(("LoadingErrors", "loading_errors"), "rotated_errors"),
    **dict.fromkeys(("RotatedSolution", "RotationSpec", "rotate"), "rotation"),
}

__all__ = sorted(_HOME)


def __getattr__(name: str):
    if name not in _HOME:
        raise AttributeError(f"module 'cfa_tool.exploration' has no attribute '{name}'")
    value = getattr(importlib.import_module(f"cfa_tool.exploration.{_HOME[name]}"), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(_HOME))
