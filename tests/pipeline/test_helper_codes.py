"""A missing-data helper is read as an item is (hostile trial s13, H2/H12/H10): it enters the full-information
likelihood as an item does (Graham 2003), so a code such as -99 among ages is named first when not declared, and
--missing-codes reads it as no answer in the helper too (it was kept as an age, beside two notes contradicting each
other); a helper that holds no numbers is refused in a helper's words, naming the cell where every message does.

The check value is the fit of the same data with those cells left empty (what the code means), and the cells and
rows are counted with pandas.  Data: simulated with a fixed seed."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.odd_values import OddKind
from cfa_tool.errors import OptionError
from tests.conftest import run_cli
from tests.pipeline.test_missing_helpers import frame  # noqa: F401 (a fixture)

MODEL = "factor F: y1, y2, y3, y4\n"


@pytest.fixture(scope="module")
def coded(frame) -> pd.DataFrame:
    """tests/pipeline/test_missing_helpers.py's answers (y1 missing where 'age' is high), age written -99 in every
    sixth row."""
    out = frame[["y1", "y2", "y3", "y4", "age"]].copy()
    out.loc[out.index[::6], "age"] = -99.0
    return out


def test_a_code_in_a_helper_is_named_first(coded):
    result = cfa_tool.fit(MODEL, coded, missing_helpers="age")
    first = result.problems[0]
    codes = int((coded["age"] == -99).sum())  # counted by pandas
    assert first.explanation.startswith(f"The missing-data helper column age of <data frame> holds the value -99 "
                                        f"({codes} answers in {codes} rows")
    assert "--missing-codes -99" in first.advice or "missing_codes=[-99]" in first.advice


def test_missing_codes_apply_to_helpers(coded):
    given = cfa_tool.fit(MODEL, coded, missing_helpers="age", missing_codes=[-99])
    emptied = cfa_tool.fit(MODEL, coded.replace({"age": {-99.0: np.nan}}), missing_helpers="age")  # the reference
    assert np.allclose([e.estimate for e in given.estimates], [e.estimate for e in emptied.estimates], atol=1e-8)
    said = " ".join(map(str, given.warnings))
    codes = int((coded["age"] == -99).sum())
    assert f"{codes} cells holding a code given with" in said and f"(age {codes})" in said
    assert "no cell of numbers holds" not in said and "other columns keep such a value" not in said
    assert not any(p.explanation.startswith("The missing-data helper column") for p in given.problems)
    # without helpers the column is no part of the analysis and keeps its values, as before
    plain = cfa_tool.fit(MODEL, coded, missing_codes=[-99])
    assert "other columns keep such a value as it is ('age' holds -99" in " ".join(map(str, plain.warnings))


def test_a_helper_of_dates_or_true_false_is_refused_as_a_helper(coded, tmp_path, capsys):
    dated = coded.assign(when=pd.Timestamp("2026-01-01") + pd.to_timedelta(np.arange(len(coded)), unit="D"),
                         flag=coded["y2"] > 0, district=np.where(np.arange(len(coded)) % 2, "north", "south"))
    book = tmp_path / "dated.xlsx"
    dated.to_excel(book, index=False)
    model = tmp_path / "m.cfa"
    model.write_text(MODEL)
    letters = {name: chr(ord("A") + i) for i, name in enumerate(dated.columns)}
    code, _, err = run_cli(["fit", model, "--data", book, "--missing-helpers", "when"], capsys)
    assert code == 2
    assert (f"the missing-data helper 'when' (--missing-helpers) holds dates or times ('2026-01-01 00:00:00' in row "
            f"2, cell {letters['when']}2, and {len(dated) - 1} more such cells)") in err
    assert "indicators must be numbers" not in err
    code, _, err = run_cli(["fit", model, "--data", book, "--missing-helpers", "flag"], capsys)
    first = "TRUE" if dated["flag"].iloc[0] else "FALSE"
    assert code == 2 and f"holds TRUE/FALSE values ('{first}' in row 2, cell {letters['flag']}2" in err
    text = tmp_path / "dated.csv"
    dated.to_csv(text, index=False)
    code, _, err = run_cli(["fit", model, "--data", text, "--missing-helpers", "district"], capsys)
    assert code == 2 and "holds text ('south' in row 2, and" in err  # the file's row 2: its first row of data
    with pytest.raises(OptionError, match=r"holds text \('south' in row labelled 0, and"):
        cfa_tool.fit(MODEL, dated, missing_helpers="district")


def test_words_of_no_answer_in_a_helper_are_said_in_the_methods_text(frame, tmp_path):  # noqa: F811
    # review s13: "don't know" in a helper was read as missing (the helper enters the likelihood as an item does) but
    # neither the methods text nor the data summary said so, as they say it for the items
    from cfa_tool.reporting.paragraph import methods_paragraph

    out = frame[["y1", "y2", "y3", "y4", "age"]].astype(object)
    out.loc[out.index[[2, 7]], "age"] = "don't know"
    path = tmp_path / "answers.csv"
    out.to_csv(path, index=False)
    result = cfa_tool.fit(MODEL, path, missing_helpers="age")
    assert [(f.column, f.value, len(f.rows)) for f in result.data.non_answers] == [("age", "don't know", 2)]
    assert "treated as missing ('don't know' in age)" in " ".join(methods_paragraph(result).split())


def test_words_of_no_answer_in_a_helper_are_among_the_cautions(frame, tmp_path):  # noqa: F811
    # review s13: a helper's "don't know" read as missing was in the methods text but not among the cautions that come
    # first, where the items' are named (odd_value_problems named the model's items only); the same caution now names
    # both, and the same rule reads them (data.non_answers)
    from cfa_tool.assessment.admissibility import ProblemKind

    out = frame[["y1", "y2", "y3", "y4", "age"]].astype(object)
    out.loc[out.index[[2, 7]], "age"] = "don't know"
    out.loc[out.index[[4]], "y2"] = "don't know"
    path = tmp_path / "answers.csv"
    out.to_csv(path, index=False)
    result = cfa_tool.fit(MODEL, path, missing_helpers="age")
    # no row leaves the full-information fit because of them: a note, not a caution (reading-s14's rule), and one
    # note names the items' and the helper's cells together
    assert not [p for p in result.problems if p.kind is ProblemKind.VALUES_READ_AS_MISSING]
    (said,) = [" ".join(w.split()) for w in result.warnings if "don't know" in w]
    assert "3 cells" in said and "'don't know' (3 cells: age 2, y2 1)" in said  # counted by construction above (most first)
    # without the helper, its column is no part of the analysis: its words are read as no one's answers, unnamed
    plain = cfa_tool.fit(MODEL, path.with_name("answers.csv"), missing_helpers=None)
    assert all("age" not in p.explanation for p in plain.problems)
