"""Notes of report tables that must match what the table shows (new-user trial s8)."""

from __future__ import annotations

import cfa_tool
from tests.conftest import THREE_FACTORS, holzinger_swineford


def test_the_distinctness_note_speaks_of_intervals_only_when_the_table_has_them():
    # new-user trial s8: the Word report's note described "the interval of a correlation", absent from the table
    from cfa_tool.reporting.tables import distinct_table

    marker = distinct_table(cfa_tool.fit(THREE_FACTORS, holzinger_swineford()))
    assert "95% CI" not in marker.columns
    assert "The interval of a correlation is shown" not in marker.note and "No interval of r is shown" in marker.note
    scaled = distinct_table(cfa_tool.fit(THREE_FACTORS + "scale latent by variance\n", holzinger_swineford()))
    assert "95% CI" in scaled.columns and "The interval of a correlation is shown" in scaled.note
