"""A row filter comparing a labelled code is worded with the label in the methods text: 'gender was not 3, labelled
"another / prefers to describe"', not a bare code a reader cannot decode (new-user trial s15, finding 3); without
parentheses, as the rows analysed are said in the paragraph's own (new-user trial s18).  The file is written
by pyreadstat with value labels; the data are the bundled rider survey (invented)."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.resources import resource_dir

pyreadstat = pytest.importorskip("pyreadstat")
MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text()


def test_a_labelled_code_is_named_by_its_label(tmp_path):
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv").dropna()
    data["district"] = data["district"].map({"north": 1, "south": 2}).astype(float)
    data.loc[data.index[:12], "district"] = 3.0
    path = tmp_path / "riders.sav"
    pyreadstat.write_sav(data, str(path), variable_value_labels={"district": {1: "north", 2: "south",
                                                                              3: "another / not stated"}})
    text = " ".join(methods_paragraph(cfa_tool.fit(MODEL, str(path), keep=["district != 3"])).split())
    assert 'district was not 3, labelled "another / not stated"' in text
    plain = " ".join(methods_paragraph(cfa_tool.fit(MODEL, str(path), keep=["on_time > 1"])).split())
    assert "on_time was above 1" in plain and "labelled" not in plain.split("on_time was above 1")[1][:12]
