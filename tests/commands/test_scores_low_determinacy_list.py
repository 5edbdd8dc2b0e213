"""The command line's caution on factors whose scores fall below a determinacy of .80 (common practice) lists them by
the one rule of a list in a sentence (numbers.word_list: 'fa and fb'), not joined by ', ' (s24)."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd

from cfa_tool.cli import main
from cfa_tool.language.names import written_name
from cfa_tool.numbers import word_list


def test_the_low_determinacy_caution_lists_its_factors_as_a_sentence(tmp_path, capsys):
    # invented data: two uncorrelated factors of three items loading .45 each, whose scores' determinacy is about .66
    # in the population (rho^2 = k l^2 / (1 - l^2 + k l^2) = .43 for k = 3 standardized loadings l = .45: one factor's
    # determinacy, Grice 2001, the formula recalled from memory), well below .80
    rng = np.random.default_rng(7)
    f = rng.standard_normal((400, 2))
    data = pd.DataFrame({f"{'ab'[k]}{j}": 0.45 * f[:, k] + np.sqrt(1 - 0.45 ** 2) * rng.standard_normal(400)
                         for k in range(2) for j in (1, 2, 3)})
    (tmp_path / "weak.csv").write_text(data.to_csv(index=False))
    (tmp_path / "weak.cfa").write_text("factor fa: a1, a2, a3\nfactor fb: b1, b2, b3\n")
    code = main(["scores", str(tmp_path / "weak.cfa"), "--data", str(tmp_path / "weak.csv"),
                 "--output", str(tmp_path / "s.csv"), "--json", str(tmp_path / "s.json")])
    err = capsys.readouterr()
    assert code == 0
    low = json.loads((tmp_path / "s.json").read_text())["low_determinacy"]
    assert low == ["fa", "fb"]
    said = [line for line in (err.out + err.err).splitlines() if line.startswith("Caution: the determinacy")]
    assert said == [f"Caution: the determinacy of {word_list(written_name(n) for n in low)} is below .80; see the report"]
