"""The reporting layer's presenter: how result objects made below this layer show themselves
(installed by the package's top module, see :mod:`cfa_tool.views`)."""

from __future__ import annotations


def _workflow_renderer(result: object):
    """The terminal renderer of a workflow's result (None for a fit, scores or an exploration)."""
    from cfa_tool.reporting import workflow_text as W
    from cfa_tool.workflows.compare import Comparison
    from cfa_tool.workflows.invariance import InvarianceResult
    from cfa_tool.workflows.montecarlo import MonteCarloPower, PowerCurve
    from cfa_tool.workflows.power import PowerResult
    from cfa_tool.workflows.replication import Replication
    from cfa_tool.workflows.simulation import SimulatedData

    for kind, render in ((Comparison, W.render_comparison), (InvarianceResult, W.render_invariance),
                         (MonteCarloPower, W.render_montecarlo), (PowerCurve, W.render_power_curve), (PowerResult, W.render_power),
                         (SimulatedData, W.render_population)):
        if isinstance(result, kind):
            return render
    if isinstance(result, Replication):
        return lambda rep, console: W.render_replication([rep], console)
    return None


def _console_text(render, result: object, width: int) -> str:
    import io

    from cfa_tool.reporting.terminal import SafeConsole

    buffer = io.StringIO()
    render(result, SafeConsole(file=buffer, width=width, no_color=True, highlight=False, emoji=False, markup=False))
    return buffer.getvalue()


class ReportPresenter:
    def text(self, result: object, width: int = 120) -> str:
        render = _workflow_renderer(result)
        if render is not None:
            return _console_text(render, result, width)
        from cfa_tool.workflows.explore import ExploreResult
        from cfa_tool.workflows.factor_scores import ScoreResult

        if isinstance(result, ScoreResult):
            from cfa_tool.reporting.score_report import render_scores_text

            return render_scores_text(result, width)
        if isinstance(result, ExploreResult):
            from cfa_tool.reporting.explore_report import render_explore_text

            return render_explore_text(result, width)
        from cfa_tool.reporting.terminal import render_text

        return render_text(result, width)

    def notebook(self, result: object) -> str:
        if _workflow_renderer(result) is not None:  # the terminal report, kept as it is laid out
            import html

            from cfa_tool.errors import printable

            return f"<pre>{html.escape(printable(self.text(result, 110), keep_newlines=True))}</pre>"
        from cfa_tool.workflows.explore import ExploreResult
        from cfa_tool.workflows.factor_scores import ScoreResult

        if isinstance(result, ScoreResult):
            from cfa_tool.reporting.score_report import scores_html_fragment

            return scores_html_fragment(result)
        if isinstance(result, ExploreResult):
            from cfa_tool.reporting.explore_report import explore_html_fragment

            return explore_html_fragment(result)
        from cfa_tool.reporting.html_report import result_tables_html

        return result_tables_html(result)
