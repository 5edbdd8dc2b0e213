"""power-simulation --nested-model in every view: the terminal, HTML and Word reports carry the table of the
difference test's power and the methods paragraph, the Word file names no option, and the JSON carries the nested
model's figures.  What is checked is where the figures appear; their values are checked in
tests/workflows/test_power_nested.py against scipy."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

from cfa_tool.cli import main

TWO = ("factor f: q1, q2, q3\nfactor g: q4, q5, q6\nscale latent by variance\nstart covariance(f, g) = 0.8\n")
ONE = 'name "one factor"\n' "factor h: q1, q2, q3, q4, q5, q6\n"


def _views(capsys, stem: str, docx) -> tuple[str, str, str]:
    """The terminal report, the HTML file ``stem``.html and the Word file ``stem``.docx (its paragraphs and table
    cells) as text, each run of white space one space."""
    document = docx.Document(f"{stem}.docx")
    word = " ".join([p.text for p in document.paragraphs]
                    + [c.text for t in document.tables for row in t.rows for c in row.cells])
    return tuple(re.sub(r"\s+", " ", text) for text in (capsys.readouterr().out,
                                                        Path(f"{stem}.html").read_text(encoding="utf-8"), word))


def test_every_view_reports_the_difference_test(tmp_path, monkeypatch, capsys):
    docx = pytest.importorskip("docx")
    monkeypatch.chdir(tmp_path)
    Path("two.cfa").write_text(TWO)
    Path("one.cfa").write_text(ONE)
    code = main(["power-simulation", "two.cfa", "--n", "120,240", "--replications", "20", "--seed", "3",
                 "--nested-model", "one.cfa", "--json", "o.json", "--html", "o.html", "--docx", "o.docx"])
    assert code == 0
    terminal, html, word = _views(capsys, "o", docx)
    for text in (terminal, html, word):
        assert "Power of the difference test against" in text
        assert "Approximate power" in text
        assert "Satorra" in text  # the approximation's source, in the table's note and the paragraph
        assert "The power of the chi-square difference test of the nested model" in re.sub(r"\s+", " ", text)
    assert not re.search(r"--[a-z]", word)  # a manuscript names no option
    saved = json.loads(Path("o.json").read_text(encoding="utf-8"))
    nested = saved["nested_model"]
    assert nested["name"] == "one factor" and nested["df_difference"] == 1
    assert [d["n_obs"] for d in nested["difference_test"]] == [120, 240]
    assert {"power", "approximate_power", "monte_carlo_se", "pairs_converged"} <= set(nested["difference_test"][0])


def test_power_plans_the_difference_test_in_every_view(tmp_path, monkeypatch, capsys):
    """``power MODEL --nested-model MODEL2``: the planned power and N in the terminal, HTML and Word reports (the
    Word file naming no option) and the JSON."""
    docx = pytest.importorskip("docx")
    monkeypatch.chdir(tmp_path)
    Path("two.cfa").write_text(TWO)
    Path("one.cfa").write_text(ONE)
    code = main(["power", "two.cfa", "--nested-model", "one.cfa", "--n", "150", "--json", "p.json", "--html",
                 "p.html", "--docx", "p.docx"])
    assert code == 0
    terminal, html, word = _views(capsys, "p", docx)
    for text in (terminal, html, word):
        assert "Power of the chi-square difference test against" in text
        assert "Smallest N for power" in text
    assert "--nested-model" in terminal  # the advice to simulate, with its option, where the program's user reads it
    assert not re.search(r"--[a-z]", word)
    saved = json.loads(Path("p.json").read_text(encoding="utf-8"))
    assert saved["nested_model"] == "one factor" and saved["n_obs"] == 150
    assert saved["required_n"] < 150 and saved["power"] > 0.80  # the smallest N for .80 lies below an N of more power
