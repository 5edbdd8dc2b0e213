"""Item names as survey platforms write them: the question's text as the column's header, with commas, brackets,
full stops, '!' and '/', and sometimes a space at the end (a new-user trial's questionnaire).  The model language
writes such a name in double quotes; every option that takes names reads them the same way, a quoted name matches
the header whatever spaces it has at its ends (headers are trimmed), and the errors of an unquoted one say to quote
it.  The fits below check against Holzinger & Swineford (1939): the three-factor model has chi-square 85.31 on 24
degrees of freedom by maximum likelihood (recalled from memory, as in
tests/pipeline/test_holzinger_swineford_published.py), whatever the items are called."""

from __future__ import annotations

import pytest

import cfa_tool
from cfa_tool.errors import ModelError, OptionError
from cfa_tool.language.names import read_name_list, reference_text, written_name
from cfa_tool.language.parser import parse_model
from tests.conftest import THREE_FACTORS

CUBES = "Cubes, paper form (timed)."  # x2 under a question-text name
PAPER = "Paper folding / lozenges!"  # x3


def test_names_are_written_in_double_quotes_unless_plain():
    # the grammar's NAME and STRING (grammar/model.lark)
    assert written_name("x2") == "x2"
    assert written_name(CUBES) == f'"{CUBES}"'
    assert written_name("Énergie_1") == '"Énergie_1"'  # NAME is ASCII
    assert reference_text("loading", ("visual", CUBES)) == f'loading(visual, "{CUBES}")'


def test_an_options_list_of_names_reads_double_quotes_as_the_model_language_does():
    assert read_name_list("a, b..c", "--items") == [("a", ("a",)), ("b..c", ("b", "c"))]
    assert read_name_list(f'"{CUBES}"..x5, x9', "--items") == [(None, (CUBES, "x5")), ("x9", ("x9",))]
    assert read_name_list(f'x1.."{CUBES}"', "--items") == [(None, ("x1", CUBES))]
    with pytest.raises(OptionError, match="a double quote is not closed"):
        read_name_list(f'"{CUBES}', "--items")
    with pytest.raises(OptionError, match="mixes quoted and unquoted text"):
        read_name_list('"a"b', "--items")


@pytest.fixture(scope="module")
def renamed(hs_data):
    return hs_data.rename(columns={"x2": CUBES, "x3": PAPER})


def test_items_with_commas_are_named_in_double_quotes(renamed):
    from cfa_tool.workflows.explore import item_names

    columns = [str(c) for c in renamed.columns]
    assert item_names(f'x1, "{CUBES}", "{PAPER}"', columns, "hs.csv") == ("x1", CUBES, PAPER)
    # a range counts numbered names as a model file does (not the columns between its ends): a quoted end without a
    # number to count is an error that says so
    with pytest.raises(OptionError, match="a range such as 'item1..item9' needs names with a number to count"):
        item_names(f'"{CUBES}"..x5', columns, "hs.csv")
    assert item_names(f'"{CUBES} "', columns, "hs.csv") == (CUBES,)  # copied with the header's trailing space
    with pytest.raises(OptionError, match=r"no column 'Cubes'; a name that holds a comma is written in double quotes: "
                                          r"'\"Cubes, paper form \(timed\)\.\"'"):
        item_names(f"x1, {CUBES}", columns, "hs.csv")
    result = cfa_tool.explore(renamed, items=f'"{CUBES}", "{PAPER}", x4..x9', factors=2)
    assert result.items[:2] == (CUBES, PAPER)
    from cfa_tool.reporting.explore_report import header_lines

    listed = header_lines(result)[1]  # the report lists them as --items takes them, to be copied back
    assert listed.startswith(f'Items (8): "{CUBES}", "{PAPER}", x4, x5')
    assert item_names(listed.partition(": ")[2], columns, "hs.csv") == result.items


def test_ordinal_items_with_commas_are_named_in_double_quotes():
    from cfa_tool.commands.options import ordinal_arg

    assert ordinal_arg(f'x1, "{CUBES}"') == ["x1", CUBES]
    assert ordinal_arg("x1,x2") == ["x1", "x2"]
    assert ordinal_arg('"x1"..x3') == ["x1..x3"]  # a range, counted by the command (tests/commands/test_ordinal_ranges.py)


def test_a_quoted_name_with_spaces_at_its_ends_names_the_trimmed_header(hs_data, renamed):
    # headers are read trimmed; a name copied from the header with its trailing space is the same column
    model = THREE_FACTORS.replace("x2", f'"{CUBES} "').replace("x3", f'" {PAPER}"')
    assert parse_model(model).observed_names[:3] == ("x1", CUBES, PAPER)
    fitted = cfa_tool.fit(model, renamed, diagnostics=False, modification_indices=False)
    assert fitted.fit.chi_square == pytest.approx(85.31, abs=0.01)  # Holzinger & Swineford (1939): see the docstring
    assert fitted.fit.df == 24


def test_a_suggestion_that_differs_only_in_spaces_says_so(renamed):
    doubled = CUBES.replace("paper", " paper")
    with pytest.raises(ModelError, match=r"did you mean 'Cubes, paper form \(timed\)\.'\? \(the two differ only in "
                                         r"their spaces"):
        cfa_tool.fit(THREE_FACTORS.replace("x2", f'"{doubled}"'), renamed)
    # a data frame given to the library may keep spaces at a column's ends, which a model name cannot
    spaced = renamed.rename(columns={"x1": "x1 "})
    with pytest.raises(ModelError, match=r"did you mean 'x1 '\? \(it differs only in spaces at its ends"):
        cfa_tool.fit(THREE_FACTORS, spaced)


@pytest.mark.parametrize("text, column, words", [
    ("factor f: At work, I feel full, q3\n", 14, "unexpected 'work'"),
    ("factor f: Respondent ID, q2, q3\n", 22, "unexpected 'ID'"),
    ("factor f: q1, q2 (tired), q3\n", 18, "unexpected '('"),
    ("factor f: q1, q2!, q3\n", 17, "unexpected character '!'"),
    ("factor f: q1, q2 / q3, q4\n", 18, "unexpected character '/'"),
])
def test_a_name_with_spaces_or_punctuation_without_quotes_is_told_to_use_them(text, column, words):
    with pytest.raises(ModelError) as caught:
        parse_model(text)
    message = str(caught.value)
    assert words in message and "written in double quotes" in message and f":1:{column}:" in message, message


def test_other_syntax_errors_give_no_quoting_advice():
    for text in ("factor f: q1-q3\n", "factor f: q1, q2, q3\nfix loading(f, q1) = = 1\n", "factr f: q1, q2, q3\n"):
        with pytest.raises(ModelError) as caught:
            parse_model(text)
        assert "double quotes" not in str(caught.value), str(caught.value)


def test_a_row_filter_on_a_column_name_with_spaces_says_to_quote_it(renamed):
    from cfa_tool.data.filters import parse_filter

    with pytest.raises(OptionError, match="""a column name with spaces is written in double quotes, e.g. '"Respondent """
                                          """ID" != Average'"""):
        parse_filter("Respondent ID != Average")
    assert parse_filter('"Respondent ID" != Average').column == "Respondent ID"
    with pytest.raises(OptionError) as caught:
        parse_filter("age is big")  # no operator: the general form
    assert "double quotes" not in str(caught.value) and "COLUMN OPERATOR VALUE" in str(caught.value)
