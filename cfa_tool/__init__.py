"""cfa_tool: confirmatory factor analysis for questionnaire research.

Entry points: :func:`fit` (fit a model to data), :func:`check` (validate a
model against data without fitting), :func:`scores` (factor scores of every row)
and :func:`explore` (how many factors, an exploratory solution and a draft model).  Heavy modules load on first use.
"""

from __future__ import annotations

__version__ = "0.1.0"
__all__ = ["fit", "check", "bootstrap", "cutoffs", "scores", "explore", "parse_model", "__version__"]


def __getattr__(name: str):
    if name in ("fit", "check", "bootstrap", "cutoffs"):
        from cfa_tool import api

        return getattr(api, name)
    if name == "scores":
        from cfa_tool.workflows.factor_scores import scores

        return scores
    if name == "explore":
        from cfa_tool.workflows.explore import explore

        return explore
    if name == "parse_model":
        from cfa_tool.language.parser import parse_model

        return parse_model
    raise AttributeError(f"module 'cfa_tool' has no attribute '{name}'")
