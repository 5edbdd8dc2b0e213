"""Parameters are named in the words a researcher uses, in every view: 'the loading of x2 on visual',
'the residual variance of x9', 'the covariance of factors visual and speed', '... in group Pasteur'.  The
machine labels of the parameter table ('loading(visual, x2)') stay in the JSON's 'parameters' key only.

The bound case: in the Holzinger & Swineford (1939) three-factor model the loading of x2 on visual is about
.55 (the unrestricted estimate of the same model elsewhere in this suite), so a bound at .3 holds it there."""

from __future__ import annotations

import json
import re

import pytest

import cfa_tool
from cfa_tool.model.description import label_words, parameter_words, split_label
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.text_formats import report_markdown
from cfa_tool.reporting.workflow_tables import invariance_report
from cfa_tool.workflows.invariance import invariance
from tests.conftest import THREE_FACTORS
from tests.reporting.test_fit_views import _html_text, _plain, _word_text

BOUND = THREE_FACTORS + "bound loading(visual, x2) <= 0.3\n"
#: a machine label as the parameter table writes it: kind(names)
MACHINE = re.compile(r"\b(loading|factor_variance|factor_covariance|residual_variance|residual_covariance|intercept|"
                     r"mean|threshold)\([A-Za-z0-9_]+(, [A-Za-z0-9_]+)?\)")


def test_every_kind_of_parameter_in_words():
    assert parameter_words("loading", ("courtesy", "helpful")) == "the loading of helpful on courtesy"
    assert parameter_words("residual_variance", ("temperature",)) == "the residual variance of temperature"
    assert parameter_words("factor_variance", ("F1",)) == "the variance of factor F1"
    assert parameter_words("factor_covariance", ("F1", "F2")) == "the covariance of factors F1 and F2"
    assert parameter_words("residual_covariance", ("x7", "x8")) == "the residual covariance of x7 and x8"
    assert parameter_words("intercept", ("x1",), "north") == "the intercept of x1 in group north"
    assert parameter_words("threshold", ("x1", "2")) == "threshold 2 of x1"
    # a model file's kinds: an item's variance is its residual's, a factor's its own
    assert parameter_words("variance", ("x1",), observed=("x1",)) == "the residual variance of x1"
    assert parameter_words("variance", ("F1",), observed=("x1",)) == "the variance of factor F1"
    assert split_label("loading(courtesy, helpful) [south]") == ("loading", ("courtesy", "helpful"), "south")
    assert label_words("residual_variance(x9) [Pasteur]") == "the residual variance of x9 in group Pasteur"
    # a label that does not say whether a variance is an item's residual or a factor's stays neutral
    assert label_words("covariance(x1, x2)", article=False) == "covariance of x1 and x2"


@pytest.fixture(scope="module")
def bound_fit(hs_data):
    result = cfa_tool.fit(BOUND, hs_data)
    assert [p.parameters for p in result.problems] == [("loading(visual, x2)",)]
    return result


def test_every_view_of_a_fit_names_the_bound_parameter_in_words(bound_fit):
    report = fit_report(bound_fit)
    views = {"terminal": _plain(report_text(report, 100)), "HTML": _plain(_html_text(report_html(report))),
             "Markdown": _plain(report_markdown(report)), "Word": _plain(_word_text(report_docx(report, 72))),
             "paragraph": _plain(methods_paragraph(bound_fit))}
    for name, text in views.items():
        assert "The loading of x2 on visual is held at its upper bound (0.3)" in text or name == "paragraph", name
        assert "the loading of x2 on visual held at a bound" in text, name
        model_file = text.find("bound loading(visual, x2) <= 0.3")  # the model file as written, where a view shows it
        prose = text if model_file < 0 else text[:model_file] + text[model_file + 33:]
        assert not MACHINE.search(prose), (name, MACHINE.search(prose))
    out = bound_fit.to_dict()["problems"][0]
    assert out["parameters"] == ["loading(visual, x2)"]  # the stable key for programs
    assert out["parameters_in_words"] == ["the loading of x2 on visual"]
    assert out["explanation"].startswith("The loading of x2 on visual is held at its upper bound")


