"""Words that say no answer ('Not applicable') in the item columns are read as no answer alike from a data file and
from a pandas DataFrame of the same cells (new-user trial, session 12: the file was read, the frame refused with
"the answer 'Not applicable' is not one of the words").

The data are invented (a fictional transit agency's rider survey, answers recorded as words).  Check values: the
cells written as 'Not applicable' are counted here by pandas from the frame built below."""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from tests.conftest import simulate_cfa

ITEMS = ["c1", "c2", "c3", "s1", "s2", "s3"]
WORDS = ["Never", "Sometimes", "Often", "Always"]
MODEL = ("factor comfort: c1..c3\nfactor courtesy: s1..s3\n"
         'answers "Never" = 1, "Sometimes" = 2, "Often" = 3, "Always" = 4\n')


def _answers() -> pd.DataFrame:
    loadings = np.kron(np.eye(2), np.full((3, 1), 0.8))
    latent = simulate_cfa(loadings, np.array([[1, 0.4], [0.4, 1]]), np.eye(6) * 0.36, 400, 1204, ITEMS)
    words = latent.apply(lambda column: pd.Series(np.array(WORDS)[np.digitize(column, [-0.6, 0.3, 1.1])],
                                                  index=column.index))
    words.loc[::13, "c2"] = "Not applicable"
    words.loc[5::17, "s3"] = "Not applicable"
    return words


def test_not_applicable_is_no_answer_in_a_data_frame_as_in_a_file(tmp_path):
    frame = _answers()
    path = tmp_path / "riders.csv"
    frame.to_csv(path, index=False)
    from_file = cfa_tool.fit(MODEL, path)
    from_frame = cfa_tool.fit(MODEL, frame)  # used to raise DataError
    not_applicable = int((frame == "Not applicable").sum().sum())  # pandas, from the cells written above
    assert not_applicable == 31 + 24
    for result in (from_file, from_frame):
        assert result.n_obs == len(frame)  # full-information ML keeps the rows with a gap
        assert sum(len(found.rows) for found in result.data.non_answers) == not_applicable
    assert from_frame.fit.chi_square == from_file.fit.chi_square
    assert [p.kind for p in from_frame.problems] == [p.kind for p in from_file.problems]
