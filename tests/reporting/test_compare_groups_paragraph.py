"""What a comparison says about exactly the models compared: the groups and each model's equalities across them,
the number of indicators of models on different items, and no silent change of one model's item types."""

from __future__ import annotations

import pytest

from cfa_tool.errors import OptionError
from cfa_tool.reporting.workflow_tables import comparison_report
from cfa_tool.workflows.compare import compare
from tests.workflows.test_invariance_decisions import MODEL, groups_data


@pytest.fixture(scope="module")
def grouped():
    return compare([MODEL, MODEL + "invariance metric\n", MODEL + "invariance scalar\n"], groups_data(41, n=300), "grp")


def test_a_grouped_comparison_names_the_groups_and_what_each_model_holds_equal(grouped):
    assert [r.fit.df for r in grouped.results] == [16, 20, 24]  # hand count: 2 x (27 - 19); + 4 loadings; + 4 intercepts
    report = comparison_report(grouped)
    assert "in two groups defined by grp (g1 and g2)" in report.paragraph
    assert "held no parameter equal across groups" in report.paragraph
    assert "held loadings equal across groups" in report.paragraph
    assert "held loadings and intercepts equal across groups" in report.paragraph
    assert "Groups defined by grp: g1 (300 rows), g2 (300 rows)." in report.lines
    assert any(line.startswith("Held equal across groups: model 1") and line.endswith(": loadings and intercepts.")
               for line in report.lines)
    out = grouped.to_dict()
    assert out["group_column"] == "grp" and out["groups"] == ["g1", "g2"]
    assert [m["description"]["held_equal_across_groups"] for m in out["models"]] == [
        [], ["loadings"], ["loadings", "intercepts"]]


def test_models_on_different_items_are_not_said_to_share_them():
    data = groups_data(42, n=200)
    result = compare([MODEL, "factor f: y1, y2, y3\nfactor h: y4, y5\n"], data)
    paragraph = comparison_report(result).paragraph
    assert paragraph.startswith("Two models of five to six indicators were compared")
    assert "of the same" not in paragraph.split(".")[0]
    same = comparison_report(compare([MODEL, "factor f: y1, y2, y3, y4, y5, y6\n"], data)).paragraph
    assert same.startswith("Two models of the same six indicators were compared")


def test_a_model_is_not_fitted_as_ordinal_because_another_declares_its_items_ordinal():
    ordinal = MODEL + "ordinal y1, y2, y3, y4, y5, y6\n"
    with pytest.raises(OptionError, match="treat y1, y2, y3, y4 and 2 more differently .ordinal in the first, "
                                          "continuous in the second."):
        compare([MODEL, ordinal], groups_data(43, n=100))
