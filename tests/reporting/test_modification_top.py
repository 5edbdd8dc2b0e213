"""--mi-top cuts the table of modification indices; its title counts the indices that reach the threshold, not the
rows left after the cut (hostile trial s18, 08: '1 of 1 shown' when five reached 3.84), and 0 is refused (it said
that no parameter reached 3.84 while the largest index was 17.15; modification_indices=False computes none).
The count is checked against the score tests themselves, read from the full list."""

from __future__ import annotations

import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from cfa_tool.reporting.tables import modification_table

from tests.conftest import THREE_FACTORS


def test_the_title_counts_every_index_that_reaches_the_threshold(hs_data):
    full = cfa_tool.fit(THREE_FACTORS, hs_data)
    reaching = sum(m.index >= full.mi_threshold for m in full.modification_indices)
    assert reaching > 2  # Holzinger & Swineford's three-factor model leaves several (x9 on visual the largest)
    cut = cfa_tool.fit(THREE_FACTORS, hs_data, mi_top=2)
    table = modification_table(cut)
    assert table.title == f"Largest modification indices (at least 3.84; 2 of {reaching} shown)"
    assert len(table.rows) == 2


def test_showing_no_index_is_refused(hs_data):
    with pytest.raises(OptionError, match="the number of modification indices to show must be at least 1, not 0"):
        cfa_tool.fit(THREE_FACTORS, hs_data, mi_top=0)


def test_the_json_of_a_cut_list_counts_the_indices_that_reach_the_threshold(hs_data):
    # re-check s18 (r11): the JSON kept the two rows and no count of the others
    full = cfa_tool.fit(THREE_FACTORS, hs_data)
    reaching = sum(m.index >= full.mi_threshold for m in full.modification_indices)
    out = cfa_tool.fit(THREE_FACTORS, hs_data, mi_top=2).to_dict()
    assert len(out["modification_indices"]) == 2 and out["modification_indices_reaching_threshold"] == reaching
    assert "modification_indices_reaching_threshold" not in full.to_dict()
