"""The reporting layer's presenter: how result objects made below this layer show themselves
(installed by the package's top module, see :mod:`cfa_tool.views`)."""

from __future__ import annotations


class ReportPresenter:
    def text(self, result: object, width: int = 120) -> str:
        from cfa_tool.reporting.terminal import render_text

        return render_text(result, width)

    def notebook(self, result: object) -> str:
        from cfa_tool.reporting.html_report import result_tables_html

        return result_tables_html(result)
