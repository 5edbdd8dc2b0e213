"""``replicate`` with ordinal items: the same least-squares fit in each sample, the calibration solution
tested in the validation sample.

Checks: with the same rows in both samples the tight check's statistic is the calibration fit's own
least-squares statistic N F and the saturated cross-validation index is 0 (Cudeck & Browne 1983 define
the index as the discrepancy of the validation data from the calibration model); with no parameter
estimated the mean-and-variance adjustment has U = W, so for diagonal weights W = diag(Gamma)^-1 its
trace tr(U Gamma) equals the number of correlations and tr((U Gamma)^2) is the sum of the squared
entries of Gamma's correlation matrix, giving the scale-shifted statistic s T + df - s df with
s = sqrt(df / tr((U Gamma)^2)) (the scale-shifted statistic of Asparouhov & Muthén 2010), computed here with numpy; the loose
refit is the fit of ``fit`` on the validation data.
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.polychoric import ordinal_moments
from cfa_tool.workflows.replication import replicate, split_half

MODEL = "factor f1: q1, q2, q3\nfactor f2: q4, q5, q6\nordinal q1..q6\n"
CUTS = (-1.2, -0.3, 0.5, 1.3)


def _draw(n: int, seed: int, correlation: float = 0.4) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    eta = rng.multivariate_normal([0, 0], [[1, correlation], [correlation, 1]], n)
    latent = np.repeat(eta, 3, axis=1) * 0.7 + rng.normal(size=(n, 6)) * np.sqrt(0.51)
    return pd.DataFrame({f"q{j + 1}": np.searchsorted(CUTS, latent[:, j]) + 1 for j in range(6)})


def test_the_same_rows_give_the_calibration_statistic_and_the_adjustment_by_hand():
    data = _draw(700, 1)
    rep = replicate(MODEL, data, data.copy())
    cal = rep.calibration_result
    n = cal.n_obs
    assert rep.loose.fit.chi_square == pytest.approx(cal.fit.chi_square, rel=1e-10)
    assert n * rep.cvi == pytest.approx(cal.fit.chi_square, rel=1e-10)
    assert rep.cvi_saturated == pytest.approx(0.0, abs=1e-14)
    df = 15
    assert rep.tight_df == df
    gamma = ordinal_moments(data, tuple(f"q{j}" for j in range(1, 7)), "data").gamma
    sd = np.sqrt(np.diag(gamma))
    a2 = float(np.sum((gamma / np.outer(sd, sd)) ** 2))
    s = np.sqrt(df / a2)
    assert rep.tight_chi_square == pytest.approx(s * n * rep.cvi + df - s * df, rel=1e-10)
    assert rep.adjusted and rep.to_dict()["tight"]["test"] == "scale-shifted"


def test_the_loose_refit_is_the_fit_of_the_validation_data():
    calibration, validation = _draw(600, 2), _draw(500, 3)
    rep = replicate(MODEL, calibration, validation)
    own = cfa_tool.fit(MODEL, validation)
    assert rep.loose.robust.chi_square_scaled == pytest.approx(own.robust.chi_square_scaled, rel=1e-10)
    assert rep.calibration_result.robust.chi_square_scaled == pytest.approx(
        cfa_tool.fit(MODEL, calibration).robust.chi_square_scaled, rel=1e-10)
    assert rep.tight_p_value > 0.001  # the same population


def test_the_tight_check_rejects_a_calibration_solution_of_another_population():
    # factors correlating .4 in the calibration sample and 0 in the validation sample: each sample fits the
    # model, but the calibration estimates do not hold in the validation sample
    rep = replicate(MODEL, _draw(1500, 4, 0.4), _draw(1500, 5, 0.0))
    assert rep.loose.robust.p_value_scaled > 0.01
    assert rep.tight_p_value < 1e-6


def test_split_half_and_continuous_items_beside_ordinal_ones():
    data = _draw(800, 6)
    data["q6"] = data["q6"] * 2.5 + np.random.default_rng(7).normal(size=len(data))  # continuous
    a, b = split_half(MODEL.replace("q1..q6", "q1..q5"), data, seed=3)
    assert a.adjusted and b.adjusted
    assert a.calibration_result.n_obs == b.loose.n_obs == 400
    assert a.calibration_result.fit.chi_square == pytest.approx(b.loose.fit.chi_square, rel=1e-10)
    assert a.calibration_result.method.items.value == "mixed"


def test_command_line_replicate_with_ordinal_items(tmp_path):
    from cfa_tool.cli import main

    model = tmp_path / "two.cfa"
    model.write_text("factor f1: q1, q2, q3\nfactor f2: q4, q5, q6\n")
    data = tmp_path / "answers.csv"
    _draw(600, 8).to_csv(data, index=False)
    out = tmp_path / "rep.json"
    assert main(["replicate", str(model), "--data", str(data), "--ordinal", "all", "--json", str(out)]) == 0
    first = json.loads(out.read_text())["replications"][0]
    assert first["tight"]["test"] == "scale-shifted"
    assert first["calibration"]["robust"]["chi_square_scaled"] > 0


def test_a_validation_category_the_calibration_never_had_is_an_error_naming_it():
    # a hostile trial: the tight check ran and nothing said that the two samples' answer scales differ
    from cfa_tool.errors import DataError

    calibration, validation = _draw(600, 2), _draw(500, 3)
    validation.loc[[4, 9], "q2"] = 6  # index labels 4 and 9; the draws have categories 1 to 5 (four cuts)
    with pytest.raises(DataError, match=r"^<data frame>: ordinal item 'q2' has the answer 6 \(2 rows, the first in index "
                                        r"label 4\), "
                                        r"which the calibration sample <data frame> never had \(its categories: 1, 2, 3, 4, 5\)"):
        replicate(MODEL, calibration, validation)
    # a category the validation sample lacks is no new scale: the replication runs
    assert replicate(MODEL, calibration, validation.assign(q2=validation.q2.clip(upper=4))).tight_df == 15
