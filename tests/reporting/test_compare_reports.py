"""What the comparison report shows: robust statistics beside the normal-theory ones, and a reason in place
of a number when a scaled difference cannot be computed."""

from __future__ import annotations

from types import SimpleNamespace

import pytest
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.workflow_tables import comparison_report
from cfa_tool.workflows.compare import compare
from cfa_tool.workflows.nesting import scaled_difference_tests

THREE = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
#: factors scaled by their variances and two correlations bounded at 1: a merge of the three factors then has bounds
#: holding two of its parameters on the boundary (workflows.nesting.boundary_of: no exact reading; one bound alone is
#: read by the 50:50 mixture, fixleft s26)
HELD = "scale latent by variance\nbound covariance(visual, textual) <= 1\nbound covariance(visual, speed) <= 1\n"


def _text(comparison) -> str:
    return report_text(comparison_report(comparison), width=80)


def test_robust_statistics_appear_in_the_comparison_table(hs_data):
    result = compare([THREE, THREE + "covary x7, x8\n"], hs_data, test="satorra-bentler")
    text = _text(result)
    for label in ("Scaled chi-square", "scaling factor", "Robust CFI", "Robust TLI", "Robust RMSEA"):
        assert label in text
    first = result.results[0].robust
    assert f"{first.chi_square_scaled:.3f}" in text
    assert max(len(line) for line in text.splitlines()) <= 80


def test_a_scaled_difference_that_cannot_be_computed_says_why():
    # Satorra & Bentler (2001): c_d = (df0 c0 - df1 c1) / (df0 - df1); with c0 = 1.0, df0 = 10, c1 = 2.0, df1 = 8
    # c_d = (10 - 16) / 2 = -3 < 0, so the 2001 statistic does not exist
    from cfa_tool.method import FitTest

    fit = lambda chi, df: SimpleNamespace(chi_square=chi, df=df)  # noqa: E731
    robust = lambda c: SimpleNamespace(scaling_factor=c, cfi_robust=0.9, rmsea_robust=0.05,  # noqa: E731
                                       test=FitTest.SATORRA_BENTLER, label="Satorra-Bentler")
    restricted = SimpleNamespace(fit=fit(30.0, 10), robust=robust(1.0))
    general = SimpleNamespace(fit=fit(20.0, 8), robust=robust(2.0))
    first, second = scaled_difference_tests(restricted, general, "a", "b", general_scaling_at_restricted=1.1)
    assert first.not_computed.startswith("its scaling correction is not positive (-3.000)")
    assert first.to_dict()["not_computed"] == first.not_computed
    # the 2010 version with c1 = 1.1: c_d = (10 - 8.8) / 2 = .6, T_d = 10 / .6
    assert second.not_computed == "" and second.chi_square_difference == pytest.approx(10 / 0.6)
    # a correction well below 1 says why the scaled difference exceeds the unscaled one, and by how much (1 / .6)
    assert second.correction == pytest.approx(0.6) and second.scaling_factors == (1.0, 1.1)
    assert ("correction 0.600 from the restricted fit's own scaling factor, 1.000, and the general model's at the "
            "restricted model's estimates, 1.100" in second.scaled_by)
    assert "larger than the unscaled one (here 1.7 times it)" in second.scaled_by


def test_standardized_expected_change_of_a_residual_covariance_is_a_residual_correlation(hs_data):
    import cfa_tool
    from cfa_tool.reporting import tables as T

    result = cfa_tool.fit(THREE, hs_data)
    theta = {r.variables[0]: r.estimate for r in result.estimates if r.kind == "residual_variance"}
    m = next(m for m in result.modification_indices if m.kind == "residual_covariance" and m.variables == ("x7", "x8"))
    # the expected change over the two residual standard deviations (correlation metric)
    assert m.standardized_expected_change == pytest.approx(m.expected_change / (theta["x7"] * theta["x8"]) ** 0.5,
                                                           rel=1e-12)
    assert "residual correlation metric" in T.modification_table(result).note


def test_ordinal_comparison_counts_free_parameters_as_fit_does():
    import cfa_tool
    from cfa_tool.workflows.simulation import simulate

    two = "factor a: y1, y2, y3, y4\nfactor b: y5, y6, y7, y8\n"
    one = "factor a: y1, y2, y3, y4, y5, y6, y7, y8\n"
    data = simulate(two, 800, seed=3, categories=4).frame
    comparison = compare([one, two], data, ordinal="all")
    for model, result in zip((one, two), comparison.results):
        alone = cfa_tool.fit(model, data, ordinal="all")
        assert result.fit.n_free_parameters == alone.fit.n_free_parameters
        assert result.fit.df == alone.fit.df


