"""Names of models, files, items and factors are never recased by a sentence's capital: a line that starts with a
name holds it as a note_parts.Name, which note_parts.capitalised (and every view) leaves as given (s24: compare's
caution on few clusters began 'Two (the model with the most free parameters)' for a model file 'two.cfa')."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd

from cfa_tool.cli import main
from cfa_tool.note_parts import WORDS, Name, Note, capitalised, numbered, read


def test_a_line_starting_with_a_name_keeps_its_case():
    line = Note((Name("one"), " (the model with the most free parameters): few clusters"))
    assert capitalised(line) == line
    assert capitalised(line).said(WORDS).startswith("one (the model")
    assert Note.from_dict(line.to_dict()) == line  # saved and read back as a name
    assert capitalised("one and two were compared") == "One and two were compared"  # words: capitalised as before


def test_compare_names_the_model_of_a_design_caution_as_its_file_names_it(tmp_path, capsys):
    # invented data: two factors of three items, twelve clusters of rows (fewer than the larger model's 13 free
    # parameters, so the cluster-robust caution on few clusters names that model first)
    rng = np.random.default_rng(3)
    f = rng.standard_normal((500, 2)) @ np.linalg.cholesky(np.array([[1, .97], [.97, 1]])).T
    data = pd.DataFrame({f"{'ab'[k]}{j}": 0.7 * f[:, k] + np.sqrt(1 - .49) * rng.standard_normal(500)
                         for k in range(2) for j in (1, 2, 3)}).assign(site=np.arange(500) % 12)
    (tmp_path / "c.csv").write_text(data.to_csv(index=False))
    (tmp_path / "two.cfa").write_text("factor fa: a1, a2, a3\nfactor fb: b1, b2, b3\n")
    (tmp_path / "one.cfa").write_text("factor g: a1, a2, a3, b1, b2, b3\n")
    out = tmp_path / "c.json"
    code = main(["compare", str(tmp_path / "one.cfa"), str(tmp_path / "two.cfa"), "--data", str(tmp_path / "c.csv"),
                 "--cluster", "site", "--json", str(out)])
    terminal = capsys.readouterr().out
    assert code == 0
    lines = [read(line) for line in json.loads(out.read_text())["report"]["notice"]["lines"]]
    named = [line for line in lines if isinstance(line, Note) and line.parts and isinstance(line.parts[0], Name)]
    assert named and named[0].parts[0] == Name("two")
    assert named[0].said(numbered(())).startswith("two (the model with the most free parameters;")
    assert "two (the model with the most free parameters;" in terminal
    assert "Two (the model" not in terminal
