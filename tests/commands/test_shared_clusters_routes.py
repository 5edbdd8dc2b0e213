"""Students of both sexes in every school (groups that share clusters: domains of one cluster sample): ordinal and
continuous invariance ladders keep the schools' clusters, with rows with gaps too (new-user trial s20, item 5; s18
refused the ordinal ladder and s20's full-information one), every view's methods text says so, and the docs of
invariance say so; explore --cluster without --split gives the route to explore one half of the schools (new-user trial
s18, items 9 and 10).  Simulated data: 30 schools of 20 students, 6 items of 4 answers."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from tests.conftest import run_cli

DOCS = Path(__file__).resolve().parents[2] / "docs"
MODEL = "factor F: x1, x2, x3, x4, x5, x6\n"


@pytest.fixture(scope="module")
def schools(tmp_path_factory):
    rng = np.random.default_rng(18)
    school = np.repeat(np.arange(30), 20)
    f = rng.normal(size=len(school)) + np.repeat(rng.normal(scale=0.4, size=30), 20)
    y = f[:, None] * 0.7 + rng.normal(size=(len(school), 6)) * 0.7
    frame = pd.DataFrame(np.digitize(y, [-1.0, 0.0, 1.0]) + 1, columns=[f"x{i}" for i in range(1, 7)])
    frame["sex"] = np.tile(["girl", "boy"], len(school) // 2)  # both sexes in every school
    frame["school"] = [f"S{c:02d}" for c in school]
    folder = tmp_path_factory.mktemp("schools")
    data, model = folder / "d.csv", folder / "m.cfa"
    frame.to_csv(data, index=False)
    model.write_text(MODEL)
    return data, model


def test_an_ordinal_ladder_with_shared_clusters_runs_as_domains(schools, capsys):
    # s18 refused it and gave the continuous route; since s21 the ordinal fit joins the groups' influence functions
    # over the schools (tests/inference/test_ordinal_domains.py checks the numbers)
    data, model = schools
    code, out, err = run_cli(["invariance", model, "--data", data, "--group-column", "sex", "--ordinal", "all",
                              "--cluster", "school"], capsys)
    assert code == 0, err
    assert "The groups are domains that share clusters" in " ".join(out.replace("│", "").split())


def test_the_invariance_docs_say_every_fit_takes_shared_clusters():
    text = (DOCS / "commands.md").read_text(encoding="utf-8")
    section = text[text.index("### `cfa-tool invariance"):text.index("### `cfa-tool align")]
    flat = " ".join(section.split())
    paragraph = flat[flat.index("Groups whose rows share clusters"):].split(" See also ")[0]
    assert "are compared with their shared clusters by every estimator" in paragraph  # s21
    assert "full-information ML" in paragraph and "the least-squares fit of ordinal items" in paragraph
    assert "refuse" not in paragraph and "--incomplete-rows listwise" not in paragraph
    missing = " ".join((DOCS / "not-yet-available.md").read_text(encoding="utf-8").split())
    assert "analysed with their shared clusters by every estimator that takes a design" in missing


def test_explore_with_clusters_and_no_split_gives_the_route_to_halves_of_clusters(schools, capsys):
    # explore draws halves of whole clusters itself with --split (rows-s18); --cluster without --split says so
    data, _ = schools
    code, _, err = run_cli(["explore", "--data", data, "--cluster", "school"], capsys)
    assert code == 2
    flat = " ".join(err.split())
    assert "--cluster draws the random halves of --split by cluster" in flat and "give --split SEED" in flat
    explore_doc = " ".join((DOCS / "explore.md").read_text(encoding="utf-8").split())
    assert "`--cluster COLUMN` draws whole clusters to each half" in explore_doc


@pytest.fixture(scope="module")
def schools_with_gaps(schools, tmp_path_factory):
    """The schools' file with 6% of the answers of x2..x6 missing (the first item always answered)."""
    data, model = schools
    frame = pd.read_csv(data)
    rng = np.random.default_rng(2021)
    for item in ("x2", "x3", "x4", "x5", "x6"):
        frame.loc[rng.random(len(frame)) < 0.06, item] = np.nan
    path = tmp_path_factory.mktemp("gaps") / "gaps.csv"
    frame.to_csv(path, index=False)
    other = path.parent / "two.cfa"
    other.write_text("factor F: x1, x2, x3\nfactor G: x4, x5, x6\n")
    return path, model, other, frame


def _docx_text(path) -> str:
    docx = pytest.importorskip("docx")
    document = docx.Document(str(path))
    return " ".join([p.text for p in document.paragraphs]
                    + [cell.text for table in document.tables for row in table.rows for cell in row.cells])


@pytest.mark.parametrize("command", ["fit", "compare", "invariance"])
def test_full_information_with_clusters_shared_by_groups_runs_and_every_view_says_so(schools_with_gaps, command,
                                                                                      tmp_path, capsys):
    # new-user trial s20, item 5: pupils of both sexes in every school with gaps in their answers: fit, compare and
    # invariance keep both the schools and every pupil (full-information ML, the default when answers are missing),
    # and the methods text of every view says the groups share the clusters and the rows with gaps were kept under MAR
    data, model, other, frame = schools_with_gaps
    assert frame[["x2", "x3", "x4", "x5", "x6"]].isna().any(axis=1).sum() > 100
    models = [model, other] if command == "compare" else [model]
    out_files = {kind: tmp_path / f"report.{suffix}" for kind, suffix in
                 (("--html", "html"), ("--markdown", "md"), ("--docx", "docx"), ("--json", "json"))}
    argv = [command, *models, "--data", data, "--group-column", "sex", "--cluster", "school"]
    for flag, path in out_files.items():
        argv += [flag, path]
    code, out, err = run_cli(argv, capsys)
    assert code == 0, err
    views = {"terminal": out, "html": out_files["--html"].read_text(encoding="utf-8"),
             "markdown": out_files["--markdown"].read_text(encoding="utf-8"),
             "word": _docx_text(out_files["--docx"])}
    for name, text in views.items():
        flat = " ".join(text.split())
        assert "The groups are domains that share clusters" in flat, name
        assert "rows with missing answers included" in flat, name
        assert "missing at random" in flat, name
    assert "domains sharing clusters" in out_files["--json"].read_text(encoding="utf-8")
    assert "full-information" in " ".join(out.split()).lower()


def test_ordinal_items_with_gaps_and_clusters_shared_by_groups_run(schools_with_gaps, capsys):
    # the other half of new-user trial s20's item 5: ordinal items (pairwise present rows) with the schools kept
    data, model, _, _ = schools_with_gaps
    code, out, err = run_cli(["invariance", model, "--data", data, "--group-column", "sex", "--ordinal", "all",
                              "--cluster", "school"], capsys)
    assert code == 0, err
    assert "The groups are domains that share clusters" in " ".join(out.replace("│", "").split())