def test_ordinal_comparison_names_the_adjusted_test_and_its_pieces_as_fit_does():
    """One vocabulary: compare's table names the adjusted test's pieces as fit's table does ('scale and shift', not
    a 'scaling factor' that does not make the statistic), with the values fit reports for the same model."""
    import cfa_tool
    from cfa_tool.reporting import tables as T
    from cfa_tool.workflows.simulation import simulate

    two = "factor a: y1, y2, y3, y4\nfactor b: y5, y6, y7, y8\n"
    one = "factor a: y1, y2, y3, y4, y5, y6, y7, y8\n"
    data = simulate(two, 800, seed=3, categories=4).frame
    comparison = compare([one, two], data, ordinal="all")
    alone = cfa_tool.fit(two, data, ordinal="all")
    fit_row = next(row for row in T.fit_table(alone).rows if row[0].strip() == alone.robust.test.correction)
    table = comparison_report(comparison).tables[0]
    compare_row = next(row for row in table.rows if row[0].strip() == alone.robust.test.correction)
    assert fit_row[0].strip() == compare_row[0].strip() == "scale and shift"
    assert compare_row[2] == fit_row[1]  # the second model's column: the same scale and shift as its own fit
    # the pieces make the statistic: T* = scale x T + shift (Asparouhov & Muthén 2010)
    r = comparison.results[1]
    assert r.fit.chi_square * r.robust.scale + r.robust.shift == pytest.approx(r.robust.chi_square_scaled, rel=1e-12)
    text = _text(comparison)
    assert "scaling factor" not in text
    values = table.to_dict()
    assert "Scale" in str(values) and "Shift" in str(values) and "Scaling factor" not in str(values)
    # the difference test carries the same name as the fit's test, with the authors of the difference version
    test_name = comparison.tests[0].method.value
    assert test_name.startswith(alone.robust.test.label.split(" (")[0]) and "Asparouhov & Muthén 2006" in test_name


def test_robust_figures_come_first_and_each_number_keeps_its_label(hs_data):
    # the scaled test and robust indices first, SRMR, then the normal-theory figures marked unadjusted (as fit's
    # table; new-user trial); the data-file values are reordered with the text, so each number stays under its name
    result = compare([THREE, THREE + "covary x7, x8\n"], hs_data, test="satorra-bentler")
    table = comparison_report(result).tables[0]
    labels = [row[0] for row in table.rows]
    assert labels[:4] == ["Admissible", "Free parameters", "df", "Scaled chi-square (Satorra-Bentler)"]
    assert labels.index("SRMR") < labels.index("Chi-square (unadjusted)") < labels.index("AIC")
    named = dict(zip(table.value_columns, table.values[0]))
    first = result.results[0]
    assert named["Scaled chi-square"] == first.robust.chi_square_scaled
    assert named["Chi-square (unadjusted)"] == first.fit.chi_square and named["df"] == first.fit.df
    assert named["CFI (unadjusted)"] == first.fit.cfi and named["Robust CFI"] == first.robust.cfi_robust
    assert named["SRMR"] == first.fit.srmr and named["AIC"] == first.fit.aic


def test_non_nested_weighted_models_are_not_said_to_be_compared_by_aic_and_bic(hs_data):
    # a hostile trial: under sampling weights the table showed AIC and BIC 'not defined' while the methods paragraph
    # said the models 'were compared by AIC and BIC', a note advised it and the JSON said they were comparable. A
    # weighted log-likelihood is a pseudo-likelihood (Skinner 1989; Asparouhov 2005), so AIC and BIC do not exist.
    import numpy as np

    moved = "factor visual: x1, x2\nfactor textual: x3, x4, x5, x6\nfactor speed: x7, x8, x9\n"  # same df as THREE
    plain = compare([THREE, moved], hs_data)
    assert [n.information_criteria for n in plain.not_nested] == [True]
    weights = np.random.default_rng(5).uniform(0.5, 2, len(hs_data))
    weighted = compare([THREE, moved], hs_data.assign(w=weights), weights="w")
    assert weighted.results[0].fit.aic is None and weighted.results[1].fit.bic is None
    (pair,) = weighted.not_nested
    assert not pair.information_criteria and "AIC and BIC are not defined" in pair.reason
    assert weighted.to_dict()["not_nested"][0]["information_criteria_comparable"] is False
    report = comparison_report(weighted)
    assert not any("Compare them by AIC" in note for note in report.notes)
    assert "compared by AIC and BIC" not in report.paragraph
    # the unweighted pair keeps the advice, in the note and the paragraph alike
    report = comparison_report(plain)
    assert any("Compare them by AIC and BIC" in note for note in report.notes)
    assert "compared by AIC and BIC" in report.paragraph


