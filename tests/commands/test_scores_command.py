"""``cfa-tool scores`` end to end on the Holzinger & Swineford (1939) data (tests/datasets).

Check values and their sources:
* regression scores equal semopy's ``predict_factors`` (semopy as an independent implementation; see
  tests/semopy/test_scores_against_semopy.py for why the two compare directly), tolerance 1e-6 from issue 16;
* rows with gaps: the conditional normal mean of the factors given the answered items,
  E[eta | x_o] = Phi L_o' Sigma_oo^-1 (x_o - mu_o) (Anderson 2003, theorem 2.5.1), computed here with
  numpy from the estimates the command writes to its JSON;
* posterior-mean scores of ordinal items average to the factor mean (law of iterated expectations,
  E[E[eta | y]] = E[eta]), within four standard errors of a mean;
* the HS id column and row names are read from the data file itself.
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

from cfa_tool.cli import main
from tests.conftest import DATASETS, THREE_FACTORS

HS_FILE = DATASETS / "holzinger_swineford_1939.csv"
ITEMS = [f"x{i}" for i in range(1, 10)]
FACTORS = ["visual", "textual", "speed"]


def _run(argv, capsys):
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, out.out, out.err


@pytest.fixture()
def model_file(tmp_path):
    path = tmp_path / "hs.cfa"
    path.write_text(THREE_FACTORS)
    return path


def test_row_order_and_the_id_column_are_kept(tmp_path, model_file, capsys):
    raw = pd.read_csv(HS_FILE, index_col=0)
    out = tmp_path / "scores.csv"
    assert _run(["scores", model_file, "--data", HS_FILE, "--output", out, "--id", "id"], capsys)[0] == 0
    written = pd.read_csv(out, dtype={"id": str})
    assert list(written.columns[:1]) == ["id"] and len(written) == len(raw)
    assert written["id"].tolist() == [str(v) for v in raw["id"]]  # the file's id column, in the file's order
    out2 = tmp_path / "named.csv"
    assert _run(["scores", model_file, "--data", HS_FILE, "--output", out2], capsys)[0] == 0
    named = pd.read_csv(out2, dtype={"row_name": str})
    assert named.columns[0] == "row_name" and named["row_name"].tolist() == [str(v) for v in raw.index]
    np.testing.assert_array_equal(named.iloc[:, 1:].to_numpy(), written.iloc[:, 1:].to_numpy())


def _fit_first(model_file, data, tmp_path, capsys, from_fit: bool) -> list:
    """The options that score with the saved JSON of a fit of ``data`` (written here) when ``from_fit``, else none."""
    if not from_fit:
        return []
    assert _run(["fit", model_file, "--data", data, "--json", tmp_path / "fit.json"], capsys)[0] == 0
    return ["--from-fit", tmp_path / "fit.json"]


def _estimates(result: dict) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """Loadings, factor covariance, residual covariance and intercepts from the fit in the JSON."""
    L, phi, theta, nu = np.zeros((9, 3)), np.zeros((3, 3)), np.zeros((9, 9)), np.zeros(9)
    for row in result["fit"]["estimates"]:
        v, e = row["variables"], row["estimate"]
        if row["kind"] == "loading":
            L[ITEMS.index(v[1]), FACTORS.index(v[0])] = e
        elif row["kind"] == "factor_variance":
            phi[FACTORS.index(v[0]), FACTORS.index(v[0])] = e
        elif row["kind"] == "factor_covariance":
            i, j = FACTORS.index(v[0]), FACTORS.index(v[1])
            phi[i, j] = phi[j, i] = e
        elif row["kind"] == "residual_variance":
            theta[ITEMS.index(v[0]), ITEMS.index(v[0])] = e
        elif row["kind"] == "intercept":
            nu[ITEMS.index(v[0])] = e
    return L, phi, theta, nu


def test_rows_with_gaps_are_scored_from_their_answers_and_empty_rows_are_kept_and_counted(tmp_path, model_file, capsys):
    raw = pd.read_csv(HS_FILE, index_col=0)
    rng = np.random.default_rng(16)
    gaps = raw.copy()
    values = gaps[ITEMS].to_numpy(float).copy()
    values[rng.random(values.shape) < 0.1] = np.nan
    values[5] = np.nan  # a row without any answer
    values[7, :3] = np.nan  # a row without the visual items
    gaps[ITEMS] = values
    data = tmp_path / "gaps.csv"
    gaps.to_csv(data)
    out, js = tmp_path / "scores.csv", tmp_path / "scores.json"
    code, text, err = _run(["scores", model_file, "--data", data, "--output", out, "--json", js], capsys)
    assert code == 0, err
    result = json.loads(js.read_text())
    written = pd.read_csv(out)
    assert len(written) == len(raw)
    scores = written[[f"{f}_regression" for f in FACTORS]].to_numpy()
    assert np.isnan(scores[5]).all()
    assert [u for u in result["unscored"] if u["reason"] == "no answers on the model's items"][0]["rows"]["visual"] == 1
    # said first (a caution of the rows scored, s14; a warning before), and marked in the output: row 7 answered no
    # visual item, so its visual_items_answered is 0; counted by hand from the gaps made above
    assert any("answered none of the items of visual" in p["explanation"] for p in result["fit"]["problems"])
    answered = (~np.isnan(values)).reshape(len(values), 3, 3).sum(axis=2)  # x1-x3, x4-x6, x7-x9
    np.testing.assert_array_equal(written[[f"{f}_items_answered" for f in FACTORS]].to_numpy(), answered)
    assert answered[7, 0] == 0
    L, phi, theta, nu = _estimates(result)  # full-information fit: intercepts estimated, factor means 0
    sigma = L @ phi @ L.T + theta
    checked = 0
    for i in np.flatnonzero(np.isnan(values).any(axis=1) & ~np.isnan(values).all(axis=1)):
        o = ~np.isnan(values[i])
        expected = phi @ L[o].T @ np.linalg.solve(sigma[np.ix_(o, o)], values[i, o] - nu[o])  # Anderson (2003)
        np.testing.assert_allclose(scores[i], expected, atol=1e-6)  # the JSON's estimates carry full precision
        checked += 1
    assert checked > 50


def test_filtered_rows_stay_in_place_with_empty_cells(tmp_path, model_file, capsys):
    raw = pd.read_csv(HS_FILE, index_col=0)
    out, js = tmp_path / "scores.csv", tmp_path / "scores.json"
    code, _, err = _run(["scores", model_file, "--data", HS_FILE, "--output", out, "--json", js, "--keep",
                         "school = Pasteur"], capsys)
    assert code == 0, err
    written = pd.read_csv(out)
    left_out = (raw["school"] != "Pasteur").to_numpy()
    assert len(written) == len(raw)
    assert written.loc[left_out, "visual_regression"].isna().all()
    assert written.loc[~left_out, "visual_regression"].notna().all()
    reasons = {u["reason"]: u["rows"]["visual"] for u in json.loads(js.read_text())["unscored"]}
    assert reasons == {"left out by a row filter (--keep)": int(left_out.sum())}


def test_rows_without_any_score_say_why_and_are_not_counted_as_scored(tmp_path, model_file, capsys):
    # a new-user trial (s13): '--keep' wrote every row of the file, the filtered ones empty, and said "Scores of 900
    # rows" while 810 were kept; an empty line of a filtered row looked like a person without answers.  Expected here
    # from the file by pandas: which rows the filter keeps, and the one kept row whose answers are all removed.
    raw = pd.read_csv(HS_FILE, index_col=0)
    gaps = raw.copy()
    kept = (gaps["school"] == "Pasteur").to_numpy()
    empty = int(np.flatnonzero(kept)[3])
    gaps.loc[gaps.index[empty], ITEMS] = np.nan
    gaps.to_csv(tmp_path / "gaps.csv")
    out, js = tmp_path / "scores.csv", tmp_path / "scores.json"
    code, text, err = _run(["scores", model_file, "--data", tmp_path / "gaps.csv", "--output", out, "--json", js,
                            "--id", "id", "--keep", "school = Pasteur", "--method", "regression,item-sum"], capsys)
    assert code == 0, err
    written = pd.read_csv(out, dtype={"id": str})
    assert written["id"].tolist() == [str(v) for v in raw["id"]]  # every row in its place, merged back by id
    expected = ["" if k else "filtered out" for k in kept]
    expected[empty] = "no answers"
    assert written["why_not_scored"].fillna("").tolist() == expected
    scored = int(kept.sum()) - 1
    assert written.filter(like="_regression").notna().any(axis=1).sum() == scored
    result = json.loads(js.read_text())
    assert (result["rows"], result["rows_scored"]) == (len(raw), scored)
    assert result["rows_not_scored"] == {"filtered out": int((~kept).sum()), "no answers": 1}
    flat = " ".join(text.split())
    assert f"Scores of {scored} of the {len(raw)} rows written to {out}" in flat
    assert (f"Scores (regression, item sum) of {scored} of the {len(raw)} rows, one line per row of the data in the "
            f"file's order (the {len(raw) - scored} without any score keep their line with empty cells, the column "
            f"why_not_scored saying why: filtered out {int((~kept).sum())}, no answers 1)") in flat
    # an id column of that name would be overwritten: the one error of ids named like a column written
    gaps.rename(columns={"id": "why_not_scored"}).to_csv(tmp_path / "named.csv")
    code, _, err = _run(["scores", model_file, "--data", tmp_path / "named.csv", "--output", tmp_path / "named_out.csv",
                         "--id", "why_not_scored", "--keep", "school = Pasteur"], capsys)
    assert code == 2 and "'why_not_scored' has the name of a column the output holds" in err
    assert not (tmp_path / "named_out.csv").exists()
    # every row scored: the column is there all the same (a script reads the same columns from every run), empty
    assert _run(["scores", model_file, "--data", HS_FILE, "--output", tmp_path / "all.csv"], capsys)[0] == 0
    assert pd.read_csv(tmp_path / "all.csv")["why_not_scored"].isna().all()


def test_an_inadmissible_solution_writes_no_scores_and_exits_2(tmp_path, capsys):
    # the Heywood case of tests/assessment/test_admissibility.py: a negative residual variance of x9.  The model was
    # estimated (docs/commands.md: exit 3 is a model that could not be estimated), so exit 2, the code cutoffs, align
    # and the scores of a saved fit give the same solution
    model = tmp_path / "heywood.cfa"
    model.write_text("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
                     "covary x7, x8\ncovary x8, x9\n")
    out = tmp_path / "scores.csv"
    code, _, err = _run(["scores", model, "--data", HS_FILE, "--output", out], capsys)
    assert code == 2
    assert len(err.strip().splitlines()) == 1 and "not admissible" in err and "x9" in err
    code_cutoffs, _, err_cutoffs = _run(["cutoffs", model, "--data", HS_FILE, "--replications", "20", "--workers", "1"],
                                        capsys)
    assert code_cutoffs == code and "not admissible" in err_cutoffs
    assert not out.exists()


def test_quality_in_the_json_and_the_caution_below_80(tmp_path, model_file, capsys):
    out, js = tmp_path / "scores.csv", tmp_path / "scores.json"
    code, text, _ = _run(["scores", model_file, "--data", HS_FILE, "--output", out, "--json", js,
                          "--keep", "school = Pasteur", "--method", "regression,bartlett,correlation-preserving"], capsys)
    assert code == 0
    result = json.loads(js.read_text())
    quality = result["quality"][0]
    rho = dict(zip(quality["factors"], quality["determinacy"]))
    # determinacy is the validity of the regression scores (Grice 2001): the same number two ways
    regression = next(m for m in quality["methods"] if m["method"] == "regression")
    assert regression["validity"] == pytest.approx(quality["determinacy"], abs=1e-10)
    low = [f for f, r in rho.items() if r < 0.80]  # .80: common practice, no single source
    assert result["low_determinacy"] == low
    for name in low:
        assert f"The determinacy of {name}" in text
    # correlation-preserving scores keep the factors' correlations (ten Berge et al. 1999)
    preserving = next(m for m in quality["methods"] if m["method"] == "correlation-preserving")
    np.testing.assert_allclose(preserving["score_correlations"], quality["factor_correlations"], atol=1e-8)
    assert [s["factor"] for s in quality["sums"]] == FACTORS
    assert "used for decisions about people" in text  # the high-stakes caution (reporting.tables.HIGH_STAKES_NOTE)


def test_ordinal_items_get_posterior_means_and_standard_deviations(tmp_path, capsys):
    rng = np.random.default_rng(17)
    n = 1500
    eta = rng.normal(size=n)
    lam = np.array([0.8, 0.7, 0.6, 0.75])
    latent = np.outer(eta, lam) + rng.normal(size=(n, 4)) * np.sqrt(1 - lam**2)
    frame = pd.DataFrame(np.searchsorted([-1.0, 0.0, 1.0], latent) + 1, columns=["q1", "q2", "q3", "q4"])
    data = tmp_path / "ordinal.csv"
    frame.to_csv(data, index=False)
    model = tmp_path / "one.cfa"
    model.write_text("factor f: q1..q4\n")
    out = tmp_path / "scores.csv"
    code, text, err = _run(["scores", model, "--data", data, "--output", out, "--ordinal", "all"], capsys)
    assert code == 0, err
    written = pd.read_csv(out)
    # the flagging caution's band around a cut points at the file's own standard errors (written without asking)
    assert "the cut (its posterior standard deviation, in the file's _posterior_sd columns)" in " ".join(text.split())
    assert list(written.columns) == ["f_posterior_mean", "f_posterior_sd", "f_items_answered",
                                     "same_answer_to_every_item", "why_not_scored"]
    s = written["f_posterior_mean"]
    assert abs(s.mean()) < 4 * s.std() / np.sqrt(n)  # E[EAP] = the factor mean, 0 here
    assert (written["f_posterior_sd"] > 0).all()
    code, _, err = _run(["scores", model, "--data", data, "--output", tmp_path / "b.csv", "--ordinal", "all", "--method",
                         "bartlett"],
                        capsys)
    assert code == 2 and "cannot be chosen" in err


def test_python_entry_point_with_groups(hs_data):
    import dataclasses

    import cfa_tool

    result = cfa_tool.scores(THREE_FACTORS, hs_data, group="school", methods="bartlett", id_column="id")
    assert dataclasses.is_dataclass(result) and result.__dataclass_params__.frozen
    # the group column carried beside the id, as the data hold it (scores-s25)
    assert list(result.table.columns) == (["id", "school"] + [f"{f}_bartlett" for f in FACTORS]
                                          + [f"{f}_items_answered" for f in FACTORS]
                                          + ["same_answer_to_every_item", "why_not_scored"])
    assert len(result.table) == len(hs_data) and not result.table.iloc[:, :-2].isna().any().any()
    assert result.table.iloc[:, -2:].isna().all().all()  # nothing to say: no 'reversed' statement, every row scored
    assert [q.group for q in result.quality] == ["Grant-White", "Pasteur"]  # one quality record per group
    assert result.to_dict()["methods"] == ["bartlett"] and result.to_dict()["fit"]["group_column"] == "school"
    # groups named by the one rule (language.names.written_group): one word each, so as they are (s22)
    from cfa_tool.language.names import written_group
    assert written_group("Pasteur", ("Grant-White", "Pasteur")) == "Pasteur"
    assert "Quality of the scores (group Pasteur)" in result.summary()
    assert "Quality of the scores (group Grant-White)" in result.summary()
    assert "<table" in result._repr_html_()
    # a configural fit (free intercepts, factor means 0) reproduces each group's item means, so each group's
    # linear scores alpha + W'(x - mu) average to alpha = 0 in that group: each row used its own group's parameters
    for label in ("Grant-White", "Pasteur"):
        rows = (hs_data["school"] == label).to_numpy()
        np.testing.assert_allclose(result.table.loc[rows, "visual_bartlett"].mean(), 0.0, atol=1e-8)


def test_a_fit_scores_other_data_with_its_own_parameters(hs_data):
    """Calibrate on the Grant-White pupils, score the Pasteur pupils: the regression scores are
    Phi L' Sigma^-1 (x - m) with the calibration fit's Phi, L, Sigma = L Phi L' + Theta and m the calibration
    rows' means (the saturated mean's ML estimate), computed here with numpy (Thurstone 1935)."""
    import cfa_tool

    calibration = hs_data[hs_data["school"] == "Grant-White"]
    other = hs_data[hs_data["school"] == "Pasteur"]
    fit = cfa_tool.fit(THREE_FACTORS, calibration)
    scored = fit.scores(other, id_column="id")
    assert scored.table["id"].tolist() == [str(v) for v in other["id"]]
    L, phi, theta, _ = _estimates({"fit": fit.to_dict()})
    sigma = L @ phi @ L.T + theta
    x = other[ITEMS].to_numpy(float) - calibration[ITEMS].to_numpy(float).mean(axis=0)
    expected = x @ np.linalg.solve(sigma, L @ phi)
    np.testing.assert_allclose(scored.table[[f"{f}_regression" for f in FACTORS]].to_numpy(), expected, atol=1e-6)
    # scored with its own fit, the calibration sample gets exactly what cfa_tool.scores writes
    np.testing.assert_allclose(fit.scores(calibration).table.to_numpy(float),
                               cfa_tool.scores(THREE_FACTORS, calibration).table.to_numpy(float), atol=1e-12)


def test_scores_from_a_saved_fit_equal_those_of_the_fit_result(tmp_path, model_file, hs_data, capsys):
    """fit --json on the Grant-White pupils, then scores --from-fit on the Pasteur pupils: the same numbers as the
    fit result's own scores (tested above against the regression formula), read back from the JSON's estimates."""
    import cfa_tool

    calibration, other = tmp_path / "gw.csv", tmp_path / "pa.csv"
    hs_data[hs_data["school"] == "Grant-White"].to_csv(calibration)
    hs_data[hs_data["school"] == "Pasteur"].to_csv(other)
    saved = tmp_path / "gw.json"
    assert _run(["fit", model_file, "--data", calibration, "--json", saved], capsys)[0] == 0
    out, js = tmp_path / "pa_scores.csv", tmp_path / "pa_scores.json"
    code, text, err = _run(["scores", model_file, "--data", other, "--from-fit", saved, "--output", out, "--json", js,
                            "--id", "id", "--method", "regression,bartlett"], capsys)
    assert code == 0, err
    written = pd.read_csv(out, dtype={"id": str})
    expected = cfa_tool.fit(model_file, calibration).scores(other, id_column="id", methods=["regression", "bartlett"])
    assert written["id"].tolist() == expected.table["id"].tolist()
    np.testing.assert_allclose(written.iloc[:, 1:].to_numpy(), expected.table.iloc[:, 1:].to_numpy(float), atol=1e-9)
    assert json.loads(js.read_text())["scored_data"] == str(other) and f"Scored data: {other}" in " ".join(text.split())
    # a model other than the one fitted is refused, and nothing is written
    other_model = tmp_path / "other.cfa"
    other_model.write_text("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6, x9\nfactor speed: x7, x8\n")
    code, _, err = _run(["scores", other_model, "--data", other, "--from-fit", saved, "--output", tmp_path / "no.csv"],
                        capsys)
    assert code == 2 and not (tmp_path / "no.csv").exists()
    # named by the first statement the fitted model lacks (hostile trial 11: the model files are compared as models)
    assert "its line 2 ('factor textual: x4, x5, x6, x9') is not in the fitted model" in err, err


def test_a_row_without_a_group_is_counted_once(tmp_path, hs_data):
    import cfa_tool

    model = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\n"
    fitted = cfa_tool.fit(model, hs_data, group="school")
    other = hs_data.copy()
    other.loc[other.index[0], "school"] = None
    scored = fitted.scores(other)
    reasons = {reason: counts for reason, _, counts in scored.unscored}
    assert max(reasons.get("no value in the group column", (0,))) == 1
    assert max(reasons.get("a group the fit does not have", (0,))) == 0


def test_rows_without_scores_stay_one_table_at_80_columns(hs_data):
    # re-check 6: one row of this table was split over five continued tables at 80 columns (a column per factor
    # beside the long reason); the counts are those made here by hand, and the data file's values keep a column
    # for each factor
    import cfa_tool
    from cfa_tool.reporting.score_report import score_tables, scores_report
    from cfa_tool.reporting.terminal import report_text
    from cfa_tool.scoring.methods import ScoreMethod

    fitted = cfa_tool.fit(THREE_FACTORS, hs_data)
    gaps = hs_data.copy()
    gaps.loc[gaps.index[:4], ["x1", "x2", "x3"]] = np.nan  # four rows without the visual items
    gaps.loc[gaps.index[4], [f"x{i}" for i in range(1, 10)]] = np.nan  # one row without any answer
    scored = fitted.scores(gaps, methods=(ScoreMethod.REGRESSION, ScoreMethod.BARTLETT))
    text = report_text(scores_report(scored), 80)
    part = text[text.index("Rows without scores"):text.index("These rows stay in the file")]
    assert "continued" not in part
    words = " ".join(part.split())
    assert "no answers on the model's items regression: 1 for each factor" in words
    # Bartlett scores the three factors jointly: the four rows without the visual items lose every factor's score
    assert "scores jointly" in words and "Bartlett: 4 for each factor" in words
    table = next(t for t in score_tables(scored) if t.key == "unscored")
    assert table.value_columns == ("Reason", "Method", *FACTORS)
    assert [list(v[2:]) for v in table.values] == [[1, 1, 1], [1, 1, 1], [4, 4, 4]]


def test_rows_without_scores_name_only_the_factors_that_lost_rows():
    from cfa_tool.reporting.score_report import _unscored_counts

    assert _unscored_counts(("visual", "textual", "ability"), (0, 0, 301)) == "ability 301"
    assert _unscored_counts(("visual", "textual"), (2, 5)) == "visual 2, textual 5"
    assert _unscored_counts(("visual", "textual"), (3, 3)) == "3 for each factor"
    assert _unscored_counts(("visual",), (3,)) == "visual 3"


def test_the_quality_note_says_which_methods_were_written_and_how_to_ask_for_the_others(tmp_path, model_file, capsys,
                                                                                         hs_data):
    # new-user trial s11: "methods marked with * are written to the file: regression*, Bartlett,
    # correlation-preserving" read as if all three were written
    import cfa_tool

    code, out, _ = _run(["scores", model_file, "--data", HS_FILE, "--output", tmp_path / "s.csv"], capsys)
    said = " ".join(out.split())
    assert code == 0 and "marked with" not in said
    assert ("Written to the file: regression; shown for comparison, not written (ask for them with --method): "
            "Bartlett and correlation-preserving.") in said
    both = " ".join(cfa_tool.scores(THREE_FACTORS, hs_data, methods=["regression", "bartlett"]).summary().split())
    assert ("Written to the file: regression and Bartlett; shown for comparison, not written (ask for them with "
            "methods=...): correlation-preserving.") in both


def test_rows_scored_from_some_of_a_factors_items_are_said_to_be_less_precise(hs_data):
    # new-user trial s11: patients scored from 2-3 of 5 items had SEs of .45-.54 against .37 and nothing said so.
    # Check values: the regression score's error variance given the items a row answered, diag(Phi - Phi L_o'
    # Sigma_oo^-1 L_o Phi) for the answered items o (the posterior variance of the factors given the answers under
    # a normal factor model; Bartholomew, Knott & Moustaki 2011, ch. 2, recalled from memory), computed with numpy
    # from the fit's estimates; the note's range must be that of the rows with gaps.
    import re

    import cfa_tool

    data = hs_data.copy()
    rng = np.random.default_rng(11)
    gone = rng.choice(len(data), 40, replace=False)
    data.loc[data.index[gone[:20]], "x1"] = np.nan
    data.loc[data.index[gone[20:]], ["x2", "x3"]] = np.nan  # one item of visual left for these rows
    result = cfa_tool.scores(THREE_FACTORS, data)
    note = next(n for n in result.notes if n.startswith("Rows that answered some but not all"))
    est = result.fit.to_dict()["estimates"]
    L, phi, theta = np.zeros((9, 3)), np.zeros((3, 3)), np.zeros(9)
    for row in est:
        a, b = (row["variables"] * 2)[:2]  # a variance names one variable
        if row["kind"] == "loading":
            L[ITEMS.index(b), FACTORS.index(a)] = row["estimate"]
        elif row["kind"] in ("factor_variance", "factor_covariance"):
            phi[FACTORS.index(a), FACTORS.index(b)] = phi[FACTORS.index(b), FACTORS.index(a)] = row["estimate"]
        elif row["kind"] == "residual_variance":
            theta[ITEMS.index(a)] = row["estimate"]
    sigma = L @ phi @ L.T + np.diag(theta)

    def se(answered: list[int]) -> float:
        Lo = L[answered]
        post = phi - phi @ Lo.T @ np.linalg.solve(sigma[np.ix_(answered, answered)], Lo @ phi)
        return float(np.sqrt(post[0, 0]))

    all_but_x1 = [i for i in range(9) if i != 0]
    only_x1 = [i for i in range(9) if i not in (1, 2)]
    low, high = sorted([se(all_but_x1), se(only_x1)])
    shown = re.search(r"visual: 40 rows, SE (\S+) to (\S+) against (\S+) with every item", note)
    assert shown, note
    assert [float(x) for x in shown.groups()] == [round(low, 2), round(high, 2), round(se(list(range(9))), 2)]
    assert "textual" not in note and "speed" not in note  # their items were all answered
    # and in the first box, beside the reliability of rows answering every item (new-user trial s28: said only in
    # this note near the end of the report), with the same check values
    from cfa_tool.reporting.score_report import precision_cautions

    first = precision_cautions(result)[0]
    assert "These figures are for rows that answered every item" in first
    assert (f"less precise regression scores (visual: 40 rows, SE {low:.2f} to {high:.2f} against "
            f"{se(list(range(9))):.2f} with every item)") in first


@pytest.mark.parametrize("from_fit", [False, True])
def test_a_blank_row_of_the_file_keeps_an_empty_line_so_the_scores_line_up(tmp_path, model_file, capsys, from_fit):
    # hostile trial s11: a blank sheet row was dropped from scores.csv, so the file pasted beside the sheet gave every
    # later row the score of the row below it.  Check: the scores of the file without the blank row, line by line.
    import openpyxl

    raw = pd.read_csv(HS_FILE)
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append(list(raw.columns))
    for k, row in enumerate(raw.itertuples(index=False)):
        if k == 9:
            sheet.append([])  # sheet row 11 is blank
        sheet.append(list(row))
    book.save(tmp_path / "blank.xlsx")
    raw.to_excel(tmp_path / "plain.xlsx", index=False)
    extra = _fit_first(model_file, tmp_path / "plain.xlsx", tmp_path, capsys, from_fit)
    assert _run(["scores", model_file, "--data", tmp_path / "blank.xlsx", "--output", tmp_path / "b.csv"] + extra,
                capsys)[0] == 0
    assert _run(["scores", model_file, "--data", tmp_path / "plain.xlsx", "--output", tmp_path / "p.csv"] + extra,
                capsys)[0] == 0
    blank = (tmp_path / "b.csv").read_text().splitlines()
    plain = (tmp_path / "p.csv").read_text().splitlines()
    # line 11, as the sheet's row 11, holds no score and says why in the last column, which every file has (the
    # other lines end with it empty)
    assert len(blank) == len(plain) + 1 and blank[0] == plain[0] and plain[0].endswith(",why_not_scored")
    assert set(blank[10].removesuffix("blank row")) <= {","} and blank[10].endswith(",blank row")
    others = blank[1:10] + blank[11:]
    assert all(line.endswith(",") for line in others) and others == plain[1:]


@pytest.mark.parametrize("above", ["title", "empty sheet rows", "empty text lines"])
@pytest.mark.parametrize("from_fit", [False, True])
def test_rows_above_the_column_names_get_no_line_and_are_not_counted(tmp_path, model_file, capsys, from_fit, above):
    # new-user trial s17: a workbook with a title row above the column names gave a scores file whose line 2 was
    # empty ('above the answers', beside the names' row) and 'Scores of 600 of the 601 rows ... the 1 without any
    # score': read as an employee left unscored, and a merge by position one row off.  The scores file's header sits
    # beside the row the names were read from, as for a file whose names are on its first row.  Check: the same
    # lines as the scores of the plain file, and every row counted as scored.
    import openpyxl

    raw = pd.read_csv(HS_FILE)
    raw.to_csv(tmp_path / "plain.csv", index=False)
    if above == "empty text lines":
        data = tmp_path / "above.csv"
        data.write_text("\n\n" + (tmp_path / "plain.csv").read_text())
    else:
        book = openpyxl.Workbook()
        sheet = book.active
        sheet.append(["Ability tests, raw scores"] if above == "title" else [])
        if above != "title":
            sheet.append([])
        sheet.append(list(raw.columns))
        for row in raw.itertuples(index=False):
            sheet.append(list(row))
        data = tmp_path / "above.xlsx"
        book.save(data)
    extra = _fit_first(model_file, tmp_path / "plain.csv", tmp_path, capsys, from_fit)
    code, out, _ = _run(["scores", model_file, "--data", data, "--output", tmp_path / "a.csv"] + extra, capsys)
    assert code == 0
    assert _run(["scores", model_file, "--data", tmp_path / "plain.csv", "--output", tmp_path / "p.csv"] + extra,
                capsys)[0] == 0
    assert (tmp_path / "a.csv").read_text().splitlines() == (tmp_path / "p.csv").read_text().splitlines()
    said = " ".join(out.split())
    assert f"Scores of {len(raw)} rows written" in said and "without any score" not in said


@pytest.mark.parametrize("from_fit", [False, True])
def test_rows_above_the_first_row_of_answers_keep_their_lines(tmp_path, model_file, capsys, from_fit):
    # hostile tester s13: a survey export with question texts on line 2 (--first-data-row 3) gave scores whose line 2
    # was the data's line 3, so every score pasted beside the file sat one respondent off.  Check: line k of the
    # scores is line k of the data file, against the scores of the file without the question-text line.
    raw = pd.read_csv(HS_FILE)
    lines = (tmp_path / "plain.csv")
    raw.to_csv(lines, index=False)
    text = lines.read_text().splitlines()
    questions = ",".join(f'"Question {k}"' for k in range(len(raw.columns)))
    (tmp_path / "questions.csv").write_text("\n".join([text[0], questions] + text[1:]) + "\n")
    extra = _fit_first(model_file, lines, tmp_path, capsys, from_fit)
    code, out, _ = _run(["scores", model_file, "--data", tmp_path / "questions.csv", "--first-data-row", "3",
                         "--output", tmp_path / "q.csv"] + extra, capsys)
    assert code == 0
    assert _run(["scores", model_file, "--data", lines, "--output", tmp_path / "p.csv"] + extra, capsys)[0] == 0
    scored = (tmp_path / "q.csv").read_text().splitlines()
    plain = (tmp_path / "p.csv").read_text().splitlines()
    assert len(scored) == len(text) + 1 == len(plain) + 1  # one line per line of the data file
    assert scored[0] == plain[0] and plain[0].endswith(",why_not_scored")
    assert scored[1].endswith(",above the answers") and set(scored[1].removesuffix("above the answers")) <= {","}
    assert scored[2:] == plain[1:]
    # the line of the question texts is no row of the data: every row is counted as scored (new-user trial s21:
    # 'Scores of 300 of the 301 rows', and a methods paragraph that counted the question texts as a respondent)
    said = " ".join(out.split())
    assert f"Scores of {len(raw)} rows written" in said and "without any score" not in said
    assert "it holds an empty line for the row above the first row of answers" in said


def test_unanswered_factors_leave_empty_on_the_command_line(tmp_path, model_file, capsys):
    # rows that answered none of visual's items: their visual scores left empty, the line saying why
    data = pd.read_csv(HS_FILE)
    data.loc[data.index[[2, 5]], ["x1", "x2", "x3"]] = np.nan
    path = tmp_path / "blanked.csv"
    data.to_csv(path, index=False)
    out = tmp_path / "scores.csv"
    code, _, err = _run(["scores", model_file, "--data", path, "--output", out, "--unanswered-factors", "leave-empty",
                         "--json", tmp_path / "scores.json"], capsys)
    assert code == 0, err
    written = pd.read_csv(out)
    assert written["visual_regression"].iloc[[2, 5]].isna().all() and written["visual_regression"].notna().sum() == 299
    assert written["why_not_scored"].iloc[[2, 5]].tolist() == ["a factor's items unanswered"] * 2
    result = json.loads((tmp_path / "scores.json").read_text())
    assert result["unanswered_factors"] == "leave-empty" and result["rows_with_a_factor_left_empty"] == 2
    assert any("--unanswered-factors predict" in p["advice"] for p in result["fit"]["problems"])
    code, _, err = _run(["scores", model_file, "--data", path, "--output", tmp_path / "s2.csv", "--method", "item-sum",
                         "--unanswered-factors", "predict"], capsys)
    assert code == 2 and "--unanswered-factors says what to do" in err and "Traceback" not in err


def test_the_high_stakes_caution_says_what_flagging_people_needs(hs_data):
    """New user s15 (a school psychologist flagging pupils for a follow-up talk): the scores' report names, where the
    high-stakes caution is and in every view, what such a use needs: a cut score validated for the purpose
    (sensitivity and specificity against an outside criterion), the uncertainty of a score near the cut (a band of
    1.96 standard errors: the normal distribution's 97.5% point, scipy.stats.norm.ppf(.975) = 1.95996...; the 95% band
    is common practice) and invariance tested before groups are compared; the Standards for Educational and
    Psychological Testing (AERA, APA & NCME 2014) as the general source."""
    from scipy.stats import norm

    import cfa_tool
    from cfa_tool.reporting.text_formats import report_markdown
    from cfa_tool.reporting.score_report import flagging_caution, scores_report
    from cfa_tool.reporting.tables import HIGH_STAKES_NOTE

    assert round(float(norm.ppf(0.975)), 2) == 1.96
    result = cfa_tool.scores(THREE_FACTORS, hs_data, methods="regression", id_column="id")
    report = scores_report(result)
    caution = str(flagging_caution(result))
    # one place: beside the high-stakes caution, last in every view
    assert report.cautions[-2:] == (HIGH_STAKES_NOTE, flagging_caution(result))
    for words in ("cut score set and validated", "sensitivity and specificity against an outside criterion",
                  "1.96 times the row's standard error", "written with standard_errors=True", "common practice",
                  "measurement invariance", "AERA, APA & NCME 2014"):
        assert words in caution
    flat = " ".join(caution.split())
    for view in (result.summary(), result._repr_html_(), report_markdown(report)):
        assert "sensitivity and specificity" in " ".join(view.split())
    assert " ".join(result.summary().split()).count(flat[:60]) == 1


def test_a_long_scoring_says_so_on_a_terminal_and_nowhere_else(tmp_path, capsys, monkeypatch):
    """New user s15: 'scores --ordinal all' took 43 s with no word.  Before a scoring of posterior means expected to
    take LONG_SCORING seconds or more, one line on standard error when it is a terminal, never in the report or the
    files; the estimate counts rows x quadrature points x items (the points as the rule built has them)."""
    import sys

    from cfa_tool.scoring import ordinal
    from cfa_tool.scoring.quadrature import default_rule, default_rule_size

    for dimension in (1, 2, 3, 4):
        assert default_rule_size(dimension) == len(default_rule(dimension).points)
    rng = np.random.default_rng(23)
    n = 300
    eta = rng.normal(size=n)
    latent = np.outer(eta, [0.8, 0.7, 0.6, 0.75]) + rng.normal(size=(n, 4)) * 0.6
    frame = pd.DataFrame(np.searchsorted([-1.0, 0.0, 1.0], latent) + 1, columns=["q1", "q2", "q3", "q4"])
    frame.to_csv(tmp_path / "ordinal.csv", index=False)
    (tmp_path / "one.cfa").write_text("factor f: q1..q4\n")
    line = "Scoring 300 rows by posterior means over 1 factor (about 0 s)..."
    monkeypatch.setattr(ordinal, "LONG_SCORING", 0.0)  # this small scoring counts as long
    argv = ["scores", tmp_path / "one.cfa", "--data", tmp_path / "ordinal.csv", "--ordinal", "all"]
    code, text, err = _run(argv + ["--output", tmp_path / "a.csv", "--json", tmp_path / "a.json"], capsys)
    assert code == 0 and line not in err and "Scoring 300" not in text  # standard error is no terminal: silence
    monkeypatch.setattr(sys.stderr, "isatty", lambda: True, raising=False)
    code, text, err = _run(argv + ["--output", tmp_path / "b.csv", "--json", tmp_path / "b.json"], capsys)
    assert code == 0 and err.count(line) == 1
    assert "Scoring 300" not in text and "Scoring 300" not in (tmp_path / "b.json").read_text()
    assert (tmp_path / "a.csv").read_bytes() == (tmp_path / "b.csv").read_bytes()


@pytest.mark.parametrize("from_fit", [False, True])
def test_a_column_that_could_name_the_rows_is_suggested_when_none_does(tmp_path, model_file, capsys, from_fit):
    # new-user trial s17: a survey platform's CSV with an employee code in every row gave a scores file without any
    # id and a report silent about --id, so the scores could be matched back to people only by position.  Check: the
    # code column is named with the option, a column with repeats or gaps is not, and with --id nothing is said.
    raw = pd.read_csv(HS_FILE)[["school"] + ITEMS]  # no row names, no id column
    coded = raw.assign(code=[f"C{k:04d}" for k in range(len(raw))], site=["a", "b"] * (len(raw) // 2) + ["a"])
    coded.to_csv(tmp_path / "coded.csv", index=False)
    extra = _fit_first(model_file, tmp_path / "coded.csv", tmp_path, capsys, from_fit)
    code, out, _ = _run(["scores", model_file, "--data", tmp_path / "coded.csv", "--output", tmp_path / "a.csv"]
                        + extra, capsys)
    assert code == 0
    said = " ".join(out.split())
    assert "the column 'code' holds a different value in every row and could name them (--id code)" in said
    assert "'site'" not in said
    code, out, _ = _run(["scores", model_file, "--data", tmp_path / "coded.csv", "--id", "code", "--output",
                         tmp_path / "b.csv"] + extra, capsys)
    assert code == 0 and "could name them" not in " ".join(out.split())
    assert (tmp_path / "b.csv").read_text().splitlines()[1].startswith("C0000,")
