"""cfa_tool: confirmatory factor analysis for questionnaire research.

Entry points: :func:`fit` (fit a model to data) and :func:`check` (validate a
model against data without fitting).  Heavy modules load on first use.
"""

from __future__ import annotations

from cfa_tool import views
from cfa_tool.version import __version__

__all__ = ["fit", "check", "bootstrap", "cutoffs", "parse_model", "__version__"]


def _presenter():
    from cfa_tool.reporting.presenter import ReportPresenter

    return ReportPresenter()


views.install(_presenter)


def __getattr__(name: str):
    if name in ("fit", "check"):
        from cfa_tool.pipeline import inputs

        return getattr(inputs, name)
    if name == "bootstrap":
        from cfa_tool.workflows.bootstrap import bootstrap

        return bootstrap
    if name == "cutoffs":
        from cfa_tool.workflows.cutoffs import cutoffs

        return cutoffs
    if name == "parse_model":
        from cfa_tool.language.parser import parse_model

        return parse_model
    raise AttributeError(f"module 'cfa_tool' has no attribute '{name}'")
