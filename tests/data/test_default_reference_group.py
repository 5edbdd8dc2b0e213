"""The default reference group, one rule for every command with groups (data.groups.default_reference): a pandas
categorical column's first category, the lowest code of SPSS/Stata value labels, otherwise the first label in sorted
order; every report names it with the rule beside it."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.groups import ReferenceRule, default_reference, group_labels, reference_rule

MODEL = "factor f: y1, y2, y3, y4\n"


def _frame(sizes: dict[str, int], seed: int = 31) -> pd.DataFrame:
    """Simulated rows (fixed seed), one factor and four indicators, in groups of the given sizes."""
    rng = np.random.default_rng(seed)
    n = sum(sizes.values())
    f = rng.normal(size=n)
    frame = pd.DataFrame({f"y{j}": np.round(0.8 * f + rng.normal(scale=0.6, size=n), 3) for j in range(1, 5)})
    frame["clinic"] = np.concatenate([[label] * k for label, k in sizes.items()])
    return frame


@pytest.fixture(scope="module")
def clinics() -> pd.DataFrame:
    return _frame({"Kleinwald": 60, "Lindenberg": 299, "Nordhafen": 341})


def test_the_first_label_by_default(clinics):
    assert group_labels(clinics, "clinic", "x") == ["Kleinwald", "Lindenberg", "Nordhafen"]
    assert reference_rule(clinics, "clinic") is ReferenceRule.FIRST_LABEL
    numbered = _frame({"10": 50, "9": 50})
    assert default_reference(numbered, "clinic", ["9", "10"]) == ("9", ReferenceRule.FIRST_LABEL)  # numbers by value
    assert group_labels(clinics, "clinic", "x", reference="Nordhafen")[0] == "Nordhafen"
    assert reference_rule(clinics, "clinic", "Nordhafen") is ReferenceRule.GIVEN


def test_a_categorical_columns_first_category(clinics):
    ordered = clinics.assign(clinic=pd.Categorical(clinics["clinic"], ["Lindenberg", "Nordhafen", "Kleinwald"],
                                                   ordered=True))
    assert group_labels(ordered, "clinic", "x")[0] == "Lindenberg"
    assert reference_rule(ordered, "clinic") is ReferenceRule.FIRST_CATEGORY
    unordered = clinics.assign(clinic=pd.Categorical(clinics["clinic"], ["Pinnow", "Nordhafen", "Kleinwald",
                                                                         "Lindenberg"]))
    assert group_labels(unordered, "clinic", "x")[0] == "Nordhafen"  # the first category with rows


def test_spss_codes_the_lowest_code(clinics, tmp_path):
    pyreadstat = pytest.importorskip("pyreadstat")
    coded = clinics.assign(clinic=clinics["clinic"].map({"Kleinwald": 3.0, "Lindenberg": 2.0, "Nordhafen": 1.0}))
    coded.loc[coded["clinic"] == 1.0, "clinic"] = 4.0  # Nordhafen coded 4: the lowest code is 2, Lindenberg
    path = tmp_path / "clinics.sav"
    pyreadstat.write_sav(coded, str(path), variable_value_labels={"clinic": {2: "Lindenberg", 3: "Kleinwald",
                                                                              4: "Nordhafen"}})
    fitted = cfa_tool.fit(MODEL + "invariance scalar\n", str(path), group="clinic")
    assert fitted.groups[0].label == "Lindenberg"
    assert any("is Lindenberg, the group of the lowest code" in w for w in fitted.warnings)


def test_every_report_names_the_reference_and_its_rule(clinics):
    said = "Kleinwald, the first label in sorted order; choose another with reference_group=..."
    ladder = cfa_tool.invariance(MODEL, clinics, group="clinic")
    assert ladder.groups[0] == "Kleinwald"
    assert f"Reference group (factor means fixed at zero): {said}" in " ".join(ladder.summary().split())
    assert ladder.to_dict()["reference_group_chosen_by"] == "first label"
    scalar = cfa_tool.fit(MODEL + "invariance scalar\n", clinics, group="clinic")
    assert scalar.groups[0].label == "Kleinwald"
    assert any(said in w for w in scalar.warnings)
    # a configural fit, where the reference sets nothing, and a reference chosen by the user: no such note
    assert not any("the reference group (" in w for w in cfa_tool.fit(MODEL, clinics, group="clinic").warnings)
    chosen = cfa_tool.fit(MODEL + "invariance scalar\n", clinics, group="clinic", reference_group="Nordhafen")
    assert chosen.groups[0].label == "Nordhafen" and not any("the reference group (" in w for w in chosen.warnings)
    compared = cfa_tool.compare([MODEL + "invariance scalar\n", MODEL + "invariance metric\n"], clinics, group="clinic")
    assert any(said in n for n in compared.notes)
    scored = cfa_tool.scores(MODEL + "invariance scalar\n", clinics, group="clinic")
    assert any(said in w for w in scored.fit.warnings)
    aligned = cfa_tool.align(MODEL, clinics, "clinic", trials=0)
    assert aligned.reference_group == "Kleinwald"
    assert f"Reference group: {said}" in " ".join(aligned.summary().split())
