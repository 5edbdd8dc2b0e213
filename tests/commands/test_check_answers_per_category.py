"""``check`` before an ordinal fit: the answers per category of every item (new-user trial s15, finding 13), with
the data file's value labels as the categories' names, empty and sparse categories marked, per group; and an
ordinal check lists every problem that stops the fit, each with its place, then exits with 2 (a fit stops at the
first).  The data are simulated here with a fixed seed (invented pupils of invented schools); the counts are checked
against pandas' own count of the same column (value_counts), not against the tool's."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pyreadstat
import pytest

import cfa_tool
from cfa_tool.cli import main

MODEL = "factor mood: m1, m2, m3, m4\n"
LABELS = {1.0: "never", 2.0: "sometimes", 3.0: "often", 4.0: "always"}


def _answers(n: int = 240, seed: int = 11) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    f = rng.normal(size=n)
    cuts = np.array([-1.0, 0.0, 1.0])
    items = {f"m{k + 1}": (np.searchsorted(cuts, 0.7 * f + rng.normal(scale=0.7, size=n)) + 1).astype(float)
             for k in range(4)}
    return pd.DataFrame({"school": np.repeat([1.0, 2.0, 3.0], n // 3), **items})


def test_counts_labels_and_marks_against_pandas(tmp_path, capsys):
    data = _answers()
    data.loc[3, "m2"] = 4.0
    data.loc[data.m2 == 4.0, "m2"] = 3.0  # m2 never 'always'
    data.loc[data.m2 == 3.0, "m2"] = [4.0, 4.0] + [3.0] * (int((data.m2 == 3.0).sum()) - 2)  # 'always' twice: few
    path = tmp_path / "pupils.sav"
    pyreadstat.write_sav(data, str(path), variable_value_labels={f"m{k}": LABELS for k in range(1, 5)})
    (tmp_path / "m.cfa").write_text(MODEL)
    found = cfa_tool.check(str(tmp_path / "m.cfa"), str(path))
    (counts,) = found.answers
    assert counts.codes == (1.0, 2.0, 3.0, 4.0)
    for i, name in enumerate(counts.items):  # the reference: pandas' count of the column
        expected = data[name].value_counts()
        assert counts.counts[i] == tuple(int(expected.get(c, 0)) for c in counts.codes)
    assert counts.sparse(1, 3) and counts.flagged(1) and not counts.flagged(0)
    code = main(["check", str(tmp_path / "m.cfa"), "--data", str(path), "--markdown", str(tmp_path / "c.md")])
    out = capsys.readouterr().out
    assert code == 0
    assert "Answers per category" in out and "1 never" in out and "4 always" in out  # labels head the columns
    assert "2 (1%) few" in out  # m2's two 'always' answers, marked
    assert "Answers per category" in (tmp_path / "c.md").read_text()


def test_no_table_for_items_of_many_values(tmp_path):
    rng = np.random.default_rng(3)
    f = rng.normal(size=200)
    data = pd.DataFrame({f"m{k}": f + rng.normal(size=200) for k in range(1, 5)})
    assert cfa_tool.check(MODEL, data).answers == ()


def test_ordinal_check_lists_every_problem_then_exits_2(tmp_path, capsys):
    data = _answers()
    data.loc[data.school == 2.0, "m1"] = data.loc[data.school == 2.0, "m1"].replace(1.0, 2.0)  # school 2: no 1 on m1
    data.loc[data.school == 3.0, "m3"] = data.loc[data.school == 3.0, "m3"].replace(4.0, 3.0)  # school 3: no 4 on m3
    data.loc[5, "m2"] = 2.5  # a fractional answer in row 7 of the file (row 1: the names)
    data.loc[100, "m4"] = 1.5  # and another, in another item, row 102
    path = tmp_path / "pupils.csv"
    data.to_csv(path, index=False)
    (tmp_path / "m.cfa").write_text(MODEL)
    before = path.read_bytes()
    code = main(["check", str(tmp_path / "m.cfa"), "--data", str(path), "--group-column", "school",
                 "--ordinal", "all", "--json", str(tmp_path / "c.json")])
    captured = capsys.readouterr()
    assert code == 2 and path.read_bytes() == before
    assert "3 problems in the data stop an ordinal fit" in captured.err
    out = " ".join(captured.out.replace("│", " ").replace("┃", " ").split())
    # each problem with its place: the two rows of fractional answers, and both groups' empty categories at once
    assert "ordinal item 'm2' has the answer 2.5 in row 7" in out
    assert "ordinal item 'm4' has the answer 1.5 in row 102" in out
    assert "category 1 of 'm1'" in out and "category 4 of 'm3'" in out
    assert out.index("stop an ordinal fit") < out.index("Model check")  # first, before the check's lines
    saved = json.loads((tmp_path / "c.json").read_text())
    assert len(saved["stops_an_ordinal_fit"]) == 3 and len(saved["answers_per_category"]) == 3  # three schools
    # each group's table marks its empty category: school 2's m1 answered no 1 (other schools did)
    assert "none" in out
    fitted = pytest.raises(cfa_tool.errors.DataError, cfa_tool.fit, MODEL, data, group="school", ordinal="all")
    assert "2.5" in str(fitted.value) and "1.5" not in str(fitted.value)  # the fit: the first problem only


def test_ordinal_option_of_check_cannot_apply_to_summary_statistics(tmp_path, capsys):
    from cfa_tool.errors import OptionError

    cov = pd.DataFrame(np.eye(4), index=list("abcd"), columns=list("abcd"))
    path = tmp_path / "cov.csv"
    cov.to_csv(path)
    with pytest.raises((OptionError, cfa_tool.errors.DataError)):
        cfa_tool.check("factor f: a, b, c, d\n", str(path), ordinal="all")
