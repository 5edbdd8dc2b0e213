"""A restricted model that fixes a parameter of the general one on the boundary of its space (factors merged: their
correlation at 1; a factor left out or a variance fixed at 0) is found from the two models' structures and said beside
the test, with the p-value to read: with one parameter on the boundary and every parameter identified, the usual
chi-square when the general model's fit does not hold that parameter inside the boundary (unconstrained estimation:
Savalei & Kolenikov 2008, recalled from memory; checked by simulation in test_boundary_reading_simulated.py), and the
50:50 mixture of chi-square(df - 1) and chi-square(df) where a bound of the general model holds it there (Self & Liang
1987; Stram & Lee 1994; Stoel, Garre, Dolan & van den Wittenboer 2006), computed here by scipy; no exact reading
otherwise, said in the cautions."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy import stats

from cfa_tool.note_parts import WORDS, TableReference, said
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.numbers import missing, p_phrase
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.workflow_tables import comparison_report
from cfa_tool.workflows.compare import compare
from cfa_tool.workflows.nesting import BoundaryReading
from tests.conftest import simulate_cfa
from tests.reporting.test_advice_views import _word_text

TWO = "factor a: y1, y2, y3\nfactor b: y4, y5, y6\n"
ONE = "factor g: y1, y2, y3, y4, y5, y6\n"
# the two factors scaled by their variances, their covariance (their correlation) held at or below 1 by a bound
HELD = TWO + "scale latent by variance\nbound covariance(a, b) <= 1\n"


def _rows(correlation: float, seed: int = 20261203, n: int = 400) -> pd.DataFrame:
    # two factors correlating as given, loadings .7, residual variances .51 (invented population values)
    L = np.zeros((6, 2))
    L[:3, 0] = L[3:, 1] = 0.7
    return simulate_cfa(L, np.array([[1.0, correlation], [correlation, 1.0]]), np.diag(np.full(6, 0.51)), n, seed)


@pytest.fixture(scope="module")
def data() -> pd.DataFrame:
    return _rows(0.95)


def _merged(comparison, reading: BoundaryReading) -> list:
    """The computed tests of a comparison of one factor against two (a and b merged into g), each checked to say the
    merge and ``reading``, and to have one df."""
    assert comparison.tests
    for t in comparison.tests:
        assert t.boundary == ("factors a and b merged into g (their correlation fixed at 1)",)
        assert t.boundary_reading is reading
    computed = [t for t in comparison.tests if not t.not_computed]
    assert computed and all(t.df_difference == 1 for t in computed)
    return computed


def test_two_factors_merged_into_one_are_read_by_the_usual_chi_square(data):
    # the two-factor fit holds nothing at or below a correlation of 1, so the difference follows the usual
    # chi-square (Savalei & Kolenikov 2008): the printed p-value is the reading, unmarked, no mixture given
    from cfa_tool.reporting.workflow_tables import BOUNDARY_CAUTION, BOUNDARY_UNHELD

    comparison = compare([ONE, TWO], data, test="satorra-bentler")
    for t in _merged(comparison, BoundaryReading.CHI_SQUARE):
        assert np.isnan(t.boundary_p_value) and t.read_p_value == t.p_value
    plain = next(t for t in comparison.tests if not t.not_computed and t.method.value == "likelihood ratio")
    assert plain.p_value == pytest.approx(stats.chi2.sf(plain.chi_square_difference, 1), rel=1e-8)
    report = comparison_report(comparison)
    table = next(t for t in report.tables if t.key.startswith("difference_tests"))
    assert not any(row[2].endswith("*") for row in table.rows)
    note = said(table.note)
    assert BOUNDARY_UNHELD in note and "Savalei & Kolenikov 2008" in note and "50:50 mixture" in note
    assert note.endswith("Read the p-values as printed.")
    # no caution of the boundary first: the p-values printed are the reading
    assert not any("merged into g" in str(line) or BOUNDARY_CAUTION in str(line)
                   for line in (report.notice.lines if report.notice else ()))
    out = plain.to_dict()
    assert out["boundary"] == list(plain.boundary) and out["boundary_p_value"] is None
    assert out["boundary_reading"] == "usual chi-square"
    assert table.value_columns[-2:] == ("p, 50:50 mixture", "Reading on the boundary")
    assert all(row[-1] == "usual chi-square" and row[-2] is None for row in table.values)


def test_two_factors_merged_get_the_mixture_where_a_bound_holds_their_correlation(data):
    # variance scaling and 'bound covariance(a, b) <= 1' hold the correlation inside the boundary: the 50:50 mixture
    comparison = compare([ONE, HELD], data, test="satorra-bentler")
    for t in _merged(comparison, BoundaryReading.MIXTURE):
        # Self & Liang (1987): .5 chi2(0) + .5 chi2(1), i.e. half the chi-square(1) tail
        assert t.boundary_p_value == pytest.approx(0.5 * stats.chi2.sf(t.chi_square_difference, 1), rel=1e-10)
        assert t.boundary_p_value == pytest.approx(t.p_value / 2, rel=1e-10) and t.read_p_value == t.boundary_p_value
    report = comparison_report(comparison)
    table = next(t for t in report.tables if t.key.startswith("difference_tests"))
    assert all(row[2].endswith("*") for row in table.rows if row[2])
    first = comparison.tests[0]
    assert "50:50 mixture" in table.note and "Self & Liang 1987" in table.note
    assert "held inside it by a bound of the general model (any other there unbounded" in said(table.note)
    assert f"p {p_phrase(first.boundary_p_value)} for the likelihood ratio" in table.note
    several = "p-values, not the printed ones" if len(comparison.tests) > 1 else "p-value, not the printed one"
    assert any("merged into g" in said(line) and "Stoel" in said(line) and f"50:50 mixture's {several}" in said(line)
               for line in report.notice.lines)
    out = first.to_dict()
    assert out["boundary"] == list(first.boundary) and out["boundary_p_value"] == pytest.approx(first.boundary_p_value)
    assert out["boundary_reading"] == "50:50 mixture"
    assert ("with one parameter on the boundary held inside it by a bound of Model 2 (any other there unbounded), its "
            "p-value from the 50:50 "
            "mixture of chi-square distributions with 0 and 1 df is p") in " ".join(report.paragraph.split())


def test_a_residual_variance_fixed_at_zero_beside_an_interior_constraint(data):
    restricted = TWO + "fix variance(y3) = 0\nequal loading(b, y5), loading(b, y6)\n"
    (free,) = compare([restricted, TWO], data).tests
    assert free.df_difference == 2 and free.boundary == ("the residual variance of y3 fixed at 0",)
    assert free.boundary_reading is BoundaryReading.CHI_SQUARE and np.isnan(free.boundary_p_value)
    # held at or above 0 by the general model: one parameter on the boundary and one inside, .5 chi2(1) + .5 chi2(2)
    # (Self & Liang 1987)
    (t,) = compare([restricted, TWO + "bound variance(y3) >= 0\n"], data).tests
    assert t.boundary_reading is BoundaryReading.MIXTURE
    expected = 0.5 * stats.chi2.sf(t.chi_square_difference, 1) + 0.5 * stats.chi2.sf(t.chi_square_difference, 2)
    assert t.boundary_p_value == pytest.approx(expected, rel=1e-10)
    # a bound that lets the variance below 0 holds nothing at the boundary
    (below,) = compare([restricted, TWO + "bound variance(y3) >= -1\n"], data).tests
    assert below.boundary_reading is BoundaryReading.CHI_SQUARE


def test_a_correlation_fixed_at_one_by_the_model_file(data):
    scaled = "factor a: y1, y2, y3\nfactor b: y4, y5, y6\nscale latent by variance\n"
    (t,) = compare([scaled + "fix covariance(a, b) = 1\n", scaled], data).tests
    assert t.boundary == ("the correlation of a and b fixed at 1",)
    assert t.boundary_reading is BoundaryReading.CHI_SQUARE and np.isnan(t.boundary_p_value)
    (held,) = compare([scaled + "fix covariance(a, b) = 1\n", scaled + "bound covariance(a, b) <= 1\n"], data).tests
    assert held.boundary_reading is BoundaryReading.MIXTURE
    assert held.boundary_p_value == pytest.approx(0.5 * stats.chi2.sf(held.chi_square_difference, 1), rel=1e-10)
    # under marker scaling a covariance bounded at 1 is no correlation held at 1 (the variances are free)
    marker = compare([ONE, TWO + "bound covariance(a, b) <= 1\n"], data).tests
    assert all(x.boundary_reading is BoundaryReading.CHI_SQUARE for x in marker)


def test_a_factor_left_out_is_said_without_a_mixture(data):
    # a method factor on y2, y5 beside the traits (variance scaling), left out of the restricted model: its loadings
    # are not defined when its variance is 0, so no mixture applies (only the caution)
    general = TWO + "factor m: y2, y3, y5, y6\nmethod m\nuncorrelated m, a\nuncorrelated m, b\nscale m by variance\n"
    comparison = compare([TWO, general], data)
    (t,) = comparison.tests
    assert t.boundary == ("factor m left out (its variance fixed at 0)",)
    assert np.isnan(t.boundary_p_value) and t.boundary_reading is BoundaryReading.APPROXIMATE
    table = next(x for x in comparison_report(comparison).tables if x.key.startswith("difference_tests"))
    assert "no exact p-value" in table.note


def test_interior_constraints_are_not_on_the_boundary(data):
    comparison = compare([TWO + "equal loading(a, y2), loading(a, y3)\n", TWO], data)
    (t,) = comparison.tests
    assert t.boundary == () and np.isnan(t.boundary_p_value) and t.boundary_reading is None
    assert t.to_dict()["boundary_reading"] is None
    report = comparison_report(comparison)
    # no caution of a boundary; the factors' correlation near 1 (population .95) is said, as fit says it (s23)
    assert report.notice is not None and all("correlate" in str(line) and "nearly 1" in str(line)
                                             for line in report.notice.lines)
    table = next(x for x in report.tables if x.key.startswith("difference_tests"))
    assert table.note is None and not table.rows[0][2].endswith("*")


def test_ordinal_comparisons_say_it_too(data):
    cut = data.apply(lambda column: pd.cut(column, [-np.inf, -0.5, 0.5, np.inf], labels=False) + 1)
    comparison = compare([ONE, TWO], cut, ordinal="all")
    (t,) = comparison.tests
    assert t.boundary == ("factors a and b merged into g (their correlation fixed at 1)",)
    # least squares holds the correlation no more than maximum likelihood does: the adjusted difference as printed
    assert t.boundary_reading is BoundaryReading.CHI_SQUARE and np.isnan(t.boundary_p_value)
    report = comparison_report(comparison)
    deciding = next(n for n in report.notes if str(n).startswith("Deciding between nested models"))
    assert "rough" not in deciding


def test_fewer_factors_than_an_exploratory_block_is_said_without_a_mixture():
    # one factor against an exploratory block of two: the second factor's loadings at 0, where the likelihood-ratio
    # test of the number of factors is not chi-square distributed (Hayashi, Bentler & Yuan 2007)
    data = _rows(0.6, seed=7, n=500)
    comparison = compare([ONE, "exploratory factors f1, f2 from y1..y6\n"], data)
    (t,) = comparison.tests
    assert t.boundary == ("1 factor of the exploratory block of f1 and f2 left out (its loadings at 0)",)
    assert np.isnan(t.boundary_p_value) and t.boundary_reading is BoundaryReading.APPROXIMATE
    # the same number of factors, confirmatory against exploratory: nothing on the boundary
    (same,) = compare([TWO, "exploratory factors f1, f2 from y1..y6\n"], data).tests
    assert same.boundary == ()


def test_factors_merged_under_a_higher_order_factor_put_their_disturbances_on_the_boundary():
    # four first-order factors under two higher-order factors (two each) against the model with the last two merged:
    # the merged factors correlate 1 only when both disturbance variances are 0, two parameters on the boundary
    # (Stoel et al. 2006), so no 50:50 mixture (new-user trial 6, U5); no bound holds them, so the usual chi-square
    # (Savalei & Kolenikov 2008; lead s25, by simulation at N = 300, 400 samples of c and d correlating 1: the plain
    # chi-square(2) rejected 3.75% at .05, 8% at .10; it was read as 'approximate'); the four-factor model against
    # the merge keeps its one parameter (the correlation of two factors with no disturbances).  Population: invented.
    from tests.conftest import FOUR_FACTORS, four_factor_rows

    rows = four_factor_rows(0.8, 20261203)
    first = FOUR_FACTORS
    second = first + "factor e: a, b\nfactor f: c, d\n"
    merged = "factor a: y1, y2, y3\nfactor b: y4, y5, y6\nfactor cd: y7, y8, y9, y10, y11, y12\n"
    comparison = compare([merged, second, first], rows)
    against_second = [t for t in comparison.tests if t.general != comparison.names[2] and t.restricted ==
                      comparison.names[0]]
    assert against_second
    for t in against_second:
        assert t.boundary == ("factors c and d merged into cd (their correlation fixed at 1: in the general model, "
                              "the disturbance variances of c and d at 0)",)
        assert np.isnan(t.boundary_p_value) and t.boundary_reading is BoundaryReading.CHI_SQUARE
    # a bound holding one of the two disturbances at or above 0, the other free to pass 0: the space searched is a
    # half-space at the restricted model, so the 50:50 mixture (Self & Liang 1987, one parameter on the boundary
    # beside interior ones; the same geometry as three merged factors with one correlation bounded, checked by
    # simulation in test_boundary_reading_simulated.py; fixleft s26, before: 'no exact reading'); both held: none
    held = compare([merged, second + "bound variance(c) >= 0\n"], rows).tests
    assert held and all(t.boundary_reading is BoundaryReading.MIXTURE for t in held)
    both = compare([merged, second + "bound variance(c) >= 0\nbound variance(d) >= 0\n"], rows).tests
    assert both and all(t.boundary_reading is BoundaryReading.APPROXIMATE for t in both)
    against_first = [t for t in comparison.tests if t.general == comparison.names[2] and t.restricted ==
                     comparison.names[0] and not t.not_computed]
    assert against_first and all(t.boundary_reading is BoundaryReading.CHI_SQUARE for t in against_first)
    # the change-in-fit guides were set for invariance steps: for rival structures the changes are descriptions
    report = comparison_report(comparison)
    assert any("describe the difference only" in n for n in report.notes)
    assert "were set for tests of measurement invariance across groups, not for rival structures" in report.paragraph
    assert "were read against conventional guides" not in report.paragraph
    assert comparison.to_dict()["change_guides_apply"] is False


def test_the_note_under_the_table_counts_the_p_values_it_names(data):
    # new-user trial 7, U15: 'read those, not the p-values marked *' when the table's only p was the marked one
    single = compare([ONE, HELD], data)
    table = next(t for t in comparison_report(single).tables if t.key.startswith("difference_tests"))
    assert sum(bool(row[2]) for row in table.rows) == 1
    assert table.note.endswith(": read that, not the p-value marked *.")
    several = compare([ONE, HELD], data, test="satorra-bentler")
    table = next(t for t in comparison_report(several).tables if t.key.startswith("difference_tests"))
    shown = sum(bool(row[2]) for row in table.rows)
    marked = sum(not missing(t.boundary_p_value) for t in several.tests)
    assert table.note.endswith(f": read {'that' if marked == 1 else 'those'}, not the "
                               f"{'p-value' if shown == 1 else 'p-values'} marked *.")


def test_the_notes_on_the_data_come_first_as_in_fit(data, tmp_path):
    # new-user trial 7, U15: compare printed its notes on the data (answers outside a declared scale) after its tables
    gaps = data.copy()
    gaps.loc[[3, 8], "y1"] = np.nan
    comparison = compare([ONE, TWO], gaps)
    report = comparison_report(comparison)
    assert comparison.notes and any("miss some answers" in str(n) for n in comparison.notes)
    assert [str(w).rstrip(".") for w in report.warnings] == [str(n).rstrip(".") for n in comparison.notes]
    assert not any("miss some answers" in str(n) for n in report.notes)


@pytest.mark.parametrize("bounded_first", [False, True])
def test_models_that_differ_only_by_a_bound_are_said_to_be_so(bounded_first):
    # the same model with 'bound variance(x2) >= 1.5', above x2's residual variance (1.134 in the Holzinger &
    # Swineford 1939 three-factor model, ML; recalled from memory, the figure of widely published analyses): the bound
    # holds the estimate, so the bounded model is a restricted form of the other under an inequality restriction, with
    # the same degrees of freedom (hostile trial: 'neither is a restricted form of the other')
    from tests.conftest import THREE_FACTORS, holzinger_swineford

    data = holzinger_swineford()
    models = [THREE_FACTORS, THREE_FACTORS + "bound variance(x2) >= 1.5\n"]
    result = compare(models[::-1] if bounded_first else models, data)
    free = next(r for r in result.results if not r.problems or all(p.kind.value != "estimate on a bound"
                                                                        for p in r.problems))
    assert free.fit.chi_square == pytest.approx(85.306, abs=0.01)  # Holzinger-Swineford, recalled from memory
    assert max(r.fit.chi_square for r in result.results) > 85.306 + 1  # the bound raises the minimum
    (pair,) = result.not_nested
    text = " ".join(pair.reason.split())
    assert ("the two models differ only by a bound, which holds the residual variance of x2 at its bound" in text
            and "restricted form of the other under an inequality restriction" in text)
    assert "neither is a restricted form" not in text
    # a bound that holds nothing ('>= 0' is not reached): the same model, as before
    inactive = compare([THREE_FACTORS, THREE_FACTORS + "bound variance(x2) >= 0\n"], data)
    assert "probably equivalent models" in inactive.not_nested[0].reason


@pytest.mark.parametrize("bounded_first", [False, True])
def test_ordinal_models_that_differ_only_by_a_bound_are_said_to_be_so_as_continuous_ones(bounded_first):
    # ordinal compare said "neither is a restricted form of the other" for models that differ only by a bound that
    # holds an estimate; the continuous path's rule and words (nesting.same_degrees_of_freedom) now apply to both.
    # Population loadings all .7 (invented, _rows), so the marker-scaled loading of y2 is near 1 and a bound at
    # 0.7 holds it
    cut = _rows(0.5).apply(lambda column: pd.cut(column, [-np.inf, -0.5, 0.5, np.inf], labels=False) + 1)
    models = [TWO, TWO + "bound loading(a, y2) <= 0.7\n"]
    result = compare(models[::-1] if bounded_first else models, cut, ordinal="all")
    free = result.results[1 if bounded_first else 0]
    assert next(e for e in free.estimates if e.variables == ("a", "y2")).estimate > 0.7 + 0.1
    (pair,) = result.not_nested
    text = " ".join(pair.reason.split())
    which = "first" if bounded_first else "second"
    assert ("the two models differ only by a bound, which holds the loading of y2 on a" in text
            and f"at its bound in the {which} model: the {which} is a restricted form of the other under an "
                f"inequality restriction" in text)
    assert "neither is a restricted form" not in text
    # a bound that holds nothing: the same model, said as the continuous path says it
    inactive = compare([TWO, TWO + "bound loading(a, y2) <= 5\n"], cut, ordinal="all")
    assert "probably equivalent models" in inactive.not_nested[0].reason


def test_the_boundary_is_explained_once_under_several_tables(data):
    # new-user trial: five one-row difference-test tables each repeated the same five-line note on the boundary
    # (the general models hold the factors' correlation at 1 by a bound: the 50:50 mixture, or no exact reading)
    from cfa_tool.reporting.workflow_tables import BOUNDARY_CAUTION, BOUNDARY_UNHELD

    method = "factor m: y2, y3, y5, y6\nmethod m\nuncorrelated m, a\nuncorrelated m, b\nscale m by variance\n"
    comparison = compare([ONE, HELD, HELD + method], data)
    report = comparison_report(comparison)
    tables = [t for t in report.tables if t.key.startswith("difference_tests")]
    assert len(tables) == 3 and all(t.note for t in tables)
    assert [t.boundary_reading for t in comparison.tests] == [BoundaryReading.MIXTURE] + [BoundaryReading.APPROXIMATE] * 2
    # the usual chi-square's why is another, said once too, under the first table of its own reading
    unheld = [t for t in comparison_report(compare([ONE, TWO, TWO + method], data)).tables
              if t.key.startswith("difference_tests")]
    assert [BOUNDARY_UNHELD in said(t.note) for t in unheld] == [True, False, False]
    assert [BOUNDARY_CAUTION in said(t.note) for t in unheld] == [False, True, False]
    explained = [t for t in tables if BOUNDARY_CAUTION in said(t.note)]
    assert explained == tables[:1]  # the why, once, under the first table
    # the later notes refer to that table by its key, and each view names it as it names its tables: the Word file
    # by its number (compare's Word note said "the first table of difference tests" beside numbered tables)
    number = report.tables.index(tables[0]) + 1
    word = _word_text(report_docx(report, 72))
    terminal = " ".join(report_text(report, 3000).split())
    for table, found in zip(tables, [[t for t in comparison.tests if (t.restricted, t.general) == pair]
                                     for pair in dict.fromkeys((t.restricted, t.general) for t in comparison.tests)]):
        note = said(table.note)
        assert note.startswith(f"* On the boundary: {'; '.join(found[0].boundary)}")  # each names its own
        if table is not tables[0]:
            assert TableReference(tables[0].key) in table.note.parts
            assert said(table.note, WORDS).split("; see ")[0] in word
            assert "first table of difference tests" not in note
        for t in found:  # each table keeps its own mixture p-values
            if not missing(t.boundary_p_value):
                assert f"p {p_phrase(t.boundary_p_value)} for the {t.method}" in note
    assert word.count(f"; see the note under Table {number}.") == len(tables)  # and the first caution's
    assert terminal.count(f'; see the note under the table "{tables[0].title}".') == len(tables)
    assert sum(len(said(t.note)) for t in tables[1:]) < 2 * len(said(tables[0].note))


def test_the_cautions_of_several_models_are_headed_for_several_solutions(data):
    # new-user trial: compare's notice was headed "Check before interpreting this solution" for four models
    from cfa_tool.reporting.html_report import report_html
    from cfa_tool.reporting.tables import CAUTION
    from cfa_tool.reporting.text_formats import report_markdown
    from cfa_tool.reporting.workflow_tables import CHECK_SOLUTIONS

    report = comparison_report(compare([ONE, TWO], data))
    assert report.notice is not None and not report.notice.inadmissible
    assert report.notice.heading == CHECK_SOLUTIONS == "Check before interpreting these solutions"
    assert report_markdown(report).startswith(f"## {CHECK_SOLUTIONS}")
    assert CAUTION not in report_markdown(report) and CAUTION not in report_html(report)


def test_the_caution_box_explains_the_boundary_once(data):
    # views trial: the caution box at the top repeated the same long sentence on the boundary for every pair
    from cfa_tool.reporting.workflow_tables import BOUNDARY_CAUTION

    general = TWO + "factor m: y2, y3, y5, y6\nmethod m\nuncorrelated m, a\nuncorrelated m, b\nscale m by variance\n"
    report = comparison_report(compare([ONE, TWO, general], data))
    lines = [said(line) for line in report.notice.lines if "the restricted model has" in said(line)]
    assert len(lines) >= 2
    assert sum(BOUNDARY_CAUTION in line for line in lines) == 1 and BOUNDARY_CAUTION in lines[0]
    assert all("read the p-values of this comparison as approximate" in line for line in lines)


def test_a_disturbance_variance_at_zero_leaves_the_loadings_defined():
    """A first-order factor's variance under a higher-order factor is its disturbance variance: fixed at 0 it leaves
    the factor's loadings defined (the higher-order factor still gives it variance), so one parameter on the
    boundary with every parameter identified: the usual chi-square unbounded, the mixture under 'bound ... >= 0'
    (boundary s24 read it as unidentified: 'approximate')."""
    from tests.conftest import FOUR_FACTORS, four_factor_rows

    rows = four_factor_rows(0.8, 20261204)
    general = FOUR_FACTORS + "factor e: a, b\nfactor f: c, d\n"
    at_zero = general + "fix variance(c) = 0\nfix loading(c, y7) = 1\n"  # its marker kept, as the language asks
    (t,) = compare([at_zero, general], rows).tests
    assert t.boundary == ("the disturbance variance of c fixed at 0",)  # fit's word (hostile s25b: 'the variance')
    assert t.boundary_reading is BoundaryReading.CHI_SQUARE and np.isnan(t.boundary_p_value)
    (held,) = compare([at_zero, general + "bound variance(c) >= 0\n"], rows).tests
    assert held.boundary_reading is BoundaryReading.MIXTURE
    assert held.boundary_p_value == pytest.approx(0.5 * stats.chi2.sf(held.chi_square_difference, 1), rel=1e-10)
    # (a factor with no higher-order factor cannot have its variance fixed at 0: the model language refuses it)


def test_a_merge_in_two_groups_puts_a_parameter_on_the_boundary_in_each(data):
    """Two factors merged in a model of two groups fix their correlation at 1 in each group: two parameters on the
    boundary.  Unbounded: the usual chi-square (Savalei & Kolenikov 2008).  With the correlation bounded at 1: the
    50:50 mixture is for one parameter (Self & Liang 1987), so no exact reading (boundary s24 counted one parameter
    and read the mixture, judging the bound in the first group only)."""
    rows = data.assign(site=np.where(np.arange(len(data)) % 2 == 0, "north", "south"))
    (t,) = compare([ONE, TWO], rows, group="site").tests
    assert t.boundary_reading is BoundaryReading.CHI_SQUARE and t.df_difference == 2
    (held,) = compare([ONE, HELD], rows, group="site").tests
    assert held.boundary_reading is BoundaryReading.APPROXIMATE and np.isnan(held.boundary_p_value)


def test_three_factors_merged_with_one_correlation_bounded_read_the_mixture():
    """Three factors merged into one (three correlations at 1), the general model bounding one of them at 1: the
    other two are free to pass 1, so the space the estimation searches is a half-space at the restricted model and
    the difference follows the 50:50 mixture of chi-square(2) and chi-square(3) (Self & Liang 1987, one parameter on
    the boundary beside interior ones; checked by simulation in test_boundary_reading_simulated.py); fixleft s26:
    the report called it 'approximate' while the docs named the mixture.  With two bounded: no exact reading, and
    the note says the p-value printed is the usual chi-square's with 3 df."""
    L = np.zeros((9, 3))
    L[:3, 0] = L[3:6, 1] = L[6:, 2] = 0.7
    rows = simulate_cfa(L, np.ones((3, 3)), np.diag(np.full(9, 0.51)), 300, 20261226)
    three = ("factor a: y1, y2, y3\nfactor b: y4, y5, y6\nfactor c: y7, y8, y9\nscale latent by variance\n"
             "bound covariance(a, b) <= 1\n")
    one = "factor g: y1..y9\n"
    (t,) = compare([one, three], rows).tests
    assert t.boundary == ("factors a, b, and c merged into g (their correlations fixed at 1)",)
    assert t.boundary_reading is BoundaryReading.MIXTURE and t.df_difference == 3
    # the 50:50 mixture of chi-square(2) and chi-square(3), by scipy
    expected = 0.5 * stats.chi2.sf(t.chi_square_difference, 2) + 0.5 * stats.chi2.sf(t.chi_square_difference, 3)
    assert t.boundary_p_value == pytest.approx(expected, rel=1e-9)
    note = next(x for x in comparison_report(compare([one, three], rows)).tables
                if x.key.startswith("difference_tests")).note
    assert "mixture of chi-square distributions with 2 and 3 df" in said(note)
    (both,) = compare([one, three + "bound covariance(a, c) <= 1\n"], rows).tests
    assert both.boundary_reading is BoundaryReading.APPROXIMATE and np.isnan(both.boundary_p_value)
    note = next(x for x in comparison_report(compare([one, three + "bound covariance(a, c) <= 1\n"], rows)).tables
                if x.key.startswith("difference_tests")).note
    assert ("read the p-value marked * (the usual chi-square's with 3 df, not corrected for the boundary) as rough"
            in said(note))
