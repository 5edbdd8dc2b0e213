"""replicate takes the row filters (--keep, ``keep``) that fit, explore and invariance take (new-user trial,
session 12: the split-half replication could not leave out unfinished rows): applied before the split for one file
(the halves are drawn from the rows kept) and to each file of two, and named in the report.

The data are invented (a fictional transit agency's rider survey, comfort c1..c3 and courtesy s1..s3).  Reference:
the same analysis of the rows kept, selected here by pandas and written to their own files."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from cfa_tool.reporting.paragraph import replication_paragraph
from cfa_tool.workflows.replication import Replications, replicate, split_half
from tests.commands.test_cli import run
from tests.conftest import simulate_cfa

ITEMS = ["c1", "c2", "c3", "s1", "s2", "s3"]
MODEL = "factor comfort: c1..c3\nfactor courtesy: s1..s3\n"


def _rows(n: int, seed: int) -> pd.DataFrame:
    loadings = np.kron(np.eye(2), np.full((3, 1), 0.8))
    frame = simulate_cfa(loadings, np.array([[1, 0.4], [0.4, 1]]), np.eye(6) * 0.36, n, seed, ITEMS)
    frame["Finished"] = np.where(np.arange(n) % 7 == 2, "no", "yes")
    frame.loc[frame["Finished"] == "no", ITEMS] += np.random.default_rng(seed).normal(0, 3, (n // 7 + 1, 6))[
        :int((frame["Finished"] == "no").sum())]  # the unfinished rows are noise: leaving them out changes the fit
    return frame


def test_split_half_keeps_the_filtered_rows_before_the_split(tmp_path):
    frame = _rows(420, 1204)
    path, kept_path = tmp_path / "riders.csv", tmp_path / "kept.csv"
    frame.to_csv(path, index=False)
    kept = frame[frame["Finished"] == "yes"]  # pandas: the reference rows
    kept.to_csv(kept_path, index=False)
    filtered = split_half(MODEL, path, seed=7, keep=["Finished = yes"])
    reference = split_half(MODEL, kept_path, seed=7)
    unfiltered = split_half(MODEL, path, seed=7)
    for mine, theirs in zip(filtered, reference):
        assert mine.calibration_result.n_obs + mine.loose.n_obs == len(kept)
        assert mine.calibration_result.fit.chi_square == pytest.approx(theirs.calibration_result.fit.chi_square, rel=1e-10)
    assert filtered[0].calibration_result.fit.chi_square != pytest.approx(unfiltered[0].calibration_result.fit.chi_square)
    rows = filtered[0].split
    assert (rows.split, rows.in_file, rows.rows_in_file) == (len(kept), len(kept), len(frame))
    assert any(note == f"row filter 'Finished = yes' kept {len(kept)} of {len(frame)} rows" for note in filtered[0].notes)
    paragraph = " ".join(replication_paragraph(Replications(filtered)).split())
    assert f"of the {len(kept)} rows of one data file kept by the row filter 'Finished = yes' (of the {len(frame)} rows " \
           f"in the file)" in paragraph


def test_each_of_two_files_is_filtered(tmp_path):
    first, second = _rows(300, 11), _rows(280, 12)
    paths = [tmp_path / "spring.csv", tmp_path / "autumn.csv"]
    kept_paths = [tmp_path / "spring_kept.csv", tmp_path / "autumn_kept.csv"]
    for frame, path, kept_path in zip((first, second), paths, kept_paths):
        frame.to_csv(path, index=False)
        frame[frame["Finished"] == "yes"].to_csv(kept_path, index=False)
    filtered = replicate(MODEL, *paths, keep="Finished = yes")
    reference = replicate(MODEL, *kept_paths)
    assert filtered.calibration_result.n_obs == int((first["Finished"] == "yes").sum())
    assert filtered.loose.n_obs == int((second["Finished"] == "yes").sum())
    assert filtered.cvi == pytest.approx(reference.cvi, rel=1e-10)
    for path, frame in zip(paths, (first, second)):
        kept = int((frame["Finished"] == "yes").sum())
        assert f"{path}: row filter 'Finished = yes' kept {kept} of {len(frame)} rows" in filtered.notes


def test_replicate_takes_keep_on_the_command_line(tmp_path):
    frame = _rows(420, 1205)
    path, model = tmp_path / "riders.csv", tmp_path / "riders.cfa"
    frame.to_csv(path, index=False)
    model.write_text(MODEL, encoding="utf-8")
    done = run("replicate", str(model), "--data", str(path), "--seed", "7", "--keep", "Finished = yes")
    assert done.returncode == 0, done.stderr
    text = " ".join(done.stdout.split())
    kept = int((frame["Finished"] == "yes").sum())
    assert f"The {kept} rows kept by the row filter 'Finished = yes' (of the {len(frame)} rows in the file) were split " \
           f"at random into two halves." in text


def test_a_filter_comparing_text_by_order_names_the_file_that_holds_the_text(tmp_path, capsys):
    """replicate --keep 'grade >= 6' where the validation file writes grades as text: the error names that file
    (hostile s14: 'grade' holds text, in which of the two files?)."""
    import numpy as np
    import pandas as pd

    from cfa_tool.cli import main
    from tests.conftest import DATASETS

    hs = pd.read_csv(DATASETS / "holzinger_swineford_1939.csv")
    rng = np.random.default_rng(1)
    cal, val = hs.iloc[:150].copy(), hs.iloc[150:].copy()
    cal["grade"] = rng.integers(1, 13, len(cal))
    val["grade"] = [f"Grade {g}" for g in rng.integers(1, 13, len(val))]
    cal.to_csv(tmp_path / "cal.csv", index=False)
    val.to_csv(tmp_path / "val.csv", index=False)
    model = tmp_path / "m.cfa"
    model.write_text("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n")
    code = main(["replicate", str(model), "--calibration", str(tmp_path / "cal.csv"), "--validation",
                 str(tmp_path / "val.csv"), "--keep", "grade >= 6"])
    err = capsys.readouterr().err
    assert code == 2 and f"'grade' of {tmp_path / 'val.csv'} holds text" in err and len(err.strip().splitlines()) == 1
