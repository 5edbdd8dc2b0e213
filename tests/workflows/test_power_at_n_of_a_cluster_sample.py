"""power --n N with a planned cluster sample (--design-effect, or --intraclass with --cluster-size): the power at N is
that of the N / design effect independent rows the sample is worth (Kish 1965's effective sample size, recalled from
memory), where it was that of N independent rows with the design shown beside it (hostile tester s24: .700 at N = 300
with a design effect of 1.9, whose 158 independent rows have power .41)."""

from __future__ import annotations

import json

import pytest
from scipy import stats

from cfa_tool.errors import OptionError
from cfa_tool.reporting.json_report import to_json
from cfa_tool.reporting.workflow_tables import power_report
from cfa_tool.workflows.power import plan


def _scipy_close_fit_power(df: int, n_rows: float, alpha: float = 0.05) -> float:
    """MacCallum, Browne & Sugawara (1996): the test of close fit (RMSEA .05 against .08), noncentrality
    (N - 1) df eps^2, computed with scipy's noncentral chi-square, not the tool's."""
    n = n_rows - 1
    critical = stats.ncx2.ppf(1 - alpha, df, n * df * 0.05**2)
    return float(stats.ncx2.sf(critical, df, n * df * 0.08**2))


@pytest.mark.parametrize("design", [dict(design_effect=1.9), dict(intraclass=0.1, cluster_size=10)])
def test_power_at_n_is_that_of_the_rows_it_is_worth(design):
    result = plan(24, n_obs=300, **design)  # 1 + (10 - 1) x .1 = 1.9 (Kish 1965)
    assert result.effective_n == pytest.approx(300 / 1.9)
    assert result.power == pytest.approx(_scipy_close_fit_power(24, 300 / 1.9), rel=1e-6)
    assert result.power < _scipy_close_fit_power(24, 300) - 0.2  # .41 rather than .70
    rows = {row[0]: row[1] for table in power_report(result).tables for row in table.rows}
    assert rows["Power with N = 300 rows of the cluster sample"] == f"{result.power:.3f}".lstrip("0")
    assert rows["Independent rows N = 300 is worth (N / design effect, Kish 1965)"] == "157.9"
    assert "Smallest N of independent rows for power .80" in rows
    data = json.loads(to_json(result))
    assert data["power"] == pytest.approx(result.power) and data["effective_n"] == pytest.approx(300 / 1.9)


def test_without_a_design_the_power_at_n_is_unchanged():
    result = plan(24, n_obs=300)
    assert result.effective_n is None
    assert result.power == pytest.approx(_scipy_close_fit_power(24, 300), rel=1e-6)


def test_too_few_independent_rows_refused():
    with pytest.raises(OptionError, match="worth about 1.5 independent rows, too few"):
        plan(24, n_obs=15, design_effect=10)


def test_the_note_says_the_plan_takes_the_design_it_shows():
    """New-user trial s25: under a table that gives the design effect, rows and clusters, the note said 'this plan
    models none of them' (a sampling design among them); with a planned design it says what the plan takes and what
    it does not; without one the note is as before."""
    planned = " ".join(str(n) for n in power_report(plan(24, n_obs=300, intraclass=0.06, cluster_size=40)).notes)
    assert "models none of them" not in planned
    assert "This plan takes the design effect given for the clusters" in planned
    assert "but not uneven weights, missing answers or non-normal data" in planned
    plain = " ".join(str(n) for n in power_report(plan(24, n_obs=300)).notes)
    assert "this plan models none of them" in plain
