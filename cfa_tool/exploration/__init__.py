"""Exploratory factor analysis: how many factors, extraction, rotation, standard errors of
rotated loadings, and a draft model in this program's model language.

Pure functions on a :class:`CorrelationInput` (built from ``SampleMoments`` or
``OrdinalMoments``); :func:`explore_correlations` runs them in order.  Nothing here reads files
or formats reports.
"""

from cfa_tool.exploration.analysis import Exploration, ExploreSettings, explore_correlations
from cfa_tool.exploration.choices import (CorrelationKind, CountNote, CountRule, ErrorsUnavailable, ExtractionMethod,
                                          FitStatistic, Placement, RotationMethod)
from cfa_tool.exploration.correlations import (CorrelationInput, from_correlations, from_covariance, from_ordinal_moments,
                                               from_sample_moments)
from cfa_tool.exploration.draft import DraftModel, draft_model
from cfa_tool.exploration.extraction import FactorSolution, SolutionFit, extract
from cfa_tool.exploration.factor_count import FactorCount, average_partial, count_factors, parallel_analysis
from cfa_tool.exploration.loading_errors import LoadingErrors, loading_errors
from cfa_tool.exploration.rotation import RotatedSolution, RotationSpec, rotate

__all__ = [
    "CorrelationInput", "CorrelationKind", "CountNote", "CountRule", "DraftModel", "ErrorsUnavailable", "Exploration",
    "ExploreSettings", "ExtractionMethod", "FactorCount", "FactorSolution", "FitStatistic", "LoadingErrors", "Placement",
    "RotatedSolution", "RotationMethod", "RotationSpec", "SolutionFit", "average_partial",
    "count_factors", "draft_model", "explore_correlations", "extract", "from_correlations", "from_covariance",
    "from_ordinal_moments", "from_sample_moments", "loading_errors", "parallel_analysis", "rotate",
]
