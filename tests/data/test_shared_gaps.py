"""A shorter form of the questionnaire (a planned-missing design): a large share of the rows leaving one block of
items unanswered together is found, named in the table of missing-data patterns without cutting its items, and said
in the methods paragraph, as the form's when a column marks its rows (new-user trial s28, finding 3: a third of the
riders given an 8-item form were pooled with refusals, the pattern cut at 'and 2 more').  The demo data of a
fictional transit agency, its gaps made here; the counts checked against pandas' own count of the rows."""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.data.moments import missing_summary
from cfa_tool.data.shared_gaps import shared_gaps
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.tables import missing_table

SHORT = ["easy_transfer", "room_to_stand", "clear_answers"]  # the last item of each factor, left off the short form


def _forms(rider_demo: pd.DataFrame, seed: int = 28, refused: float = 0.03) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    data = rider_demo.copy()
    items = [c for c in data.columns if c not in ("rider_id", "district")]
    data["form"] = np.where(rng.random(len(data)) < 1 / 3, "short", "long")
    data.loc[data["form"] == "short", SHORT] = np.nan
    data[items] = data[items].mask(rng.random((len(data), len(items))) < refused)  # answers not given, here and there
    return data


def test_a_block_left_unanswered_by_a_third_of_the_rows_is_found_with_its_column(rider_demo):
    data = _forms(rider_demo)
    items = [c for c in rider_demo.columns if c not in ("rider_id", "district")]
    found = shared_gaps(data, items)
    assert found is not None and found.items == tuple(SHORT)
    # pandas' count: the rows that answered none of the three, and those that answered every other item
    none_of_them = data[SHORT].isna().all(axis=1)
    assert found.rows == int(none_of_them.sum())
    others = [c for c in items if c not in SHORT]
    assert found.alone == int((none_of_them & data[others].notna().all(axis=1)).sum())
    assert found.marked_by == ("form", "short")
    # without the column of forms the block is found, unmarked
    assert shared_gaps(data.drop(columns="form"), items).marked_by is None


def test_a_form_coded_by_a_number_is_named_as_written_and_a_column_of_lists_is_passed_over(rider_demo):
    # the form's code as the file holds it (1234567, never the '1.23457e+06' of Python's 'g' format, which names
    # another number), and a column whose cells pandas cannot hash (a list in a cell) is no column of forms, not a
    # stop (it once raised TypeError out of the fit)
    data = _forms(rider_demo)
    items = [c for c in rider_demo.columns if c not in ("rider_id", "district")]
    data["notes"] = [[k] for k in range(len(data))]
    data["form"] = np.where(data["form"] == "short", 1234567.0, 7654321.0)
    found = shared_gaps(data[["notes", *data.columns.drop("notes")]], items)
    assert found.marked_by == ("form", "1234567")


def test_gaps_here_and_there_are_no_form(rider_demo):
    data = _forms(rider_demo)
    data.loc[data["form"] == "short", SHORT] = 4  # every row given the whole form
    items = [c for c in rider_demo.columns if c not in ("rider_id", "district")]
    assert shared_gaps(data, items) is None
    assert "shared_gaps" not in missing_summary(data, tuple(items))


def test_the_reports_say_the_form_and_show_its_items(rider_demo, rider_model):
    data = _forms(rider_demo)
    result = cfa_tool.fit(rider_model, data)
    table = missing_table(result)
    assert "easy_transfer, room_to_stand, clear_answers (a shorter form)" in [r[0] for r in table.rows]
    assert "a shorter form of the questionnaire, given to the rows where form is 'short'" in str(table.note)
    assert "missing by design" in str(table.note)
    paragraph = methods_paragraph(result)
    assert "a shorter form given to the rows where form is 'short', so that their gaps are missing by design" in paragraph
    unmarked = cfa_tool.fit(rider_model, data.drop(columns="form"))
    assert "the pattern of a shorter form of the questionnaire, whose gaps, if the form was given by design" in \
        methods_paragraph(unmarked)
