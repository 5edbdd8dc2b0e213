"""cfa_tool: confirmatory factor analysis for questionnaire research.

Entry points: :func:`fit` (fit a model to data), :func:`check` (validate a
model against data without fitting), :func:`scores` (factor scores of every row),
:func:`explore` (how many factors, an exploratory solution and a draft model) and :func:`align`
(group factor means under approximate invariance across many groups).  Heavy modules load on first use.
"""

from __future__ import annotations

from cfa_tool import views
from cfa_tool.version import __version__

__all__ = ["fit", "check", "bootstrap", "cutoffs", "scores", "explore", "compare", "invariance",
           "invariance_over_occasions", "align", "replicate", "split_half", "power", "nested_power",
           "power_simulation", "invariance_power", "simulate", "parse_model", "__version__"]

# workflow entry points: public name -> (module, function)
_WORKFLOWS = {
    "compare": ("cfa_tool.workflows.compare", "compare"),
    "invariance": ("cfa_tool.workflows.invariance", "invariance"),
    "invariance_over_occasions": ("cfa_tool.workflows.occasions", "invariance_over_occasions"),
    "align": ("cfa_tool.workflows.alignment", "align"),
    "replicate": ("cfa_tool.workflows.replication", "replicate"),
    "split_half": ("cfa_tool.workflows.replication", "split_half"),
    "power": ("cfa_tool.workflows.power", "plan"),
    "nested_power": ("cfa_tool.workflows.power_nested", "nested_power"),
    "power_simulation": ("cfa_tool.workflows.montecarlo", "monte_carlo_power"),
    "invariance_power": ("cfa_tool.workflows.group_power", "invariance_power"),
    "simulate": ("cfa_tool.workflows.simulation", "simulate"),
}


def _presenter():
    from cfa_tool.reporting.presenter import ReportPresenter

    return ReportPresenter()


def _scorer():
    from cfa_tool.workflows.factor_scores import score_with_fit

    return composing(score_with_fit)


def composing(function):
    """``function`` (an entry point of the Python API) with its keywords that name columns, groups or words of the
    data (options.NAMING: group=, id_column=, keep=, weights=, cluster=, strata=, items=, ordinal=, missing_codes=...)
    in Unicode's composed form, by the one rule the command line's options follow (language.names.composed_value): a
    name written with decomposed accents is the column written composed (s23: only the command line composed them)."""
    import functools

    from cfa_tool.language.names import composed_value
    from cfa_tool.options import NAMING

    naming = {o.keyword for o in NAMING}

    @functools.wraps(function)
    def composed_call(*args, **kwargs):
        return function(*args, **{k: composed_value(v) if k in naming else v for k, v in kwargs.items()})

    return composed_call


views.install(_presenter)
views.install(_scorer, "scorer")


def __getattr__(name: str):
    found = _entry_point(name)
    if name != "parse_model":
        found = composing(found)
    globals()[name] = found  # made once: later look-ups find it without this function
    return found


def _entry_point(name: str):
    if name in ("fit", "check"):
        from cfa_tool.pipeline import inputs

        return getattr(inputs, name)
    if name == "bootstrap":
        from cfa_tool.workflows.bootstrap import bootstrap

        return bootstrap
    if name == "cutoffs":
        from cfa_tool.workflows.cutoffs import cutoffs

        return cutoffs
    if name == "scores":
        from cfa_tool.workflows.factor_scores import scores

        return scores
    if name == "explore":
        from cfa_tool.workflows.explore import explore

        return explore
    if name in _WORKFLOWS:
        import importlib

        module, function = _WORKFLOWS[name]
        return getattr(importlib.import_module(module), function)
    if name == "parse_model":
        from cfa_tool.language.parser import parse_model

        return parse_model
    raise AttributeError(f"module 'cfa_tool' has no attribute '{name}'")
