"""The measure level an SPSS file gives each variable (nominal, ordinal, scale: pyreadstat's variable_measure) is kept
with the data read, and used where it helps a researcher's decision: an item measured nominal among items measured
otherwise is named (the model analyses its codes as ordered answers), and a group column measured as a scale without
value labels is said to make each of its values a group.  Items all nominal, as SPSS may set on its own, say nothing.

Check values: the levels pyreadstat itself reads back from the file written (the outside reference).  Data: the
bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed), with an invented column of
ages."""

from __future__ import annotations

import json

import pytest

from cfa_tool import cli
from cfa_tool.data.readers import MEASURE_LEVELS, MeasureLevel, read_data

pyreadstat = pytest.importorskip("pyreadstat")

ITEMS = ["seat_available", "clean", "temperature", "room_to_stand"]
MODEL = "factor comfort: " + ", ".join(ITEMS) + "\n"


def _sav(rider_demo, path, measures: dict[str, str], labels: dict | None = None):
    frame = rider_demo.copy()
    frame["age"] = frame.index % 4 + 30
    pyreadstat.write_sav(frame, str(path), variable_measure=measures, variable_value_labels=labels)
    return path


def _fit_json(tmp_path, data, *argv) -> dict:
    (tmp_path / "m.cfa").write_text(MODEL)
    out = tmp_path / f"{data.stem}.json"
    assert cli.main(["fit", str(tmp_path / "m.cfa"), "--data", str(data), "--json", str(out), *argv]) == 0
    return json.loads(out.read_text())


def test_the_measure_levels_are_kept_as_pyreadstat_reads_them(rider_demo, tmp_path):
    path = _sav(rider_demo, tmp_path / "m.sav", {"clean": "nominal", "on_time": "ordinal", "age": "scale"})
    _, meta = pyreadstat.read_sav(str(path), metadataonly=True)
    known = {k: v for k, v in meta.variable_measure.items() if v != "unknown"}
    assert known == {"clean": "nominal", "on_time": "ordinal", "age": "scale"}
    kept = read_data(path).frame.attrs[MEASURE_LEVELS]
    assert {k: v.value for k, v in kept.items()} == known
    assert kept["clean"] is MeasureLevel.NOMINAL


def test_a_nominal_item_among_ordinal_ones_is_named(rider_demo, tmp_path):
    levels = {x: "ordinal" for x in ITEMS} | {"clean": "nominal"}
    found = _fit_json(tmp_path, _sav(rider_demo, tmp_path / "one.sav", levels))
    said = json.dumps(found)
    assert ("one.sav: the SPSS file measures the item 'clean' as nominal (categories without an order) and the other "
            "items as ordinal; the model analyses every item's codes as ordered answers: check that its codes are "
            "answers on the scale of the others, or leave it out of the model") in said
    # every item nominal (as SPSS may set on its own): nothing to tell apart, nothing said
    every = _fit_json(tmp_path, _sav(rider_demo, tmp_path / "all.sav", {x: "nominal" for x in ITEMS}))
    assert "measures the item" not in json.dumps(every)


def test_a_group_column_measured_as_a_scale_is_said_to_make_each_value_a_group(rider_demo, tmp_path):
    scale = _fit_json(tmp_path, _sav(rider_demo, tmp_path / "scale.sav", {"age": "scale"}), "--group-column", "age")
    note = ("The group column 'age' is measured as a scale (amounts) in the SPSS file and has no value labels: each of "
            "its 4 different values is a group of its own")
    assert note in json.dumps(scale)
    # a group column measured nominal, or with value labels (its codes named as groups), is read as groups
    nominal = _fit_json(tmp_path, _sav(rider_demo, tmp_path / "nominal.sav", {"age": "nominal"}), "--group-column",
                        "age")
    labelled = _fit_json(tmp_path, _sav(rider_demo, tmp_path / "labelled.sav", {"age": "scale"},
                                        {"age": {30.0: "a", 31.0: "b", 32.0: "c", 33.0: "d"}}), "--group-column", "age")
    assert "measured as a scale" not in json.dumps(nominal) + json.dumps(labelled)


def test_the_levels_follow_a_rename_and_a_row_filter(rider_demo, tmp_path):
    levels = {x: "ordinal" for x in ITEMS} | {"clean": "nominal", "age": "scale"}
    path = _sav(rider_demo, tmp_path / "kept.sav", levels)
    (tmp_path / "m.cfa").write_text(MODEL.replace("clean", "tidy"))
    out = tmp_path / "kept.json"
    assert cli.main(["fit", str(tmp_path / "m.cfa"), "--data", str(path), "--rename", "clean=tidy", "--keep",
                     "district == 'north'", "--group-column", "age", "--json", str(out)]) == 0
    said = out.read_text()
    assert "measures the item 'tidy' as nominal" in said and "The group column 'age' is measured as a scale" in said
