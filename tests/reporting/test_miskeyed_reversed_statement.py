"""A 'reversed' statement with a typing error (new-user trial s17: en2 declared in place of en3 gave omega .14 and
alpha -.92 in a paste-ready methods paragraph, the contradiction only among the notes).  The loadings that point
the other way from the declared keying are a problem of the solution, first in every view (terminal, HTML,
Markdown, Word, the JSON's problems), and the methods paragraph does not state the reliability of the miskeyed
scale as if it were fine.

Reference: the five-trait scale of tests/assessment/test_reliability_and_diagnostics.py, simulated with e3 and e5
reverse-keyed (negative population loadings), so which declaration is wrong is known by construction; the model
declares e4 in place of e3 (a typing error), so e4 is declared but loads with e1, e2, and e3 loads against them but
is not declared."""

from __future__ import annotations

import html
import io
import json

import docx
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.json_report import to_json
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.text_formats import report_markdown
from tests.assessment import test_reliability_and_diagnostics as keyed

KEYED_MODEL, REVERSED = keyed.KEYED_MODEL, keyed.REVERSED
keyed_scale = keyed.keyed_scale  # the fixture, shared

SAID = "point the other way from the keying the model declares"


@pytest.fixture(scope="module")
def miskeyed(keyed_scale):
    declared = [x for items in REVERSED.values() for x in items if x != "e3"] + ["e4"]  # e4 typed for e3
    return cfa_tool.fit(KEYED_MODEL + f"name \"Five traits\"\nreversed {', '.join(declared)} on 1 to 6\n", keyed_scale)


def _flat(text: str) -> str:
    return " ".join(text.replace("│", " ").split())


def test_the_contradiction_is_a_problem_naming_both_items(miskeyed):
    found = [p for p in miskeyed.problems if p.kind is ProblemKind.KEYING_AGAINST_LOADINGS]
    assert len(found) == 1 and found[0].parameters == ("loading(e, e3)", "loading(e, e4)")
    assert ("e4 is declared reversed but loads the way of the factor's other items; e3 loads against the factor's "
            "other items but is not declared reversed") in found[0].explanation
    assert not any(SAID in str(w) for w in miskeyed.warnings)  # said once, as the problem, not again as a note
    by_factor = {r.factor: r for r in miskeyed.groups[0].reliability}
    assert set(by_factor["e"].against_keying) == {"e3", "e4"} and not by_factor["d"].against_keying


def test_every_view_opens_with_it(miskeyed):
    report = fit_report(miskeyed)
    terminal = _flat(report_text(report, 3000))
    assert SAID in terminal and terminal.index(SAID) < terminal.index("Five traits")
    page = html.unescape(report_html(report))
    assert SAID in page and page.index(SAID) < page.index("Standardized loadings")
    markdown = _flat(report_markdown(report))
    assert SAID in markdown and markdown.index(SAID) < markdown.index("Five traits")
    paragraphs = [p.text for p in docx.Document(io.BytesIO(report_docx(report, 72))).paragraphs]
    word = _flat(" ".join(paragraphs))
    assert SAID in word and word.index(SAID) < word.index("A confirmatory factor analysis")
    problems = json.loads(to_json(miskeyed))["problems"]
    # beside the baseline's caution: its 25 items of five traits correlating .3 give a baseline RMSEA of .144, below
    # the rule of thumb of .158 (Kenny, Kaniskan & McCoach 2015, recalled from memory)
    assert [p["kind"] for p in problems if p["kind"] != ProblemKind.UNINFORMATIVE_BASELINE.value] == [
        ProblemKind.KEYING_AGAINST_LOADINGS.value]


def test_the_methods_paragraph_states_no_reliability_of_the_miskeyed_scale(miskeyed, keyed_scale):
    paragraph = _flat(methods_paragraph(miskeyed))
    assert ("The solution has a declared keying of reverse-scored items contradicted by the loadings of e3 and e4 on e: "
            "the keyed sum adds "
            "items that run against each other, so its reliability is not reported here.") in paragraph
    omega = paragraph[paragraph.index("omega (McDonald, 1999) was"):]
    assert " for e," not in omega and " for e " not in omega and "for d" in omega
    # the right declaration: no problem, and e's omega is stated beside the others (its value as the fit computes it)
    right = cfa_tool.fit(KEYED_MODEL + f"reversed {', '.join(x for items in REVERSED.values() for x in items)} on "
                                       f"1 to 6\n", keyed_scale)
    assert not any(p.kind is ProblemKind.KEYING_AGAINST_LOADINGS for p in right.problems)
    from cfa_tool.reporting.paragraph import _delta_brackets

    last = right.groups[0].reliability[-1]
    assert ("and " + f"{last.omega:.2f}"[1:] + _delta_brackets(last) + " for e"
            in _flat(methods_paragraph(right)))
