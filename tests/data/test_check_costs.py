"""What the data checks cost on ordinary data (issue 20, sixteenth round): each check passes over a table that
cannot hold what it looks for without the work of looking, and decides as before.  No timings: the tests count
the steps a check takes (a column taken out of the frame, a screen run) on data that need none, and compare the
shortcuts with the rules written out."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data import odd_values as screen
from cfa_tool.data import labels, readers
from cfa_tool.data.labels import case_variants
from cfa_tool.data.moments import item_values
from cfa_tool.data.odd_values import OddKind, odd_values
from cfa_tool.errors import DataError
from cfa_tool.pipeline import inputs

ITEMS = tuple(f"x{i}" for i in range(1, 10))


def _places_written_out(row: np.ndarray) -> int | None:
    """The rule of data.odd_values before the sixteenth round: each power of ten tried in turn."""
    return next((k for k in range(7) if np.all(np.abs(row * 10 ** k - np.round(row * 10 ** k)) < 1e-6)), None)


def test_decimal_places_are_those_of_each_power_tried_in_turn():
    rng = np.random.default_rng(16)
    for _ in range(3000):
        places = int(rng.integers(0, 9))
        row = np.round(rng.normal(3.0, 10.0 ** rng.integers(0, 4), size=int(rng.integers(1, 12))), places)
        if rng.random() < 0.1:
            row[0] = rng.choice([1e300, -1e300, 1e-7, 0.5 + 1e-7, -0.0])
        with np.errstate(over="ignore", invalid="ignore"):
            assert screen._decimal_places(row) == _places_written_out(row)


def test_answers_of_many_decimals_are_passed_over_without_the_block_screen(hs_data, monkeypatch):
    """Holzinger & Swineford's scores are written with seven decimals, which no row of statistics the screen finds by
    its values has (at most six): its necessary condition, tested for every opening row at once, is not run."""
    def never(*args):
        raise AssertionError("the screen for an opening row ran")

    monkeypatch.setattr(screen, "_may_open_a_block", never)
    assert odd_values(hs_data, ITEMS) == ()
    assert cfa_tool.fit("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n",
                        hs_data).converged


@pytest.mark.parametrize("decimals", [1, 2, 4, 6])
def test_a_block_written_with_a_few_decimals_under_answers_of_many_is_still_found(hs_data, decimals):
    frame = hs_data[list(ITEMS)].copy()
    X = item_values(frame, ITEMS)
    stats = [np.round(X.mean(axis=0), decimals), np.round(X.std(axis=0, ddof=1), decimals)]
    frame = pd.concat([frame, pd.DataFrame(stats, columns=list(ITEMS))], ignore_index=True)
    found = odd_values(frame, ITEMS)
    assert [o.kind for o in found][:1] == [OddKind.SUMMARY_BLOCK]
    assert found[0].holds == ("the means", "the standard deviations")


def test_a_block_written_with_seven_decimals_was_never_found_by_its_values(hs_data):
    """The rule of data.odd_values._statistic_of (statistics written with at most six decimals), as before."""
    frame = hs_data[list(ITEMS)].copy()
    X = item_values(frame, ITEMS)
    means = np.round(X.mean(axis=0), 7) + 3e-8  # seven decimals
    frame = pd.concat([frame, pd.DataFrame([means], columns=list(ITEMS))], ignore_index=True)
    assert not any(o.kind is OddKind.SUMMARY_BLOCK for o in odd_values(frame, ITEMS))


def _column_takes(monkeypatch) -> list:
    taken = []
    original = pd.DataFrame.__getitem__

    def counted(self, key):
        taken.append(key)
        return original(self, key)

    monkeypatch.setattr(pd.DataFrame, "__getitem__", counted)
    return taken


def test_the_header_and_formula_scans_take_no_column_of_numbers_out(hs_data, monkeypatch):
    """A table whose columns are numbers but one (the school's name) holds no repeated header row (a row repeats two
    column names or more, in columns of text) and no formula error among its items: decided from the dtypes."""
    frame = hs_data.copy()
    taken = _column_takes(monkeypatch)
    readers._check_repeated_header(frame, "hs.csv", 1)
    readers._check_formula_errors(frame, "hs.csv", ITEMS)
    assert taken == []


def test_the_scans_still_refuse_what_they_look_for(hs_data):
    frame = hs_data[["school", "x1", "x2", "x3"]].astype({c: object for c in ("x1", "x2", "x3")})
    frame.loc[frame.index[40], ["x1", "x2", "x3"]] = ["x1", "x2", "x3"]
    with pytest.raises(DataError, match="repeats the column names"):
        readers._check_repeated_header(frame.reset_index(drop=True), "hs.csv", 1)
    frame = hs_data.astype({"x3": object}).copy()
    frame.loc[frame.index[7], "x3"] = "#DIV/0!"
    with pytest.raises(DataError, match="formula error #DIV/0!"):
        readers._check_formula_errors(frame.reset_index(drop=True), "hs.csv", ITEMS)


def test_group_labels_without_case_variants_are_not_read_cell_by_cell(hs_data, monkeypatch):
    """The school's two names differ in more than case: each distinct text is read once, not each of 301 cells."""
    def never(values):
        raise AssertionError("every cell read as a label")

    monkeypatch.setattr(labels, "case_variants", never)
    assert inputs.group_case_problems(hs_data, "school") == ()
    assert inputs.group_case_problems(hs_data.assign(grade=hs_data["grade"].astype(float)), "grade") == ()


