"""A data frame built in Python with a list in an item's cell: fit raised pandas' bare "TypeError: unhashable type:
'list'" (no column, no row), where a TRUE cell gets an error naming both (hostile tester, sixteenth round, case 11).
Now a DataError naming the column and the row's index label; a column of lists the model does not use is left alone
(the fit equals the fit without it)."""

from pathlib import Path

import pandas as pd
import pytest

from cfa_tool import fit
from cfa_tool.errors import DataError

ROOT = Path(__file__).resolve().parents[2]
MODEL = ROOT / "models" / "rider_three_factors.cfa"


@pytest.fixture(scope="module")
def rows():
    return pd.read_csv(ROOT / "demo" / "rider_survey.csv")


@pytest.mark.parametrize("cell", [[4], {"a": 4}, {4}])
def test_a_container_in_an_item_cell_is_named(rows, cell):
    data = rows.copy()
    data["on_time"] = data["on_time"].astype(object)
    data.at[3, "on_time"] = cell
    with pytest.raises(DataError) as err:
        fit(MODEL, data)
    assert "column 'on_time', row labelled 3: holds a " in str(err.value)


def test_a_column_of_lists_the_model_does_not_use_is_left_alone(rows):
    data = rows.copy()
    data["notes"] = [[1]] * len(data)
    assert fit(MODEL, data).fit.chi_square == pytest.approx(fit(MODEL, rows).fit.chi_square, rel=1e-12)
