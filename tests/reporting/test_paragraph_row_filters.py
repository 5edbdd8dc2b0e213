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
