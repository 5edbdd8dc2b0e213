"""How wide the path diagram's texts are drawn, estimated on the safe side, and texts fitted to a width.

The diagram names the font family "Helvetica, Arial, sans-serif".  Helvetica, Arial and Liberation Sans (the Arial
of free systems) share their advance widths: ``REGULAR`` and ``BOLD`` give them for the printable ASCII characters,
in ems, grouped by width (Adobe's font metrics of Helvetica and Helvetica-Bold, the AFM files of the 35 standard
PostScript fonts; checked against the hmtx table of Liberation Sans 2, tests/reporting/test_text_extent.py).  Other
characters are estimated by class (``character_width``): a letter with accents by its letter (its combining marks
by ``MARK``), the characters the tool itself writes ('\u2212', '\u2265', '\u2026', ...) by their own width, wide
characters of East Asian scripts at 1 em (CJK fonts draw them on a square), emoji at 1.25 em (a colour emoji font
draws them wider than a square), and any other letter, of Greek, Cyrillic, Hebrew, Arabic or another script, at
1 em, 1.1 em for capitals: the widest of Liberation Sans (Cyrillic capital LJE, 1.06 em; 1.09 bold) and DejaVu Sans,
which draws what it lacks, are narrower; the estimate of such a name is then wider than it prints, never narrower.

A name written right to left (Hebrew, Arabic) inside a text of other words, such as a list's 'a with b: .40', is
followed by a left-to-right mark (``in_line``): without it the bidirectional algorithm (Unicode Standard Annex 9,
rules W7 and N1) sets the colon and the value after a right-to-left name on its left, '.40 :b', and the value reads
as belonging to the wrong name.
"""

from __future__ import annotations

import functools
import unicodedata

#: advance widths of printable ASCII in Helvetica (Adobe's AFM; Arial's and Liberation Sans's alike), in ems
REGULAR = {0.191: "'", 0.222: "ijl", 0.26: "|", 0.278: " !,./:;I[\\]ft", 0.333: "()-`r", 0.334: "{}", 0.355: '"',
           0.389: "*", 0.469: "^", 0.5: "Jcksvxyz", 0.556: "#$0123456789?L_abdeghnopqu", 0.584: "+<=>~",
           0.611: "FTZ", 0.667: "&ABEKPSVXY", 0.722: "CDHNRUw", 0.778: "GOQ", 0.833: "Mm", 0.889: "%",
           0.944: "W", 1.015: "@"}
BOLD = {0.238: "'", 0.278: " ,./I\\ijl", 0.28: "|", 0.333: "!()-:;[]`ft", 0.389: "*r{}", 0.474: '"', 0.5: "z",
        0.556: "#$0123456789J_aceksvxy", 0.584: "+<=>^~", 0.611: "?FLTZbdghnopqu", 0.667: "EPSVXY",
        0.722: "&ABCDHKNRU", 0.778: "GOQw", 0.833: "M", 0.889: "%m", 0.944: "W", 0.975: "@"}
#: characters beyond ASCII the tool writes itself: the true minus, the comparison signs, the ellipsis, dashes (the
#: same metrics; the comparison signs from Arial's, Helvetica taking them from its Symbol font at 0.549)
WRITTEN = {"\u2212": 0.584, "\u2264": 0.549, "\u2265": 0.549, "\u2026": 1.0, "\u2013": 0.556, "\u2014": 1.0,
           "\u00a0": 0.278, "\u2018": 0.278, "\u2019": 0.278, "\u201c": 0.5, "\u201d": 0.5, "\u00b7": 0.333}
WIDE = 1.0  # East Asian wide and full-width characters (Unicode Standard Annex 11)
EMOJI = 1.25  # symbols drawn wide: a colour emoji font's advance is about 1.25 em (Noto Color Emoji: recalled from memory)
OTHER = 1.0  # a letter of another script, or any other character
#: a combining mark takes no advance of its own, but its ink may reach past its letter's (a line over an 'i' is as
#: wide as an 'n'; Chromium's box of an 'i' with sixteen marks is 9 units wide at 12, the 'i' 2.7); a double mark
#: (U+035C to U+0362, over or under two letters) reaches 0.63 em past an 'i' (measured, test_text_extent.py)
MARK = 0.35
DOUBLE_MARK = 0.75
OTHER_CAPITAL = 1.1
LEFT_TO_RIGHT_MARK = "\u200e"

_TABLES = {False: {c: w for w, chars in REGULAR.items() for c in chars},
           True: {c: w for w, chars in BOLD.items() for c in chars}}


