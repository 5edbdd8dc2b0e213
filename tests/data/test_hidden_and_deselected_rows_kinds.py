"""Rows a workbook hides and rows an SPSS file's saved case filter deselects are rows, not values that look like no
answers: each is a caution of its own kind (rows-s21 left both under 'values that look like no answers', which also
put check's note on such values under its coverage table), first in every view of every command, saying what was
found, that the rows were kept, and the option that changes it.

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed), written to a workbook
by openpyxl and to an SPSS file by pyreadstat, writers this project did not write; the rows hidden and deselected are
counted here with pandas."""

from __future__ import annotations

import json

import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from tests.conftest import run_cli

openpyxl = pytest.importorskip("openpyxl")

ITEMS = ("on_time", "short_wait", "accurate_info", "easy_transfer", "seat_available", "clean", "temperature",
         "room_to_stand", "greeting", "helpful", "respectful", "clear_answers")


def _book(frame, path, hidden=(), filtered=False):
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append(list(frame.columns))
    for row in frame.itertuples(index=False):
        sheet.append([None if isinstance(v, float) and v != v else v for v in row])
    if filtered:
        sheet.auto_filter.ref = f"A1:N{len(frame) + 1}"
        sheet.auto_filter.add_filter_column(1, ["north"])
    for k in hidden:
        sheet.row_dimensions[k].hidden = True
    book.save(path)
    return path


def test_rows_hidden_by_hand_are_their_own_caution_first_in_every_command(rider_demo, rider_model, tmp_path, capsys):
    path = _book(rider_demo, tmp_path / "riders.xlsx", hidden=(5, 9, 12))
    for problems in (cfa_tool.fit(rider_model, str(path)).problems, cfa_tool.check(rider_model, str(path)).problems,
                     cfa_tool.scores(rider_model, str(path)).fit.problems,
                     cfa_tool.explore(str(path), items=list(ITEMS), replications=5).data_problems):
        first = problems[0]
        assert first.kind is ProblemKind.HIDDEN_ROWS and not first.kind.inadmissible
        assert ProblemKind.VALUES_NOT_ANSWERS not in [p.kind for p in problems]
        said = str(first.explanation)
        assert "hides 3 of its 480 rows of data (rows 5, 9, 12) by hand, not by a filter" in said
        assert "they are kept as the file holds them, and a fit analyses them with the rows it shows" in said
        # no workbook filter to speak of: the advice names a column that tells the rows apart
        assert "the column its filter uses" not in str(first.advice)
        assert "on a column that tells them apart" in str(first.advice) and "keep" in str(first.advice)
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    code, out, _ = run_cli(["check", model, "--data", path], capsys)
    assert code == 0
    # check's note on values that look like no answers belongs to such values, not to hidden rows
    assert "A value that looks like no answer" not in out
    code, out, _ = run_cli(["fit", model, "--data", path, "--json", tmp_path / "f.json"], capsys)
    assert code == 0
    assert json.loads((tmp_path / "f.json").read_text())["problems"][0]["kind"] == "rows the workbook hides"
    assert "--keep" in " ".join(out.split("Rider experience")[0].replace("│", " ").split())


def test_rows_hidden_by_a_filter_name_the_filter_that_keeps_the_rows_shown(rider_demo, rider_model, tmp_path):
    south = [k for k, v in enumerate(rider_demo.district, start=2) if v != "north"]
    path = _book(rider_demo, tmp_path / "riders.xlsx", hidden=south, filtered=True)
    first = cfa_tool.fit(rider_model, str(path)).problems[0]
    assert first.kind is ProblemKind.HIDDEN_ROWS
    hidden = int((rider_demo.district != "north").sum())  # pandas' count
    shown = ", ".join(map(str, south[:5]))  # the sheet's rows: the frame's row numbers plus the header's row
    assert f"hides {hidden} of its 480 rows of data (rows {shown} and {hidden - 5} more) by its filter; " \
           f"they are kept" in str(first.explanation)
    assert "To analyse only the rows the workbook's filter shows, give keep=[\"district == 'north'\"]" in \
        str(first.advice)
    assert "a workbook" not in first.phrase() and "rows that the workbook hides" in first.phrase()


