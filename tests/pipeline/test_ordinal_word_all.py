"""'all' as the value of ordinal= (--ordinal all) means every item; an item named 'all' makes it ambiguous, and the
fit is refused with the way to name the item alone (hostile trial 10, case 08: every item became ordinal)."""

from __future__ import annotations

import pytest

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.errors import OptionError
from cfa_tool.language import parse_model
from cfa_tool.pipeline.inputs import ordinal_items_of

MODEL = "factor f: on_time, short_wait, accurate_info, all\nfactor g: seat_available, clean, temperature, room_to_stand\n"


def test_the_word_all_beside_an_item_named_all_is_refused(rider_demo):
    frame = rider_demo.rename(columns={"easy_transfer": "all"})
    with pytest.raises(OptionError, match="'all' is both the word for every item and an item's name"):
        cfa_tool.fit(MODEL, frame, ordinal="all")


def test_the_item_named_all_given_alone_is_the_item():
    spec = parse_model(MODEL)
    assert ordinal_items_of(spec, ["all"]) == {"all"}
    assert ordinal_items_of(parse_model(MODEL.replace("all", "easy_transfer")), "all") == set(
        parse_model(MODEL.replace("all", "easy_transfer")).observed_names)


def test_on_the_command_line(tmp_path, rider_demo, capsys):
    rider_demo.rename(columns={"easy_transfer": "all"}).to_csv(tmp_path / "d.csv", index=False)
    (tmp_path / "m.cfa").write_text(MODEL)
    assert main(["fit", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "d.csv"), "--ordinal", "all"]) == 2
    assert "--ordinal '\"all\"' on the command line" in capsys.readouterr().err


def test_explore_refuses_the_word_all_beside_an_item_named_all(rider_demo):
    # the same rule where explore reads --ordinal (it resolved 'all' on its own and made every item ordinal)
    frame = rider_demo.rename(columns={"easy_transfer": "all"})
    items = ["on_time", "short_wait", "accurate_info", "all", "seat_available", "clean", "temperature",
             "room_to_stand"]
    with pytest.raises(OptionError, match="'all' is both the word for every item and an item's name"):
        cfa_tool.explore(frame, items=items, ordinal="all")
