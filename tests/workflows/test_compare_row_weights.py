"""compare parses the sampling weights once, for every row read, as fit does (the count of parses:
tests/inference/test_sample_design.py): each compared row must then read its own weight."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from tests.conftest import THREE_FACTORS


def test_compare_reads_each_compared_row_s_own_weight(hs_data):
    """The weights parsed for every row read are matched to the rows compared (rows without a group value and rows
    without answers left out first): the comparison's first model is the fit of the same rows with their weights."""
    k = np.arange(len(hs_data))
    data = hs_data.assign(grp=np.where(k % 2 == 0, "a", "b"), w=1.0 + (k % 5) / 2)
    data.loc[data.index[::7], "grp"] = None
    data.loc[data.index[3::11], "x1"] = np.nan
    for missing in ("listwise", "full-information"):
        compared = cfa_tool.compare([THREE_FACTORS, THREE_FACTORS + "covary x1, x4\n"], data, group="grp",
                                    weights="w", missing=missing)
        alone = cfa_tool.fit(THREE_FACTORS, data, group="grp", weights="w", missing=missing)
        assert compared.results[0].fit.chi_square == pytest.approx(alone.fit.chi_square, rel=1e-8), missing
