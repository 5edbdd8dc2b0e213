"""compare's JSON carries the words of compare's views, or the typed command (note_parts.Command) beside them, never
the text of a command the reader is running: a fit inside compare's result advised '(cfa-tool compare)' in its
problem's 'advice' and in the report's problem table, while the views wrote the words of compare's own report
(s24)."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd

from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.cli import main
from cfa_tool.note_parts import Note, View


def _data(tmp_path):
    # invented data: two factors of three items (loadings .7) correlating .97, which the two-factor model finds
    # hardly distinct (a correlation above .85 or .90: common practice), so its problem advises a comparison
    rng = np.random.default_rng(3)
    f = rng.standard_normal((500, 2)) @ np.linalg.cholesky(np.array([[1, .97], [.97, 1]])).T
    data = pd.DataFrame({f"{'ab'[k]}{j}": 0.7 * f[:, k] + np.sqrt(1 - .49) * rng.standard_normal(500)
                         for k in range(2) for j in (1, 2, 3)})
    (tmp_path / "close.csv").write_text(data.to_csv(index=False))
    (tmp_path / "two.cfa").write_text("factor fa: a1, a2, a3\nfactor fb: b1, b2, b3\n")
    (tmp_path / "one.cfa").write_text("factor g: a1, a2, a3, b1, b2, b3\n")
    return [str(tmp_path / name) for name in ("one.cfa", "two.cfa", "close.csv")]


def _texts(value, key=""):
    """Every text of a JSON value but the typed commands' own ('command' of a note's part)."""
    if isinstance(value, dict):
        return [t for k, v in value.items() if k != "command" for t in _texts(v, k)]
    if isinstance(value, list):
        return [t for v in value for t in _texts(v, key)]
    return [value] if isinstance(value, str) else []


def _distinct(problems) -> dict:
    return next(p for p in problems if p["kind"] == ProblemKind.FACTORS_HARDLY_DISTINCT.value)


def test_compare_json_writes_the_advice_as_compare_reads_it(tmp_path, capsys):
    one, two, data = _data(tmp_path)
    out = tmp_path / "c.json"
    assert main(["compare", one, two, "--data", data, "--json", str(out)]) == 0
    capsys.readouterr()
    result = json.loads(out.read_text())
    problem = _distinct(result["models"][1]["problems"])
    advice = Note.from_dict({"parts": problem["advice_parts"]})
    command = next(p for p in advice.parts if not isinstance(p, str))
    assert command.runs == "compare" and command.inside  # the typed command, with compare's own words
    in_compare = advice.said(View(commands=True, running="compare"))
    assert problem["advice"] == in_compare
    table = result["report"]["problem_table"]
    column = table["columns"].index("What to try")
    assert [row[column] for row in table["rows"]] == [in_compare]
    assert not [text for text in _texts(result) if command.text.strip() in text]  # typed parts aside
    # a fit's own JSON keeps the command, which its reader runs next
    fitted = tmp_path / "f.json"
    assert main(["fit", two, "--data", data, "--json", str(fitted)]) == 0
    capsys.readouterr()
    fit = json.loads(fitted.read_text())
    assert _distinct(fit["problems"])["advice"] == advice.said(View(commands=True, running="fit"))
    assert command.text in _distinct(fit["problems"])["advice"]


def test_compare_html_keeps_compare_words_where_files_are_named_by_their_names(tmp_path, capsys):
    # the views written for others name the user's files by their file names (document.by_file_name), which rebuilt
    # each command without its 'runs' and 'inside': compare's HTML advised '(cfa-tool compare)' given full paths
    one, two, data = _data(tmp_path)
    page = tmp_path / "c.html"
    assert main(["compare", one, two, "--data", data, "--html", str(page)]) == 0
    capsys.readouterr()
    text = page.read_text()
    assert "cfa-tool compare" not in text and "among the models compared here" in text