def test_labels_differing_only_in_case_are_named_as_before():
    frame = pd.DataFrame({"district": ["north"] * 5 + ["North"] * 3 + ["south "] * 4 + ["South"] * 2})
    problems = inputs.group_case_problems(frame, "district")
    assert len(problems) == 1 and "'North' (3 rows) and 'north' (5 rows)" in problems[0].explanation
    assert "'South' (2 rows) and 'south' (4 rows)" in problems[0].explanation


def test_the_case_shortcut_never_hides_labels_that_differ_only_in_case():
    """Whatever the cells (text, numbers, truth values, numpy texts, mixtures), the shortcut says 'no' only when
    data.labels.case_variants finds nothing."""
    rng = np.random.default_rng(7)
    pool = ["north", "North", "NORTH ", "south", "Süd", "sud", "1", "1.0", "true", "True", 1, 1.0, True, False, 2.5,
            np.str_("North"), np.float64(3.0), "ǅ", "ǆ", "Ǆ", "inf", "INF", float("inf"), -0.0, 0.0]
    for _ in range(3000):
        cells = [pool[k] for k in rng.integers(0, len(pool), size=int(rng.integers(1, 8)))]
        if rng.random() < 0.3:
            cells = [c for c in cells if isinstance(c, (int, float)) and not isinstance(c, bool)] or [1.0]
        column = pd.Series(cells)
        if not inputs._may_differ_by_case(column):
            assert case_variants(column) == [], cells


def test_blank_rows_are_found_as_before_and_none_sought_beside_a_column_of_whole_numbers(hs_data, monkeypatch):
    """A column of numpy whole numbers (an id) has a value in every row: no row is blank, and no column is taken out
    to look; rows empty in every column of floats and text are still left out and named."""
    looked = []
    original = pd.Series.isna
    monkeypatch.setattr(pd.Series, "isna", lambda self: looked.append(self.name) or original(self))
    assert readers.drop_blank_rows(hs_data, "a data frame")[1] == ()
    assert looked == []
    frame = hs_data.drop(columns=["id"]).astype({"sex": float, "ageyr": float, "agemo": float, "grade": float})
    frame.loc[frame.index[[4, 9]], :] = np.nan
    kept, note = readers.drop_blank_rows(frame, "a data frame")
    assert len(kept) == len(frame) - 2 and note and "2 rows with no value in any column were skipped" in note[0]
    assert kept.equals(frame[frame.notna().any(axis=1)])
