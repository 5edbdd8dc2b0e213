"""A group that the model file or --reference-group names, in the file but left out by a row filter, is an error
naming the filter (hostile s21: 'there is no group 'east side' in the data' sent the user looking for a typo in a
group the filter had left out on purpose).  A group no row has is still the 'no group' error with its guess."""

from __future__ import annotations

import numpy as np

from cfa_tool.cli import main

RIDER = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
         "factor comfort: seat_available, clean, temperature, room_to_stand\n"
         "factor courtesy: greeting, helpful, respectful, clear_answers\n")


def _files(tmp_path, rider_demo, extra: str = ""):
    data = rider_demo.drop(columns=["district"]).copy()
    data["g3"] = np.array(["north", "south", "east side"])[np.arange(len(data)) % 3]  # invented groups
    data.to_csv(tmp_path / "g3.csv", index=False)
    (tmp_path / "m.cfa").write_text(RIDER + extra)
    return str(tmp_path / "m.cfa"), str(tmp_path / "g3.csv")


def test_a_group_the_model_names_left_out_by_the_filter(tmp_path, rider_demo, capsys):
    model, data = _files(tmp_path, rider_demo, 'invariance scalar\nin group "east side": noninvariant intercept(clean)\n')
    code = main(["fit", model, "--data", data, "--group-column", "g3", "--keep", "g3 != east side"])
    err = capsys.readouterr().err
    assert code == 2 and len(err.strip().splitlines()) == 1
    assert 'group "east side" (a group the model file names) has rows in the file but none among those the row filter' in err
    assert "there is no group" not in err


def test_the_reference_group_left_out_by_the_filter_in_fit_and_invariance(tmp_path, rider_demo, capsys):
    model, data = _files(tmp_path, rider_demo)
    for command in ("fit", "invariance"):
        code = main([command, model, "--data", data, "--group-column", "g3", "--keep", "g3 != east side",
                     "--reference-group", "east side"])
        err = capsys.readouterr().err
        assert code == 2 and 'group "east side" (the reference group) has rows in the file but none' in err, (command, err)
        assert "choose another reference group" in err


def test_a_group_no_row_has_is_still_said_absent(tmp_path, rider_demo, capsys):
    model, data = _files(tmp_path, rider_demo, 'in group "west side": fix loading(comfort, clean) = 1\n')
    code = main(["fit", model, "--data", data, "--group-column", "g3", "--keep", "g3 != east side"])
    err = capsys.readouterr().err
    assert code == 2 and "there is no group \"west side\"" in err
