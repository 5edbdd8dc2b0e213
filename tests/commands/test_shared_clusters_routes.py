"""Students of both sexes in every school (groups that share clusters: domains of one cluster sample): the refusal of
an ordinal invariance ladder with the schools' clusters gives the route that keeps them, which runs, and the docs of
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


def test_an_ordinal_ladder_with_shared_clusters_gives_the_route_that_keeps_them(schools, capsys):
    data, model = schools
    code, _, err = run_cli(["invariance", model, "--data", data, "--group-column", "sex", "--ordinal", "all",
                            "--cluster", "school"], capsys)
    assert code == 2 and len(err.strip().splitlines()) == 1
    assert "keep the clusters by analysing the items as continuous by maximum likelihood (leave out --ordinal" in err
    assert "fit each group alone with its clusters (--keep \"sex = ...\"), which compares no groups" in err
    # the route it gives runs: the same ladder with the items as continuous keeps the shared clusters
    code, out, err = run_cli(["invariance", model, "--data", data, "--group-column", "sex", "--cluster", "school"],
                             capsys)
    assert code == 0, err
    assert "domains" in " ".join(out.split())  # the groups analysed as domains of one cluster sample


def test_the_invariance_docs_say_which_fits_refuse_shared_clusters_and_the_route():
    text = (DOCS / "commands.md").read_text(encoding="utf-8")
    section = text[text.index("### `cfa-tool invariance"):text.index("### `cfa-tool align")]
    assert "full-information ML (rows with gaps kept) and ordinal items refuse them" in section
    assert "the items as continuous with `--incomplete-rows listwise` when rows have gaps" in section


def test_explore_with_clusters_and_no_split_gives_the_route_to_halves_of_clusters(schools, capsys):
    # explore draws halves of whole clusters itself with --split (rows-s18); --cluster without --split says so
    data, _ = schools
    code, _, err = run_cli(["explore", "--data", data, "--cluster", "school"], capsys)
    assert code == 2
    flat = " ".join(err.split())
    assert "--cluster draws the random halves of --split by cluster" in flat and "give --split SEED" in flat
    explore_doc = " ".join((DOCS / "explore.md").read_text(encoding="utf-8").split())
    assert "`--cluster COLUMN` draws whole clusters to each half" in explore_doc
