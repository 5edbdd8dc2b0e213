"""Files of rows of data that the tool writes keep every id and name as written (hostile trial s17, finding 3): the
scores file is merged back by its ids, and a simulated file is read back with the same model file, so neither gets
the leading ' that report tables give cells a spreadsheet would run as formulas.

Check values: the ids and names written into the inputs here, compared as text with what the files hold (pandas reads
both); the data are the bundled demo (a fictional transit agency's rider survey)."""

from __future__ import annotations

import pandas as pd

from cfa_tool.cli import main
from cfa_tool.resources import resource_dir

IDS = {1: "-A12", 2: "+44 20 7946 0000", 3: "=1+1", 4: "@home"}


def test_scores_file_writes_ids_as_they_are(tmp_path, capsys):
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv", dtype={"rider_id": str})
    for row, value in IDS.items():
        data.loc[row, "rider_id"] = value
    data.to_csv(tmp_path / "ids.csv", index=False)
    code = main(["scores", str(resource_dir("models") / "rider_three_factors.cfa"), "--data", str(tmp_path / "ids.csv"),
                 "--id", "rider_id", "--output", str(tmp_path / "s.csv")])
    capsys.readouterr()
    assert code == 0
    written = pd.read_csv(tmp_path / "s.csv", dtype={"rider_id": str})
    assert written["rider_id"].tolist() == data["rider_id"].tolist()
    merged = data.merge(written, on="rider_id", how="left")
    assert merged["comfort_regression"].notna().all()


def test_simulated_file_reads_back_with_its_model(tmp_path, capsys):
    model = tmp_path / "m.cfa"
    model.write_text('factor f: "-a", "+b", "@c", "=d"\n')
    assert main(["simulate", str(model), "--n", "200", "--output", str(tmp_path / "s.csv")]) == 0
    assert pd.read_csv(tmp_path / "s.csv").columns.tolist() == ["-a", "+b", "@c", "=d"]
    assert main(["fit", str(model), "--data", str(tmp_path / "s.csv")]) == 0
    capsys.readouterr()
