"""The width of the path diagram's texts (reporting/text_extent.py), checked against the font a browser draws them in.

The advance widths of Helvetica are Adobe's (the AFM files of the 35 standard PostScript fonts: 'W' 944/1000 em,
'i' 222, 'm' 833, digits 556; bold 'm' 889, bold 'b' 611: recalled from memory); Arial and Liberation Sans have the
same.  The browser checks measure every printable ASCII character's advance in the font Chromium picks for the
drawing's family "Helvetica, Arial, sans-serif" (Liberation Sans on a free system), and the boxes of texts of many
scripts, which the estimate must hold.
"""

from __future__ import annotations

import html
import json
import re

import pytest

from cfa_tool.reporting.text_extent import (BOLD, LEFT_TO_RIGHT_MARK, REGULAR, character_width, in_line, shortened,
                                            text_width, wrapped)

from tests.reporting.test_diagram_layouts import CHROMIUM


def test_the_tables_hold_adobe_s_helvetica_widths():
    # Adobe's Helvetica and Helvetica-Bold AFM files (recalled from memory), in thousandths of an em
    assert [round(1000 * character_width(c)) for c in "Wim0 ."] == [944, 222, 833, 556, 278, 278]
    assert [round(1000 * character_width(c, bold=True)) for c in "Wimb0"] == [944, 278, 889, 611, 556]
    for table in (REGULAR, BOLD):  # every printable ASCII character once
        chars = "".join(table.values())
        assert sorted(chars) == [chr(c) for c in range(32, 127)]


def test_characters_beyond_ascii_by_class():
    assert character_width("\u00e9") == character_width("e")  # é, as its letter (the accent takes no advance)
    assert character_width("\u0301") == 0.35  # a combining acute: its ink, on the safe side
    assert character_width("\u035f") == 0.75  # a double macron below, under two letters
    assert character_width(LEFT_TO_RIGHT_MARK) == 0.0
    assert character_width("\u6e80") == 1.0  # a CJK ideograph: on a square
    assert character_width("\U0001f600") == 1.25  # an emoji
    assert character_width("\u0416") == 1.1 and character_width("\u0436") == 1.0  # Cyrillic capital and small zhe
    assert text_width("", 12) == 0.0
    assert text_width("WW", 10) == pytest.approx(10 * (2 * 0.944 + 0.15))  # and the overhang of its ends


def test_a_name_is_shortened_in_its_middle_to_its_room():
    name = "Perceived reliability of the night bus service as reported by riders, wave one"
    assert shortened(name, 13, 1000) == name
    short = shortened(name, 13, 300)
    head, tail = short.split("\u2026")
    assert name.startswith(head) and name.endswith(tail) and tail.endswith("wave one")
    assert text_width(short, 13) <= 300
    # two thirds of the room less the '…' (13 x 1.15) for the beginning, 56.7 units: four W of 12.27; the rest for
    # the end: 85.05 - 13 x (4 x 0.944 + 0.15) = 34.0, two W; the whole 13 x (6 x 0.944 + 1 + 0.15) = 88.6 wide
    assert shortened("W" * 80, 13, 100) == "WWWW\u2026WW"
    marks = shortened("e\u0301" * 60, 13, 100)  # never a mark without its letter, at either side of the cut
    assert not marks.split("\u2026")[1].startswith("\u0301") and marks.split("\u2026")[0].endswith("\u0301")


def test_a_text_wraps_in_lines_no_wider_than_its_room():
    text = "Riders who answered the survey on paper at a station kiosk " + "W" * 40
    lines = wrapped(text, 12, 200)
    assert all(text_width(line, 12) <= 200 for line in lines)
    words = [line for line in lines if "W" not in line]  # broken at spaces, then the word too wide for a line
    assert " ".join(words) == "Riders who answered the survey on paper at a station kiosk" and len(words) > 1
    assert "".join(line for line in lines if "W" in line) == "W" * 40
    assert wrapped("short", 12, 200) == ["short"] and wrapped("", 12, 200) == [""]


