"""A test of fit chosen by the caller is honoured or refused, never replaced (guide: an option that cannot apply is
an error, never silently ignored).  Under sampling weights, clusters or strata the normal-theory test takes the rows
as independent and equally weighted, which they are not (Muthén & Satorra 1995; Asparouhov 2005): a chosen
``test='normal'`` is refused in every function that takes a design, while leaving the test out still gives the
design-based scaled one.  Ordinal items are tested by the adjusted test of least squares, so a chosen normal-theory
test is refused there too.  Frequency weights alone are repeated rows, where the normal-theory test is valid and
honoured."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from cfa_tool.method import FitTest
from tests.conftest import THREE_FACTORS

ONE_FACTOR = "factor g: x1, x2, x3, x4, x5, x6, x7, x8, x9\n"


@pytest.fixture(scope="module")
def designed(hs_data):
    rng = np.random.default_rng(17)
    return hs_data.reset_index(drop=True).assign(w=rng.uniform(0.5, 2.0, len(hs_data)),
                                                 unit=np.arange(len(hs_data)) // 5,
                                                 k=rng.integers(1, 3, len(hs_data)))


@pytest.mark.parametrize("design", [{"weights": "w"}, {"cluster": "unit"}, {"weights": "w", "cluster": "unit"}])
def test_a_chosen_normal_theory_test_under_a_design_is_refused_by_fit(designed, design):
    with pytest.raises(OptionError, match="the normal-theory test is not valid") as refused:
        cfa_tool.fit(THREE_FACTORS, designed, test="normal", **design)
    assert "test='normal'" in str(refused.value) and "\n" not in str(refused.value)


def test_without_a_chosen_test_a_design_gives_the_design_based_scaled_test(designed):
    result = cfa_tool.fit(THREE_FACTORS, designed, weights="w", cluster="unit")
    assert result.method.test is FitTest.SATORRA_BENTLER and result.method.design_based
    assert cfa_tool.fit(THREE_FACTORS, designed, weights="w", test=None).method.design_based  # None: not chosen


@pytest.mark.parametrize("command", ["compare", "invariance", "scores"])
def test_every_function_that_takes_a_design_refuses_a_chosen_normal_theory_test(designed, command):
    from cfa_tool.workflows.compare import compare
    from cfa_tool.workflows.factor_scores import scores
    from cfa_tool.workflows.invariance import invariance

    call = {"compare": lambda: compare([THREE_FACTORS, ONE_FACTOR], designed, weights="w", test="normal"),
            "invariance": lambda: invariance(THREE_FACTORS, designed, "school", weights="w", test="normal"),
            "scores": lambda: scores(THREE_FACTORS, designed, weights="w", test="normal")}[command]
    with pytest.raises(OptionError, match="the normal-theory test is not valid"):
        call()


def test_frequency_weights_alone_honour_the_normal_theory_test(designed):
    # repeated rows: the normal-theory test of the rows written out (test_sample_design checks those values)
    result = cfa_tool.fit(THREE_FACTORS, designed, weights="k", weight_kind="frequency", test="normal")
    assert result.method.test is FitTest.NORMAL and result.robust is None


def test_a_chosen_robust_test_under_a_design_is_refused_naming_the_test_given(designed):
    with pytest.raises(OptionError, match="so test='satorra-bentler' cannot apply"):
        cfa_tool.fit(THREE_FACTORS, designed, weights="w", test="satorra-bentler")


def test_a_chosen_normal_theory_test_of_ordinal_items_is_refused(designed):
    items = [f"x{i}" for i in range(1, 10)]  # each item cut at its quartiles: four answers
    data = designed.assign(**{x: np.digitize(designed[x], np.quantile(designed[x], [0.25, 0.5, 0.75])) for x in items})
    for design in ({}, {"weights": "w"}):
        with pytest.raises(OptionError, match="the normal-theory test of maximum likelihood cannot apply"):
            cfa_tool.fit(THREE_FACTORS, data, ordinal="all", test="normal", **design)
    assert cfa_tool.fit(THREE_FACTORS, data, ordinal="all").method.test is FitTest.SCALE_SHIFTED


def test_the_command_line_without_robust_gives_the_design_based_test(designed, tmp_path, capsys):
    import json

    from cfa_tool.cli import main

    (tmp_path / "m.cfa").write_text(THREE_FACTORS)
    designed.to_csv(tmp_path / "d.csv", index=False)
    out = tmp_path / "r.json"
    assert main(["fit", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "d.csv"), "--weights", "w", "--json", str(out)]) == 0
    written = json.loads(out.read_text())
    assert written["robust"]["method"] == "design-based, Satorra-Bentler scaling"
    assert written["estimator"].startswith("maximum likelihood with design-based scaled test")


def test_the_test_chosen_survives_replace_and_is_not_a_keyword():
    from dataclasses import replace

    from cfa_tool.pipeline.continuous import FitOptions
    from cfa_tool.pipeline.inputs import make_options

    assert FitOptions().test is FitTest.NORMAL and not FitOptions().test_chosen
    assert replace(FitOptions(), diagnostics=False).test_chosen is False
    assert replace(FitOptions(test="normal"), diagnostics=False).test_chosen is True
    with pytest.raises(OptionError, match="unknown keyword 'test_chosen'"):
        make_options({"test_chosen": True})
