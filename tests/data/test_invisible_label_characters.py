"""Group labels that differ only by an invisible format character (a zero-width space U+200B, a soft hyphen U+00AD, a
byte-order mark U+FEFF: Unicode category Cf, as text copied from a web form carries) are one group, by the one rule
of labels that also merges end spaces and Unicode forms, with a note naming the characters and their rows; labels
that differ by format characters that change what is drawn are refused; row filters compare by the same rule
(hostile trial s16, case 07: 'north' and 'north' + U+200B were two groups named alike, n = 240 each, exit 0)."""

from __future__ import annotations

import unicodedata
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.labels import label_notes, label_text
from cfa_tool.errors import DataError

ROOT = Path(__file__).resolve().parents[2]
DATA = ROOT / "demo" / "rider_survey.csv"  # invented rider survey, simulated with a fixed seed
MODEL = "factor f: on_time, short_wait, accurate_info, easy_transfer\n"


@pytest.fixture(scope="module")
def rows() -> pd.DataFrame:
    """The demo's first 300 complete rows, in two cities: 'north' the odd rows, 'south' the even ones."""
    frame = pd.read_csv(DATA).dropna().head(300).reset_index(drop=True)
    return frame.assign(city=np.where(np.arange(300) % 2 == 1, "north", "south").astype(object))


def with_label(rows: pd.DataFrame, written: str, every: int = 3) -> pd.DataFrame:
    """``rows`` with every ``every``-th 'north' written as ``written``."""
    city = rows["city"].to_numpy().copy()
    city[1::2 * every] = written
    return rows.assign(city=city)


@pytest.mark.parametrize("mark", ["\u200b", "\u00ad", "\ufeff", "\u2060", "\u200e"])
def test_an_invisible_format_character_makes_no_other_group(rows, mark):
    # the characters' category from Python's unicodedata (the Unicode Character Database), not from the project
    assert unicodedata.category(mark) == "Cf"
    for written in (f"north{mark}", f"{mark}north", f"nor{mark}th"):
        messy = with_label(rows, written)
        moved = int((messy["city"] == written).sum())  # pandas, from the cells written: 50 of north's 150
        assert moved == 50
        fitted = cfa_tool.fit(MODEL, messy, group="city")
        assert [(g.label, g.data.n_obs) for g in fitted.groups] == [("north", 150), ("south", 150)]
        clean = cfa_tool.fit(MODEL, rows, group="city")
        assert fitted.fit.chi_square == pytest.approx(clean.fit.chi_square, rel=1e-9)  # the same rows, the same fit
        name = unicodedata.name(mark)
        spelled = written.replace(mark, "\\u%04x" % ord(mark))
        said = [n for n in fitted.warnings if "invisible format characters" in n]
        assert said == [f"in the group column 'city', labels that differ only by spaces at their ends, by invisible "
                        f"format characters or by Unicode form were read as one group: 'north' (100 rows) and "
                        f"'{spelled}' (50 rows; U+{ord(mark):04X} {name}) as "
                        f"'north'"]


def test_a_decomposed_label_with_a_zero_width_space_is_read_without_both(rows):
    # hostile s16: the note said 'read without them' of an NFD label with a trailing U+200B, yet the group kept it
    nfd = unicodedata.normalize("NFD", "caf\u00e9") + "\u200b"
    messy = rows.assign(city=np.where(rows["city"] == "north", nfd, "south"))
    fitted = cfa_tool.fit(MODEL, messy, group="city")
    assert [g.label for g in fitted.groups] == ["caf\u00e9", "south"]  # composed (NFC) and without U+200B
    assert ("in the group column 'city', labels written with spaces at their ends, with invisible format characters "
            "or in another Unicode form were read without them: 'cafe\u0301\\u200b' (150 rows; U+200B ZERO WIDTH "
            "SPACE) as 'caf\u00e9'") in fitted.warnings


def test_invariance_and_a_reference_group_read_labels_by_the_same_rule(rows):
    messy = with_label(rows, "north\u200b")
    ladder = cfa_tool.invariance(MODEL, messy, group="city")
    assert ladder.groups == ("north", "south")
    fitted = cfa_tool.fit(MODEL + "invariance scalar\n", messy, group="city", reference_group="south\ufeff")
    assert fitted.groups[0].label == "south"


def test_a_cell_of_invisible_characters_alone_has_no_group(rows):
    city = rows["city"].to_numpy().copy()
    city[::10] = "\u200b"  # 30 cells that look empty (a cell of spaces alone is read as empty by the readers)
    fitted = cfa_tool.fit(MODEL, rows.assign(city=city), group="city")
    assert [g.label for g in fitted.groups] == ["north", "south"]
    assert sum(g.data.n_obs for g in fitted.groups) == 270
    assert ("in the group column 'city', 30 cells holding only invisible format characters (U+200B ZERO WIDTH SPACE) "
            "or spaces look empty and were read as no value, so their rows have no group") in fitted.warnings


@pytest.mark.parametrize("written, mark", [("\u202enorth", "\u202e"),  # reverses even plain letters ('htron')
                                           # a zero-width non-joiner between Persian letters: another drawing
                                           ("\u0645\u06cc\u200c\u062e\u0648\u0627\u0647\u0645", "\u200c")])
def test_labels_that_differ_by_characters_that_change_what_is_drawn_are_refused(rows, written, mark):
    other = written.replace(mark, "")
    messy = rows.assign(city=np.where(np.arange(300) % 3 == 0, written, np.where(np.arange(300) % 3 == 1, other,
                                                                                  "south")))
    assert label_text(written) != label_text(other)
    with pytest.raises(DataError) as refused:
        cfa_tool.fit(MODEL, messy, group="city")
    text = str(refused.value)
    assert "in the group column 'city'" in text and "(100 rows)" in text
    assert f"U+{ord(mark):04X} {unicodedata.name(mark)}" in text and "\\u%04x" % ord(mark) in text
    # one such label alone keeps its character: a Persian word is spelled with its non-joiner
    alone = rows.assign(city=np.where(rows["city"] == "north", written, "south"))
    assert written in [g.label for g in cfa_tool.fit(MODEL, alone, group="city").groups]


def test_row_filters_compare_labels_by_the_same_rule(rows):
    messy = with_label(rows, "north\u200b")
    kept = cfa_tool.fit(MODEL, messy, keep="city = north")
    assert kept.data.n_obs == 150  # every north row, whichever way written
    said = [n for n in kept.warnings if n.startswith("row filter 'city = north'")]
    assert said == ["row filter 'city = north' kept 150 of 300 rows; cells written with spaces at their ends, "
                    "invisible format characters or in another Unicode form were compared as their label: 'north' "
                    "(100 rows) and 'north\\u200b' (50 rows; U+200B ZERO WIDTH SPACE) as 'north'"]
    assert cfa_tool.fit(MODEL, messy, keep="city = north\u00ad").data.n_obs == 150  # the filter's text too
    assert cfa_tool.fit(MODEL, messy, keep="city != north").data.n_obs == 150


def test_the_notes_say_the_rule_the_labels_follow(rows):
    # every raw text a note lists is read as the label the note names
    messy = rows.assign(city=["north\u200b", "north ", "no\u00adrth", "north", "\ufeffsouth", "south"] * 50)
    for note in label_notes(messy, "city"):
        assert "invisible format characters" in note
    assert {label_text(v) for v in messy["city"]} == {"north", "south"}
