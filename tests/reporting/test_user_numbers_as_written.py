"""A number the user gave is printed as written, and counts and sums as the tool prints N (hostile s19, cases 03 and
08: '--missing-codes 9999999' printed as '1e+07', a filter's 2500000 as '2.5e+06', a sum of weights as
'5.00014e+06', each the text of another number).

The check of :func:`user_number` is Python's own float parser, which the tool did not write: the text must read back
as exactly the number given, in plain digits.
"""

from __future__ import annotations

import numpy as np

import cfa_tool
from cfa_tool.numbers import count_text, user_number
from cfa_tool.reporting.paragraph import methods_paragraph
from tests.conftest import holzinger_swineford

ITEMS = [f"x{i}" for i in range(1, 10)]
ONE = "factor g: x1, x2, x3, x4, x5, x6, x7, x8, x9\n"


def test_a_users_number_reads_back_as_itself_in_plain_digits():
    rng = np.random.default_rng(7)
    values = [9999999.0, 2500000.0, -3.0, 0.5, 1e-7, 123456789012.0, 2.675] + list(
        rng.normal(size=200) * 10.0 ** rng.integers(-6, 12, size=200))
    for value in values:
        text = user_number(value)
        assert "e" not in text.lower() and float(text) == value  # Python's parser reads back the same number
    assert user_number(9999999.0) == "9999999" and user_number(-0.0) == "0" and user_number(2.5) == "2.5"


def test_counts_and_sums_are_grouped_digits():
    assert count_text(5000136.0) == "5,000,136" and count_text(1234.5) == "1,234.5" and count_text(12) == "12"


def test_a_code_and_a_cut_off_are_named_as_given():
    data = holzinger_swineford()[ITEMS].copy()
    data.loc[:9, "x1"] = 9999999
    data["income"] = 1_000_000 + 10_000 * np.arange(len(data))
    result = cfa_tool.fit(ONE, data, missing_codes=(9999999,), keep=("income > 2500000",))
    text = methods_paragraph(result) + " ".join(str(w) for w in result.warnings)
    assert "9999999" in text and "2500000" in text
    assert "e+0" not in text


def test_a_sum_of_frequency_weights_is_printed_as_n_is():
    data = holzinger_swineford()[ITEMS].copy()
    data["w"] = 10616  # 301 rows x 10616 = 3,195,416
    result = cfa_tool.fit(ONE, data, weights="w", weight_kind="frequency")
    paragraph = methods_paragraph(result)
    assert "e+0" not in paragraph and "3,195,416" in paragraph
