"""Scores with an earlier fit (scores --from-fit, and a fit's scorer in Python) read as no answer what the fit's own
data file declared missing (SPSS user-missing values) or labelled as no answer, in the same items, when the scored file
does not say so itself (a CSV export of the same survey, rows-s23: the 9s the fit read as missing were scored as
answers); a scored file whose value label makes such a code an answer is refused, naming both readings.

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed) with 9s set here,
written by pyreadstat (a writer this project did not write) with 9 declared missing; the reference is the same export
with those cells left empty (pandas), scored with the same fit."""

from __future__ import annotations

import json

import pandas as pd
import pytest

from tests.conftest import run_cli

pyreadstat = pytest.importorskip("pyreadstat")


def _files(rider_demo, rider_model, tmp_path, capsys, labels=None):
    items = [c for c in rider_demo.columns if c not in ("rider_id", "district")]
    frame = rider_demo.copy()
    frame.loc[0:11, "on_time"] = 9
    frame.loc[12:20, "clean"] = 9
    sav, export, empty = tmp_path / "survey.sav", tmp_path / "export.csv", tmp_path / "empty.csv"
    if labels is None:
        pyreadstat.write_sav(frame, str(sav), missing_ranges={c: [9] for c in items})
    else:
        pyreadstat.write_sav(frame, str(sav), variable_value_labels={c: labels for c in items})
    frame.to_csv(export, index=False)
    frame.replace({c: {9: None} for c in ("on_time", "clean")}).to_csv(empty, index=False)
    model, saved = tmp_path / "m.cfa", tmp_path / "fit.json"
    model.write_text(rider_model)
    code, _, err = run_cli(["fit", model, "--data", sav, "--json", saved], capsys)
    assert code == 0, err
    return model, saved, export, empty, frame


def _scores(model, saved, data, out, capsys) -> pd.DataFrame:
    code, _, err = run_cli(["scores", model, "--from-fit", saved, "--data", data, "--output", out,
                            "--json", out.with_suffix(".json")], capsys)
    assert code == 0, err
    return pd.read_csv(out)


@pytest.mark.parametrize("labels", [None, {1.0: "Never", 5.0: "Always", 9.0: "Refused"}])
def test_scores_of_an_export_read_what_the_fits_file_marked_as_no_answer(rider_demo, rider_model, tmp_path, capsys,
                                                                        labels):
    model, saved, export, empty, frame = _files(rider_demo, rider_model, tmp_path, capsys, labels)
    scored = _scores(model, saved, export, tmp_path / "export_scores.csv", capsys)
    reference = _scores(model, saved, empty, tmp_path / "empty_scores.csv", capsys)
    pd.testing.assert_frame_equal(scored, reference)  # as if the cells were empty
    assert (scored.loc[0:11, "punctuality_items_answered"] == 3).all()  # rows 0 to 11: on_time 9, set above
    notes = json.loads((tmp_path / "export_scores.json").read_text())["notes"]
    nines = {x: int((frame[x] == 9).sum()) for x in ("on_time", "clean")}  # pandas' count
    rows = int(((frame["on_time"] == 9) | (frame["clean"] == 9)).sum())
    assert (f"export.csv: {sum(nines.values())} cells of the items (in {rows} rows) holding a value that the earlier "
            f"fit's data file "
            f"marked as no answer (declared missing, or labelled so) were read as no answer, as the fit read them: "
            f"9 (on_time {nines['on_time']}, clean {nines['clean']})") in notes
    # the fit's own file: read so by its own declarations or labels, no note of the fit's
    again = _scores(model, saved, tmp_path / "survey.sav", tmp_path / "again.csv", capsys)
    pd.testing.assert_frame_equal(again, reference)
    assert not any("earlier fit's data file" in n
                   for n in json.loads((tmp_path / "again.json").read_text())["notes"])


