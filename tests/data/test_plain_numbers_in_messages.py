"""Numbers in the messages of data, summary statistics, sampling designs, scaled tests and given values follow the
one rule of each kind of number (cfa_tool.numbers): a number the user gave as written (`user_number`: '1234567',
never the '1.23e+06' of Python's '.3g', which names another number), a number the tool computed to three
significant digits in plain digits (`rounded_number`: '-0.00005', not '-5e-05'), a count grouped by thousands
(`count_text`), a correlation without its leading zero and, where it rounds to zero, without a sign
(`numerics.plain.journal_decimal`: '.00', not '-.00').  The s20 closing note listed the '.3g' prints left; each test
below shows the old print beside the new one.
"""

from __future__ import annotations

import types

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.moments import sample_moments
from cfa_tool.data.summary_stats import summary_moments
from cfa_tool.errors import DataError, ModelError
from cfa_tool.inference.robust import _not_positive
from cfa_tool.method import FitTest
from cfa_tool.pipeline.inputs import extreme_scaling
from tests.conftest import THREE_FACTORS

NAMES = ("a", "b", "c")


def _refused(call) -> str:
    with pytest.raises(DataError) as raised:
        call()
    return str(raised.value)


def test_a_value_too_large_in_the_data_is_named_as_written():
    frame = pd.DataFrame({"a": [1.0, 2.0, 1.2345e100, 3.0], "b": [1.0, 3.0, 2.0, 2.0], "c": [2.0, 1.0, 2.0, 3.0]})
    said = _refused(lambda: sample_moments(frame, NAMES, "d.csv"))
    assert "holds 1.2345e+100 " in said and "1.23e+100" not in said  # '.3g' printed '1.23e+100'


def test_a_constant_column_is_named_with_its_value_in_plain_digits():
    frame = pd.DataFrame({"a": [1234567.0] * 5, "b": [1.0, 3.0, 2.0, 2.0, 4.0], "c": [2.0, 1.0, 2.0, 3.0, 1.0]})
    said = _refused(lambda: sample_moments(frame, NAMES, "d.csv"))
    assert "has the same value (1234567) in every row" in said  # ':g' printed '(1.23457e+06)', another number


def test_spreads_too_far_apart_are_said_in_plain_digits():
    # standard deviations 123,000,000 and 0.0000000123: a ratio of about 1e16, beyond the 1e15 computed with
    matrix = np.diag([1.23e8 ** 2, 1.0, 1.23e-8 ** 2])
    said = _refused(lambda: summary_moments(list(NAMES), matrix, 200))
    assert "('a' 123000000, 'c' 0.0000000123)" in said  # '.3g': ('a' 1.23e+08, 'c' 1.23e-08)


def test_a_matrix_that_is_not_positive_semi_definite_says_its_eigenvalue_in_plain_digits():
    # equal correlations r among three items have eigenvalues 1 - r (twice) and 1 + 2r (a matrix fact):
    # r = -.500025 gives 1 + 2r = -0.00005
    r = -0.500025
    matrix = np.full((3, 3), r) + np.eye(3) * (1 - r)
    said = _refused(lambda: summary_moments(list(NAMES), matrix, 200, kind="correlation"))
    assert "smallest eigenvalue of the correlations -0.00005)" in said  # '.3g': -5e-05


def test_summary_statistics_too_large_are_named_as_written():
    matrix = np.eye(3)
    matrix[1, 1] = -1.2345e101  # the size is what is refused, the sign is the user's
    said = _refused(lambda: summary_moments(list(NAMES), matrix, 200))
    assert "the matrix holds -1.2345e+101, too large" in said  # '.3g' of the absolute value: 1.23e+101
    said = _refused(lambda: summary_moments(list(NAMES), np.eye(3), 200, means=[0.0, 1.2345e101, 0.0]))
    assert "a mean of 1.2345e+101 is too large" in said
    said = _refused(lambda: summary_moments(list(NAMES), np.eye(3), 200, kind="correlation",
                                            sds=[1.0, 1.2345e60, 2.0]))
    assert "standard deviations from 1 to 1.2345e+60 cannot" in said  # '.3g': from 1 to 1.23e+60


