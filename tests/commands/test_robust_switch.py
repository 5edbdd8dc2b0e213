"""One --robust switch: the robust test follows from how rows with gaps are handled, and the report
names the one used (Satorra & Bentler 1994 with complete rows; Yuan & Bentler 2000 with
full-information ML).  The arithmetic of each test is checked elsewhere; here the choice is."""

from __future__ import annotations

import json

import numpy as np
import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from cfa_tool.method import FitTest, MissingData
from tests.conftest import THREE_FACTORS, holzinger_swineford
from tests.commands.test_cli import DATA, MODEL, run


def _hs():
    return holzinger_swineford()[[f"x{i}" for i in range(1, 10)]]


def test_robust_with_complete_rows_is_the_satorra_bentler_test():
    robust = cfa_tool.fit(THREE_FACTORS, _hs(), test="robust")
    named = cfa_tool.fit(THREE_FACTORS, _hs(), test="satorra-bentler")
    assert robust.method.test is FitTest.SATORRA_BENTLER
    assert robust.robust.chi_square_scaled == pytest.approx(named.robust.chi_square_scaled, rel=1e-12)
    assert "Satorra-Bentler" in robust.method.sentence()


def test_robust_with_gaps_is_the_yuan_bentler_test_and_listwise_keeps_satorra_bentler():
    data = _hs().copy()
    data.iloc[::7, 2] = np.nan  # every seventh row misses x3
    robust = cfa_tool.fit(THREE_FACTORS, data, test="robust")
    assert (robust.method.test, robust.method.missing) == (FitTest.YUAN_BENTLER, MissingData.FULL_INFORMATION)
    assert any("Yuan-Bentler" in w for w in robust.warnings)
    named = cfa_tool.fit(THREE_FACTORS, data, test="yuan-bentler")
    assert robust.robust.chi_square_scaled == pytest.approx(named.robust.chi_square_scaled, rel=1e-12)
    dropped = cfa_tool.fit(THREE_FACTORS, data, test="robust", missing="listwise")
    assert dropped.method.test is FitTest.SATORRA_BENTLER and dropped.n_obs == len(data) - len(data.iloc[::7])


def test_robust_cannot_apply_to_summary_statistics():
    cov = _hs().cov()
    with pytest.raises(OptionError, match="need the rows of answers"):
        cfa_tool.fit(THREE_FACTORS, covariance=cov, n_obs=301, test="robust")


def test_command_line_robust_is_named_in_the_json_and_the_report():
    proc = run("fit", str(MODEL), "--data", str(DATA), "--robust", "--json", "-")
    assert proc.returncode == 0, proc.stderr
    assert "Yuan-Bentler" in json.loads(proc.stdout)["estimator"]  # the demo data have gaps
    proc = run("fit", str(MODEL), "--data", str(DATA), "--robust", "--incomplete-rows", "listwise")
    assert proc.returncode == 0, proc.stderr
    assert "Satorra-Bentler" in proc.stdout


def test_compare_with_robust_gives_the_scaled_difference_tests():
    one = str(MODEL.with_name("rider_one_factor.cfa"))
    proc = run("compare", str(MODEL), one, "--data", str(DATA), "--robust", "--json", "-")
    assert proc.returncode == 0, proc.stderr
    methods = {t["method"] for t in json.loads(proc.stdout)["tests"]}
    assert any("Satorra-Bentler" in m for m in methods), methods


def test_the_source_of_the_standard_errors_is_stated():
    # found by a hostile trial: --standard-errors-from observed changed the SEs, and no view said so
    from cfa_tool.reporting.paragraph import methods_paragraph

    expected = cfa_tool.fit(THREE_FACTORS, _hs())
    observed = cfa_tool.fit(THREE_FACTORS, _hs(), information="observed")
    assert expected.estimator.endswith("standard errors from the expected information")
    assert observed.estimator.endswith("standard errors from the observed information")
    assert "with standard errors from the observed information" in methods_paragraph(observed)
    robust = cfa_tool.fit(THREE_FACTORS, _hs(), test="robust")
    assert "information" not in robust.estimator and "robust standard errors" in robust.estimator


def test_invariance_with_robust_fits_each_step_with_the_robust_test_and_scales_its_differences(tmp_path):
    # a new-user trial: fit and compare had --robust, invariance had not, so a ladder of 4-point items without a
    # sampling design was normal-theory ML with unscaled differences.  The figures of the robust ladder are
    # checked against the published formulas in tests/workflows/test_invariance_robust_reference.py; here, that
    # the command line asks for it and every view says so.
    from cfa_tool.workflows.invariance import invariance

    data = tmp_path / "hs.csv"
    holzinger_swineford().to_csv(data, index=False)
    model = tmp_path / "three.cfa"
    model.write_text(THREE_FACTORS)
    proc = run("invariance", str(model), "--data", str(data), "--group-column", "school", "--robust", "--json", "-")
    assert proc.returncode == 0, proc.stderr
    steps = json.loads(proc.stdout)["steps"]
    expected = invariance(THREE_FACTORS, holzinger_swineford(), "school", test="robust")
    for step, own in zip(steps, expected.steps):
        assert step["robust"]["method"] == "Satorra-Bentler"
        assert step["robust"]["chi_square_scaled"] == pytest.approx(own.result.robust.chi_square_scaled, rel=1e-8)
    assert [s["versus_previous"]["method"] for s in steps[1:]] == ["Satorra-Bentler 2001 scaled difference"] * 3
    assert steps[1]["versus_previous"]["chi_square_difference"] == pytest.approx(
        expected.steps[1].versus_previous.chi_square_difference, rel=1e-8)
    text = " ".join(run("invariance", str(model), "--data", str(data), "--group-column", "school",
                        "--robust").stdout.split())
    assert "maximum likelihood with the Satorra-Bentler scaled test and robust standard errors" in text
    assert "the difference test being the scaled chi-square difference test (Satorra & Bentler, 2001)" in text
    assert "each difference test is the scaled difference of those statistics (Satorra & Bentler 2001)" in text
    # the table of differences names them as the table of levels names its statistic (a methods reviewer's reading)
    from cfa_tool.reporting.reports import report_of

    tables = {t.key: t for t in report_of(expected).tables}
    assert tables["levels"].columns[1] == "Scaled chi-square (df)"
    assert tables["steps"].columns[1] == "Scaled difference (df)"
    # as for fit and compare: ordinal items have their own adjusted test, so --robust is an error there
    proc = run("invariance", str(model), "--data", str(data), "--group-column", "school", "--robust", "--ordinal", "all")
    assert proc.returncode == 2 and "--robust cannot apply" in proc.stderr and "Traceback" not in proc.stderr
