"""What a comparison says of each scaled difference: the scaling factors and correction it took, computed as its
name says (Satorra & Bentler 2001: the two fits' own factors; 2010: the general model's at the restricted model's
estimates), and which of the tests to read."""

from __future__ import annotations

import json

import pytest

from cfa_tool.method import DifferenceMethod
from cfa_tool.reporting.json_report import to_json
from cfa_tool.reporting.workflow_tables import READ_POSITIVE, comparison_report
from cfa_tool.workflows.compare import compare
from tests.conftest import THREE_FACTORS

UNCORRELATED = THREE_FACTORS + "uncorrelated visual, textual, speed\n"


def _by_method(result):
    return {t.method: t for t in result.tests}


@pytest.mark.parametrize("missing, statistic, information", [(None, "Satorra-Bentler", "expected"),
                                                             ("full-information", "Yuan-Bentler", "observed")])
def test_the_2001_difference_takes_the_fits_own_factors_and_says_which(hs_data, missing, statistic, information):
    # complete rows through full-information ML: the fits' test is the Yuan-Bentler one on the observed information,
    # and the 2001 difference is computed from those fits' own factors, as the report names them (Satorra & Bentler
    # 2001: c_d = (df0 c0 - df1 c1) / (df0 - df1), T_d = (T0 - T1) / c_d); the ordinary fits' from their
    # Satorra-Bentler factors on the expected information
    result = compare([UNCORRELATED, THREE_FACTORS], hs_data, test="robust", missing=missing)
    restricted, general = result.results
    assert {r.robust.test.label for r in result.results} == {statistic}
    tests = _by_method(result)
    first = tests[DifferenceMethod.SATORRA_BENTLER_2001]
    c0, c1 = restricted.robust.scaling_factor, general.robust.scaling_factor
    correction = (restricted.fit.df * c0 - general.fit.df * c1) / (restricted.fit.df - general.fit.df)
    assert first.scaling_factors == (c0, c1) and first.correction == pytest.approx(correction, rel=1e-12)
    assert first.chi_square_difference == pytest.approx(
        tests[DifferenceMethod.LIKELIHOOD_RATIO].chi_square_difference / correction, rel=1e-12)
    assert (f"correction {correction:.3f} from the two fits' own scaling factors, {c0:.3f} and {c1:.3f} ({statistic}, "
            f"on the {information} information)") in first.scaled_by
    report = comparison_report(result)
    notes = [str(n) for n in report.notes]
    assert f"{first.method}: {first.scaled_by}." in notes and READ_POSITIVE in notes
    positive = tests[DifferenceMethod.SATORRA_BENTLER_2010]
    assert f"{positive.method}: {positive.scaled_by}." in notes
    if missing is None:  # the restricted fit's own factor beside the general model's at its estimates
        assert positive.scaling_factors[0] == c0 and "from the restricted fit's own scaling factor" in positive.scaled_by
    else:  # both computed alike at the restricted estimates: the restricted one is not its fit's own, and says so
        assert positive.scaling_factors[0] != pytest.approx(c0, rel=1e-3)
        assert f"the restricted model's {positive.scaling_factors[0]:.3f} (its fit's own is {c0:.3f})" in positive.scaled_by
    saved = json.loads(to_json(result))["tests"]
    by_name = {t["method"]: t for t in saved}
    assert by_name[str(first.method)]["scaled_by"] == first.scaled_by
    assert by_name[str(first.method)]["correction"] == pytest.approx(correction, rel=1e-12)
    assert by_name[str(DifferenceMethod.LIKELIHOOD_RATIO)]["scaled_by"] is None


def test_without_a_robust_test_there_is_nothing_to_read_between(hs_data):
    result = compare([UNCORRELATED, THREE_FACTORS], hs_data)
    assert [t.method for t in result.tests] == [DifferenceMethod.LIKELIHOOD_RATIO]
    assert READ_POSITIVE not in [str(n) for n in comparison_report(result).notes]
