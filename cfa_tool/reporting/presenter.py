"""The reporting layer's presenter: how result objects made below this layer show themselves
(installed by the package's top module, see :mod:`cfa_tool.views`)."""

from __future__ import annotations


class ReportPresenter:
    def text(self, result: object, width: int = 120) -> str:
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
