"""The printed views (Word, HTML) set the minus of a formula as the true minus (U+2212), as they set the minus before
a number (reporting.numbers.printed, the one typographic rule of those views; s23's closing note: the Word caution on
a weakly correlated baseline wrote 'TLI is 1 - (RMSEA / baseline RMSEA)²' with a hyphen).  The terminal and the data
files keep the hyphen-minus.  A hyphen between words (a name such as 'wave - two') is no minus."""

from __future__ import annotations

import html
import io

import docx

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.numbers import printed
from cfa_tool.reporting.terminal import report_text
from tests.assessment.test_uninformative_baseline import FIVE, _five_traits

MINUS = "\u2212"


def test_the_minus_of_a_formula_is_printed_as_the_minus_sign():
    # formulas the reports write: Tucker & Lewis (1973) in RMSEA terms, Kish's (1965) design effect, an echelon
    # pattern's 'first k - 1 items'
    assert printed("TLI is 1 - (RMSEA / baseline RMSEA)\u00b2") == f"TLI is 1 {MINUS} (RMSEA / baseline RMSEA)\u00b2"
    assert printed("1 + (m - 1) ICC") == f"1 + (m {MINUS} 1) ICC"
    assert printed("the first k - 1 items") == f"the first k {MINUS} 1 items"
    assert printed("a - b - c") == f"a {MINUS} b {MINUS} c"
    # a hyphen between words, or after a word, is no operator: names keep it
    assert printed("wave - two") == "wave - two" and printed("grade - 1st") == "grade - 1st"


def test_the_word_and_html_cautions_print_the_tli_formula_with_the_minus_sign():
    result = cfa_tool.fit(FIVE, _five_traits())
    assert any(p.kind is ProblemKind.UNINFORMATIVE_BASELINE for p in result.problems)
    report = fit_report(result)
    word = " ".join(p.text for p in docx.Document(io.BytesIO(report_docx(report, 72))).paragraphs)
    page = html.unescape(report_html(report))
    for text in (word, page):
        flat = " ".join(text.split())
        assert f"TLI is 1 {MINUS} (RMSEA / baseline RMSEA)" in flat
        assert "1 - (RMSEA" not in flat
    # the terminal keeps the hyphen-minus, as it keeps it before numbers
    assert "1 - (RMSEA / baseline RMSEA)" in " ".join(report_text(report, 3000).split())
