"""At 40 columns (COLUMNS=40) a terminal table's title that holds a name longer than the line broke it mid-word
('satisfaction_with_the_overall_service_qu' above 'ality_of_the_line', session note s19): a title, its continued
title and its note break a long name after a '_' or '-' inside it, as the tables' cells do (the one rule,
reporting.terminal._names_broken), never inside a part; and a continued title stands in no parentheses of its own
(a title such as 'Items: descriptive statistics (analysed rows)' read '(... (analysed rows), continued)')."""

from __future__ import annotations

import io
import re

import pytest

from cfa_tool.reporting.tables import ReportTable
from cfa_tool.reporting.terminal import SafeConsole, rich_table

LONG = "satisfaction_with_the_overall_service_quality_of_the_line"
PARTS = set(LONG.split("_")) | {"a"}  # satisfaction, with, ... line; the item is the name and _a


def _drawn(width: int, title: str, note: str | None = None) -> str:
    table = ReportTable("loadings", title, ("Item", "Estimate", "SE", "z", "p", "Standardized"),
                        ("l", "r", "r", "r", "r", "r"),
                        ((LONG + "_a", "0.123", "0.045", "2.73", ".006", ".71"),), note=note)
    out = io.StringIO()
    SafeConsole(file=out, width=width, no_color=True, highlight=False).print(rich_table(table))
    return out.getvalue()


def _pieces(text: str) -> list[str]:
    """Every run of the name's letters and '_' in ``text`` that a line holds, line by line."""
    return [piece for line in text.splitlines() for piece in re.findall(r"[a-z_]*_[a-z_]*", line)]


@pytest.mark.parametrize("width", [40, 52, 80])
def test_a_long_name_in_a_title_breaks_only_after_an_underscore(width):
    text = _drawn(width, f"Loadings of the factor {LONG}", note=f"The note names {LONG} too.")
    assert max(len(line.rstrip()) for line in text.splitlines()) <= width
    for piece in _pieces(text):
        # each line's piece of the name is a run of whole parts (satisfaction_with_ ...), none cut inside
        assert piece.strip("_") in LONG + "_a", piece
        assert set(piece.strip("_").split("_")) <= PARTS, (piece, text)


def test_a_continued_title_has_no_parentheses_around_a_title_that_holds_some():
    text = _drawn(40, "Items: descriptive statistics (analysed rows)")
    assert "continued" in text  # (the table goes on in parts at 40 columns)
    flat = " ".join(text.split())
    assert "Items: descriptive statistics (analysed rows), continued" in flat
    assert "(Items" not in flat


def test_the_report_lines_paragraph_notes_and_cautions_break_a_long_name_as_the_tables_do(rider_demo):
    """The neighbours of the titles: the methods paragraph, the lines under the title, the warnings, notes and
    cautions of a fit whose factor is named with 45 characters, at 40 columns."""
    import cfa_tool
    from cfa_tool.reporting.fit_document import fit_report
    from cfa_tool.reporting.terminal import report_text

    name = "satisfaction_with_the_overall_service_quality"
    result = cfa_tool.fit(f"factor {name}: on_time, short_wait, accurate_info, easy_transfer\n", rider_demo)
    text = report_text(fit_report(result), 40)
    text = re.sub(r"\nModel\n.*?\n\n", "\n", text, flags=re.S)  # (the model file's text, kept as it can be copied)
    assert text.count("satisfaction_with_the_overall_service_") >= 3  # (the paragraph names it twice, a table once)
    parts = set(name.split("_"))
    for line in text.splitlines():
        for piece in re.findall(r"[a-z_]*_[a-z_]*", line):
            if piece.strip("_") and piece.strip("_") in name:
                assert set(piece.strip("_").split("_")) <= parts, (piece, line)


def test_at_40_columns_a_long_name_leaves_the_item_column_its_room(rider_demo):
    """The descriptive statistics of items whose factor has a name of 45 characters, at 40 columns: the part of the
    table that holds the factor's column kept it at 40 characters, unbroken (the rule of LONGEST_UNBROKEN), and
    the item column beside it was one character wide, each name written down the page a letter to a line.  A long
    name is now kept whole only up to half the room; each part shows every item's name whole."""
    import cfa_tool
    from cfa_tool.reporting.fit_document import fit_report
    from cfa_tool.reporting.terminal import report_text

    result = cfa_tool.fit("factor satisfaction_with_the_overall_service_quality: on_time, short_wait, accurate_info, "
                          "easy_transfer\n", rider_demo)
    text = report_text(fit_report(result), 40)
    parts = text.split("Items: descriptive statistics")[1:]
    assert len(parts) >= 3
    for part in parts:
        rows = part.split("\n\n")[0]
        for item in ("on_time", "short_wait", "accurate_info", "easy_transfer"):
            assert re.search(rf"^ {item} ", rows, flags=re.M), (item, rows)
