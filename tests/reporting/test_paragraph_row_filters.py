"""The row filters (--keep) are parsed once, when the data are read: the fit's data summary keeps the parsed
RowFilter objects, and the methods paragraph words them by RowFilter.in_words, without reading their text again.
A column whose name is not a plain word is written in double quotes, as the model language writes names.  The
rows kept are counted with pandas on Holzinger & Swineford (1939)."""

from __future__ import annotations

import cfa_tool
import cfa_tool.data.filters as filters
from cfa_tool.reporting.paragraph import methods_paragraph
from tests.conftest import THREE_FACTORS, holzinger_swineford


def test_the_paragraph_words_the_parsed_filters(monkeypatch):
    data = holzinger_swineford().rename(columns={"ageyr": "age in years"})
    result = cfa_tool.fit(THREE_FACTORS, data, keep=('"age in years" >= 13', "school = Pasteur"))
    kept = int(((data["age in years"] >= 13) & (data["school"] == "Pasteur")).sum())
    assert result.n_obs == kept and result.data.rows_in_file == len(data)
    assert all(isinstance(f, filters.RowFilter) for f in result.data.row_filters)
    assert [f.text for f in result.data.row_filters] == ['"age in years" >= 13', "school = Pasteur"]
    assert result.to_dict()["data"]["row_filters"] == ['"age in years" >= 13', "school = Pasteur"]

    def read_again(text):
        raise AssertionError(f"the paragraph read the filter {text!r} again")

    monkeypatch.setattr(filters, "parse_filter", read_again)
    text = " ".join(methods_paragraph(result).split())
    assert (f'N = {kept} of the {len(data)} rows in the data file, those where "age in years" was at least 13 and '
            f"school was Pasteur") in text


def test_compare_and_invariance_name_the_filters_too():
    # a comparison or a ladder of a part of the file said only 'N = 192', as if it were the whole file
    from cfa_tool.reporting.paragraph import comparison_paragraph, invariance_paragraph
    from cfa_tool.workflows.invariance import LEVELS

    data = holzinger_swineford()
    kept = int((data["ageyr"] >= 13).sum())  # counted by pandas
    clause = f"N = {kept} of the {len(data)} rows in the data file, those where ageyr was at least 13"
    compared = cfa_tool.compare([THREE_FACTORS, THREE_FACTORS + "covary x7, x8\n"], data, keep=("ageyr >= 13",))
    assert compared.n_obs == kept and clause in " ".join(comparison_paragraph(compared).split())
    ladder = cfa_tool.invariance(THREE_FACTORS, data, "school", keep=("ageyr >= 13",))
    assert clause in " ".join(invariance_paragraph(ladder, LEVELS).split())


def test_rows_left_out_for_an_empty_cell_are_said_for_every_operator():
    # 'school != Pasteur' leaves out the rows with no school as well (an empty cell meets no comparison); the note and
    # the paragraph said only 'those where school was not Pasteur' (hostile trial).  Counts by pandas on Holzinger &
    # Swineford (1939) with every tenth row's school and age emptied.
    import numpy as np

    data = holzinger_swineford()
    data["school"] = data["school"].astype(object)
    data.loc[data.index[::10], ["school", "ageyr"]] = None
    empty = int(data["school"].isna().sum())
    for keep, kept_rows in (("school != Pasteur", (data["school"] != "Pasteur") & data["school"].notna()),
                            ("school = Pasteur", data["school"] == "Pasteur"),
                            ("ageyr >= 13", data["ageyr"] >= 13), ("ageyr < 13", data["ageyr"] < 13)):
        column = keep.split()[0]
        result = cfa_tool.fit(THREE_FACTORS, data, keep=(keep,))
        assert result.n_obs == int(kept_rows.sum())
        (counted,) = result.data.row_filters
        assert counted.empty == empty == int(data[column].isna().sum())
        said = f"{empty} rows with no value of {column}"
        note = next(w for w in result.warnings if w.startswith(f"row filter '{keep}'"))
        assert note.startswith(f"row filter '{keep}' left out {said}")  # first in the note
        text = " ".join(methods_paragraph(result).split())
        assert f"those where {counted.in_words()}; {said} were left out" in text
    whole = cfa_tool.fit(THREE_FACTORS, holzinger_swineford(), keep=("school != Pasteur",))
    assert whole.data.row_filters[0].empty == 0 and "left out" not in whole.data.row_filters[0].in_words()
    assert np.isfinite(whole.fit.chi_square)
