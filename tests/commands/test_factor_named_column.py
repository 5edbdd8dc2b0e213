"""A data column that shares a factor's name (hostile trial s13: a precomputed 'comfort' total beside the items of
factor comfort) was refused although the model never reads it.  Every command now leaves it unused and says so in a
note; where the run would read it (chosen as the group, id, weights or helper column, or named as an indicator of a
higher-order factor, where the name reads as the factor) it is refused, naming the factor's line.

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed) with the comfort items'
sum added by pandas."""

from __future__ import annotations

import pytest

from tests.conftest import run_cli

NOTE = "The column 'comfort' in survey.csv is not used: the model's factor has the same name"
ONE = "factor comfort: seat_available, clean, temperature, room_to_stand\n"


@pytest.fixture()
def files(rider_demo, rider_model, tmp_path):
    data = tmp_path / "survey.csv"
    rider_demo.assign(comfort=rider_demo[["seat_available", "clean", "temperature", "room_to_stand"]].sum(axis=1)) \
        .to_csv(data, index=False)
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    one = tmp_path / "one.cfa"
    one.write_text(ONE)
    return model, one, data


@pytest.mark.parametrize("argv", [
    ["fit", "{model}", "--data", "{data}"],
    ["check", "{model}", "--data", "{data}"],
    ["compare", "{one}", "{model}", "--data", "{data}"],
    ["invariance", "{model}", "--data", "{data}", "--group-column", "district"],
])
def test_a_column_the_run_does_not_read_is_left_unused_with_a_note(argv, files, capsys):
    model, one, data = files
    code, out, err = run_cli([a.format(model=model, one=one, data=data) for a in argv], capsys)
    assert code == 0, err
    assert " ".join(out.replace("│", " ").split()).lower().count(NOTE.lower()) == 1  # "Note: the column ..." in check


@pytest.mark.parametrize("option, role", [("--group-column", "the group column"), ("--id", "the id column"),
                                          ("--weights", "the weights column"),
                                          ("--missing-helpers", "a missing-data helper")])
def test_a_column_the_run_would_read_is_refused(option, role, files, capsys):
    model, _, data = files
    code, _, err = run_cli(["fit", model, "--data", data, option, "comfort"], capsys)
    assert code == 2
    assert err.startswith(f"cfa-tool: {model}:5:8: 'comfort' is declared as a factor but is also a column of "
                          f"survey.csv, chosen as {role}; give the factor another name")


def test_a_factor_named_column_that_a_row_filter_reads_is_refused(rider_demo, tmp_path):
    """--keep 'comfort >= 10' on a column named like the factor comfort reads that column: refused as the other roles
    are, not said to be unused while the filter selects rows on it (review s14)."""
    import pytest

    import cfa_tool
    from cfa_tool.errors import ModelError

    data = rider_demo.copy()
    data["comfort"] = data[["seat_available", "clean", "temperature", "room_to_stand"]].sum(axis=1)
    path = tmp_path / "with_total.csv"
    data.to_csv(path, index=False)
    model = "factor comfort: seat_available, clean, temperature, room_to_stand\n"
    with pytest.raises(ModelError, match=r"chosen as the column of the row filter 'comfort >= 10'"):
        cfa_tool.fit(model, str(path), keep="comfort >= 10")
