"""The invariance ladder over occasions of the same people (workflows.occasions): each step against the same model
written by hand as a wide model and fitted by the tool's own compare (chi-squares equal to 1e-6); simulated people
with a known population (fixed seeds) where metric invariance holds and scalar invariance fails, and where both
hold, the latent mean change then recovered; long and wide data alike; gaps by full-information ML; the errors."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

from cfa_tool.errors import DataError, ModelError, OptionError
from cfa_tool.workflows.compare import compare
from cfa_tool.workflows.occasions import invariance_over_occasions

ONE_OCCASION = "factor vigour: vig1, vig2, vig3, vig4\n"
LOADINGS = np.array([1.0, 0.8, 0.9, 0.7])
INTERCEPTS = np.array([3.0, 3.2, 2.9, 3.1])
MEAN_CHANGE = 0.3  # the population's factor mean at the second occasion (the first's is 0)


def people(n: int, seed: int, intercept_shift=(0.0, 0.0, 0.0, 0.0)) -> pd.DataFrame:
    """Long data of ``n`` people at waves 1 and 2 from a known population: loadings equal at both waves, factor
    variances 1 and 1.2 correlated .6 (covariance .66), residual variances .4 with covariance .1 across the waves,
    intercepts equal but for ``intercept_shift`` at wave 2, factor mean 0 and MEAN_CHANGE."""
    rng = np.random.default_rng(seed)
    cov = np.array([[1.0, 0.66], [0.66, 1.2]])
    eta = rng.multivariate_normal([0.0, MEAN_CHANGE], cov, size=n)
    residual = 0.4 * np.eye(8)
    for i in range(4):
        residual[i, i + 4] = residual[i + 4, i] = 0.1
    e = rng.multivariate_normal(np.zeros(8), residual, size=n)
    first = INTERCEPTS + eta[:, [0]] * LOADINGS + e[:, :4]
    second = INTERCEPTS + np.asarray(intercept_shift) + eta[:, [1]] * LOADINGS + e[:, 4:]
    rows = [{"person_id": f"p{i:04d}", "wave": w, **{f"vig{j + 1}": x[j] for j in range(4)}}
            for i in range(n) for w, x in ((1, first[i]), (2, second[i]))]
    return pd.DataFrame(rows)


def widened(long: pd.DataFrame) -> pd.DataFrame:
    """The long data side by side, written here by pandas alone: vig1_t1 ... vig4_t2."""
    wide = long.pivot(index="person_id", columns="wave", values=[f"vig{j}" for j in range(1, 5)])
    wide.columns = [f"{item}_t{wave}" for item, wave in wide.columns]
    return wide.reset_index()


#: the steps written by hand as wide models (the recipe docs/commands.md gave before the command existed)
BASE = """factor vigour_t1: vig1_t1, vig2_t1, vig3_t1, vig4_t1
factor vigour_t2: vig1_t2, vig2_t2, vig3_t2, vig4_t2
covary vig1_t1, vig1_t2
covary vig2_t1, vig2_t2
covary vig3_t1, vig3_t2
covary vig4_t1, vig4_t2
"""
METRIC = """equal loading(vigour_t1, vig2_t1), loading(vigour_t2, vig2_t2)
equal loading(vigour_t1, vig3_t1), loading(vigour_t2, vig3_t2)
equal loading(vigour_t1, vig4_t1), loading(vigour_t2, vig4_t2)
"""
SCALAR = """equal intercept(vig1_t1), intercept(vig1_t2)
equal intercept(vig2_t1), intercept(vig2_t2)
equal intercept(vig3_t1), intercept(vig3_t2)
equal intercept(vig4_t1), intercept(vig4_t2)
free mean(vigour_t2)
"""
STRICT = """equal variance(vig1_t1), variance(vig1_t2)
equal variance(vig2_t1), variance(vig2_t2)
equal variance(vig3_t1), variance(vig3_t2)
equal variance(vig4_t1), variance(vig4_t2)
"""
BY_HAND = ['name "c"\n' + BASE, 'name "m"\n' + BASE + METRIC, 'name "s"\n' + BASE + METRIC + SCALAR,
           'name "r"\n' + BASE + METRIC + SCALAR + STRICT]


@pytest.fixture(scope="module")
def scalar_fails():
    """Population: loadings equal, the intercept of vig3 higher by .5 at wave 2 (metric holds, scalar fails)."""
    long = people(500, 20261205, (0.0, 0.0, 0.5, 0.0))
    return long, invariance_over_occasions(ONE_OCCASION, long, occasion_column="wave", id_column="person_id")


def test_metric_holds_and_scalar_fails_in_a_known_population(scalar_fails):
    _, result = scalar_fails
    held = {s.level: s.holds for s in result.steps}
    # the population (people()): loadings equal across the waves, one intercept shifted by .5 residual SDs
    assert held["configural"] and held["metric"]
    assert not held["scalar"]
    scalar = next(s for s in result.steps if s.level == "scalar")
    assert scalar.versus_previous.p_value < 0.001 and scalar.versus_previous.df_difference == 3
    assert result.latent_changes == () and "did not hold" in result.latent_note
    # the score tests of the scalar step's equalities point first to the intercept the population shifted (vig3)
    top = scalar.culprits[0]
    assert (top.kind, top.variables) == ("intercept", ("vig3_2",))
    assert result.at_occasion("vig3_2") == ("vig3", "2")
    from cfa_tool.reporting.reports import report_of

    said = " ".join(str(n) for n in report_of(result).notes)
    assert "Likeliest sources of misfit at the scalar step" in said and "the intercept of vig3 at occasion 2" in said


def test_each_step_equals_the_wide_model_written_by_hand(scalar_fails):
    long, result = scalar_fails
    by_hand = compare(BY_HAND, widened(long), missing="full-information")
    for step, own in zip(result.steps, by_hand.results):
        assert step.result.fit.chi_square == pytest.approx(own.fit.chi_square, abs=1e-6)
        assert step.result.fit.df == own.fit.df
    # dfs of the hand-written models: 44 moments (8 means, 36 covariances) less 25, 22, 19 (18 with the mean), 15
    assert [s.result.fit.df for s in result.steps] == [15, 18, 21, 25]


def test_wide_data_give_the_long_data_ladder(scalar_fails):
    long, result = scalar_fails
    wide = invariance_over_occasions(ONE_OCCASION, widened(long), occasion_endings=("_t1", "_t2"),
                                     id_column="person_id")
    assert [s.result.fit.chi_square for s in wide.steps] == pytest.approx(
        [s.result.fit.chi_square for s in result.steps], abs=1e-6)
    assert wide.occasions == ("t1", "t2")


def test_latent_mean_change_when_scalar_holds():
    long = people(600, 9)  # one draw (seed 9) of the population
    result = invariance_over_occasions(ONE_OCCASION, long, occasion_column="wave", id_column="person_id")
    assert all(s.holds for s in result.steps if s.level in ("configural", "metric", "scalar"))
    (change,) = result.latent_changes
    # population: mean change MEAN_CHANGE (people()); its 95% interval covers it, and the variance ratio 1.2
    assert change.ci95[0] < MEAN_CHANGE < change.ci95[1]
    assert change.variance_ratio == pytest.approx(1.2, abs=0.25)
    assert change.group == "2" and change.factor == "vigour"
    payload = result.to_dict()
    assert payload["latent_changes"][0]["occasion"] == "2"
    assert "free mean(vigour_2)" in payload["steps"][2]["model"]


def test_a_person_missing_at_one_occasion_is_kept_by_full_information():
    long = people(300, 11)
    gone = long[~((long["wave"] == 2) & long["person_id"].isin([f"p{i:04d}" for i in range(40)]))]
    result = invariance_over_occasions(ONE_OCCASION, gone, occasion_column="wave", id_column="person_id")
    assert result.steps[0].result.n_obs == 300  # every person, 40 of them with the second wave missing
    by_hand = compare(BY_HAND[:2], widened(gone), missing="full-information")
    for step, own in zip(result.steps, by_hand.results):
        assert step.result.fit.chi_square == pytest.approx(own.fit.chi_square, abs=1e-6)
    assert any("gaps" in n for n in result.notes)


def test_an_id_twice_at_one_occasion_is_an_error_naming_it():
    long = people(50, 3)
    twice = pd.concat([long, long.iloc[[2]]], ignore_index=True)
    with pytest.raises(DataError, match=r"'p0001' at 1"):
        invariance_over_occasions(ONE_OCCASION, twice, occasion_column="wave", id_column="person_id")


def test_an_item_unanswered_at_one_occasion_is_an_error():
    long = people(50, 3)
    long.loc[long["wave"] == 2, "vig4"] = np.nan
    with pytest.raises(DataError, match=r"vig4.*occasion 2.*same items"):
        invariance_over_occasions(ONE_OCCASION, long, occasion_column="wave", id_column="person_id")


def test_wide_data_without_an_occasions_column_is_an_error_naming_it():
    wide = widened(people(50, 3)).drop(columns=["vig4_t2"])
    with pytest.raises(DataError, match="vig4_t2"):
        invariance_over_occasions(ONE_OCCASION, wide, occasion_endings=("_t1", "_t2"))


@pytest.mark.parametrize("statement", ["ordinal vig1, vig2, vig3, vig4", "fix loading(vigour, vig2) = 1"])
def test_statements_not_yet_available_are_errors_at_their_line(statement):
    with pytest.raises(ModelError, match="not yet available"):
        invariance_over_occasions(ONE_OCCASION + statement + "\n", people(50, 3), occasion_column="wave",
                                  id_column="person_id")


def test_listwise_and_missing_id_are_errors():
    long = people(50, 3)
    with pytest.raises(OptionError, match="full-information"):
        invariance_over_occasions(ONE_OCCASION, long, occasion_column="wave", id_column="person_id",
                                  missing="listwise")
    with pytest.raises(OptionError, match="id column"):
        invariance_over_occasions(ONE_OCCASION, long, occasion_column="wave")


def test_every_view_says_over_time_and_problems_first(scalar_fails, tmp_path):
    from cfa_tool.reporting.reports import report_of

    _, result = scalar_fails
    report = report_of(result)
    assert "over time" in report.paragraph and "same people" in report.paragraph
    assert "the scalar step did not hold" in report.paragraph
    assert report.notice is not None and "scalar step did not hold" in str(report.notice.lines[0])
    assert json.loads(json.dumps(result.to_dict()))["over_occasions"] is True


def test_robust_steps_are_the_scaled_differences_of_the_wide_models(scalar_fails):
    from cfa_tool.method import DifferenceMethod

    long, _ = scalar_fails
    result = invariance_over_occasions(ONE_OCCASION, long, occasion_column="wave", id_column="person_id",
                                       test="robust")
    by_hand = compare(BY_HAND, widened(long), missing="full-information", test="robust")
    for k, step in enumerate(result.steps[1:], start=1):
        scaled = next(t for t in by_hand.tests if t.restricted == by_hand.names[k]
                      and t.general == by_hand.names[k - 1] and t.method is DifferenceMethod.SATORRA_BENTLER_2001)
        # the ladder's rule (nesting.scaled_difference): the 2001 scaled difference where its correction is positive
        assert step.versus_previous.method is DifferenceMethod.SATORRA_BENTLER_2001
        assert step.versus_previous.chi_square_difference == pytest.approx(scaled.chi_square_difference, abs=1e-6)


def test_occasions_named_by_text_need_their_order():
    long = people(200, 5)
    named = long.assign(wave=long["wave"].map({1: "before", 2: "after"}))
    with pytest.raises(OptionError, match=r"named by text \(before, after\)"):
        invariance_over_occasions(ONE_OCCASION, named, occasion_column="wave", id_column="person_id")
    ordered = invariance_over_occasions(ONE_OCCASION, named, occasion_column="wave", id_column="person_id",
                                        occasion_order=["before", "after"])
    numbered = invariance_over_occasions(ONE_OCCASION, long, occasion_column="wave", id_column="person_id")
    # the same people and waves, named by words in their order: the same ladder
    assert ordered.occasions == ("before", "after")
    assert [s.result.fit.chi_square for s in ordered.steps] == pytest.approx(
        [s.result.fit.chi_square for s in numbered.steps], abs=1e-6)


def test_the_long_files_rows_are_named_and_its_ids_repeat_by_design(tmp_path):
    from cfa_tool.assessment.admissibility import ProblemKind

    long = people(150, 13)
    long.loc[[10, 11, 250], "vig2"] = 99  # a missing-value code read as an answer, in three rows of the long file
    path = tmp_path / "waves.csv"
    long.to_csv(path, index=False)
    result = invariance_over_occasions(ONE_OCCASION, path, occasion_column="wave", id_column="person_id")
    kinds = {p.kind for p in result.data_problems}
    # each id once per wave is the design of long data, not a caution; the code's rows are the file's (header row 1)
    assert ProblemKind.REPEATED_IDS not in kinds
    said = " ".join(str(w) for w in result.warnings)
    assert "value 99" in said and "rows 12, 13, 252" in said


def test_wide_endings_that_make_one_column_two_items_are_an_error_naming_it():
    # item 'a' at ending '11' and item 'a1' at ending '1' are both column 'a11' (hostile trial s27, case 01)
    wide = pd.DataFrame(np.random.default_rng(1).normal(size=(60, 7)),
                        columns=["a1", "a11", "a111", "b1", "b11", "c1", "c11"])
    with pytest.raises(OptionError, match=r"'a11' would be both 'a' at occasion 11 and 'a1' at occasion 1"):
        invariance_over_occasions("factor f: a, a1, b, c\n", wide, occasion_endings=("1", "11"))


def test_people_left_out_and_people_at_both_occasions_are_counted_first(tmp_path):
    from cfa_tool.reporting.reports import report_of

    long = people(300, 21)
    blank = long["person_id"].isin([f"p{i:04d}" for i in range(100)])
    long.loc[blank, ["vig1", "vig2", "vig3", "vig4"]] = np.nan  # 100 people (200 rows) answered nothing
    result = invariance_over_occasions(ONE_OCCASION, long, occasion_column="wave", id_column="person_id")
    # counted from the data built here: 300 people read, 100 with no answer, 200 at both waves
    assert (result.people, result.to_dict()["people_read"]) == (200, 300)
    assert result.to_dict()["people_at_both_occasions"] == [{"occasions": ["1", "2"], "people": 200}]
    assert any("100 of 300 people (200 rows of the file) answered none" in n for n in result.notes)
    report = report_of(result)
    assert "100 answered none of the items at any occasion and were left out" in report.paragraph
    assert "200 people analysed of the 300 read" in str(report.lines[1])


def test_few_people_at_both_occasions_is_a_caution_first_naming_the_ids():
    long = people(300, 22)
    # 255 of the ids of wave 2 written without their letter: 45 people matched, 555 seen (hostile trial s27, case 13)
    renamed = (long["wave"] == 2) & ~long["person_id"].isin([f"p{i:04d}" for i in range(45)])
    long.loc[renamed, "person_id"] = long.loc[renamed, "person_id"].str[1:]
    result = invariance_over_occasions(ONE_OCCASION, long, occasion_column="wave", id_column="person_id")
    assert result.people == 555
    assert result.warnings[0].startswith("only 45 of the 555 people analysed answered at both occasions")
    assert "id written alike" in result.warnings[0]


def test_the_paragraph_describes_the_model_of_one_occasion():
    from cfa_tool.reporting.reports import report_of

    rng = np.random.default_rng(2)
    n = 300
    first = rng.normal(size=(n, 2))
    second = 0.7 * first + 0.5 * rng.normal(size=(n, 2))
    rows = [{"pid": i, "wave": w, **{f"{x}{j}": 0.8 * f[i, k] + 0.6 * rng.normal() + 3
                                     for k, x in enumerate("ab") for j in (1, 2, 3)}}
            for i in range(n) for w, f in ((1, first), (2, second))]
    model = "factor fa: a1, a2, a3\nfactor fb: b1, b2, b3\nuncorrelated fa, fb\ncovary a2, b2\n"
    result = invariance_over_occasions(model, pd.DataFrame(rows), occasion_column="wave", id_column="pid")
    paragraph = report_of(result).paragraph
    # the model file's factors, its 'uncorrelated' and its 'covary' statements (hostile trial s27, case 14)
    assert "six indicators of two uncorrelated factors (fa and fb)" in paragraph
    assert "one residual covariance (a2 with b2)" in paragraph


def test_the_paragraph_names_the_steps_whose_solutions_are_not_admissible():
    from cfa_tool.reporting.reports import report_of

    # vig1 nearly without error in 60 people: negative residual variances at every step (hostile trial s27, case 06)
    rng = np.random.default_rng(1)
    f1 = rng.normal(size=60)
    f2 = 0.7 * f1 + 0.5 * rng.normal(size=60) + 0.3
    rows = [{"person_id": f"P{i}", "wave": k, "vig1": f[i] + 0.02 * rng.normal() + 3,
             **{f"vig{j}": 0.5 * f[i] + 0.9 * rng.normal() + 3 for j in (2, 3, 4)}}
            for i in range(60) for k, f in ((1, f1), (2, f2))]
    result = invariance_over_occasions(ONE_OCCASION, pd.DataFrame(rows), occasion_column="wave",
                                       id_column="person_id")
    assert not result.steps[0].result.admissible
    paragraph = report_of(result).paragraph
    assert "The solution of the configural model was not admissible (a negative residual variance of vig1_1" in paragraph
    assert "the metric step did not hold: its solution was not admissible" in paragraph


def test_a_half_drawn_row_by_row_that_splits_people_over_occasions_is_an_error(tmp_path, monkeypatch, capsys):
    from cfa_tool.cli import main
    from cfa_tool.data.halves import RandomHalf

    monkeypatch.chdir(tmp_path)
    long = people(200, 23)
    long.to_csv("long.csv", index=False)
    halves = {}
    for name, by in (("rows.csv", []), ("people.csv", ["--cluster", "person_id"])):
        assert main(["explore", "--data", "long.csv", "--items", "vig1,vig2,vig3,vig4", "--factors", "1",
                     "--split", "1", "--halves-file", name, *by]) == 0
        halves[name] = pd.read_csv(name)
    capsys.readouterr()
    # the people of the confirmation half of rows.csv with a row in the other half, counted here from the file (its
    # 'row' the file's row, the header being row 1)
    half = halves["rows.csv"]
    person = pd.read_csv("long.csv")["person_id"]
    at = {name: set(person.iloc[half.loc[half["half"] == name, "row"] - 2]) for name in half["half"].unique()}
    mine = at["confirmation"]
    split = len(mine & set().union(*(v for k, v in at.items() if k != "confirmation")))
    assert split > 0
    with pytest.raises(DataError, match=rf"rows.csv was drawn row by row, and {split} of the {len(mine)} people of "
                                        rf"the confirmation half have rows of other occasions in the other half"):
        invariance_over_occasions(ONE_OCCASION, "long.csv", occasion_column="wave", id_column="person_id",
                                  keep=[RandomHalf("rows.csv", "confirmation")])
    kept = invariance_over_occasions(ONE_OCCASION, "long.csv", occasion_column="wave", id_column="person_id",
                                     keep=[RandomHalf("people.csv", "confirmation")])
    # drawn whole people at a time: every person of the half at both waves
    assert kept.to_dict()["people_at_both_occasions"][0]["people"] == kept.people


def test_an_order_given_as_one_text_is_refused_and_quoted_labels_keep_their_commas(tmp_path, monkeypatch, capsys):
    from cfa_tool.cli import main

    long = people(150, 24)
    named = long.assign(wave=long["wave"].map({1: "time 1", 2: "time, 2"}))
    # a str would be read character by character as occasions (hostile trial s27, case 08)
    with pytest.raises(OptionError, match=r"takes a list of the occasions' labels.*not one text \('time 1,time 2'\)"):
        invariance_over_occasions(ONE_OCCASION, named, occasion_column="wave", id_column="person_id",
                                  occasion_order="time 1,time 2")
    monkeypatch.chdir(tmp_path)
    named.to_csv("waves.csv", index=False)
    (tmp_path / "vig.cfa").write_text(ONE_OCCASION)
    # a label with a comma in double quotes, as --keep and --missing-codes read theirs (hostile trial s27, case 16)
    code = main(["invariance", "vig.cfa", "--data", "waves.csv", "--occasion-column", "wave", "--id", "person_id",
                 "--occasion-order", 'time 1,"time, 2"', "--json", "out.json"])
    assert code == 0, capsys.readouterr().err
    assert [o["occasion"] for o in json.loads((tmp_path / "out.json").read_text())["occasions"]] == ["time 1", "time, 2"]


def test_the_messages_name_the_file_and_the_occasions_in_the_users_words(tmp_path):
    # hostile trial s27: cases 12 (ids never matching), 03 (1 and 1.0), 10 ('_1' and '-1'), 09 (--id an item)
    long = people(60, 25)
    path = tmp_path / "waves.csv"
    apart = long.assign(person_id=long["person_id"].where(long["wave"] == 1, long["person_id"].str[1:]))
    apart.to_csv(path, index=False)
    with pytest.raises(DataError, match=r"waves.csv: no person of 'person_id' answered at both occasions 1 and 2 of "
                                        r"'wave' \(ids at 1 such as 'p0000', 'p0001', 'p0002'; at 2 such as '0000'"):
        invariance_over_occasions(ONE_OCCASION, path, occasion_column="wave", id_column="person_id")
    written = long.assign(wave=long["wave"].astype(str))
    written.loc[:4, "wave"] = "1.0"  # written as a spreadsheet may export some of them
    written.to_csv(path, index=False)
    with pytest.raises(DataError, match=r"waves.csv: column 'wave' holds occasions that read alike \(1.0, 1\)"):
        invariance_over_occasions(ONE_OCCASION, path, occasion_column="wave", id_column="person_id")
    wide = widened(long).rename(columns=lambda c: c.replace("_t1", "_1").replace("_t2", "-1"))
    with pytest.raises(OptionError, match=r"name occasions that read alike \(1, 1\)"):
        invariance_over_occasions(ONE_OCCASION, wide, occasion_endings=("_1", "-1"))
    with pytest.raises(OptionError, match=r"'vig1' is a variable of the model and cannot also be the id column"):
        invariance_over_occasions(ONE_OCCASION, long, occasion_column="wave", id_column="vig1")


def test_one_occasion_missing_is_counted_in_the_singular():
    long = people(100, 26)
    gone = long.drop(index=long.index[(long["wave"] == 2) & (long["person_id"] == "p0003")])
    result = invariance_over_occasions(ONE_OCCASION, gone, occasion_column="wave", id_column="person_id")
    # one row dropped above: one person missing at one occasion
    assert any("; 1 occasion of people missing there is a gap, kept by full-information ML" in n for n in result.notes)


def test_repeated_ids_of_wide_data_are_named_by_the_files_rows_without_advice_the_route_refuses(tmp_path):
    wide = widened(people(120, 27))
    wide.loc[:9, "person_id"] = wide.loc[60:69, "person_id"].to_numpy()  # 10 ids on two rows each
    path = tmp_path / "wide.csv"
    wide.to_csv(path, index=False)
    result = invariance_over_occasions(ONE_OCCASION, path, occasion_endings=("_t1", "_t2"), id_column="person_id")
    said = " ".join(str(w) for w in result.warnings) + " ".join(str(p.advice) for p in result.data_problems)
    # the file's rows (header row 1): frame rows 0 and 60 are file rows 2 and 62 (hostile trial s27, case 04)
    assert "rows 2, 62" in said and "labelled" not in said
    assert "--cluster" not in said  # refused over occasions (commands.invariance._NOT_OVER_OCCASIONS)


def test_a_half_of_complete_rows_is_refused_with_advice_the_route_takes(tmp_path, monkeypatch, capsys):
    from cfa_tool.cli import main
    from cfa_tool.data.halves import RandomHalf

    monkeypatch.chdir(tmp_path)
    long = people(150, 28)
    long.loc[long.index[::17], "vig2"] = np.nan  # some rows with a gap
    long.to_csv("long.csv", index=False)
    (tmp_path / "vig.cfa").write_text(ONE_OCCASION)
    assert main(["replicate", "vig.cfa", "--data", "long.csv", "--incomplete-rows", "listwise", "--cluster",
                 "person_id", "--seed", "2", "--halves-file", "hl.csv"]) == 0
    capsys.readouterr()
    with pytest.raises(DataError, match="draw halves of every row with an answer") as found:
        invariance_over_occasions(ONE_OCCASION, "long.csv", occasion_column="wave", id_column="person_id",
                                  keep=[RandomHalf("hl.csv", "A")])
    # the route refuses listwise deletion (hostile trial s27, case 07): no advice to give it
    assert "analyse the half as it was drawn" not in str(found.value)


def test_long_data_get_the_cautions_on_each_occasions_answers_too():
    from cfa_tool.assessment.admissibility import ProblemKind

    # an item nearly constant at wave 1 alone: the long file's column varies (wave 2's answers), so only the answers
    # set side by side show it; named by item and occasion, never by the side-by-side column vig4_1 no file holds
    long = people(150, 29)
    at_one = long.index[long["wave"] == 1]
    long.loc[at_one[3:], "vig4"] = 3.0  # 147 of 150 people give 3 at wave 1 (98% or more: the nearly-constant rule)
    result = invariance_over_occasions(ONE_OCCASION, long, occasion_column="wave", id_column="person_id")
    constant = [p for p in result.data_problems if p.kind is ProblemKind.NEARLY_CONSTANT]
    assert constant, [p.kind for p in result.data_problems]
    said = str(constant[0].explanation)
    assert "vig4' at occasion 1" in said and "vig4_1" not in said
    # the answers' tails of the occasions side by side are judged too (the wide route's caution), rows named nowhere
    assert all(p.kind not in (ProblemKind.COPIED_ROWS, ProblemKind.REPEATED_IDS) for p in result.data_problems)


def test_repeated_ids_of_wide_data_get_advice_that_fits_a_file_already_side_by_side(tmp_path):
    wide = widened(people(120, 30))
    wide.loc[:4, "person_id"] = wide.loc[60:64, "person_id"].to_numpy()  # 5 ids on two rows each
    path = tmp_path / "wide.csv"
    wide.to_csv(path, index=False)
    for id_column in ("person_id", None):  # given, or taken for the id by its name
        result = invariance_over_occasions(ONE_OCCASION, path, occasion_endings=("_t1", "_t2"), id_column=id_column)
        advice = " ".join(str(p.advice) for p in result.data_problems if p.kind.name == "REPEATED_IDS")
        # the file holds each occasion in its own columns already: no advice to set the times side by side
        assert advice and "side by side" not in advice, advice
        assert "one row" in advice and "_t1, _t2" in advice


def test_occasion_labels_with_commas_are_quoted_as_group_labels_are():
    from cfa_tool.reporting.occasions_report import occasions_report

    long = people(150, 24)
    named = long.assign(wave=long["wave"].map({1: "time 1", 2: "time, 2"}))
    result = invariance_over_occasions(ONE_OCCASION, named, occasion_column="wave", id_column="person_id",
                                       occasion_order=["time 1", "time, 2"])
    report = occasions_report(result)
    # the one rule of labels in a sentence (language.names.written_group): every label quoted when one needs it, so
    # that 'time 1 and time, 2' does not read as three occasions (hostile trial s27)
    assert 'occasions "time 1" and "time, 2" of wave' in report.title
    assert 'occasions "time 1" and "time, 2"' in report.paragraph and "time 1 and time, 2" not in report.paragraph
    assert any('("time 1": 150, "time, 2": 150)' in n for n in result.notes)  # the rows of each occasion


def test_errors_of_setting_long_rows_side_by_side_name_the_options_that_changed_them(tmp_path):
    long = people(80, 31)
    long.loc[long["wave"] == 2, "vig2"] = 9  # every answer of vig2 at wave 2 a code of no answer
    path = tmp_path / "waves.csv"
    long.to_csv(path, index=False)
    # the code read as no answer leaves vig2 without an answer at wave 2: the message names what the run gave, which
    # the user may not connect with the data (hostile trial s27)
    with pytest.raises(DataError, match=r"item 'vig2' has no answer at occasion 2 of 'wave'.*missing_codes=\[9\]"):
        invariance_over_occasions(ONE_OCCASION, path, occasion_column="wave", id_column="person_id",
                                  missing_codes=(9,))
    with pytest.raises(DataError, match=r"holds 1 occasion; .*keep=\['wave = 1'\]"):
        invariance_over_occasions(ONE_OCCASION, path, occasion_column="wave", id_column="person_id",
                                  keep=["wave = 1"])
    named = long.assign(wave=long["wave"].map({1: "time 1", 2: "time, 2"}))
    with pytest.raises(OptionError, match=r'once \("time 1", "time, 2"\); not among them: "time 2"; left out: '
                                          r'"time, 2"'):  # two labels, not three
        invariance_over_occasions(ONE_OCCASION, named, occasion_column="wave", id_column="person_id",
                                  occasion_order=["time 1", "time 2"])
