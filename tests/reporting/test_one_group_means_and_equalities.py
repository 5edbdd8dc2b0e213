"""The methods paragraph of a one-group model with intercepts held equal across factors (a longitudinal model: each
item at two occasions side by side) says that the factor means were fixed at zero, and gathers the model file's
equalities one sentence per kind (newuser-s23, finding 7).

With the intercepts held equal over the occasions, fixing both occasions' factor means at zero asserts no change in
the mean, a restriction that changes chi-square (Little, Slegers & Card 2006; Brown 2015, ch. 7, recalled from
memory); at a5239e97 only a table note said the means were fixed, and the paragraph spent one sentence per equality
(44 for the trial's 24 items).  The restriction is checked against the fits themselves: freeing the second occasion's
mean gains one degree of freedom's worth of chi-square (hand count: one parameter)."""

from __future__ import annotations

import pytest

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph
from tests.model.test_free_mean_with_equal_intercepts import LONGITUDINAL, longitudinal_rows

EQUAL_INTERCEPTS = ("The intercepts were constrained to be equal within each of three pairs (x1_1 and x1_2; x2_1 "
                    "and x2_2; x3_1 and x3_2).")
EQUAL_LOADINGS = ("The loadings were constrained to be equal within each of two pairs (x2_1 on f1 and x2_2 on f2; "
                  "x3_1 on f1 and x3_2 on f2).")


@pytest.fixture(scope="module")
def shifted():
    """The rows (longitudinal_rows) with the second occasion's items moved by a further .2 of a unit: a change the model at zero
    means cannot follow."""
    out = longitudinal_rows()
    for k, lam in enumerate((1.0, 0.8, 0.7)):
        out[f"x{k + 1}_2"] += 0.2 * lam
    return out


def test_the_means_fixed_at_zero_beside_equal_intercepts_are_said_as_a_restriction(shifted):
    fixed = cfa_tool.fit(LONGITUDINAL, shifted, missing="full-information")
    free = cfa_tool.fit(LONGITUDINAL + "free mean(f2)\n", shifted, missing="full-information")
    assert fixed.fit.df - free.fit.df == 1  # one mean
    assert fixed.fit.chi_square > free.fit.chi_square + 10  # the restriction the sentence names is tested
    paragraph = methods_paragraph(fixed)
    assert ("The means of f1 and f2 were fixed at zero; as intercepts were held equal across these factors, fixing "
            "their means at zero is a restriction the fit tests (no difference between them), not only the origin of "
            "the intercepts.") in paragraph
    # the free mean: the first occasion's at zero is its origin only
    assert "The mean of f1 was fixed at zero and the mean of f2 was estimated." in methods_paragraph(free)


def test_equalities_are_one_sentence_per_kind(shifted):
    paragraph = methods_paragraph(cfa_tool.fit(LONGITUDINAL, shifted, missing="full-information"))
    assert EQUAL_INTERCEPTS in paragraph and EQUAL_LOADINGS in paragraph
    assert paragraph.count("constrained to be equal") == 2


def test_means_that_only_give_the_intercepts_their_origin_are_not_said(shifted):
    plain = "factor f1: x1_1, x2_1, x3_1\nfactor f2: x1_2, x2_2, x3_2\n"
    paragraph = methods_paragraph(cfa_tool.fit(plain, shifted, missing="full-information"))
    assert "fixed at zero" not in paragraph and "were estimated" not in paragraph
    # one equality of a kind keeps its own sentence
    one = methods_paragraph(cfa_tool.fit(plain + "equal intercept(x1_1), intercept(x1_2)\n", shifted,
                                         missing="full-information"))
    assert "The intercept of x1_1 and the intercept of x1_2 were constrained to be equal." in one
    assert "The means of f1 and f2 were fixed at zero; as intercepts were held equal across these factors" in one


def test_the_word_and_html_reports_say_it_too(shifted):
    import io

    import docx

    from cfa_tool.reporting.docx_report import report_docx
    from cfa_tool.reporting.fit_document import fit_report
    from cfa_tool.reporting.html_report import report_html

    report = fit_report(cfa_tool.fit(LONGITUDINAL, shifted, missing="full-information"))
    said = "fixing their means at zero is a restriction the fit tests"
    assert said in " ".join(report_html(report).split())
    word = docx.Document(io.BytesIO(report_docx(report)))
    assert any(said in p.text for p in word.paragraphs)
    assert any(EQUAL_INTERCEPTS in p.text for p in word.paragraphs)
