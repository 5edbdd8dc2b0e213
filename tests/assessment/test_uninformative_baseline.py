"""CFI and TLI when the baseline (independence) model itself fits or nearly fits (hostile s19, cases 02 and 04).

* CFI = 1 - max(lambda, 0) / max(lambda, lambda_b, 0) (Bentler 1990) is 0/0 when neither model's chi-square exceeds
  its degrees of freedom: not defined, never 1.000 beside its guide.
* TLI = 1 - (lambda / df) / (lambda_b / df_b) (Tucker & Lewis 1973) is not normed: one rule for every test, not cut
  at 1 (the robust TLI was cut, the normal-theory one not: 1.000 and 1.574 in one report).
* A baseline model whose RMSEA, sqrt(max(chi2_b - df_b, 0) / (df_b N)) (Steiger 1990), lies below .158 bounds CFI
  and TLI (Kenny, Kaniskan & McCoach 2015, recalled from memory; a rule of thumb): a caution, after every problem of
  the solution and the data (s20: it stood above a poor fit's), in measured words (s20: 'say little ..., high or
  low' was said of a realistic 25-item scale), and the guide cells and the methods paragraph say so.  For TLI the
  bound is exact: TLI = 1 - (RMSEA / baseline RMSEA)^2 when both noncentralities are positive, by the definitions
  of Tucker & Lewis (1973) and of the RMSEA written in one another's terms (algebra, checked on the fits below).  Holzinger & Swineford (1939), whose baseline chi-square is 918.85
  on 36 df for N = 301 (recalled from memory, as widely published), has a baseline RMSEA of .285 and no caution.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import EARLIER_WORDS, ProblemKind
from cfa_tool.assessment.fit_indices import cfi_from, tli_value
from cfa_tool.cli import main
from cfa_tool.errors import OptionError
from cfa_tool.inference.robust import robust_fit
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.tables import fit_table
from tests.conftest import THREE_FACTORS, holzinger_swineford


def _noise(n: int = 500, seed: int = 1) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    x = rng.normal(size=(n, 6)) + 0.12 * rng.normal(size=(n, 1))
    return pd.DataFrame(x, columns=[f"x{i}" for i in range(1, 7)])


ONE = "factor f: x1, x2, x3, x4, x5, x6\n"


def test_cfi_is_not_defined_when_neither_model_misfits():
    assert math.isnan(cfi_from(-3.0, -0.4))  # 0/0 (Bentler 1990's definition)
    assert cfi_from(-3.0, 10.0) == 1.0  # the model fits, the baseline does not: 1 - 0/10
    assert np.isclose(cfi_from(5.0, 20.0), 0.75)  # 1 - 5/20 (Bentler 1990)


def test_the_robust_tli_is_cut_no_more_than_the_normal_theory_one():
    # T = 10 on 15 df with c = 1.2 (noncentrality 10 - 18 = -8), baseline 60 on 21 df with cb = 1.5 (60 - 31.5 = 28.5):
    # TLI = 1 - (-8 / 15) / (28.5 / 21) = 1.39298... (Brosseau-Liard & Savalei 2014's formula, by hand)
    r = robust_fit(10.0, 15, 1.2 * 15, 60.0, 21, 1.5 * 21, 300, 1)
    assert np.isclose(r.tli_robust, 1 - (-8 / 15) / (28.5 / 21))
    assert r.tli_robust > 1 and r.cfi_robust == 1.0  # CFI is cut by its definition, TLI is not
    # the normal-theory TLI of the same form (Tucker & Lewis 1973): (60/21 - 10/15) / (60/21 - 1)
    assert np.isclose(tli_value(10.0, 15, 60.0, 21), (60 / 21 - 10 / 15) / (60 / 21 - 1)) and tli_value(
        10.0, 15, 60.0, 21) > 1


def test_noise_gets_no_cfi_and_a_caution_first_in_every_view(tmp_path, capsys):
    data = _noise()
    result = cfa_tool.fit(ONE, data)
    f = result.fit
    assert f.chi_square < f.df and f.baseline_chi_square < f.baseline_df  # both below their df: CFI is 0/0
    assert math.isnan(f.cfi)
    [caution] = [p for p in result.problems if p.kind is ProblemKind.UNINFORMATIVE_BASELINE]
    assert caution.value == 0.0  # sqrt(max(chi2_b - df_b, 0) / ...) with chi2_b below df_b (Steiger 1990)
    assert "below .158" in str(caution.explanation) and "Kenny, Kaniskan & McCoach 2015" in str(caution.explanation)
    table = fit_table(result)
    rows = {row[0]: row for row in table.rows}
    assert rows["CFI"][1] == "not defined" and "bounded by the baseline" in rows["CFI"][2]
    assert rows["TLI"][2] == ">= .95; bounded by the baseline: see the caution"  # the guide stays
    assert "TLI is not cut at 1" in str(table.note)
    paragraph = methods_paragraph(result)
    assert "CFI = not defined" in paragraph
    # the baseline's chi-square below its df: TLI not defined and CFI 0/0, said before the figures (s22)
    assert paragraph.index("so the TLI was not defined") < paragraph.index("nor was the CFI (its formula gives 0/0") < paragraph.index(
        "The model fit was")
    path = tmp_path / "noise.csv"
    data.to_csv(path, index=False)
    (tmp_path / "one.cfa").write_text(ONE)
    assert main(["fit", str(tmp_path / "one.cfa"), "--data", str(path), "--json", str(tmp_path / "o.json")]) == 0
    out = capsys.readouterr().out
    assert out.index("The items correlate weakly: the baseline model") < out.index("Model fit")
    saved = json.loads((tmp_path / "o.json").read_text())
    assert saved["fit"]["cfi"] is None
    kinds = [p["kind"] for p in saved["problems"]]
    assert "uninformative baseline" in kinds  # a kind, no advice (s23), by the kind's own name (s26)
    # every kind the JSON lists is a value of the one vocabulary of kinds, none of the words of earlier versions
    assert all(ProblemKind(k).value == k and k not in EARLIER_WORDS for k in kinds)


def test_a_robust_fit_follows_the_same_rules():
    result = cfa_tool.fit(ONE, _noise(), test="robust")
    r = result.robust
    assert math.isnan(r.cfi_robust)
    assert any(p.kind is ProblemKind.UNINFORMATIVE_BASELINE for p in result.problems)
    rows = {row[0]: row for row in fit_table(result).rows}
    assert rows["Robust CFI / TLI"][1].startswith("not defined /") and "bounded" in rows["Robust CFI / TLI"][2]


def test_weakly_correlated_items_get_the_caution_and_a_tli_above_one():
    rng = np.random.default_rng(1)
    n = 200
    f = rng.normal(size=n)
    g = 0.3 * f + rng.normal(size=n) * 0.95
    cols = {f"a{i}": 0.45 * f + rng.normal(size=n) for i in (1, 2, 3)}
    cols |= {f"b{i}": 0.45 * g + rng.normal(size=n) for i in (1, 2, 3)}
    result = cfa_tool.fit("factor A: a1, a2, a3\nfactor B: b1, b2, b3\n", pd.DataFrame(cols))
    fit = result.fit
    base = np.sqrt(max(fit.baseline_chi_square - fit.baseline_df, 0) / (fit.baseline_df * n))  # Steiger 1990
    assert base < 0.158 and fit.tli > 1
    [caution] = [p for p in result.problems if p.kind is ProblemKind.UNINFORMATIVE_BASELINE]
    assert np.isclose(caution.value, base)
    robust = cfa_tool.fit("factor A: a1, a2, a3\nfactor B: b1, b2, b3\n", pd.DataFrame(cols), test="robust")
    assert robust.robust.tli_robust > 1  # not cut at 1 either (it was 1.000 beside a plain 1.574)


def test_items_that_correlate_get_no_caution():
    result = cfa_tool.fit(THREE_FACTORS, holzinger_swineford())
    f = result.fit
    assert np.isclose(f.baseline_chi_square, 918.85, atol=0.01) and f.baseline_df == 36  # recalled from memory
    assert not any(p.kind is ProblemKind.UNINFORMATIVE_BASELINE for p in result.problems)
    assert "bounded" not in str(fit_table(result).rows)


def _five_traits(n: int = 500, seed: int = 5) -> pd.DataFrame:
    """A realistic 25-item scale of five correlated traits (loadings .45 to .65, factor correlations .2; invented
    population values), answered on five points, one item of t0 leaning on t1 as well (left out of the models:
    some misfit): its baseline RMSEA lies near .10, below .158."""
    rng = np.random.default_rng(seed)
    phi = np.full((5, 5), 0.2) + np.eye(5) * 0.8
    loadings = np.zeros((25, 5))
    for k in range(5):
        loadings[5 * k:5 * k + 5, k] = rng.uniform(0.45, 0.65, 5)
    latent = rng.multivariate_normal(np.zeros(5), phi, size=n)
    x = latent @ loadings.T + rng.normal(size=(n, 25)) * np.sqrt(1 - (loadings ** 2).sum(axis=1))
    x[:, 3] += 0.5 * latent[:, 1]
    return pd.DataFrame(np.clip(np.round(x * 1.1 + 3), 1, 5), columns=[f"q{i}" for i in range(1, 26)])


FIVE = "".join(f"factor t{k}: {', '.join(f'q{i}' for i in range(5 * k + 1, 5 * k + 6))}\n" for k in range(5))


def test_a_realistic_scale_is_told_how_the_indices_are_bounded_in_measured_words():
    result = cfa_tool.fit(FIVE, _five_traits())
    f = result.fit
    [caution] = [p for p in result.problems if p.kind is ProblemKind.UNINFORMATIVE_BASELINE]
    base = caution.value
    assert 0.05 < base < 0.158
    # the identity the caution states, on this fit: TLI = 1 - (RMSEA / baseline RMSEA)^2 (Tucker & Lewis 1973 and
    # the RMSEA's definition, both noncentralities positive here)
    assert f.chi_square > f.df and np.isclose(f.tli, 1 - (f.rmsea / base) ** 2, atol=1e-9)
    words = str(caution.explanation)
    assert "high or low" not in words and "nearly fits" not in words and "say little" not in words
    assert "a small change in the model's own misfit moves them a long way" in words
    assert "rule of thumb recalled" in words
    at_close = 1 - (0.05 / base) ** 2  # the TLI a model of RMSEA .05 would have with this baseline
    assert f"a model with an RMSEA of .05 would have a TLI of {at_close:.3f}".replace("0.", ".", 1) in words
    assert "beside the RMSEA, the SRMR and the residual correlations" in str(caution.advice)


def test_the_baseline_caution_comes_after_a_poor_fit():
    # the same items given to the wrong factors: a poor fit (CFI below .90), a problem of the model, comes first
    scrambled = "".join(f"factor t{k}: {', '.join(f'q{i}' for i in range(k + 1, 26, 5))}\n" for k in range(5))
    result = cfa_tool.fit(scrambled, _five_traits())
    kinds = [p.kind for p in result.problems]
    assert ProblemKind.POOR_FIT in kinds and kinds[-1] is ProblemKind.UNINFORMATIVE_BASELINE


def test_a_comparison_says_it_once_after_its_other_cautions(tmp_path, capsys):
    path = tmp_path / "noise.csv"
    _noise().to_csv(path, index=False)
    (tmp_path / "one.cfa").write_text(ONE)
    (tmp_path / "equal.cfa").write_text(ONE + "equal loading(f, x2), loading(f, x3)\n")
    markdown = tmp_path / "compare.md"
    assert main(["compare", str(tmp_path / "one.cfa"), str(tmp_path / "equal.cfa"), "--data", str(path),
                 "--markdown", str(markdown)]) == 0
    capsys.readouterr()
    flat = " ".join(markdown.read_text().split())
    # one baseline for both models of the same rows: said once, as a fit says it (a comparison printed none)
    assert flat.count("The items correlate weakly: the baseline model") == 1
    assert "is no larger than its degrees of freedom" in flat and "so the TLI is not defined" in flat


def test_its_kind_is_a_plain_value_and_a_saved_fit_of_earlier_versions_is_still_read():
    """The JSON kind is a kind like the others ('weakly correlated items'), not advice (s23: 'baseline model misfits
    little: read CFI and TLI beside RMSEA and SRMR'); a saved fit that lists the earlier words is still read as the same
    kind (assessment.admissibility.listed_problems, as report and scores --from-fit read it)."""
    from cfa_tool.assessment.admissibility import listed_problems

    # one name for the kind: the JSON's word is the enum member's name in words (s26: it stayed 'weakly correlated
    # items' after the caution stopped saying so of items that correlate well within their factors)
    kind = ProblemKind.UNINFORMATIVE_BASELINE
    assert kind.value == kind.name.lower().replace("_", " ") == "uninformative baseline"
    assert ":" not in kind.value
    assert ProblemKind("weakly correlated items") is kind  # a saved fit of the previous version is read as this kind
    saved = {"kind": "baseline model misfits little: read CFI and TLI beside RMSEA and SRMR", "parameters": [],
             "value": 0.07, "explanation": "The items correlate weakly.", "advice": "read them beside", "group": None}
    [read] = listed_problems([saved], "fit.json")
    assert read.kind is ProblemKind.UNINFORMATIVE_BASELINE
    with pytest.raises(OptionError, match="its list of problems is incomplete or changed by hand"):
        listed_problems([saved | {"kind": "no such kind"}], "fit.json")
