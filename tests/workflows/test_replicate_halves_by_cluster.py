"""replicate --data with --cluster (and --strata): random halves that split clusters make the halves dependent (rows of
one household or school answer alike), so with a cluster column whole clusters go to each half, within each stratum
with a strata column (data.halves.draw_cluster_halves); the report, the JSON and the methods paragraph say how the
halves were drawn and that the rows within each half are still taken as independent.  Holzinger & Swineford (1939)
rows in invented clusters of five pupils within each school (the strata)."""

from __future__ import annotations

import json

import numpy as np
import pytest

from cfa_tool.data.halves import draw_cluster_halves, draw_halves
import cfa_tool
from cfa_tool.data.halves import RandomHalf
from cfa_tool.errors import DataError, OptionError
from cfa_tool.reporting.paragraph import replication_paragraph
from cfa_tool.workflows.replication import Replications, split_half
from tests.conftest import THREE_FACTORS, run_cli


@pytest.fixture(scope="module")
def clustered(hs_data):
    data = hs_data.reset_index(drop=True)
    return data.assign(unit=data["school"] + "-" + (data.groupby("school").cumcount() // 5).astype(str))


def _units_of(data, numbers) -> list:
    where = dict(zip(data.index.tolist(), data["unit"]))  # a data frame's rows are named by its index labels
    return [where[n] for n in numbers]


@pytest.mark.parametrize("count", [7, 10, 301])
@pytest.mark.parametrize("seed", [1, 17])
def test_one_row_per_cluster_draws_the_row_by_row_halves(count, seed):
    drawn = draw_cluster_halves(np.arange(count), None, seed)
    for mine, rows in zip(drawn, draw_halves(count, seed)):
        assert np.array_equal(mine, rows)


def test_every_cluster_falls_in_one_half_and_each_stratum_is_split_in_turn():
    strata = np.repeat([0, 1, 2, 3], [30, 25, 21, 40])
    units = np.concatenate([np.arange(s.sum()) // 3 + 100 * h for h, s in enumerate([strata == h for h in range(4)])])
    first, second = draw_cluster_halves(units, strata, 5)
    assert len(first) + len(second) == len(units) and not set(units[first]) & set(units[second])
    extra = []
    for h in range(4):  # clusters per stratum: 10, 9, 7, 14; the odd strata give their extra cluster in turn
        a, b = len(set(units[first][strata[first] == h])), len(set(units[second][strata[second] == h]))
        assert abs(a - b) <= 1 and a + b == len(set(units[strata == h]))
        if a != b:
            extra.append(a > b)
    assert extra == [True, False]  # strata 1 and 2: the first half, then the second
    assert np.array_equal(draw_cluster_halves(units, strata, 5)[0], first)  # the seed decides
    assert not np.array_equal(draw_cluster_halves(units, strata, 6)[0], first)


def test_split_half_by_cluster_keeps_each_cluster_in_one_half(clustered):
    pair = split_half(THREE_FACTORS, clustered, seed=3, cluster="unit", strata="school")
    split = pair[0].split
    a, b = _units_of(clustered, split.half_a), _units_of(clustered, split.half_b)
    assert not set(a) & set(b) and len(a) + len(b) == len(clustered)
    assert split.units == (len(set(a)), len(set(b)))
    for school in ("Pasteur", "Grant-White"):  # within each stratum: its clusters split in two
        ka = len({u for u in a if u.startswith(school)})
        kb = len({u for u in b if u.startswith(school)})
        assert abs(ka - kb) <= 1
    record = split.to_dict()
    assert record["cluster_column"] == "unit" and record["strata_column"] == "school"
    assert record["drawn"] == "drawn cluster by cluster (whole clusters of unit to each half, within the strata of school)"
    text = " ".join(Replications(pair).summary().split())
    assert "The halves are drawn cluster by cluster within each stratum of school: every row of a cluster of unit" in text
    assert "still take the rows as independent" in text
    paragraph = replication_paragraph(Replications(pair))
    assert "two random halves, drawn cluster by cluster (whole clusters of unit to each half" in paragraph
    assert "within each half the rows were taken as independent" in paragraph


def test_clusters_of_one_row_give_the_row_by_row_halves(clustered):
    by_row = split_half(THREE_FACTORS, clustered, seed=4)[0]
    each = split_half(THREE_FACTORS, clustered.assign(one=np.arange(len(clustered))), seed=4, cluster="one")[0]
    assert each.split.half_a == by_row.split.half_a and each.split.half_b == by_row.split.half_b
    assert each.same_solution.chi_square_difference == pytest.approx(by_row.same_solution.chi_square_difference,
                                                                     rel=1e-12)
    assert "drawn row by row" in replication_paragraph(Replications((by_row,)))


def test_strata_alone_split_each_stratums_rows(clustered):
    split = split_half(THREE_FACTORS, clustered, seed=2, strata="school")[0].split
    school = dict(zip(clustered.index.tolist(), clustered["school"]))
    for name in ("Pasteur", "Grant-White"):
        a = sum(school[n] == name for n in split.half_a)
        b = sum(school[n] == name for n in split.half_b)
        assert abs(a - b) <= 1
    assert split.drawn_phrase == "drawn row by row within the strata of school"
    assert split.how_drawn().startswith("the halves are drawn row by row within each stratum of school, so rows of one")


def test_a_cluster_across_strata_and_a_single_cluster_are_one_line_errors(clustered):
    from cfa_tool.errors import DataError

    with pytest.raises(DataError, match="lies in more than one stratum"):
        split_half(THREE_FACTORS, clustered.assign(unit=np.arange(len(clustered)) // 5), cluster="unit",
                   strata="school")
    with pytest.raises(DataError, match="names a single cluster among the rows split"):
        split_half(THREE_FACTORS, clustered.assign(unit="all"), cluster="unit")
    with pytest.raises(OptionError, match="cluster must name a column"):
        split_half(THREE_FACTORS, clustered, cluster="")


def test_the_command_line_draws_by_cluster_and_refuses_what_cannot_apply(clustered, tmp_path, capsys):
    model, data, out = tmp_path / "m.cfa", tmp_path / "d.csv", tmp_path / "r.json"
    model.write_text(THREE_FACTORS)
    clustered.to_csv(data, index=False)
    code, _, _ = run_cli(["replicate", str(model), "--data", str(data), "--cluster", "unit", "--strata", "school",
                          "--json", str(out)], capsys)
    assert code == 0
    written = json.loads(out.read_text())
    assert "drawn cluster by cluster" in json.dumps(written)
    with pytest.raises(SystemExit) as parsed:  # refused while the command line is read
        run_cli(["replicate", str(model), "--data", str(data), "--weights", "ageyr"], capsys)
    err = capsys.readouterr().err
    assert parsed.value.code == 2 and "--weights cannot apply" in err and len(err.strip().splitlines()) == 1, err
    code, _, err = run_cli(["replicate", str(model), "--calibration", str(data), "--validation", str(data),
                            "--cluster", "unit"], capsys)
    assert code == 2 and "--calibration and --validation are split already" in err
    assert len(err.strip().splitlines()) == 1, err


def test_halves_drawn_by_cluster_are_saved_and_read_back_as_drawn(clustered, tmp_path, capsys):
    # the halves file records each row's cluster and stratum, by which --half draws the halves again to check them;
    # the half read back is the rows replicate's calibration fit of half A analysed
    import pandas as pd

    model, data, halves = tmp_path / "m.cfa", tmp_path / "d.csv", tmp_path / "h.csv"
    model.write_text(THREE_FACTORS)
    clustered.to_csv(data, index=False)
    out = tmp_path / "r.json"
    code, _, err = run_cli(["replicate", str(model), "--data", str(data), "--cluster", "unit", "--strata", "school",
                            "--seed", "5", "--halves-file", str(halves), "--json", str(out)], capsys)
    assert code == 0, err
    saved = pd.read_csv(halves, keep_default_na=False)
    assert list(saved.columns[-4:]) == ["cluster_column", "cluster", "strata_column", "stratum"]
    assert (saved.groupby("cluster")["half"].nunique() == 1).all()  # every cluster in one half
    units = dict(zip(range(2, len(clustered) + 2), clustered["unit"]))  # file rows: the header is row 1
    assert all(units[r] == c for r, c in zip(saved["row"], saved["cluster"]))
    half_a = cfa_tool.fit(THREE_FACTORS, str(data), keep=[RandomHalf(str(halves), "A")])
    written = json.loads(out.read_text())
    assert half_a.n_obs == int((saved["half"] == "A").sum())
    assert half_a.fit.chi_square == pytest.approx(written["replications"][0]["calibration"]["fit"]["chi_square"],
                                                  rel=1e-10)
    edited = saved.copy()  # two rows of one cluster moved to the other half: not as drawn
    row = edited.index[edited["cluster"] == edited["cluster"].iloc[0]]
    edited.loc[row, "half"] = edited.loc[row, "half"].map({"A": "B", "B": "A"})
    edited.to_csv(tmp_path / "edited.csv", index=False)
    with pytest.raises(DataError, match="its halves are not those seed 5 draws from its 301 rows") as refused:
        cfa_tool.fit(THREE_FACTORS, str(data), keep=[RandomHalf(str(tmp_path / "edited.csv"), "A")])
    assert "--cluster unit --strata school" in str(refused.value)
    with pytest.raises(DataError, match="holds halves drawn by the column 'unit', which"):  # read under another name
        cfa_tool.fit(THREE_FACTORS, str(data), rename={"unit": "household"}, keep=[RandomHalf(str(halves), "A")])


@pytest.mark.parametrize("by", [("--cluster", "unit", "--strata", "school"), ("--strata", "school")])
def test_halves_drawn_by_labelled_codes_of_a_stata_file_are_read_back(clustered, tmp_path, capsys, by):
    # new-user trial s18: a Stata file whose cluster and strata columns hold codes with value labels; the halves file
    # recorded the labels ('School 01'), --half compared the codes ('1') and refused, advising to write the halves
    # again, which wrote the same file.  Written and read by one rule: the codes read as their labels.
    pyreadstat = pytest.importorskip("pyreadstat")
    data, halves, model = tmp_path / "d.dta", tmp_path / "h.csv", tmp_path / "m.cfa"
    model.write_text(THREE_FACTORS)
    units = {u: k + 1 for k, u in enumerate(dict.fromkeys(clustered["unit"]))}
    schools = {s: k + 1 for k, s in enumerate(dict.fromkeys(clustered["school"]))}
    coded = clustered[[f"x{i}" for i in range(1, 10)]].assign(unit=clustered["unit"].map(units),
                                                               school=clustered["school"].map(schools))
    pyreadstat.write_dta(coded, str(data), variable_value_labels={
        "unit": {code: f"Unit {name}" for name, code in units.items()},
        "school": {code: f"School {name}" for name, code in schools.items()}})
    code, _, err = run_cli(["replicate", model, "--data", data, "--seed", "5", *by, "--halves-file", halves], capsys)
    assert code == 0, err
    import pandas as pd

    saved = pd.read_csv(halves, keep_default_na=False)
    assert saved["stratum"].str.startswith("School ").all()  # the labels are what the file records
    for half in ("A", "B"):
        kept = cfa_tool.fit(THREE_FACTORS, str(data), keep=[RandomHalf(str(halves), half)])
        assert kept.n_obs == int((saved["half"] == half).sum())  # the rows drawn into that half, read back
    code, out, err = run_cli(["explore", "--data", data, "--half", halves, "A", "--factors", "3"], capsys)
    assert code == 0, err


def test_a_half_of_clusters_is_said_to_be_one_in_the_notes_and_the_methods_paragraph(clustered, tmp_path, capsys):
    # new-user trial s18: a half of whole schools was described as "600 of the 1200 rows split at random into two
    # halves" and "the B half of two random halves (seed 11; listed in /tmp/.../h.csv)": a reader could not tell that
    # the confirmation half holds other schools, and the paragraph named a local folder
    from cfa_tool.reporting.paragraph import methods_paragraph

    model, data, halves = tmp_path / "m.cfa", tmp_path / "d.csv", tmp_path / "h.csv"
    model.write_text(THREE_FACTORS)
    clustered.to_csv(data, index=False)
    code, _, err = run_cli(["replicate", model, "--data", data, "--cluster", "unit", "--strata", "school", "--seed",
                            "5", "--halves-file", halves], capsys)
    assert code == 0, err
    result = cfa_tool.fit(THREE_FACTORS, str(data), keep=[RandomHalf(str(halves), "B")])
    paragraph = " ".join(methods_paragraph(result).split())
    assert ("the row fell in half B of two random halves of the clusters of unit, each cluster whole in one half, "
            "drawn within the strata of school with seed 5 and listed in h.csv") in paragraph
    assert str(tmp_path) not in paragraph
    notes = " ".join(" ".join(str(w).split()) for w in result.warnings)
    assert "rows whose clusters of unit were drawn at random into two halves, every row of a cluster in one half, " \
           "within the strata of school" in notes
    assert "split at random into two halves" not in notes
