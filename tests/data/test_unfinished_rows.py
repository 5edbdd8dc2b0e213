"""A survey export's 'Finished' column: rows marked not finished are analysed with the answers they gave, and a note
says how many and the row filter that leaves them out (a new user had to decide alone); with the filter given, or
every row finished, no note.  Data: the bundled demo rider survey (fictional, simulated with a fixed seed)."""

from __future__ import annotations

import numpy as np

import cfa_tool


def test_unfinished_rows_are_named_with_the_filter_that_leaves_them_out(tmp_path, rider_demo, rider_model):
    data = rider_demo.copy()
    data["Finished"] = np.where(np.arange(len(data)) % 10 == 0, "False", "True")
    path = tmp_path / "export.csv"
    data.to_csv(path, index=False)
    unfinished = int((data["Finished"] == "False").sum())
    result = cfa_tool.fit(rider_model, str(path))
    note = next(n for n in result.warnings if "as not finished" in n)
    assert (f"the column 'Finished' marks {unfinished} of the {len(data)} rows as not finished: they are analysed "
            f"with the answers they gave; to leave them out, keep=['Finished = True']") in note
    kept = cfa_tool.fit(rider_model, str(path), keep="Finished = True")
    assert kept.n_obs == len(data) - unfinished
    assert not any("as not finished" in n for n in kept.warnings)
    data["Finished"] = 1
    data.to_csv(path, index=False)
    assert not any("as not finished" in n for n in cfa_tool.fit(rider_model, str(path)).warnings)
