"""fit's missing-data helpers (auxiliary variables of full-information ML) from the data to every view: the
options checked, the views naming the helpers, groups and frequency weights, and the refusal of every other
command.  The estimation itself is checked in tests/estimation/test_auxiliary.py."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.errors import OptionError

MODEL = "factor F: y1, y2, y3, y4\n"


@pytest.fixture(scope="module")
def frame() -> pd.DataFrame:
    """Simulated answers (fixed seed) whose y1 is missing where 'age' is high, with a 'visits' column with gaps."""
    rng = np.random.default_rng(41)
    n = 400
    f = rng.normal(size=n)
    y = np.column_stack([0.75 * f + 0.66 * rng.normal(size=n) for _ in range(4)])
    age = 40 + 10 * (0.7 * y[:, 0] + 0.7 * rng.normal(size=n))
    y[age > np.quantile(age, 0.7), 0] = np.nan
    out = pd.DataFrame(y.round(3), columns=["y1", "y2", "y3", "y4"])
    out["age"] = age.round(1)
    out["visits"] = rng.poisson(3, size=n).astype(float)
    out.loc[::9, "visits"] = np.nan
    out["district"] = np.where(rng.random(n) < 0.5, "north", "south")
    out["count"] = rng.integers(1, 4, size=n)
    return out


def test_every_view_names_the_helpers(frame, tmp_path, capsys):
    data = tmp_path / "answers.csv"
    frame.to_csv(data, index=False)
    model = tmp_path / "m.cfa"
    model.write_text(MODEL)
    out = {kind: tmp_path / f"r.{kind}" for kind in ("json", "html", "md")}
    code = main(["fit", str(model), "--data", str(data), "--missing-helpers", "age,visits", "--json", str(out["json"]),
                 "--html", str(out["html"]), "--markdown", str(out["md"])])
    terminal = capsys.readouterr().out
    assert code == 0
    saved = json.loads(out["json"].read_text())
    assert saved["missing_helpers"] == ["age", "visits"]
    assert "auxiliary variables age, visits (saturated correlates)" in saved["estimator"]
    for text in (terminal, out["html"].read_text(), out["md"].read_text()):
        assert "auxiliary variables age, visits" in " ".join(text.split())
        assert "saturated-correlates form" in " ".join(text.split())


def test_the_methods_paragraph_and_the_notes(frame):
    result = cfa_tool.fit(MODEL, frame, missing_helpers=["age"])
    from cfa_tool.reporting.paragraph import methods_paragraph

    text = methods_paragraph(result)
    assert "The auxiliary variable age entered the likelihood in Graham's (2003) saturated-correlates form" in text
    assert "missing at random given the items analysed and the auxiliary variables" in text
    assert not any("modification indices" in w for w in result.warnings)
    assert len(result.modification_indices.rows) > 0  # the joint likelihood's (tests/assessment/test_helper_score_tests.py)


def test_the_helpers_change_the_estimates_but_not_the_degrees_of_freedom(frame):
    without = cfa_tool.fit(MODEL, frame)
    with_helpers = cfa_tool.fit(MODEL, frame, missing_helpers="age, visits")
    assert with_helpers.fit.df == without.fit.df == 2  # 4 items: 14 moments less 12 parameters
    assert with_helpers.fit.baseline_df == without.fit.baseline_df == 6
    first = {(e.kind, e.variables): e.estimate for e in without.estimates}
    second = {(e.kind, e.variables): e.estimate for e in with_helpers.estimates}
    assert abs(first[("intercept", ("y1",))] - second[("intercept", ("y1",))]) > 0.05  # y1 is missing where age is high


def test_groups_have_their_own_helper_parameters(frame):
    result = cfa_tool.fit(MODEL, frame, missing_helpers="age", group="district")
    single = cfa_tool.fit(MODEL, frame, group="district")
    assert result.fit.df == single.fit.df
    assert sum(g.chi_square for g in result.groups) == pytest.approx(result.fit.chi_square, rel=1e-9)


def test_frequency_weights_count_as_repeated_rows(frame):
    """A row of frequency weight k is k identical rows: the fit with helpers of the weighted rows equals that of
    the rows written out k times (the definition of frequency weights)."""
    weighted = cfa_tool.fit(MODEL, frame, missing_helpers="age", weights="count", weight_kind="frequency")
    repeated = frame.loc[frame.index.repeat(frame["count"])].reset_index(drop=True)
    plain = cfa_tool.fit(MODEL, repeated, missing_helpers="age")
    for a, b in zip(weighted.estimates, plain.estimates):
        assert a.estimate == pytest.approx(b.estimate, abs=1e-6)
        if a.free:
            assert a.se == pytest.approx(b.se, abs=1e-6)
    assert weighted.fit.chi_square == pytest.approx(plain.fit.chi_square, abs=1e-6)


def test_a_design_fit_says_that_helpers_cannot_join_it(frame):
    """New-user trial s16: the refusal of helpers under a design ended mid-sentence, and the design fit never said
    that the helpers it refuses leave the missing-at-random assumption resting on the items alone."""
    with pytest.raises(OptionError) as raised:
        cfa_tool.fit(MODEL, frame.assign(w=1 + frame["count"] / 2), missing_helpers="age", weights="w")
    said = str(raised.value)
    assert said.endswith("Frequency weights (weight_kind='frequency') can be used with helpers.")
    assert "To fit with the design, leave out missing_helpers=..." in said and "leave out the design" in said
    for design in ({"weights": "w"}, {"cluster": "unit"}):
        fitted = cfa_tool.fit(MODEL, frame.assign(w=1 + frame["count"] / 2, unit=np.arange(len(frame)) // 4), **design)
        assert fitted.method.full_information
        note = [str(w) for w in fitted.warnings if "miss some answers" in str(w)]
        assert len(note) == 1 and note[0].endswith("cannot be used with sampling weights, clusters or strata, so "
                                                   "answers are assumed missing at random given the items only")
    # frequency weights take helpers: no such words
    counted = cfa_tool.fit(MODEL, frame, weights="count", weight_kind="frequency")
    assert not any("helpers" in str(w) for w in counted.warnings if "miss some answers" in str(w))


@pytest.mark.parametrize("call", [
    lambda f: cfa_tool.scores(MODEL, f, missing_helpers="age"),
    lambda f: cfa_tool.compare([MODEL, MODEL + "covary y1, y2\n"], f, missing_helpers="age"),
    lambda f: cfa_tool.invariance(MODEL, f, group="district", missing_helpers="age"),
], ids=["scores", "compare", "invariance"])
def test_the_python_functions_other_than_fit_refuse_them(frame, call):
    with pytest.raises(OptionError, match="offered by fit only so far"):
        call(frame)


@pytest.mark.parametrize("command", ["demo", "check", "replicate", "cutoffs", "scores", "explore", "invariance"])
def test_the_other_commands_refuse_them(command, capsys):
    with pytest.raises(SystemExit) as stop:
        main([command, "--missing-helpers", "age"])
    assert stop.value.code == 2
    assert f"{command}: --missing-helpers cannot apply" in capsys.readouterr().err


def test_the_items_likelihood_and_the_baseline_model_are_built_once(frame, monkeypatch):
    """A fit with helpers builds the items' own full-information likelihood once (the first fit's, with the joint
    N's summaries) and the baseline's linear model once for every group (it is the same in each: Savalei & Bentler
    2009's baseline with the helpers free).  The counts are the check; the fit's numbers are checked in
    tests/estimation/test_auxiliary.py."""
    from cfa_tool.estimation import auxiliary, fiml

    built = {"items": 0, "baseline": 0}
    items_init, baseline_init = fiml.MissingDataLikelihood.__init__, auxiliary.LinearJointModel.__init__

    def items(self, *args, **kwargs):
        built["items"] += type(self) is fiml.MissingDataLikelihood
        items_init(self, *args, **kwargs)

    def baseline(self, *args, **kwargs):
        built["baseline"] += 1
        baseline_init(self, *args, **kwargs)

    monkeypatch.setattr(fiml.MissingDataLikelihood, "__init__", items)
    monkeypatch.setattr(auxiliary.LinearJointModel, "__init__", baseline)
    result = cfa_tool.fit(MODEL, frame, missing_helpers=["age"], group="district")
    assert result.converged and np.isfinite(result.fit.cfi)
    assert built == {"items": 1, "baseline": 1}
