"""A baseline (independence) model whose chi-square is at most its degrees of freedom: TLI is not defined there
(assessment.fit_indices.tli_from, numbers-s21), and CFI is 0/0 when the model's chi-square is at most its df too
(Bentler 1990).  The caution that opens every view and the methods paragraph said only that CFI and TLI 'can take
almost any value, or none' and that they 'are read beside the RMSEA and SRMR' (s22): both now say which is not
defined, in one wording (fit_indices.baseline_fits_words).

The data: four items of one weak factor (loadings .25, unit residual variances), 150 rows, simulated with seed 3.  The
baseline chi-square is checked against the handbook formula N (sum log s_ii - log|S|), divisor-N covariances, on
p(p - 1)/2 = 6 df (Bollen 1989, ch. 7), computed here with numpy alone."""

from __future__ import annotations

import html
import io

import docx
import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.terminal import report_text

SAID = ("the baseline model's chi-square (5.84) is no larger than its degrees of freedom (6), so the TLI is not "
        "defined (its formula would divide by zero or less), nor is the CFI (its formula gives 0/0, the model's "
        "chi-square being no larger than its degrees of freedom either)")


def _weak_items() -> pd.DataFrame:
    rng = np.random.default_rng(3)
    factor = rng.normal(size=(150, 1))
    return pd.DataFrame(0.25 * factor + rng.normal(size=(150, 4)), columns=["x1", "x2", "x3", "x4"])


def test_every_view_says_tli_and_cfi_are_not_defined():
    data = _weak_items()
    S = np.cov(data.to_numpy(), rowvar=False, bias=True)
    baseline = len(data) * (np.log(np.diag(S)).sum() - np.linalg.slogdet(S)[1])  # Bollen (1989): independence model
    assert round(baseline, 2) == 5.84 and baseline <= 6  # the case: at most its df
    result = cfa_tool.fit("factor f: x1, x2, x3, x4\n", data)
    assert abs(result.fit.baseline_chi_square - baseline) < 1e-6 and result.fit.chi_square <= result.fit.df
    [caution] = [p for p in result.problems if "baseline" in p.explanation]
    assert SAID in caution.explanation
    assert "can take almost any value" not in caution.explanation
    report = fit_report(result)
    flat = {"terminal": report_text(report, 3000), "html": html.unescape(report_html(report)),
            "word": " ".join(p.text for p in docx.Document(io.BytesIO(report_docx(report, 72))).paragraphs)}
    for view, text in flat.items():
        assert SAID in " ".join(text.split()), view
    paragraph = " ".join(methods_paragraph(result).split())
    assert ("the baseline model's chi-square (5.84) was no larger than its degrees of freedom (6), so the TLI was not "
            "defined (its formula would divide by zero or less), nor was the CFI (its formula gives 0/0, the model's "
            "chi-square being no larger than its degrees of freedom either).") in paragraph
    assert "are read beside the RMSEA and SRMR" not in paragraph
