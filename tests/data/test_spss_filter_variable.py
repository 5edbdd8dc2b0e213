"""An SPSS file saved while a case filter was on holds every case, the filter written as a variable ('filter_$',
labelled "... (FILTER)", values 0 'Not Selected' and 1 'Selected': SPSS's 'Select Cases', recalled from memory).
Its deselected rows are analysed as the file holds them, but named first with the row filter that keeps the selected
ones (hostile trial s15, case 10: every row was analysed without a word).

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed), written to SPSS
files here by pyreadstat."""

from __future__ import annotations

import pytest

from cfa_tool.data.readers import read_data
from tests.conftest import run_cli

pyreadstat = pytest.importorskip("pyreadstat")


def _saved(frame, path, labels=("Not Selected", "Selected"), variable="filter_$",
           label="district = 'north' (FILTER)"):
    frame = frame.copy()
    frame[variable] = (frame["district"] == "north").astype(float)
    pyreadstat.write_sav(frame, str(path), variable_value_labels={variable: {0: labels[0], 1: labels[1]}},
                         column_labels={variable: label})
    return frame


def test_the_rows_an_spss_case_filter_deselects_are_named_first_with_the_filter(rider_demo, rider_model, tmp_path,
                                                                                 capsys):
    data = tmp_path / "survey.sav"
    frame = _saved(rider_demo, data)
    deselected = int((frame["filter_$"] == 0).sum())
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    code, out, _ = run_cli(["fit", model, "--data", data], capsys)
    assert code == 0
    said = " ".join(out[out.index("Check before interpreting"):].replace("│", " ").split())
    first_rows = ", ".join(str(r + 1) for r in frame.index[frame["filter_$"] == 0][:5])
    assert (f"survey.sav was saved with a case filter on: its filter variable filter_$ ('district = 'north' "
            f"(FILTER)') marks {deselected} of its {len(frame)} rows 'Not Selected' (rows {first_rows} and "
            f"{deselected - 5} more)") in said
    assert '--keep "filter_$ = 1"' in said
    # the filter as advised keeps the selected rows, and the caution is gone
    code, out, _ = run_cli(["fit", model, "--data", data, "--keep", "filter_$ = 1", "--json", tmp_path / "f.json"],
                           capsys)
    assert code == 0 and "case filter" not in out
    import json

    assert json.loads((tmp_path / "f.json").read_text())["n_obs"] == len(frame) - deselected


def test_a_variable_named_filter_by_its_label_alone_counts_and_other_yes_no_variables_do_not(rider_demo, tmp_path):
    labelled = tmp_path / "labelled.sav"
    _saved(rider_demo, labelled, variable="north_only", label="district = 'north' (FILTER)")
    found = [c for c in read_data(labelled).cautions if type(c).__name__ == "FilterVariable"]
    assert [(c.column, c.keep()) for c in found] == [("north_only", "north_only = 1")]
    plain = tmp_path / "plain.sav"
    _saved(rider_demo, plain, labels=("No", "Yes"), variable="north", label="lives in the north")
    assert read_data(plain).cautions == ()
