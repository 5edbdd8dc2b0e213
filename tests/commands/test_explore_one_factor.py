"""A rotation cannot apply to one factor, and a factor needs three items (hostile trial s15, case 06): explore with
--factors 1 and a rotation (or a target file of one column) is an error naming both options, as '--rotation varimax
--target' is; when the rules for the number of factors choose one factor, a rotation asked for is not applied and a
note first says so; the report and the draft say 'no rotation' alike; --items of one or two items is an error in
explore's own terms, naming them (not a model text placed at '<explore>:1:1').

Check values and their sources:
* the one factor's loadings, whatever rotation was asked, against scikit-learn's FactorAnalysis (an independent
  maximum-likelihood implementation) on the Holzinger & Swineford (1939) data standardized with divisor N, as
  tests/exploration/test_exploration_against_scikit_learn.py compares them;
* a factor of one or two items alone is not identified, of three it is (the three-indicator rule, Bollen 1989, ch. 7).
Invented data: a fictional transit agency's rider survey, simulated with a fixed seed.
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.data.moments import sample_moments
from cfa_tool.errors import OptionError
from cfa_tool.exploration import (ExploreSettings, RotationMethod, RotationSpec, explore_correlations,
                                  from_sample_moments)
from tests.conftest import DATASETS

HS_FILE = DATASETS / "holzinger_swineford_1939.csv"
HS_ITEMS = tuple(f"x{i}" for i in range(1, 10))
ONE = [f"s{i}" for i in range(1, 7)]


def _run(argv, capsys):
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, out.out, out.err


def _one_factor_survey(n: int = 300) -> pd.DataFrame:
    """Six rider-survey items of one factor, answered 1 to 5 (invented, seed 4)."""
    rng = np.random.default_rng(4)
    y = 0.7 * rng.standard_normal((n, 1)) + np.sqrt(0.51) * rng.standard_normal((n, 6))
    return pd.DataFrame(np.searchsorted([-1.2, -0.3, 0.4, 1.2], y) + 1.0, columns=ONE)


@pytest.mark.parametrize("rotation", ["promax", "varimax", "quartimin"])
def test_a_rotation_asked_for_one_factor_is_an_error_naming_both_options(rotation, capsys):
    argv = ["explore", "--data", HS_FILE, "--items", "x1..x9", "--factors", "1", "--rotation", rotation]
    code, out, err = _run(argv, capsys)
    assert code == 2 and out == ""
    assert err.count("\n") == 1 and "Traceback" not in err
    assert f"--rotation {rotation} turns several factors, and --factors 1 asks for one" in err
    assert "leave out --rotation, or ask for more factors" in err


def test_a_target_file_of_one_column_is_an_error_naming_the_file(tmp_path, capsys):
    target = tmp_path / "one_column.csv"
    target.write_text("item,visual\nx1,\nx2,\nx3,\nx4,0\nx5,0\n")
    code, out, err = _run(["explore", "--data", HS_FILE, "--items", "x1..x9", "--target", target], capsys)
    assert code == 2 and err.count("\n") == 1
    assert f"{target}: the target file has one factor column, and a target rotation turns several factors" in err


def test_python_names_the_keywords():
    with pytest.raises(OptionError, match=r"rotation='promax' turns several factors, and factors=1 asks for one"):
        cfa_tool.explore(_one_factor_survey(), factors=1, rotation="promax", replications=10)
    with pytest.raises(OptionError, match=r"rotation='target' turns several factors, and factors=1 asks for one "
                                          r".*leave out rotation=\.\.\. and target=\.\.\."):
        cfa_tool.explore(_one_factor_survey(), factors=1, target=np.full((6, 1), np.nan), replications=10)


def test_one_factor_without_a_rotation_asked_is_reported_unrotated(tmp_path, capsys):
    js = tmp_path / "one.json"
    code, out, _ = _run(["explore", "--data", HS_FILE, "--items", "x1..x9", "--factors", "1", "--replications", "10",
                         "--json", js], capsys)
    assert code == 0
    flat = " ".join(out.split())
    assert "correlations; no rotation (one factor)" in flat
    assert "oblique" not in flat and "quartimin" not in flat  # neither the header nor the loadings' title
    assert "no rotation." in flat  # the draft's first comment says the same
    solution = json.loads(js.read_text())["solution"]
    assert solution["rotation"] == "none" and solution["oblique"] is False
    assert "The solution below has 1 factor, as asked, not the 3 recommended." in flat


def test_one_factor_chosen_by_the_rules_with_a_rotation_asked_gets_a_note_first(tmp_path, capsys):
    data = tmp_path / "one.csv"
    _one_factor_survey().to_csv(data, index=False)
    code, out, _ = _run(["explore", "--data", data, "--rotation", "varimax", "--replications", "20"], capsys)
    assert code == 0
    flat = " ".join(out.split())
    assert "Recommended: 1 factor," in flat and "correlations; no rotation (one factor)" in flat
    note = ("No rotation: the rules for the number of factors recommend one factor, and a rotation turns several "
            "factors towards a simpler pattern; the varimax rotation asked for does not apply, and the loadings shown "
            "are the one factor's, unrotated.")
    result = cfa_tool.explore(_one_factor_survey(), rotation="varimax", replications=20)
    assert result.notes[0] == note and note in flat
    assert result.to_dict()["solution"]["rotation"] == "none"
    # without a rotation asked, the default is not named: no note
    assert not [n for n in cfa_tool.explore(_one_factor_survey(), replications=20).notes if "No rotation" in n]


@pytest.mark.parametrize("rotation", [RotationMethod.PROMAX, RotationMethod.VARIMAX, RotationMethod.GEOMIN])
def test_the_one_factor_loadings_are_scikit_learns_whatever_rotation_is_named(hs_data, rotation):
    from sklearn.decomposition import FactorAnalysis

    X = hs_data[list(HS_ITEMS)].to_numpy(float)
    Z = (X - X.mean(axis=0)) / X.std(axis=0)
    theirs = FactorAnalysis(1, tol=1e-12, max_iter=200_000, svd_method="lapack").fit(Z).components_.ravel()
    data = from_sample_moments(sample_moments(hs_data, HS_ITEMS, "data"))
    ours = explore_correlations(data, ExploreSettings(factors=1, rotation=RotationSpec(rotation), replications=10))
    assert ours.settings.rotation.method is RotationMethod.NONE and ours.rotated.spec.method is RotationMethod.NONE
    pattern = ours.rotated.pattern.ravel()
    np.testing.assert_allclose(pattern * np.sign(pattern @ theirs), theirs, atol=1e-4)
    assert ours.draft.text.splitlines()[2].rstrip().endswith("no rotation.")


@pytest.mark.parametrize("items, named", [("x1", "one item ('x1')"), ("x1,x4", "two items ('x1' and 'x4')")])
def test_one_or_two_items_are_too_few_for_a_factor_in_explores_terms(items, named, capsys):
    argv = ["explore", "--data", HS_FILE, "--items", items, "--factors", "1"]
    for extra in ([], ["--ordinal", "all"]):
        code, out, err = _run(argv + extra, capsys)
        assert code == 2 and err.count("\n") == 1
        assert (f"--items names {named}, too few for a factor: an exploratory factor analysis needs at least three "
                f"items for each factor") in err
        assert "<explore>" not in err and "fix variance" not in err
