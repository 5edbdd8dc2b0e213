"""Keywords of the public functions that take True or False refuse anything else (hostile s24: diagnostics='no' was
read as true, since a non-empty string is true in Python): an option that cannot apply as given is an error, never
read another way.  numpy's booleans (from a data frame's cell, say) are True and False."""
from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from tests.conftest import THREE_FACTORS


@pytest.mark.parametrize("keyword", ["diagnostics", "modification_indices"])
@pytest.mark.parametrize("value", ["no", "False", 0, 1, None])
def test_fit_refuses_a_yes_no_keyword_that_is_not_true_or_false(hs_data, keyword, value):
    with pytest.raises(OptionError, match=f"{keyword} must be True or False"):
        cfa_tool.fit(THREE_FACTORS, hs_data, **{keyword: value})


def test_numpys_booleans_are_true_and_false(hs_data):
    lean = cfa_tool.fit(THREE_FACTORS, hs_data, diagnostics=np.bool_(False), modification_indices=np.False_)
    assert lean.converged and len(lean.modification_indices) == 0


def test_scores_and_bootstrap_refuse_them_too(hs_data):
    with pytest.raises(OptionError, match="standard_errors must be True or False"):
        cfa_tool.scores(THREE_FACTORS, hs_data, standard_errors="yes")
    with pytest.raises(OptionError, match="bca must be True or False"):
        cfa_tool.bootstrap(THREE_FACTORS, hs_data, replications=10, bca="no")


def test_power_refuses_ordinal_as_a_word():
    with pytest.raises(OptionError, match="ordinal must be True or False"):
        cfa_tool.power(24, ordinal="no")
