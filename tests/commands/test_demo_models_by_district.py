"""Which of the demo's bundled models the two districts identify, as the demo says.

The demo data (demo/README.md: an invented rider survey, 480 riders in two made-up districts, north 250 and south
230) come with four model files.  Session note s20: fitted by district, the bifactor model is not identified in the
south group, and nothing told a user so beforehand: the data's README named the district column and the bifactor
model side by side.  The demo now says which models to fit by district and which on all riders only; this test holds
that to what a fit by district does.
"""

from __future__ import annotations

from pathlib import Path

import pytest

import cfa_tool
from cfa_tool.errors import NotIdentified
from cfa_tool.resources import resource_dir

from tests.commands.test_cli import run

ROOT = Path(__file__).resolve().parents[2]
BY_DISTRICT = ("rider_three_factors.cfa", "rider_one_factor.cfa", "rider_higher_order.cfa")


def _flat(text: str) -> str:
    return " ".join(text.split())


@pytest.mark.parametrize("name", BY_DISTRICT)
def test_the_models_the_demo_offers_by_district_are_fitted_in_both(rider_demo, name):
    result = cfa_tool.fit((resource_dir("models") / name).read_text(), rider_demo, group="district")
    assert [g.label for g in result.groups] == ["north", "south"]
    assert result.converged


def test_the_bifactor_model_by_district_stops_at_the_south_group_and_the_demo_says_so(tmp_path):
    model, data = resource_dir("models") / "rider_bifactor.cfa", resource_dir("demo") / "rider_survey.csv"
    # fitted by district: one line naming the south group's parameters that cannot be told apart, exit 3
    proc = run("fit", str(model), "--data", str(data), "--group-column", "district", cwd=tmp_path)
    assert proc.returncode == 3 and proc.stdout == ""
    assert "not identified" in proc.stderr and "loading(comfort, clean) [south]" in proc.stderr
    assert "variance(clean) [south]" in proc.stderr
    with pytest.raises(NotIdentified):  # the south district's riders alone, the same
        cfa_tool.fit(model.read_text(), str(data), keep=["district = south"])
    # the demo says it: the data's README and the model file, and names the models to fit by district
    readme = _flat((ROOT / "demo" / "README.md").read_text())
    assert ("Fit by district (`--group-column district`), the three-factor, one-factor and higher-order models are "
            "identified in both districts; the bifactor model is not.") in readme
    assert "Fit and compare the bifactor model on all riders together" in readme
    assert "Fit it to all riders together, not by district" in model.read_text()
    assert sorted(BY_DISTRICT + ("rider_bifactor.cfa",)) == sorted(p.name for p in resource_dir("models").glob("*.cfa"))