def _views(report) -> dict[str, str]:
    """Every view of a report as plain text: terminal, Markdown, HTML and Word (one report model rendered to each)."""
    import html

    from cfa_tool.reporting.docx_report import report_docx
    from cfa_tool.reporting.html_report import report_html
    from cfa_tool.reporting.text_formats import report_markdown
    from tests.reporting.test_fit_views import _html_text, _word_text

    views = {"terminal": report_text(report, width=200), "Markdown": html.unescape(report_markdown(report)),
             "HTML": html.unescape(_html_text(report_html(report))), "Word": _word_text(report_docx(report, 72))}
    plain = {"\\": "", "\u2502": " ", "|": " ", "\u2212": "-"}  # escapes, table and box rules, Word's minus sign
    return {name: " ".join(text.translate(str.maketrans(plain)).split()) for name, text in views.items()}


def test_a_pair_without_any_statistic_shows_its_changes_in_fit_and_marks_no_p_value(hs_data):
    # a new-user trial (design, every difference test not computed): the paragraph said the changes in CFI and RMSEA
    # "are reported as descriptions only" but the table left them blank while the JSON had them (-.427 / -.431), and
    # the note said "read the p-values marked *" with nothing marked.  The changes describe the two fits (each
    # test's delta_cfi and delta_rmsea in the JSON): every view shows them, and no note reads marks that are not there
    import dataclasses

    from cfa_tool.reporting.numbers import signed
    from cfa_tool.workflows.nesting import PSEUDO_LIKELIHOOD

    one = "factor g: x1..x9\n"
    # a bound on one of the merged correlations: several parameters on the boundary, one held, no exact reading
    found = compare([one, THREE + HELD], hs_data, test="robust")
    assert found.tests[0].boundary  # three factors merged into one: their correlations at 1
    reasons = [PSEUDO_LIKELIHOOD, "its scaling correction is not positive (-0.159), so the difference cannot be scaled",
               "the general model's scaling factor at the restricted model's estimates is not defined"]
    none = dataclasses.replace(found, tests=tuple(
        dataclasses.replace(t, chi_square_difference=float("nan"), p_value=float("nan"), not_computed=why)
        for t, why in zip(found.tests, reasons)))
    report = comparison_report(none)
    tests = none.to_dict()["tests"]
    assert [t["delta_cfi"] for t in tests] == [t.delta_cfi for t in none.tests] and len(tests) == 3
    table = report.tables[1]
    assert [list(row[3:]) for row in table.rows] == [[signed(t["delta_cfi"]), signed(t["delta_rmsea"])] for t in tests]
    assert all(row[2] == "" for row in table.rows)  # no p-value, so none marked
    for name, text in _views(report).items():
        assert "marked *" not in text, name
        assert "On the boundary: factors visual, textual, and speed merged into g" in text, name
        assert "No difference test could be computed here: weigh the models by their fit indices, AIC and BIC" in text
        assert "no difference test of this comparison could be computed" in text, name
        for t in tests:
            assert f"not computed ({t['df_difference']}) {signed(t['delta_cfi'])} {signed(t['delta_rmsea'])}" in text, name
    paragraph = report.paragraph
    preferred = tests[2]  # the strictly positive version's changes: the robust indices', as the table's row
    assert (f"For Model 1 against Model 2 no difference statistic could be computed; \u0394CFI = "
            f"{signed(preferred['delta_cfi'])}, \u0394RMSEA = {signed(preferred['delta_rmsea'])}.") in paragraph
    assert "Changes in CFI and RMSEA are reported as descriptions only" in paragraph
    assert "check that" not in paragraph and "read the" not in paragraph  # the tool's advice stays out of a paper


def test_a_design_comparison_marks_the_p_values_its_note_reads(hs_data):
    # the same trial's pair under a sampling design (weights, clusters): the plain difference is no test there, the
    # scaled ones are; a p-value marked * in the table is what the boundary note reads, in every view
    import numpy as np

    data = hs_data.copy()
    rng = np.random.default_rng(5)
    data["household"] = np.repeat(np.arange(len(data) // 2 + 1), 2)[: len(data)]
    data["weight"] = rng.uniform(0.5, 2.0, len(data))
    found = compare(["factor g: x1..x9\n", THREE + HELD], data, weights="weight", cluster="household")
    tests = {t.method.value: t for t in found.tests}
    assert tests["likelihood ratio"].not_computed and not tests["Satorra-Bentler 2010 strictly positive scaled "
                                                                   "difference"].not_computed
    report = comparison_report(found)
    marked = [row for row in report.tables[1].rows if row[2].endswith(" *")]
    assert len(marked) == sum(not t.not_computed for t in found.tests) >= 1
    for row in report.tables[1].rows:  # every row's changes in fit, computed or not
        assert row[3] and row[4]
    for name, text in _views(report).items():
        assert ("read the p-values marked *" in text or "read the p-value marked *" in text), name
