"""replicate and sampling designs (new-user trial s16): random halves are drawn row by row, which splits clusters
such as households between the halves, and the report said nothing of it; ``replicate --weights`` pointed to a help
that did not mention weights.  The report and the methods text say how the halves are drawn and what to do with rows
that come in clusters (since s17: draw them by cluster, tests/workflows/test_replicate_halves_by_cluster.py); the
refusal of weights and the help say what replicate takes."""

from __future__ import annotations

import pytest

from cfa_tool.cli import main
from cfa_tool.reporting.paragraph import replication_paragraph
from cfa_tool.reporting.reports import report_of
from cfa_tool.workflows.replication import Replications, split_half

THREE_FACTORS = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"


def test_the_split_says_that_halves_are_drawn_row_by_row(hs_data):
    pair = split_half(THREE_FACTORS, hs_data, seed=3)
    first = str(report_of(Replications(pair)).lines[0])  # (a Note: the option that draws them by cluster apart)
    assert first.startswith("The 301 rows of the file were split at random into two halves. The halves are drawn row "
                            "by row, so rows of one household, school or other cluster can fall in both halves")
    assert "draw the halves cluster by cluster from the column that names each row's cluster (cluster='COLUMN')" in first
    assert "two random halves, drawn row by row, of 301 of the 301 rows" in " ".join(replication_paragraph(
        Replications(pair)).split())


@pytest.mark.parametrize("option", [["--weights", "w"], ["--weight-kind", "frequency"]])
def test_replicate_says_what_it_takes_when_given_a_design(option, tmp_path, capsys):
    model = tmp_path / "m.cfa"
    model.write_text(THREE_FACTORS)
    with pytest.raises(SystemExit) as raised:
        main(["replicate", str(model), "--data", str(tmp_path / "d.csv"), *option])
    assert raised.value.code == 2
    said = capsys.readouterr().err
    assert said.count("\n") == 1 and f"{option[0]} cannot apply: replicate compares samples of independent" in said
    assert "takes no weights" in said and "fit each sample with 'fit' and its design options" in said
    # the help it points to says so too
    with pytest.raises(SystemExit):
        main(["replicate", "--help"])
    shown = " ".join(capsys.readouterr().out.split())
    assert "Sampling designs: replicate takes no weights (--weights is refused)" in shown
    assert "unless --cluster names each row's cluster: whole clusters then go to each half" in shown