def test_only_a_name_written_right_to_left_gets_a_mark_after_it():
    assert in_line("trust") == "trust"
    assert in_line("\u05d0\u05de\u05d5\u05df") == "\u05d0\u05de\u05d5\u05df" + LEFT_TO_RIGHT_MARK  # Hebrew
    assert in_line("\u0631\u0636\u0627") == "\u0631\u0636\u0627" + LEFT_TO_RIGHT_MARK  # Arabic


def _measure(texts: list[tuple[str, float, bool]], tmp_path) -> list[tuple[float, float]]:
    """Chromium's advance (getComputedTextLength) and box width (getBoundingClientRect) of each text, drawn in the
    diagram's font family."""
    from tests.reporting.test_reports import _chromium

    body = "".join(f'<text x="50" y="{40 + 120 * k}" font-size="{size}" font-weight="{"bold" if bold else "normal"}">'
                   f"{html.escape(text)}</text>" for k, (text, size, bold) in enumerate(texts))
    svg = (f'<svg xmlns="http://www.w3.org/2000/svg" width="3000" height="{60 + 120 * len(texts)}" '
           f'font-family="Helvetica, Arial, sans-serif">{body}</svg>')
    script = ("<script>document.getElementById('out').textContent = JSON.stringify([...document.querySelectorAll("
              "'text')].map(t => [t.getComputedTextLength(), t.getBoundingClientRect().width]));</script>")
    page = tmp_path / "widths.html"
    page.write_text(f"<!DOCTYPE html><html><body style='margin:0'>{svg}<pre id='out'></pre>{script}</body></html>",
                    encoding="utf-8")
    dom = _chromium("--dump-dom", page.resolve().as_uri()).stdout
    return json.loads(html.unescape(re.search(r'<pre id="out">(.*?)</pre>', dom, re.S).group(1)))


@pytest.mark.skipif(CHROMIUM is None, reason="headless Chromium is not installed (.ci/run installs it)")
def test_in_a_browser_each_ascii_character_is_as_wide_as_the_table_says(tmp_path):
    ascii_ = [chr(c) for c in range(33, 127)]
    texts = [(c, 100.0, bold) for bold in (False, True) for c in ascii_]
    measured = _measure([("W", 100.0, False)] + texts, tmp_path)
    if abs(measured[0][0] - 94.4) > 0.5:
        pytest.skip(f"the browser draws Helvetica's family in a font of other widths ('W' {measured[0][0]:.1f})")
    for (c, _, bold), (advance, _) in zip(texts, measured[1:]):
        assert advance == pytest.approx(100 * character_width(c, bold), abs=0.2), (c, bold)


ODD_TEXTS = ["visual", "WWWWWWWW", "iiiiiiii", "MiWmiWlw", "w", "_", "j", "f", "\u2212.63", "\u2265", "Удовлетворённость",
             "ЖШЩЮЖШЩЮ", "Љ", "Ψυχολογία", "ΨΩΨΩΨΩΨΩ", "שביעות רצון", "رضا العملاء", "満足度", "\U0001f600\U0001f600",
             "\u00c6\u0153", "e\u0301e\u0301", "q\u0304\u0305\u0306\u0307\u0309", "i\u0336", "i\u035f", "a & b <c>"]


@pytest.mark.skipif(CHROMIUM is None, reason="headless Chromium is not installed (.ci/run installs it)")
def test_in_a_browser_the_estimate_holds_the_box_of_every_text(tmp_path):
    """The box a browser draws a text in (its ink and its rounding to pixels: a bold 'w' at 13 units is 12 units
    wide, its advance 10.1) is never wider than the estimate, in the sizes and weights the diagram uses."""
    texts = [(t, size, bold) for t in ODD_TEXTS for size in (12, 13, 15) for bold in (False, True)]
    for (text, size, bold), (_, box) in zip(texts, _measure(texts, tmp_path)):
        assert box <= text_width(text, size, bold) + 0.01, (text, size, bold)
