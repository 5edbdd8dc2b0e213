"""Bad data get one plain sentence naming the file and the variable, never a traceback."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError, ModelError, UserInputError

MODEL = "factor f: a, b, c\n"


def _frame(n: int = 50, seed: int = 1) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    f = rng.standard_normal(n)
    return pd.DataFrame({c: f + rng.standard_normal(n) for c in "abc"})


def _write(tmp_path, text: str, name: str = "d.csv"):
    path = tmp_path / name
    path.write_text(text)
    return path


@pytest.mark.parametrize(
    "content, words",
    [
        ("", "is empty"),
        ("a,b,c\n", "header but no rows"),
        ("a,b,a\n1,2,3\n", "'a' appears more than once"),
        ("a,,c\n1,2,3\n", "column 2 of the header has no name"),
    ],
)
def test_broken_files(tmp_path, content, words):
    with pytest.raises(DataError, match=words):
        cfa_tool.fit(MODEL, _write(tmp_path, content))


def test_missing_file(tmp_path):
    with pytest.raises(DataError, match="does not exist"):
        cfa_tool.fit(MODEL, tmp_path / "absent.csv")


def test_text_in_an_indicator_column():
    data = _frame().astype(object)
    data.loc[7, "b"] = "see note"  # ('n/a?' says no answer: read as missing, from a data frame as from a file)
    with pytest.raises(DataError, match=r"column 'b' holds text \('see note' in row labelled 7\) among numbers; correct the cell"):
        cfa_tool.fit(MODEL, data)


def test_constant_column():
    data = _frame()
    data["c"] = 3.0
    with pytest.raises(DataError, match="column 'c' has the same value"):
        cfa_tool.fit(MODEL, data)


def test_fewer_rows_than_variables():
    with pytest.raises(DataError, match="the 3 rows are too few for 3 variables"):
        cfa_tool.fit(MODEL, _frame(3))


def test_infinite_value():
    data = _frame()
    data.loc[4, "a"] = np.inf
    with pytest.raises(DataError, match="column 'a' has an infinite value in row labelled 4"):
        cfa_tool.fit(MODEL, data)


def test_singular_covariance_names_the_columns():
    data = _frame()
    data["d"] = data["a"] + data["b"]
    with pytest.raises(DataError, match="singular") as info:
        cfa_tool.fit("factor f: a, b, c, d\n", data)
    assert all(f"'{c}'" in str(info.value) for c in "abd")


def test_factor_named_like_a_column():
    # hostile trial s13: a column that shares a factor's name (a precomputed total) and that the run does not read is
    # left unused, with a note; where the run would read it, the name means two things and is refused
    data = _frame()
    data["f"] = data[["a", "b", "c"]].sum(axis=1)  # the factor's items summed, as a file may hold them
    result = cfa_tool.fit(MODEL, data)
    assert "the column 'f' in <data frame> is not used: the model's factor has the same name" in result.warnings
    assert result.observed == ("a", "b", "c") and result.n_obs == len(data)
    plain = cfa_tool.fit(MODEL, data.drop(columns="f"))  # the same fit without the column (the reference)
    assert [e.estimate for e in result.estimates] == [e.estimate for e in plain.estimates]
    data["g"] = np.arange(len(data)) % 2
    for role, keywords in (("the group column", {"group": "f"}), ("the id column", {"id_column": "f"}),
                           ("the weights column", {"weights": "f"}), ("a missing-data helper", {"missing_helpers": "f"})):
        with pytest.raises(ModelError, match=f"'f' is declared as a factor but is also a column of <data frame>, "
                                             f"chosen as {role}; give the factor another name"):
            cfa_tool.fit(MODEL, data, **keywords)
    with pytest.raises(ModelError, match="'f' is declared as a factor but is also a column of <data frame>, and the "
                                         "model names it as an indicator of 'top'"):
        cfa_tool.fit(MODEL + "factor h: a2, b2, c2\nfactor k: a3, b3, c3\nfactor top: f, h, k\n",
                     data.assign(a2=data["a"], b2=data["b"], c2=data["c"], a3=data["a"], b3=data["b"], c3=data["c"]))
    with pytest.raises(ModelError, match="chosen as the group column"):
        cfa_tool.check(MODEL, data, group="f")


def test_unknown_column_suggests_a_near_name():
    with pytest.raises(ModelError, match="unknown variable 'bb' .*did you mean 'b'"):
        cfa_tool.fit("factor f: a, bb, c\n", _frame())


def test_listwise_deletion_is_reported():
    data = _frame(60)
    data.loc[[3, 9], "a"] = np.nan
    result = cfa_tool.fit(MODEL, data, missing="listwise")
    assert result.n_obs == 58
    assert result.data.rows_dropped == 2
    assert any("2 of 60 rows" in w for w in result.warnings)


def test_semicolon_file_with_decimal_commas(tmp_path):
    data = _frame()
    plain = cfa_tool.fit(MODEL, data)
    lines = ["a;b;c"] + [";".join(f"{v:.10f}".replace(".", ",") for v in row) for row in data.to_numpy()]
    result = cfa_tool.fit(MODEL, _write(tmp_path, "\n".join(lines) + "\n"))
    assert result.fit.chi_square == pytest.approx(plain.fit.chi_square, abs=1e-6)


def test_values_far_apart_in_scale():
    data = _frame(200)
    data["a"] *= 1e-6
    data["b"] *= 1e6
    reference = cfa_tool.fit(MODEL, _frame(200))
    result = cfa_tool.fit(MODEL, data)
    assert result.converged
    std = {r.variables: r.standardized for r in result.estimates}
    for r in reference.estimates:
        assert std[r.variables] == pytest.approx(r.standardized, abs=1e-5)


def test_every_data_problem_is_a_user_input_error():
    assert issubclass(DataError, UserInputError) and issubclass(ModelError, UserInputError)


def test_a_group_without_any_answer_is_named_as_such(hs_data):
    # hostile trial: a group whose every answer was empty listed 5 of its 9 empty columns and advised removing items
    from tests.conftest import THREE_FACTORS

    data = hs_data.copy()
    items = [f"x{i}" for i in range(1, 10)]
    data.loc[data.index[-12:], "school"] = "annex"
    data.loc[data.index[-12:], items] = np.nan
    with pytest.raises(DataError, match=r"group annex of 'school'\): no row answers any of the model's 9 variables"):
        cfa_tool.fit(THREE_FACTORS, data, group="school")
    many = hs_data.copy()
    many.loc[many.school == "Pasteur", items[:7]] = np.nan
    with pytest.raises(DataError, match="'x1', 'x2', 'x3', 'x4', 'x5' and 2 more have no answers in the 156 rows of "
                                        "this group"):
        cfa_tool.fit(THREE_FACTORS, many, group="school")


def test_an_item_empty_only_in_the_rows_kept_is_not_called_empty_in_the_file():
    # hostile trial 7, H7: 'has no answers at all (every cell is empty); check the data file' while the file had
    # answers in the rows the row filter left out. Invented data: 'c' answered in the west only.
    data = _frame(80).assign(site=["east"] * 40 + ["west"] * 40)
    data.loc[:39, "c"] = np.nan
    for how in ({}, {"missing": "listwise"}):
        with pytest.raises(DataError, match=r"column 'c' has no answers in the 40 rows kept by keep=\['site = east'\] "
                                            r"\(every cell of those rows is empty\)"):
            cfa_tool.fit(MODEL, data, keep=["site = east"], **how)
    with pytest.raises(DataError, match=r"group east of 'site'\): column 'c' has no answers in the 40 rows of this "
                                        r"group"):
        cfa_tool.fit(MODEL, data, group="site")
    coded = data.assign(**{c: np.clip(np.round(data[c]), -2, 2) for c in "abc"})
    with pytest.raises(DataError, match="0 of the 40 rows kept by keep=\\['site = east'\\] answered item 'c', so its "
                                        "thresholds cannot be estimated"):
        cfa_tool.fit(MODEL, coded, keep=["site = east"], ordinal="all")
    with pytest.raises(DataError, match=r"none of the 40 rows kept by keep=\['site = east'\] answers any of the "
                                        r"model's 3 variables"):
        cfa_tool.fit(MODEL, data.assign(a=np.nan, b=np.nan), keep=["site = east"])
    # the whole file without answers keeps its own words
    with pytest.raises(DataError, match="column 'c' has no answers at all"):
        cfa_tool.fit(MODEL, data.assign(c=np.nan))

def test_thousands_dots_in_a_decimal_comma_file_are_not_read_as_decimals(tmp_path):
    # '1.083' beside '850' in one column of a semicolon (decimal-comma) file: 1083 with a thousands dot, or 1.083?
    # The reading cannot be decided, so the file is refused, naming the column, the two values and their rows.
    from cfa_tool.data.readers import read_data

    data = _frame(6)
    weights = ["1.083", "850", "1.107", "912", "1.253", "1.370"]
    lines = ["a;b;c;w"] + [";".join([*(f"{v:.3f}".replace(".", ",") for v in row), w])
                           for row, w in zip(data.to_numpy(), weights)]
    path = _write(tmp_path, "\n".join(lines) + "\n")
    with pytest.raises(DataError, match=r"column 'w' holds '1.083' in row 2 beside whole numbers such as '850' "
                                        r"\(row 3\).*separate thousands \(1083\)"):
        read_data(path)


def test_three_decimal_dots_beside_decimal_commas_get_a_note(tmp_path):
    # every dotted value of 'w' has three decimals and no whole number reaches 100, while the file writes the
    # answers with decimal commas: 'w' is read with '.' as the decimal point (1.083), and a note says so
    from cfa_tool.data.readers import read_data

    data = _frame(6)
    weights = ["1.083", "0.850", "1.107", "2", "1.253", "1.370"]
    lines = ["a;b;c;w"] + [";".join([*(f"{v:.3f}".replace(".", ",") for v in row), w])
                           for row, w in zip(data.to_numpy(), weights)]
    loaded = read_data(_write(tmp_path, "\n".join(lines) + "\n"))
    assert [n for n in loaded.notes if "column 'w' was read with '.' as the decimal point ('1.083' in row 2)" in n]
    assert pd.to_numeric(loaded.frame["w"]).tolist() == [1.083, 0.85, 1.107, 2, 1.253, 1.37]
    assert loaded.frame["a"].round(3).tolist() == data["a"].round(3).tolist()


def test_three_decimal_dots_alone_in_a_semicolon_file_are_decimals_without_a_note(tmp_path):
    # answers written 4.000 in a semicolon file and no decimal comma anywhere: read as 4, nothing to say
    from cfa_tool.data.readers import read_data

    path = _write(tmp_path, "a;b;c\n4.000;3.000;2.000\n1.000;2.000;5.000\n")
    loaded = read_data(path)
    assert [n for n in loaded.notes if "fields separated by semicolons" not in n] == []  # only how the file was read
    assert pd.to_numeric(loaded.frame["a"]).tolist() == [4, 1]
