"""The methods paragraph of fit, compare and invariance names what was read as no answer: the codes the user
declared (missing_codes, --missing-codes) and the values the data file itself marks as no answer, with their
items.  A reviewer needs them to reproduce the analysis.  The facts are checked against the fit's own typed fields
(``result.data.missing_codes``, ``result.data.non_answers``) and against the cells written into the data here."""

from __future__ import annotations

import pandas as pd

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.reporting.paragraph import comparison_paragraph, invariance_paragraph, methods_paragraph
from cfa_tool.workflows.invariance import LEVELS
from tests.conftest import THREE_FACTORS, holzinger_swineford


def _coded() -> pd.DataFrame:
    """Holzinger & Swineford (1939) with -9 in five cells of x2 and 99 in three cells of x7 (codes for no answer)."""
    data = holzinger_swineford()[["school"] + [f"x{i}" for i in range(1, 10)]].copy()
    data.loc[data.index[[3, 40, 77, 150, 210]], "x2"] = -9
    data.loc[data.index[[5, 60, 99]], "x7"] = 99
    return data


def _flat(text: str) -> str:
    return " ".join(text.split())


def test_the_fit_paragraph_names_the_declared_codes():
    result = cfa_tool.fit(THREE_FACTORS, _coded(), missing_codes=(-9, 99))
    assert result.data.missing_codes == (-9.0, 99.0)
    # the codes were read as no answer: x2 answered by 296 of 301 rows, x7 by 298
    assert result.missing_data["coverage"]["x2"] == 296 / 301 and result.missing_data["coverage"]["x7"] == 298 / 301
    assert "the codes -9 and 99, declared to mean no answer, were treated as missing" in _flat(methods_paragraph(result))


def test_one_declared_code_reads_in_the_singular():
    data = _coded()
    data.loc[data["x7"] == 99, "x7"] = -9
    text = _flat(methods_paragraph(cfa_tool.fit(THREE_FACTORS, data, missing_codes=(-9,))))
    assert "the code -9, declared to mean no answer, was treated as missing" in text


def test_a_declared_code_no_item_holds_is_not_named():
    """A code given that no item cell holds was treated as nothing (fixhost-s18: '-99 was treated as missing' where
    only the filter column held -99, which keeps it as a value): the paragraph names the codes the items held only,
    while the fit keeps every code given for scoring other data."""
    data = _coded()
    data["site"] = [-99 if i % 10 == 0 else 1 + i % 2 for i in range(len(data))]
    data.loc[(data[["x1", "x2", "x3", "x4", "x5", "x6", "x7", "x8", "x9"]] == -9).any(axis=1), "site"] = 1  # kept
    result = cfa_tool.fit(THREE_FACTORS, data, missing_codes=(-9, -99), keep=["site = 1"])
    assert result.data.missing_codes == (-9.0, -99.0) and result.data.codes_found == (-9.0,)
    text = _flat(methods_paragraph(result))
    assert "the code -9, declared to mean no answer, was treated as missing" in text and "-99" not in text
    none_held = cfa_tool.fit(THREE_FACTORS, data.assign(x2=holzinger_swineford()["x2"]), missing_codes=(-99,))
    assert "declared to mean no answer" not in methods_paragraph(none_held)
    # a code that only rows the row filters left out held is not named either (rows-s23)
    left_out = data.assign(site=[2 if v == 1 else v for v in data["site"]])
    left_out.loc[left_out.index[1::4], "site"] = 1
    left_out.loc[(data[["x1", "x2", "x3", "x4", "x5", "x6", "x7", "x8", "x9"]] == -9).any(axis=1), "site"] = 2
    result = cfa_tool.fit(THREE_FACTORS, left_out, missing_codes=(-9,), keep=["site = 1"])
    assert result.data.codes_found == () and "declared to mean no answer" not in methods_paragraph(result)


def test_a_fit_without_codes_names_none():
    assert "declared to mean no answer" not in methods_paragraph(cfa_tool.fit(THREE_FACTORS, holzinger_swineford()))


def test_the_comparison_paragraph_names_the_declared_codes():
    compared = cfa_tool.compare([THREE_FACTORS, THREE_FACTORS + "covary x7, x8\n"], _coded(), missing_codes=(-9, 99))
    assert all(r.data.missing_codes == (-9.0, 99.0) for r in compared.results)
    assert "the codes -9 and 99, declared to mean no answer, were treated as missing" in _flat(
        comparison_paragraph(compared))


def test_the_invariance_paragraph_names_the_declared_codes():
    result = cfa_tool.invariance(THREE_FACTORS, _coded(), "school", missing_codes=(-9, 99))
    assert result.steps[0].result.data.missing_codes == (-9.0, 99.0)
    assert "the codes -9 and 99, declared to mean no answer, were treated as missing" in _flat(
        invariance_paragraph(result, LEVELS))


def _with_text_cells(tmp_path, cells: dict[str, list[tuple[int, str]]]):
    """A CSV of Holzinger & Swineford's tests with text cells that say no answer: {column: [(row, text)]}."""
    data = holzinger_swineford()[[f"x{i}" for i in range(1, 10)]].astype(object)
    for column, written in cells.items():
        for row, text in written:
            data.iloc[row, data.columns.get_loc(column)] = text
    path = tmp_path / "tests.csv"
    data.to_csv(path, index=False)
    return path


def test_values_the_file_marks_as_no_answer_are_named_with_their_items(tmp_path):
    path = _with_text_cells(tmp_path, {"x1": [(2, "refused")], "x5": [(8, "refused"), (9, "don't know")]})
    result = cfa_tool.fit(THREE_FACTORS, path)
    marked = {(f.column, f.value) for f in result.data.non_answers}
    assert marked == {("x1", "refused"), ("x5", "refused"), ("x5", "don't know")}
    assert result.missing_data["coverage"]["x5"] == 299 / 301  # the two cells were read as no answer
    clause = "values the data file marks as no answer were treated as missing ('refused' in x1 and x5; 'don't know' in x5)"
    assert clause in _flat(methods_paragraph(result))
    assert not any(p.kind is ProblemKind.VALUES_READ_AS_MISSING for p in result.problems)  # no row lost: a note
    assert any("'refused' (2 cells: x1 1, x5 1); 'don't know' (1 cell: x5 1)" in str(n) for n in result.warnings)


def test_many_items_are_named_briefly(tmp_path):
    path = _with_text_cells(tmp_path, {f"x{i}": [(i, "refused")] for i in range(1, 7)})
    result = cfa_tool.fit(THREE_FACTORS, path)
    assert len(result.data.non_answers) == 6
    assert "('refused' in x1, x2, x3 and 3 more items)" in _flat(methods_paragraph(result))
