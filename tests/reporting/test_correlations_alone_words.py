"""A fit of a correlation matrix without standard deviations: its alpha and item-rest correlations are those of the
standardized items, which the tables' notes say; and N is 'as given' by where the matrix came from, a file, a data
frame or an array passed from Python, never 'in the file' of a matrix no file held (s24)."""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.data.summary_stats import ARRAY_SOURCE, FRAME_SOURCE, STANDARDIZED_ITEMS, NotGiven, given_with
from cfa_tool.note_parts import said
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.reports import report_of
from tests.conftest import THREE_FACTORS

ITEMS = [f"x{i}" for i in range(1, 10)]


def _tables(result) -> dict:
    return {t.key: t for t in report_of(result).tables}


def test_correlations_without_sds_say_alpha_and_item_rest_are_the_standardized_items(hs_data):
    corr = hs_data[ITEMS].corr()  # Holzinger & Swineford (1939), the nine ability tests, as a data frame
    result = cfa_tool.fit(THREE_FACTORS, covariance=corr, n_obs=len(hs_data), matrix="correlation")
    assert NotGiven.STANDARD_DEVIATIONS in result.data.not_given and result.data.source == FRAME_SOURCE
    tables = _tables(result)
    assert STANDARDIZED_ITEMS in said(tables["reliability_0"].note)
    sums = next(t for key, t in tables.items() if key.startswith("sum_scores"))
    assert f"The item-rest r are {STANDARDIZED_ITEMS}." in said(sums.note)
    assert "The data frame gives no means or standard deviations" in said(sums.note)
    paragraph = methods_paragraph(result)
    assert f"as given {given_with(FRAME_SOURCE)}" in paragraph and "as given in the file" not in paragraph
    array = cfa_tool.fit(THREE_FACTORS, covariance=corr.to_numpy(), n_obs=len(hs_data), matrix="correlation",
                         variables=ITEMS)
    assert array.data.source == ARRAY_SOURCE
    assert "as given with the array" in methods_paragraph(array)


def test_a_covariance_matrix_says_nothing_of_standardized_items(hs_data):
    cov = hs_data[ITEMS].cov()
    result = cfa_tool.fit(THREE_FACTORS, covariance=cov, n_obs=len(hs_data))
    assert NotGiven.STANDARD_DEVIATIONS not in result.data.not_given
    assert all(STANDARDIZED_ITEMS not in said(t.note) for t in report_of(result).tables if t.note)


def test_a_file_matrix_is_as_given_in_the_file(tmp_path, hs_data):
    corr = hs_data[ITEMS].corr().to_numpy()
    lines = (["correlation," + ",".join(ITEMS)] + [name + "," + ",".join(f"{v:.6f}" for v in row)
                                                   for name, row in zip(ITEMS, corr)] + [f"n,{len(hs_data)}"])
    path = tmp_path / "hs.stats"
    path.write_text("\n".join(lines) + "\n")
    result = cfa_tool.fit(THREE_FACTORS, str(path))
    assert given_with(result.data.source) == "in the file"
    assert "as given in the file" in methods_paragraph(result)
    assert np.isfinite(pd.Series([r.alpha for r in result.groups[0].reliability])).all()
