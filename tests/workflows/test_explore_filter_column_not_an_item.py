"""explore's range-restriction caution names only items it analysed (new-user trial s24, finding 4: with
--keep 'attn_check = 4', the attention-check column, constant after the filter, was 'Left out as constant' and yet
the first caution called it 'an item of factor1' whose loading, factor variance and omega were biased).  A filter on
an item explored is still named first, as one of the items analysed, not as an item of the one-factor placeholder
model explore reads the data with (its 'factor1' is no factor of the exploration).

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed) with an invented
attention check answered 4 ('choose agree') by every row but every 25th."""

from __future__ import annotations

import numpy as np

from tests.conftest import run_cli


def _flat(text: str) -> str:
    return " ".join(text.replace("\u2502", " ").replace("\u2503", " ").split())


def _data(tmp_path, rider_demo):
    frame = rider_demo.drop(columns=["rider_id", "district"]).copy()
    frame["attn_check"] = np.where(np.arange(len(frame)) % 25 == 0, 2, 4)
    path = tmp_path / "survey.csv"
    frame.to_csv(path, index=False)
    return path


def test_a_filter_column_left_out_as_constant_is_named_as_no_item(tmp_path, capsys, rider_demo):
    code, out, err = run_cli(["explore", "--data", _data(tmp_path, rider_demo), "--keep", "attn_check = 4",
                              "--replications", "20"], capsys)
    assert code == 0, err
    flat = _flat(out)
    # left out by name: as constant among the rows kept, or (rows-s24's rule, judged on the rows read) as the codes of
    # two groups, which the column is before the filter
    left = "Left out as constant" if "Left out as constant" in flat else "Left out as codes of two groups"
    assert left in flat and "attn_check" in flat.split(left)[1][:300]
    assert "selects rows by their answers to 'attn_check'" not in flat
    assert "an item of factor1" not in flat


def test_a_filter_on_an_item_explored_is_named_as_one_of_the_items_analysed(tmp_path, capsys, rider_demo):
    code, out, err = run_cli(["explore", "--data", _data(tmp_path, rider_demo), "--keep", "on_time >= 3",
                              "--replications", "20"], capsys)
    assert code == 0, err
    flat = _flat(out)
    assert "Row filter 'on_time >= 3' selects rows by their answers to 'on_time', one of the items analysed" in flat
    assert "an item of factor1" not in flat


def test_the_default_items_are_chosen_from_the_rows_the_filters_keep(tmp_path, rider_demo):
    """The two-valued rule judges the rows analysed (rows-s25, task 3): a wave column of 1 and 2, filtered to wave 1,
    is one value in every row analysed, left out as constant, not as the codes of two groups it is among the rows
    read; without the filter it is the codes of two groups.  The data's own count (pandas) of the rows of wave 1 is
    the N explored."""
    import cfa_tool

    frame = rider_demo.drop(columns=["rider_id", "district"]).copy()
    frame["wave"] = np.where(np.arange(len(frame)) % 3 == 0, 2, 1)
    path = tmp_path / "waves.csv"
    frame.to_csv(path, index=False)
    kept = cfa_tool.explore(str(path), keep="wave = 1", replications=20).to_dict()
    assert kept["items_left_out"] == [{"column": "wave", "reason": "constant"}]
    assert kept["data"]["rows_read"] == len(frame) and "wave" not in kept["items"]
    assert kept["data"]["rows_used"] == int((frame["wave"] == 1).sum())
    every = cfa_tool.explore(str(path), replications=20).to_dict()
    assert every["items_left_out"] == [{"column": "wave", "reason": "grouping or record"}]


def test_a_word_in_a_row_the_filters_leave_out_neither_drops_nor_refuses_an_item(tmp_path, rider_demo):
    """The neighbour of the rule above: a stray 'x' in two rows of wave 2 made 'clean' a column of text in the rows
    read, so that explore of wave 1 left it out as text (default items) or refused it (named in --items), where fit
    of the same filter reads it as numbers; judged on the rows kept, it is an item.  Check value: the items of the
    same exploration of a file without the two words (pandas writes both files)."""
    import cfa_tool

    frame = rider_demo.drop(columns=["rider_id", "district"]).copy()
    frame["wave"] = np.where(np.arange(len(frame)) % 3 == 0, 2, 1)
    clean = tmp_path / "clean.csv"
    frame.to_csv(clean, index=False)
    worded = frame.astype({"clean": object})
    worded.loc[worded.index[worded["wave"] == 2][:2], "clean"] = "x"
    path = tmp_path / "worded.csv"
    worded.to_csv(path, index=False)
    reference = cfa_tool.explore(str(clean), keep="wave = 1", replications=20).to_dict()
    explored = cfa_tool.explore(str(path), keep="wave = 1", replications=20).to_dict()
    assert "clean" in explored["items"] and explored["items"] == reference["items"]
    named = ["on_time", "short_wait", "accurate_info", "seat_available", "clean", "temperature"]
    assert cfa_tool.explore(str(path), keep="wave = 1", items=named, replications=20).to_dict()["items"] == named
