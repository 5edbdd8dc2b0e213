"""The scores' report has a methods paragraph (new user s17, S2): a researcher scoring people reports how the scores
were computed: the fit (its own paragraph), each method with its authors (Thurstone 1935 for regression scores,
Bartlett 1937, ten Berge et al. 1999, Bock & Aitkin 1981), how rows with missing answers were scored, the rows left
without a score, and the determinacy (Grice 2001) and reliability (Beauducel 2011) of the scores.  Built from the
result's typed fields by the methods paragraph builder (reporting.paragraph), in every view, naming no option.
Also (A2) the precision table's sentence on prorated rows reads "Each row's own SEM is ...", no longer "each row's
is not written".

Data: the bundled rider survey (invented, simulated with a fixed seed) with 25 answers removed from each item (fixed
seed 16, as tests/reporting/test_word_names_no_option.py does)."""

from __future__ import annotations

import io
import re

import docx
import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.reports import report_of
from cfa_tool.resources import resource_dir

ITEMS = ("on_time,short_wait,accurate_info,easy_transfer,seat_available,clean,temperature,room_to_stand,greeting,"
         "helpful,respectful,clear_answers").split(",")


@pytest.fixture(scope="module")
def scored(tmp_path_factory):
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    rng = np.random.default_rng(16)
    for item in ITEMS:
        data.loc[rng.choice(len(data), 25, replace=False), item] = np.nan
    path = tmp_path_factory.mktemp("scores") / "gaps.csv"
    data.to_csv(path, index=False)
    return cfa_tool.scores(resource_dir("models") / "rider_three_factors.cfa", path,
                           methods=["regression", "bartlett", "item-sum"], least_answered=0.9)


def test_the_scores_report_says_how_the_scores_were_computed(scored):
    paragraph = " ".join(report_of(scored).paragraph.split())
    assert paragraph.startswith(" ".join(methods_paragraph(scored.fit).split()))  # the fit, as fit says it
    assert ("as regression scores (the posterior mean of the factors given the answers; Thurstone, 1935), Bartlett "
            "scores (weighted least squares with the residual variances as weights; Bartlett, 1937), and keyed item "
            "sums") in paragraph
    gaps = re.search(r"The (\d+|[a-z]+) rows with missing answers were scored from the items they answered", paragraph)
    assert gaps is not None
    assert "Item sums were computed for rows that answered at least 90% of a factor's items" in paragraph
    q = scored.quality[0]
    values = ", ".join(f"{v:.2f}".lstrip("0") + f" for {f}" for f, v in zip(q.factors, q.determinacy))
    assert "(the correlation of the regression scores with their factor; Grice, 2001) was" in paragraph
    assert values.rsplit(", ", 1)[0] in paragraph  # the quality table's determinacy, said in the paragraph
    assert "The reliability of the Bartlett scores (their squared correlation with the factor; Beauducel, 2011)" in paragraph
    assert not re.search(r"--[a-z]|least_answered", paragraph)  # a manuscript's text names no option


def test_the_word_file_of_scores_has_the_paragraph_and_reads_plainly(scored):
    document = docx.Document(io.BytesIO(report_docx(report_of(scored))))
    texts = [p.text for p in document.paragraphs]
    at = texts.index("Summary for a paper")
    assert "Thurstone, 1935" in texts[at + 1]
    word = " ".join(" ".join(texts + [c.text for t in document.tables for r in t.rows for c in r.cells]).split())
    assert "each row's is" not in word
    assert "Each row's own SEM is not written in this run's scores file." in word
