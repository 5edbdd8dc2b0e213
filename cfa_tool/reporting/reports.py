"""Which report each command's result has (cfa_tool.reporting.document), and the report a saved JSON result
carries."""

from __future__ import annotations

import sys

from cfa_tool.errors import OptionError
from cfa_tool.reporting.document import Report, ResultKind


# the classes of each command's result: (kind, module, class names), the fit's first
_RESULT_CLASSES = (
    (ResultKind.FIT, "cfa_tool.pipeline.results", ("FitResult",)),
    (ResultKind.CHECK, "cfa_tool.pipeline.results", ("CheckResult",)),
    (ResultKind.COMPARE, "cfa_tool.workflows.compare", ("Comparison",)),
    (ResultKind.INVARIANCE, "cfa_tool.workflows.invariance", ("InvarianceResult",)),
    (ResultKind.REPLICATE, "cfa_tool.workflows.replication", ("Replication", "Replications")),
    (ResultKind.BOOTSTRAP, "cfa_tool.workflows.bootstrap", ("BootstrapResult",)),
    (ResultKind.CUTOFFS, "cfa_tool.workflows.cutoffs", ("CutoffResult",)),
    (ResultKind.POWER, "cfa_tool.workflows.power", ("PowerResult",)),
    (ResultKind.POWER_SIMULATION, "cfa_tool.workflows.montecarlo", ("MonteCarloPower", "PowerCurve")),
    (ResultKind.SIMULATE, "cfa_tool.workflows.simulation", ("SimulatedData",)),
    (ResultKind.SCORES, "cfa_tool.workflows.factor_scores", ("ScoreResult",)),
    (ResultKind.EXPLORE, "cfa_tool.workflows.explore", ("ExploreResult",)),
    (ResultKind.ALIGN, "cfa_tool.workflows.alignment", ("AlignmentResult",)),
)


def kind_of(result: object) -> ResultKind:
    """The command whose result ``result`` is.  A module not yet imported holds no class of ``result``, so it is
    passed over, not imported (the workflows' modules would double the start of ``cfa-tool fit``)."""
    for kind, name, classes in _RESULT_CLASSES:
        module = sys.modules.get(name)
        if module is not None and isinstance(result, tuple(getattr(module, c) for c in classes)):
            return kind
    raise TypeError(f"no report for a {type(result).__name__}")


def report_of(result: object) -> Report:
    """The report of any command's result, made once for every format."""
    kind = kind_of(result)
    if kind is ResultKind.FIT:
        from cfa_tool.reporting.fit_document import fit_report

        return fit_report(result)
    if kind is ResultKind.SCORES:
        from cfa_tool.reporting.score_report import scores_report

        return scores_report(result)
    if kind is ResultKind.EXPLORE:
        from cfa_tool.reporting.explore_report import explore_report

        return explore_report(result)
    if kind is ResultKind.ALIGN:
        from cfa_tool.reporting.align_report import alignment_report

        return alignment_report(result)
    from cfa_tool.reporting import workflow_tables

    return workflow_tables.BUILDERS[kind](result)


def saved_report(payload: object, source: str) -> Report:
    """The report a saved JSON result carries; a one-line error naming ``source`` when it is not one."""
    if not isinstance(payload, dict) or payload.get("tool") != "cfa-tool":
        raise OptionError(f"{source}: not a result written by cfa-tool (the file of a command's --json option)")
    saved = payload.get("report")
    if saved is None:
        raise OptionError(f"{source}: this result holds no 'report' part (written before results carried their report, "
                          f"or removed by hand), so there is nothing to show; run the command again with --json")
    try:
        report = Report.from_dict(saved)
    except (KeyError, TypeError, ValueError, AttributeError):
        raise OptionError(f"{source}: the report in this result is incomplete or changed by hand; run the command "
                          f"again with --json") from None
    return _with_estimate_problems(report, payload)


def _with_estimate_problems(report: Report, payload: dict) -> Report:
    """``report`` with, first, the problems of the result's estimates themselves that its own list of problems
    lacks (a file whose estimates were changed after the fit): the estimates are judged as a fresh fit's are."""
    from dataclasses import replace

    from cfa_tool.assessment.admissibility import estimate_row_problems
    from cfa_tool.reporting.tables import NOT_ADMISSIBLE, ProblemNotice

    listed = payload.get("problems")
    known = {(q.get("kind"), tuple(q.get("parameters", ()))) for q in listed if isinstance(q, dict)} \
        if isinstance(listed, list) else set()
    found = [q for q in estimate_row_problems(payload.get("estimates"))
             if (q.kind.value, q.parameters) not in known]
    if not found:
        return report
    lines = tuple(f"The estimates in this file differ from the fit its report describes (changed after the fit?), and "
                  f"they are not admissible: {q.explanation} Fit the model again rather than edit its result." for q in found)
    old = report.notice.lines if report.notice is not None else ()
    return replace(report, notice=ProblemNotice(NOT_ADMISSIBLE, lines + old, True))
