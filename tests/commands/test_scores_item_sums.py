"""``cfa-tool scores --method item-sum,item-mean`` end to end on the rider survey (demo data, invented).

Check values and their sources: the sums and means written against pandas arithmetic on the same file (a reversed
answer x counts as lowest + highest - x on the scale the 'reversed' statement declares; a row that answered at least
the stated share of a factor's items gets the mean of its answered keyed items, times the number of items for the
sum: common practice, recalled from memory); the omega beside them is the one the fit reports for the factor
(assessment.reliability, checked against McDonald's formula in tests/scoring/test_item_sums.py).
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

from cfa_tool.cli import main
from cfa_tool.scoring.methods import Unscored
from cfa_tool.reporting.score_words import share_words
from tests.commands.test_cli import DATA, MODEL

FACTORS = {"punctuality": ["on_time", "short_wait", "accurate_info", "easy_transfer"],
           "comfort": ["seat_available", "clean", "temperature", "room_to_stand"],
           "courtesy": ["greeting", "helpful", "respectful", "clear_answers"]}


def _run(argv, capsys):
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, " ".join(out.out.split()), out.err  # the report's words, whatever the width wrapped


@pytest.fixture(scope="module")
def files(tmp_path_factory):
    folder = tmp_path_factory.mktemp("sums")
    frame = pd.read_csv(DATA)
    frame["short_wait"] = 6 - frame["short_wait"]  # worded against the trait, answered 1 to 5
    rng = np.random.default_rng(12)
    for column in ("on_time", "short_wait", "accurate_info", "clean", "greeting"):
        frame.loc[rng.random(len(frame)) < 0.25, column] = np.nan
    frame.to_csv(folder / "answers.csv", index=False)
    (folder / "keyed.cfa").write_text(MODEL.read_text(encoding="utf-8") + "\nreversed short_wait on 1 to 5\n",
                                      encoding="utf-8")
    return folder, frame


def _by_pandas(frame: pd.DataFrame, share: float) -> dict[str, tuple[pd.Series, pd.Series, int]]:
    out = {}
    for factor, items in FACTORS.items():
        keyed = frame[items].copy()
        if "short_wait" in items:
            keyed["short_wait"] = 1 + 5 - keyed["short_wait"]
        answered = keyed.count(axis=1)
        mean = keyed.mean(axis=1).where(answered >= np.ceil(share * len(items)))
        prorated = int(((answered < len(items)) & mean.notna()).sum())
        out[factor] = (mean * len(items), mean, prorated)
    return out


@pytest.mark.parametrize("share", [None, 0.75])
def test_sums_and_means_written_are_pandas_arithmetic(files, capsys, share):
    folder, frame = files
    out, js = folder / f"sums{share}.csv", folder / f"sums{share}.json"
    argv = ["scores", folder / "keyed.cfa", "--data", folder / "answers.csv", "--output", out, "--json", js,
            "--method", "item-sum,item-mean,regression"] + (["--least-answered", share] if share else [])
    code, text, err = _run(argv, capsys)
    assert code == 0, err
    written = pd.read_csv(out)
    expected = _by_pandas(frame, share or 0.5)
    result = json.loads(js.read_text())
    (summary,) = result["item_sums"]
    assert summary["least_share_answered"] == (share or 0.5) and summary["least_share_is_default"] is (share is None)
    assert summary["reversed"] == [{"factor": "punctuality", "item": "short_wait", "lowest": 1.0, "highest": 5.0,
                                    "scale_from": "declared"}]
    fitted = {r["factor"]: r["omega"] for r in result["fit"]["reliability"]["factors"]}
    for entry in summary["factors"]:
        factor = entry["factor"]
        sums, means, prorated = expected[factor]
        np.testing.assert_allclose(written[f"{factor}_item_sum"], sums, rtol=1e-9, equal_nan=True)
        np.testing.assert_allclose(written[f"{factor}_item_mean"], means, rtol=1e-9, equal_nan=True)
        # the fit's omega by the same formula (assessment.reliability.keyed_omega) from the scoring model's matrices:
        # equal to the last digits (the two routes' sums may round apart by one unit in the last place)
        assert entry["rows_prorated"] == prorated and entry["omega"] == pytest.approx(fitted[factor], rel=1e-12)
    empty = {u["method"]: u["rows"] for u in result["unscored"] if u["reason"] == Unscored.TOO_FEW_ITEMS_ANSWERED.value}
    counts = {f: int(expected[f][0].isna().sum()) for f in FACTORS}
    assert sum(counts.values()) > 0  # the data leave some sums empty, so the reason below is shown
    assert empty.get("item-sum", dict.fromkeys(FACTORS, 0)) == counts
    # why they are empty, in plain words with the share the run used (new user s15: 'the item sum's least share')
    words = "half" if share is None else "75%"
    # (the table's cell wraps the words over lines, the other column between them)
    assert f"answered fewer than {words} of the" in text and f"--least-answered {share or 0.5})" in text
    assert "least share answered" not in text and "item sum's least share" not in text
    assert "_item_sum_se" not in ",".join(written.columns)  # standard errors are the factor scores' alone
    # the rule and the rows prorated are said in the report, with the omega beside the methods
    assert "Item sum ω" in text and "rest on some of a factor's items (prorated)" in text
    assert f"at least {share_words(share or 0.5)} of" in text and "short_wait on punctuality, on 1 to 5" in text
    assert ("common-practice default" in text) is (share is None)


def test_a_higher_order_factor_has_no_item_sum(files, capsys):
    folder, _ = files
    model = folder / "higher.cfa"
    model.write_text(MODEL.read_text(encoding="utf-8") + "\nfactor service: punctuality, comfort, courtesy\n"
                     + "reversed short_wait on 1 to 5\n", encoding="utf-8")
    out = folder / "higher.csv"
    code, text, err = _run(["scores", model, "--data", folder / "answers.csv", "--output", out, "--method", "item-sum"],
                           capsys)
    assert code == 0, err
    written = pd.read_csv(out)
    assert written["service_item_sum"].isna().all() and written["comfort_item_sum"].notna().any()
    assert "only for a factor measured by its own items alone" in text


@pytest.mark.parametrize("extra, said", [
    (["--least-answered", "0.5"], "--least-answered is the rule of item sums and means"),
    (["--method", "item-sum", "--least-answered", "0"], "must be above 0"),
    (["--method", "item-mean", "--least-answered", "1.5"], "must be at most 1"),
])
def test_options_that_cannot_apply_are_refused(files, capsys, extra, said):
    folder, _ = files
    code, _, err = _run(["scores", folder / "keyed.cfa", "--data", folder / "answers.csv", "--output",
                         folder / "refused.csv"] + extra, capsys)
    assert code == 2 and said in err and len(err.strip().splitlines()) == 1, err
    assert not (folder / "refused.csv").exists()


def test_the_same_sums_with_an_earlier_fit(files, capsys):
    folder, _ = files
    fit_json = folder / "fit.json"
    assert _run(["fit", folder / "keyed.cfa", "--data", folder / "answers.csv", "--json", fit_json], capsys)[0] == 0
    direct, later = folder / "direct.csv", folder / "later.csv"
    common = ["--data", folder / "answers.csv", "--method", "item-sum"]
    assert _run(["scores", folder / "keyed.cfa", *common, "--output", direct], capsys)[0] == 0
    code, text, err = _run(["scores", folder / "keyed.cfa", *common, "--output", later, "--from-fit", fit_json], capsys)
    assert code == 0, err
    pd.testing.assert_frame_equal(pd.read_csv(direct), pd.read_csv(later))
    assert "Item sum ω" in text


def test_ordinal_items_get_item_sums_beside_the_posterior_means(files, capsys):
    folder, frame = files
    out, js = folder / "ordinal.csv", folder / "ordinal.json"
    code, text, err = _run(["scores", folder / "keyed.cfa", "--data", folder / "answers.csv", "--output", out,
                            "--json", js, "--ordinal", "all", "--method", "item-sum"], capsys)
    assert code == 0, err
    written = pd.read_csv(out)
    for factor, (sums, _, _) in _by_pandas(frame, 0.5).items():
        np.testing.assert_allclose(written[f"{factor}_item_sum"], sums, rtol=1e-9, equal_nan=True)
        assert f"{factor}_posterior_mean" in written
    result = json.loads(js.read_text())
    fitted = {r["factor"]: r["observed_sum_omega"] for r in result["fit"]["reliability"]["factors"]}
    assert {f["factor"]: f["omega"] for f in result["item_sums"][0]["factors"]} == fitted  # Green & Yang 2009
    # without the 'reversed' statement the loading's sign keys short_wait, reversed on the lowest and highest
    # category the fitted rows gave (1 and 5 here), with a caution first
    code, text, err = _run(["scores", MODEL, "--data", folder / "answers.csv", "--output", folder / "signs.csv",
                            "--json", folder / "signs.json", "--ordinal", "all", "--method", "item-mean"], capsys)
    assert code == 0, err
    assert json.loads((folder / "signs.json").read_text())["item_sums"][0]["reversed"] == [
        {"factor": "punctuality", "item": "short_wait", "lowest": 1.0, "highest": 5.0, "scale_from": "observed"}]
    assert "reverse short_wait (1 to 5) on the lowest and highest answers" in text.split("Quality of the scores")[0]
    np.testing.assert_allclose(pd.read_csv(folder / "signs.csv")["punctuality_item_mean"],
                               _by_pandas(frame, 0.5)["punctuality"][1], rtol=1e-9, equal_nan=True)
    code, _, err = _run(["scores", folder / "keyed.cfa", "--data", folder / "answers.csv", "--output",
                         folder / "no.csv", "--ordinal", "all", "--method", "item-sum,regression"], capsys)
    assert code == 2 and "a scoring method cannot be chosen" in err