def test_the_invariance_ladder_names_each_group_parameter_in_words(hs_data):
    result = invariance(BOUND, hs_data, "school")
    text = _plain(report_text(invariance_report(result), 100))
    # each group named by the one rule of group names (language.names.written_group): one word each, as it is (s22)
    assert "the loading of x2 on visual in group Grant-White held at a bound" in text
    assert "the loading of x2 on visual in group Pasteur held at a bound" in text
    # the model file's statements, quoted as written (the bound; the 'noninvariant' statement the pointer to partial
    # invariance gives to type), are the one place the model language's form belongs
    statements = re.sub(r"'noninvariant [^']*'", "", text.replace("bound loading(visual, x2) <= 0.3", ""))
    assert not MACHINE.search(statements), MACHINE.search(statements)
    assert "parameters_in_words" in json.dumps(result.to_dict())


HIGHER = THREE_FACTORS + "factor g: visual, textual, speed\ninvariance scalar\n"


def test_the_intercepts_of_factors_under_a_higher_order_factor_are_not_called_means(hs_data):
    # found in a re-check: a grouped higher-order fit listed the first-order factors' intercepts (the means of their
    # disturbances) under 'Factor means'.  Holzinger & Swineford (1939) by school, loadings and intercepts equal
    from cfa_tool.reporting.tables import DISTURBANCE_INTERCEPTS, DISTURBANCE_INTERCEPTS_NOTE

    result = cfa_tool.fit(HIGHER, hs_data, group="school")
    report = fit_report(result)
    means = [t for t in report.tables if t.title.startswith("Factor means")]
    intercepts = [t for t in report.tables if t.title.startswith(DISTURBANCE_INTERCEPTS)]
    # g's mean is fixed at 0 in both groups: no table of fixed zeros (new user s17), a sentence under the intercepts
    assert means == []
    assert [t.note.startswith("The mean of g is fixed at 0 in this group (not estimated), so no table shows it.")
            for t in report.tables if t.title.startswith("Intercepts,")] == [True] * 2
    assert [[row[0] for row in t.rows] for t in intercepts] == [["visual", "textual", "speed"]] * 2
    pasteur = {r.variables[0]: r.estimate for r in result.estimates if r.kind == "mean" and r.group == "Pasteur"}
    assert pasteur["g"] == 0.0 and pasteur["textual"] != 0.0  # free in the second group: the table shows them
    shown = dict(zip((row[0] for row in intercepts[1].values), (row[1] for row in intercepts[1].values)))
    assert shown["textual"] == pytest.approx(pasteur["textual"])
    for name, text in {"terminal": report_text(report, 100), "HTML": _html_text(report_html(report)),
                       "Markdown": report_markdown(report), "Word": _word_text(report_docx(report, 72))}.items():
        text = _plain(text)
        first = text.index(DISTURBANCE_INTERCEPTS)
        assert _plain(DISTURBANCE_INTERCEPTS_NOTE) in text[first:], name
        assert "Factor means" not in text, name  # g's means are fixed at 0 in each group: no table of zeros


def test_compare_names_an_inadmissible_solution_before_the_fit_figures(hs_data):
    # the neighbour of the invariance paragraph's order: the problem comes before the figures a reader might take
    # as support (the bound case above against the same model without the bound)
    from cfa_tool.reporting.workflow_tables import comparison_report
    from cfa_tool.workflows.compare import compare

    report = comparison_report(compare([THREE_FACTORS, BOUND], hs_data))
    for text in (_plain(report.paragraph), _plain(report_text(report, 100))):
        problem = text.index("was not admissible (the loading of x2 on visual held at a bound)")
        assert problem < text.index("Fit: ")
        assert not MACHINE.search(text), MACHINE.search(text)


