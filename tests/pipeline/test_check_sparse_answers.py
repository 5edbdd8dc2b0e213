"""``check``, the data screen run first, reports rows whose gaps leave full-information ML's saturated model without
an estimate (a pair of items no row answers together; answers so sparse that EM finds no maximum) with a caution
naming the items, then stops with the fit's line (exit 2) where a fit of them stops on the data.  Check values are planted by construction:
in the first data set x1 and x2 are never answered by one row; in the second each of 15 rows answers exactly one pair
of 6 items, so every pair is answered together by one row and no row answers all 6."""

from __future__ import annotations

import itertools

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.cli import main
from cfa_tool.errors import DataError


def _never_together() -> pd.DataFrame:
    rng = np.random.default_rng(5)
    factor = rng.normal(size=200)
    data = pd.DataFrame({f"x{j}": 0.8 * factor + rng.normal(scale=0.6, size=200) for j in range(1, 5)})
    data.loc[:99, "x1"] = np.nan  # rows 0-99 lack x1, rows 100-199 lack x2
    data.loc[100:, "x2"] = np.nan
    return data


def _one_pair_per_row() -> pd.DataFrame:
    rng = np.random.default_rng(7)
    rows = []
    for a, b in itertools.combinations(range(6), 2):
        row = [np.nan] * 6
        row[a], row[b] = rng.normal(), rng.normal()
        rows.append(row)
    return pd.DataFrame(rows, columns=[f"x{j}" for j in range(1, 7)])


def test_a_pair_never_answered_together_is_a_caution_of_check_and_stops_the_fit():
    data = _never_together()
    with pytest.raises(DataError, match="no row answers both 'x1' and 'x2'"):
        cfa_tool.fit("factor f: x1..x4\n", data)
    found = cfa_tool.check("factor f: x1..x4\n", data)
    sparse = [p for p in found.problems if p.kind is ProblemKind.SPARSE_ANSWERS]
    assert len(sparse) == 1 and sparse[0].value == 1
    assert sparse[0].explanation.startswith("No row answers both 'x1' and 'x2', so their covariance has no data")
    assert "missing='listwise'" in sparse[0].advice and "would keep 0 complete rows" in sparse[0].advice
    assert (found.rows, found.complete, found.with_gaps) == (200, 0, 200)


def test_answers_too_sparse_for_em_are_a_caution_with_the_least_answered_pair(tmp_path, capsys):
    data = _one_pair_per_row()
    # each item answered by 5 rows, by construction: no more than the 6 variables (data.moments.fewest_answers; re-check
    # s17), a data problem (exit 2) named before estimation
    with pytest.raises(DataError, match="'x1' has only 5 answers .*needs at least 7 answers"):
        cfa_tool.fit("factor f: x1..x6\n", data)
    found = cfa_tool.check("factor f: x1..x6\n", data)
    sparse, = [p for p in found.problems if p.kind is ProblemKind.SPARSE_ANSWERS]
    assert sparse.value == 1  # each pair answered together by one row, by construction
    assert "(only 5 rows answer 'x1', and it needs more answers than the 6 variables analysed)" in sparse.explanation
    assert ("the fewest rows answering a pair of items are 1 ('x1' and 'x2'), and 0 of the 15 rows answer all 6 "
            "items") in sparse.explanation
    path, model = tmp_path / "pairs.csv", tmp_path / "m.cfa"
    data.to_csv(path, index=False)
    model.write_text("factor f: x1..x6\n")
    code = main(["check", str(model), "--data", str(path)])
    out = capsys.readouterr()
    # every finding reported, then the line the fit stops with and its exit code (plan s23: check refuses what fit
    # refuses, with the same line)
    assert code == 2, out.err
    assert out.err.startswith(f"cfa-tool: {path}: 'x1' has only 5 answers (rows 2, 3, 4, 5, 6); full-information ML "
                              f"needs at least 7 answers"), out.err
    flat = " ".join(out.out.split()).replace("│ ", "").replace(" │", "")
    assert "answer too few items together for the saturated model of full-information ML" in flat
    # check takes no --incomplete-rows: the option is a fit's (options.TAKEN_BY; s28)
    assert "(a fit of the model with --incomplete-rows listwise) would keep 0 complete rows" in flat


def test_a_group_whose_pair_is_never_answered_together_is_named():
    rng = np.random.default_rng(11)
    whole = _never_together().assign(site="north")
    other = pd.DataFrame({f"x{j}": rng.normal(size=120) for j in range(1, 5)}).assign(site="south")
    found = cfa_tool.check("factor f: x1..x4\n", pd.concat([whole, other], ignore_index=True), group="site")
    sparse = [p for p in found.problems if p.kind is ProblemKind.SPARSE_ANSWERS]
    assert [p.group for p in sparse] == ["north"]
    assert sparse[0].explanation.startswith("No row answers both 'x1' and 'x2'")  # the views name the group first
    assert "or leave the group out with a row filter (keep=...)" in sparse[0].advice
    assert found.group_rows == (200, 120)


@pytest.mark.parametrize("group", [None, "site"])
def test_check_estimates_the_saturated_moments_of_rows_with_gaps_once(monkeypatch, group):
    """The EM estimate of the saturated model (Dempster, Laird & Rubin 1977) is run once per group by a check whose
    rows have gaps: the moments are computed once and the caution on sparse answers is asked only when they cannot
    be estimated.  The rows are planted: rows 0-40 lack x1 and rows 60-90 lack x3, so 72 of 300 have a gap."""
    import cfa_tool.data.em as em

    runs = []
    original = em.em_saturated

    def counted(*args, **kwargs):
        runs.append(1)
        return original(*args, **kwargs)

    monkeypatch.setattr(em, "em_saturated", counted)
    rng = np.random.default_rng(1)
    factor = rng.normal(size=300)
    data = pd.DataFrame({f"x{j}": 0.8 * factor + rng.normal(scale=0.6, size=300) for j in range(1, 5)})
    data.loc[:40, "x1"] = np.nan
    data.loc[60:90, "x3"] = np.nan
    data["site"] = np.where(np.arange(300) % 2, "north", "south")
    found = cfa_tool.check("factor f: x1..x4\n", data, group=group)
    assert not [p for p in found.problems if p.kind is ProblemKind.SPARSE_ANSWERS]
    assert (found.rows, found.complete, found.with_gaps) == (300, 228, 72)  # 41 + 31 rows with one gap each
    assert len(runs) == (1 if group is None else 2)
