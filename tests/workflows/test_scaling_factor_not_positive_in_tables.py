"""Comparisons and invariance ladders of fits whose robust test has a scaling factor that is not positive (advice2-s17
made a single fit say 'scaled test not computed'; the tables of compare and invariance still printed 'nan', and a
general model's negative factor made the 2001 correction positive, so a 'scaled' difference was printed from it).

The scaling factor c = tr(U Gamma) / df and the scaled statistic T / c are Satorra & Bentler's (1994); the scaled
difference's correction c_d = (df0 c0 - df1 c1) / (df0 - df1) is Satorra & Bentler's (2001).  With complete rows the
estimate of c cannot fall below zero (U and Gamma are positive semi-definite), and with rows with gaps it can (re-check
s17); the cases here are constructed as advice2's were (tests/inference/test_scaling_factor_not_positive.py): the
estimated trace of one model (found by its degrees of freedom) is replaced by a negative one, the rest of every fit
left as it is.  Data: simulated with a fixed seed (heavy-tailed answers of a fictional rider survey)."""

from __future__ import annotations

import io
import json
import re

import docx
import numpy as np
import pandas as pd
import pytest

import cfa_tool
import cfa_tool.inference.robust as robust
from cfa_tool.method import DifferenceMethod
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.json_report import to_json
from cfa_tool.reporting.reports import report_of
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.text_formats import report_markdown

ONE = 'name "one factor"\nfactor all: q1, q2, q3, q4, q5, q6\n'  # df 9
TWO = 'name "two factors"\nfactor comfort: q1, q2, q3\nfactor speed: q4, q5, q6\n'  # df 8
NAN = re.compile(r"\bnan\b", re.IGNORECASE)
NOT_COMPUTED = "\u2014"  # the cell of a figure not computed, explained in the table's note (reporting.tables)


def _survey(seed: int = 11, n: int = 300) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    factors = rng.normal(size=(n, 2)) @ np.linalg.cholesky([[1.0, 0.5], [0.5, 1.0]]).T
    values = np.hstack([0.7 * factors[:, [0]] + 0.6 * rng.standard_t(5, size=(n, 3)),
                        0.7 * factors[:, [1]] + 0.6 * rng.standard_t(5, size=(n, 3))])
    return pd.DataFrame(values, columns=[f"q{k}" for k in range(1, 7)])


def _negative_factor_at(monkeypatch, df: int, factor: float = -0.5) -> None:
    """The robust test of the model of ``df`` degrees of freedom with the scaling factor ``factor`` (the
    constructed case); every other fit's as estimated."""
    real = robust.robust_fit

    def robust_fit(chi_square, model_df, trace, *args, **kwargs):
        return real(chi_square, model_df, factor * model_df if model_df == df else trace, *args, **kwargs)

    monkeypatch.setattr(robust, "robust_fit", robust_fit)


def _word(report) -> str:
    document = docx.Document(io.BytesIO(report_docx(report)))
    return " ".join(" ".join([p.text for p in document.paragraphs]
                             + [c.text for t in document.tables for r in t.rows for c in r.cells]).split())


def _views(result) -> dict[str, str]:
    report = report_of(result)
    return {"text": report_text(report, width=120), "html": report_html(report), "markdown": report_markdown(report),
            "word": _word(report), "json": to_json(result, report)}


@pytest.mark.parametrize("negative, name", [(9, "one factor"), (8, "two factors")])
def test_a_comparison_prints_no_nan_and_scales_no_difference_by_a_factor_that_is_not_positive(monkeypatch, negative,
                                                                                              name):
    _negative_factor_at(monkeypatch, negative)
    comparison = cfa_tool.compare([ONE, TWO], _survey(), test="robust")
    which = comparison.names.index(name)
    assert comparison.results[which].robust.not_computed  # the fit's own record (advice2-s17)
    scaled = [t for t in comparison.tests if t.method is not DifferenceMethod.LIKELIHOOD_RATIO]
    assert {t.method for t in scaled} == {DifferenceMethod.SATORRA_BENTLER_2001, DifferenceMethod.SATORRA_BENTLER_2010}
    # the general model's -0.5 made c_d = (9 c0 + 8 x 0.5) / 1 positive: no difference is scaled by it, and the
    # reason names the model first
    two_thousand_one = next(t for t in scaled if t.method is DifferenceMethod.SATORRA_BENTLER_2001)
    assert np.isnan(two_thousand_one.chi_square_difference)
    assert str(two_thousand_one.not_computed).startswith(f"the scaling factor of {name} (-0.5) is not positive, so "
                                                         f"the difference cannot be scaled")
    likelihood_ratio = next(t for t in comparison.tests if t.method is DifferenceMethod.LIKELIHOOD_RATIO)
    assert np.isfinite(likelihood_ratio.p_value)  # the normal-theory difference stands
    views = _views(comparison)
    for view, text in views.items():
        assert not NAN.search(text), view
        assert "[, ]" not in text, view
    for view in ("text", "html", "markdown", "word"):
        flat = " ".join(views[view].split())
        # the caution first, the dashes explained under the table, the difference's reason
        assert "scaled test could not be computed" in flat.split("Fit of each model")[0], view
        assert f"{NOT_COMPUTED} not computed: {name}: the scaled test, its p-value and the robust indices" in flat, view
        minus = "\u2212" if view in ("html", "word") else "-"  # the printed views' true minus (reporting.numbers)
        assert f"not computed: the scaling factor of {name} ({minus}0.5) is not positive" in flat, view
    text = " ".join(views["text"].split())
    fit_table = text.split("Fit of each model")[1].split("difference tests")[0]
    assert f"p {NOT_COMPUTED}" in " ".join(fit_table.split()) or f" {NOT_COMPUTED} " in fit_table
    saved = json.loads(views["json"])
    model = saved["models"][which]
    assert model["robust"]["chi_square_scaled"] is None and model["robust"]["cfi_robust"] is None
    assert model["robust"]["not_computed"].startswith("the Satorra-Bentler scaled test could not be computed")
    # the 2010 version takes the restricted fit's own factor and the general model's at the restricted estimates
    # (Satorra & Bentler 2010): computed when only the general fit's own factor is not positive
    not_scaled = [str(DifferenceMethod.SATORRA_BENTLER_2001)] + (
        [str(DifferenceMethod.SATORRA_BENTLER_2010)] if name == "one factor" else [])
    for test in saved["tests"]:
        if test["method"] in not_scaled:
            assert test["chi_square_difference"] is None and test["p_value"] is None
            assert test["not_computed"].startswith(f"the scaling factor of {name}")
        else:
            assert test["p_value"] is not None and not test["not_computed"]
    if name == "one factor":  # the methods paragraph: the one difference computed compares normal-theory chi-squares
        assert "difference test (Steiger, Shapiro & Browne, 1985) of the normal-theory chi-squares" in " ".join(
            views["text"].split())


