"""Two codes of an SPSS/Stata group, cluster or strata column that carry one value label (1 and 3 both 'north', or
'north' and 'north ' with a trailing space) are one group, cluster or stratum, said in a note naming the codes; no
row is analysed twice, and a count of rows that exceeds the rows read stops the run as an internal error."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.labels import shared_labels
from cfa_tool.errors import InternalError, check_rows_counted

pyreadstat = pytest.importorskip("pyreadstat")

MODEL = "factor f: y1, y2, y3, y4\n"


def _frame(n: int = 300, seed: int = 23) -> pd.DataFrame:
    """One factor, four indicators (simulated, fixed seed); a district coded 1 (north), 2 (south) and 3, every
    third row of the north coded 3."""
    rng = np.random.default_rng(seed)
    f = rng.normal(size=n)
    frame = pd.DataFrame({f"y{j}": np.round(0.8 * f + rng.normal(scale=0.6, size=n), 3) for j in range(1, 5)})
    code = np.where(np.arange(n) % 2 == 0, 1.0, 2.0)
    code[(np.arange(n) % 3 == 0) & (code == 1.0)] = 3.0
    frame["dcode"] = code
    return frame


@pytest.fixture(scope="module", params=["north", "north "])
def shared_file(request, tmp_path_factory) -> tuple[str, pd.DataFrame]:
    frame = _frame()
    path = tmp_path_factory.mktemp("shared") / "district.sav"
    pyreadstat.write_sav(frame, str(path), variable_value_labels={"dcode": {1: "north", 2: "south", 3: request.param}})
    return str(path), frame


def _north_south(frame: pd.DataFrame) -> tuple[int, int]:
    return int(frame["dcode"].isin([1.0, 3.0]).sum()), int((frame["dcode"] == 2.0).sum())


def test_two_codes_with_one_label_are_one_group_of_fit_with_a_note(shared_file):
    path, frame = shared_file
    north, south = _north_south(frame)
    assert (north, south) == (150, 150)  # counted by the data as written, not by the tool
    fitted = cfa_tool.fit(MODEL, path, group="dcode")
    assert [g.label for g in fitted.groups] == ["north", "south"]
    assert [g.data.n_obs for g in fitted.groups] == [north, south]
    assert fitted.n_obs == len(frame) and fitted.data.rows_read == len(frame)
    assert fitted.data.without_group == 0
    said = [w for w in fitted.warnings if "carry the same value label" in w]
    assert said == ["in the group column 'dcode', codes 1 and 3 carry the same value label 'north' and were read as "
                    "one group; if they are different groups, give them different value labels in the data file"]
    # the same rows as a plain file whose north rows are written 'north': the same fit
    plain = frame.assign(dcode=np.where(frame["dcode"] == 2.0, "south", "north"))
    reference = cfa_tool.fit(MODEL, plain, group="dcode")
    assert fitted.fit.chi_square == pytest.approx(reference.fit.chi_square, rel=1e-9)
    assert fitted.fit.df == reference.fit.df


def test_invariance_and_check_count_each_row_once(shared_file):
    path, frame = shared_file
    ladder = cfa_tool.invariance(MODEL, path, group="dcode")
    assert ladder.groups == ("north", "south")
    first = ladder.steps[0].result
    assert first.data.rows_read == len(frame) and first.n_obs == len(frame)
    assert cfa_tool.check(MODEL, path, group="dcode").groups == ("north", "south")


def test_a_reference_group_given_by_either_code(shared_file):
    path, _ = shared_file
    assert cfa_tool.fit(MODEL + "invariance scalar\n", path, group="dcode", reference_group="3").groups[0].label == "north"


def test_cluster_codes_with_one_label_are_one_cluster(tmp_path):
    frame = _frame(360, seed=5)
    frame["school"] = (np.arange(len(frame)) % 36 + 1).astype(float)
    labels = {float(k): f"school {k}" for k in range(1, 37)}
    labels[36.0] = "school 1"  # code 36 labelled like code 1: one school
    path = tmp_path / "schools.sav"
    pyreadstat.write_sav(frame, str(path), variable_value_labels={"school": labels})
    fitted = cfa_tool.fit(MODEL, str(path), cluster="school")
    assert fitted.design.clusters == 35
    assert any("codes 1 and 36 carry the same value label 'school 1' and were read as one cluster" in w
               for w in fitted.warnings)


def test_shared_labels_lists_the_codes_of_each_label():
    assert shared_labels({"1": "north", "2": "south", "3": "north"}) == [("north", ["1", "3"])]
    assert shared_labels({"1": "north", "2": "south"}) == []


def test_a_count_beyond_the_rows_read_is_an_internal_error():
    check_rows_counted(480, 480, "here")
    with pytest.raises(InternalError, match="805 rows counted as analysed of 480 read"):
        check_rows_counted(805, 480, "here")
    with pytest.raises(InternalError):
        check_rows_counted(-325, 480, "here")