def test_the_power_simulation_tables_name_parameters_in_words():
    # the simulation's labels are the parameter table's free labels ('loading(f, y2)'); its views show words
    from cfa_tool.reporting.workflow_tables import montecarlo_report
    from cfa_tool.workflows.montecarlo import MonteCarloPower, ParameterPower

    rows = tuple(ParameterPower(label, 0.5, 0.5, 0.0, 0.1, 0.1, 0.95, 0.9)
                 for label in ("loading(f, y2)", "covariance(f, g)", "variance(y3)"))
    result = MonteCarloPower(200, 500, 500, 0.05, 1, rows, ("loading(g, y7)",))
    report = montecarlo_report(result)
    assert [row[0] for row in report.tables[0].rows] == ["loading of y2 on f", "covariance of f and g", "variance of y3"]
    text = _plain(report_text(report, 100))
    # no population table to list them (a result read back): the caution names them
    assert "They are the loading of y7 on g." in text
    assert not MACHINE.search(text) and "loading(" not in text and "covariance(" not in text
    assert result.to_dict()["parameters"][0]["label"] == "loading(f, y2)"  # the JSON keeps the key
    # knowing the model's items, an item's residual variance is told from a factor's variance (re-check 6: both
    # read 'variance of ...'), in the table and in the defaults line
    rows = tuple(ParameterPower(label, 0.5, 0.5, 0.0, 0.1, 0.1, 0.95, 0.9)
                 for label in ("variance(y3)", "variance(f)", "covariance(f, g)", "covariance(y2, y3)"))
    from cfa_tool.language.parser import parse_model
    from cfa_tool.workflows.simulation import population_from_spec

    population = population_from_spec(parse_model("factor f: y2, y3, y7\nfactor g: y1, y4, y5\n"))
    result = MonteCarloPower(200, 500, 500, 0.05, 1, rows, ("variance(y3)",), population=population)
    report = montecarlo_report(result)
    assert [row[0] for row in report.tables[0].rows] == ["residual variance of y3", "variance of factor f",
                                                         "covariance of factors f and g",
                                                         "residual covariance of y2 and y3"]
    assert "1 population value not given in the model file is a standardized default" in _plain(
        report_text(report, 100))  # named in the population table, in words


def test_modification_and_bootstrap_tables_name_parameters_in_words(hs_data):
    # re-check 6: these two tables kept the compact 'loading visual, x9' form where every other table gives words;
    # one rule now: words in every view (the data files keep the kind and the variables apart)
    from cfa_tool.reporting.tables import modification_table
    from cfa_tool.reporting.workflow_tables import bootstrap_report
    from cfa_tool.workflows.bootstrap import BootInterval, BootstrapResult

    fitted = cfa_tool.fit(THREE_FACTORS, hs_data)
    table = modification_table(fitted)
    shown = fitted.reported_modification_indices()[:len(table.rows)]
    assert [row[0] for row in table.rows] == [parameter_words(m.kind, tuple(m.variables), article=False) for m in shown]
    assert "loading of x9 on visual" in [row[0] for row in table.rows]  # the largest index of this model
    assert [tuple(row[:2]) for row in table.values] == [(m.kind, ", ".join(m.variables)) for m in shown]
    by_school = cfa_tool.fit(THREE_FACTORS, hs_data, group="school")
    assert {g.label for g in by_school.groups} == {"Pasteur", "Grant-White"}
    for g, school in enumerate(g.label for g in by_school.groups):  # each group's table; its group in its heading
        grouped = modification_table(by_school, g)
        mine = [m for m in by_school.reported_modification_indices() if m.group == school][:len(grouped.rows)]
        assert [row[0] for row in grouped.rows] == [parameter_words(m.kind, tuple(m.variables), article=False)
                                                   for m in mine]
        assert {row[2] for row in grouped.values} == {school}  # the data files keep the group
    intervals = (BootInterval("loading", ("visual", "x2"), "unstandardized", 0.55, (0.3, 0.8), (0.31, 0.81), 0.1),
                 BootInterval("residual_covariance", ("x7", "x8"), "standardized", 0.2, (0.1, 0.3), (0.1, 0.3), 0.05))
    report = bootstrap_report(BootstrapResult(fitted, 500, 500, 1, intervals, None, None))
    assert [row[0] for row in report.tables[0].rows] == ["loading of x2 on visual", "residual covariance of x7 and x8"]
    assert not MACHINE.search(_plain(report_text(report, 100)))


#: item names as survey platforms write them: the question's text, with commas, brackets and full stops
CUBES = "Cubes, paper form (timed)."
CUBES_BOUND = THREE_FACTORS.replace("x2", f'"{CUBES}"') + f'bound loading(visual, "{CUBES}") <= 0.3\n'


