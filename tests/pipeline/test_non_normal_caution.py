"""Answers far from multivariate normal are a caution first in every view of a fit whose chi-square and standard
errors assume normal answers, with the remedy named (s25: real questionnaire answers with a multivariate kurtosis z of
131 got a note under the fit table only).  The rule (assessment.normality.departs_materially): Mardia's (1970)
normalized kurtosis beyond 5 in size (Bentler 2006, recalled from memory: a rule of thumb) and a relative
multivariate kurtosis at least .10 from 1 (a line of this tool).  Not when the fit has the robust test and standard
errors; not of ordinal items.  Compare and invariance say it as fit does.

The data are the bundled rider survey (invented, simulated with a fixed seed), its answers' deviations from the item
means multiplied row by row by sqrt(3 / chi-square(3)) (seeded): a multivariate t with 3 df, heavy-tailed."""

from __future__ import annotations

import io
import json

import docx
import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.assessment.normality import Normality, departs_materially
from cfa_tool.options import on_command_line

ITEMS = ["on_time", "short_wait", "accurate_info", "easy_transfer", "seat_available", "clean", "temperature",
         "room_to_stand", "greeting", "helpful", "respectful", "clear_answers"]
WORDS = "The answers depart from multivariate normality"


@pytest.fixture(scope="module")
def heavy(rider_demo) -> pd.DataFrame:
    rng = np.random.default_rng(2025)
    x = rider_demo[ITEMS]
    scale = np.sqrt(3.0 / rng.chisquare(3, len(x)))
    return rider_demo.assign(**((x - x.mean()).mul(scale, axis=0) + x.mean()).round(3))


def _tails(result) -> list:
    return [p for p in result.problems if p.kind is ProblemKind.NON_NORMAL_ANSWERS]


def _word_text(data: bytes) -> str:
    document = docx.Document(io.BytesIO(data))
    return " ".join([p.text for p in document.paragraphs]
                    + [cell.text for table in document.tables for row in table.rows for cell in row.cells])


def test_the_rule_reads_the_normalized_and_the_relative_kurtosis():
    def judged(z: float, ratio: float) -> bool:
        return departs_materially(Normality(None, None, None, None, 48.0 * ratio, 48.0, z, 0.0))

    # both bounds must be passed: z beyond 5 (Bentler 2006, recalled from memory; a rule of thumb) and a ratio at
    # least a tenth from 1 (a line of this tool); lighter tails than normal count as heavier ones do
    assert judged(6.0, 1.2) and judged(-6.0, 0.85)
    assert not judged(4.9, 1.5)  # not beyond chance by the rule of thumb
    assert not judged(40.0, 1.05)  # many rows: z far beyond 5, the departure trivial


def test_heavy_tails_are_a_caution_first_in_every_view(heavy, rider_model):
    from cfa_tool.reporting.docx_report import report_docx
    from cfa_tool.reporting.fit_document import fit_report
    from cfa_tool.reporting.html_report import report_html
    from cfa_tool.reporting.json_report import to_json
    from cfa_tool.reporting.paragraph import methods_paragraph
    from cfa_tool.reporting.terminal import report_text

    with on_command_line():
        result = cfa_tool.fit(rider_model, heavy)
    [found] = _tails(result)
    n = result.groups[0].normality
    assert found.value == pytest.approx(n.kurtosis / n.kurtosis_expected) and found.value > 2
    report = fit_report(result)
    terminal = " ".join(report_text(report, 3000).split())
    assert terminal.index(WORDS) < terminal.index("Model fit")  # first: in the box above the results
    assert "What to try: fit with the scaled test and robust standard errors (--robust)" in terminal
    assert WORDS in report_html(report) and "--robust" in report_html(report)
    word = " ".join(_word_text(report_docx(report, 72)).split())
    assert WORDS in word and "scaled test and robust standard errors, which do not assume normal answers" in word
    assert "--robust" not in word and "test=" not in word  # a manuscript names no option
    kinds = [p["kind"] for p in json.loads(to_json(result))["problems"]]
    assert ProblemKind.NON_NORMAL_ANSWERS.value in kinds
    paragraph = methods_paragraph(result)
    assert "The answers departed from multivariate normality" in paragraph and "--" not in paragraph
    assert paragraph.index("departed from multivariate normality") < paragraph.index("The model fit was")