@functools.lru_cache(maxsize=4096)
def character_width(c: str, bold: bool = False) -> float:
    """The advance width of the character ``c`` in ems, on the safe side (see the module's docstring)."""
    table = _TABLES[bold]
    if c in table:
        return table[c]
    if c in WRITTEN:
        return WRITTEN[c]
    category = unicodedata.category(c)
    if category == "Cf":  # joiners, direction marks: nothing drawn
        return 0.0
    if category in ("Mn", "Me") or unicodedata.combining(c):  # a mark drawn on the letter before it
        return DOUBLE_MARK if "DOUBLE" in unicodedata.name(c, "") else MARK
    if category.startswith("C") or category in ("Zl", "Zp"):
        return OTHER
    decomposed = unicodedata.normalize("NFKD", c)
    if decomposed != c and all(d in table or unicodedata.combining(d) for d in decomposed):
        return sum(table.get(d, 0.0) for d in decomposed)  # a Latin letter with its accents: as the letter
    if unicodedata.east_asian_width(c) in ("W", "F"):
        return EMOJI if category == "So" else WIDE
    if category == "So":
        return EMOJI
    return OTHER_CAPITAL if category in ("Lu", "Lt") else OTHER


#: the ink of a text's first and last letters may reach past their advance widths ('j' leftwards, 'w' and '_'
#: rightwards), and a browser rounds a short text's box to whole pixels: Chromium's box of a 'w' in bold at 13 units
#: is 12 units wide, its advance 10.1 (measured, tests/reporting/test_text_extent.py); a text is taken this much wider
OVERHANG = 0.15  # em


def text_width(text: str, size: float, bold: bool = False) -> float:
    """The width of ``text`` drawn at ``size`` units in the diagram's font, estimated on the safe side: its
    characters' advance widths and ``OVERHANG``."""
    return size * (sum(character_width(c, bold) for c in text) + OVERHANG) if text else 0.0


ELLIPSIS = "\u2026"


def shortened(text: str, size: float, room: float, bold: bool = False) -> str:
    """``text`` as it fits in ``room`` units at ``size``: whole when it fits, else its beginning and its end joined by
    '…' (two names alike in their beginning, 'satisfaction with the night service, wave 1' and '..., wave 2', stay
    apart by their ends): two thirds of the room for the beginning, a third for the end."""
    if text_width(text, size, bold) <= room:
        return text
    room -= text_width(ELLIPSIS, size, bold)
    head = _prefix(text, size, room * 2 / 3, bold)
    if " " in head[len(head) * 2 // 3:]:  # cut between words where one ends near the cut
        head = head[:head.rindex(" ")]
    tail = _prefix(text[::-1], size, room - text_width(head, size, bold), bold)[::-1]
    while tail and unicodedata.combining(tail[0]):  # never a mark without its letter
        tail = tail[1:]
    if " " in tail[:len(tail) // 3]:
        tail = tail[tail.index(" ") + 1:]
    return head.rstrip() + ELLIPSIS + tail.lstrip()


def _prefix(text: str, size: float, room: float, bold: bool) -> str:
    """The longest beginning of ``text`` no wider than ``room`` (a letter kept with its marks)."""
    used, end = 0.0, 0
    for k, c in enumerate(text):
        used += size * character_width(c, bold)
        if used > room:
            break
        end = k + 1
    while end and end < len(text) and unicodedata.combining(text[end]):
        end -= 1  # the letter before a mark that did not fit goes too
    return text[:end]


def wrapped(text: str, size: float, room: float, bold: bool = False) -> list[str]:
    """``text`` in lines no wider than ``room`` units at ``size``: broken at spaces, a word wider than a line broken
    where the line is full."""
    lines: list[str] = []
    line = ""
    for word in text.split(" "):
        joined = f"{line} {word}" if line else word
        if text_width(joined, size, bold) <= room:
            line = joined
            continue
        if line:
            lines.append(line)
        while text_width(word, size, bold) > room:
            part = _prefix(word, size, room, bold) or word[0]
            lines.append(part)
            word = word[len(part):]
        line = word
    if line or not lines:
        lines.append(line)
    return lines


def in_line(name: str) -> str:
    """A name as it stands among other words of a text: followed by a left-to-right mark when it holds a letter
    written right to left (see the module's docstring), as it is otherwise."""
    if any(unicodedata.bidirectional(c) in ("R", "AL") for c in name):
        return name + LEFT_TO_RIGHT_MARK
    return name
