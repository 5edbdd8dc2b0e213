"""simulate --output follows the convention of the data file behind its population (rows-s25, task 5): the rows
simulated from a fit of a spreadsheet's CSV of semicolons and decimal commas (--population-from) are written with
semicolons, decimal commas and a byte-order mark, as every CSV file made from that data file
(data.csv_convention), and so are its report tables; a model file's own values, which no data file is behind, give
plain CSV (commas, decimal points, no mark).

The data are the bundled rider survey (invented, simulated with a fixed seed), its complete rows saved twice: as
plain CSV and as a German spreadsheet saves CSV.  Check value: the rows simulated from the fit of the decimal-comma
file, read back by pandas in that convention, are the rows simulated with the same seed from the fit of the plain
file of the same data (the same estimates), read by pandas as plain CSV."""

from __future__ import annotations

import io
from contextlib import redirect_stderr, redirect_stdout

import numpy as np
import pandas as pd

from cfa_tool.cli import main
from cfa_tool.resources import resource_dir


def _run(argv) -> str:
    out = io.StringIO()
    with redirect_stdout(out), redirect_stderr(out):
        assert main([str(a) for a in argv]) == 0, out.getvalue()
    return " ".join(out.getvalue().split())


def test_simulated_rows_follow_the_data_file_of_their_population(tmp_path):
    frame = pd.read_csv(resource_dir("demo") / "rider_survey.csv").dropna()
    plain, comma = tmp_path / "plain.csv", tmp_path / "komma.csv"
    frame.to_csv(plain, index=False)
    comma.write_bytes(frame.to_csv(index=False, sep=";", decimal=",", lineterminator="\r\n").encode("utf-8-sig"))
    model = tmp_path / "three.cfa"
    model.write_text((resource_dir("models") / "rider_three_factors.cfa").read_text())
    for name in ("plain", "komma"):
        _run(["fit", model, "--data", tmp_path / f"{name}.csv", "--json", tmp_path / f"{name}.json"])
        said = _run(["simulate", model, "--population-from", tmp_path / f"{name}.json", "--n", 50, "--seed", 4,
                     "--missing", 0.1, "--output", tmp_path / f"{name}_rows.csv", "--tables", tmp_path / f"{name}_t"])
        assert ("decimals written with commas, as in the data file" in said) is (name == "komma")
    raw = (tmp_path / "komma_rows.csv").read_bytes()
    assert raw.startswith(b"\xef\xbb\xbfon_time;short_wait;") and b"." not in raw
    simulated = pd.read_csv(io.BytesIO(raw), sep=";", decimal=",", encoding="utf-8-sig")
    reference = pd.read_csv(tmp_path / "plain_rows.csv")
    assert (tmp_path / "plain_rows.csv").read_bytes().startswith(b"on_time,short_wait,")
    assert simulated.isna().to_numpy().sum() > 0 and simulated.dtypes.eq(float).all()
    np.testing.assert_allclose(simulated.to_numpy(), reference.to_numpy(), rtol=1e-6, equal_nan=True)
    tables = sorted((tmp_path / "komma_t").glob("*.csv"))
    assert tables and all(t.read_bytes().startswith(b"\xef\xbb\xbf") for t in tables)
    _run(["fit", model, "--data", tmp_path / "komma_rows.csv"])  # read back as written


def test_a_model_files_values_give_plain_rows(tmp_path):
    model = tmp_path / "one.cfa"
    model.write_text("factor f: a, b, c, d\nstart loading(f, b) = 0.8\n")
    said = _run(["simulate", model, "--n", 20, "--output", tmp_path / "rows.csv"])
    assert "as in the data file" not in said
    raw = (tmp_path / "rows.csv").read_bytes()
    assert raw.startswith(b"a,b,c,d\n") and b";" not in raw
