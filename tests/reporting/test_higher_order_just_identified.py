"""A second-order factor over exactly three first-order factors is just-identified at the higher level: 3 loadings on
it (one fixed for its scale), its variance and 3 disturbances for the 3 variances and 3 covariances of the first-order
factors, so its fit is that of the three factors correlated freely and does not test the higher-order structure
(Rindskopf & Rose 1988; Brown 2015, ch. 8, recalled from memory).  The new-user trial of the nineteenth session read
"The model fit was chi2(132) = 170.47 ... CFI = .992" for such a model with no word of it, and compare, which found
the pair 'probably equivalent models', advised comparing them by AIC and BIC, which are equal for equivalent models
(equal likelihoods, equal numbers of parameters).  Now every view of the fit says the fit does not test the
higher-order factor, and compare says the data cannot choose between equivalent models (MacCallum, Wegener, Uchino &
Fabrigar 1993).  Data: Holzinger & Swineford (1939), the three-factor model of their nine tests."""

from __future__ import annotations

import io
import json

import docx
import pytest

import cfa_tool
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.paragraph import comparison_paragraph, methods_paragraph
from cfa_tool.reporting.workflow_tables import comparison_report
from tests.conftest import FOUR_FACTORS, THREE_FACTORS, four_factor_rows

SECOND = THREE_FACTORS + "factor ability: visual, textual, speed\n"
SAID = "does not test the higher-order structure"


@pytest.fixture(scope="module")
def fits(hs_data):
    return cfa_tool.fit(THREE_FACTORS, hs_data), cfa_tool.fit(SECOND, hs_data)


def test_the_second_order_fit_over_three_factors_is_the_correlated_factors_fit(fits):
    """The fact the caution rests on (Rindskopf & Rose 1988): the same chi-square and degrees of freedom."""
    three, second = fits
    assert second.fit.df == three.fit.df
    assert second.fit.chi_square == pytest.approx(three.fit.chi_square, rel=1e-6)
    assert second.description.just_identified_higher_order == ("ability",)
    assert three.description.just_identified_higher_order == ()


def test_every_view_of_the_fit_says_it_does_not_test_the_higher_order_factor(fits):
    second = fits[1]
    report = fit_report(second)
    caution = [w for w in report.warnings if "Higher-order factor ability over visual, textual, and speed" in str(w)]
    assert len(caution) == 1 and SAID in str(caution[0]) and "Rindskopf & Rose 1988" in str(caution[0])
    paragraph = methods_paragraph(second)
    assert ("the higher-order factor ability explaining visual, textual, and speed, is just-identified, so this fit "
            "equals that of those factors correlated freely and does not test the higher-order structure") in paragraph
    # right after the fit it qualifies
    assert paragraph.index("The model fit was") < paragraph.index(SAID)
    terminal = " ".join(second.summary().split())
    assert terminal.count(SAID) == 2  # the caution and the methods paragraph
    assert report_html(report).count(SAID) == 2
    word = docx.Document(io.BytesIO(report_docx(report)))
    assert sum(SAID in p.text for p in word.paragraphs) == 2
    described = json.loads(json.dumps(second.description.to_dict()))["higher_order_factors"]  # as compare's JSON has it
    assert described == [{"factor": "ability", "explains": ["visual", "textual", "speed"], "just_identified": True}]


def test_a_higher_order_part_with_degrees_of_freedom_is_not_said_untested(hs_data):
    # equal loadings on the second-order factor: one degree of freedom more than the correlated factors, a test
    equal = cfa_tool.fit(SECOND + "equal loading(ability, textual), loading(ability, speed)\n", hs_data)
    assert equal.description.just_identified_higher_order == ()
    assert SAID not in methods_paragraph(equal) and SAID not in " ".join(equal.summary().split())
    # four first-order factors: 4 loadings, a variance and 4 disturbances for 10 variances and covariances
    four = cfa_tool.fit(FOUR_FACTORS + "factor g: a, b, c, d\n", four_factor_rows(0.5, 3))
    assert four.description.just_identified_higher_order == ()
    assert SAID not in methods_paragraph(four)


def test_compare_says_the_data_cannot_choose_between_equivalent_models(hs_data):
    result = cfa_tool.compare([THREE_FACTORS, SECOND], hs_data)
    (pair,) = result.not_nested
    assert pair.equivalent and "probably equivalent models" in pair.reason
    first, second = result.results
    assert first.fit.aic == pytest.approx(second.fit.aic, rel=1e-9)  # why AIC cannot choose: equal likelihoods
    notes = " ".join(str(n) for n in comparison_report(result).notes)
    assert "Compare them by AIC and BIC" not in notes
    assert ("Equivalent models fit any data equally well (their AIC and BIC are equal too), so these data cannot "
            "choose between them") in notes
    paragraph = comparison_paragraph(result)
    assert "compared by AIC and BIC" not in paragraph and "the data cannot choose between them" in paragraph
    assert result.to_dict()["not_nested"][0]["equivalent"] is True


def test_compare_keeps_the_advice_for_models_that_are_not_equivalent(hs_data):
    moved = "factor visual: x1, x2\nfactor textual: x3, x4, x5, x6\nfactor speed: x7, x8, x9\n"  # same df, not nested
    result = cfa_tool.compare([THREE_FACTORS, moved], hs_data)
    (pair,) = result.not_nested
    assert not pair.equivalent
    assert "Compare them by AIC and BIC (lower is better)." in " ".join(str(n) for n in comparison_report(result).notes)


def test_the_commands_that_fit_the_model_as_it_stands_say_it_too(hs_data):
    """The caution rose in fit's report alone (fixnew-a-s19's notes): the invariance ladder's configural step, each fit
    of replicate and bootstrap's fit of the full sample fit the same just-identified higher-order part, and their
    reports said nothing of it.  One rule for all (reporting.tables.higher_order_cautions), under the report's lines."""
    from cfa_tool.reporting.workflow_tables import bootstrap_report, invariance_report, replication_report
    from cfa_tool.workflows.invariance import invariance
    from cfa_tool.workflows.replication import replicate

    ladder = invariance(SECOND, hs_data, group="school")
    assert [str(w) for w in invariance_report(ladder).warnings if SAID in str(w)] != []
    halves = hs_data.iloc[::2], hs_data.iloc[1::2]
    assert [str(w) for w in replication_report(replicate(SECOND, *halves)).warnings if SAID in str(w)] != []
    boot = cfa_tool.bootstrap(SECOND, hs_data, replications=20, seed=3, workers=1)
    assert [str(w) for w in bootstrap_report(boot).warnings if SAID in str(w)] != []
    # a model whose higher-order part has degrees of freedom: no such caution
    equal = SECOND + "equal loading(ability, textual), loading(ability, speed)\n"
    assert not [w for w in invariance_report(invariance(equal, hs_data, group="school")).warnings if SAID in str(w)]
