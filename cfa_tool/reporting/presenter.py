"""The reporting layer's presenter: how result objects made below this layer show themselves
(installed by the package's top module, see :mod:`cfa_tool.views`): every result shows its one report
(cfa_tool.reporting.document, made by cfa_tool.reporting.reports.report_of)."""

from __future__ import annotations


class ReportPresenter:
    def text(self, result: object, width: int = 120) -> str:
        from cfa_tool.reporting.reports import report_of
        from cfa_tool.reporting.terminal import report_text

        return report_text(report_of(result), width)

    def notebook(self, result: object) -> str:
        from cfa_tool.reporting.reports import report_of
        from cfa_tool.reporting.html_report import report_html_fragment

        return report_html_fragment(report_of(result), heading=True)
