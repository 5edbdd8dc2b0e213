"""The invariance report's lines on the reference group and the rows per group write group labels by the one rule
of group names (language.names.written_group): every label in double quotes when any needs them (groups-s15 left
these lines naming groups raw).  Data: Holzinger & Swineford (1939), the schools relabelled."""

from __future__ import annotations

import cfa_tool
from cfa_tool.reporting.workflow_tables import invariance_report
from tests.conftest import THREE_FACTORS, holzinger_swineford


def test_reference_and_rows_lines_quote_the_labels_alike():
    data = holzinger_swineford()
    data["school"] = data["school"].map({"Pasteur": "Pasteur, east", "Grant-White": "Grant"})
    report = invariance_report(cfa_tool.invariance(THREE_FACTORS, data, "school"))
    text = " ".join(str(line) for line in report.lines)
    assert 'Reference group (factor means fixed at zero): "Grant", the first label in sorted order' in text
    assert '("Grant": 145, "Pasteur, east": 156)' in text
    assert report.title.endswith('across school ("Grant", "Pasteur, east")')  # re-check s15 (R6): the title too
    [means] = [t for t in report.tables if "reference group" in str(t.note or "")] or [None]
    if means is not None:  # the latent means' note (when the scalar step holds)
        assert 'against the reference group "Grant"' in str(means.note)
