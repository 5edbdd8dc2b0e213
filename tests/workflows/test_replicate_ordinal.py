"""``replicate`` with ordinal items: the same least-squares fit in each sample, the calibration solution
tested against the two samples' own solutions.

Checks: with the same rows in both samples the cross-validation index is the calibration fit's own
least-squares statistic N F over N and the saturated index is 0 (Cudeck & Browne 1983 define the index as
the discrepancy of the validation data from the calibration model), and the test of one solution finds no
difference (the two samples' solutions are the same); the loose refit is the fit of ``fit`` on the validation
data.
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.method import DifferenceMethod
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
    # q = 4 free loadings, 2 factor variances, 1 covariance (the latent responses' variances are fixed)
    same = rep.same_solution
    # equal samples: the unadjusted difference is 0, so the scale-shifted one is only its shift df (1 - s), below df
    assert same.df_difference == 7 and 0 <= same.chi_square_difference < 7 and same.p_value > 0.95
    assert rep.adjusted and rep.entry()["same_solution_test"]["method"] == str(DifferenceMethod.SCALE_SHIFTED)


def test_the_loose_refit_is_the_fit_of_the_validation_data():
    calibration, validation = _draw(600, 2), _draw(500, 3)
    rep = replicate(MODEL, calibration, validation)
    own = cfa_tool.fit(MODEL, validation)
    assert rep.loose.robust.chi_square_scaled == pytest.approx(own.robust.chi_square_scaled, rel=1e-10)
    assert rep.calibration_result.robust.chi_square_scaled == pytest.approx(
        cfa_tool.fit(MODEL, calibration).robust.chi_square_scaled, rel=1e-10)
    assert rep.same_solution.p_value > 0.001  # the same population


def test_the_test_of_one_solution_rejects_samples_of_two_populations():
    # factors correlating .4 in the calibration sample and 0 in the validation sample: each sample fits the
    # model, but the calibration estimates do not hold in the validation sample
    rep = replicate(MODEL, _draw(1500, 4, 0.4), _draw(1500, 5, 0.0))
    assert rep.loose.robust.p_value_scaled > 0.01
    assert rep.same_solution.p_value < 1e-6


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
    assert first["same_solution_test"]["method"] == str(DifferenceMethod.SCALE_SHIFTED) and "tight" not in first
    assert first["calibration"]["robust"]["chi_square_scaled"] > 0


def test_a_validation_category_the_calibration_never_had_is_an_error_naming_it():
    # a hostile trial: the replication ran and nothing said that the two samples' answer scales differ
    from cfa_tool.errors import DataError

    calibration, validation = _draw(600, 2), _draw(500, 3)
    validation.loc[[4, 9], "q2"] = 6  # index labels 4 and 9; the draws have categories 1 to 5 (four cuts)
    with pytest.raises(DataError, match=r"^<data frame>: ordinal item 'q2' has the answer 6 \(2 rows, the first in row "
                                        r"labelled 4\), "
                                        r"which the calibration sample <data frame> never had \(its categories: 1, 2, 3, 4, 5\)"):
        replicate(MODEL, calibration, validation)
    # a category the validation sample lacks is no new scale: the replication runs
    # a category the validation sample lacks is no new scale: the replication runs, but the two samples' thresholds
    # cannot be estimated side by side, so there is no test of one solution, and the report says why
    lacking = replicate(MODEL, calibration, validation.assign(q2=validation.q2.clip(upper=4)))
    assert np.isnan(lacking.same_solution.p_value) and "missing from one sample" in lacking.same_solution.not_computed
    assert lacking.entry()["same_solution_test"]["p_value"] is None
    from cfa_tool.reporting.workflow_tables import replication_report

    report = replication_report(lacking)
    assert next(t for t in report.tables if t.key == "replication_1").rows[-1][1] == "not tested"
    assert any("was not tested: an answer category" in note for note in report.notes)
