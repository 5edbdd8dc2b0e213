"""Which report each command's result has (cfa_tool.reporting.document), and the report a saved JSON result
carries."""

from __future__ import annotations

from cfa_tool.errors import OptionError
from cfa_tool.reporting.document import Report, ResultKind


def kind_of(result: object) -> ResultKind:
    """The command whose result ``result`` is."""
    from cfa_tool.pipeline.results import CheckResult, FitResult
    from cfa_tool.workflows.alignment import AlignmentResult
    from cfa_tool.workflows.bootstrap import BootstrapResult
    from cfa_tool.workflows.compare import Comparison
    from cfa_tool.workflows.cutoffs import CutoffResult
    from cfa_tool.workflows.explore import ExploreResult
    from cfa_tool.workflows.factor_scores import ScoreResult
    from cfa_tool.workflows.invariance import InvarianceResult
    from cfa_tool.workflows.montecarlo import MonteCarloPower, PowerCurve
    from cfa_tool.workflows.power import PowerResult
    from cfa_tool.workflows.replication import Replication, Replications
    from cfa_tool.workflows.simulation import SimulatedData

    for kind, classes in ((ResultKind.FIT, (FitResult,)), (ResultKind.CHECK, (CheckResult,)),
                          (ResultKind.COMPARE, (Comparison,)), (ResultKind.INVARIANCE, (InvarianceResult,)),
                          (ResultKind.REPLICATE, (Replication, Replications)), (ResultKind.BOOTSTRAP, (BootstrapResult,)),
                          (ResultKind.CUTOFFS, (CutoffResult,)), (ResultKind.POWER, (PowerResult,)),
                          (ResultKind.POWER_SIMULATION, (MonteCarloPower, PowerCurve)), (ResultKind.SIMULATE, (SimulatedData,)),
                          (ResultKind.SCORES, (ScoreResult,)), (ResultKind.EXPLORE, (ExploreResult,)),
                          (ResultKind.ALIGN, (AlignmentResult,))):
        if isinstance(result, classes):
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
        return Report.from_dict(saved)
    except (KeyError, TypeError, ValueError, AttributeError):
        raise OptionError(f"{source}: the report in this result is incomplete or changed by hand; run the command "
                          f"again with --json") from None
