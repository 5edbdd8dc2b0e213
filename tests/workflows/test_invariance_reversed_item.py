"""invariance names an item whose configural loading has the opposite sign in one group, first (hostile trial s20:
with one item recoded 6 - x in one group, the ladder ended in an inadmissible metric step and never said why).  An
item answered 6 - x on a 1-5 scale has loadings of the same size and the opposite sign."""

from __future__ import annotations

from tests.conftest import run_cli


def test_an_item_recoded_in_one_group_is_named_first(tmp_path, capsys, rider_demo, rider_model):
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    data = rider_demo.copy()
    south = data["district"] == "south"
    data.loc[south, "clean"] = 6 - data.loc[south, "clean"]
    data.to_csv(tmp_path / "d.csv", index=False)
    code, out, err = run_cli(["invariance", model, "--data", tmp_path / "d.csv", "--group-column", "district"], capsys)
    assert code == 0, err
    flat = " ".join(out.replace("\u2503", " ").replace("\u2502", " ").split())  # the boxes' borders left out
    said = "The standardized loading of clean on comfort is"
    assert said in flat and flat.index(said) < flat.index("Measurement invariance across")
    assert "in group north and -" in flat and "probably coded the other way round in one of the groups" in flat
    assert flat.count("probably coded the other way round") == 1  # no other item is named


def test_no_caution_when_the_groups_code_alike(tmp_path, capsys, rider_demo, rider_model):
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    rider_demo.to_csv(tmp_path / "d.csv", index=False)
    code, out, err = run_cli(["invariance", model, "--data", tmp_path / "d.csv", "--group-column", "district"], capsys)
    assert code == 0, err
    assert "coded the other way round" not in " ".join(out.split())
