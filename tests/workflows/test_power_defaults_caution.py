"""A power simulation of one group drawn from the standardized defaults (no --population-from, loadings assumed)
is cautioned first, in every view, as the plan of an invariance study is (new-user trial s21 found a plan from
loadings .7 and factor correlations .3 where the fit had found -.5; the one-group report said only, in a plain line
among its figures, that the values took defaults).  The defaults are the tool's own documented values
(workflows.simulation: standardized loadings .7, factor correlations .3)."""

from __future__ import annotations

import json

import docx

from cfa_tool.cli import main

MODEL = "factor f: y1, y2, y3, y4\n"
CAUTION = ("3 population values not given in the model file are the standardized defaults (loadings .7, -.7 for "
           "reverse-keyed items, factor correlations .3, residual covariances 0, item variances 1; listed in the "
           "population table), not values of this scale: the power, coverage and bias are those of such a population")


def _plain(text: str) -> str:
    """Spaces made one, and the true minus of the printed views (HTML, Word) the hyphen-minus."""
    return " ".join(text.split()).replace("\u2212", "-")


def test_a_one_group_plan_from_defaults_is_cautioned_first_in_every_view(tmp_path, capsys):
    model = tmp_path / "one.cfa"
    # 3 loadings and 1 factor variance given ... : the loadings of y2..y4 are given, so 3 values default:
    model.write_text(MODEL + "start loading(f, y2) = 1\nstart loading(f, y3) = 1\nstart loading(f, y4) = 1\n"
                             "start variance(f) = 0.49\nstart variance(y1) = 0.51\n")
    out = {kind: tmp_path / f"plan.{kind}" for kind in ("html", "json", "docx")}
    assert main(["power-simulation", str(model), "--n", "200", "--replications", "3", "--workers", "1",
                 *(a for kind, path in out.items() for a in (f"--{kind}", str(path)))]) == 0
    terminal = _plain(capsys.readouterr().out)
    # the 3 residual variances of y2, y3 and y4 took the defaults (the model file gives the other 5 values)
    assert CAUTION in terminal and terminal.index(CAUTION) < terminal.index("Per parameter")
    assert "--population-from FIT.json" in terminal  # the way to give every value, with its option
    html = _plain(out["html"].read_text())
    assert CAUTION in html and html.index(CAUTION) < html.index("Per parameter")
    report = json.loads(out["json"].read_text())["report"]
    assert _plain(report["warnings"][0]["parts"][0]).startswith(CAUTION)  # the first warning, its option apart
    word = _plain(" ".join(p.text for p in docx.Document(str(out["docx"])).paragraphs))
    assert CAUTION in word and "--population-from" not in word  # the manuscript names no option
    assert "took defaults" not in terminal  # no longer a plain line among the figures


def test_a_plan_whose_model_file_gives_every_value_has_no_caution(tmp_path, capsys):
    model = tmp_path / "given.cfa"
    model.write_text(MODEL + "start loading(f, y2) = 1\nstart loading(f, y3) = 1\nstart loading(f, y4) = 1\n"
                             "start variance(f) = 0.49\n"
                     + "".join(f"start variance(y{i}) = 0.51\n" for i in range(1, 5)))
    assert main(["power-simulation", str(model), "--n", "200", "--replications", "3", "--workers", "1"]) == 0
    assert "standardized defaults" not in _plain(capsys.readouterr().out)
