"""Every command is callable from Python and returns a result object that shows itself (summary, notebook
view) and gives its data (to_dict)."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

import cfa_tool

NESTED_TWO = ("factor f: q1, q2, q3\nfactor g: q4, q5, q6\nscale latent by variance\n"
              + "".join(f"start loading({'f' if k <= 3 else 'g'}, q{k}) = 0.7\nstart variance(q{k}) = 0.51\n"
                        for k in range(1, 7)) + "start covariance(f, g) = 0.8\n")
THREE = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"


def _shows_itself(result) -> None:
    text = result.summary()
    assert text.strip() and "Traceback" not in text
    page = result._repr_html_()
    assert page.startswith("<") and "\\n" not in page
    json.dumps(result.to_dict(), allow_nan=False)


@pytest.mark.parametrize("command", ["compare", "invariance", "split_half", "power", "power_simulation", "simulate",
                                     "fit", "scores", "explore", "nested_power"])
def test_every_command_from_python(command, hs_data):
    call = {
        "compare": lambda: cfa_tool.compare([THREE, THREE + "covary x7, x8\n"], hs_data),
        "invariance": lambda: cfa_tool.invariance(THREE, hs_data, "school"),
        "split_half": lambda: cfa_tool.split_half(THREE, hs_data, seed=3)[0],
        "power": lambda: cfa_tool.power(24, n_obs=301),
        "power_simulation": lambda: cfa_tool.power_simulation(THREE, 300, replications=3, seed=2),
        "simulate": lambda: cfa_tool.simulate(THREE, 50, seed=1),
        "fit": lambda: cfa_tool.fit(THREE, hs_data),
        "scores": lambda: cfa_tool.scores(THREE, hs_data),
        "explore": lambda: cfa_tool.explore(hs_data[[f"x{i}" for i in range(1, 10)]], factors=3),
        # power --nested-model had no entry point of its own (plan2-s24's note): two factors of .7 loadings correlating
        # .8 against one factor of the same items
        "nested_power": lambda: cfa_tool.nested_power(NESTED_TWO, "factor f: q1, q2, q3, q4, q5, q6\n", n_obs=200),
    }[command]
    _shows_itself(call())
    assert command in cfa_tool.__all__


def test_cov_params_and_conf_int(hs_data):
    # the standard errors are the square roots of the diagonal of cov_params (loadings with coefficient 1);
    # intervals at 90% are estimate +/- 1.6449 SE (normal quantile, scipy)
    from scipy import stats

    result = cfa_tool.fit(THREE, hs_data)
    cov = result.cov_params()
    assert cov.shape == (21, 21) and list(cov.index) == list(result.parameter_labels)
    x2 = next(r for r in result.estimates if r.kind == "loading" and r.variables == ("visual", "x2"))
    assert cov.loc["loading(visual, x2)", "loading(visual, x2)"] ** 0.5 == pytest.approx(x2.se, rel=1e-10)
    frame = result.conf_int(0.90)
    row = frame[(frame["kind"] == "loading") & (frame["variables"] == "visual, x2")].iloc[0]
    assert row["upper"] == pytest.approx(x2.estimate + stats.norm.ppf(0.95) * x2.se, rel=1e-10)
    assert len(frame) == sum(r.free for r in result.estimates)


def test_the_python_page_says_what_split_half_returns(hs_data):
    # a hostile trial: the README said every result object has to_dict() while split_half returns a pair of them;
    # the sentence is now on the Python reference page
    page = Path(__file__).resolve().parents[2] / "docs" / "python.md"
    text = " ".join(page.read_text(encoding="utf-8").split())
    assert "`split_half` returns a pair (a tuple) of two such results" in text
    pair = cfa_tool.split_half(THREE, hs_data, seed=3)
    assert isinstance(pair, tuple) and len(pair) == 2
    assert all(callable(r.to_dict) and callable(r.summary) for r in pair)


@pytest.mark.parametrize("test", ["normal", "robust"])
def test_fit_to_read_gives_the_figures_the_report_tells_to_read(test, hs_data):
    # a new-user trial: result.fit.cfi (the README's way) gave the unadjusted CFI every report marks "for reference
    # only" beside a robust test.  fit_to_read gives the figures of the report's rows that carry a guide value, the
    # same in the JSON; fit keeps the normal-theory ones, the report's rows marked "for reference only"
    from cfa_tool.reporting.tables import fit_rows

    result = cfa_tool.fit(THREE, hs_data, test=test)
    values = {v[0]: v for row in fit_rows(result) for v in row.values}
    guides = {v[0]: row.guide for row in fit_rows(result) for v in row.values}
    read = result.fit_to_read
    robust = "Robust " if test == "robust" else ""
    assert read.cfi == values[f"{robust}CFI"][1] and read.tli == values[f"{robust}TLI"][1]
    assert read.rmsea == values[f"{robust}RMSEA"][1] and read.rmsea_ci90 == tuple(values[f"{robust}RMSEA"][4:6])
    assert guides[f"{robust}CFI"] == ">= .95" and read.srmr == values["SRMR"][1]
    if test == "robust":
        assert read.test == "satorra-bentler" and read.cfi != result.fit.cfi  # the normal-theory CFI is not the one
        [scaled] = [v for k, v in values.items() if k.startswith("Scaled chi-square")]
        assert (read.chi_square, read.df, read.p_value) == tuple(scaled[1:4])
        assert guides["CFI (unadjusted)"] == "for reference only" and values["CFI (unadjusted)"][1] == result.fit.cfi
    else:
        assert read.test == "normal" and read.chi_square == values["Chi-square"][1]
    assert result.to_dict()["fit_to_read"] == read.to_dict() and json.dumps(read.to_dict(), allow_nan=False)


@pytest.mark.parametrize("keyword, said", [
    ("robust", "unknown keyword 'robust': a robust test is asked for with test='robust'"),
    ("ordinl", "unknown keyword 'ordinl': did you mean ordinal=...?"),  # a keyword of fit itself
    ("mi_treshold", "unknown keyword 'mi_treshold': did you mean mi_threshold=...?"),  # a fit option
])
def test_an_unknown_keyword_is_named_with_the_nearest_one(keyword, said, hs_data):
    # a new-user trial: robust=True gave "unknown option: FitOptions.__init__() got an unexpected keyword argument"
    from cfa_tool.errors import OptionError

    with pytest.raises(OptionError) as caught:
        cfa_tool.fit(THREE, hs_data, **{keyword: True})
    assert str(caught.value).startswith(said) and "__init__" not in str(caught.value)
    with pytest.raises(OptionError, match="did you mean partial=...?"):  # another function's own keywords
        cfa_tool.invariance(THREE, hs_data, "school", partal="auto")


def test_advice_names_the_python_keyword_beside_the_option(hs_data):
    # a new-user trial: summary() read from Python advised '--ordinal all' and '--keep' only
    few = hs_data.assign(**{x: hs_data[x].round().clip(3, 6) for x in ("x1", "x2", "x3")})
    text = " ".join(cfa_tool.fit(THREE, few).summary().split())
    assert "--ordinal x1,x2,x3; from Python, ordinal=['x1', 'x2', 'x3']" in text
    assert "(--robust; from Python, test='robust')" in text
