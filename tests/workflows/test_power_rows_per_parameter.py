"""The RMSEA power plan's smallest N judged by the rule of rows per free parameter every fit applies (new-user trial
s17: 'smallest N for power .80: 96' for a model with 46 free parameters, said without a word on the model's own
needs).  The N of the test comes from MacCallum, Browne & Sugawara (1996), Table 4 (recalled from memory; also
checked in tests/workflows/test_planning_and_resampling.py); the rule is Bentler & Chou (1987), 5 rows per free
parameter (recalled from memory; common practice, a convention, not a law); the free parameters are counted by hand."""

from __future__ import annotations

import io

import docx
import pytest

from cfa_tool.cli import main
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.workflow_tables import power_report
from cfa_tool.workflows.power import plan

POWER_CAUTION = "Check before planning with this sample size"  # the heading of the caution that opens the report


@pytest.mark.parametrize("variables, below", [(16, True), (15, False)])
def test_the_smallest_n_is_judged_by_the_rule_of_rows_per_parameter(variables, below):
    # df 100: the close-fit test needs N = 132 (MacCallum, Browne & Sugawara 1996, Table 4); 16 variables with 100
    # df leave 136 - 100 = 36 free parameters (180 rows by the rule), 15 leave 120 - 100 = 20 (100 rows)
    result = plan(100, variables=variables)
    assert result.required_n == pytest.approx(132, rel=0.007)
    if below:
        [facts] = result.below_rows_rule
        assert (facts.rows, facts.parameters) == (result.required_n, 36)
    else:
        assert result.below_rows_rule == ()
        assert power_report(result).notice is None
    assert plan(100).below_rows_rule == ()  # degrees of freedom alone: the model's parameters are unknown


def test_the_report_says_it_first_and_points_to_power_simulation(tmp_path, capsys):
    # the trial's shape: four factors of five items, 16 free loadings, 20 residual variances, 4 factor variances and
    # 6 covariances = 46 free parameters (df 210 - 46 = 164), 230 rows by the rule
    model = tmp_path / "four.cfa"
    model.write_text("".join(f"factor f{j}: " + ", ".join(f"x{j}_{i}" for i in range(1, 6)) + "\n" for j in range(4)))
    assert main(["power", str(model)]) == 0
    out = " ".join(capsys.readouterr().out.replace("│", " ").split())
    assert out.startswith(f"╭─ {POWER_CAUTION}")
    first = out[:out.index("Power of the RMSEA test")]
    assert "rows for 46 parameters" in first and "230 rows here" in first
    assert "'cfa-tool power-simulation MODEL --n" in first and ",230'" in first
    # the Word file says it in words, naming no command
    result = plan(164, variables=20)
    assert result.required_n < 230 and result.below_rows_rule[0].parameters == 46
    text = " ".join(p.text for p in docx.Document(io.BytesIO(report_docx(power_report(result), 72))).paragraphs)
    assert POWER_CAUTION in text and "power simulation of the model" in text
    assert "cfa-tool" not in text and "--n" not in text


def test_the_advice_names_only_sizes_power_simulation_runs():
    # hostile tester s28: 'power MODEL --n 5' for 12 items advised 'power-simulation MODEL --n 5,135', which
    # power-simulation refuses (each simulated data set needs at least 12 + 2 = 14 rows).  The rider model: 12 items,
    # 78 - 51 = 27 free parameters, 5 x 27 = 135 rows by the rule of thumb of 5 rows per parameter (common practice)
    from cfa_tool.errors import OptionError
    from cfa_tool.reporting.workflow_tables import rows_rule_caution
    from cfa_tool.resources import resource_dir
    from cfa_tool.workflows.montecarlo import monte_carlo_power

    model = resource_dir("models") / "rider_three_factors.cfa"
    result = plan(51, n_obs=5, variables=12)
    said = str(rows_rule_caution(result))
    assert "'cfa-tool power-simulation MODEL --n 14,135'" in said and "power_simulation(model, [14, 135])" in said
    assert "each simulated data set of 12 items needs at least 14 rows" in said
    with pytest.raises(OptionError, match="needs at least 14 rows"):  # the size advised is the least it takes
        monte_carlo_power(model, [13], replications=20)
