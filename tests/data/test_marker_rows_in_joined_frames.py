"""The rows of cells written as markers of no answer ('NA') are kept in the read frame's attrs, which pandas compares
(``==``, one truth value) when it concatenates or joins frames and copies into every frame made from one.  Kept as
bare numpy arrays, two 'NA' cells in one column made every command that joins or concatenates read frames stop with an
internal error (new-user trial s26: explore with --missing-codes, replicate of ordinal items, the advice past empty
categories of ordinal items in groups).  The markers' counts are pandas' own reading of the same files ('NA' is one
of pandas' default missing values)."""
from __future__ import annotations

import copy

import numpy as np
import pandas as pd
import pytest

from tests.conftest import run_cli


def _answers(n: int, items: int, seed: int) -> pd.DataFrame:
    """Answers 0 to 3 of one factor, as text (so that 'NA' can be written among them)."""
    rng = np.random.default_rng(seed)
    eta = rng.standard_normal(n)
    cut = [np.digitize(.8 * eta + .6 * rng.standard_normal(n), [-.7, .2, 1.1]) for _ in range(items)]
    return pd.DataFrame({f"q{k + 1}": c for k, c in enumerate(cut)}).astype(object)


def _write(frame: pd.DataFrame, path) -> None:
    frame.to_csv(path, index=False) if path.suffix == ".csv" else frame.to_excel(path, index=False)


@pytest.mark.parametrize("suffix", [".csv", ".xlsx"])
def test_read_frames_with_marker_cells_concatenate_and_join(tmp_path, suffix):
    from cfa_tool.data.readers import MARKER_COLUMN_ROWS, read_data

    frames = []
    for k in (1, 2):
        frame = _answers(60, 4, k)
        frame.loc[[3, 9, 20], "q1"] = "NA"
        frame.loc[[5, 6][:k], "q2"] = "NA"
        path = tmp_path / f"d{k}{suffix}"
        _write(frame, path)
        if suffix == ".csv":
            assert pd.read_csv(path)["q1"].isna().sum() == 3  # pandas' own reading: three 'NA' cells
        frames.append(read_data(str(path)).frame)
    first = frames[0]
    assert MARKER_COLUMN_ROWS in first.attrs
    assert (first.attrs == copy.deepcopy(first.attrs)) is True  # one truth value, as pandas asks
    assert (first.attrs == frames[1].attrs) is False
    both = pd.concat(frames, ignore_index=True)
    assert len(both) == 120 and both["q1"].isna().sum() == 6
    joined = first[["q1"]].join(first[["q2", "q3"]])
    assert joined.shape == (60, 3) and joined["q1"].isna().sum() == 3


def test_explore_with_marker_cells_and_a_missing_code(tmp_path, capsys):
    """The new user's explore: 'NA' in an item column, --missing-codes 999, a decimal column beside the items."""
    frame = _answers(120, 4, 5)
    frame.loc[[3, 9], "q1"] = "NA"
    frame.loc[7, "q2"] = 999
    frame.insert(0, "bmi", np.round(np.random.default_rng(1).normal(26, 4, 120), 1))
    frame.to_csv(tmp_path / "clinic.csv", index=False)
    code, out, err = run_cli(["explore", "--data", tmp_path / "clinic.csv", "--missing-codes", "999"], capsys)
    assert code == 0, err
    assert "internal error" not in out + err and "bmi" in out


def test_replicate_random_halves_of_ordinal_items_with_marker_cells(tmp_path, capsys):
    frame = _answers(400, 5, 8)
    frame.loc[[3, 9, 30], "q1"] = "NA"
    frame.to_csv(tmp_path / "d.csv", index=False)
    (tmp_path / "m.cfa").write_text("factor f: q1, q2, q3, q4, q5\nordinal q1..q5\n")
    code, out, err = run_cli(["replicate", tmp_path / "m.cfa", "--data", tmp_path / "d.csv", "--seed", "3"], capsys)
    assert code == 0, err
    assert "internal error" not in out + err


def test_ordinal_groups_with_an_empty_category_and_marker_cells(tmp_path, capsys):
    """Advice past a category one group lacks counts the groups a row filter keeps on the groups' rows concatenated
    (data.polychoric._groups_kept): refused with the advice, exit 2, never an internal error."""
    frame = _answers(300, 4, 21)
    frame["site"] = np.where(np.arange(300) % 2 == 0, "north", "south")
    top = (frame["site"] == "south") & (frame["q3"] == 3)
    frame.loc[top, "q3"] = 2  # the south never answers 3 to q3
    frame.loc[[1, 5, 11], "q1"] = "NA"
    frame.to_csv(tmp_path / "d.csv", index=False)
    (tmp_path / "m.cfa").write_text("factor f: q1, q2, q3, q4\nordinal q1..q4\n")
    code, out, err = run_cli(["invariance", tmp_path / "m.cfa", "--data", tmp_path / "d.csv", "--group-column",
                              "site"], capsys)
    assert "internal error" not in out + err
    assert code in (0, 2), err
