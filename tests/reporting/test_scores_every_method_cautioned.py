"""Every factor-score method written is named in the caution when its scores are less reliable than decisions about
individuals need (hostile trial s20: with --method regression,bartlett on the bundled bifactor model, the box named the
regression scores only, while the Bartlett scores written beside them had reliabilities of .02-.05), in one caution
that lists the methods (new-user trial s21)."""

from __future__ import annotations

from cfa_tool.resources import resource_dir
from tests.conftest import run_cli


def _box(out: str) -> str:
    """The first box of the report, its borders left out."""
    lines = []
    for line in out.splitlines():
        lines.append(line)
        if line[:1] in ("\u2570", "\u2517"):
            break
    return " ".join(" ".join(lines).replace("\u2502", " ").replace("\u2503", " ").split())


def test_each_method_is_cautioned_in_the_first_box(tmp_path, capsys, rider_demo):
    data = tmp_path / "rider.csv"
    rider_demo.to_csv(data, index=False)
    model = resource_dir("models") / "rider_bifactor.cfa"
    code, out, err = run_cli(["scores", model, "--data", data, "--method", "regression,bartlett",
                              "--output", tmp_path / "s.csv"], capsys)
    assert code == 0, err
    box = _box(out)
    # one caution listing the methods (new user s21: three nearly identical cautions in a row), each with its figures
    assert box.count("is below the .90 that decisions about individuals usually need") == 1
    assert "The reliability of the regression scores and Bartlett scores is below the .90" in box
    code, alone, err = run_cli(["scores", model, "--data", data, "--method", "bartlett",
                                "--output", tmp_path / "b.csv"], capsys)
    assert code == 0, err
    # the Bartlett figures beside the regression ones are those said when Bartlett scores are written alone
    said = _box(alone).split("The reliability of the Bartlett scores")[1].split(" What to try")[0]
    # (the rows scored from some of the items said after them, of the first method written: new-user trial s28)
    figures = said.split("common practice): ")[1].split(" These figures are for rows")[0].rstrip(".")
    assert "Bartlett scores: " + figures in box
