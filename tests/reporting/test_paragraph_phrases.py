"""Phrases of the methods paragraph and the report that a new user found misleading: item coverage rounded up
past 100% ('coverage 1.00 or higher'), a loading range from a reverse-keyed item's negative loading, and
Mardia's tests left out of a full-information fit without a word.  Check values are computed here with numpy
from the data and the result's own estimates."""

from __future__ import annotations

import numpy as np

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.terminal import report_text
from tests.conftest import THREE_FACTORS, holzinger_swineford


def _hs():
    return holzinger_swineford()[[f"x{i}" for i in range(1, 10)]].copy()


def test_coverage_is_never_rounded_up():
    data = _hs()
    data.iloc[0, 1] = np.nan  # x2: 300 of 301 rows answered, 99.67%
    text = methods_paragraph(cfa_tool.fit(THREE_FACTORS, data))
    assert "each item was answered in at least 99.6% of the rows" in text and "1.00" not in text


def test_a_negative_loading_gives_the_range_in_absolute_value():
    data = _hs()
    data["x2"] = -data["x2"]  # a reverse-keyed item: its standardized loading turns negative
    result = cfa_tool.fit(THREE_FACTORS, data)
    sizes = sorted(abs(r.standardized) for r in result.estimates if r.kind == "loading")
    text = methods_paragraph(result)
    low, high = (f"{v:.2f}".lstrip("0") for v in (sizes[0], sizes[-1]))
    assert f"ranged from {low} to {high} in absolute value (1 negative)" in text


def test_full_information_says_which_rows_the_kurtosis_judged():
    data = _hs()
    data.iloc[::10, 4] = np.nan
    text = report_text(fit_report(cfa_tool.fit(THREE_FACTORS, data)))
    assert ("Multivariate kurtosis of every row, each on the items it answered (31 rows with gaps; Mardia 1970, for rows "
            "with gaps Yuan, Lambert & Fouladi 2004)") in " ".join(text.split())  # 301 rows, every tenth with a gap
    # beside it both of Mardia's tests of the 270 complete rows, labelled as theirs (s25: the skewness was lost)
    assert "of the 270 complete rows alone (Mardia 1970): skewness" in " ".join(text.split())
    # the table of rows that contribute most to the chi-square is there: it measures rows on the items they answered
    assert "Rows that contribute most to the chi-square" in text and "table of rows" not in " ".join(text.split())


def test_a_p_value_of_one_is_never_printed_as_exact():
    # APA style (7th ed., 6.36, recalled from memory): p-values are not reported as 1; '> .999' instead
    from cfa_tool.reporting.numbers import p_value
    from cfa_tool.reporting.tables import p_phrase

    assert p_value(1.0) == "> .999" and p_phrase(0.99995) == "> .999" and p_value(0.5) == ".500"


def test_a_value_that_rounds_to_zero_has_no_minus_sign():
    # a new user's invariance table showed an interval bound of '-0.00'
    from cfa_tool.reporting.numbers import num, unit

    assert num(-0.0004, 2) == "0.00" and num(-0.004, 2) == "0.00"
    assert num(-0.006, 2) == "-0.01" and num(0.0, 3) == "0.000"
    assert unit(-0.0004, 3) == ".000"
