"""Scores of a plain export with a fit whose data file declared an answer missing: the earlier fit's declaration of 3
'Neither agree nor disagree' (an SPSS missing value on a labelled answer between the others) is carried to the scored
CSV, as its declared codes are (data.non_answers.read_fit_marked), and the cells it empties there are a caution first
of the scores, of the kind the fit's own caution has (ProblemKind.ANSWERS_DECLARED_MISSING), not a note only
(hostile trial s25, the neighbour of case 07); a code declared missing whose label says no answer (9 'No answer')
stays a note.  Invented data (a fictional transit agency's riders), simulated with a fixed seed; the cells counted
below are counted on the data written here."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

from cfa_tool.cli import main

ITEMS = ["seat", "clean", "quiet", "driver", "info", "punctual"]
LABELS = {1.0: "Strongly disagree", 2.0: "Disagree", 3.0: "Neither agree nor disagree", 4.0: "Agree",
          5.0: "Strongly agree", 9.0: "No answer"}


def _answers(seed: int, n: int) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    traits = rng.multivariate_normal([0, 0], [[1, .4], [.4, 1]], size=n)
    raw = .8 * traits[:, [0, 0, 0, 1, 1, 1]] + rng.normal(0, .6, (n, 6))
    return pd.DataFrame(np.clip(np.round(raw + 3), 1, 5), columns=ITEMS)


@pytest.mark.parametrize("declared", [3.0, 9.0])
def test_the_fits_declared_midpoint_is_a_caution_of_the_scores(tmp_path, capsys, declared):
    import pyreadstat

    fitted, scored = _answers(5, 400), _answers(6, 300)
    scored.loc[:4, "seat"] = 9.0  # five 'No answer' codes in the export
    pyreadstat.write_sav(fitted, str(tmp_path / "w1.sav"), variable_value_labels={c: LABELS for c in ITEMS},
                         missing_ranges={c: [declared] for c in ITEMS})
    scored.to_csv(tmp_path / "w2.csv", index=False)
    (tmp_path / "m.cfa").write_text("factor comfort: seat, clean, quiet\nfactor service: driver, info, punctual\n")
    assert main([str(a) for a in ["fit", tmp_path / "m.cfa", "--data", tmp_path / "w1.sav", "--json",
                                  tmp_path / "fit.json"]]) == 0
    assert main([str(a) for a in ["scores", tmp_path / "m.cfa", "--data", tmp_path / "w2.csv", "--from-fit",
                                  tmp_path / "fit.json", "--output", tmp_path / "s.csv", "--json",
                                  tmp_path / "s.json"]]) == 0
    capsys.readouterr()
    problems = json.loads((tmp_path / "s.json").read_text())["problems"]
    mine = [p for p in problems if p["kind"] == "answers the file declares missing"
            and not p["explanation"].startswith("About the fit")]
    if declared == 9.0:  # a code whose label says no answer: read as no answer with a note, no caution
        assert mine == []
        return
    cells = int((scored[ITEMS] == 3.0).sum().sum())  # the planted data's midpoint answers
    rows = int((scored[ITEMS] == 3.0).any(axis=1).sum())
    assert cells > 0 and len(mine) == 1 and problems[0] is mine[0]  # first: the scored file's own
    text = mine[0]["explanation"]
    assert "declares the code 3 a missing value" in text and "'Neither agree nor disagree'" in text
    assert f"{cells:,} cells" in text and f"in {rows:,} rows" in text
    assert "fit again" in mine[0]["advice"]
