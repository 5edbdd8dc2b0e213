"""A start value on a factor mean that a plain fit with groups fixes at 0 (the intercepts not held equal) cannot
apply: it is an error naming the statement's line and why, as every start on a fixed parameter is
(tests/model/test_starts_on_fixed.py).  It was ignored without a word, since the invariance ladder and the
population of a power study with groups read it; those routes still take it."""

from __future__ import annotations

import pytest

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.errors import ModelError
from tests.conftest import THREE_FACTORS

WITH_START = THREE_FACTORS + "start mean(visual) = 0.2\n"
LINE = len(THREE_FACTORS.splitlines()) + 1


def test_a_plain_fit_in_groups_refuses_a_start_on_a_mean_fixed_at_0(hs_data):
    with pytest.raises(ModelError, match=r"mean\(visual\) is fixed at 0 in every group: a factor's mean is estimated "
                                         r"only in the groups after the first") as info:
        cfa_tool.fit(WITH_START, hs_data, group="school")
    assert info.value.location.line == LINE
    with pytest.raises(ModelError, match=r"mean\(visual\) is fixed at 0 in every group"):
        cfa_tool.compare([WITH_START, WITH_START + "covary x1, x4\n"], hs_data, group="school")


def test_the_command_line_names_the_line_and_exits_2(hs_data, tmp_path, capsys):
    hs_data.to_csv(tmp_path / "hs.csv", index=False)
    (tmp_path / "m.cfa").write_text(WITH_START, encoding="utf-8")
    code = main(["fit", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "hs.csv"), "--group-column", "school"])
    err = capsys.readouterr().err
    assert code == 2 and "Traceback" not in err
    assert f"m.cfa:{LINE}:7: mean(visual) is fixed at 0 in every group" in err


def test_with_intercepts_held_equal_the_start_applies(hs_data):
    fitted = cfa_tool.fit(WITH_START + "invariance scalar\n", hs_data, group="school")
    assert fitted.converged


def test_the_invariance_ladder_still_reads_it(hs_data):
    """The configural and metric steps fix the means at 0 and the scalar step frees them: the start is not refused,
    and the ladder is the one the model without the start gives (a start value moves where the search begins,
    not where it ends)."""
    with_start = cfa_tool.invariance(WITH_START, hs_data, "school", partial="none")
    without = cfa_tool.invariance(THREE_FACTORS, hs_data, "school", partial="none")
    assert [s.level for s in with_start.steps] == [s.level for s in without.steps]
    for a, b in zip(with_start.steps, without.steps):
        assert a.result.fit.chi_square == pytest.approx(b.result.fit.chi_square, rel=1e-6)
