"""The reporting layer's presenter: how result objects made below this layer show themselves
(installed by the package's top module, see :mod:`cfa_tool.views`).  Every result but an exploration
shows the one report model (cfa_tool.reporting.document)."""

from __future__ import annotations


def _has_own_report(result: object) -> bool:
    """An exploration has a report of its own layout; every other result the report model's."""
    from cfa_tool.workflows.explore import ExploreResult

    return isinstance(result, ExploreResult)


class ReportPresenter:
    def text(self, result: object, width: int = 120) -> str:
        if not _has_own_report(result):
            from cfa_tool.reporting.reports import report_of
            from cfa_tool.reporting.terminal import report_text

            return report_text(report_of(result), width)
        from cfa_tool.reporting.explore_report import render_explore_text

        return render_explore_text(result, width)

    def notebook(self, result: object) -> str:
        if not _has_own_report(result):
            from cfa_tool.reporting.reports import report_of
            from cfa_tool.reporting.html_report import report_html_fragment

            return report_html_fragment(report_of(result), heading=True)
        from cfa_tool.reporting.explore_report import explore_html_fragment

        return explore_html_fragment(result)