def test_a_scored_file_labelling_such_a_code_as_an_answer_is_refused(rider_demo, rider_model, tmp_path, capsys):
    model, saved, _, _, frame = _files(rider_demo, rider_model, tmp_path, capsys)
    other = tmp_path / "other.sav"
    pyreadstat.write_sav(frame, str(other), variable_value_labels={"on_time": {1.0: "Never", 9.0: "Very often"}})
    code, _, err = run_cli(["scores", model, "--from-fit", saved, "--data", other, "--output", tmp_path / "o.csv"],
                           capsys)
    assert code == 2
    assert ("other.sav: column 'on_time' labels 9 'Very often', an answer, but the earlier fit read 9 as no answer "
            "(its data file declared it missing)") in err
    assert not (tmp_path / "o.csv").exists()


def test_scores_of_other_data_in_python_read_them_so_too(rider_demo, rider_model, tmp_path, capsys):
    import cfa_tool

    model, _, export, empty, _ = _files(rider_demo, rider_model, tmp_path, capsys)
    fitted = cfa_tool.fit(rider_model, str(tmp_path / "survey.sav"))
    scored, reference = fitted.scores(str(export)), fitted.scores(str(empty))
    pd.testing.assert_frame_equal(scored.table, reference.table)
    assert (scored.table.loc[:, "punctuality_items_answered"].iloc[:12] == 3).all()  # on_time 9 in rows 0 to 11


def test_every_value_of_a_declared_range_is_read_as_no_answer_when_other_data_are_scored(rider_demo, rider_model,
                                                                                        tmp_path, capsys):
    """An SPSS file declaring 97 to 99 missing, whose rows hold only 99: the fit keeps the declaration itself, so that
    a 98 of the scored export (a code the fit's rows never took) is read as no answer too (rows-s24: only the values
    the range took were carried, and 98 was scored as an answer).  The reference is the export with those cells left
    empty (pandas); the note counts the cells and rows of the rows the row filters kept (pandas' counts)."""
    items = [c for c in rider_demo.columns if c not in ("rider_id", "district")]
    frame = rider_demo.copy()
    frame.loc[0:5, "on_time"] = 99
    sav = tmp_path / "survey.sav"
    pyreadstat.write_sav(frame, str(sav), missing_ranges={c: [{"lo": 97, "hi": 99}] for c in items})
    model, saved = tmp_path / "m.cfa", tmp_path / "fit.json"
    model.write_text(rider_model)
    assert run_cli(["fit", model, "--data", sav, "--json", saved], capsys)[0] == 0
    other = rider_demo.copy()
    other.loc[10:13, "clean"] = 98  # inside the range, never in the fit's rows
    other.loc[20:22, "on_time"] = 97
    export, empty = tmp_path / "export.csv", tmp_path / "empty.csv"
    other.to_csv(export, index=False)
    other.replace({c: {98: None, 97: None} for c in ("on_time", "clean")}).to_csv(empty, index=False)
    scored = _scores(model, saved, export, tmp_path / "export_scores.csv", capsys)
    pd.testing.assert_frame_equal(scored, _scores(model, saved, empty, tmp_path / "empty_scores.csv", capsys))
    assert {"column": "on_time", "low": 97.0, "high": 99.0} in json.loads(saved.read_text())["data"][
        "missing_ranges_declared_by_the_file"]
    notes = json.loads((tmp_path / "export_scores.json").read_text())["notes"]
    assert ("export.csv: 7 cells of the items (in 7 rows) holding a value that the earlier fit's data file marked as "
            "no answer (declared missing, or labelled so) were read as no answer, as the fit read them: 97 (on_time "
            "3); 98 (clean 4)") in notes
    # scores of the rows a row filter keeps: the note counts those rows' cells, not every row read
    district = other.loc[10, "district"]
    kept = other[other["district"] == district]
    cells = {code: int((kept[["on_time", "clean"]] == code).to_numpy().sum()) for code in (97, 98)}
    code, _, err = run_cli(["scores", model, "--from-fit", saved, "--data", export, "--keep", f"district = {district}",
                            "--output", tmp_path / "kept.csv", "--json", tmp_path / "kept.json"], capsys)
    assert code == 0, err
    said = [n for n in json.loads((tmp_path / "kept.json").read_text())["notes"] if "earlier fit's data file" in n]
    total = sum(cells.values())
    assert len(said) == 1 and said[0].startswith(f"export.csv: {total} cell{'s' if total != 1 else ''} of the items "
                                                 f"(in {total} of the {len(kept)} rows that the row filters kept)")
