"""No parenthesis inside another in the prose of a report (session note s19, left by diagram-s19).

tests/reporting/test_data_descriptions_not_nested.py keeps descriptions of the data out of nested parentheses; these
were the other notes that still nested them: the terminal's continued titles ('(Items: descriptive statistics
(analysed rows), continued)'), the note of full-information ML, the default ('(the default when answers are missing;
a fit of the complete rows only (--incomplete-rows listwise) would leave those rows out)'), the small-sample caution
('(3.3 per parameter; a common rule of thumb (Bentler & Chou 1987) asks ...)'), compare's boundary notes ('(see the
note under the table "Rider experience, one factor (restricted) against ...")'), explore's recommendation ('(parallel
analysis of components (Horn 1965): 3; ...)') and the ordinal test's name ('Scaled chi-square (scale-shifted, mean
and variance adjusted (Asparouhov & Muthén 2010))').  The demo and a few cases (groups, ordinal items, full-information
ML, a small sample, compare, explore) are run on the command line and their terminal report (at 60 columns, where
tables go on in parts), Markdown, HTML and Word file are read as one text each: no parenthesis of prose opens inside
another.  Notation is not prose: a parenthesis that follows a letter, digit or sign directly (χ²(77), loading(f, x))
is a formula's or the model language's, and the draft model file explore writes (model syntax) is not read.
"""

from __future__ import annotations

import re

import pytest

from tests.conftest import run_cli

ITEMS = ("on_time,short_wait,accurate_info,easy_transfer,seat_available,clean,temperature,room_to_stand,greeting,"
         "helpful,respectful,clear_answers")


def nested(text: str) -> list[str]:
    """Each parenthesis of prose that opens inside another of prose, with the words before it."""
    found, opened = [], []  # opened: (is notation) of each parenthesis still open
    for k, ch in enumerate(text):
        if ch == "(":
            notation = k > 0 and (text[k - 1].isalnum() or text[k - 1] in "²_")
            if not notation and not all(opened):
                found.append(text[max(0, k - 120):k + 40])
            opened.append(notation)
        elif ch == ")" and opened:
            opened.pop()
    return found


def test_the_measure_finds_prose_in_parentheses_in_parentheses_and_leaves_notation_alone():
    assert nested("the default (a fit of the complete rows only (--incomplete-rows listwise) would)") != []
    assert nested("Scaled chi-square (scale-shifted (Asparouhov & Muthén 2010))") != []
    assert nested("fit (\u03c7\u00b2(44) = 46.30, p = .378), loading(f, x) (the first)") == []
    assert nested("Little's (1988) test was not significant (\u03c7\u00b2(77) = 67.28, p = .778)") == []


def _flat(text: str) -> str:
    """A report's words as one line: box borders, Markdown's escapes and line breaks taken out."""
    return " ".join(re.sub(r"[\u2500-\u257f]", " ", text).replace("\\", "").split())


def _word_text(path) -> str:
    from docx import Document

    document = Document(str(path))
    cells = [cell.text for table in document.tables for row in table.rows for cell in row.cells]
    return "\n".join([p.text for p in document.paragraphs] + cells)


@pytest.fixture(scope="module")
def files(tmp_path_factory, rider_demo):
    import numpy as np

    folder = tmp_path_factory.mktemp("parentheses")
    gaps = rider_demo.copy()
    rng = np.random.default_rng(3)
    for column in ITEMS.split(","):
        gaps.loc[rng.random(len(gaps)) < 0.05, column] = np.nan
    gaps.to_csv(folder / "gaps.csv", index=False)
    rider_demo.head(90).to_csv(folder / "small.csv", index=False)
    return folder


CASES = {
    "demo": ["demo"],
    "groups": ["fit", "{three}", "--data", "{data}", "--group-column", "district"],
    "ordinal": ["fit", "{three}", "--data", "{data}", "--ordinal", ITEMS],
    "full-information ML": ["fit", "{three}", "--data", "{gaps}"],
    "small sample": ["fit", "{three}", "--data", "{small}"],
    "compare": ["compare", "{three}", "{one}", "{higher}", "--data", "{data}"],
    "explore": ["explore", "--data", "{data}", "--items", ITEMS],
}


@pytest.mark.parametrize("case", list(CASES))
def test_no_parenthesis_of_prose_inside_another(files, capsys, monkeypatch, case):
    from cfa_tool.resources import resource_dir

    monkeypatch.setenv("COLUMNS", "60")
    models = resource_dir("models")
    given = {"three": models / "rider_three_factors.cfa", "one": models / "rider_one_factor.cfa",
             "higher": models / "rider_higher_order.cfa", "data": resource_dir("demo") / "rider_survey.csv",
             "gaps": files / "gaps.csv", "small": files / "small.csv"}
    stem = files / case.replace(" ", "_")
    argv = [part.format(**{k: str(v) for k, v in given.items()}) for part in CASES[case]]
    code, out, err = run_cli(argv + ["--markdown", f"{stem}.md", "--html", f"{stem}.html", "--docx", f"{stem}.docx"],
                             capsys)
    assert code == 0, err
    page = stem.with_suffix(".html").read_text(encoding="utf-8")
    page = re.sub(r"<pre[^>]*>.*?</pre>", " ", page, flags=re.S)  # (a model file's text, shown as it is)
    import html

    texts = {"terminal": _flat(out), "Markdown": _flat(re.sub(r"```.*?```", " ", stem.with_suffix(".md").read_text(
                 encoding="utf-8"), flags=re.S)),
             "HTML": _flat(html.unescape(re.sub(r"<[^>]+>", " ", page))), "Word": _flat(_word_text(stem.with_suffix(".docx")))}
    assert {view: found for view, text in texts.items() if (found := nested(text))} == {}