def _groups(seed: int = 5, n: int = 250) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    frames = []
    for line in ("north", "south"):
        factor = rng.normal(size=n)
        frame = pd.DataFrame(0.7 * factor[:, None] + 0.6 * rng.standard_t(6, size=(n, 4)),
                             columns=["q1", "q2", "q3", "q4"])
        frame["line"] = line
        frames.append(frame)
    return pd.concat(frames, ignore_index=True)


LADDER = "factor comfort: q1, q2, q3, q4\n"  # configural 4 df, metric 7, scalar 10, strict 14 (two groups)


def test_an_invariance_ladder_prints_no_nan_and_says_which_level_had_no_scaled_test(monkeypatch):
    _negative_factor_at(monkeypatch, 7, -0.4)  # the metric model's
    ladder = cfa_tool.invariance(LADDER, _groups(), group="line", test="robust")
    metric, scalar = ladder.steps[1], ladder.steps[2]
    assert [s.level for s in ladder.steps] == ["configural", "metric", "scalar", "strict"]
    assert metric.result.robust.not_computed
    # the metric step: neither scaled version takes the metric model's factor, so the likelihood-ratio difference;
    # the scalar step: the 2001 correction would take it too, so the 2010 version (its factors at the scalar
    # estimates), or the likelihood-ratio difference; never a difference scaled by -0.4
    assert metric.versus_previous.method is DifferenceMethod.LIKELIHOOD_RATIO
    assert scalar.versus_previous.method is not DifferenceMethod.SATORRA_BENTLER_2001
    views = _views(ladder)
    for view, text in views.items():
        assert not NAN.search(text), view
    for view in ("text", "html", "markdown", "word"):
        flat = " ".join(views[view].split())
        assert "The metric model: The Satorra-Bentler scaled test could not be computed" in flat.split(
            "Fit of each level")[0], view
        assert f"{NOT_COMPUTED} not computed: the metric model: the scaled test" in flat, view
        assert "at the metric step the scaling factor of the metric model is not positive (its scaled test not " \
               "computed), so the unscaled likelihood-ratio difference is given" in flat, view
        assert "\u0394CFI = ," not in flat and "\u0394RMSEA = ," not in flat, view  # the methods paragraph
    saved = json.loads(views["json"])
    assert saved["steps"][1]["robust"]["chi_square_scaled"] is None
    assert saved["steps"][1]["robust"]["not_computed"].startswith("the Satorra-Bentler scaled test could not be")


def test_a_configural_model_without_robust_indices_is_not_judged_on_numbers_that_do_not_exist(monkeypatch):
    _negative_factor_at(monkeypatch, 4, -0.4)  # the configural model's
    ladder = cfa_tool.invariance(LADDER, _groups(), group="line", test="robust")
    configural = ladder.steps[0]
    # its CFI and RMSEA were not computed: not 'CFI nan, below .95' but not judged, and said first
    assert not configural.holds and configural.unjudged.startswith("its robust CFI and RMSEA were not computed")
    assert ladder.warnings[0].startswith("the configural model could not be judged by the guide values")
    assert all(s.conditional for s in ladder.steps[1:])
    views = _views(ladder)
    for view, text in views.items():
        assert not NAN.search(text), view
    text = " ".join(views["text"].split())
    assert "not judged" in text.split("Each step against the one before")[1]
    assert "The configural model could not be judged: its robust CFI and RMSEA were not computed" in text
    assert json.loads(views["json"])["steps"][0]["not_judged_because"] == configural.unjudged
