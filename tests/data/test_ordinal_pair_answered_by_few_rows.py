"""An ordinal pair answered together by only a few rows of a group: the refusal names the pair, the group and the
rows answering both, and offers what works (re-check s17, N2: 2 of south's 230 rows answered both items; the message
said 'not positive definite ... categories nearly empty' and offered listwise deletion, which keeps those 2 rows; with
the two rows answering in opposite directions, the items were said to 'give (nearly) the same answers')."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError
from tests.commands.test_cli import run

ROOT = Path(__file__).resolve().parents[2]
DATA = ROOT / "demo" / "rider_survey.csv"  # invented rider survey, simulated with a fixed seed
ITEMS = ("on_time", "short_wait", "accurate_info", "easy_transfer")
MODEL = "factor transit: " + ", ".join(ITEMS) + "\n"


def split_ballot(first: tuple[int, int] | None = None, second: tuple[int, int] | None = None) -> pd.DataFrame:
    """South's rows split in halves, one answering 'on_time' only, the other 'easy_transfer' only, except its first
    two rows, which answer both with the answers given (on_time, easy_transfer; None: the demo's own)."""
    frame = pd.read_csv(DATA)
    south = frame.index[frame["district"] == "south"]
    half = len(south) // 2
    frame.loc[south[2:half], "easy_transfer"] = np.nan
    frame.loc[south[half:], "on_time"] = np.nan
    for row, answers in ((south[0], first), (south[1], second)):
        if answers is not None:
            frame.loc[row, ["on_time", "easy_transfer"]] = answers
    return frame


@pytest.mark.parametrize("answers, said", [
    (((5, 1), (5, 1)), "the polychoric correlation matrix is not positive definite: only 2"),
    (((1, 5), (1, 5)), "correlate -.999, yet only 2"),  # two rows answering alike are no near duplicates
])
def test_the_pair_its_group_and_its_rows_are_named(tmp_path, answers, said):
    frame = split_ballot(*answers)
    south = frame[frame["district"] == "south"]
    both = south.index[south["on_time"].notna() & south["easy_transfer"].notna()]  # counted by pandas
    assert len(both) == 2 and len(south) == 230
    with pytest.raises(DataError) as refused:
        cfa_tool.fit(MODEL, frame, group="district", ordinal="all")
    text = str(refused.value)
    assert "(group south of 'district')" in text and said in text
    assert (f"only 2 (rows labelled {both[0]}, {both[1]}) of the 230 rows analysed answer both 'on_time' and "
            f"'easy_transfer'") in text
    assert "listwise" not in text and "nearly empty" not in text and "same answers" not in text
    assert "take 'on_time' or 'easy_transfer' out of the model, leave this group out with a row filter" in text
    path, model, out = tmp_path / "ballot.csv", tmp_path / "one.cfa", tmp_path / "out.json"
    frame.to_csv(path, index=False)
    model.write_text(MODEL)
    done = run("fit", str(model), "--data", str(path), "--group-column", "district", "--ordinal", "all",
               "--json", str(out))
    assert done.returncode == 2, done.stderr
    assert f"rows {both[0] + 2}, {both[1] + 2}) of the 230 rows analysed answer both" in done.stderr  # names row 1
    assert "--keep" in done.stderr and "--incomplete-rows" not in done.stderr
    assert len(done.stderr.strip().splitlines()) == 1 and not out.exists()


def three_pairs(seed: int, complete: int) -> pd.DataFrame:
    """Three ordinal items whose pairs are answered by different rows (300 each) at correlations .9, .9 and -.9,
    which no one correlation matrix has, and ``complete`` rows answering all three (independent answers)."""
    rng = np.random.default_rng(seed)
    cuts = np.array([-1.0, -0.3, 0.3, 1.0])

    def pair(rho: float) -> np.ndarray:
        z = rng.multivariate_normal([0, 0], [[1, rho], [rho, 1]], size=300)
        return np.searchsorted(cuts, z).astype(float) + 1

    codes = np.full((900 + complete, 3), np.nan)
    codes[:300, [0, 1]] = pair(0.9)
    codes[300:600, [1, 2]] = pair(0.9)
    codes[600:900, [0, 2]] = pair(-0.9)
    codes[900:] = np.searchsorted(cuts, rng.normal(size=(complete, 3))) + 1
    return pd.DataFrame(codes, columns=["a", "b", "c"])


def test_listwise_deletion_is_offered_with_the_complete_rows_it_keeps():
    """Without a pair answered by few rows, a correlation matrix that is not positive definite with gaps is still
    offered listwise deletion, now with the number of complete rows it keeps."""
    from cfa_tool.data.polychoric import ordinal_moments

    with pytest.raises(DataError) as refused:
        ordinal_moments(three_pairs(3, 40), ("a", "b", "c"), "<data frame>", pairwise=True)
    text = str(refused.value)
    assert "not positive definite" in text and "rows analysed answer both" not in text
    assert "uses the 40 complete rows only" in text  # the 40 rows given every answer above


def test_listwise_deletion_is_not_offered_when_it_keeps_too_few_rows():
    from cfa_tool.data.polychoric import ordinal_moments

    with pytest.raises(DataError) as refused:  # no complete row: listwise deletion keeps nothing
        ordinal_moments(three_pairs(4, 0), ("a", "b", "c"), "<data frame>", pairwise=True)
    assert "not positive definite" in str(refused.value) and "listwise" not in str(refused.value)


def test_the_refusal_without_complete_rows_names_the_items_whose_pairs_come_from_different_rows():
    """Hostile trial s25, finding 7: with no complete row the refusal blamed near duplicates or nearly empty
    categories (no correlation is near 1; every category has dozens of rows) and named no item.  By construction
    (:func:`three_pairs`) the pairs of a, b and c come from three sets of 300 rows, none answering all three."""
    from cfa_tool.data.polychoric import ordinal_moments

    with pytest.raises(DataError) as refused:
        ordinal_moments(three_pairs(4, 0), ("a", "b", "c"), "<data frame>", pairwise=True)
    text = str(refused.value)
    assert "near duplicates" not in text and "nearly empty" not in text
    assert "the correlations of 'a', 'b', and 'c' come from the rows that answered each pair" in text
    assert "(300 rows)" in text and "no row answered all of them" in text  # each pair's 300 rows, none of all three
    assert "leave one of those items out of the model" in text


def test_check_of_ordinal_items_does_not_say_a_full_information_fit_stops():
    """An ordinal fit keeps rows with gaps pairwise and runs; its check said the saturated model of full-information
    ML could not be estimated and 'a fit of these rows stops' (re-check s17, N2 neighbour).  The pair answered by few
    rows stays a caution."""
    from cfa_tool.assessment.admissibility import ProblemKind

    frame = split_ballot()
    assert cfa_tool.fit(MODEL, frame, group="district", ordinal="all").converged
    found = cfa_tool.check(MODEL, frame, group="district", ordinal="all")
    kinds = [p.kind for p in found.problems]
    assert ProblemKind.SPARSE_ANSWERS not in kinds and ProblemKind.FEW_ANSWERED_TOGETHER in kinds
    assert not any("stops" in str(p.explanation) for p in found.problems)
    # continuous items: the same rows leave full-information ML's saturated model without a maximum, as said before
    continuous = cfa_tool.check(MODEL, frame, group="district")
    assert ProblemKind.SPARSE_ANSWERS in [p.kind for p in continuous.problems]
