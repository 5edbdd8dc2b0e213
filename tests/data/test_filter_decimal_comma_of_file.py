"""A row filter's number written with the decimal mark of the file it filters.  New-user trial 2 of s23: a clinic's
';' file with decimal commas in its age column was read as such (the note said 'decimals written with commas'), but
--keep 'age >= 40,5' was refused ('40,5' is not a number); a filter now reads its number as the file's cells were
read, when it compares a column of numbers.  A file read with decimal points still refuses the comma, which there
could mean a thousands separator.

Data: simulated with a fixed seed (a fictional rider survey, 200 riders, three answers and an age with one decimal)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import OptionError

MODEL = "factor comfort: q1, q2, q3\n"


def _survey() -> pd.DataFrame:
    rng = np.random.default_rng(909)
    factor = rng.normal(size=200)
    frame = pd.DataFrame(3 + factor[:, None] * np.array([0.8, 0.7, 0.6]) + 0.6 * rng.normal(size=(200, 3)),
                         columns=["q1", "q2", "q3"]).round(2)
    frame["age"] = rng.uniform(18, 80, size=200).round(1)
    return frame


@pytest.fixture(scope="module")
def files(tmp_path_factory):
    folder = tmp_path_factory.mktemp("decimal")
    frame = _survey()
    comma, point = folder / "riders_comma.csv", folder / "riders_point.csv"
    frame.to_csv(comma, sep=";", decimal=",", index=False)
    frame.to_csv(point, index=False)
    assert "," in comma.read_text().splitlines()[1]  # the premise: the cells are written with decimal commas
    return frame, comma, point


def test_a_filter_reads_its_number_with_the_files_decimal_comma(files):
    frame, comma, _ = files
    expected = int((frame["age"] >= 40.5).sum())  # the rows kept, counted apart from the tool
    assert 0 < expected < len(frame)
    by_comma = cfa_tool.fit(MODEL, comma, keep=["age >= 40,5"])
    by_point = cfa_tool.fit(MODEL, comma, keep=["age >= 40.5"])
    assert by_comma.n_obs == by_point.n_obs == expected


def test_a_file_read_with_decimal_points_still_refuses_the_comma(files):
    _, _, point = files
    with pytest.raises(OptionError, match="'40,5' is not a number"):
        cfa_tool.fit(MODEL, point, keep=["age >= 40,5"])
