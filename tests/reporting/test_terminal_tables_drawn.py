"""The terminal's tables drawn line by line (reporting.terminal._Drawn) are the lines rich's own Table draws for the
same layout (rich is the reference here: the project did not write it), in plain and in coloured output, at every
width; and a fit's report takes that quick route for its tables at the default 80 columns."""

from __future__ import annotations

import io

import pytest
from rich.console import Console

from cfa_tool.reporting import terminal
from cfa_tool.reporting.tables import ReportTable


def _tables() -> list[ReportTable]:
    long_name = "satisfaction_with_the_overall_service_quality_of_the_line"
    words = "a note cell of several words that has to wrap in a narrow column of text"
    return [
        ReportTable("a", "Loadings", ("Item", "Loading", "SE"), ("l", "r", "r"),
                    (("x1", ".77", ".05"), ("item_long_name", "1.00", "")), note="A note.", flagged=(1,)),
        ReportTable("b", "Long names", ("Item", "Factor", "Standardized loading", "p"), ("l", "l", "r", "r"),
                    ((long_name, "service", "-.41", "< .001"), ("wait", "comfort_and_cleanliness", ".88", ".020")),
                    faint=((0, 2),)),
        ReportTable("c", "Words", ("What", "Why"), ("l", "l"),
                    (("a first cell", words), ("second\nof two lines", words + " " + words))),
        ReportTable("d", "Wide letters", ("Item", "Estimate"), ("l", "r"),
                    (("満足度_全体", "1.234"), ("Zufriedenheit_über_alles", "-0.5"))),
        ReportTable("e", "Several figures", ("Model", "Chi-square", "AIC / BIC / adjusted BIC"), ("l", "r", "r"),
                    (("one factor", "610.472 on 98 df, p < .001", "2906.584 / 2951.029 / 3000.105"),
                     ("three factors", "85.306 on 24 df, p < .001", "2801.000 / 2870.330 / 2911.870"))),
    ]


def _drawn(table: ReportTable, width: int, quick: bool, colour: bool) -> str:
    buffer = io.StringIO()
    console = terminal.SafeConsole(file=buffer, width=width, highlight=False, emoji=False, markup=False,
                                   force_terminal=colour, color_system="standard" if colour else None,
                                   no_color=not colour)
    original = terminal._Drawn._lines
    if not quick:
        terminal._Drawn._lines = lambda self, console, options: None  # rich's Table draws every table
    try:
        console.print(terminal.rich_table(table))
    finally:
        terminal._Drawn._lines = original
    return buffer.getvalue()


@pytest.mark.parametrize("width", [24, 40, 60, 80, 120, 250])
def test_plain_lines_are_richs_own(width):
    for table in _tables():
        assert _drawn(table, width, True, False) == _drawn(table, width, False, False), (table.key, width)


def test_coloured_lines_read_as_richs_own():
    """Coloured output: the same characters as rich's once the colour codes are taken out, and the flagged row and
    faint cell still marked (bold red, dim)."""
    import re

    codes = re.compile(r"\x1b\[[0-9;]*m")
    for table in _tables():
        quick, slow = _drawn(table, 80, True, True), _drawn(table, 80, False, True)
        assert codes.sub("", quick) == codes.sub("", slow), table.key
    quick = _drawn(_tables()[0], 80, True, True)
    assert "\x1b[1;31m" in quick  # the flagged row in bold red
    assert "\x1b[2m" in _drawn(_tables()[1], 120, True, True)  # the faint cell dim


def test_a_fits_tables_take_the_quick_route(rider_demo, rider_model):
    """Every table of the demo's fit report is drawn line by line at 80 columns (rich's Table measures and wraps
    each cell again, most of a report's time)."""
    from cfa_tool import fit
    from cfa_tool.reporting.reports import report_of

    report = report_of(fit(rider_model, rider_demo))
    taken = []
    original = terminal._Drawn._lines

    def counted(self, console, options):
        lines = original(self, console, options)
        taken.append(lines is not None)
        return lines

    terminal._Drawn._lines = counted
    try:
        buffer = io.StringIO()
        terminal.render_report(report, Console(file=buffer, width=80, no_color=True))
    finally:
        terminal._Drawn._lines = original
    assert taken and all(taken)


@pytest.mark.parametrize("width", [12, 30, 80, 133])
def test_words_are_wrapped_as_richs_text_wraps_them(width):
    """The report's lines of words (titles, notes, the paragraph: terminal._Folded) drawn as rich's Text of the same
    style draws them."""
    texts = ["", "One line.", "The model fits  with two  spaces and a trailing space ",
             "A long paragraph " * 20, "first line\nsecond line that is a little longer than the first\n\nafter a blank",
             "a_really_very_long_item_name_without_any_space_in_it_at_all_longer_than_the_room_of_the_terminal",
             "Wide letters 満足度_全体の評価 and more words after them " * 3, "   leading spaces kept"]
    for text in texts:
        for style in ("", "bold", "dim"):
            quick = io.StringIO()
            terminal.SafeConsole(file=quick, width=width, no_color=True, highlight=False).print(
                terminal._Folded(text, style))
            slow = io.StringIO()
            terminal.SafeConsole(file=slow, width=width, no_color=True, highlight=False).print(
                terminal.Text("\n".join(terminal._names_broken(line, width) for line in text.split("\n")),
                              style=style))
            assert quick.getvalue() == slow.getvalue(), (text, width)
