"""power-simulation names a pair of factors (or items) in one order in every table of its report, the order of the
model file, as the population table and the fit name it (new-user trial s21, finding 11: the power, coverage and
bias tables wrote 'dedication and vigour', sorted by name, and the population table 'vigour and dedication').  The
population values are the model's standardized defaults (loadings .7, factor correlations .3: documented defaults of
the project, docs/commands.md), so each covariance's power is the share of replications rejecting zero."""

from __future__ import annotations

from cfa_tool.workflows.montecarlo import monte_carlo_power

MODEL = ("factor vigour: v1, v2, v3\n"
         "factor dedication: d1, d2, d3\n"
         "covary v3, d1\n")


def _text(result) -> str:
    return " ".join(result.summary().split())


def test_the_power_and_population_tables_name_each_pair_in_the_models_order():
    result = monte_carlo_power(MODEL, 150, replications=4, seed=2, workers=1)
    labels = [p.label for p in result.parameters]
    assert "covariance(vigour, dedication)" in labels and "covariance(dedication, vigour)" not in labels
    assert "covariance(v3, d1)" in labels
    text = _text(result)
    # the power table and the population table (the defaults' caution counts them and points to that table, s22)
    assert text.count("covariance of factors vigour and dedication") == 2
    assert "population values not given in the model file are the standardized defaults" in text
    assert "dedication and vigour" not in text and "d1 and v3" not in text
    assert "residual covariance of v3 and d1" in text
    assert "covariance(vigour, dedication)" in result.defaulted  # the JSON's defaults name it alike


def test_the_power_curve_names_them_alike():
    curve = monte_carlo_power(MODEL, "120,160", replications=3, seed=2, workers=1)
    text = _text(curve)
    assert "covariance of factors vigour and dedication" in text and "dedication and vigour" not in text