def test_the_relative_kurtosis_is_mardias_of_complete_rows(heavy, rider_model):
    # of complete rows the caution's ratio is Mardia's b2,p over p(p + 2), written here with numpy from Mardia (1970):
    # b2 = (1/N) sum_i (z_i' S^-1 z_i)^2, S with divisor N
    complete = heavy.dropna(subset=ITEMS)
    [found] = _tails(cfa_tool.fit(rider_model, complete))
    z = complete[ITEMS].to_numpy(float) - complete[ITEMS].to_numpy(float).mean(axis=0)
    d = np.einsum("ij,jk,ik->i", z, np.linalg.inv(z.T @ z / len(z)), z)
    p = len(ITEMS)
    assert found.value == pytest.approx(np.mean(d**2) / (p * (p + 2)), rel=1e-10)


def test_no_caution_with_the_robust_test_or_of_ordinal_items_or_near_normal_answers(heavy, rider_demo, rider_model):
    assert not _tails(cfa_tool.fit(rider_model, heavy, test="robust"))  # the remedy taken already
    # the demo's answers: kurtosis z = -2.3 of every row (and -2.2 of its complete rows), within the rule of thumb
    assert not _tails(cfa_tool.fit(rider_model, rider_demo))
    # the heavy-tailed answers cut into five ordered categories at -1.5, -.5, .5 and 1.5 standard deviations: their
    # least squares assume no normal answers, while the same codes read as numbers get the caution
    def five(column: pd.Series) -> pd.Series:
        z = (column - column.mean()) / column.std()
        return pd.cut(z, [-np.inf, -1.5, -0.5, 0.5, 1.5, np.inf], labels=False) + 1.0

    cut = heavy.assign(**{c: five(heavy[c]) for c in ITEMS})
    assert _tails(cfa_tool.fit(rider_model, cut))
    assert not _tails(cfa_tool.fit(rider_model, cut, ordinal="all"))


def test_compare_and_invariance_say_it_as_fit_does(heavy, rider_model):
    from cfa_tool.reporting.paragraph import comparison_paragraph
    from cfa_tool.workflows.compare import compare
    from cfa_tool.workflows.invariance import invariance

    one = "factor experience: " + ", ".join(ITEMS)
    comparison = compare([one, rider_model], heavy)
    assert [p.kind for p in comparison.problems].count(ProblemKind.NON_NORMAL_ANSWERS) == 1  # once, of the data
    assert WORDS in " ".join(comparison.summary().split())
    assert "The answers departed from multivariate normality" in comparison_paragraph(comparison)
    robust = compare([one, rider_model], heavy, test="robust")
    assert not any(p.kind is ProblemKind.NON_NORMAL_ANSWERS for p in robust.problems)
    ladder = invariance(rider_model, heavy, group="district")
    tails = [p for p in ladder.data_problems if p.kind is ProblemKind.NON_NORMAL_ANSWERS]
    assert sorted(p.group for p in tails) == ["north", "south"]  # each group's answers
    text = " ".join(ladder.summary().split())
    assert "Group north: " + WORDS in text and "Group south: " + WORDS in text


def test_with_missing_data_helpers_the_advice_is_a_fit_without_them(heavy, rider_model):
    # the robust test and standard errors are refused with missing-data helpers: the caution says so and names the
    # fit that has them (an invented age column, seeded)
    aged = heavy.assign(age=np.random.default_rng(15).integers(18, 80, len(heavy)))
    with on_command_line():
        [found] = _tails(cfa_tool.fit(rider_model, aged, missing_helpers=["age"]))
    advice = " ".join(str(found.advice).split())
    assert "not offered with missing-data helpers: fit the model again without the helpers" in advice
    assert "--robust" in advice
