"""An invariance ladder whose model declares a keying of reverse-scored items that the loadings contradict (a
'reversed' statement naming q3 where the reverse-worded item is q4: the typing error of new-user trial s17).  fit
says it first as a problem of the solution (assessment.reliability.keying_problems); the ladder's steps computed no
reliability, so the ladder said nothing.  A methods reviewer reads the ladder's configural model as the model fitted
in each group: its problems are the ones fit gives for the same model and groups, by the same rule, first in every
view of the ladder.

Data: simulated with a fixed seed (a fictional rider survey, two bus lines of 300 riders, five answers of 1 to 5),
q4 worded against the trait (negative population loading), so which declaration is wrong is known by
construction."""

from __future__ import annotations

import html
import io
import json

import docx
import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.json_report import to_json
from cfa_tool.reporting.reports import report_of
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.text_formats import report_markdown

MODEL = "factor comfort: q1, q2, q3, q4, q5\nreversed q3 on 1 to 5\n"  # q3 typed for q4
SAID = "point the other way from the keying the model declares"


@pytest.fixture(scope="module")
def survey() -> pd.DataFrame:
    rng = np.random.default_rng(3)
    frames = []
    for line in ("north", "south"):
        factor = rng.normal(size=300)
        values = 3 + factor[:, None] * np.array([0.8, 0.7, 0.7, -0.7, 0.6]) + 0.7 * rng.normal(size=(300, 5))
        frame = pd.DataFrame(np.clip(np.round(values), 1, 5), columns=[f"q{k}" for k in range(1, 6)])
        frame["line"] = line
        frames.append(frame)
    return pd.concat(frames, ignore_index=True)


@pytest.fixture(scope="module")
def ladder(survey):
    return cfa_tool.invariance(MODEL, survey, group="line")


def _keying(result) -> list[tuple]:
    return [(p.kind, p.parameters, str(p.explanation), p.group) for p in result.problems
            if p.kind is ProblemKind.KEYING_AGAINST_LOADINGS]


def test_the_configural_model_has_the_keying_problem_fit_gives(ladder, survey):
    fitted = cfa_tool.fit(MODEL, survey, group="line")  # the same model in the same groups, by fit
    found = _keying(ladder.steps[0].result)
    assert len(found) == 2 and {group for *_, group in found} == {"north", "south"}  # one per group, as fit says it
    assert found == _keying(fitted)
    assert all(parameters == ("loading(comfort, q3)", "loading(comfort, q4)") for _, parameters, *_ in found)


def _word(report) -> str:
    document = docx.Document(io.BytesIO(report_docx(report)))
    return " ".join(" ".join(p.text for p in document.paragraphs).split())


def test_every_view_of_the_ladder_opens_with_it(ladder):
    report = report_of(ladder)
    views = {"text": report_text(report, width=3000), "html": html.unescape(report_html(report)), "markdown": report_markdown(report),
             "word": _word(report)}
    for view, text in views.items():
        flat = " ".join(text.replace("\u2502", " ").split())
        before = flat.split("Fit of each level")[0]  # the notice, before every table
        assert f"The configural model: group north: The loadings of 'q3', 'q4' on factor 'comfort' {SAID}" in before, view
        assert "group south: The loadings of 'q3', 'q4'" in before, view
    assert "its 'reversed' statement" in views["text"]  # the program's user reads the statement to edit...
    assert "its 'reversed' statement" not in views["word"]  # ... a manuscript names no statement of the model file
    saved = json.loads(to_json(ladder, report))
    kinds = [p["kind"] for p in saved["steps"][0]["problems"]]
    assert kinds.count(ProblemKind.KEYING_AGAINST_LOADINGS.value) == 2


def test_a_comparison_names_it_first_for_each_model_as_fit_does(survey):
    # the neighbour: compare fitted its models without the diagnostics, so without their reliability either
    rows = survey[survey["line"] == "north"].drop(columns="line")
    general = MODEL + "covary q1, q2\n"
    comparison = cfa_tool.compare([MODEL, general], rows)
    for model, result in zip((MODEL, general), comparison.results):
        assert _keying(result) and _keying(result) == _keying(cfa_tool.fit(model, rows))
    report = report_of(comparison)
    flat = " ".join(report_text(report, width=3000).replace("\u2502", " ").split()).split("Fit of each model")[0]
    for name in comparison.names:
        assert f"{name}: The loadings of 'q3', 'q4' on factor 'comfort' {SAID}" in flat