def test_weights_beyond_what_can_be_computed_are_counted_and_named(hs_data):
    data = hs_data.assign(w=4_000_001.0)  # 301 rows: 1,204,000,301 rows counted
    with pytest.raises(DataError) as raised:
        cfa_tool.fit(THREE_FACTORS, data, weights="w", weight_kind="frequency")
    assert "count 1,204,000,301 rows, more than the 1,000,000,000" in str(raised.value)  # '.3g': 1.2e+09
    with pytest.raises(DataError) as raised:
        cfa_tool.fit(THREE_FACTORS, hs_data.assign(w=1.2345e200), weights="w")
    assert "reach 1.2345e+200, outside the range the tool computes with (1e-100 to 1e+100)" in str(raised.value)


def test_scaling_factors_are_said_in_plain_digits():
    said = _not_positive(-0.000025, 1.5, FitTest.SATORRA_BENTLER)
    assert "the model's scaling factor came out -0.000025," in said  # '.3g': -2.5e-05
    degenerate = types.SimpleNamespace(df=20, scale=0.000025, shift=19.9)  # effective df (20 - 19.9)^2 / 20 = .0005
    assert "its scale is 0.000025 and its shift 19.9 of 20" in extreme_scaling(degenerate)
    low = types.SimpleNamespace(df=20, scale=None, shift=None, scaling_factor=0.000032)
    assert extreme_scaling(low).startswith("The design-based scaling factor is 0.000032: the scaled chi-square is "
                                           "31250.0 times")  # '.3g': 3.2e-05
    assert "below 0.5 is taken as extreme" in extreme_scaling(low)


def test_a_given_variance_is_named_as_written(tmp_path, rider_model, rider_demo):
    with pytest.raises(ModelError) as raised:
        cfa_tool.fit(rider_model + "fix variance(punctuality) = 1234567\nfix variance(comfort) = 1\n"
                     "fix covariance(punctuality, comfort) = 2000000\n", rider_demo)
    # '.3g' printed 'punctuality (1.23e+06)', a variance the user did not give
    assert "beyond what the variances of punctuality (1234567) and comfort (1) allow" in str(raised.value)


def test_correlations_that_round_to_zero_have_no_sign(rider_model, rider_demo):
    fixed = "".join(f"fix variance({f}) = 1\n" for f in ("punctuality", "comfort", "courtesy"))
    with pytest.raises(ModelError) as raised:
        cfa_tool.fit(rider_model + fixed + "fix covariance(punctuality, comfort) = 0.95\n"
                     "fix covariance(punctuality, courtesy) = 0.95\nfix covariance(comfort, courtesy) = -0.003\n",
                     rider_demo)
    # three correlations each within +/-1 but not together: 1 - 2(.95^2) - .003^2 - 2(.95^2)(.003) < 0 (the
    # determinant of the 3 x 3 matrix, by hand); model.parameters' own 'two_decimals' printed '-.00'
    assert ".95 (punctuality with courtesy), and .00 (comfort with courtesy) cannot hold together" in str(raised.value)


def test_a_tiny_negative_variance_in_plain_digits():
    # a residual variance of -0.0000123 (invented matrices) was said '-1.23e-05' in the problem's words
    from cfa_tool.assessment.admissibility import ProblemKind, matrix_problems
    from cfa_tool.model.implied import ModelMatrices

    L = np.array([[1.0], [0.8], [0.7]])
    T = np.diag([-0.0000123, 0.4, 0.5])
    found = matrix_problems(ModelMatrices(L, np.zeros((1, 1)), np.eye(1), T, np.zeros(3), np.zeros(1)),
                            ("a", "b", "c"), ("f",))
    words = [str(p.explanation) for p in found if p.kind is ProblemKind.NEGATIVE_RESIDUAL_VARIANCE]
    assert words and "(-0.0000123)" in words[0] and "e-05" not in words[0]


def test_a_computed_number_set_beside_another_takes_the_digits_that_tell_them_apart():
    # s22: an item's variance of 1.002 said 'more than the 1' was '1.00' ('.2f'), and at three significant digits it
    # would be '1'; by hand, 1.43 ** 2 * .49 = 1.002001 and 1 + 4e-6
    from cfa_tool.numbers import rounded_number

    assert rounded_number(1.43 ** 2 * 0.49) == "1" and rounded_number(1.43 ** 2 * 0.49, apart_from=1) == "1.002"
    assert rounded_number(1.000004, apart_from=1.0) == "1.000004"
    assert rounded_number(4.41, apart_from=1.0) == "4.41"  # three digits already tell them apart
    assert rounded_number(100004000.04, apart_from=1.0) == "100000000"
