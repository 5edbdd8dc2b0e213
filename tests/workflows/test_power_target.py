"""The target power of `power` (hostile trial s20): a target at or below the significance level is refused, since the
test of fit rejects at rate alpha or more at every sample size (MacCallum, Browne & Sugawara 1996: power rises from
alpha as N grows), and a target given to more than two decimals is printed as given, not rounded to '1.00'."""

from __future__ import annotations

import pytest

from tests.conftest import run_cli


@pytest.mark.parametrize("target", ["0.01", "0.05"])
def test_a_target_not_above_alpha_is_an_error(target, capsys):
    code, out, err = run_cli(["power", "--df", "5", "--target", target], capsys)
    assert code == 2 and out == ""
    assert f"the target power ({target}) is not above the significance level (0.05)" in err


def test_a_target_of_many_decimals_is_printed_as_given(capsys):
    from scipy import stats

    code, out, err = run_cli(["power", "--df", "5", "--target", "0.999999"], capsys)
    assert code == 0, err
    row = next(line for line in out.splitlines() if "Smallest N for power" in line)
    assert "power .999999 " in row
    n = int(row.split()[-1])
    # the test of close fit (H0: RMSEA .05 against .08), power from scipy's noncentral chi-square
    # (MacCallum, Browne & Sugawara 1996): lambda = (N - 1) df eps^2
    def power(n):
        critical = stats.ncx2.ppf(0.95, 5, (n - 1) * 5 * 0.05 ** 2)
        return stats.ncx2.sf(critical, 5, (n - 1) * 5 * 0.08 ** 2)
    assert power(n) >= 0.999999 > power(n - 1)
