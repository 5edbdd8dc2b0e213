"""``scores --from-fit`` (and ``simulate --population-from``) with what an earlier fit does and does not know, on the
Holzinger & Swineford (1939) data (tests/datasets).

Check values and their sources:
* regression scores Phi L' Sigma^-1 (x - m) (Thurstone 1935), computed here with numpy from the estimates the
  earlier fit wrote to its JSON and the means of the summary-statistics file;
* the same rows scored by ``scores`` without --from-fit (the same run's own fit) as the reference when a file with
  missing-value codes is scored with a fit saved as JSON.
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

from tests.commands.test_scores_command import FACTORS, ITEMS, _estimates, _run, model_file  # noqa: F401 (a fixture)
from tests.conftest import THREE_FACTORS

# these tests read words with a temporary path among them in the terminal report
pytestmark = pytest.mark.usefixtures("wide_terminal")


def _stats_file(path, frame: pd.DataFrame, kind: str, sd: bool, mean: bool) -> None:
    """A summary-statistics file of ``frame``'s items: the covariance or correlation matrix (divisor n-1), n, and
    the 'sd' and 'mean' rows when asked for."""
    x = frame[ITEMS]
    matrix = x.cov() if kind == "covariance" else x.corr()
    lines = [",".join([kind] + ITEMS)]
    lines += [",".join([ITEMS[i]] + [repr(float(v)) for v in matrix.iloc[i, : i + 1]]) for i in range(len(ITEMS))]
    lines.append(f"n,{len(x)}")
    if sd:
        lines.append(",".join(["sd"] + [repr(float(v)) for v in x.std()]))
    if mean:
        lines.append(",".join(["mean"] + [repr(float(v)) for v in x.mean()]))
    path.write_text("\n".join(lines) + "\n")


def _regression_scores(fit: dict, x: np.ndarray, means: np.ndarray) -> np.ndarray:
    L, phi, theta, _ = _estimates({"fit": fit})
    sigma = L @ phi @ L.T + theta
    return (x - means) @ np.linalg.solve(sigma, L @ phi)


@pytest.mark.parametrize("kind, sd, mean, lacking", [("covariance", False, False, "without the items' means"),
                                                     ("correlation", False, True, "without their standard deviations"),
                                                     ("correlation", False, False, "means or their standard devi")])
def test_a_fit_of_summary_statistics_without_means_or_units_scores_no_answers(tmp_path, model_file, hs_data, capsys,
                                                                               kind, sd, mean, lacking):
    """Without means every answer would be scored as a deviation from 0, and without SDs as a z-score (a
    regression score of about 3 for an average pupil): refused in one line, exit 2, nothing written."""
    stats, saved, out = tmp_path / "hs.stats", tmp_path / "fit.json", tmp_path / "scores.csv"
    _stats_file(stats, hs_data, kind, sd, mean)
    assert _run(["fit", model_file, "--data", stats, "--json", saved], capsys)[0] == 0
    rows = tmp_path / "rows.csv"
    hs_data.to_csv(rows)
    code, _, err = _run(["scores", model_file, "--data", rows, "--from-fit", saved, "--output", out], capsys)
    assert code == 2 and lacking in err and "fit again" in err and len(err.strip().splitlines()) == 1
    assert not out.exists()
    # a result written before fits said what their file lacked: its means of 0 are no means either
    if not mean:
        payload = json.loads(saved.read_text())
        del payload["data"]["not_given"]
        older = tmp_path / "older.json"
        older.write_text(json.dumps(payload))
        code, _, err = _run(["scores", model_file, "--data", rows, "--from-fit", older, "--output", out], capsys)
        assert code == 2 and "without the items' means" in err and not out.exists()


def test_the_python_entry_point_refuses_the_same(hs_data):
    import cfa_tool
    from cfa_tool.errors import OptionError

    x = hs_data[ITEMS]
    fitted = cfa_tool.fit(THREE_FACTORS, covariance=x.cov(), n_obs=len(x))
    with pytest.raises(OptionError, match="without the items' means"):
        fitted.scores(hs_data)


@pytest.mark.parametrize("kind, sd", [("covariance", False), ("correlation", True)])
def test_a_fit_of_summary_statistics_with_means_and_units_scores_answers(tmp_path, model_file, hs_data, capsys, kind, sd):
    stats, saved, out = tmp_path / "hs.stats", tmp_path / "fit.json", tmp_path / "scores.csv"
    _stats_file(stats, hs_data, kind, sd, mean=True)
    assert _run(["fit", model_file, "--data", stats, "--json", saved], capsys)[0] == 0
    rows = tmp_path / "rows.csv"
    hs_data.to_csv(rows)
    code, _, err = _run(["scores", model_file, "--data", rows, "--from-fit", saved, "--output", out], capsys)
    assert code == 0, err
    written = pd.read_csv(out)[[f"{f}_regression" for f in FACTORS]].to_numpy()
    x = hs_data[ITEMS].to_numpy(float)
    expected = _regression_scores(json.loads(saved.read_text()), x, x.mean(axis=0))
    np.testing.assert_allclose(written, expected, atol=1e-8)
    assert abs(written.mean()) < 1e-8  # the fitted sample itself: scores average to the factor means, 0


def test_missing_value_codes_of_the_earlier_fit_are_read_so_and_codes_in_the_scored_file_are_named(
        tmp_path, model_file, hs_data, capsys):
    """-99 in x1 of three rows: the fit was told it means no answer, so scores --from-fit reads it so too (and
    says so); the reference is the same run's own scores with --missing-codes -99 (fit and scores of one file).
    A fit that was not told gets the same caution first as every reader of data gives."""
    coded = hs_data.copy()
    coded.loc[coded.index[[3, 10, 20]], "x1"] = -99
    rows, saved = tmp_path / "coded.csv", tmp_path / "fit99.json"
    coded.to_csv(rows)
    assert _run(["fit", model_file, "--data", rows, "--missing-codes", "-99", "--json", saved], capsys)[0] == 0
    assert json.loads(saved.read_text())["data"]["missing_codes"] == [-99.0]
    out, reference, js = tmp_path / "from_fit.csv", tmp_path / "same_run.csv", tmp_path / "from_fit.json"
    code, text, err = _run(["scores", model_file, "--data", rows, "--from-fit", saved, "--output", out, "--json", js],
                           capsys)
    assert code == 0, err
    said = " ".join(text.split())
    assert (f"The earlier fit's code of no answer -99 (its missing-value codes and words of no answer) was read as no "
            f"answer in {rows} too: 3 of the {len(coded)} rows of the file held it") in said  # the three set above
    assert "--missing-codes" not in said  # not given in this run
    assert _run(["scores", model_file, "--data", rows, "--missing-codes", "-99", "--output", reference], capsys)[0] == 0
    np.testing.assert_allclose(pd.read_csv(out).to_numpy(), pd.read_csv(reference).to_numpy(), atol=1e-8)
    assert json.loads(js.read_text())["problems"] == []
    # an earlier fit of the clean rows, told nothing: the -99 answers are named first, as fit and scores name them
    clean_fit = tmp_path / "clean.json"
    hs_data.to_csv(tmp_path / "clean.csv")
    assert _run(["fit", model_file, "--data", tmp_path / "clean.csv", "--json", clean_fit], capsys)[0] == 0
    out2, js2 = tmp_path / "flagged.csv", tmp_path / "flagged.json"
    code, text, _ = _run(["scores", model_file, "--data", rows, "--from-fit", clean_fit, "--output", out2,
                          "--json", js2], capsys)
    assert code == 0 and text.index("-99") < text.index("Factor scores:")
    kinds = [p["kind"] for p in json.loads(js2.read_text())["problems"]]
    own = [p["kind"] for p in json.loads(js.read_text())["problems"]]
    # the -99 answers: a value that looks like no answer, and one outside the range of the rows the fit analysed
    assert sorted(kinds) == sorted(own + ["values that look like no answers", "answers beyond the fitted rows"])
    # the Python entry point carries the codes as well
    import cfa_tool

    fitted = cfa_tool.fit(THREE_FACTORS, coded, missing_codes=[-99])
    np.testing.assert_allclose(fitted.scores(coded).table.to_numpy(float), pd.read_csv(reference).iloc[:, 1:].to_numpy(),
                               atol=1e-8)


def test_with_an_output_on_standard_output_the_problems_still_reach_standard_error(tmp_path, model_file, hs_data,
                                                                                    capsys):
    """scores --output - and fit --json - leave standard output to the scores or the JSON alone; a missing-value
    code read as an answer is still named, on standard error (and a clean run says nothing there)."""
    import io

    coded = hs_data.copy()
    coded.loc[coded.index[[3, 10, 20]], "x1"] = -99
    rows = tmp_path / "coded.csv"
    coded.to_csv(rows)
    code, out, err = _run(["scores", model_file, "--data", rows, "--output", "-"], capsys)
    assert code == 0 and "-99" in err and "Check before using these scores" in err
    assert len(pd.read_csv(io.StringIO(out))) == len(coded)  # standard output: the scores alone
    code, out, err = _run(["fit", model_file, "--data", rows, "--json", "-"], capsys)
    assert code == 0 and "-99" in err and json.loads(out)["problems"]
    saved = tmp_path / "fit.json"
    saved.write_text(out)
    code, out, err = _run(["report", saved, "--markdown", "-"], capsys)
    assert code == 0 and "-99" in err and "-99" in out
    hs_data.to_csv(tmp_path / "clean.csv")
    code, out, err = _run(["scores", model_file, "--data", tmp_path / "clean.csv", "--output", "-"], capsys)
    # a clean file: only the scores' own caution (reliability below what decisions about individuals need, first
    # since s14), nothing about the data
    assert code == 0 and "Check before using these scores" in err and "below the .90" in err and "-99" not in err


@pytest.mark.parametrize("name, extra", [("visual_regression", []), ("speed_regression_se", ["--standard-errors"])])
def test_an_id_column_named_like_a_score_column_is_a_one_line_error(tmp_path, model_file, hs_data, capsys, name, extra):
    renamed = hs_data.rename(columns={"id": name})
    rows, out, saved = tmp_path / "ids.csv", tmp_path / "scores.csv", tmp_path / "fit.json"
    renamed.to_csv(rows)
    assert _run(["fit", model_file, "--data", rows, "--json", saved], capsys)[0] == 0
    for more in ([], ["--from-fit", saved]):
        code, _, err = _run(["scores", model_file, "--data", rows, "--output", out, "--id", name, *extra, *more], capsys)
        assert code == 2 and f"'{name}' has the name of a column of scores" in err and len(err.splitlines()) == 1
        assert not out.exists()


def test_every_reader_of_a_saved_fit_reads_it_re_saved_by_an_editor_and_refuses_the_same_files_alike(
        tmp_path, model_file, hs_data, capsys):
    """A fit's JSON re-saved with a UTF-8 byte-order mark or as UTF-16 (as Windows editors save 'Unicode') is read
    by report, scores --from-fit and simulate --population-from; bytes that are no text and text that is no JSON
    get one message each, the same from all three."""
    rows, saved = tmp_path / "hs.csv", tmp_path / "fit.json"
    hs_data.to_csv(rows)
    assert _run(["fit", model_file, "--data", rows, "--json", saved], capsys)[0] == 0
    text = saved.read_text(encoding="utf-8")
    reference = tmp_path / "reference.csv"
    assert _run(["scores", model_file, "--data", rows, "--from-fit", saved, "--output", reference], capsys)[0] == 0
    variants = {"bom.json": b"\xef\xbb\xbf" + text.encode("utf-8"), "u16.json": text.encode("utf-16")}
    for name, content in variants.items():
        path = tmp_path / name
        path.write_bytes(content)
        out = tmp_path / f"{name}.csv"
        assert _run(["report", path, "--markdown", tmp_path / f"{name}.md"], capsys)[0] == 0
        assert _run(["scores", model_file, "--data", rows, "--from-fit", path, "--output", out], capsys)[0] == 0
        assert out.read_bytes() == reference.read_bytes()
        assert _run(["simulate", model_file, "--n", 5, "--output", tmp_path / f"sim_{name}.csv", "--population-from",
                     path], capsys)[0] == 0
    for content, words in ((b"\xff\xfe\x00", "is not UTF-8 text"), (b"{nope", "is not JSON (line 1, column 2")):
        bad = tmp_path / "bad.json"
        bad.write_bytes(content)
        errors = []
        for argv in (["report", bad], ["scores", model_file, "--data", rows, "--from-fit", bad, "--output",
                                       tmp_path / "no.csv"],
                     ["simulate", model_file, "--n", 5, "--output", tmp_path / "no2.csv", "--population-from", bad]):
            code, _, err = _run(argv, capsys)
            assert code == 2 and len(err.strip().splitlines()) == 1 and words in err, err
            errors.append(err.split("bad.json'")[1])
        assert len(set(errors)) == 1  # the same words after the file's name


def test_words_that_said_a_little_more_or_less_than_happened(tmp_path, model_file, hs_data, capsys):
    """a) a result without its report is described by what it lacks, not blamed on the current version;
    b) a file of scores is never replaced by simulated rows, and the refusal says that rule, not that cfa-tool did
    not write it; c) rows of weight 0 are left out of the fit, not of the scores, and the report says both;
    d) scores from an earlier fit with gaps repeat its note without advice of an option scores --from-fit refuses."""
    from cfa_tool import __version__

    rows, saved = tmp_path / "hs.csv", tmp_path / "fit.json"
    weighted = hs_data.assign(w=1.0)
    weighted.loc[weighted.index[5], "w"] = 0.0
    weighted.loc[weighted.index[7], "x2"] = np.nan  # a gap: full-information ML and its note
    weighted.to_csv(rows)
    assert _run(["fit", model_file, "--data", rows, "--json", saved], capsys)[0] == 0
    payload = json.loads(saved.read_text())
    del payload["report"]
    bare = tmp_path / "bare.json"
    bare.write_text(json.dumps(payload))
    code, _, err = _run(["report", bare], capsys)
    assert code == 2 and "holds no 'report' part" in err and __version__ not in err
    scores = tmp_path / "scores.csv"
    code, text, err = _run(["scores", model_file, "--data", rows, "--output", scores, "--weights", "w"], capsys)
    assert code == 0, err
    flat = " ".join(text.split())
    assert "1 row has weight 0 in 'w' and was left out of the estimation" in flat and "The row of weight 0 is scored" in flat
    assert not pd.read_csv(scores).iloc[5, 1:-2].isna().any()  # that row has its scores (nothing in the last two)
    before = scores.read_bytes()
    code, _, err = _run(["simulate", model_file, "--n", 5, "--output", scores], capsys)
    assert code == 2 and "exists, and this output never replaces a file" in err and "not written by" not in err
    assert scores.read_bytes() == before
    code, text, err = _run(["scores", model_file, "--data", rows, "--from-fit", saved, "--output",
                            tmp_path / "again.csv"], capsys)
    assert code == 0, err
    flat = " ".join(text.split())
    assert "About the fit (not the scored data): 1 of 301 rows misses some answers" in flat
    assert "--incomplete-rows" not in flat


def test_rows_in_groups_the_fit_does_not_have_are_said_first_and_none_scored_is_an_error(tmp_path, model_file, hs_data,
                                                                                          capsys):
    # hostile trial 8: a fit grouped by school scored a file whose labels were written in capitals: exit 0, "Scores
    # of 301 rows", every score cell empty, and only a table near the end said why.  Now a caution comes first (with
    # the fit's label that differs in case only), and a file none of whose rows is in a fitted group is an error.
    saved = tmp_path / "grouped.json"
    hs_data.to_csv(tmp_path / "rows.csv")
    assert _run(["fit", model_file, "--data", tmp_path / "rows.csv", "--group-column", "school", "--json", saved],
                capsys)[0] == 0
    upper = hs_data.assign(school=hs_data["school"].str.upper())
    upper.to_csv(tmp_path / "upper.csv")
    code, _, err = _run(["scores", model_file, "--data", tmp_path / "upper.csv", "--from-fit", saved, "--output",
                         tmp_path / "none.csv"], capsys)
    assert code == 2 and "no row of" in err and "'PASTEUR' (156 rows; the fit has 'Pasteur')" in err
    assert not (tmp_path / "none.csv").exists()
    some = hs_data.copy()
    some.loc[some.index[:10], "school"] = "pasteur"
    some.to_csv(tmp_path / "some.csv")
    out, js = tmp_path / "some_scores.csv", tmp_path / "some.json"
    code, text, err = _run(["scores", model_file, "--data", tmp_path / "some.csv", "--from-fit", saved, "--output", out,
                            "--json", js], capsys)
    assert code == 0, err
    # cautions first in every view: the scored file's labels differing in case (the cause), then the rows they leave
    # in groups the fit does not have (its consequence), as a fit puts its data's cautions before the rest
    cause, first = json.loads(js.read_text())["problems"][:2]
    assert cause["kind"] == "group labels differing only in case" and "'pasteur' (10 rows)" in cause["explanation"]
    assert first["kind"] == "rows in groups the fit does not have"
    assert "10 rows of" in first["explanation"] and "'pasteur' (10 rows; the fit has 'Pasteur')" in first["explanation"]
    assert text.index("Check before using these scores") < text.index("Scores of")
    scored = pd.read_csv(out)
    assert scored.filter(like="_regression").notna().all(axis=1).sum() == len(hs_data) - 10
    # the lines without a score say why, and the count said is of the rows scored (it said "Scores of 301 rows")
    unknown = (some["school"] == "pasteur").to_numpy()  # the rows relabelled above, found again by pandas
    assert scored["why_not_scored"].eq("group not in the fit").to_numpy().tolist() == unknown.tolist()
    assert f"Scores of {len(hs_data) - 10} of the {len(hs_data)} rows written" in text


def test_answers_outside_the_fitted_rows_range_are_said_first(tmp_path, model_file, hs_data, capsys):
    # hostile trial 8: a second sample coded one lower than the first (0-4 against 1-5) was scored with the first's
    # fit with no word, every score shifted.  The fit's JSON now keeps each item's lowest and highest answer (here
    # the data's own min and max, read with pandas), and answers of the scored file outside them are named first.
    saved = tmp_path / "fit.json"
    hs_data.to_csv(tmp_path / "rows.csv")
    assert _run(["fit", model_file, "--data", tmp_path / "rows.csv", "--json", saved], capsys)[0] == 0
    ranges = json.loads(saved.read_text())["data"]["answer_ranges"]
    assert ranges["x1"] == [hs_data["x1"].min(), hs_data["x1"].max()]
    shifted = hs_data.copy()
    shifted[ITEMS] = shifted[ITEMS] - 1
    shifted.to_csv(tmp_path / "shifted.csv")
    js = tmp_path / "s.json"
    code, text, err = _run(["scores", model_file, "--data", tmp_path / "shifted.csv", "--from-fit", saved, "--output",
                            tmp_path / "s.csv", "--json", js], capsys)
    below = int((shifted["x1"] < hs_data["x1"].min()).sum())
    assert code == 0, err
    assert below >= 1
    first = json.loads(js.read_text())["problems"][0]  # a caution first in every view
    assert first["kind"] == "answers beyond the fitted rows"
    # the ends as the data hold them (Python's shortest repr, which reads back as the same number; ':g' rounded them
    # to six digits, '0.666667', another number)
    low, high = (repr(float(v)).removesuffix(".0") for v in (hs_data["x1"].min(), hs_data["x1"].max()))
    assert f"'x1', {below} answer{'s' if below != 1 else ''} outside {low} to {high}" in first["explanation"]
    assert text.index("Check before using these scores") < text.index("Scores of")
    # the fit's own rows: nothing to say
    code, text, _ = _run(["scores", model_file, "--data", tmp_path / "rows.csv", "--from-fit", saved, "--output",
                          tmp_path / "own.csv"], capsys)
    assert code == 0 and "outside the range" not in text
