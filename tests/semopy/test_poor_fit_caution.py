"""A model whose fit is poor by common bounds is cautioned first, in every view of the fit and of its scores.

Holzinger & Swineford (1939), 301 children: the one-factor model of the nine tests fits poorly (semopy, an
independent implementation, gives its CFI and RMSEA below; the three-factor model's CFI .931 and RMSEA .092 are
the published values, e.g. Joreskog 1969 as reported in many texts, recalled from memory) and the three-factor
model does not fall beyond the bounds (CFI below .90 or RMSEA above .10; MacCallum, Browne & Sugawara 1996, common
practice).
"""

from __future__ import annotations

import json

import numpy as np
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.cli import main
from tests.conftest import THREE_FACTORS, holzinger_swineford

ONE_FACTOR = "factor g: x1, x2, x3, x4, x5, x6, x7, x8, x9\n"


def _semopy_indices(data):
    semopy = pytest.importorskip("semopy")
    model = semopy.Model("g =~ x1 + x2 + x3 + x4 + x5 + x6 + x7 + x8 + x9")
    model.fit(data[[f"x{i}" for i in range(1, 10)]])
    stats = semopy.calc_stats(model)
    chi2, df = float(stats["chi2"].iloc[0]), float(stats["DoF"].iloc[0])
    # RMSEA = sqrt((chi2 - df) / (df N)) (Steiger 1990, with N as the report divides), from semopy's chi-square
    return float(stats["CFI"].iloc[0]), float(np.sqrt(max(chi2 - df, 0) / (df * len(data))))


def test_a_poorly_fitting_model_is_cautioned_first_with_its_figures(tmp_path, capsys):
    data = holzinger_swineford()
    cfi, rmsea = _semopy_indices(data)
    assert cfi < 0.90 and rmsea > 0.10  # the reference: poor by the bounds
    one = cfa_tool.fit(ONE_FACTOR, data)
    assert np.isclose(one.fit.cfi, cfi, atol=1e-4) and np.isclose(one.fit.rmsea, rmsea, atol=1e-4)
    poor = [p for p in one.problems if p.kind is ProblemKind.POOR_FIT]
    assert len(poor) == 1 and one.admissible  # a caution, not an impossible solution
    assert f"CFI {f'{one.fit.cfi:.3f}'[1:]}, below .90" in poor[0].explanation
    assert f"RMSEA {f'{one.fit.rmsea:.3f}'[1:]}, above .10" in poor[0].explanation
    three = cfa_tool.fit(THREE_FACTORS, data)
    assert not any(p.kind is ProblemKind.POOR_FIT for p in three.problems)
    # first in the terminal report and in the JSON; and in the scores' report
    (tmp_path / "one.cfa").write_text(ONE_FACTOR)
    data.to_csv(tmp_path / "hs.csv", index=False)
    assert main(["fit", str(tmp_path / "one.cfa"), "--data", str(tmp_path / "hs.csv"), "--json",
                 str(tmp_path / "one.json")]) == 0
    out = capsys.readouterr().out
    assert out.index("fits these data poorly") < out.index("Estimates")
    saved = json.loads((tmp_path / "one.json").read_text())
    assert [p["kind"] for p in saved["problems"]] == ["poor fit"]
    assert main(["scores", str(tmp_path / "one.cfa"), "--data", str(tmp_path / "hs.csv"), "--output",
                 str(tmp_path / "s.csv")]) == 0
    out = capsys.readouterr().out
    assert out.index("fits these data poorly") < out.index("Quality of the scores")


def test_the_robust_figures_decide_when_the_report_says_to_read_them():
    data = holzinger_swineford()
    robust = cfa_tool.fit(ONE_FACTOR, data, test="robust")
    read = robust.fit_to_read
    poor = [p for p in robust.problems if p.kind is ProblemKind.POOR_FIT]
    assert poor and f"robust RMSEA {f'{read.rmsea:.3f}'[1:]}" in poor[0].explanation


def test_compare_and_replicate_caution_first_about_a_model_that_fits_poorly(tmp_path, capsys):
    """The poor-fit caution of each model, first in compare's and replicate's reports (both had it only in the
    JSON of each model); an invariance test judges its configural model by its own guides instead (one caution)."""
    data = holzinger_swineford()
    (tmp_path / "one.cfa").write_text(ONE_FACTOR)
    (tmp_path / "three.cfa").write_text(THREE_FACTORS)
    data.to_csv(tmp_path / "hs.csv", index=False)
    data.iloc[::2].to_csv(tmp_path / "a.csv", index=False)
    data.iloc[1::2].to_csv(tmp_path / "b.csv", index=False)
    assert main(["compare", str(tmp_path / "one.cfa"), str(tmp_path / "three.cfa"), "--data",
                 str(tmp_path / "hs.csv")]) == 0
    out = capsys.readouterr().out
    assert out.index("fits these data poorly") < out.index("Model comparison")
    assert out.count("fits these data poorly") == 1  # the one-factor model only
    assert main(["replicate", str(tmp_path / "one.cfa"), "--calibration", str(tmp_path / "a.csv"), "--validation",
                 str(tmp_path / "b.csv")]) == 0
    out = capsys.readouterr().out
    assert 0 < out.index("fits these data poorly") < out.index("Replication")
    assert main(["invariance", str(tmp_path / "one.cfa"), "--data", str(tmp_path / "hs.csv"), "--group-column",
                 "school"]) == 0
    out = capsys.readouterr().out
    assert "configural model does not fit by the guide values" in out and "fits these data poorly" not in out
