"""A spreadsheet export's notes line under the data (text in the id column, every other cell empty) is no row of data:
the reader leaves it out with a note (new-user trial s19: "1 of 1201 rows answered no model variable" for 1200
respondents).  A row that answers no model variable (an id alone) is a row, which every estimation leaves out; under a
sampling design it has no weight, cluster or stratum either, which must not refuse the file (new-user trial s18: 'row
1202: no weight (every row needs one ...)' stopped every weighted run).  The fits with the line and with the row
equal the fit of the file without them, and a note names the row; a row that answers an item and has no weight is
still refused."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError

MODEL = "factor f: a1, a2, a3, a4\n"


def _files(tmp_path, ordinal: bool = False):
    rng = np.random.default_rng(2)
    n = 300
    trait = rng.normal(size=n)
    items = np.column_stack([0.7 * trait + 0.7 * rng.normal(size=n) for _ in range(4)])
    if ordinal:
        items = np.digitize(items, [-1.0, 0.0, 1.0]) + 1
    frame = pd.DataFrame({"id": [f"S-{i:03d}" for i in range(n)]}).join(
        pd.DataFrame(np.round(items, 2), columns=["a1", "a2", "a3", "a4"]))
    frame["school"] = rng.integers(0, 30, n)
    frame["weight"] = rng.uniform(0.5, 2.0, n).round(3)
    without, with_line, with_row = tmp_path / "without.csv", tmp_path / "with_line.csv", tmp_path / "with_row.csv"
    frame.to_csv(without, index=False)
    with_line.write_text(without.read_text() + "Notes: exported by hand,,,,,,\n")
    with_row.write_text(without.read_text() + "S-999,,,,,,\n")  # a respondent with an id and nothing else
    return without, with_line, with_row


@pytest.mark.parametrize("design", [{"weights": "weight"}, {"cluster": "school"},
                                    {"weights": "weight", "cluster": "school"}])
@pytest.mark.parametrize("estimation", [{}, {"ordinal": "all"}])
def test_a_row_that_answers_nothing_is_left_out_with_a_note(tmp_path, design, estimation):
    without, with_line, with_row = _files(tmp_path, ordinal=bool(estimation))
    clean = cfa_tool.fit(MODEL, without, **design, **estimation)
    for path in (with_line, with_row):
        noted = cfa_tool.fit(MODEL, path, **design, **estimation)
        assert [r.estimate for r in noted.estimates] == [r.estimate for r in clean.estimates]
        assert noted.fit.chi_square == clean.fit.chi_square
    said = " ".join(str(w) for w in noted.warnings)
    lacking = " or ".join(w for w, k in (("weight", "weights"), ("cluster", "cluster")) if k in design)
    assert f"row 302 answers no model variable and has no {lacking}, so it was left out" in said
    assert noted.data.rows_read == 301
    lined = cfa_tool.fit(MODEL, with_line, **design, **estimation)  # the notes line: no row read, said once
    assert lined.data.rows_read == 300 and lined.to_dict()["data"]["rows_read"] == 300
    said = [str(w) for w in lined.warnings if "row 302" in str(w)]
    assert said == [f"{with_line}: row 302 under the data holds only text ('Notes: exported by hand'), a note rather "
                    f"than a respondent's answers, so it was not read as a row of data"]


def test_a_row_that_answers_an_item_still_needs_its_weight(tmp_path):
    without, _, _ = _files(tmp_path)
    frame = pd.read_csv(without)
    frame.loc[7, "weight"] = np.nan
    frame.to_csv(without, index=False)
    with pytest.raises(DataError, match="row 9: no weight"):
        cfa_tool.fit(MODEL, without, weights="weight")


def test_the_methods_paragraph_says_why_the_design_left_rows_out(tmp_path, hs_data):
    # re-check s18 (r04): a row the design left out (the notes line, weight 0) was called a row 'with no value in the
    # group column' in a fit without groups
    from cfa_tool.reporting.paragraph import methods_paragraph

    _, with_line, with_row = _files(tmp_path)
    lined = methods_paragraph(cfa_tool.fit(MODEL, with_line, weights="weight"))
    assert "N = 300" in lined and "301" not in lined and "left out" not in lined  # the notes line is no respondent
    text = methods_paragraph(cfa_tool.fit(MODEL, with_row, weights="weight"))
    assert "group column" not in text
    assert ("1 of 301 rows was left out by the sampling design (a weight of 0, or no answer and no weight, cluster or "
            "stratum)") in text
    weighted = hs_data.reset_index(drop=True).assign(w=1.0)
    weighted.loc[weighted.index[::10], "w"] = 0.0
    result = cfa_tool.fit("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n",
                          weighted, weights="w", group="school")
    assert result.data.by_design == 31 and result.data.without_group == 0
    assert "group column" not in methods_paragraph(result)
    assert result.to_dict()["data"]["rows_left_out_by_the_design"] == 31
