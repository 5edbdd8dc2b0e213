"""replicate names an item whose standardized loading changes sign between the samples, first among the cautions and
in the paragraph (hostile trial s20: with one item recoded 6 - x in the validation file, the test of one solution
failed and the paragraph gave the largest loading difference, 1.56, without a word that its sign had changed).  An
item answered x in one sample and 6 - x in the other on a 1-5 scale has the same loading size with the opposite sign
(the covariances of x and 6 - x with the other items differ in sign only)."""

from __future__ import annotations

from tests.conftest import run_cli


def test_an_item_recoded_in_one_sample_is_named(tmp_path, capsys, rider_demo, rider_model):
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    rider_demo.iloc[:240].to_csv(tmp_path / "cal.csv", index=False)
    validation = rider_demo.iloc[240:].copy()
    validation["clean"] = 6 - validation["clean"]
    validation.to_csv(tmp_path / "val.csv", index=False)
    code, out, err = run_cli(["replicate", model, "--calibration", tmp_path / "cal.csv", "--validation",
                              tmp_path / "val.csv"], capsys)
    assert code == 0, err
    flat = " ".join(out.split())
    caution = "The standardized loading of clean on comfort is"
    assert caution in flat and flat.index(caution) < flat.index("Replication")  # first, before the title
    assert "probably coded the other way round in one of the files" in flat
    assert "The loading of clean on comfort had opposite signs in the two samples" in flat
    for other in ("on_time", "comfortable_seat", "greeting"):  # no other item is named
        assert f"The standardized loading of {other}" not in flat


def test_no_caution_when_every_item_is_coded_alike(tmp_path, capsys, rider_demo, rider_model):
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    rider_demo.iloc[:240].to_csv(tmp_path / "cal.csv", index=False)
    rider_demo.iloc[240:].to_csv(tmp_path / "val.csv", index=False)
    code, out, err = run_cli(["replicate", model, "--calibration", tmp_path / "cal.csv", "--validation",
                              tmp_path / "val.csv"], capsys)
    assert code == 0, err
    flat = " ".join(out.split())
    assert "coded the other way round" not in flat and "opposite signs" not in flat
