"""TLI where the baseline (independence) model's chi-square is at most its degrees of freedom.

TLI = (chi2_b / df_b - chi2 / df) / (chi2_b / df_b - 1) = 1 - (lambda / df) / (lambda_b / df_b) (Tucker & Lewis
1973, with lambda = chi2 - df the estimated noncentrality): its denominator chi2_b / df_b - 1 is then at most 0, so
the index divides by nothing or by less than nothing and says nothing of fit; the s20 closing note found TLI -.772
printed beside a CFI 'not defined' (0/0, Bentler 1990).  It is now 'not defined' in every view (terminal, HTML,
Word, the methods paragraph; null in the JSON beside the caution that says why), like CFI, for the normal-theory,
robust and scale-shifted indices alike; with a baseline chi-square above its df it keeps its value, uncut.
"""

from __future__ import annotations

import io
import json
import math

import docx
import numpy as np

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.assessment.fit_indices import tli_from, tli_value
from cfa_tool.cli import main
from cfa_tool.inference.robust import robust_fit
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.tables import fit_table
from tests.assessment.test_uninformative_baseline import ONE, _noise


def test_tli_has_no_value_when_the_baseline_chi_square_is_at_most_its_df():
    # baseline 4.48 on 6 df (ratio .747): by the formula (.747 - 0.85 / 2) / (.747 - 1) = -1.27, a number of nothing
    assert math.isnan(tli_value(0.85, 2, 4.48, 6))
    # a model that misfits beside a baseline that does not: (4 / 6 - 8 / 2) / (4 / 6 - 1) = 10 by the formula
    assert math.isnan(tli_value(8.0, 2, 4.0, 6))
    assert math.isnan(tli_value(3.0, 2, 6.0, 6))  # ratio exactly 1: 0 in the denominator
    assert math.isnan(tli_from(-1.15, 2, -1.52, 6)) and math.isnan(tli_from(1.0, 2, 0.0, 6))
    # a baseline chi-square above its df keeps the index, uncut (Tucker & Lewis 1973's formula, by hand)
    assert np.isclose(tli_value(10.0, 15, 60.0, 21), (60 / 21 - 10 / 15) / (60 / 21 - 1))
    assert np.isclose(tli_from(5.0, 2, 4.0, 6), 1 - (5 / 2) / (4 / 6))  # -2.75: below 0, not cut


def test_the_robust_tli_follows_the_same_rule():
    # T = 0.85 on 2 df with c = 1.1; baseline 4.48 on 6 df with cb = 1.2: scaled baseline noncentrality 4.48 - 7.2 < 0
    r = robust_fit(0.85, 2, 1.1 * 2, 4.48, 6, 1.2 * 6, 200, 1)
    assert math.isnan(r.tli_robust) and math.isnan(r.cfi_robust)


def test_noise_reads_tli_not_defined_in_every_view(tmp_path, capsys):
    data = _noise()
    result = cfa_tool.fit(ONE, data)
    f = result.fit
    assert f.baseline_chi_square < f.baseline_df  # the data's premise: the baseline model fits
    assert math.isnan(f.tli) and math.isnan(f.cfi)
    assert any(p.kind is ProblemKind.UNINFORMATIVE_BASELINE for p in result.problems)  # the caution that says why
    rows = {row[0]: row for row in fit_table(result).rows}
    assert rows["TLI"][1] == "not defined" and rows["CFI"][1] == "not defined"
    assert "CFI = not defined, TLI = not defined," in methods_paragraph(result)
    robust = cfa_tool.fit(ONE, data, test="robust")
    assert math.isnan(robust.robust.tli_robust)
    assert {row[0]: row for row in fit_table(robust).rows}["Robust CFI / TLI"][1] == "not defined / not defined"

    path = tmp_path / "noise.csv"
    data.to_csv(path, index=False)
    (tmp_path / "one.cfa").write_text(ONE)
    outputs = {kind: tmp_path / f"o.{kind}" for kind in ("json", "html", "docx")}
    assert main(["fit", str(tmp_path / "one.cfa"), "--data", str(path)]
                + [a for kind, p in outputs.items() for a in (f"--{kind}", str(p))]) == 0
    out = " ".join(capsys.readouterr().out.split())
    assert "TLI = not defined" in out and "TLI not defined" in out  # the paragraph and the table's row
    saved = json.loads(outputs["json"].read_text())
    assert saved["fit"]["tli"] is None and saved["fit"]["cfi"] is None
    assert "uninformative baseline" in [p["kind"] for p in saved["problems"]]
    html = " ".join(outputs["html"].read_text().split())
    assert "TLI = not defined" in html
    document = docx.Document(io.BytesIO(outputs["docx"].read_bytes()))
    word = " ".join([p.text for p in document.paragraphs]
                    + [cell.text for table in document.tables for row in table.rows for cell in row.cells])
    assert "TLI = not defined" in word

