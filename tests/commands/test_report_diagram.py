"""``cfa-tool report RESULT.json --diagram PATH`` writes a saved fit's path diagram as ``fit --diagram`` writes it (the
same file, byte for byte: one drawing per group with one legend, which the saved report keeps), under the same output
guard (never the result file, never a file this tool did not write); a result that draws no diagram, and a fit saved
before its result kept the file, are refused in one line that says what to do (new-user trial s25: 'report' could
not write the diagram although the fit's figures were in the JSON).  Data: the bundled demo (a fictional transit
agency's rider survey, simulated with a fixed seed), by district for two groups."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

from cfa_tool.cli import main
from cfa_tool.reporting.document import Report
from cfa_tool.resources import resource_dir

MODEL = "rider_three_factors.cfa"


@pytest.fixture(scope="module")
def folder(tmp_path_factory) -> Path:
    here = tmp_path_factory.mktemp("diagram")
    (here / "rider.csv").write_bytes((resource_dir("demo") / "rider_survey.csv").read_bytes())
    (here / MODEL).write_text((resource_dir("models") / MODEL).read_text())
    return here


@pytest.mark.parametrize("groups", [False, True])
def test_report_writes_the_fits_diagram_file(folder, monkeypatch, groups, capsys):
    monkeypatch.chdir(folder)
    tag = "groups" if groups else "one"
    assert main(["fit", MODEL, "--data", "rider.csv", "--json", f"{tag}.json", "--diagram", f"{tag}-fit.svg",
                 *(["--group-column", "district"] if groups else [])]) == 0
    assert main(["report", f"{tag}.json", "--diagram", f"{tag}-report.svg"]) == 0
    assert f"Path diagram written to {tag}-report.svg" in capsys.readouterr().out
    assert (folder / f"{tag}-report.svg").read_bytes() == (folder / f"{tag}-fit.svg").read_bytes()
    assert main(["report", f"{tag}.json", "--diagram", f"{tag}-report.svg"]) == 0  # its own file again: replaced


def test_the_output_guard_and_refusals(folder, monkeypatch, capsys):
    monkeypatch.chdir(folder)
    assert main(["fit", MODEL, "--data", "rider.csv", "--json", "fit.json"]) == 0
    saved = (folder / "fit.json").read_bytes()
    (folder / "someone.svg").write_text('<svg xmlns="http://www.w3.org/2000/svg"/>')
    capsys.readouterr()
    assert main(["report", "fit.json", "--diagram", "someone.svg"]) == 2  # a file the tool did not write
    assert "not replaced" in capsys.readouterr().err
    assert (folder / "someone.svg").read_text() == '<svg xmlns="http://www.w3.org/2000/svg"/>'
    assert main(["report", "fit.json", "--diagram", "d.svg", "--dpi", "150"]) == 2  # no picture at that resolution
    assert "--dpi" in capsys.readouterr().err
    old = json.loads(saved)
    # as a fit saved before results kept the diagram file: its figures' pictures alone
    figures = Report.from_dict(old["report"]).figures
    old["report"]["figures"] = [{"title": f.title, "svg": f.svg, "note": f.note} for f in figures]
    del old["report"]["drawings"]
    (folder / "old.json").write_text(json.dumps(old))
    assert main(["report", "old.json", "--diagram", "old.svg"]) == 2
    err = capsys.readouterr().err
    assert "run the fit again with --diagram" in err and err.count("\n") == 1
    assert main(["check", MODEL, "--data", "rider.csv", "--json", "check.json"]) == 0
    capsys.readouterr()
    assert main(["report", "check.json", "--diagram", "check.svg"]) == 2
    assert "draws no path diagram" in capsys.readouterr().err
    assert not any((folder / name).exists() for name in ("d.svg", "old.svg", "check.svg"))
    assert (folder / "fit.json").read_bytes() == saved


@pytest.mark.parametrize("groups", [False, True])
def test_a_saved_fit_keeps_its_drawing_once_and_renders_it_as_the_fit_did(folder, monkeypatch, groups):
    # s28: the JSON held each group's drawing twice, as the report's figures and as the diagram file; it keeps the
    # drawing once, from which 'report' makes the figures (the HTML) and the file (--diagram) as the fit made them
    monkeypatch.chdir(folder)
    tag = "once-groups" if groups else "once"
    grouped = ["--group-column", "district"] if groups else []
    assert main(["fit", MODEL, "--data", "rider.csv", "--json", f"{tag}.json", "--html", f"{tag}-fit.html",
                 "--diagram", f"{tag}-fit.svg", *grouped]) == 0
    saved = (folder / f"{tag}.json").read_text()
    assert saved.count("<svg") == 0 and '"diagram"' not in saved  # no picture written out, the parts once
    report = json.loads(saved)["report"]
    assert len(report["drawings"]["drawings"]) == len(report["figures"]) == (2 if groups else 1)
    assert main(["report", f"{tag}.json", "--html", f"{tag}-report.html", "--diagram", f"{tag}-report.svg"]) == 0
    # the fit's HTML byte for byte, but for the options it advises, which the views made by 'report' say as running
    # the fit again (reporting.combined.in_saved_words: 'report' takes none of them)
    made = (folder / f"{tag}-report.html").read_text(encoding="utf-8")
    assert "when running fit again: cfa-tool fit ... --" in made
    assert re.sub(r"\(when running fit again: cfa-tool fit \.\.\. (--)", r"(\1", made) == \
        (folder / f"{tag}-fit.html").read_text(encoding="utf-8")
    assert (folder / f"{tag}-report.svg").read_bytes() == (folder / f"{tag}-fit.svg").read_bytes()
    # one figure per group, its legend as text under it
    html = (folder / f"{tag}-report.html").read_text()
    assert html.count("<figure class=\"diagram\">") == (2 if groups else 1)
    assert "Standardized values. Ellipses: factors" in html
