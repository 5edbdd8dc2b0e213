"""An item that one group almost never answered is judged in that group: a caution first naming the group, the item
and its answers, and, with no more answers than the model's variables, a one-line refusal naming them (hostile trial
s16, case 12: 'clean' answered by 3 of south's 230 rows gave no caution, the pooled coverage being 52.7%; by 2, an
exit-3 identification message naming unrelated courtesy and punctuality loadings; re-check s17, N1: 3 answers of a
four-item group, an exit-3 identification message naming other parameters, and 3 answers of the twelve-item model a
fit whose saturated model stopped at no maximum)."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.errors import DataError
from tests.commands.test_cli import run

ROOT = Path(__file__).resolve().parents[2]
DATA = ROOT / "demo" / "rider_survey.csv"  # invented rider survey, simulated with a fixed seed
MODEL = ROOT / "models" / "rider_three_factors.cfa"


def south_answering(k: int) -> pd.DataFrame:
    """The demo data with 'clean' answered by the first ``k`` rows of district south only there."""
    frame = pd.read_csv(DATA)
    south = frame.index[frame["district"] == "south"]
    frame.loc[south[k:], "clean"] = np.nan
    return frame


def test_an_item_almost_unanswered_in_one_group_is_named_first_with_its_group():
    frame = south_answering(20)
    # the counts from pandas, not the project: south's rows with any model item answered, and its answers of clean
    south = frame[frame["district"] == "south"]
    items = [c for c in frame.columns if c not in ("rider_id", "district")]  # the model's 12 items
    assert len(items) == 12
    rows = int(south[items].notna().any(axis=1).sum())
    answers = int(south["clean"].notna().sum())
    assert (answers, rows) == (20, 230)
    assert frame["clean"].notna().mean() > 0.5  # pooled over the groups the item looks well answered
    result = cfa_tool.fit(MODEL, frame, group="district")
    first = result.problems[0]
    assert first.kind is ProblemKind.FEW_ANSWERS and first.group == "south"
    assert first.explanation.startswith(f"Few of this group's rows answer the item 'clean' ({answers} of {rows} rows)")
    assert sum(p.kind is ProblemKind.FEW_ANSWERS for p in result.problems) == 1  # north answered it: nothing there
    assert result.to_dict()["problems"][0]["group"] == "south"
    checked = cfa_tool.check(MODEL, frame, group="district")
    assert any(p.kind is ProblemKind.FEW_ANSWERS and p.group == "south" for p in checked.problems)
    # a tenth of the group's rows is the line (FEW_ANSWERS_SHARE, a rule of thumb of this project): 23 of 230 answers
    # are no caution, 22 are
    assert not any(p.kind is ProblemKind.FEW_ANSWERS for p in cfa_tool.fit(MODEL, south_answering(23),
                                                                            group="district").problems)
    assert any(p.kind is ProblemKind.FEW_ANSWERS for p in cfa_tool.fit(MODEL, south_answering(22),
                                                                        group="district").problems)


def test_the_report_says_it_before_the_title(tmp_path):
    path = tmp_path / "south20.csv"
    south_answering(20).to_csv(path, index=False)
    done = run("fit", str(MODEL), "--data", str(path), "--group-column", "district")
    assert done.returncode == 0, done.stderr
    title = done.stdout.index("Rider experience")
    said = done.stdout.index("Few of this group's rows answer the item 'clean'")
    assert said < title and "Group south" in done.stdout[:said]


@pytest.mark.parametrize("k", [1, 2, 3, 12])
def test_no_more_answers_in_a_group_than_variables_are_refused_naming_the_item_and_the_group(tmp_path, k):
    frame = south_answering(k)
    with pytest.raises(DataError) as refused:
        cfa_tool.fit(MODEL, frame, group="district")
    text = str(refused.value)
    south = frame.index[frame["district"] == "south"]
    rows = ", ".join(str(i) for i in south[:min(k, 5)])  # a data frame's rows are named by their index labels
    assert f"(group south of 'district'): 'clean' has only {k} answer" in text
    assert f"in this group ({'row labelled' if k == 1 else 'rows labelled'} {rows}" in text
    # the model's 12 items: at least 13 answers (one more than the variables analysed, data.moments.fewest_answers)
    assert "full-information ML needs at least 13 answers of an item in this group" in text
    path = tmp_path / "south.csv"
    frame.to_csv(path, index=False)
    done = run("fit", str(MODEL), "--data", str(path), "--group-column", "district")
    assert done.returncode == 2 and "not identified" not in done.stderr
    assert f"south.csv (group south of 'district'): 'clean' has only {k} answer" in done.stderr
    listed = ", ".join(str(i + 2) for i in south[:min(k, 5)])  # the file's rows, its names row 1
    assert f"({'row' if k == 1 else 'rows'} {listed}" in done.stderr
    assert len(done.stderr.strip().splitlines()) == 1
    assert not list(tmp_path.glob("*.json"))


def test_three_answers_of_twelve_items_fit_exactly_by_the_other_items():
    """Why 3 answers of 'clean' in south are refused for the 12-item model: the three rows answer the other 11
    items, and an ordinary least-squares regression of 'clean' on them with an intercept (numpy's lstsq, not this
    project's code) leaves no residual, so the saturated model's likelihood grows without bound as the residual
    variance of 'clean' given the others goes to zero (the exact-fit case of normal regression, recalled from
    memory)."""
    frame = south_answering(3)
    items = [c for c in frame.columns if c not in ("rider_id", "district")]
    rows = frame[(frame["district"] == "south") & frame["clean"].notna()]
    others = rows[[x for x in items if x != "clean"]]
    assert others.notna().all().all() and len(rows) == 3
    design = np.column_stack([np.ones(3), others.to_numpy(float)])
    coefficients, *_ = np.linalg.lstsq(design, rows["clean"].to_numpy(float), rcond=None)
    assert np.allclose(design @ coefficients, rows["clean"].to_numpy(float), atol=1e-9)


ONE_FACTOR = "factor transit: on_time, short_wait, accurate_info, easy_transfer\n"


def test_three_answers_in_a_group_of_a_four_item_model_name_the_item_and_the_group(tmp_path):
    """Re-check s17, N1: 'easy_transfer' answered by 3 of south's rows under a one-factor model of four items: exit 3
    'not identified' naming loadings and variances of other items (this seed); now a refusal before estimation
    naming the item, the group and the rows, exit 2, no file written."""
    frame = pd.read_csv(DATA)
    south = frame.index[frame["district"] == "south"]
    keep = np.random.default_rng(5).choice(south, 3, replace=False)  # the rows of the re-check's repro
    frame.loc[south.difference(keep), "easy_transfer"] = np.nan
    path, model, out = tmp_path / "few.csv", tmp_path / "one.cfa", tmp_path / "out.json"
    frame.to_csv(path, index=False)
    model.write_text(ONE_FACTOR)
    done = run("fit", str(model), "--data", str(path), "--group-column", "district", "--json", str(out))
    assert done.returncode == 2, done.stderr
    assert "not identified" not in done.stderr and "loading(" not in done.stderr
    rows = ", ".join(str(i + 2) for i in sorted(keep))  # the file's rows, its names row 1
    assert (f"few.csv (group south of 'district'): 'easy_transfer' has only 3 answers in this group (rows {rows}); "
            f"full-information ML needs at least 5 answers") in done.stderr  # 4 items analysed: one more
    assert len(done.stderr.strip().splitlines()) == 1 and not out.exists()


def test_no_more_answers_than_variables_in_one_sample_are_refused_too():
    frame = pd.read_csv(DATA)
    frame.loc[frame.index[2:], "clean"] = np.nan
    with pytest.raises(DataError, match=r"'clean' has only 2 answers \(rows labelled 0, 1\); full-information ML needs at least 13"):
        cfa_tool.fit(MODEL, frame)
    frame = pd.read_csv(DATA)
    frame.loc[frame.index[12:], "clean"] = np.nan
    with pytest.raises(DataError, match=r"'clean' has only 12 answers .*; full-information ML needs at least 13"):
        cfa_tool.fit(MODEL, frame)


def test_complete_rows_few_because_of_one_item_are_not_called_sums_of_others():
    """5 answers of 'easy_transfer' in south (one more than the four items: accepted) leave 5 complete rows, whose
    answers on a five-point scale happen to be exact combinations of each other (the rows drawn below, the re-check's
    repro): the refusal names the few answers of that item as the likely cause, not items that sum others."""
    frame = pd.read_csv(DATA)
    south = frame.index[frame["district"] == "south"]
    keep = np.random.default_rng(0).choice(south, 5, replace=False)
    frame.loc[south.difference(keep), "easy_transfer"] = np.nan
    with pytest.raises(DataError) as refused:
        cfa_tool.fit(ONE_FACTOR, frame, group="district")
    text = str(refused.value)
    assert "in the 5 rows that answer all 4 items, which so few rows can be by chance" in text
    assert "only 5 of the 230 rows in this group answer 'easy_transfer'" in text  # south's 230 rows, 5 kept above
    assert "sum of others" not in text and "take 'easy_transfer' out of the model" in text