def test_rows_an_spss_case_filter_deselects_are_their_own_caution(rider_demo, rider_model, tmp_path):
    pyreadstat = pytest.importorskip("pyreadstat")
    frame = rider_demo.copy()
    frame["filter_$"] = (frame["district"] == "north").astype(float)
    path = tmp_path / "survey.sav"
    pyreadstat.write_sav(frame, str(path), variable_value_labels={"filter_$": {0: "Not Selected", 1: "Selected"}},
                         column_labels={"filter_$": "district = 'north' (FILTER)"})
    deselected = int((frame["filter_$"] == 0).sum())  # pandas' count
    for problems in (cfa_tool.fit(rider_model, str(path)).problems, cfa_tool.check(rider_model, str(path)).problems,
                     cfa_tool.scores(rider_model, str(path)).fit.problems):
        first = problems[0]
        assert first.kind is ProblemKind.DESELECTED_ROWS
        assert ProblemKind.VALUES_NOT_ANSWERS not in [p.kind for p in problems]
        assert f"marks {deselected} of its 480 rows 'Not Selected'" in str(first.explanation)
        assert "they are kept as the file holds them, and a fit analyses them with the selected rows" in str(first.explanation)
        assert "keep=['filter_$ = 1']" in str(first.advice)
    assert cfa_tool.fit(rider_model, str(path)).to_dict()["problems"][0]["kind"] == \
        "rows a saved case filter deselects"


def test_hidden_rows_a_row_filter_leaves_out_are_counted_apart(rider_demo, rider_model, tmp_path):
    path = _book(rider_demo, tmp_path / "riders.xlsx", hidden=(5, 9, 12))
    # sheet rows 5 and 9 hold the frame's rows 3 and 7 (the header is row 1)
    out = [f"rider_id != {rider_demo.rider_id[3]}", f"rider_id != {rider_demo.rider_id[7]}"]
    first = cfa_tool.fit(rider_model, str(path), keep=out).problems[0]
    assert first.kind is ProblemKind.HIDDEN_ROWS
    assert ("hides 3 of its 480 rows of data (row 12) by hand, not by a filter; the row filters leave out 2 of them, "
            "and the other 1 is kept as the file holds it, and a fit analyses it with the rows it shows") \
        in str(first.explanation)


def test_check_says_what_a_fit_does_with_the_rows_not_that_it_analysed_them(rider_demo, rider_model, tmp_path, capsys):
    """check analyses nothing (rows-s23: it said the hidden and deselected rows 'were kept and analysed'): its
    caution says that they are kept and what a fit does with them, in words as true of the fit's own report."""
    pyreadstat = pytest.importorskip("pyreadstat")
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    book = _book(rider_demo, tmp_path / "riders.xlsx", hidden=(5, 9, 12))
    frame = rider_demo.copy()
    frame["filter_$"] = (frame["district"] == "north").astype(float)
    spss = tmp_path / "survey.sav"
    pyreadstat.write_sav(frame, str(spss), variable_value_labels={"filter_$": {0: "Not Selected", 1: "Selected"}})
    for path, others in ((book, "the rows it shows"), (spss, "the selected rows")):
        code, out, _ = run_cli(["check", model, "--data", path], capsys)
        assert code == 0
        flat = " ".join(out.replace("│", " ").split())
        assert "analysed with" not in flat.replace("a fit analyses them with", "")
        assert f"they are kept as the file holds them, and a fit analyses them with {others}." in flat
    # two of the three hidden rows left out by a row filter (sheet rows 5 and 9: the frame's rows 3 and 7)
    keep = f"rider_id not in {rider_demo.rider_id[3]}, {rider_demo.rider_id[7]}"
    code, out, _ = run_cli(["check", model, "--data", book, "--keep", keep], capsys)
    assert code == 0
    flat = " ".join(out.replace("│", " ").split())
    assert ("the row filters leave out 2 of them, and the other 1 is kept as the file holds it, and a fit analyses it "
            "with the rows it shows.") in flat
