"""A summary block under the answers (rows labelled Mean, SD, N in the id column, or rows holding those statistics
without a label) is named first, every row of it, by one rule (hostile trial s15, case 02: with Mean, SD and N rows
the Mean and SD rows were analysed as respondents and only the N row was named; an SD row alone said nothing).

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed); the statistics of
the block are computed here by pandas (mean, standard deviation with divisor n - 1, count), not by the tool."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.odd_values import OddKind, odd_values
from tests.conftest import run_cli

STATS = {"Mean": lambda d: d.mean().round(2), "SD": lambda d: d.std().round(2), "N": lambda d: d.count()}


def _with_block(frame: pd.DataFrame, labels: list[str], label_column: str = "rider_id") -> pd.DataFrame:
    items = list(frame.columns[2:])
    rows = []
    for label in labels:
        row = STATS[label](frame[items]).to_frame().T
        row.insert(0, "rider_id", label if label_column == "rider_id" else f"X{label}")
        row.insert(1, "district", label if label_column == "district" else "")
        rows.append(row)
    return pd.concat([frame] + rows, ignore_index=True)


@pytest.mark.parametrize("labels", [["Mean", "SD", "N"], ["Mean", "SD"], ["SD"], ["N", "Mean"]])
def test_every_row_of_a_labelled_summary_block_is_named_first(rider_demo, rider_model, tmp_path, capsys, labels):
    data = tmp_path / "survey.csv"
    _with_block(rider_demo, labels).to_csv(data, index=False)
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    code, out, _ = run_cli(["fit", model, "--data", data], capsys)
    assert code == 0
    first = out[out.index("Check before interpreting"):]
    rows = [len(rider_demo) + 2 + k for k in range(len(labels))]  # file rows: the header is row 1
    said = " ".join(first.replace("│", " ").split())
    assert f"{', '.join(map(str, rows))} of survey.csv ({', '.join(repr(x) for x in labels)})" in said
    assert "summary block under the data" in said
    keep = [a for label in labels for a in ("--keep", f"rider_id != {label}")]
    assert " ".join(f'--keep "rider_id != {label}"' for label in labels) in said
    # left out as advised, every row of the block leaves and nothing is said of it
    code, out, _ = run_cli(["fit", model, "--data", data] + keep, capsys)
    assert code == 0 and "summary block" not in out


def test_an_unlabelled_block_of_means_and_standard_deviations_is_found_by_its_values(rider_demo, rider_model):
    items = list(rider_demo.columns[2:])
    block = _with_block(rider_demo, ["Mean", "SD"], label_column="none")  # ids 'XMean', 'XSD': no statistic's name
    found = odd_values(block, items)
    assert [(o.kind, o.rows, o.holds) for o in found] == [
        (OddKind.SUMMARY_BLOCK, (len(rider_demo) + 1, len(rider_demo) + 2), ("the means", "the standard deviations"))]
    # through the Python interface, the rows are named by their index labels
    fit = cfa_tool.fit(rider_model, block)
    first = fit.problems[0].explanation
    assert first.startswith(f"Rows labelled {len(rider_demo)}, {len(rider_demo) + 1} of <data frame> hold the means "
                            f"and the standard deviations of the rows above")


def test_no_block_in_ordinary_data(rider_demo):
    """No false alarm: the demo data, its last row labelled like a district 'N' that other rows share, and simulated
    normal data."""
    items = list(rider_demo.columns[2:])
    assert odd_values(rider_demo, items) == ()
    shared = rider_demo.copy()
    shared["district"] = np.where(np.arange(len(shared)) % 2, "N", "S")  # 'N' names a district, not a count
    assert odd_values(shared, items) == ()
    rng = np.random.default_rng(15)
    normal = pd.DataFrame(rng.normal(size=(400, 6)).round(2), columns=[f"x{k}" for k in range(6)])
    normal.insert(0, "id", [f"P{k}" for k in range(400)])
    assert odd_values(normal, list(normal.columns[1:])) == ()


def test_a_respondent_whose_id_reads_n_or_sd_is_no_summary_row():
    """Re-check s15 (R1): the last rider's id 'N' (or 'SD', 'Mean', 'Total') with ordinary answers 1-5 was called a
    row of the counts of answers and the user told to delete it; a label whose statistic cannot be whole answers
    within the scale needs values that are not a respondent's."""
    import cfa_tool
    from cfa_tool.resources import resource_dir

    model = (resource_dir("models") / "rider_three_factors.cfa").read_text()
    for label in ("N", "SD", "Mean", "Total"):
        data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
        data["rider_id"] = data["rider_id"].astype(str)
        data.loc[len(data) - 1, "rider_id"] = label
        result = cfa_tool.fit(model, data)
        assert not result.data.odd_values and result.n_obs == len(data), label
