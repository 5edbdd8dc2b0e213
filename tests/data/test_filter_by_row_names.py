"""A row filter on the file's row names (a first column without a name in the header, read as row names): compared
as the column 'row_name', the name the scores file gives them (new-user trial s17: a caution named two careless
responders by their row names, and the refit it advised, without them, could not be asked for: "no column
'row_name'").  Check values: the fit of the rows pandas keeps when it drops the named rows itself.  Data: Holzinger &
Swineford (1939), tests/datasets, with invented row names written in."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from tests.conftest import DATASETS

MODEL = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"


@pytest.fixture(scope="module")
def named(tmp_path_factory):
    folder = tmp_path_factory.mktemp("row_names")
    frame = pd.read_csv(DATASETS / "holzinger_swineford_1939.csv")
    frame.index = [f"S{k:03d}" for k in range(len(frame))]
    path = folder / "named.csv"
    frame.to_csv(path)  # the first column: the row names, without a name in the header
    assert path.read_text().startswith(",")
    return folder, path, frame


def test_a_filter_on_row_name_leaves_out_the_rows_it_names(named):
    _, path, frame = named
    result = cfa_tool.fit(MODEL, str(path), keep=["row_name != S007", "row_name != S120"])
    direct = cfa_tool.fit(MODEL, frame.drop(index=["S007", "S120"]).reset_index(drop=True))
    assert result.n_obs == direct.n_obs == len(frame) - 2
    assert result.fit.chi_square == pytest.approx(direct.fit.chi_square, rel=1e-9)
    # two filters of one column: one note naming both as written (data.filters.merged_exclusions)
    assert "row filters 'row_name != S007' and 'row_name != S120' kept 299 of 301 rows" in str(result.to_dict())


def test_a_column_named_row_name_is_that_column_and_a_file_without_row_names_has_none(named):
    folder, path, frame = named
    own = frame.assign(row_name=["keep" if k % 2 else "drop" for k in range(len(frame))])
    own.to_csv(folder / "own.csv")
    assert cfa_tool.fit(MODEL, str(folder / "own.csv"), keep=["row_name = keep"]).n_obs == (len(frame)) // 2
    frame.to_csv(folder / "plain.csv", index=False)
    with pytest.raises(OptionError, match=r"has no column 'row_name'"):
        cfa_tool.fit(MODEL, str(folder / "plain.csv"), keep=["row_name != S007"])