def test_a_label_is_read_back_by_the_model_languages_quoting_rules():
    # the grammar's STRING (grammar/model.lark) holds commas and brackets; a label writes such a name quoted, so
    # that its kind, names and group come back as they were (a new-user trial: 'the residual variance of At work
    # and I feel full of energy.' from splitting 'residual_variance(At work, I feel full of energy.)' at the comma)
    from cfa_tool.language.names import reference_text

    for kind, names, group in [("residual_variance", ("At work, I feel full of energy.",), None),
                               ("loading", ("energy", "By mid-shift I feel drained (tired, flat)."), "north"),
                               ("covariance", ("x1", "x2"), None), ("loading", ("visual", "x2"), "a [b]")]:
        label = reference_text(kind, names, group)
        assert split_label(label) == (kind, names, group), label
    assert reference_text("variance", ("At work, I feel full.",)) == 'variance("At work, I feel full.")'
    assert reference_text("loading", ("visual", "x2"), "south") == "loading(visual, x2) [south]"  # plain names as before
    assert label_words('residual_variance("At work, I feel full of energy.")') == \
        "the residual variance of At work, I feel full of energy."


def test_a_bound_on_an_item_whose_name_holds_commas_is_named_whole(hs_data):
    # the bound case above (Holzinger & Swineford 1939, loading of x2 on visual about .55, so a bound at .3 holds it)
    # with x2 renamed as a survey platform would name it
    result = cfa_tool.fit(CUBES_BOUND, hs_data.rename(columns={"x2": CUBES}))
    (problem,) = [p for p in result.problems]
    assert problem.parameters == (f'loading(visual, "{CUBES}")',)
    assert problem.parameter_words() == (f"the loading of {CUBES} on visual",)
    assert problem.explanation.startswith(f"The loading of {CUBES} on visual is held at its upper bound (0.3)")
    assert problem.touches("loading", ("visual", CUBES))
    out = result.to_dict()["problems"][0]
    assert out["parameters_in_words"] == [f"the loading of {CUBES} on visual"]
    # the report's methods paragraph writes the name in quotes, as the model language does, so that its commas do
    # not run into the paragraph's lists
    assert f'the loading of "{CUBES}" on visual held at a bound' in _plain(report_text(fit_report(result), 100))


def test_the_power_simulation_tells_an_items_residual_variance_whose_name_holds_commas():
    # the same rule as above: an item's variance is its residual's, a factor's its own; a comma in the item's name
    # made the item unknown ('variance of factor At work and I feel ...')
    from cfa_tool.language.parser import parse_model
    from cfa_tool.language.names import reference_text
    from cfa_tool.reporting.workflow_tables import montecarlo_report
    from cfa_tool.workflows.montecarlo import MonteCarloPower, ParameterPower
    from cfa_tool.workflows.simulation import population_from_spec

    item = "At work, I feel full of energy."
    population = population_from_spec(parse_model(f'factor f: "{item}", y3, y7\nfactor g: y1, y4, y5\n'))
    labels = [label for label in population.table.free_labels if split_label(label)[1][-1] == item]
    assert labels == [reference_text("variance", (item,))]  # the marker's loading is fixed: its variance only
    rows = tuple(ParameterPower(label, 0.5, 0.5, 0.0, 0.1, 0.1, 0.95, 0.9)
                 for label in (*labels, reference_text("loading", ("f", item))))
    report = montecarlo_report(MonteCarloPower(200, 500, 500, 0.05, 1, rows, tuple(labels), population=population))
    assert [row[0] for row in report.tables[0].rows] == [f"residual variance of {item}", f"loading of {item} on f"]
    assert f"residual variance of {item}" in _plain(report_text(report, 100))


def test_the_data_columns_of_variables_write_names_with_commas_in_double_quotes(hs_data):
    # the tables' data (CSV) and conf_int keep the variables in one field: 'visual, x2' read back at its commas
    # would give three variables for a loading of an item named with a comma; written as the model language writes
    # names, the field reads back whole
    from cfa_tool.language.names import read_name_list
    from cfa_tool.reporting.tables import modification_table

    result = cfa_tool.fit(THREE_FACTORS.replace("x2", f'"{CUBES}"'), hs_data.rename(columns={"x2": CUBES}))
    fields = [row[1] for row in modification_table(result).values]
    ours = [f for f in fields if CUBES in f]
    assert ours and all(f'"{CUBES}"' in f for f in ours)
    intervals = result.conf_int()
    loading = intervals[(intervals.kind == "loading") & intervals.variables.str.contains("Cubes")].variables.tolist()
    assert loading == [f'visual, "{CUBES}"']
    assert [ends for _, ends in read_name_list(loading[0], "variables")] == [("visual",), (CUBES,)]
