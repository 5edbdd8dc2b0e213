"""The methods paragraph of several models under one design states each design caution once (new-user trial s27:
compare of three models with 10 clusters repeated the same ~90-word caution on the clusters once per model, only the
count of free parameters differing).  Invented data of a fictional transit agency's staff survey, fixed seed."""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.reporting.paragraph import comparison_paragraph

TWO = "factor f1: a1, a2, a3\nfactor f2: b1, b2, b3\n"
ONE = "factor g: a1, a2, a3, b1, b2, b3\n"
TWO_COVARY = TWO + "covary a1, b1\n"


def _staff(n: int = 300, sites: int = 10, seed: int = 27) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    f = rng.normal(size=(n, 2))
    items = {f"{k}{j}": .8 * f[:, i] + rng.normal(0, .6, n) for i, k in enumerate("ab") for j in (1, 2, 3)}
    return pd.DataFrame({"site": [f"S{k % sites:02d}" for k in range(n)], **items})


def test_the_clusters_caution_is_said_once_for_the_models_it_concerns(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)  # the models named by their files' names as given
    files = []
    for name, text in (("two", TWO), ("one", ONE), ("two_covary", TWO_COVARY)):
        files.append(f"{name}.cfa")
        (tmp_path / files[-1]).write_text(text)
    compared = cfa_tool.compare(files, _staff(), cluster="site")
    # each model has it (10 clusters, no more than its 12 to 14 free parameters: counted by hand)
    assert all(any(p.kind is ProblemKind.FEW_CLUSTERS for p in r.problems) for r in compared.results)
    paragraph = comparison_paragraph(compared)
    assert paragraph.count("Only 10 clusters in 'site'") == 1
    # in the words of the model with the most free parameters (14), naming the two others
    assert ("For \"two_covary.cfa\" (the same caution, with its own figures, for \"two.cfa\" and \"one.cfa\"): Only "
            "10 clusters "
            "in 'site', no more than the 14 free parameters") in paragraph


def test_the_first_box_of_a_comparison_says_the_clusters_caution_once(tmp_path, monkeypatch):
    """compare's first box as its methods paragraph: the caution on too few clusters once, in the words of the model
    with the most free parameters, naming the others (new-user trial s28: three models under 40 depots repeated
    about 120 words three times), in every view drawn from the report (terminal, JSON)."""
    from cfa_tool.reporting.terminal import report_text
    from cfa_tool.reporting.workflow_tables import comparison_report

    monkeypatch.chdir(tmp_path)
    files = []
    for name, text in (("two", TWO), ("one", ONE), ("two_covary", TWO_COVARY)):
        files.append(f"{name}.cfa")
        (tmp_path / files[-1]).write_text(text)
    report = comparison_report(cfa_tool.compare(files, _staff(), cluster="site"))
    [said] = [line for line in report.notice.lines if "Only 10 clusters in 'site'" in str(line)]
    assert str(said).startswith("two_covary (the model with the most free parameters; the same caution, with its "
                                "own count of free parameters, for two and one): Only 10 clusters in 'site', "
                                "no more than the 14 free parameters")  # 14: counted by hand (13 + 1 covariance)
    box = report_text(report, width=250).split("Model comparison")[0]  # the box, before the report's title
    assert box.count("Only 10 clusters in 'site'") == 1
