"""A number the user gave is printed as written, and counts and sums as the tool prints N (hostile s19, cases 03 and
08: '--missing-codes 9999999' printed as '1e+07', a filter's 2500000 as '2.5e+06', a sum of weights as
'5.00014e+06', each the text of another number).

The check of :func:`user_number` is Python's own float parser, which the tool did not write: the text must read back
as exactly the number given, in plain digits.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

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


# ---- the twentieth round: every number the user gave, in every message (hostile s19's neighbours: language/,
# explore's scale ends, an option's value), read back by Python's float parser as the number given


def _refused(tmp_path, capsys, text: str) -> str:
    from tests.conftest import run_cli

    data = tmp_path / "hs.csv"
    holzinger_swineford()[ITEMS].to_csv(data, index=False)
    model = tmp_path / "m.cfa"
    model.write_text(text)
    code, _, err = run_cli(["check", model, "--data", data], capsys)
    assert code == 2 and "e+0" not in err and "e-0" not in err, err
    return err


def test_the_model_files_numbers_are_named_as_written(tmp_path, capsys):
    err = _refused(tmp_path, capsys, "factor visual: x1, x2, x3\nfix loading(visual, x2) = 1000000\n"
                                     "fix loading(visual, x2) = 2500000\n")
    assert "fixed to 2500000 here but to 1000000 on line 2" in err
    err = _refused(tmp_path, capsys, "factor visual: x1, x2, x3\nbound loading(visual, x2) >= 1000000\n"
                                     "bound loading(visual, x2) <= 0.0000005\n")
    assert "at least 1000000 and at most 0.0000005" in err
    err = _refused(tmp_path, capsys, "factor visual: x1, x2, x3\nfix variance(visual) = -2000000\n")
    assert "fixed to -2000000, but a variance cannot be negative" in err


def test_explore_names_the_scale_and_a_columns_range_as_written(tmp_path, capsys):
    from tests.conftest import run_cli

    rng = np.random.default_rng(3)
    n = 300
    latent = rng.normal(size=(n, 2))
    loadings = np.zeros((8, 2))
    loadings[:4, 0] = loadings[4:, 1] = 0.7
    answers = np.clip(np.round(latent @ loadings.T + rng.normal(size=(n, 8)) * 0.7 + 3), 1, 5)
    frame = pd.DataFrame(answers + 1_000_000, columns=[f"q{i}" for i in range(1, 9)])  # answers coded 1000001-1000005
    frame["batch"] = rng.choice([5_000_000, 6_000_000, 7_000_000], size=n)  # a code of a batch: out of the scale, left out
    path = tmp_path / "coded.csv"
    frame.to_csv(path, index=False)
    code, out, err = run_cli(["explore", "--data", path], capsys)
    assert code == 0, err
    flat = " ".join(out.split())
    assert "above the 1000001 to 1000005 that most columns hold" in flat and "batch (5000000 to 7000000)" in flat
    assert "e+0" not in flat and "correlation of .30 or more" in flat  # bounded by 1: no leading zero


def test_an_options_number_is_named_as_written():
    import pytest

    from cfa_tool.errors import OptionError
    from cfa_tool.exploration.rotation import RotationSpec

    with pytest.raises(OptionError) as refused:
        RotationSpec(method="oblimin", gamma=2500000.0).checked()
    assert "not 2500000:" in str(refused.value)


def test_a_workbooks_row_names_are_ids_as_written(tmp_path):
    # a sheet whose unnamed first column holds codes with a decimal part (1235820.5: read back as floats; whole
    # numbers come back as integers): they named rows as '1.23582e+06', so that neighbouring codes read alike
    frame = holzinger_swineford()[ITEMS].iloc[:100].copy()
    frame.index = [1_235_820.5 + k for k in range(len(frame))]
    path = tmp_path / "ids.xlsx"
    frame.to_excel(path)
    from cfa_tool.reporting.tables import case_table

    result = cfa_tool.fit(ONE, str(path))
    ids = [row[1] for row in case_table(result, 0).rows]  # the table of rows that contribute most: Row, Id, ...
    assert ids and all(i.startswith("12358") and float(i) in frame.index for i in ids), ids


def test_a_computed_number_is_rounded_and_printed_in_plain_digits():
    # discrepancies, scaling factors and variances in messages were printed with '.3g' ('3.1e-05', '1.23e+06'); the
    # check is Python's own parser: the text reads back as the number rounded to its significant digits
    from cfa_tool.numbers import rounded_number

    rng = np.random.default_rng(11)
    for value in rng.normal(size=200) * 10.0 ** rng.integers(-12, 14, size=200):
        text = rounded_number(value)
        assert "e" not in text and float(text) == float(f"{value:.3g}"), (value, text)
    assert rounded_number(3.14159e-5, 2) == "0.000031" and rounded_number(1234567.0) == "1230000"
