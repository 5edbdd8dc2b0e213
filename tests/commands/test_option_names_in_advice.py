"""Advice and report sentences name an option as their caller would write it (cfa_tool.options.Option), as
refusals do (tests/commands/test_option_names_per_interface.py): the row filter in a small group's advice, the
share of answers simulate removes at random and the missing-value codes of the check report."""

from __future__ import annotations

from cfa_tool.assessment.admissibility import sample_size_problems
from cfa_tool.options import on_command_line
from cfa_tool.reporting.workflow_tables import not_carried_line


def _small_group_advice() -> str:
    problems, _ = sample_size_problems([8, 300], [20, 20], ("north", "south"))
    return problems[0].advice


def test_a_small_group_s_advice_names_the_row_filter_as_the_caller_writes_it():
    assert "a row filter (keep=...)" in _small_group_advice()
    with on_command_line():
        assert "a row filter (--keep)" in _small_group_advice()


def test_the_simulated_gaps_are_named_as_the_caller_writes_them():
    assert "(missing=... removes a share of the answers" in not_carried_line(("sampling weights",), power=False)[0]
    with on_command_line():
        assert "(--missing removes a share" in not_carried_line(("sampling weights",), power=False)[0]


def _coverage_note(found) -> str:
    """The note of check's coverage table, as the program's user reads it."""
    from cfa_tool.reporting.workflow_tables import check_report

    return str(next(t for t in check_report(found).tables if t.key == "coverage").note)


def test_the_check_report_names_the_missing_value_codes_as_the_caller_writes_them(hs_data):
    import cfa_tool
    from cfa_tool.reporting.workflow_tables import check_report
    from tests.conftest import THREE_FACTORS

    data = hs_data.copy()
    data.loc[data.index[:5], "x1"] = 99  # a value that looks like a code of no answer
    found = cfa_tool.check(THREE_FACTORS, data)
    assert "marked as missing (missing_codes=..., or an empty cell)" in _coverage_note(found)
    with on_command_line():
        assert "marked as missing (--missing-codes, or an empty cell)" in _coverage_note(found)
